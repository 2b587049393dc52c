"""The one unit registry of a process: pint's unit names plus the pinned astronomical units.

Bracket text is parsed by our own grammar (``worksheet.syntax.units``); pint is asked only
about single unit names, so hostile text never reaches its parser. Names fixed by
definition (SI units, their prefixes, eV, erg, ...: ``si_names``) are answered without pint;
the pint registry is built in-process only for other names (no disk cache: pint's cache is
pickle).
"""

from __future__ import annotations

import dataclasses
import math
from dataclasses import dataclass
from decimal import Decimal
from fractions import Fraction
from typing import TYPE_CHECKING, Any

from worksheet.errors import DimensionError, ParseError
from worksheet.syntax.tree import UnitExpr
from worksheet.syntax.units import parse_unit
from worksheet.units.dimension import PINT_BASES, Dimension
from worksheet.units.si_names import SI_NAMES

if TYPE_CHECKING:
    from worksheet.constants import Dataset


@dataclass(frozen=True)
class ResolvedUnit:
    """What a bracketed unit means: SI factor, dimension and (for degC/degF) an offset."""

    source: str
    factor: float  # SI value of one of this unit
    dimension: Dimension
    offset: float = 0.0  # SI value = factor * x + offset (only for lone offset units)
    origin: str = ""  # where the definition comes from, for the constants finder

    @property
    def is_offset(self) -> bool:
        return self.offset != 0.0


SI_PREFIXES: dict[str, int] = {
    "q": -30, "r": -27, "y": -24, "z": -21, "a": -18, "f": -15, "p": -12, "n": -9,
    "u": -6, "\u00b5": -6, "m": -3, "c": -2, "d": -1, "da": 1, "h": 2, "k": 3, "M": 6,
    "G": 9, "T": 12, "P": 15, "E": 18, "Z": 21, "Y": 24, "R": 27, "Q": 30,
}  # fmt: skip
"""The SI prefixes and their powers of ten (SI Brochure, 9th edition 2019, Table 7, with
the four prefixes added by the CGPM in 2022)."""

PREFIXABLE_DATASET_UNITS = ("au", "pc", "ly", "yr", "Jy")
"""Dataset units that take SI prefixes (kpc, Mpc, mJy, Myr): the prefixed unit is the
prefix times the dataset's own definition, never pint's (pint's parsec is au/tan(1 arcsec),
7.8e-12 off the IAU 2015 B2 value). Masses such as M_sun take no prefix."""


def _clean(value: float) -> float:
    """Round off pint's float noise (1.0000000000000001e-07 for the erg) to 15 digits."""
    if value == 0 or not math.isfinite(value):
        return value
    return float(f"{value:.15g}")


def _si_factor(
    unit: UnitExpr, parts: list[ResolvedUnit], line: int | None, column: int | None
) -> float:
    """The SI factor of a bracket expression; an error when no double can hold it.

    ``[pc^-100]`` is about 1e-1649 and ``[1e400 m]`` 1e400: both would silently become 0 or
    inf (and then crash a division later), so they are refused here with their size.
    """
    try:
        factor = float(unit.scale)
        for (_, power), part in zip(unit.factors, parts, strict=True):
            factor *= part.factor ** float(power)
    except (OverflowError, ZeroDivisionError):
        factor = math.inf
    if factor != 0 and math.isfinite(factor):
        return factor
    size = _log10_size(unit, parts)
    raise ParseError(
        f"unit [{unit.source}] is about 1e{size:.0f} in SI units, outside what a double "
        "can hold (about 1e-308 to 1e308); use a smaller power or a larger unit",
        line,
        column,
    )


def _log10_size(unit: UnitExpr, parts: list[ResolvedUnit]) -> float:
    """log10 of the SI factor, computed without overflow."""
    scale = abs(unit.scale)
    size = math.log10(scale.numerator) - math.log10(scale.denominator)
    for (_, power), part in zip(unit.factors, parts, strict=True):
        if part.factor > 0:
            size += float(power) * math.log10(part.factor)
    return size


