"""Precision-guard notes that were wrong or missing (issue 10)."""

from __future__ import annotations

import math

import mpmath


def test_issue10_guard_rescues_a_division_by_a_cancelled_zero(results_by_name) -> None:
    named = results_by_name("x = 1/(1 - cos(1e-9))\ny = x/2\n")
    x = named["x"]
    # mpmath at 60 digits, independent of the engine's own 50-digit walk.
    with mpmath.workdps(60):
        exact = float(1 / (1 - mpmath.cos(mpmath.mpf(1) / 10**9)))
    assert x.status == "ok", x.record
    assert math.isclose(x.si_value, exact, rel_tol=1e-12)
    assert "precision loss: cancellation" in x.record
    assert x.record.startswith("x = 2.000e18 ")
    assert math.isclose(named["y"].si_value, exact / 2, rel_tol=1e-12)


def test_issue10_plain_division_by_zero_still_errs(run_sheet) -> None:
    (result,) = run_sheet("1/(1 - 1)\n")
    assert result.status == "error"
    assert "division by zero" in result.message


def test_issue10_log_of_a_subnormal_is_no_overflow(results_by_name) -> None:
    named = results_by_name("y = log(1e-310)\nz = log10(1e-320)\nw = log(3e400)\n")
    # math.log of the exact decimal values (Python's math.log accepts big integers).
    assert math.isclose(named["y"].si_value, -310 * math.log(10), rel_tol=1e-15)
    assert named["y"].record == "y = -713.8"
    assert named["y"].precision is None
    assert math.isclose(named["z"].si_value, -320.0, rel_tol=1e-15)
    assert named["z"].precision is None
    assert math.isclose(named["w"].si_value, math.log(3) + 400 * math.log(10), rel_tol=1e-15)
    assert "precision loss" not in named["w"].record


def test_issue10_guard_does_not_rescue_a_complex_value(run_sheet) -> None:
    # The cube root of a negative sum is not a real number in double or at 50 digits: the
    # guard must leave the error standing (it once recorded an mpmath complex and crashed).
    results = run_sheet("y = (1 - 2)^(1/3)\nz = 1/(1 - cos(1e-9)) + (1 - 2)^(1/3)\n")
    assert [r.status for r in results] == ["error", "error"]
    assert all("not a real number" in r.message for r in results)


def test_issue10_rescued_value_says_its_uncertainty_is_dropped(results_by_name) -> None:
    named = results_by_name("a = 1e-9 +- 1%\nx = 1/(1 - cos(a))\n")
    assert named["x"].status == "ok"
    assert "uncertainties are not propagated" in named["x"].record
