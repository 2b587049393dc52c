"""The sympy work behind the derivation verbs, as plain functions a worker process can run."""

from __future__ import annotations

import sympy

from worksheet.errors import EvaluationError


def is_monomial(expr: sympy.Expr) -> bool:
    """A product of symbols, positive numbers and pi to rational powers: already simplest.

    ``sympy.simplify`` returns such an expression unchanged, after tens of milliseconds
    (hundreds on its first call in a process), so the verbs skip it there.
    """
    factors = expr.args if expr.is_Mul else (expr,)
    for factor in factors:
        base, power = factor.as_base_exp()
        if not power.is_Rational:
            return False
        if not (base.is_Symbol or base is sympy.pi or (base.is_Rational and base.is_positive)):
            return False
    return True


def simplest(expr: sympy.Expr) -> sympy.Expr:
    """``sympy.simplify(expr)``, skipped where it cannot change anything (a monomial)."""
    return expr if is_monomial(expr) else sympy.simplify(expr)


def simplify(expr: sympy.Expr) -> sympy.Expr:
    return sympy.simplify(expr)


def expand(expr: sympy.Expr) -> sympy.Expr:
    return sympy.expand(expr)


def factor(expr: sympy.Expr) -> sympy.Expr:
    return sympy.factor(expr)


def differentiate(expr: sympy.Expr, variable: sympy.Symbol, order: int) -> sympy.Expr:
    return sympy.diff(expr, variable, order)


def integrate(
    expr: sympy.Expr,
    variable: sympy.Symbol,
    lower: sympy.Expr | None = None,
    upper: sympy.Expr | None = None,
) -> sympy.Expr | None:
    """The integral, or None when sympy finds no closed form (the caller may fall back to
    quadrature)."""
    if lower is None:
        result = sympy.integrate(expr, variable)
    elif lower is sympy.oo or upper is sympy.S.NegativeInfinity:
        # Integrate the other way and change the sign: sympy's definite integrals from +oo
        # down can fail inside (meijerint_definite returns None).
        flipped = integrate(expr, variable, upper, lower)
        return None if flipped is None else -flipped
    else:
        result = sympy.integrate(expr, (variable, lower, upper))
    if result.has(sympy.Integral):
        return None
    if result.has(sympy.AccumBounds):
        raise EvaluationError("the integral does not converge (its value oscillates)")
    if result.has(sympy.oo, -sympy.oo, sympy.zoo):
        raise EvaluationError("the integral diverges")
    if isinstance(result, sympy.Piecewise):
        # With positive symbols the convergent branch is the first; say so if it is not clear.
        first, condition = result.args[0]
        if condition is not sympy.true:
            raise EvaluationError(f"the integral holds only when {condition}; declare signs")
        result = first
    return simplest(result)


def solve(lhs: sympy.Expr, rhs: sympy.Expr, variable: sympy.Symbol) -> list[sympy.Expr] | None:
    """The real roots, or None when sympy has no method for the equation (the caller may
    fall back to a numeric root)."""
    try:
        roots = sympy.solve(sympy.Eq(lhs, rhs), variable, dict=False)
    except NotImplementedError:
        return None
    return [exponents_out_of_logs(simplest(root)) for root in roots if root.is_real is not False]


def exponents_out_of_logs(expr: sympy.Expr) -> sympy.Expr:
    """``log((B/A)^tau)`` as ``tau*log(B/A)``: the form a physicist writes (valid for a
    positive base and a real exponent, which the symbols' assumptions say)."""

    def is_log_of_power(node: sympy.Expr) -> bool:
        if not (isinstance(node, sympy.log) and len(node.args) == 1 and node.args[0].is_Pow):
            return False
        base, exponent = node.args[0].args
        return bool(base.is_positive) and bool(exponent.is_real) and not exponent.is_Number

    def pulled(node: sympy.log) -> sympy.Expr:
        base, exponent = node.args[0].args
        return exponent * sympy.log(base)

    return expr.replace(is_log_of_power, pulled)


def series(expr: sympy.Expr, variable: sympy.Symbol, point: sympy.Expr, order: int) -> sympy.Expr:
    return sympy.series(expr, variable, point, order).removeO()


def limit(expr: sympy.Expr, variable: sympy.Symbol, point: sympy.Expr) -> sympy.Expr:
    return sympy.limit(expr, variable, point)


def substitute(expr: sympy.Expr, variable: sympy.Symbol, value: sympy.Expr) -> sympy.Expr:
    return expr.subs(variable, value)


