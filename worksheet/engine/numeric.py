"""Numbers from symbolic forms: a tree walk of our own over floats, numpy arrays or mpmath.

No ``lambdify`` (it generates and execs code): the walk maps each sympy node class to a
backend function through a table.
"""

from __future__ import annotations

import math
from collections.abc import Mapping
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

    def multiply(self, items: list[Any]) -> Any:
        result = items[0]
        for item in items[1:]:
            result = result * item
        return result


class NumpyBackend(Backend):
    name = "numpy"

    def __init__(self) -> None:
        import numpy

        self.np = numpy

    def power(self, base: Any, exponent: Any) -> Any:
        with self.np.errstate(over="ignore", invalid="ignore", divide="ignore"):
            return (
                self.np.power(base, exponent)
                if isinstance(base, self.np.ndarray) or isinstance(exponent, self.np.ndarray)
                else super().power(base, exponent)
            )

    def functions(self) -> Mapping[type, Any]:
        np = self.np
        return {
            sympy.exp: np.exp,
            sympy.log: np.log,
            sympy.sin: np.sin,
            sympy.cos: np.cos,
            sympy.tan: np.tan,
            sympy.asin: np.arcsin,
            sympy.acos: np.arccos,
            sympy.atan: np.arctan,
            sympy.sinh: np.sinh,
            sympy.cosh: np.cosh,
            sympy.tanh: np.tanh,
            sympy.Abs: np.abs,
            sympy.Min: lambda *a: np.minimum.reduce(np.broadcast_arrays(*a)),
            sympy.Max: lambda *a: np.maximum.reduce(np.broadcast_arrays(*a)),
        }

    def add(self, items: list[Any]) -> Any:
        result = items[0]
        for item in items[1:]:
            result = result + item
        return result


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

    def power(self, base: Any, exponent: Any) -> Any:
        result = self.mp.power(base, exponent)
        if isinstance(result, self.mpmath.mpc):
            raise EvaluationError("a power is not a real number")
        return result

    def functions(self) -> Mapping[type, Any]:
        mp = self.mp
        return {
            sympy.exp: mp.exp,
            sympy.log: mp.log,
            sympy.sin: mp.sin,
            sympy.cos: mp.cos,
            sympy.tan: mp.tan,
            sympy.asin: mp.asin,
            sympy.acos: mp.acos,
            sympy.atan: mp.atan,
            sympy.sinh: mp.sinh,
            sympy.cosh: mp.cosh,
            sympy.tanh: mp.tanh,
            sympy.Abs: abs,
            sympy.Min: min,
            sympy.Max: max,
        }

    def add(self, items: list[Any]) -> Any:
        return self.mp.fsum(items)


FLOAT = Backend()


def evaluate(expr: sympy.Expr, values: Mapping[sympy.Symbol, Any], backend: Backend = FLOAT) -> Any:
    """The number of ``expr`` with each symbol replaced by ``values[symbol]``.

    >>> x = sympy.Symbol("x")
    >>> evaluate(2 * x**2 + 1, {x: 3.0})
    19.0
    """
    table = backend.functions()
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
            if node is sympy.nan or node in (sympy.oo, -sympy.oo, sympy.zoo):
                raise EvaluationError(f"the result is {node} (not a finite number)")
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
