"""Worked black-hole values, held against formulas evaluated here with scipy.constants.

Expected numbers are computed in this file from scipy.constants (CODATA 2022 in scipy 1.17)
and the IAU 2015 Resolution B3 nominal solar mass parameter, never from the engine. The
engine's CODATA 2022 dataset carries the same G as scipy, so where the sheet formula and the
formula here are the same expression the two agree to rounding: we use a 1e-9 relative
tolerance for those and say so; the looser 1e-4 (G's own 2.2e-5 standard uncertainty) is
used where the comparison goes through an independently published number.
"""

from __future__ import annotations

import json
import math
import os
import subprocess
import sys
from pathlib import Path

import pytest
from scipy import constants as sc

# IAU 2015 Resolution B3 (Prsa et al. 2016, AJ 152, 41): nominal GM_sun in m^3/s^2.
GM_SUN = 1.3271244e20
M_SUN = GM_SUN / sc.G
# Julian year, IAU: 365.25 d of 86400 s.
JULIAN_YEAR = 365.25 * 86400.0
# Same G and the same formula on both sides: agreement is to floating-point rounding.
SAME_FORMULA = 1e-9
REPO = Path(__file__).resolve().parents[2]


def schwarzschild_radius(mass: float) -> float:
    return 2 * sc.G * mass / sc.c**2


def hawking_temperature(mass: float) -> float:
    return sc.hbar * sc.c**3 / (8 * math.pi * sc.G * mass * sc.k)


def entropy_over_k(mass: float) -> float:
    return 4 * math.pi * sc.G * mass**2 / (sc.hbar * sc.c)


def photon_luminosity(mass: float) -> float:
    return sc.hbar * sc.c**6 / (15360 * math.pi * sc.G**2 * mass**2)


def photon_lifetime(mass: float) -> float:
    return 5120 * math.pi * sc.G**2 * mass**3 / (sc.hbar * sc.c**4)


SHEET = """\
M = {mass}
r_s = 2*G*M/c^2
T_H = hbar*c^3/(8*pi*G*M*k_B) in [K]
S_BH = 4*pi*G*M^2/(hbar*c)
P_gamma = hbar*c^6/(15360*pi*G^2*M^2) in [W]
t_ev = 5120*pi*G^2*M^3/(hbar*c^4)
t_ev in [yr]
"""

MASSES = [
    pytest.param("1 [M_sun]", M_SUN, id="one-solar-mass"),
    pytest.param("1e12 [kg]", 1e12, id="1e12-kg"),
]


@pytest.mark.parametrize(("mass_text", "mass"), MASSES)
def test_worked_values_as_a_sheet(run_sheet, mass_text: str, mass: float) -> None:
    results = run_sheet(SHEET.format(mass=mass_text))
    assert [r.status for r in results] == ["ok"] * 7, [r.message for r in results]
    named = {r.name: r for r in results if r.name}
    # Schwarzschild radius in SI metres.
    assert named["r_s"].si_value == pytest.approx(schwarzschild_radius(mass), rel=SAME_FORMULA)
    assert named["r_s"].si_unit == "m"
    # Hawking temperature, recorded in the requested kelvin.
    assert named["T_H"].value == pytest.approx(hawking_temperature(mass), rel=SAME_FORMULA)
    assert named["T_H"].unit == "K"
    # Bekenstein-Hawking entropy S/k_B is a pure number.
    assert named["S_BH"].si_value == pytest.approx(entropy_over_k(mass), rel=SAME_FORMULA)
    assert named["S_BH"].dimension == "dimensionless"
    # Photon-only luminosity in watts.
    assert named["P_gamma"].value == pytest.approx(photon_luminosity(mass), rel=SAME_FORMULA)
    assert named["P_gamma"].unit == "W"
    # Photon-only lifetime in seconds, then displayed in Julian years.
    assert named["t_ev"].si_value == pytest.approx(photon_lifetime(mass), rel=SAME_FORMULA)
    display = results[-1]
    assert display.kind == "display"
    assert display.unit == "yr"
    assert display.value == pytest.approx(photon_lifetime(mass) / JULIAN_YEAR, rel=SAME_FORMULA)


def test_solar_mass_matches_astropy(ctx) -> None:
    from astropy import constants as ac

    from worksheet.engine import calculate

    # astropy.constants.M_sun is GM_sun (IAU 2015 B3) over CODATA G: the same definition.
    result = calculate(ctx, "1 [M_sun]", "kg")
    assert result.status == "ok"
    assert result.value == pytest.approx(ac.M_sun.to_value("kg"), rel=SAME_FORMULA)


