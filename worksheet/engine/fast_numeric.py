"""The numbers of an expression of products, powers and sums, walked over the parsed tree.

Most lines of a derivation sheet are products, quotients, powers and sums of numbers,
units, constants and names already computed: ``T_H = hbar*c^3/(8*pi*G*M*k_B)``. Their
double and their partial derivatives (for the uncertainty) come from one walk over the
parsed tree, in the order the line is written, whichever path builds the symbolic form. The
sympy form is then needed only when someone prints it, so the fast path builds it lazily
(``LazyForm``) from the bindings the line saw.

Exact numbers are folded exactly while they meet only exact numbers (``2/3``, ``10^-3``),
as sympy would, and become a double when they meet a double. Each product and quotient of
doubles is one correctly rounded operation; the terms of a chain of sums are added at once
by ``math.fsum``, as sympy's walk adds an ``Add``. So the walk is as accurate as the sympy
walk (which multiplies in sympy's canonical order instead); the two can differ in the last
bit. A sum is checked by the precision guard at 50 digits over the same tree; where the
guard finds a loss, the sympy path records it.

What the walk does not cover returns None and takes the sympy path, which gives every
error message: functions other than ``sqrt``, verbs, relations, symbolic names, offset
units, ranged inputs, sums of different dimensions or with a bare 0, and results that are
zero, infinite or subnormal.
"""

from __future__ import annotations

import math
from collections.abc import Callable
from dataclasses import dataclass
from fractions import Fraction
from typing import TYPE_CHECKING

from worksheet.engine.bindings import Binding, Origin
from worksheet.engine.figures import (
    _MP,
    Figures,
    _g_seed,
    judge_precision,
    name_g_power,
    propagated_uncertainty,
    unit_g_power,
)
from worksheet.engine.results import LazyForm
from worksheet.engine.sampling import is_ranged
from worksheet.engine.translate import MAX_DIMENSION_POWER, Typed
from worksheet.errors import WorksheetError
from worksheet.syntax import tree as t
from worksheet.units.dimension import Dimension

if TYPE_CHECKING:
    from worksheet.engine.statements import Quantity, StatementEvaluator
    from worksheet.engine.translate import Translator
    from worksheet.units.registry import ResolvedUnit

ENABLED = True
"""Skip building sympy forms for walked expressions. Tests set it False to compare the
eager path (forms built at once) with the lazy one: the numbers are the walk's in both."""

_DIMENSIONLESS = Dimension()
_PI = math.pi  # float(sympy.pi): the double nearest pi
_EXACT_BITS = 4096
"""Exact numbers longer than this (numerator or denominator) become doubles at once."""


class _NotCovered(Exception):
    """The expression needs the sympy path."""


@dataclass(slots=True)
class _Walked:
    """One subtree's number: ``exact`` for a number written exactly (else None), and then
    ``value`` is its double."""

    value: float
    dim: Dimension
    exact: Fraction | None = None
    grad: dict[str, float] | None = None  # d value / d input; None: no uncertain input
    terms: list[float] | None = None  # a sum's terms, flattened (summed exactly by fsum)


@dataclass(frozen=True, slots=True)
class WalkedQuantity:
    """What the walk knows of an expression: enough to record it without sympy."""

    figures: Figures
    dim: Dimension
    lone: ResolvedUnit | None  # the unit of a number written with one (``-3 [km]``)
    used: tuple[str, ...]  # sheet names read, in the order the translator reads them
    seen: dict[str, Binding]  # every binding read, for building the form later


def walk_quantity(evaluator: StatementEvaluator, node: t.Expr) -> WalkedQuantity | None:
    """The numbers of ``node`` from the parsed tree, or None where the sympy path is needed."""
    walker = _Walker(evaluator)
    precise = None
    try:
        walked = walker.walk(node)
        value = walked.value
        if not (math.isfinite(value) and abs(value) >= 2.3e-308):
            return None  # zero, inf and subnormal values: the precision guard looks at these
        if walker.has_sum and evaluator.ctx.guard:
            precise, loss = judge_precision(value, walker.precise(node))
            if loss is not None:
                return None  # the sympy path words the loss (and finds the same numbers)
    except (_NotCovered, WorksheetError, OverflowError, ZeroDivisionError, ValueError):
        return None
    gradient = {key: d for key, d in (walked.grad or {}).items() if d != 0}
    uncertainty = propagated_uncertainty(value, gradient, evaluator._input_uncertainty)
    return WalkedQuantity(
        Figures(value, precise, gradient, uncertainty),
        walked.dim,
        walker.lone(node),
        tuple(walker.used),
        walker.seen,
    )


def fast_quantity(
    evaluator: StatementEvaluator, tr: Translator, node: t.Expr, walked: WalkedQuantity
) -> Quantity | None:
    """The quantity of ``node`` from its walk, its sympy form left to be built when printed
    (None when the lazy path is switched off)."""
    if not ENABLED:
        return None
    from worksheet.engine.statements import Quantity

    tr.used.extend(walked.used)
    form = LazyForm(_form_builder(evaluator, node, walked.seen))
    return Quantity(Typed(form, walked.dim), walked.figures, walked.lone)  # type: ignore[arg-type]


