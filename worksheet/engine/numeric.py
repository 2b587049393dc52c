"""Numbers from symbolic forms: a tree walk of our own over floats, numpy arrays or mpmath.

No ``lambdify`` (it generates and execs code): the walk maps each sympy node class to a
backend function through a table.
"""

from __future__ import annotations

import functools
import math
from collections.abc import Mapping
from dataclasses import dataclass
from typing import Any

import sympy

from worksheet.errors import EvaluationError


class MissingValue(EvaluationError):
    """A symbol in the expression has no value (it is declared, not given)."""

    def __init__(self, symbol: sympy.Symbol):
        super().__init__(f"'{symbol.name}' has no value")
        self.symbol = symbol


class Backend:
    """Arithmetic for one kind of number. Subclasses swap the function table."""

    name = "float"

    def number(self, value: sympy.Expr) -> Any:
        try:
            if value.is_Integer:
                return float(int(value))
            if value.is_Rational:
                return int(value.p) / int(value.q)
            return float(value)
        except OverflowError:
            return math.inf if value > 0 else -math.inf

    def power(self, base: Any, exponent: Any) -> Any:
        try:
            result = base**exponent
        except ZeroDivisionError as err:
            raise EvaluationError("division by zero (0 to a negative power)") from err
        except OverflowError:
            return math.inf
        if isinstance(result, complex):
            raise EvaluationError(f"{base!r} to the power {exponent!r} is not a real number")
        return result

    def functions(self) -> Mapping[type, Any]:
        def real(fn):
            def wrapped(*args):
                try:
                    return fn(*args)
                except OverflowError:
                    return math.inf
                except ValueError as err:
                    raise EvaluationError(
                        f"{fn.__name__}({', '.join(f'{a:.6g}' for a in args)}) is outside its "
                        "domain"
                    ) from err

            wrapped.__name__ = fn.__name__
            return wrapped

        return {
            sympy.exp: real(math.exp),
            sympy.log: real(math.log),
            sympy.sin: real(math.sin),
            sympy.cos: real(math.cos),
            sympy.tan: real(math.tan),
            sympy.asin: real(math.asin),
            sympy.acos: real(math.acos),
            sympy.atan: real(math.atan),
            sympy.sinh: real(math.sinh),
            sympy.cosh: real(math.cosh),
            sympy.tanh: real(math.tanh),
            sympy.Abs: abs,
            sympy.Min: min,
            sympy.Max: max,
        }

    def add(self, items: list[Any]) -> Any:
        return math.fsum(items) if all(isinstance(x, float) for x in items) else sum(items)

    def log_of_rational(self, value: sympy.Rational) -> Any:
        """log p/q from the exact integers: math.log takes integers beyond the double range,
        so log(1e-310) (which sympy writes as -log(10^310)) is no overflow."""
        return math.log(int(value.p)) - math.log(int(value.q))

    def multiply(self, items: list[Any]) -> Any:
        result = items[0]
        for item in items[1:]:
            result = result * item
        return result


class NumpyBackend(Backend):
    """Whole arrays at once, for sweeps. Scalars are folded before they meet an array, so
    a sweep costs about one array operation per node that depends on the swept input."""

    name = "numpy"

    def __init__(self) -> None:
        import numpy

        self.np = numpy

    def _is_array(self, value: Any) -> bool:
        return isinstance(value, self.np.ndarray)

    def power(self, base: Any, exponent: Any) -> Any:
        np = self.np
        if not (self._is_array(base) or self._is_array(exponent)):
            return super().power(base, exponent)
        with np.errstate(over="ignore", invalid="ignore", divide="ignore"):
            if not self._is_array(exponent):
                fast = {
                    -1.0: lambda x: 1.0 / x,
                    2.0: lambda x: x * x,
                    0.5: np.sqrt,
                    1.0: lambda x: x,
                    -2.0: lambda x: 1.0 / (x * x),
                    3.0: lambda x: x * x * x,
                }.get(float(exponent))
                if fast is not None:
                    return fast(base)
            return np.power(base, exponent)

    def functions(self) -> Mapping[type, Any]:
        np = self.np

        def quiet(function):
            def apply(*args: Any) -> Any:
                with np.errstate(over="ignore", invalid="ignore", divide="ignore"):
                    return function(*args)

            return apply

        return {
            sympy.exp: quiet(np.exp),
            sympy.log: quiet(np.log),
            sympy.sin: np.sin,
            sympy.cos: np.cos,
            sympy.tan: np.tan,
            sympy.asin: quiet(np.arcsin),
            sympy.acos: quiet(np.arccos),
            sympy.atan: np.arctan,
            sympy.sinh: quiet(np.sinh),
            sympy.cosh: quiet(np.cosh),
            sympy.tanh: np.tanh,
            sympy.Abs: np.abs,
            sympy.Min: lambda *a: np.minimum.reduce(np.broadcast_arrays(*a)),
            sympy.Max: lambda *a: np.maximum.reduce(np.broadcast_arrays(*a)),
        }

    def add(self, items: list[Any]) -> Any:
        scalars = [item for item in items if not self._is_array(item)]
        arrays = [item for item in items if self._is_array(item)]
        result: Any = sum(scalars) if scalars else 0.0
        for item in arrays:
            result = item + result
        return result

    def multiply(self, items: list[Any]) -> Any:
        scalar = 1.0
        arrays = []
        for item in items:
            if self._is_array(item):
                arrays.append(item)
            else:
                scalar = scalar * item
        if not arrays:
            return scalar
        with self.np.errstate(over="ignore", invalid="ignore"):
            result = arrays[0] * scalar if scalar != 1.0 else arrays[0]
            for item in arrays[1:]:
                result = result * item
        return result


