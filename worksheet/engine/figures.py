"""The numbers of one expression: its double-precision value, the same value at high
precision (the precision guard), and its partial derivatives in the uncertain inputs.

Uncertainties propagate to first order: u^2 = sum over independent inputs of
(df/dx_i * u_i)^2, with the partial derivatives computed exactly by forward-mode
differentiation of the expression (no finite differences). The precision guard evaluates
the same expression with mpmath at 50 digits from exact inputs and flags a relative
disagreement above ``LOSS_TOLERANCE`` (cancellation, overflow, underflow).
"""

from __future__ import annotations

import functools
import math
from collections.abc import Callable, Mapping
from dataclasses import dataclass, field
from fractions import Fraction
from typing import TYPE_CHECKING, Any

import sympy

from worksheet.engine.numeric import DUAL, Dual, MissingValue, MpBackend, evaluate
from worksheet.errors import EvaluationError

if TYPE_CHECKING:
    from worksheet.engine.bindings import Binding
    from worksheet.engine.context import Context

LOSS_TOLERANCE = 1e-9
"""Relative disagreement between double and high precision that counts as precision loss."""

ROUNDING_FLOOR = 1e-12
"""A propagated relative uncertainty below this is rounding noise of cancelling partials."""

POOR_FIRST_ORDER = 0.3
"""Relative uncertainty above which first-order propagation is said to be poor."""

MAX_RECORDED_BITS = 100_000
"""High-precision values beyond 2^±100000 (about 10^±30000) are refused, not recorded."""

_MP = MpBackend(50)


@dataclass(frozen=True)
class Figures:
    """Numbers for one expression. ``value`` is the double-precision SI value (None when a
    symbol has no value); ``precise`` the 50-digit value; ``loss`` says why they disagree."""

    value: float | None
    precise: Any = None
    gradient: Mapping[str, float] = field(default_factory=dict)
    uncertainty: float | None = None
    loss: str | None = None

    @property
    def trusted(self) -> float | None:
        """The value to record: the high-precision one where double precision failed."""
        if self.loss is not None and self.precise is not None:
            return float(self.precise)
        return self.value


class SymbolValues(Mapping):
    """Symbol -> number of one kind ('float', 'dual' or 'mp') from sheet, units, constants."""

    def __init__(self, sheet: Mapping[sympy.Symbol, Binding], ctx: Context, kind: str):
        self.sheet = sheet
        self.ctx = ctx
        self.kind = kind

    def __getitem__(self, symbol: sympy.Symbol) -> Any:
        binding = self.sheet.get(symbol)
        if binding is not None:
            if binding.value is None:
                raise KeyError(symbol)
            if self.kind == "float":
                return binding.value
            if self.kind == "dual":
                return Dual(binding.value, dict(binding.gradient))
            return binding.precise if binding.precise is not None else _MP.mp.mpf(binding.value)
        unit = self.ctx.unit_values.get(symbol)
        if unit is not None:
            if self.kind == "float":
                return unit
            if self.kind == "dual":
                return Dual(
                    unit, _g_seed(unit_g_power(symbol.name[1:-1], self.ctx), unit, self.ctx)
                )
            return _MP.mp.mpf(unit)
        constant = self.ctx.constants.get(symbol.name)
        if constant is None or constant.symbol != symbol or constant.value is None:
            raise KeyError(symbol)
        if self.kind == "float":
            return constant.value
        if self.kind == "dual":
            seed = _g_seed(name_g_power(symbol.name, self.ctx), constant.value, self.ctx)
            if not seed and constant.uncertainty:
                seed = {symbol.name: 1.0}
            return Dual(constant.value, seed)
        return _MP.mp.mpf(self.ctx.dataset.constants[symbol.name].value)

    def __iter__(self):
        return iter(self.sheet)

    def __len__(self) -> int:
        return len(self.sheet)


PLANCK_G_POWERS = {
    "l_P": Fraction(1, 2),
    "t_P": Fraction(1, 2),
    "m_P": Fraction(-1, 2),
    "T_P": Fraction(-1, 2),
}
"""l_P = sqrt(hbar G/c^3), t_P = sqrt(hbar G/c^5), m_P = sqrt(hbar c/G), T_P = m_P c^2/k_B
(CODATA's definitions): with hbar, c, k_B exact, their uncertainty is all G's."""


_NONE = Fraction(0)
_MINUS_ONE = Fraction(-1)


def name_g_power(name: str, ctx: Context) -> Fraction:
    """The power of G in a constant's (or a dataset unit's) value.

    Masses defined as GM/G (M_sun, M_earth, M_jup) go as G^-1: the nominal GM values are
    exact (IAU 2015 B3), so their whole uncertainty is G's, correlated with every other G.
    The Planck units go as G^(+-1/2) (``PLANCK_G_POWERS``).
    """
    if name.startswith("M_") and f"GM_{name[2:]}" in ctx.constants:
        return _MINUS_ONE
    return PLANCK_G_POWERS.get(name, _NONE)


