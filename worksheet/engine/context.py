"""Everything one evaluation needs, passed explicitly: dataset, units, digits, budget."""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass, field
from types import MappingProxyType

import sympy

from worksheet.constants import DEFAULT_DATASET, Dataset, load_dataset
from worksheet.engine.bindings import Binding, Origin
from worksheet.engine.budget import DEFAULT_SECONDS, Worker
from worksheet.engine.distributions import DEFAULT_SAMPLES, DEFAULT_SEED
from worksheet.syntax.units import parse_unit
from worksheet.units.registry import UnitRegistry


@dataclass
class Context:
    """One dataset's registry and constants, the recording precision and the time budget."""

    dataset: Dataset
    registry: UnitRegistry
    digits: int = 4
    seconds: float = DEFAULT_SECONDS
    guard: bool = True  # the precision guard (SPEC section 8)
    seed: int = DEFAULT_SEED  # for ranged inputs (front matter 'seed')
    samples: int = DEFAULT_SAMPLES  # samples per ranged input (front matter 'samples')
    worker: Worker = field(default_factory=Worker)
    unit_values: dict[sympy.Symbol, float] = field(default_factory=dict)
    _constants: Mapping[str, Binding] | None = None

    @property
    def constants(self) -> Mapping[str, Binding]:
        """The dataset's constants as bindings (built on first use)."""
        if self._constants is None:
            built: dict[str, Binding] = {}
            for symbol, constant in self.dataset.constants.items():
                unit = self.registry.resolve(parse_unit(constant.unit))
                built[symbol] = Binding(
                    name=symbol,
                    origin=Origin.CONSTANT,
                    symbol=sympy.Symbol(symbol, positive=True),
                    dimension=unit.dimension,
                    value=constant.si_value * unit.factor,
                    uncertainty=constant.si_uncertainty * unit.factor,
                    source=constant.source,
                )
            self._constants = MappingProxyType(built)
        return self._constants


def make_context(
    dataset: str | None = None,
    digits: int = 4,
    seconds: float = DEFAULT_SECONDS,
    guard: bool = True,
    seed: int = DEFAULT_SEED,
    samples: int = DEFAULT_SAMPLES,
) -> Context:
    """A context for a dataset name (default: the newest CODATA)."""
    data = load_dataset(dataset or DEFAULT_DATASET)
    return Context(
        data,
        UnitRegistry(data),
        digits=digits,
        seconds=seconds,
        guard=guard,
        seed=seed,
        samples=samples,
    )
