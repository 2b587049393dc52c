"""Natural-unit and Planck-unit views against CODATA relationship factors (scipy)."""

from __future__ import annotations

import math

import scipy.constants as sc

PC = sc.physical_constants


def test_natural_back_to_si_matches_codata_relationships(ctx) -> None:
    from worksheet.engine import calculate

    # CODATA "electron volt-kelvin relationship": 1 eV / k_B in K.
    kelvin = calculate(ctx, "natural(1 [eV], [K])")
    assert math.isclose(kelvin.si_value, PC["electron volt-kelvin relationship"][0], rel_tol=1e-12)
    # CODATA "electron volt-kilogram relationship": 1 eV / c^2 in kg.
    kilogram = calculate(ctx, "natural(1 [eV], [kg])")
    assert math.isclose(
        kilogram.si_value, PC["electron volt-kilogram relationship"][0], rel_tol=1e-12
    )
    # 1/eV as a length is hbar c / eV; CODATA's "electron volt-inverse meter relationship"
    # is eV/(h c), so the length is 1/(2 pi) of its inverse.
    metre = calculate(ctx, "natural(1/(1 [eV]), [m])")
    expected = 1 / (2 * math.pi * PC["electron volt-inverse meter relationship"][0])
    assert math.isclose(metre.si_value, expected, rel_tol=1e-12)


def test_in_natural_gev(results_by_name) -> None:
    named = results_by_name(
        "M = 1e12 [kg]\n"
        "T_H = hbar*c^3/(8*pi*G*M*k_B) in natural [MeV]\n"
        "r_s = 2*G*M/c^2 in natural [GeV]\n"
    )
    t_h = sc.hbar * sc.c**3 / (8 * sc.pi * sc.G * 1e12 * sc.k)
    # k_B T in MeV (REFERENCE.md: 10.5726 MeV for 1e12 kg).
    assert math.isclose(named["T_H"].value, t_h * sc.k / (sc.e * 1e6), rel_tol=1e-12)
    assert named["T_H"].unit == "MeV" and "times k_B" in named["T_H"].record
    r_s = 2 * sc.G * 1e12 / sc.c**2
    assert math.isclose(named["r_s"].value, r_s * sc.e * 1e9 / (sc.hbar * sc.c), rel_tol=1e-12)
    assert named["r_s"].unit == "1/GeV" and "1/(c*hbar)" in named["r_s"].record


def test_planck_view(results_by_name) -> None:
    # r_s / l_P = 2 M / m_P exactly for r_s = 2 G M / c^2 (with CODATA's rounded l_P, m_P).
    named = results_by_name("M = 1 [M_sun]\nr_s = 2*G*M/c^2 in planck\nM in planck\n")
    m_sun = 1.3271244e20 / sc.G  # IAU 2015 B3
    r_s = 2 * sc.G * m_sun / sc.c**2
    assert math.isclose(named["r_s"].value, r_s / PC["Planck length"][0], rel_tol=1e-12)
    assert "in units of l_P" in named["r_s"].record
    # The ratio goes as G^(-1/2): half of G's relative uncertainty.
    g_relative = PC["Newtonian constant of gravitation"][2] / sc.G
    assert math.isclose(named["r_s"].uncertainty / named["r_s"].value, g_relative / 2, rel_tol=1e-6)


def test_views_refuse_current(results_by_name) -> None:
    named = results_by_name("i = 3 [A] in natural [GeV]\nj = natural(1 [GeV], [A])\n")
    assert named["i"].status == "error" and "current" in named["i"].message
    assert named["j"].status == "error"
