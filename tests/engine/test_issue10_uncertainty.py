"""Uncertainties of values written in G-dependent units, and of Planck units (issue 10).

Rule under test: a stated ``+- u`` is the uncertainty of the number as written; the unit
keeps its own correlated share of G (M_sun = GM_sun / G with GM_sun exact, IAU 2015 B3).
Shown in that same unit, G's share cancels; shown in SI, both add in quadrature.
"""

from __future__ import annotations

import math

import astropy.constants as ac
import scipy.constants as sc

# CODATA 2022 relative standard uncertainty of G (scipy.constants ships CODATA 2022).
G_RELATIVE = sc.physical_constants["Newtonian constant of gravitation"][2] / sc.G


def test_issue10_stated_uncertainty_in_solar_masses_is_recorded(results_by_name) -> None:
    named = results_by_name(
        "M = 4.1e6 [M_sun] +- 5%\nM_kg = M in [kg]\nM_again = M in [M_sun]\nGM = G*M\n"
    )
    own = named["M"]
    # 5% of 4.1e6 is 2.05e5 M_sun; G's share cancels in the value's own unit.
    assert math.isclose(own.uncertainty, 0.05 * 4.1e6, rel_tol=1e-12)
    assert own.record == "M = 4.100e6 +- 2.0e5 M_sun"  # 2.05e5, correctly rounded (a tie)
    assert math.isclose(named["M_again"].uncertainty, 0.05 * 4.1e6, rel_tol=1e-12)
    # In kg: 5% and G's 2.2e-5 in quadrature (astropy's M_sun is GM_sun/G too).
    m_kg = 4.1e6 * ac.M_sun.value
    assert math.isclose(named["M_kg"].si_value, m_kg, rel_tol=1e-9)
    assert math.isclose(
        named["M_kg"].uncertainty, m_kg * math.hypot(0.05, G_RELATIVE), rel_tol=1e-9
    )
    # G*M = 4.1e6 GM_sun: only the stated 5%, G cancels exactly.
    gm = named["GM"]
    assert math.isclose(gm.uncertainty, 0.05 * gm.si_value, rel_tol=1e-9)


def test_issue10_absolute_stated_uncertainty_in_earth_and_jupiter_masses(results_by_name) -> None:
    named = results_by_name(
        "m = 5.2 [M_earth] +- 0.4 [M_earth]\nj = 1.3 [M_jup] +- 0.1 [M_jup]\nj_kg = j in [kg]\n"
    )
    assert math.isclose(named["m"].uncertainty, 0.4, rel_tol=1e-12)
    assert "+- 0.40 M_earth" in named["m"].record
    assert math.isclose(named["j"].uncertainty, 0.1, rel_tol=1e-12)
    # astropy's M_jup = GM_jup / G (IAU 2015 B3 nominal value).
    jup = ac.M_jup.value
    assert math.isclose(
        named["j_kg"].uncertainty, jup * math.hypot(0.1, 1.3 * G_RELATIVE), rel_tol=1e-9
    )


def test_issue10_rate_in_solar_masses_per_year(results_by_name) -> None:
    named = results_by_name(
        "R = 1 [M_sun/yr]\nR_si = 1 [M_sun/yr] in [kg/s]\nback = 1 [kg/s] in [M_sun/yr]\n"
    )
    # 1 M_sun/yr shown in M_sun/yr is exactly 1: no uncertainty.
    assert named["R"].uncertainty is None
    assert named["R"].record == "R = 1.000 M_sun/yr"
    # In kg/s it carries G's relative uncertainty (M_sun = GM_sun/G); Julian year 31557600 s.
    rate = ac.M_sun.value / 31557600
    assert math.isclose(named["R_si"].si_value, rate, rel_tol=1e-9)
    assert math.isclose(named["R_si"].uncertainty / rate, G_RELATIVE, rel_tol=1e-9)
    assert math.isclose(named["back"].uncertainty / named["back"].value, G_RELATIVE, rel_tol=1e-9)


def test_issue10_planck_units_depend_on_g(run_sheet) -> None:
    results = run_sheet(
        "m_P in planck\nl_P in planck\nt_P in planck\nT_P in planck\n"
        "sqrt(hbar*c/G) in planck\nm_P\nx = 1 [kg] in planck\n"
    )
    for result in results[:4]:
        assert result.value == 1.0, result.record
        assert result.uncertainty is None, result.record
    assert math.isclose(results[4].value, 1.0, rel_tol=1e-6)  # CODATA's m_P is rounded
    assert results[4].uncertainty is None
    # The Planck mass keeps CODATA's own uncertainty (scipy.constants, CODATA 2022), which
    # is half G's relative one since m_P = sqrt(hbar c / G).
    value, _, u = sc.physical_constants["Planck mass"]
    assert math.isclose(results[5].uncertainty, u, rel_tol=2e-2)
    assert math.isclose(results[5].uncertainty / value, G_RELATIVE / 2, rel_tol=1e-9)
    # 1 kg in Planck masses: u is half of G's relative uncertainty.
    assert math.isclose(results[6].uncertainty / results[6].value, G_RELATIVE / 2, rel_tol=1e-9)