def _g_seed(power: Fraction, value: float, ctx: Context) -> dict[str, float]:
    """d(value)/dG for a value that goes as G^power and depends on nothing else uncertain.

    A product G*M_sun then has no uncertainty at all, as it should.
    """
    g = ctx.constants.get("G")
    if not power or g is None or not g.value or not g.uncertainty:
        return {}
    return {"G": float(power) * value / g.value}


def _float_value(expr: sympy.Expr, values: Mapping) -> float | None:
    try:
        value = evaluate(expr, values)
    except MissingValue:
        return None
    except ZeroDivisionError as err:
        raise EvaluationError("division by zero") from err
    if isinstance(value, complex):
        raise EvaluationError("the result is not a real number")
    value = float(value)
    if math.isnan(value):
        raise EvaluationError("the result is not a number (an undefined operation)")
    return value


def _has_uncertain_inputs(
    expr: sympy.Expr, sheet: Mapping[sympy.Symbol, Binding], ctx: Context
) -> bool:
    for symbol in expr.free_symbols:
        binding = sheet.get(symbol)
        if binding is not None:
            if binding.gradient:
                return True
            continue
        if symbol in ctx.unit_values:
            if _g_seed(unit_g_power(symbol.name[1:-1], ctx), 1.0, ctx):
                return True
            continue
        constant = ctx.constants.get(symbol.name)
        if constant is not None and constant.symbol == symbol and constant.uncertainty:
            return True
    return False


def compute_figures(
    expr: sympy.Expr,
    sheet: Mapping[sympy.Symbol, Binding],
    ctx: Context,
    input_uncertainty: Callable[[str], float],
) -> Figures:
    """All the numbers of ``expr``; raises EvaluationError where none can be had."""
    try:
        value = _float_value(expr, SymbolValues(sheet, ctx, "float"))
    except EvaluationError as err:
        rescued = _rescued_by_guard(expr, sheet, ctx, err)
        if rescued is None:
            raise
        return rescued
    if value is None:
        return Figures(None)
    precise, loss = None, None
    if ctx.guard and (_may_lose_precision(expr) or not _normal(value)):
        precise, loss = _guard(expr, value, SymbolValues(sheet, ctx, "mp"))
    if math.isinf(value) and loss is None:
        raise EvaluationError("the number overflows double precision (above 1.8e308)")
    gradient: dict[str, float] = {}
    uncertainty = None
    if _has_uncertain_inputs(expr, sheet, ctx):
        dual = evaluate(expr, SymbolValues(sheet, ctx, "dual"), DUAL)
        gradient = {key: d for key, d in dual.grad.items() if d != 0}
        uncertainty = propagated_uncertainty(value, gradient, input_uncertainty)
    return Figures(value, precise, gradient, uncertainty, loss)


def propagated_uncertainty(
    value: float, gradient: Mapping[str, float], input_uncertainty: Callable[[str], float]
) -> float | None:
    """First-order standard uncertainty from the partials (None: none worth stating)."""
    if not gradient:
        return None
    # hypot, not sqrt of a sum of squares: the squares of 1e300 * G's u overflow.
    total = math.hypot(*(d * input_uncertainty(key) for key, d in gradient.items()))
    if total <= 0 or total <= ROUNDING_FLOOR * abs(value):
        return None  # what is left after exact cancellation is rounding noise
    return total


def _rescued_by_guard(
    expr: sympy.Expr, sheet: Mapping[sympy.Symbol, Binding], ctx: Context, err: EvaluationError
) -> Figures | None:
    """Where double precision fails outright (``1/(1 - cos(1e-9))`` divides by a zero left by
    cancellation), the guard's 50-digit value, when it is a finite non-zero number.

    The uncertainty is not propagated then (the dual walk is double precision too)."""
    if not ctx.guard or not _may_lose_precision(expr):
        return None
    try:
        precise = evaluate(expr, SymbolValues(sheet, ctx, "mp"), _MP)
    except (EvaluationError, ValueError, ZeroDivisionError, TypeError):
        return None
    mp = _MP.mp
    if not isinstance(precise, mp.mpf):  # a complex value: double precision was right
        return None
    if not mp.isfinite(precise) or precise == 0 or abs(mp.mag(precise)) > MAX_RECORDED_BITS:
        return None
    reason = f"cancellation; double precision failed: {err.message}"
    if _has_uncertain_inputs(expr, sheet, ctx):
        reason += "; uncertainties are not propagated through this value"
    return Figures(math.nan, precise, {}, None, reason)


def _normal(value: float) -> bool:
    """A finite, non-zero double well above the subnormal range."""
    return math.isfinite(value) and abs(value) >= 2.3e-308