@functools.cache
def numpy_backend() -> NumpyBackend:
    """The array backend (numpy is imported on first use, not with the engine)."""
    return NumpyBackend()


class MpBackend(Backend):
    """mpmath at a chosen working precision, for the precision guard."""

    name = "mpmath"

    def __init__(self, digits: int = 50) -> None:
        import mpmath

        self.mp = mpmath.MPContext()
        self.mp.dps = digits
        self.mpmath = mpmath

    def number(self, value: sympy.Expr) -> Any:
        if value.is_Rational:
            return self.mp.mpf(int(value.p)) / int(value.q)
        if value is sympy.pi:
            return +self.mp.pi
        if value is sympy.E:
            return self.mp.e
        return self.mp.mpf(str(value))

    def _bounded(self, bits: Any) -> None:
        """Refuse results beyond 2^MAX_BITS before mpmath builds a huge integer for them."""
        if abs(bits) > self.MAX_BITS:
            raise EvaluationError("a value far outside any recordable range (beyond 10^30000)")

    MAX_BITS = 100_000

    def power(self, base: Any, exponent: Any) -> Any:
        if base != 0 and exponent != 0:
            self._bounded(exponent * self.mp.mag(base))
        result = self.mp.power(base, exponent)
        if isinstance(result, self.mpmath.mpc):
            raise EvaluationError("a power is not a real number")
        return result

    def functions(self) -> Mapping[type, Any]:
        mp = self.mp

        def growing(function):
            def apply(x: Any) -> Any:
                self._bounded(x * 1.4427)  # e^x = 2^(x / ln 2)
                return function(x)

            return apply

        return {
            sympy.exp: growing(mp.exp),
            sympy.log: mp.log,
            sympy.sin: mp.sin,
            sympy.cos: mp.cos,
            sympy.tan: mp.tan,
            sympy.asin: mp.asin,
            sympy.acos: mp.acos,
            sympy.atan: mp.atan,
            sympy.sinh: growing(mp.sinh),
            sympy.cosh: growing(mp.cosh),
            sympy.tanh: mp.tanh,
            sympy.Abs: abs,
            sympy.Min: min,
            sympy.Max: max,
        }

    def add(self, items: list[Any]) -> Any:
        return self.mp.fsum(items)

    def log_of_rational(self, value: sympy.Rational) -> Any:
        return self.mp.log(self.number(value))


FLOAT = Backend()

# sympy's non-finite numbers are singletons: compared by identity, without sympy's __eq__.
_NAN, _INFINITY, _MINUS_INFINITY, _ZOO = sympy.nan, sympy.oo, sympy.S.NegativeInfinity, sympy.zoo


