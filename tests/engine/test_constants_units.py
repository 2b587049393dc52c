"""Constants and units through the engine, against scipy.constants and the IAU definitions."""

from __future__ import annotations

import json
import math
import os
import subprocess
import sys
from collections.abc import Iterator
from pathlib import Path

import pytest
from scipy import constants as sc

from worksheet.engine import Context, calculate, make_context

REPO = Path(__file__).resolve().parents[2]
AU = 149597870700.0  # IAU 2012 Resolution B2, exact
JULIAN_YEAR = 31557600.0  # 365.25 d x 86400 s (IAU)


@pytest.fixture(scope="module")
def ctx2018() -> Iterator[Context]:
    context = make_context("CODATA2018", digits=4, seconds=5.0)
    yield context
    context.worker.close()


@pytest.mark.parametrize(
    ("name", "expected"),
    [
        # Each SI value straight from scipy.constants (CODATA 2022 in scipy 1.17).
        ("G", sc.G),
        ("c", sc.c),
        ("h", sc.h),
        ("hbar", sc.hbar),
        ("k_B", sc.k),
        ("q_e", sc.e),
        ("N_A", sc.N_A),
        ("m_e", sc.m_e),
        ("m_p", sc.m_p),
        ("sigma_SB", sc.sigma),
        ("eps_0", sc.epsilon_0),
        ("mu_0", sc.mu_0),
        ("alpha_fs", sc.alpha),
        ("sigma_T", sc.physical_constants["Thomson cross section"][0]),
        ("m_u", sc.physical_constants["atomic mass constant"][0]),
    ],
)
def test_constants_match_scipy(ctx, name: str, expected: float) -> None:
    result = calculate(ctx, name)
    assert result.status == "ok", result.message
    assert result.si_value == pytest.approx(expected, rel=1e-15)


def test_newton_constant_is_exactly_scipys(ctx) -> None:
    assert calculate(ctx, "G").si_value == sc.G


def test_radiation_constant(ctx) -> None:
    # a = 4 sigma / c (Stefan-Boltzmann relation).
    assert calculate(ctx, "a_rad").si_value == pytest.approx(4 * sc.sigma / sc.c, rel=1e-14)


@pytest.mark.parametrize(
    ("name", "expected"),
    [
        # CODATA 2018 values, pasted from NIST (web version 8.1) as listed in REFERENCE.md.
        ("m_e", 9.1093837015e-31),
        ("m_p", 1.67262192369e-27),
        ("alpha_fs", 7.2973525693e-3),
        ("eps_0", 8.8541878128e-12),
        ("mu_0", 1.25663706212e-6),
        ("G", 6.67430e-11),
    ],
)
def test_codata2018_dataset(ctx2018, name: str, expected: float) -> None:
    assert calculate(ctx2018, name).si_value == pytest.approx(expected, rel=1e-12)


def test_codata2018_from_astropy(ctx2018) -> None:
    from astropy.constants import codata2018

    assert calculate(ctx2018, "m_e").si_value == pytest.approx(codata2018.m_e.value, rel=1e-12)


def _cli(*args: str) -> subprocess.CompletedProcess[str]:
    env = dict(os.environ)
    env["PYTHONPATH"] = str(REPO) + os.pathsep + env.get("PYTHONPATH", "")
    return subprocess.run(
        [sys.executable, "-m", "worksheet", *args],
        capture_output=True,
        text=True,
        timeout=60,
        cwd=REPO,
        env=env,
        check=False,
    )


@pytest.mark.slow
def test_cli_constants_2018_electron_mass() -> None:
    done = _cli("calc", "m_e", "--constants", "CODATA2018", "--json")
    assert done.returncode == 0, done.stderr
    # CODATA 2018 (NIST web version 8.1): m_e = 9.1093837015e-31 kg.
    assert json.loads(done.stdout)["si_value"] == pytest.approx(9.1093837015e-31, rel=1e-12)


