"""The short cuts behind the speed figures give exactly what the long way gives."""

from __future__ import annotations

import sys

import pytest
import sympy

from worksheet.engine import symbolic_ops as ops
from worksheet.engine.budget import VERB_MODULES, Worker

M0, a, k, b, t0 = sympy.symbols("M0 a k b t0", positive=True)
t = sympy.Symbol("t", positive=True)
M = sympy.Function("M")(t)

# Autonomous mass laws dM/dt = F(M): the form every fast-path result must match.
AUTONOMOUS = [
    (-a / M**2, 0),  # photon-only Hawking evaporation, F ~ 1/M^2
    (-a / M**2, t0),
    (-k * M, 0),  # exponential decay
    (b - k * M, 0),  # decay with a constant source
    (-a / M**3, 0),
]


@pytest.mark.parametrize(("slope", "start"), AUTONOMOUS)
def test_issue12_autonomous_dsolve_matches_sympy_dsolve(slope, start, monkeypatch) -> None:
    fast = ops.dsolve(sympy.Derivative(M, t), slope, M, t, start, M0)
    monkeypatch.setattr(ops, "_separable_solutions", lambda *args: None)
    slow = ops.dsolve(sympy.Derivative(M, t), slope, M, t, start, M0)
    assert sympy.srepr(fast) == sympy.srepr(slow)


def test_issue12_mass_loss_solution_satisfies_the_equation() -> None:
    # dM/dt = -a/M^2, M(0) = M0 has M(t) = (M0^3 - 3 a t)^(1/3) (separation of variables).
    solution = ops.dsolve(sympy.Derivative(M, t), -a / M**2, M, t, 0, M0)
    assert sympy.simplify(sympy.diff(solution, t) + a / solution**2) == 0
    assert solution.subs(t, 0) == M0


def test_issue12_equations_with_time_on_the_right_are_left_to_dsolve() -> None:
    assert ops._separable_solutions(sympy.Derivative(M, t), -a * t / M, M, t, 0, M0) is None


@pytest.mark.parametrize(
    "expr",
    [
        5120 * sympy.pi * b**2 * M0**3 / (k**4 * a),
        sympy.sqrt(2) * a ** sympy.Rational(3, 2) / b,
        sympy.Rational(3, 7) * a,
        a,
    ],
)
def test_issue12_monomials_skip_simplify_because_it_changes_nothing(expr) -> None:
    assert ops.is_monomial(expr)
    assert sympy.simplify(expr) == expr
    assert ops.simplest(expr) is expr


@pytest.mark.parametrize(
    "expr",
    [a + b, sympy.exp(a) * b, (-1) ** sympy.Rational(1, 3) * a, a**b, sympy.sin(a) ** 2],
)
def test_issue12_other_results_are_still_simplified(expr) -> None:
    assert not ops.is_monomial(expr)
    assert ops.simplest(expr) == sympy.simplify(expr)


def test_issue12_a_worker_start_imports_what_the_verbs_need() -> None:
    worker = Worker()
    try:
        assert worker.call(abs, (-2,), 5.0, "abs") == 2
    finally:
        worker.close()
    assert all(name in sys.modules for name in VERB_MODULES)


@pytest.mark.parametrize(
    "expr",
    [
        a / (8 * sympy.pi * b * M0 * k),  # T_H ~ 1/M
        4 * sympy.pi * b * M0**2 / a,  # S ~ M^2
        5120 * sympy.pi * b**2 * M0**3 / (a * k**4),  # t_ev ~ M^3
        sympy.sqrt(M0) * a,
        a * b,  # no M0 at all
    ],
)
def test_issue12_log_slope_of_a_monomial_is_what_simplify_gives(expr) -> None:
    fast = ops.log_slope(expr, M0)
    slow = sympy.simplify(M0 * sympy.diff(expr, M0) / expr)
    assert fast == slow
    assert sympy.srepr(fast) == sympy.srepr(slow)


def _stable_correlation_ratio(x, y, variance: float) -> float:
    """The estimator as first written, with the stable sort always (the reference)."""
    import numpy as np

    from worksheet.engine.sampling import SHARE_BINS

    order = np.argsort(x, kind="stable")
    mean = float(np.mean(y))
    total = 0.0
    for group in np.array_split(y[order], SHARE_BINS):
        total += group.size * (float(np.mean(group)) - mean) ** 2
    return total / (y.size * variance)


@pytest.mark.parametrize("ties", [False, True])
def test_issue12_correlation_ratio_is_bit_for_bit_the_stable_sort_one(ties: bool) -> None:
    import numpy as np

    from worksheet.engine.sampling import _correlation_ratio

    rng = np.random.default_rng(5)
    x = rng.random(20_000)
    if ties:
        x = np.round(x, 2)  # many equal values: their order decides the bins
    y = np.sin(7 * x) + 0.3 * rng.random(x.size)
    variance = float(np.var(y))
    assert _correlation_ratio(x, y, variance) == _stable_correlation_ratio(x, y, variance)
