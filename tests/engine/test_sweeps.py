"""scaling and table statements (issue 4), and dimension errors inside verbs."""

from __future__ import annotations

import math

import numpy as np
import scipy.constants as sc

HAWKING = "M = 5e11 [kg]\nT_H = hbar*c^3/(8*pi*G*M*k_B) in [K]\nt_ev = 5120*pi*G^2*M^3/(hbar*c^4)\n"


def _lifetime(mass: float) -> float:
    # Photon-only lifetime 5120 pi G^2 M^3 / (hbar c^4) (REFERENCE.md), scipy's CODATA 2022.
    return 5120 * math.pi * sc.G**2 * mass**3 / (sc.hbar * sc.c**4)


def _temperature(mass: float) -> float:
    return sc.hbar * sc.c**3 / (8 * math.pi * sc.G * mass * sc.k)


def test_scaling_of_a_power_law_has_exact_exponents(run_sheet) -> None:
    results = run_sheet(
        HAWKING + "scaling t_ev in [yr] around M = 1e12 [kg]\n"
        "scaling T_H in [K] around M = 1 [M_sun]\n"
    )
    years = _lifetime(1e12) / (365.25 * 86400)  # Julian year (IAU)
    mantissa, exponent = f"{years:.3e}".split("e")
    assert results[3].record == f"t_ev = {mantissa}e{int(exponent)} yr * (M / 1e12 kg)^3"
    # The sheet's own M is untouched.
    assert results[0].record == "M = 5.000e11 kg"
    assert results[4].record.endswith(" K * (M / 1 M_sun)^-1")


def test_scaling_that_is_not_a_power_law_says_so(run_sheet) -> None:
    results = run_sheet(
        "x = 2 [m]\ny = exp(x/(1 [m]))*3 [kg]\nscaling y in [kg] around x = 1 [m]\n"
    )
    # d ln y / d ln x = x / (1 m) = 1 at the fiducial point.
    assert results[2].record == (
        f"y = {3 * math.e:.4g} kg * (x / 1 m)^1.00 (local logarithmic slopes at the fiducial "
        "point: not a power law in x)"
    )


def test_table_log_sweep_matches_scipy(run_sheet) -> None:
    results = run_sheet(
        HAWKING + "table M = 1e9 [kg] .. 1e15 [kg] log 7: T_H in [K], t_ev in [yr]\n"
    )
    lines = results[3].record.split("\n")
    assert lines[0].endswith("log 7: T_H in [K], t_ev in [yr]:")
    assert lines[1].split() == ["M", "[kg]", "T_H", "[K]", "t_ev", "[yr]"]
    rows = [line.split() for line in lines[2:]]
    assert len(rows) == 7
    for row, mass in zip(rows, np.geomspace(1e9, 1e15, 7), strict=True):
        assert math.isclose(float(row[0]), mass, rel_tol=5e-4)
        assert math.isclose(float(row[1]), _temperature(mass), rel_tol=5e-4)
        assert math.isclose(float(row[2]), _lifetime(mass) / (365.25 * 86400), rel_tol=5e-4)


def test_table_list_and_dimension_checks(run_sheet) -> None:
    results = run_sheet(
        HAWKING + "table M = 1 [M_sun], 10 [M_sun]: T_H\n"
        "table M = 1 [s], 2 [s]: T_H\n"
        "table M = 1 [kg], 2 [kg]: T_H in [m]\n"
    )
    assert results[3].record.split("\n")[1].split() == ["M", "[M_sun]", "T_H", "[K]"]
    assert results[4].status == "error" and "mass" in results[4].message
    assert results[4].message.count("time") >= 1
    assert results[5].status == "error" and "cannot express T_H" in results[5].message


def test_table_is_deterministic(run_sheet) -> None:
    text = HAWKING + "table M = 1e9 [kg] .. 1e12 [kg] lin 5: t_ev\n"
    assert run_sheet(text)[3].record == run_sheet(text)[3].record


def test_dimension_errors_inside_verbs_name_both_sides(run_sheet) -> None:
    results = run_sheet(
        "L : [m]\nt : [s]\nm0 = 2 [kg]\n"
        "a = integrate(L, t) + m0\n"  # a length integrated over time is m*s, not kg
        "b = solve(L == t, L)\n"  # a length cannot equal a time
    )
    assert results[3].status == "error"
    assert "cannot add dimension m*s" in results[3].message and "mass" in results[3].message
    assert results[4].status == "error"
    assert "length (L, m)" in results[4].message and "time (t, s)" in results[4].message


def test_issue12_a_table_follows_a_changed_given_of_its_folded_coefficient(run_sheet) -> None:
    # The folded coefficient's number is kept per set of values it reads: a second sheet
    # with another value of a name in it (a) must not be given the first one's number.
    def body(a: str) -> str:
        return f"a = {a} [m]\nx = 1 [s]\ny = a*x^2\ntable x = 1 [s] .. 3 [s] lin 3: y in [m*s^2]\n"

    def column(a: str) -> list[float]:
        rows = run_sheet(body(a))[3].record.split("\n")[2:]
        return [float(row.split()[1]) for row in rows]

    assert column("2") == [2.0, 8.0, 18.0]
    assert column("5") == [5.0, 20.0, 45.0]  # y = a*x^2 with a = 5 m
    assert column("2") == [2.0, 8.0, 18.0]


def test_issue12_the_folded_coefficient_keeps_plus_and_minus_zero_apart() -> None:
    # 0.0 and -0.0 are equal keys but scale a sweep to +0 and -0: never shared.
    import sympy

    from worksheet.engine.numeric import evaluate_on_array

    a, x = sympy.symbols("a x")
    inputs = np.array([1.0, 2.0])
    plus = evaluate_on_array(a * x, x, inputs, {a: 0.0})
    minus = evaluate_on_array(a * x, x, inputs, {a: -0.0})
    assert [math.copysign(1.0, v) for v in plus] == [1.0, 1.0]
    assert [math.copysign(1.0, v) for v in minus] == [-1.0, -1.0]
