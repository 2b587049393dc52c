"""Infinity, numeric fallbacks and roots with units (issue 10)."""

from __future__ import annotations

import math

import pytest
import scipy.integrate
import scipy.optimize

DECLARED = "A : [kg]\nB : [kg]\ntau : [s]\nt : [s]\nx : [m]\nv : [m/s]\ny : [1]\nL = 2 [m]\n"


def test_issue10_solve_exponential_growth_reads_tau_log(results_by_name) -> None:
    named = results_by_name(
        DECLARED + "g = solve(B == A*exp(t/tau), t)\nd = solve(B == A*exp(-t/tau), t)\n"
    )
    assert named["g"].record == "g = tau*log(B/A)"
    assert named["d"].record == "d = tau*log(A/B)"


def test_issue10_solve_with_units_picks_the_positive_root(results_by_name) -> None:
    # x^2 - 2x - 3 = (x - 3)(x + 1): the positive root is 3 (units only scale it).
    named = results_by_name(
        DECLARED + "r = solve(x^2 - 2 [m]*x == 3 [m^2], x)\n"
        "u = solve(v^2 - 2*v*(1 [km/s]) == 3 [km^2/s^2], v)\n"
    )
    assert named["r"].status == "ok", named["r"].record
    assert named["r"].si_value == pytest.approx(3.0, rel=1e-15)
    assert named["u"].status == "ok", named["u"].record
    assert named["u"].si_value == pytest.approx(3000.0, rel=1e-15)


def test_issue10_solve_dimension_error_points_at_the_side_with_the_unknown(run_sheet) -> None:
    results = run_sheet(DECLARED + "s = solve(B == A*t, t)\ns2 = solve(t*A == B, t)\n")
    # A product is located at its operator: column 17 on the first line, 13 on the second.
    assert results[-2].message == (
        "line 9, col 17: cannot solve: the side dimension kg*s (A*t, kg*s) does not match "
        "the other side, mass (B, kg)"
    )
    assert results[-1].message.startswith(
        "line 10, col 13: cannot solve: the side dimension kg*s (t*A"
    )


def test_issue10_solve_falls_back_to_a_numeric_root(results_by_name) -> None:
    named = results_by_name(
        DECLARED + "w = solve(y*exp(y) + y == 2, y)\nk = solve(cos(y) == y, y)\n"
        "z = solve(x*exp(x/L) + x == 2 [m], x)\n"
    )
    # scipy.optimize.brentq on the same equations, bracketed by hand.
    expected_w = scipy.optimize.brentq(lambda u: u * math.exp(u) + u - 2, 0, 2)
    expected_k = scipy.optimize.brentq(lambda u: math.cos(u) - u, 0, 1)
    expected_z = scipy.optimize.brentq(lambda u: u * math.exp(u / 2) + u - 2, 0, 2)
    for name, expected in (("w", expected_w), ("k", expected_k), ("z", expected_z)):
        assert named[name].si_value == pytest.approx(expected, rel=1e-12), named[name].record
        assert "solved numerically" in named[name].record
    assert named["z"].unit == "m"


def test_issue10_numeric_root_needs_values(run_sheet) -> None:
    results = run_sheet(DECLARED + "q : [1]\nw = solve(y*exp(y) + y == q, y)\n")
    assert results[-1].status == "error"
    assert "solved numerically" in results[-1].message


def test_issue10_infinity_as_a_bound_and_a_limit_point(results_by_name) -> None:
    named = results_by_name(
        DECLARED + "I = integrate(exp(-x/L), x, 0, inf)\n"
        "J = integrate(exp(-(x/L)^2), x, -inf, inf)\n"
        "K = integrate(1/x^2, x, L, inf)\n"
        "l = limit(x/(x + L), x, inf)\n"
    )
    assert named["I"].record == "I = L = 2.000 m"
    # The Gaussian integral: sqrt(pi) L.
    assert named["J"].si_value == pytest.approx(math.sqrt(math.pi) * 2, rel=1e-15)
    assert named["K"].si_value == pytest.approx(0.5, rel=1e-15)
    assert named["K"].unit == "1/m"
    assert named["l"].si_value == 1.0


def test_issue10_infinity_is_dimension_checked_against_the_other_bound(run_sheet) -> None:
    results = run_sheet(DECLARED + "I = integrate(exp(-x/L), x, 1 [s], inf)\nk = inf\n")
    assert results[-2].status == "error" and "bound" in results[-2].message
    assert results[-1].status == "error" and "inf" in results[-1].message


def test_issue10_infinity_cannot_be_redefined(run_sheet) -> None:
    (result,) = run_sheet("inf = 3\n")
    assert result.status == "error" and "infinity" in result.message