def evaluate(expr: sympy.Expr, values: Mapping[sympy.Symbol, Any], backend: Backend = FLOAT) -> Any:
    """The number of ``expr`` with each symbol replaced by ``values[symbol]``.

    >>> x = sympy.Symbol("x")
    >>> evaluate(2 * x**2 + 1, {x: 3.0})
    19.0
    """
    table = backend.__dict__.get("_function_table")
    if table is None:  # built once per backend: it is the same table every time
        table = backend._function_table = backend.functions()  # type: ignore[attr-defined]
    cache: dict[sympy.Expr, Any] = {}

    def walk(node: sympy.Expr) -> Any:
        if node in cache:
            return cache[node]
        if node.is_Symbol:
            try:
                result = values[node]
            except KeyError:
                raise MissingValue(node) from None
        elif node.is_Number:
            if node is _NAN or node is _INFINITY or node is _MINUS_INFINITY or node is _ZOO:
                spelled = {sympy.oo: "inf", -sympy.oo: "-inf"}.get(node, str(node))
                raise EvaluationError(f"the result is {spelled} (not a finite number)")
            result = backend.number(node)
        elif isinstance(node, sympy.NumberSymbol):
            result = backend.number(node)
        elif node.is_Add:
            result = backend.add([walk(arg) for arg in node.args])
        elif node.is_Mul:
            result = backend.multiply([walk(arg) for arg in node.args])
        elif node.is_Pow:
            base, exponent = node.args
            result = backend.power(walk(base), walk(exponent))
        elif node.func is sympy.log and len(node.args) == 1 and node.args[0].is_Rational:
            if node.args[0] <= 0:
                raise EvaluationError(f"log({node.args[0]}) is outside its domain")
            result = backend.log_of_rational(node.args[0])
        elif node.func in table:
            args = [walk(arg) for arg in node.args]
            if node.func is sympy.log and len(args) == 2:
                result = table[sympy.log](args[0]) / table[sympy.log](args[1])
            else:
                result = table[node.func](*args)
        else:
            raise EvaluationError(
                f"cannot compute a number for {type(node).__name__} "
                f"({str(node)[:60]}): the step was not carried out symbolically"
            )
        cache[node] = result
        return result

    return walk(expr)


class Dual:
    """A value with its first partial derivatives (forward-mode differentiation).

    ``grad`` maps an input's key to d(value)/d(input): exact derivatives of the expression,
    evaluated in floating point, for first-order uncertainty propagation.
    """

    __slots__ = ("grad", "value")

    def __init__(self, value: float, grad: dict[Any, float] | None = None):
        self.value = value
        self.grad = grad or {}

    def scaled(self, factor: float, value: float) -> Dual:
        return Dual(value, {key: factor * d for key, d in self.grad.items()})


def _combine(value: float, *parts: tuple[float, Dual]) -> Dual:
    grad: dict[Any, float] = {}
    for factor, dual in parts:
        for key, d in dual.grad.items():
            grad[key] = grad.get(key, 0.0) + factor * d
    return Dual(value, grad)


class DualBackend(Backend):
    """Floats with partial derivatives, for propagating standard uncertainties."""

    name = "dual"

    def number(self, value: sympy.Expr) -> Any:
        return Dual(super().number(value))

    def log_of_rational(self, value: sympy.Rational) -> Any:
        return Dual(super().log_of_rational(value))

    def add(self, items: list[Any]) -> Any:
        return _combine(math.fsum(i.value for i in items), *((1.0, i) for i in items))

    def multiply(self, items: list[Any]) -> Any:
        result = items[0]
        for item in items[1:]:
            result = _combine(result.value * item.value, (item.value, result), (result.value, item))
        return result

    def power(self, base: Any, exponent: Any) -> Any:
        value = super().power(base.value, exponent.value)
        parts = []
        if base.grad:
            if base.value == 0:
                slope = 0.0 if exponent.value > 1 else math.inf
            else:
                slope = exponent.value * value / base.value
            parts.append((slope, base))
        if exponent.grad:
            if base.value <= 0:
                raise EvaluationError("an uncertain exponent needs a positive base")
            parts.append((value * math.log(base.value), exponent))
        return _combine(value, *parts)

    def functions(self) -> Mapping[type, Any]:
        plain = FLOAT.functions()

        def unary(function, derivative):
            def apply(x: Dual) -> Dual:
                value = plain[function](x.value)
                return x.scaled(derivative(x.value, value), value) if x.grad else Dual(value)

            return apply

        def pick(chooser):
            def apply(*args: Dual) -> Dual:
                return chooser(args, key=lambda d: d.value)

            return apply

        return {
            sympy.exp: unary(sympy.exp, lambda x, y: y),
            sympy.log: unary(sympy.log, lambda x, y: 1 / x),
            sympy.sin: unary(sympy.sin, lambda x, y: math.cos(x)),
            sympy.cos: unary(sympy.cos, lambda x, y: -math.sin(x)),
            sympy.tan: unary(sympy.tan, lambda x, y: 1 + y * y),
            sympy.asin: unary(sympy.asin, lambda x, y: 1 / math.sqrt(1 - x * x)),
            sympy.acos: unary(sympy.acos, lambda x, y: -1 / math.sqrt(1 - x * x)),
            sympy.atan: unary(sympy.atan, lambda x, y: 1 / (1 + x * x)),
            sympy.sinh: unary(sympy.sinh, lambda x, y: math.cosh(x)),
            sympy.cosh: unary(sympy.cosh, lambda x, y: math.sinh(x)),
            sympy.tanh: unary(sympy.tanh, lambda x, y: 1 - y * y),
            sympy.Abs: unary(sympy.Abs, lambda x, y: 1.0 if x >= 0 else -1.0),
            sympy.Min: pick(min),
            sympy.Max: pick(max),
        }