def _may_lose_precision(expr: sympy.Expr) -> bool:
    """Whether a double evaluation can be far off although its result looks normal.

    Products and powers of finite positive doubles are correct to a few units in the last
    place per operation; their only failures are overflow and underflow, which show in the
    result (inf or 0) and are checked separately. Sums (cancellation) and functions
    (1 - cos x, exp of a large argument) need the high-precision evaluation.
    """
    stack = [expr]
    while stack:
        node = stack.pop()
        if node.is_Add or isinstance(node, sympy.Function):
            return True
        stack.extend(node.args)
    return False


def _guard(expr: sympy.Expr, value: float, values: Mapping) -> tuple[Any, str | None]:
    """The 50-digit value and, where double precision disagrees with it, why."""
    try:
        precise = evaluate(expr, values, _MP)
    except EvaluationError as err:
        if value == 0 or math.isinf(value):  # the double is surely wrong; say so
            raise EvaluationError(f"double precision gave {value}, and {err.message}") from err
        return None, None  # the guard cannot judge this expression; the double stands
    except (ValueError, ZeroDivisionError, TypeError):
        return None, None
    return judge_precision(value, precise)


def judge_precision(value: float, precise: Any) -> tuple[Any, str | None]:
    """(the 50-digit value, why the double disagrees with it or None); raises where the
    precise value shows there is no recordable real number."""
    mp = _MP.mp
    if not isinstance(precise, mp.mpf):  # e.g. the square root of a negative number
        raise EvaluationError(f"the value is not a real number (about {mp.nstr(precise, 4)})")
    if not mp.isfinite(precise):
        return precise, None
    if precise != 0 and abs(mp.mag(precise)) > MAX_RECORDED_BITS:
        decades = mp.nstr(mp.log10(abs(precise)), 3)
        raise EvaluationError(
            f"the number is about 10^{decades}, far outside any range that can be recorded"
        )
    if math.isinf(value):
        return precise, "overflow"
    if precise == 0:
        if value == 0:
            return precise, None
        return precise, "cancellation (the exact value is 0)"
    relative = abs((mp.mpf(value) - precise) / precise)
    if relative <= LOSS_TOLERANCE:
        return precise, None
    if value == 0:
        if abs(precise) < mp.mpf("2.3e-308"):
            return precise, "underflow"
        return precise, "cancellation"
    return precise, f"rounding error, relative {float(relative):.1e}"


def relative_uncertainty_note(value: float, uncertainty: float | None) -> str | None:
    """A warning where first-order propagation is poor (large relative uncertainty)."""
    if uncertainty is None or value == 0:
        return None
    if uncertainty / abs(value) > POOR_FIRST_ORDER:
        return (
            f"first-order uncertainty is poor here (relative u "
            f"{uncertainty / abs(value):.0%} > {POOR_FIRST_ORDER:.0%})"
        )
    return None


def unit_g_power(unit: str, ctx: Context) -> Fraction:
    """The power of G in a unit's SI factor: [M_sun] = GM_sun/G goes as G^-1, and
    [M_sun/yr] too; [pc] as G^0."""
    total = _NONE
    for name, power in _unit_factors(unit):
        g_power = name_g_power(name, ctx)
        if g_power:
            total += power * g_power
    return total


@functools.lru_cache(maxsize=4096)
def _unit_factors(unit: str) -> tuple[tuple[str, Fraction], ...]:
    """The (name, power) factors of bracket text; none when it does not parse."""
    from worksheet.errors import WorksheetError
    from worksheet.syntax.units import parse_unit

    try:
        return tuple(parse_unit(unit).factors)
    except WorksheetError:
        return ()


def in_unit_uncertainty(
    si: float,
    gradient: Mapping[str, float],
    uncertainty: float,
    g_power: Fraction,
    ctx: Context,
    input_uncertainty: Callable[[str], float],
) -> float | None:
    """The SI-equivalent uncertainty of a value shown in a unit whose factor goes as G^k.

    A value recorded in [M_sun] is x / M_sun with M_sun = GM_sun / G (k = -1), and a value
    in Planck units is x / l_P with l_P ~ G^(1/2): the G-dependence partly cancels. Multiply
    the result by 1/factor for the shown uncertainty; k = 0 gives ``uncertainty`` back.
    """
    g = ctx.constants.get("G")
    if not g_power or g is None or not g.value:
        return uncertainty
    shifted = dict(gradient)
    # d(si / F)/dG * F = d si/dG - si * d ln F/dG, with d ln F/dG = k / G.
    shifted["G"] = shifted.get("G", 0.0) - si * float(g_power) / g.value
    result = math.hypot(*(d * input_uncertainty(key) for key, d in shifted.items()))
    return None if result <= ROUNDING_FLOOR * abs(si) else result
