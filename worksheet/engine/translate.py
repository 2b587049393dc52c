"""Expression tree -> sympy expression and its dimension, in one pass, before any number.

Every operator checks dimensions as it builds: sums and comparisons need one dimension,
functions such as ``exp`` need dimensionless arguments, exponents of dimensional bases must
be exact numbers. Names resolve only through the sheet's bindings and the pinned dataset.
"""

from __future__ import annotations

import math
from collections.abc import Callable, Iterable
from dataclasses import dataclass, field
from fractions import Fraction

import sympy

from worksheet.engine import symbolic_ops
from worksheet.engine.bindings import Binding, Origin, unit_symbol
from worksheet.engine.budget import Worker
from worksheet.errors import (
    BudgetError,
    DimensionError,
    EvaluationError,
    NameResolutionError,
    ParseError,
)
from worksheet.syntax import tree as t
from worksheet.syntax.names import VERB_NAMES
from worksheet.syntax.unparse import to_text
from worksheet.units.dimension import Dimension
from worksheet.units.registry import UnitRegistry

MAX_EXACT_DIGITS = 5000
"""An exact integer power with more digits than this is refused (9^9^9^9 and friends)."""

MAX_DIMENSION_POWER = 1000

INFINITY = "inf"
"""The name of infinity: a bound of integrate or a point of limit/series, of any dimension."""

FUNCTIONS: dict[str, Callable[..., sympy.Expr]] = {
    "exp": sympy.exp,
    "log": sympy.log,
    "ln": sympy.log,
    "log10": lambda x: sympy.log(x, 10),
    "sin": sympy.sin,
    "cos": sympy.cos,
    "tan": sympy.tan,
    "asin": sympy.asin,
    "acos": sympy.acos,
    "atan": sympy.atan,
    "sinh": sympy.sinh,
    "cosh": sympy.cosh,
    "tanh": sympy.tanh,
}
VERBS = VERB_NAMES
OTHER_CALLS = frozenset({"sqrt", "abs", "min", "max", "natural"})
BUILTIN_CALLS = frozenset(FUNCTIONS) | VERBS | OTHER_CALLS


@dataclass(frozen=True)
class Typed:
    expr: sympy.Expr
    dim: Dimension


def describe(node: t.Expr, typed: Typed) -> str:
    """``length (2*G*M/c^2, m)``: what a message says about one operand."""
    unit = typed.dim.si_unit() or "1"
    return f"{typed.dim.name()} ({to_text(node)}, {unit})"


TEMPERATURE = Dimension.of(temperature=1)
ENERGY = Dimension.of(mass=1, length=2, time=-2)


def temperature_energy_hint(
    left_node: t.Expr, left: Typed, right_node: t.Expr, right: Typed
) -> str:
    """A hint where a temperature meets an energy: one of them needs k_B."""
    pair = {left.dim, right.dim}
    if pair != {TEMPERATURE, ENERGY}:
        return ""
    energy, temperature = (left_node, right_node) if left.dim == ENERGY else (right_node, left_node)
    return (
        f"; an energy is a temperature only through k_B: write natural({to_text(energy)}, [K]) "
        f"for the energy as a temperature, or k_B*{_grouped(temperature)} for the temperature "
        "as an energy"
    )


def _grouped(node: t.Expr) -> str:
    text = to_text(node)
    return text if isinstance(node, t.Name | t.Number | t.Unit | t.Call) else f"({text})"


