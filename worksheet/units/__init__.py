"""Units: dimensions as exact vectors, and the registry that resolves bracketed units."""

from worksheet.units.dimension import Dimension
from worksheet.units.registry import ResolvedUnit, UnitRegistry

__all__ = ["Dimension", "ResolvedUnit", "UnitRegistry"]