DUAL = DualBackend()


@dataclass(frozen=True, slots=True)
class _SweepPlan:
    """How one form is swept over one symbol: the part independent of the symbol (folded
    to one number), what remains, and, for a pure power of the symbol, its exponent."""

    coefficient: sympy.Expr
    rest: sympy.Expr
    reads: tuple[sympy.Symbol, ...]  # the symbols the coefficient's number depends on
    power: int  # +-1..8 for rest == symbol**power, else 0


_PLANS: dict[tuple[sympy.Expr, sympy.Symbol], _SweepPlan] = {}
_SCALES: dict[tuple[sympy.Expr, tuple[float, ...]], Any] = {}
"""The coefficient's number by the values it read: a sweep redrawn with the same givens
(every frame of a slider, every column of a table) does not walk it again."""


def _plan(expr: sympy.Expr, symbol: sympy.Symbol) -> _SweepPlan:
    plan = _PLANS.get((expr, symbol))
    if plan is None:  # the form's structure does not change with the values: kept
        if len(_PLANS) >= 1024:
            _PLANS.clear()
        coefficient, rest = expr.as_independent(symbol, as_Add=False)
        base, exponent = rest.as_base_exp()
        power = 0
        if base == symbol and exponent.is_Integer and 0 < abs(int(exponent)) <= 8:
            power = int(exponent)
        reads = tuple(sorted(coefficient.free_symbols, key=sympy.default_sort_key))
        plan = _PLANS[(expr, symbol)] = _SweepPlan(coefficient, rest, reads, power)
    return plan


def _scale(plan: _SweepPlan, values: Mapping[sympy.Symbol, Any]) -> Any:
    try:
        read = tuple(values[symbol] for symbol in plan.reads)
    except KeyError:
        return evaluate(plan.coefficient, values)  # which words the missing value
    # Kept only for plain non-zero doubles: 0.0 and -0.0 are equal keys with other results.
    if not all(type(value) is float and value for value in read):
        return evaluate(plan.coefficient, values)
    key = (plan.coefficient, read)
    found = _SCALES.get(key)
    if found is None:
        found = evaluate(plan.coefficient, values)
        if len(_SCALES) >= 1024:
            _SCALES.clear()
        _SCALES[key] = found
    return found


def evaluate_on_array(
    expr: sympy.Expr, symbol: sympy.Symbol, array: Any, values: Mapping[sympy.Symbol, Any]
) -> Any:
    """``expr`` for every element of ``array`` standing for ``symbol``.

    A small compile step first, kept per form: the factor independent of ``symbol`` is
    folded to one number (kept per set of values it reads), and a pure power of the symbol
    is done in place, so a power-law sweep costs what hand-written numpy with folded
    constants costs.
    """
    np = numpy_backend().np
    plan = _plan(expr, symbol)
    scale = _scale(plan, values)
    power = plan.power
    if power:
        with np.errstate(over="ignore", divide="ignore", invalid="ignore"):
            if power > 0:
                out = array * scale
                for _ in range(power - 1):
                    out *= array
            else:
                out = scale / array
                for _ in range(-power - 1):
                    out /= array
        return out
    result = evaluate(plan.rest, _with(values, symbol, array), numpy_backend())
    with np.errstate(over="ignore", invalid="ignore"):
        return result * scale


def _with(values: Mapping[sympy.Symbol, Any], symbol: sympy.Symbol, array: Any) -> Mapping:
    import collections

    return collections.ChainMap({symbol: array}, values)  # type: ignore[arg-type]