# Published scale, independent of our formulas' code: REFERENCE values were computed with
# scipy 1.17 / astropy 8.0; here only the round numbers the literature quotes are pasted.
@pytest.mark.parametrize(
    ("expression", "unit", "expected"),
    [
        # Hawking temperature of one solar mass, about 6.17e-8 K (textbook value, from memory;
        # the exact formula check is above).
        ("hbar*c^3/(8*pi*G*(1 [M_sun])*k_B)", "K", 6.17e-8),
        # k_B T_H of a 1e12 kg hole: about 10.57 MeV (from memory, consistent with the formula).
        ("hbar*c^3/(8*pi*G*(1e12 [kg])*k_B)", "MeV/k_B", 10.57),
    ],
)
def test_round_published_numbers(ctx, expression: str, unit: str, expected: float) -> None:
    from worksheet.engine import calculate

    result = calculate(ctx, expression, unit)
    assert result.status == "ok", result.message
    assert result.value == pytest.approx(expected, rel=1e-3)


@pytest.mark.parametrize(
    ("expression", "unit", "formula"),
    [
        # calc with a unit after 'in', written with brackets and without.
        ("2*G*(1 [M_sun])/c^2", None, lambda: schwarzschild_radius(M_SUN)),
        ("hbar*c^3/(8*pi*G*(1e12 [kg])*k_B)", "K", lambda: hawking_temperature(1e12)),
        ("hbar*c^3/(8*pi*G*(1e12 [kg])*k_B)", "[K]", lambda: hawking_temperature(1e12)),
        ("4*pi*G*(1e12 [kg])^2/(hbar*c)", None, lambda: entropy_over_k(1e12)),
        ("hbar*c^6/(15360*pi*G^2*(1 [M_sun])^2)", "W", lambda: photon_luminosity(M_SUN)),
        ("5120*pi*G^2*(1e12 [kg])^3/(hbar*c^4)", "s", lambda: photon_lifetime(1e12)),
        (
            "5120*pi*G^2*(1 [M_sun])^3/(hbar*c^4)",
            "yr",
            lambda: photon_lifetime(M_SUN) / JULIAN_YEAR,
        ),
    ],
)
def test_worked_values_through_calculate(ctx, expression, unit, formula) -> None:
    from worksheet.engine import calculate

    result = calculate(ctx, expression, unit)
    assert result.status == "ok", result.message
    assert result.value == pytest.approx(formula(), rel=SAME_FORMULA)


def _calc_cli(*args: str) -> subprocess.CompletedProcess[str]:
    env = dict(os.environ)
    env["PYTHONPATH"] = str(REPO) + os.pathsep + env.get("PYTHONPATH", "")
    return subprocess.run(
        [sys.executable, "-m", "worksheet", "calc", *args],
        capture_output=True,
        text=True,
        timeout=60,
        cwd=REPO,
        env=env,
        check=False,
    )


def _documented_notation(value: float, digits: int) -> str:
    """m.mmmeN with no '+' and no leading zeros in the exponent, built here independently."""
    mantissa, exponent = f"{value:.{digits - 1}e}".split("e")
    return f"{mantissa}e{int(exponent)}"


@pytest.mark.slow
def test_cli_calc_hawking_temperature_of_the_sun() -> None:
    done = _calc_cli("hbar*c^3/(8*pi*G*(1 [M_sun])*k_B)", "--in", "K")
    assert done.returncode == 0, done.stderr
    expected = _documented_notation(hawking_temperature(M_SUN), 4)
    assert expected == "6.170e-8"  # the number the brief quotes, as a sanity check here
    assert done.stdout.strip() == f"{expected} K"


@pytest.mark.slow
def test_cli_calc_json_object() -> None:
    done = _calc_cli("hbar*c^3/(8*pi*G*(1 [M_sun])*k_B)", "--in", "[K]", "--json")
    assert done.returncode == 0, done.stderr
    record = json.loads(done.stdout)
    expected_keys = {
        "line",
        "kind",
        "name",
        "text",
        "status",
        "message",
        "value",
        "unit",
        "si_value",
        "si_unit",
        "dimension",
        "symbolic",
    }
    assert expected_keys <= set(record)
    assert record["status"] == "ok"
    assert record["unit"] == "K"
    assert record["si_value"] == pytest.approx(hawking_temperature(M_SUN), rel=SAME_FORMULA)


@pytest.mark.slow
def test_cli_calc_error_exit_code() -> None:
    # A dimension error: exit 1 and a message naming both sides.
    done = _calc_cli("1 [m] + 1 [s]")
    assert done.returncode == 1
    assert "length" in done.stderr and "time" in done.stderr