@dataclass
class Translator:
    """Builds one statement's expression. Collects the sheet names and units it used.

    Args:
        lookup: the binding a name has at this point of the sheet (None when unknown).
        registry: resolves bracketed units.
        unit_values: shared map from unit symbols to their SI factors (filled as we go).
        worker: the process that runs symbolic verbs under the budget.
        seconds: the budget for each verb.
    """

    lookup: Callable[[str], Binding | None]
    registry: UnitRegistry
    unit_values: dict[sympy.Symbol, float]
    worker: Worker
    seconds: float
    used: list[str] = field(default_factory=list)
    used_verb: bool = False
    numeric_notes: list[str] = field(default_factory=list)  # verbs that fell back to numbers
    sheet_names: Callable[[], Iterable[str]] | None = None  # for "did you mean" only

    # --- entry point ---
    def translate(
        self, node: t.Expr, local: dict[str, Typed] | None = None, expand: bool = False
    ) -> Typed:
        return self._node(node, local or {}, expand)

    def _node(self, node: t.Expr, local: dict[str, Typed], expand: bool) -> Typed:
        if isinstance(node, t.Number):
            return Typed(sympy.Rational(node.value.numerator, node.value.denominator), Dimension())
        if isinstance(node, t.Name):
            return self._name(node, local, expand)
        if isinstance(node, t.Unit):
            return self._unit(node)
        if isinstance(node, t.Neg):
            inner = self._node(node.operand, local, expand)
            return Typed(-inner.expr, inner.dim)
        if isinstance(node, t.BinOp):
            return self._binop(node, local, expand)
        if isinstance(node, t.Power):
            return self._power(node, local, expand)
        if isinstance(node, t.Call):
            return self._call(node, local, expand)
        if isinstance(node, t.Equation):
            raise ParseError("'==' belongs in 'check' or inside solve(...)", node.line, node.column)
        raise EvaluationError(f"unknown expression node {type(node).__name__}")

    # --- leaves ---
    def _name(self, node: t.Name, local: dict[str, Typed], expand: bool) -> Typed:
        if node.id in local:
            return local[node.id]
        if node.id == "pi":
            return Typed(sympy.pi, Dimension())
        if node.id == INFINITY:
            return Typed(sympy.oo, Dimension())
        binding = self.lookup(node.id)
        if binding is None:
            raise self._unknown(node)
        if binding.origin is Origin.RELATION:
            raise NameResolutionError(
                f"'{node.id}' is a relation; call it with arguments, {node.id}(...)",
                node.line,
                node.column,
            )
        if binding.origin is not Origin.CONSTANT:
            self.used.append(node.id)
        expr = binding.form() if expand else binding.symbol
        return Typed(expr, binding.dimension)

    def _unknown(self, node: t.Name) -> NameResolutionError:
        hint = ""
        try:
            self.registry.named(node.id)
            hint = f"; for the unit, write it in brackets: [{node.id}]"
        except (ParseError, DimensionError):
            from worksheet.hints import did_you_mean

            known = list(self.sheet_names()) if self.sheet_names else []
            hint = did_you_mean(node.id, [*self.registry.dataset.constants, "pi", *known])
        return NameResolutionError(f"unknown name '{node.id}'{hint}", node.line, node.column)

    def _unit(self, node: t.Unit) -> Typed:
        resolved = self.registry.resolve(node.unit, node.line, node.column)
        if resolved.is_offset:
            raise DimensionError(
                f"offset temperature [{node.unit.source}] is allowed only as a lone value "
                f"(T = 25 [{node.unit.source}]) or in a conversion (in [{node.unit.source}]), "
                f"not in a product; use [K] or [delta_{node.unit.source}]",
                node.line,
                node.column,
            )
        symbol = unit_symbol(node.unit.source)
        self.unit_values[symbol] = resolved.factor
        return Typed(symbol, resolved.dimension)

    # --- operators ---
    def _binop(self, node: t.BinOp, local: dict[str, Typed], expand: bool) -> Typed:
        left = self._node(node.left, local, expand)
        right = self._node(node.right, local, expand)
        if node.op in "+-":
            if left.dim != right.dim and not (_is_zero(left) or _is_zero(right)):
                verb = "add" if node.op == "+" else "subtract"
                hint = temperature_energy_hint(node.left, left, node.right, right)
                raise DimensionError(
                    f"cannot {verb} {describe(node.left, left)} and "
                    f"{describe(node.right, right)}{hint}",
                    node.line,
                    node.column,
                )
            dim = right.dim if _is_zero(left) else left.dim
            expr = left.expr + right.expr if node.op == "+" else left.expr - right.expr
            return Typed(expr, dim)
        if node.op == "*":
            return Typed(left.expr * right.expr, left.dim * right.dim)
        if right.expr == 0:
            raise EvaluationError("division by zero", node.line, node.column)
        return Typed(left.expr / right.expr, left.dim / right.dim)

    def _power(self, node: t.Power, local: dict[str, Typed], expand: bool) -> Typed:
        base = self._node(node.base, local, expand)
        exponent = self._node(node.exponent, local, expand)
        if not exponent.dim.dimensionless:
            raise DimensionError(
                f"an exponent must be dimensionless, not {describe(node.exponent, exponent)}",
                node.exponent.line,
                node.exponent.column,
            )
        if base.dim.dimensionless:
            dim = Dimension()
        else:
            if not exponent.expr.is_Rational:
                raise DimensionError(
                    f"{describe(node.base, base)} can only be raised to an exact number, "
                    f"not to {to_text(node.exponent)}",
                    node.line,
                    node.column,
                )
            power = Fraction(int(exponent.expr.p), int(exponent.expr.q))
            if abs(power) > MAX_DIMENSION_POWER:
                raise BudgetError(f"the power {power} is too large", node.line, node.column)
            dim = base.dim**power
        _guard_exact_power(base.expr, exponent.expr, node)
        return Typed(sympy.Pow(base.expr, exponent.expr), dim)

    # --- calls ---
    def _call(self, node: t.Call, local: dict[str, Typed], expand: bool) -> Typed:
        name = node.func
        if name in FUNCTIONS:
            (arg,) = self._args(node, 1, 1)
            typed = self._node(arg, local, expand)
            if not typed.dim.dimensionless:
                raise DimensionError(
                    f"{name} needs a dimensionless argument, not {describe(arg, typed)}",
                    arg.line,
                    arg.column,
                )
            if name == "log10" and typed.expr.is_Rational:
                return Typed(sympy.log(typed.expr, 10), Dimension())
            return Typed(FUNCTIONS[name](typed.expr), Dimension())
        if name == "sqrt":
            (arg,) = self._args(node, 1, 1)
            typed = self._node(arg, local, expand)
            return Typed(sympy.sqrt(typed.expr), typed.dim ** Fraction(1, 2))
        if name == "abs":
            (arg,) = self._args(node, 1, 1)
            typed = self._node(arg, local, expand)
            return Typed(sympy.Abs(typed.expr), typed.dim)
        if name in ("min", "max"):
            args = self._args(node, 1, 64)
            typed_args = [self._node(arg, local, expand) for arg in args]
            for arg, typed in zip(args[1:], typed_args[1:], strict=True):
                if typed.dim != typed_args[0].dim:
                    raise DimensionError(
                        f"{name} needs arguments of one dimension: "
                        f"{describe(args[0], typed_args[0])} and {describe(arg, typed)}",
                        arg.line,
                        arg.column,
                    )
            function = sympy.Min if name == "min" else sympy.Max
            return Typed(function(*[typed.expr for typed in typed_args]), typed_args[0].dim)
        if name == "natural":
            return self._natural(node, local, expand)
        if name in VERBS:
            self.used_verb = True
            from worksheet.engine.verbs import translate_verb

            return translate_verb(self, node, local)
        if name in local:
            raise NameResolutionError(f"'{name}' is not a relation", node.line, node.column)
        binding = self.lookup(name)
        if binding is None:
            from worksheet.hints import did_you_mean

            hint = did_you_mean(name, BUILTIN_CALLS)
            raise NameResolutionError(
                f"unknown function '{name}'"
                + (hint or "; the functions are " + ", ".join(sorted(BUILTIN_CALLS))),
                node.line,
                node.column,
            )
        if binding.origin is not Origin.RELATION or binding.body is None:
            raise NameResolutionError(f"'{name}' is not a relation", node.line, node.column)
        return self._relation_call(node, binding, local, expand)

    def _natural(self, node: t.Call, local: dict[str, Typed], expand: bool) -> Typed:
        """``natural(Q, [UNIT])``: a natural-unit value (a power of energy) back in SI."""
        from worksheet.engine.views import energy_power, natural_back_factor

        value_node, unit_node = self._args(node, 2, 2)
        if not isinstance(unit_node, t.Unit):
            raise ParseError(
                "natural(Q, [UNIT]) takes the SI unit wanted in brackets as its second argument",
                unit_node.line,
                unit_node.column,
            )
        value = self._node(value_node, local, expand)
        power = energy_power(value.dim)
        if power is None:
            raise DimensionError(
                f"natural(...) needs a power of energy such as 3 [GeV] or [1/GeV], not "
                f"{describe(value_node, value)}",
                value_node.line,
                value_node.column,
            )
        target = self.registry.resolve(unit_node.unit, unit_node.line, unit_node.column)
        try:
            factor = natural_back_factor(power, target.dimension)
        except DimensionError as err:
            raise DimensionError(err.message, node.line, node.column) from err
        expr = value.expr
        for symbol, exponent in (("hbar", factor.p), ("c", factor.q), ("k_B", factor.r)):
            if exponent:
                constant = self.lookup(symbol)
                assert constant is not None
                expr = expr * constant.symbol ** sympy.Rational(
                    exponent.numerator, exponent.denominator
                )
        return Typed(expr, target.dimension)

    def _relation_call(
        self, node: t.Call, binding: Binding, local: dict[str, Typed], expand: bool
    ) -> Typed:
        params = binding.params
        if len(node.args) != len(params):
            raise NameResolutionError(
                f"{binding.name} takes {len(params)} argument(s) ({', '.join(params)}), "
                f"got {len(node.args)}",
                node.line,
                node.column,
            )
        self.used.append(binding.name)
        inner: dict[str, Typed] = {}
        for param, arg in zip(params, node.args, strict=True):
            inner[param] = self._node(arg, local, expand)
        assert binding.body is not None
        try:
            return self._node(binding.body, inner, expand)
        except (DimensionError, NameResolutionError) as err:
            raise type(err)(
                f"in {binding.name}(...) defined on line {binding.line}: {err.message}",
                node.line,
                node.column,
            ) from err

    def _args(self, node: t.Call, least: int, most: int) -> tuple[t.Expr, ...]:
        count = len(node.args)
        if not least <= count <= most:
            wanted = str(least) if least == most else f"{least} to {most}"
            raise ParseError(
                f"{node.func} takes {wanted} argument(s), got {count}", node.line, node.column
            )
        return node.args

    # --- verbs run in the worker ---
    def run(
        self, function: Callable[..., object], args: tuple[object, ...], what: str, node: t.Node
    ) -> object:
        try:
            return self.worker.call(function, args, self.seconds, what)
        except (BudgetError, EvaluationError) as err:
            raise type(err)(err.message, node.line, node.column) from err


