"""Records and error messages that misled a reader (issue 10)."""

from __future__ import annotations

import math

import scipy.constants as sc


def test_issue10_failing_claim_is_reported_in_the_claims_unit(run_sheet) -> None:
    results = run_sheet(
        "M = 1e12 [kg]\nr = 2*G*M/c^2\ncheck r > 3 [km]\ncheck 3 [km] < r\n"
        "T = 300 [K]\ncheck T < 20 [degC]\ncheck r*2 > r*3\n"
    )
    # r_s of 1e12 kg is 1.48523e-15 m (REFERENCE.md; 2 G M / c^2 with scipy's CODATA 2022).
    r_km = 2 * sc.G * 1e12 / sc.c**2 / 1e3
    assert results[2].record == f"check r > 3 [km]: fails (left {r_km:.5e} km, right 3.00000 km)"
    assert results[3].record == f"check 3 [km] < r: fails (left 3.00000 km, right {r_km:.5e} km)"
    # 300 K is 26.85 degC (0 degC = 273.15 K, SI Brochure).
    assert "left 26.8500 degC, right 20.0000 degC" in results[5].record
    # No unit written: SI, as before.
    assert results[6].record.endswith("m, right 4.45570e-15 m)")


def test_issue10_temperature_against_energy_hints_k_b(run_sheet) -> None:
    results = run_sheet(
        "T = 300 [K]\nE = 2 [eV]\ncheck T < E\ncheck E > T\nx = T + E\n"
        "check T < natural(E, [K])\ncheck k_B*T < E\n"
    )
    for result in results[2:5]:
        assert result.status == "error"
        assert "natural(E, [K])" in result.message
        assert "k_B*T" in result.message
    # The hinted forms work: 2 eV / k_B = 23209 K (1 eV/k_B = 11604.518 K, CODATA exact).
    assert results[5].status == "ok" and results[6].status == "ok"
    assert math.isclose(2 * sc.eV / sc.k, 23209.036, rel_tol=1e-7)


def test_issue10_other_dimension_errors_get_no_k_b_hint(run_sheet) -> None:
    (result,) = run_sheet("check 1 [m] < 1 [s]\n")
    assert "k_B" not in result.message