class UnitRegistry:
    """Resolves bracket text to SI factors and dimensions, for one constants dataset.

    Args:
        dataset: the pinned dataset whose astronomical units (M_sun, au, pc, ly, yr, Jy, ...)
            take precedence over pint's own definitions of the same names.
    """

    def __init__(self, dataset: Dataset):
        self.dataset = dataset
        self._pint: Any = None
        self._names: dict[str, ResolvedUnit] = {}
        self._units: dict[str, ResolvedUnit] = {}

    def _pint_registry(self) -> Any:
        if self._pint is None:
            import pint

            self._pint = pint.UnitRegistry(cache_folder=None, autoconvert_offset_to_baseunit=False)
        return self._pint

    def named(self, name: str) -> ResolvedUnit:
        """One unit name (``kg``, ``MeV``, ``M_sun``) resolved, or a ParseError saying why not."""
        cached = self._names.get(name)
        if cached is not None:
            return cached
        resolved = self._resolve_name(name)
        self._names[name] = resolved
        return resolved

    def _resolve_name(self, name: str) -> ResolvedUnit:
        astro = self.dataset.units.get(name)
        if astro is not None:
            base = self.resolve(parse_unit(astro.unit)) if astro.unit not in ("", "1") else None
            dimension = base.dimension if base else Dimension()
            return ResolvedUnit(name, astro.si_value, dimension, origin=astro.source)
        prefixed = self._prefixed_dataset_unit(name)
        if prefixed is not None:
            return prefixed
        known = SI_NAMES.get(name)
        if known is not None:
            # Fixed by definition: the answer pint would give, without building pint.
            return ResolvedUnit(name, _clean(float(known[0])), known[1], origin="SI")
        return self._resolve_with_pint(name)

    def _resolve_with_pint(self, name: str) -> ResolvedUnit:
        """A name neither the dataset nor the SI table knows, as pint defines it."""
        ureg = self._pint_registry()
        import pint

        try:
            unit = ureg.Unit(name)
        except (pint.errors.UndefinedUnitError, AttributeError, ValueError, TypeError) as err:
            from worksheet.hints import did_you_mean

            hint = did_you_mean(name, [*self.dataset.units, *_pint_unit_names(ureg)])
            raise ParseError(f"unknown unit '{name}'{hint}") from err
        dims = dict(unit.dimensionality)
        extra = set(dims) - set(PINT_BASES)
        if extra:
            raise ParseError(
                f"unit '{name}' has a dimension outside SI ({', '.join(sorted(extra))})"
            )
        exponents = tuple(
            Fraction(dims.get(base, 0)).limit_denominator(1000) for base in PINT_BASES
        )
        if any(e.denominator != 1 for e in exponents):
            raise ParseError(
                f"unit '{name}' is a Gaussian-system unit with half-integer dimensions; "
                "it has no exact SI conversion here; write the SI unit instead "
                "(e.g. [T] for [gauss])"
            )
        dimension = Dimension(exponents)
        if not ureg.Quantity(1.0, unit)._ok_for_muldiv():
            # Offset scales: SI kelvin = scale * x + offset.
            offset = float(ureg.Quantity(0.0, unit).to_base_units().magnitude)
            one = float(ureg.Quantity(1.0, unit).to_base_units().magnitude)
            return ResolvedUnit(name, _clean(one - offset), dimension, _clean(offset), "pint")
        factor = _clean(float(ureg.Quantity(1.0, unit).to_base_units().magnitude))
        return ResolvedUnit(name, factor, dimension, origin="pint")

    def _prefixed_dataset_unit(self, name: str) -> ResolvedUnit | None:
        """``kpc``, ``Mpc``, ``mJy``: an SI prefix on a dataset unit, from the dataset's value."""
        for symbol in PREFIXABLE_DATASET_UNITS:
            power = SI_PREFIXES.get(name.removesuffix(symbol)) if name.endswith(symbol) else None
            astro = self.dataset.units.get(symbol)
            if power is None or astro is None:
                continue
            base = self.named(symbol)
            factor = float(Decimal(astro.value).scaleb(power))  # correctly rounded
            return ResolvedUnit(name, factor, base.dimension, origin=astro.source)
        return None

    def resolve(
        self, unit: UnitExpr, line: int | None = None, column: int | None = None
    ) -> ResolvedUnit:
        """A whole bracket expression (``erg/s``) as one SI factor and dimension."""
        cached = self._units.get(unit.source)
        if cached is not None:
            return cached
        dimension = Dimension()
        parts: list[ResolvedUnit] = []
        for name, power in unit.factors:
            try:
                part = self.named(name)
            except ParseError as err:
                raise ParseError(err.message, line, column) from err
            parts.append(part)
            dimension = dimension * part.dimension**power
        factor = _si_factor(unit, parts, line, column)
        offset_parts = [part for part in parts if part.is_offset]
        if offset_parts:
            only = len(unit.factors) == 1 and unit.factors[0][1] == 1 and unit.scale == 1
            if not only:
                raise DimensionError(
                    f"offset temperature [{offset_parts[0].source}] cannot be part of a "
                    f"compound unit [{unit.source}]; use [delta_{offset_parts[0].source}] "
                    "for a temperature difference, or [K]",
                    line,
                    column,
                )
            resolved = parts[0]
        elif len(parts) == 1 and unit.factors[0][1] == 1 and unit.scale == 1:
            # No re-rounding; the dimension worked out above is the one arithmetic hands
            # out, so comparing it with a computed one is a matter of identity.
            resolved = dataclasses.replace(parts[0], source=unit.source, dimension=dimension)
        else:
            resolved = ResolvedUnit(unit.source, _clean(factor), dimension)
        self._units[unit.source] = resolved
        return resolved

    def resolve_text(self, text: str) -> ResolvedUnit:
        """Resolve ``kg``, ``[kg]`` or ``erg/s`` as typed on the command line."""
        inner = text.strip()
        if inner.startswith("[") and inner.endswith("]"):
            inner = inner[1:-1]
        return self.resolve(parse_unit(inner))


def _pint_unit_names(ureg: Any) -> list[str]:
    """pint's unit names and symbols, for a 'did you mean' after an unknown unit."""
    names = [p + u for p in "kMGTPmunpf" for u in ("eV", "m", "g", "s", "Hz", "W", "J", "pc")]
    for name, definition in getattr(ureg, "_units", {}).items():
        names.append(name)
        symbol = getattr(definition, "symbol", None)
        if symbol:
            names.append(symbol)
    return names
