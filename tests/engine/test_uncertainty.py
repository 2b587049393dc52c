"""First-order uncertainty propagation, against independent methods (issue 4)."""

from __future__ import annotations

import math

import numpy as np
import pytest
import scipy.constants as sc
import uncertainties
from uncertainties import umath

G_RELATIVE = sc.physical_constants["Newtonian constant of gravitation"][2] / sc.G


def test_linear_case_matches_the_uncertainties_library(results_by_name) -> None:
    # A linear combination of two stated uncertainties: the `uncertainties` package
    # (linear error propagation, independent inputs) must agree.
    named = results_by_name("a = 3.0 [m] +- 0.2 [m]\nb = 5.0 [m] +- 0.1 [m]\ns = 2*a - b/4\n")
    expected = 2 * uncertainties.ufloat(3.0, 0.2) - uncertainties.ufloat(5.0, 0.1) / 4
    assert math.isclose(named["s"].si_value, expected.nominal_value, rel_tol=1e-12)
    assert math.isclose(named["s"].uncertainty, expected.std_dev, rel_tol=1e-12)
    assert named["s"].record == "s = 4.750 +- 0.40 m"


def test_nonlinear_case_matches_monte_carlo(results_by_name) -> None:
    # A mildly non-linear function of two inputs with small relative uncertainties: first
    # order agrees with a numpy Monte Carlo (fixed seed, 400k draws) to a few percent.
    named = results_by_name("x = 2.0 +- 1%\ny = 0.5 +- 2%\nf = x^2*sin(y) + exp(x)/y\n")
    rng = np.random.default_rng(20261202)
    xs = rng.normal(2.0, 0.02, 400_000)
    ys = rng.normal(0.5, 0.01, 400_000)
    samples = xs**2 * np.sin(ys) + np.exp(xs) / ys
    assert math.isclose(named["f"].si_value, 2.0**2 * math.sin(0.5) + math.exp(2.0) / 0.5)
    assert named["f"].uncertainty == pytest.approx(float(np.std(samples)), rel=0.03)
    # And exactly the first-order formula from the `uncertainties` package.
    ux, uy = uncertainties.ufloat(2.0, 0.02), uncertainties.ufloat(0.5, 0.01)
    linear = ux**2 * umath.sin(uy) + umath.exp(ux) / uy
    assert math.isclose(named["f"].uncertainty, linear.std_dev, rel_tol=1e-9)


def test_constants_carry_their_dataset_uncertainty(results_by_name) -> None:
    # S/k_B = 4 pi G M^2/(hbar c) for 1e12 kg: only G is inexact (CODATA 2022: hbar and c are
    # exact), so the relative uncertainty is G's, 2.2e-5 (scipy.constants' CODATA table).
    named = results_by_name("M = 1e12 [kg]\nS = 4*pi*G*M^2/(hbar*c)\n")
    entropy = 4 * sc.pi * sc.G * 1e12**2 / (sc.hbar * sc.c)
    assert math.isclose(named["S"].si_value, entropy, rel_tol=1e-12)
    assert math.isclose(named["S"].uncertainty / entropy, G_RELATIVE, rel_tol=1e-9)


def test_solar_mass_shares_g_uncertainty(results_by_name) -> None:
    # M_sun = GM_sun / G with GM_sun exact (IAU 2015 B3): T_H(M_sun) ~ 1/(G M_sun) has no
    # uncertainty at all, while S(M_sun) ~ G M_sun^2 = GM_sun^2 / G keeps G's.
    named = results_by_name(
        "T_sun = hbar*c^3/(8*pi*G*(1 [M_sun])*k_B)\n"
        "S_sun = 4*pi*G*M_sun^2/(hbar*c)\n"
        "M_9 = 9 [M_sun]\n"
    )
    assert named["T_sun"].uncertainty is None
    assert math.isclose(
        named["S_sun"].uncertainty / named["S_sun"].si_value, G_RELATIVE, rel_tol=1e-9
    )
    # A mass written in solar masses is exact in that unit.
    assert named["M_9"].record == "M_9 = 9.000 M_sun"


def test_poor_first_order_is_said(results_by_name) -> None:
    # 40% relative uncertainty (M^2 with 20%): first order is poor, and the record says so.
    named = results_by_name("M = 5e11 [kg] +- 20%\nS = 4*pi*G*M^2/(hbar*c)\n")
    assert "first-order uncertainty is poor" in named["S"].record
