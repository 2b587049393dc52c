"""`estimate` as a sheet statement: textbook results up to their dimensionless factor."""

from __future__ import annotations

import math

import pytest
import scipy.constants as sc

PC = sc.physical_constants


def test_hawking_temperature_up_to_one_over_four_pi(results_by_name) -> None:
    # T_H = hbar c / (4 pi k_B r_s) (Hawking 1975): the estimate gives hbar c/(k_B r_s).
    named = results_by_name(
        "M = 1e12 [kg]\nr_s = 2*G*M/c^2\nestimate T_x [K] from hbar, c, k_B, r_s\n"
    )
    result = named["T_x"]
    assert result.kind == "estimate" and result.symbolic == "hbar*c/(k_B*r_s)"
    r_s = 2 * sc.G * 1e12 / sc.c**2
    exact = sc.hbar * sc.c / (4 * sc.pi * sc.k * r_s)
    assert math.isclose(result.si_value / (4 * sc.pi), exact, rel_tol=1e-12)
    assert "up to a dimensionless factor" in result.record


@pytest.mark.parametrize(
    ("unit", "inputs", "codata"),
    [
        # CODATA defines the Planck units by exactly these monomials (factor 1).
        ("kg", "hbar, c, G", "Planck mass"),
        ("m", "hbar, c, G", "Planck length"),
        ("s", "hbar, c, G", "Planck time"),
        ("K", "hbar, c, G, k_B", "Planck temperature"),
    ],
)
def test_planck_units(results_by_name, unit: str, inputs: str, codata: str) -> None:
    named = results_by_name(f"estimate X [{unit}] from {inputs}\n")
    assert math.isclose(named["X"].si_value, PC[codata][0], rel_tol=1e-5)  # CODATA rounding


def test_casimir_pressure(results_by_name) -> None:
    # P = pi^2 hbar c / (240 d^4) (Casimir 1948); the estimate is hbar c / d^4.
    named = results_by_name("d = 1 [um]\nestimate P_c [Pa] from hbar, c, d\n")
    exact = sc.pi**2 * sc.hbar * sc.c / (240 * 1e-6**4)
    assert named["P_c"].symbolic == "hbar*c/d^4"
    assert math.isclose(named["P_c"].si_value * sc.pi**2 / 240, exact, rel_tol=1e-12)


def test_eddington_inputs_leave_a_mass_ratio_free(results_by_name) -> None:
    # L_Edd = 4 pi G M m_p c / sigma_T: with two masses as inputs, M/m_p is a free group.
    named = results_by_name("M = 10 [M_sun]\nestimate L_x [W] from G, M, m_p, c, sigma_T\n")
    assert "not unique" in named["L_x"].record and "M/m_p" in named["L_x"].record
    assert named["L_x"].si_value is None


def test_hawking_inputs_leave_the_entropy_group_free(results_by_name) -> None:
    named = results_by_name("M = 1e12 [kg]\nestimate T_y [K] from hbar, c, G, M, k_B\n")
    assert "G*M^2/(hbar*c)" in named["T_y"].record


def test_unreachable_dimension_is_reported(results_by_name) -> None:
    named = results_by_name("estimate T_z [K] from hbar, c, G\n")
    assert named["T_z"].status == "error"
    assert "temperature" in named["T_z"].message