def _form_builder(
    evaluator: StatementEvaluator, node: t.Expr, seen: dict[str, Binding]
) -> Callable[[], object]:
    """Translate later with the bindings the line saw now (a later line may rebind a name)."""

    def build() -> object:
        translator = evaluator.translator()
        translator.lookup = seen.get
        return translator.translate(node).expr

    return build


class _Walker:
    """One walk: remembers the names read, in the translator's order."""

    def __init__(self, evaluator: StatementEvaluator):
        self.evaluator = evaluator
        self.used: list[str] = []
        self.seen: dict[str, Binding] = {}
        self.has_sum = False  # then the precision guard checks the double (cancellation)

    def walk(self, node: t.Expr) -> _Walked:
        kind = type(node)
        if kind is t.Number:
            value = node.value  # type: ignore[attr-defined]
            return _Walked(_double(value), _DIMENSIONLESS, value)
        if kind is t.Name:
            return self._name(node)  # type: ignore[arg-type]
        if kind is t.BinOp:
            if node.op in "*/":  # type: ignore[attr-defined]
                return self._product(node)  # type: ignore[arg-type]
            return self._sum(node)  # type: ignore[arg-type]
        if kind is t.Unit:
            return self._unit(node)  # type: ignore[arg-type]
        if kind is t.Power:
            return self._power(self.walk(node.base), self.walk(node.exponent))  # type: ignore[attr-defined]
        if kind is t.Neg:
            inner = self.walk(node.operand)  # type: ignore[attr-defined]
            grad = {key: -d for key, d in inner.grad.items()} if inner.grad else None
            exact = -inner.exact if inner.exact is not None else None
            terms = [-term for term in inner.terms] if inner.terms else None
            return _Walked(-inner.value, inner.dim, exact, grad, terms)
        if kind is t.Call and node.func == "sqrt" and len(node.args) == 1:  # type: ignore[attr-defined]
            return self._power(self.walk(node.args[0]), None)  # type: ignore[attr-defined]
        raise _NotCovered

    def lone(self, node: t.Expr) -> ResolvedUnit | None:
        """The unit of ``25 [degC]``, ``-3 [km]`` or ``[kg]``: a number with its unit."""
        lone = t.lone_unit_value(node)
        if lone is None:
            return None
        unit = lone[1]
        return self.evaluator.ctx.registry.resolve(unit.unit, unit.line, unit.column)

    # --- leaves ---
    def _name(self, node: t.Name) -> _Walked:
        if node.id == "pi":
            return _Walked(_PI, _DIMENSIONLESS)
        evaluator = self.evaluator
        binding = evaluator.lookup(node.id)
        if binding is None or binding.value is None:
            raise _NotCovered
        if binding.origin is Origin.CONSTANT:
            self.seen[node.id] = binding
            memo = binding._memo
            seed = memo.get("seed", _UNSEEN)
            if seed is _UNSEEN:
                seed = memo["seed"] = _constant_seed(node.id, binding, evaluator)
            return _Walked(binding.value, binding.dimension, None, dict(seed) if seed else None)
        if (
            binding.origin not in (Origin.GIVEN, Origin.DERIVED)
            or binding.spread is not None
            or evaluator.values.get(binding.symbol) is not binding
            or is_ranged(binding)
        ):
            raise _NotCovered
        self.seen[node.id] = binding
        self.used.append(node.id)
        return _Walked(binding.value, binding.dimension, None, dict(binding.gradient) or None)

    def _unit(self, node: t.Unit) -> _Walked:
        ctx = self.evaluator.ctx
        unit = ctx.registry.resolve(node.unit, node.line, node.column)
        if unit.is_offset:
            raise _NotCovered  # the sympy path says where an offset unit may stand
        seed = _g_seed(unit_g_power(node.unit.source, ctx), unit.factor, ctx)
        return _Walked(unit.factor, unit.dimension, None, seed or None)

    # --- operators ---
    def _product(self, node: t.BinOp) -> _Walked:
        left, right = self.walk(node.left), self.walk(node.right)
        multiply = node.op == "*"
        dim = left.dim * right.dim if multiply else left.dim / right.dim
        if left.exact is not None and right.exact is not None:
            if not multiply and right.exact == 0:
                raise _NotCovered
            exact = left.exact * right.exact if multiply else left.exact / right.exact
            return _Walked(_double(exact), dim, _bounded(exact))
        a, b = left.value, right.value
        if multiply:
            value = a * b
            grad = _combine((b, left.grad), (a, right.grad))
        else:
            if b == 0:
                raise _NotCovered  # the sympy path names the division by zero
            value = a / b
            grad = _combine((1 / b, left.grad), (-value / b, right.grad))
        return _Walked(value, dim, None, grad)

    def _sum(self, node: t.BinOp) -> _Walked:
        """``a + b`` or ``a - b`` of one dimension: all the terms of a chain of sums are
        added at once by ``math.fsum`` (correctly rounded, as sympy's walk adds them)."""
        left, right = self.walk(node.left), self.walk(node.right)
        if left.dim != right.dim or left.exact == 0 or right.exact == 0:
            raise _NotCovered  # a mismatch is the sympy path's to word; 0 of any dimension
        sign = 1.0 if node.op == "+" else -1.0
        if left.exact is not None and right.exact is not None:
            exact = left.exact + right.exact if sign > 0 else left.exact - right.exact
            return _Walked(_double(exact), left.dim, _bounded(exact))
        self.has_sum = True
        right_terms = right.terms or [right.value]
        terms = (left.terms or [left.value]) + [sign * term for term in right_terms]
        grad = _combine((1.0, left.grad), (sign, right.grad))
        return _Walked(math.fsum(terms), left.dim, None, grad, terms)

    def precise(self, node: t.Expr) -> object:
        """The expression at the precision guard's 50 digits, from the values the walk read
        (as ``figures.SymbolValues`` gives them to the sympy path's guard)."""
        mp = _MP.mp
        kind = type(node)
        if kind is t.Number:
            value = node.value  # type: ignore[attr-defined]
            return mp.mpf(value.numerator) / value.denominator
        if kind is t.Name:
            if node.id == "pi":  # type: ignore[attr-defined]
                return +mp.pi
            binding = self.seen[node.id]  # type: ignore[attr-defined]
            if binding.origin is Origin.CONSTANT:
                return mp.mpf(self.evaluator.ctx.dataset.constants[binding.name].value)
            return binding.precise if binding.precise is not None else mp.mpf(binding.value)
        if kind is t.Unit:
            unit = self.evaluator.ctx.registry.resolve(node.unit, node.line, node.column)  # type: ignore[attr-defined]
            return mp.mpf(unit.factor)
        if kind is t.Neg:
            return -self.precise(node.operand)  # type: ignore[attr-defined]
        if kind is t.BinOp:
            a, b = self.precise(node.left), self.precise(node.right)  # type: ignore[attr-defined]
            op = node.op  # type: ignore[attr-defined]
            if op == "+":
                return a + b
            if op == "-":
                return a - b
            return a * b if op == "*" else a / b
        if kind is t.Power:
            return _MP.power(self.precise(node.base), self.precise(node.exponent))  # type: ignore[attr-defined]
        return mp.sqrt(self.precise(node.args[0]))  # type: ignore[attr-defined]

    def _power(self, base: _Walked, exponent: _Walked | None) -> _Walked:
        """``base^exponent``; ``exponent`` None is ``sqrt``."""
        if exponent is not None and (exponent.exact is None or exponent.grad):
            raise _NotCovered  # a computed exponent: the sympy path checks it
        power = Fraction(1, 2) if exponent is None else exponent.exact
        assert power is not None
        if abs(power.numerator) > MAX_DIMENSION_POWER * power.denominator:
            raise _NotCovered
        if exponent is not None and not exponent.dim.dimensionless:
            raise _NotCovered
        dim = _DIMENSIONLESS if base.dim.dimensionless else base.dim**power
        if base.exact is not None and power.denominator == 1:
            if base.exact == 0 and power < 0:
                raise _NotCovered
            size = max(base.exact.numerator.bit_length(), base.exact.denominator.bit_length())
            if size * abs(power.numerator) > _EXACT_BITS:
                raise _NotCovered
            exact = base.exact**power.numerator
            return _Walked(_double(exact), dim, _bounded(exact))
        x = base.value
        if x == 0:
            raise _NotCovered
        if exponent is None:
            if x < 0:
                raise _NotCovered
            value = math.sqrt(x)
        else:
            value = x ** _double(power)
            if isinstance(value, complex):
                raise _NotCovered
        grad = _combine((_double(power) * value / x, base.grad))
        return _Walked(value, dim, None, grad)