def test_issue10_integrate_falls_back_to_quadrature(results_by_name) -> None:
    named = results_by_name(
        DECLARED + "a = integrate(exp(-y^3 - sqrt(y)), y, 0, inf)\n"
        "b = integrate(exp(-(x/L)^2), x, 0, 1 [m])\n"
    )
    # scipy.integrate.quad of the same integrands.
    expected_a = scipy.integrate.quad(lambda u: math.exp(-(u**3) - math.sqrt(u)), 0, math.inf)
    expected_b = scipy.integrate.quad(lambda u: math.exp(-((u / 2) ** 2)), 0, 1)
    assert named["a"].si_value == pytest.approx(expected_a[0], rel=1e-8)
    assert named["b"].si_value == pytest.approx(expected_b[0], rel=1e-10)
    assert named["b"].unit == "m"
    for name in "ab":
        assert "integrated numerically" in named[name].record


def test_issue10_indefinite_integral_without_closed_form_still_errs(run_sheet) -> None:
    results = run_sheet(DECLARED + "a = integrate(exp(-y^3 - sqrt(y)), y)\n")
    assert results[-1].status == "error"
    assert "no closed form" in results[-1].message


def test_issue10_redefined_constant_near_the_bottom_leaves_earlier_uses(run_sheet) -> None:
    results = run_sheet("M = 1e12 [kg]\nr = 2*G*M/c^2\nG = 5\nq = G*M\n")
    assert [r.status for r in results] == ["ok", "ok", "error", "ok"]
    # 2 G M / c^2 for 1e12 kg: 1.48523e-15 m (REFERENCE.md); below the bad line G is still
    # CODATA's G (6.67430e-11, scipy.constants).
    assert results[1].si_value == pytest.approx(1.48523e-15, rel=1e-5)
    assert results[3].si_value == pytest.approx(6.67430e-11 * 1e12, rel=1e-12)
    message = results[2].message
    assert message.startswith("line 3, col 1: 'G' is a constant")
    assert "G_2" in message and "G : [m^3/(kg*s^2)]" in message


def test_issue10_divergent_and_oscillating_integrals_are_recorded_errors(run_sheet) -> None:
    results = run_sheet(
        DECLARED + "p = integrate(1/y, y, 1, inf)\nq = integrate(sin(y), y, 0, inf)\nr = inf^inf\n"
    )
    assert "diverges" in results[-3].message
    assert "does not converge" in results[-2].message
    assert all(r.status == "error" and r.message.startswith("line ") for r in results[-3:])


def test_issue10_uncomputable_closed_form_root_gets_a_number(results_by_name) -> None:
    # y e^y = 1 is solved by sympy as LambertW(1), the omega constant 0.5671432904097838
    # (scipy.special.lambertw).
    import scipy.special

    named = results_by_name(DECLARED + "w = solve(y*exp(y) == 1, y)\n")
    assert named["w"].si_value == pytest.approx(scipy.special.lambertw(1).real, rel=1e-12)
    assert "solved numerically" in named["w"].record


def test_issue10_integral_from_inf_down(results_by_name) -> None:
    # The integral of e^-y from inf to 0 is -1; of a constant from inf to 0 it diverges.
    named = results_by_name(
        DECLARED + "a = integrate(exp(-y), y, inf, 0)\nb = integrate(cos(2), y, inf, 0)\n"
    )
    assert named["a"].si_value == -1.0
    assert named["b"].status == "error" and "diverges" in named["b"].message


def test_issue10_numeric_fallback_says_when_it_drops_an_uncertainty(results_by_name) -> None:
    named = results_by_name(
        DECLARED + "W = 2 [m] +- 5%\nz = solve(x*exp(x/W) + x == 2 [m], x)\n"
        "a = integrate(exp(-(x/W)^2), x, 0, 1 [m])\nw = solve(y*exp(y) + y == 2, y)\n"
    )
    for name in "za":
        assert "uncertainties are not propagated" in named[name].record
        assert named[name].uncertainty is None
    assert "not propagated" not in named["w"].record


def test_issue10_refused_constant_edited_into_a_declaration(ctx) -> None:
    # The incremental path must notice that the line now owns the name G.
    from worksheet.engine import SheetEvaluator, split_statements

    evaluator = SheetEvaluator(ctx)
    first = evaluator.run(split_statements("M = 1e12 [kg]\nG = 5\nq = G*M\n", 1))
    assert [r.status for r in first] == ["ok", "error", "ok"]
    second = evaluator.run(split_statements("M = 1e12 [kg]\nG : [m^3/(kg*s^2)]\nq = G*M\n", 1))
    assert second[2].status == "ok" and second[2].si_value is None
    assert second[2].record == "q = G*M"
