"""What a name means while a sheet is evaluated: given, derived, declared, constant, relation."""

from __future__ import annotations

import itertools
from collections.abc import Callable, Mapping
from dataclasses import dataclass, field
from enum import Enum
from typing import TYPE_CHECKING, Any

import sympy

from worksheet.engine.results import LazyForm, built
from worksheet.units.dimension import Dimension

if TYPE_CHECKING:
    from worksheet.syntax.tree import Expr
    from worksheet.units.registry import ResolvedUnit


_SERIALS = itertools.count()


class Origin(Enum):
    GIVEN = "given"  # a value written with no other sheet quantity in it
    DERIVED = "derived"  # computed from other sheet quantities
    DECLARED = "declared"  # a symbol with a dimension and no value
    CONSTANT = "constant"  # from the pinned dataset
    RELATION = "relation"  # NAME(A, B) = EXPR
    ESTIMATE = "estimate"  # from dimensional analysis, up to a dimensionless factor


@dataclass(eq=False)
class Binding:
    """One named quantity. ``local`` uses other names as symbols; ``form`` is in givens."""

    name: str
    origin: Origin
    symbol: sympy.Symbol
    dimension: Dimension
    line: int | None = None
    local: sympy.Expr | LazyForm | None = None  # a LazyForm until first printed (fast path)
    deps: tuple[str, ...] = ()
    value: float | None = None  # SI
    uncertainty: float | None = None  # SI, standard, first order
    input_uncertainty: float | None = None  # SI; set when the sheet states it (+- ...)
    gradient: dict[str, float] = field(default_factory=dict)  # d value / d input, by input
    precise: Any = None  # the value at high precision (mpmath), for the precision guard
    display_unit: ResolvedUnit | None = None
    source: str = ""  # dataset source for constants
    params: tuple[str, ...] = ()  # relations only
    body: Expr | None = None  # relations only
    spread: Any = None  # a ranged input's distribution (engine.distributions.Spread)
    _form: sympy.Expr | None = field(default=None, repr=False)
    _resolver: Callable[[str], Binding | None] | None = field(default=None, repr=False)
    serial: int = field(default_factory=lambda: next(_SERIALS), repr=False)
    """Distinguishes successive bindings of one name, for the re-run cache."""
    _memo: dict[str, Any] = field(default_factory=dict, repr=False)
    """Facts worked out once from the binding and its inputs (whether it is sampled, a
    constant's partials): kept on it, as a weak mapping by binding would be, only quicker."""

    @property
    def has_value(self) -> bool:
        return self.value is not None

    def local_expr(self) -> sympy.Expr | None:
        """``local`` as a sympy expression (built now if the fast path left it lazy)."""
        self.local = built(self.local)
        return self.local

    def form(self) -> sympy.Expr:
        """The expression in givens, declared symbols and constants (computed once, lazily)."""
        if self._form is not None:
            return self._form
        local = self.local_expr()
        if self.origin not in (Origin.DERIVED, Origin.ESTIMATE) or local is None:
            self._form = self.symbol
            return self._form
        replacements = {}
        for dep in self.deps:
            other = self._resolver(dep) if self._resolver else None
            if other is not None and other.origin in (Origin.DERIVED, Origin.ESTIMATE):
                replacements[other.symbol] = other.form()
        self._form = local.xreplace(replacements) if replacements else local
        return self._form


def symbol_for(name: str, value: float | None, positive_hint: bool | None = None) -> sympy.Symbol:
    """A sympy symbol whose sign assumptions agree with the quantity's value.

    Declared symbols are positive and real (so ``solve`` picks physical roots); a given's
    sign follows its value, so simplification never assumes a false sign.
    """
    if value is None:
        if positive_hint is False:
            return sympy.Symbol(name, real=True)
        return sympy.Symbol(name, positive=True)
    if value > 0:
        return sympy.Symbol(name, positive=True)
    if value < 0:
        return sympy.Symbol(name, negative=True)
    return sympy.Symbol(name, real=True)


def unit_symbol(source: str) -> sympy.Symbol:
    """The symbol standing for one bracketed unit inside symbolic forms, e.g. ``[kg]``."""
    return sympy.Symbol(f"[{source}]", positive=True)


Scope = Mapping[str, Binding]