_UNSEEN = object()
"""Not in a binding's memo yet; its "seed" is a dataset constant's partials (its own, or
G's), the same for every line that reads it."""


def _constant_seed(
    name: str, binding: Binding, evaluator: StatementEvaluator
) -> dict[str, float] | None:
    """What ``SymbolValues`` seeds a constant's dual number with."""
    assert binding.value is not None
    seed = _g_seed(name_g_power(name, evaluator.ctx), binding.value, evaluator.ctx)
    if not seed and binding.uncertainty:
        seed = {name: 1.0}
    return seed or None


def _double(value: Fraction) -> float:
    """The double sympy's Rational gives (``p / q`` by integer true division)."""
    if value.denominator == 1:
        return float(value.numerator)
    return value.numerator / value.denominator


def _bounded(exact: Fraction) -> Fraction:
    """Refuse exact numbers past a few thousand bits: the sympy path has their limits."""
    if exact.numerator.bit_length() > _EXACT_BITS or exact.denominator.bit_length() > _EXACT_BITS:
        raise _NotCovered
    return exact


def _combine(*parts: tuple[float, dict[str, float] | None]) -> dict[str, float] | None:
    """The chain rule: sum of factor * d(part)/d(input), keys in first-seen order."""
    grad: dict[str, float] | None = None
    for factor, part in parts:
        if part:
            if grad is None:
                grad = {}
            for key, d in part.items():
                grad[key] = grad.get(key, 0.0) + factor * d
    return grad