@pytest.mark.slow
def test_cli_constants_listing_json() -> None:
    done = _cli("constants", "G", "--json")
    assert done.returncode == 0, done.stderr
    records = {r["symbol"]: r for r in json.loads(done.stdout)}
    g = records["G"]
    assert g["si_value"] == sc.G
    assert g["name"] == "Newtonian constant of gravitation"  # CODATA's own wording
    # CODATA 2022: standard uncertainty 0.00015e-11.
    assert g["uncertainty"] == pytest.approx(
        sc.physical_constants["Newtonian constant of gravitation"][2], rel=1e-9
    )
    assert g["exact"] is False
    assert {"symbol", "name", "value", "uncertainty", "unit", "si_value", "exact", "source"} <= set(
        g
    )


UNIT_CASES = [
    # 1 erg = 1e-7 J (CGS definition).
    ("1 [erg]", 1e-7, 1e-15),
    # Parsec = (648000/pi) au exactly (IAU 2015 Resolution B2); pint's own parsec is
    # au/tan(1 arcsec), 7.8e-12 off, so a tight tolerance tells them apart.
    ("1 [pc]", 648000 / math.pi * AU, 1e-14),
    # Light-year = c x Julian year (IAU).
    ("1 [ly]", sc.c * JULIAN_YEAR, 1e-15),
    # Jansky = 1e-26 W m^-2 Hz^-1 (IAU 1973).
    ("1 [Jy]", 1e-26, 1e-15),
    # Julian year = 31557600 s.
    ("1 [yr]", JULIAN_YEAR, 1e-15),
    # km/s
    ("1 [km/s]", 1000.0, 1e-15),
    # Astronomical unit, IAU 2012 B2.
    ("1 [au]", AU, 1e-15),
    # IAU 2015 B3 nominal solar radius and luminosity; solar mass GM_sun/G.
    ("1 [R_sun]", 6.957e8, 1e-15),
    ("1 [L_sun]", 3.828e26, 1e-15),
    ("1 [M_sun]", 1.3271244e20 / sc.G, 1e-14),
    # Units bind tighter than operators: 1 [m] / 2 [s] is 0.5 m/s.
    ("1 [m] / 2 [s]", 0.5, 1e-15),
    # A temperature written as an energy over k_B: 1 eV/k_B = e/k kelvin.
    ("1 [eV/k_B]", sc.e / sc.k, 1e-13),
    # Unit powers inside brackets.
    ("3 [m^2]", 3.0, 1e-15),
]


@pytest.mark.parametrize(("expression", "si", "rel"), UNIT_CASES)
def test_units(ctx, expression: str, si: float, rel: float) -> None:
    result = calculate(ctx, expression)
    assert result.status == "ok", result.message
    assert result.si_value == pytest.approx(si, rel=rel)


@pytest.mark.parametrize(
    ("expression", "unit", "expected"),
    [
        # --in with and without brackets.
        ("1 [pc]", "au", 648000 / math.pi),
        ("1 [pc]", "[au]", 648000 / math.pi),
        ("1 [ly]", "m", sc.c * JULIAN_YEAR),
        ("30 [km/s]", "[m/s]", 30000.0),
        ("1 [erg/s]", "W", 1e-7),
        ("1 [yr]", "s", JULIAN_YEAR),
        ("1 [J]", "erg", 1e7),
    ],
)
def test_conversions(ctx, expression: str, unit: str, expected: float) -> None:
    result = calculate(ctx, expression, unit)
    assert result.status == "ok", result.message
    assert result.value == pytest.approx(expected, rel=1e-14)
    assert result.unit == unit.strip("[]")


@pytest.mark.parametrize("text", ["1 [gauss]", "1 [G]", "2 [gauss]", "1 [T]"])
def test_gauss_is_refused_with_a_message(ctx, text: str) -> None:
    # A tesla is fine; pint's Gaussian-system gauss (and its symbol G) has no exact SI
    # conversion and must be refused with a message, never converted silently.
    result = calculate(ctx, text)
    if text == "1 [T]":
        assert result.status == "ok"
        return
    assert result.status == "error"
    assert "gauss" in result.message.lower() or "Gaussian" in result.message
    assert result.message.startswith("line 1, col ")


@pytest.mark.parametrize("text", ["1 [nonsense_unit]", "1 [m", "1 []", "1 [m**]"])
def test_bad_units_are_errors(ctx, text: str) -> None:
    result = calculate(ctx, text)
    assert result.status == "error"
    assert result.message.startswith("line 1")