def _is_zero(typed: Typed) -> bool:
    return typed.expr == 0


def _guard_exact_power(base: sympy.Expr, exponent: sympy.Expr, node: t.Power) -> None:
    """Refuse exact powers whose result would be astronomically long, before sympy tries."""
    if not (base.is_Number and exponent.is_Number):
        if exponent.is_Integer and abs(int(exponent)) > 10**6:
            raise BudgetError(
                f"the exponent {exponent} is too large to expand symbolically",
                node.line,
                node.column,
            )
        return
    if base in (0, 1, -1) or not base.is_Rational:
        return
    if not exponent.is_Rational:
        return
    size = max(abs(int(base.p)), abs(int(base.q)))
    magnitude = abs(exponent)
    digits = float(min(magnitude, 10**9)) * math.log10(size)
    if digits > MAX_EXACT_DIGITS:
        raise BudgetError(
            f"{_power_text(base, exponent)} would have about "
            f"{int(digits)} digits; exact powers are limited to {MAX_EXACT_DIGITS} digits",
            node.line,
            node.column,
        )


def _short_rational(value: sympy.Rational) -> str:
    """An exact number for a message: as written when short, else its order of magnitude
    (printing a 5000-digit integer is refused by Python and unreadable anyway).

    >>> _short_rational(sympy.Rational(3, 2)), _short_rational(sympy.Integer(10) ** 80)
    ('3/2', 'about 10^80')
    """
    p, q = abs(int(value.p)), int(value.q)
    if max(p, q) < 10**30:
        return str(value)
    sign = "-" if value.p < 0 else ""
    return f"about {sign}10^{round(math.log10(p) - math.log10(q))}"


def _power_text(base: sympy.Rational, exponent: sympy.Rational) -> str:
    """``2^10000``, or ``(about 10^2585)^400`` where the base is too long to print."""
    shown = [_short_rational(base), _short_rational(exponent)]
    return "^".join(f"({text})" if " " in text or "/" in text else text for text in shown)


# Used by symbolic verbs; kept here so tests can reach them through one module.
__all__ = ["BUILTIN_CALLS", "FUNCTIONS", "VERBS", "Translator", "Typed", "symbolic_ops"]
