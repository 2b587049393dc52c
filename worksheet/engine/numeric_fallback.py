"""Numbers where no closed form exists: quadrature for integrals, bracketed roots for solve.

Used by the verbs only when sympy gives up and every symbol but the verb's variable has a
value. The work is mpmath's (``quad``, ``findroot``) on our own tree walk, so no sheet text
is ever compiled; it runs under the statement's interval timer like the rest of a statement.
"""

from __future__ import annotations

import collections
import math
from collections.abc import Mapping
from typing import Any

import sympy

from worksheet.engine.numeric import FLOAT, MpBackend, evaluate
from worksheet.errors import EvaluationError


class _TailBackend(MpBackend):
    """mpmath for quadrature nodes far out on an infinite range: exp of a large negative
    number is a tiny number there (the integrand's tail), not an error."""

    def functions(self) -> Mapping[type, Any]:
        table = dict(super().functions())
        bounded_exp = table[sympy.exp]
        table[sympy.exp] = lambda x: self.mp.exp(x) if x < 0 else bounded_exp(x)
        return table


_MP = _TailBackend(30)

SCAN_DECADES = (-300, 300)
"""The magnitudes (powers of ten, in SI) scanned for a sign change of L - R."""

SCAN_STEPS_PER_DECADE = 4

QUADRATURE_TOLERANCE = 1e-10
"""Largest relative error estimate of a quadrature that is recorded as a number."""


def computable(expr: sympy.Expr) -> bool:
    """Whether our numeric walk can evaluate every function in ``expr`` (a closed form in
    meijerg or LambertW cannot be recorded as a number)."""
    table = FLOAT.functions()
    return all(
        node.func in table or node.func is sympy.log
        for node in sympy.preorder_traversal(expr)
        if isinstance(node, sympy.Function)
    )


def _mp_values(values: Mapping[sympy.Symbol, float]) -> dict[sympy.Symbol, Any]:
    return {symbol: _MP.mp.mpf(value) for symbol, value in values.items()}


def quadrature(
    integrand: sympy.Expr,
    variable: sympy.Symbol,
    lower: sympy.Expr,
    upper: sympy.Expr,
    values: Mapping[sympy.Symbol, float],
) -> float:
    """The integral of ``integrand`` from ``lower`` to ``upper`` (SI numbers, +-oo allowed).

    Raises EvaluationError when the integrand has no value somewhere or the error
    estimate is too large to record the number as a result.
    """
    mp = _MP.mp
    known = _mp_values(values)
    bounds = [_bound(bound, known) for bound in (lower, upper)]

    def f(x: Any) -> Any:
        return evaluate(integrand, collections.ChainMap({variable: x}, known), _MP)

    try:
        value, error = mp.quad(f, bounds, error=True)
    except (ValueError, ZeroDivisionError, TypeError) as err:
        raise EvaluationError(f"numeric integration failed: {err}") from err
    if not mp.isfinite(value):
        raise EvaluationError("numeric integration gave no finite number (divergent?)")
    scale = abs(value) if value != 0 else mp.mpf(1)
    if error > QUADRATURE_TOLERANCE * scale:
        raise EvaluationError(
            f"numeric integration did not converge (estimated error {mp.nstr(error, 2)} "
            f"on {mp.nstr(value, 6)})"
        )
    return float(value)


def _bound(bound: sympy.Expr, known: Mapping[sympy.Symbol, Any]) -> Any:
    if bound is sympy.oo:
        return _MP.mp.inf
    if bound is sympy.S.NegativeInfinity:
        return -_MP.mp.inf
    return evaluate(bound, known, _MP)


def bracketed_roots(
    difference: sympy.Expr,
    variable: sympy.Symbol,
    values: Mapping[sympy.Symbol, float],
) -> list[float]:
    """The roots (SI numbers) of ``difference`` in ``variable`` over the scanned magnitudes.

    A scan in float on a logarithmic grid finds sign changes (positive values only for a
    positive symbol; both signs otherwise); each bracket is refined with mpmath at 30
    digits. A sign change across a pole is not a root and is dropped.
    """
    low, high = SCAN_DECADES
    magnitudes = [
        10.0 ** (low + k / SCAN_STEPS_PER_DECADE)
        for k in range((high - low) * SCAN_STEPS_PER_DECADE + 1)
    ]
    grids = [magnitudes]
    if not variable.is_positive:
        grids.append([-x for x in reversed(magnitudes)])
    roots: list[float] = []
    for grid in grids:
        previous: tuple[float, float] | None = None
        for x in grid:
            fx = _float_at(difference, variable, x, values)
            if fx is None:
                previous = None
                continue
            if fx == 0:
                roots.append(x)
            elif previous is not None and (previous[1] < 0) != (fx < 0):
                root = _refine(difference, variable, previous[0], x, values)
                if root is not None:
                    roots.append(root)
            previous = (x, fx)
    return sorted(set(roots))


def _float_at(
    expr: sympy.Expr, variable: sympy.Symbol, x: float, values: Mapping[sympy.Symbol, float]
) -> float | None:
    try:
        value = evaluate(expr, collections.ChainMap({variable: x}, values), FLOAT)  # type: ignore[arg-type]
    except (EvaluationError, ValueError, ZeroDivisionError, OverflowError, TypeError):
        return None
    if isinstance(value, complex):
        return None
    value = float(value)
    return value if math.isfinite(value) else None


def _refine(
    expr: sympy.Expr,
    variable: sympy.Symbol,
    a: float,
    b: float,
    values: Mapping[sympy.Symbol, float],
) -> float | None:
    mp = _MP.mp
    known = _mp_values(values)

    def f(x: Any) -> Any:
        return evaluate(expr, collections.ChainMap({variable: x}, known), _MP)

    try:
        root = mp.findroot(f, (mp.mpf(a), mp.mpf(b)), solver="anderson", verify=False)
        at_root, at_a, at_b = abs(f(root)), abs(f(mp.mpf(a))), abs(f(mp.mpf(b)))
    except (ValueError, ZeroDivisionError, TypeError, EvaluationError):
        return None
    if not (min(a, b) <= root <= max(a, b)):
        return None
    if at_root > mp.mpf(10) ** -12 * max(at_a, at_b):  # a pole, not a root
        return None
    return float(root)