def dsolve(
    lhs: sympy.Expr,
    rhs: sympy.Expr,
    function: sympy.Expr,
    variable: sympy.Symbol,
    start: sympy.Expr,
    initial: sympy.Expr,
) -> sympy.Expr:
    """Solve the ODE ``lhs == rhs`` for ``function`` (of ``variable``) with f(start) = initial."""
    values = _separable_solutions(lhs, rhs, function, variable, start, initial)
    if values is None:
        equation = sympy.Eq(lhs, rhs)
        found = sympy.dsolve(equation, function, ics={function.subs(variable, start): initial})
        values = [solution.rhs for solution in (found if isinstance(found, list) else [found])]
    candidates = []
    for found_value in values:
        value = simplest(found_value)
        check = sympy.simplify(value.subs(variable, start) - initial)
        if check == 0 and value.is_real is not False:
            candidates.append(value)
    if len(candidates) > 1:
        real = [c for c in candidates if c.subs(variable, start).is_positive]
        candidates = real or candidates
    if len(candidates) != 1:
        shown = ", ".join(str(c) for c in candidates) or "none"
        raise EvaluationError(f"expected one real solution, found {len(candidates)}: {shown}")
    return candidates[0]


def _separable_solutions(
    lhs: sympy.Expr,
    rhs: sympy.Expr,
    function: sympy.Expr,
    variable: sympy.Symbol,
    start: sympy.Expr,
    initial: sympy.Expr,
) -> list[sympy.Expr] | None:
    """Roots of ``int dM/F(M) from M0 to M == t - t0`` for an autonomous dM/dt = F(M).

    sympy's ``dsolve`` classifies the equation against every hint it knows before it
    solves (about a second even for dM/dt = -a/M^2); an autonomous first-order equation,
    the usual mass-loss law, is one integral and one solve. None when the equation is not
    of that form or the integral has no closed form, so that ``dsolve`` decides. (Equations
    with t on the right are left to ``dsolve``, whose closed forms can be written
    differently.)
    """
    if lhs != sympy.Derivative(function, variable):
        return None
    unknown = sympy.Dummy("M")
    slope = rhs.subs(function, unknown)
    if slope.has(sympy.Derivative, function, variable) or not slope.has(unknown):
        return None
    mass = sympy.Dummy("m")
    elapsed = sympy.integrate(1 / slope.subs(unknown, mass), (mass, initial, unknown))
    if elapsed.has(sympy.Integral, sympy.Piecewise):
        return None
    roots = sympy.solve(sympy.Eq(elapsed, variable - start), unknown, dict=False)
    return list(roots) or None


def is_zero(expr: sympy.Expr) -> bool | None:
    """Whether an expression is identically zero (None when it cannot be decided)."""
    simplified = sympy.simplify(expr)
    if simplified == 0:
        return True
    decided = simplified.is_zero
    return decided


def decide_order(lhs: sympy.Expr, rhs: sympy.Expr, op: str) -> bool | None:
    """Whether ``lhs op rhs`` holds for every allowed value of the symbols (None: undecided)."""
    difference = sympy.expand(lhs - rhs)
    return {
        "<": (-difference).is_positive,
        "<=": (-difference).is_nonnegative,
        ">": difference.is_positive,
        ">=": difference.is_nonnegative,
    }[op]


def log_slope(expr: sympy.Expr, variable: sympy.Symbol) -> sympy.Expr:
    """d ln f / d ln x: a constant exactly when f is a power law in x.

    For a monomial it is the exponent of x, read off without simplify.
    """
    if is_monomial(expr):
        return sympy.Add(*(power for base, power in _factors(expr) if base == variable))
    return sympy.simplify(variable * sympy.diff(expr, variable) / expr)


def _factors(expr: sympy.Expr) -> list[tuple[sympy.Expr, sympy.Expr]]:
    return [factor.as_base_exp() for factor in (expr.args if expr.is_Mul else (expr,))]


def warm_up() -> None:
    """One small definite integral and one solve, in a worker started early.

    sympy's first integral and first solve in a process set up far more than later ones
    (lazy imports, rule tables); a worker that does this while its parent is still
    importing answers the sheet's first verbs sooner. The symbols are of their own, so no
    cached result can stand in for a sheet's.
    """
    x = sympy.Symbol("_warm_x", positive=True)
    y = sympy.Symbol("_warm_y", positive=True)
    integrate(x**2 / y, x, sympy.Integer(0), y)
    solve(x**3 / y, y, x)
