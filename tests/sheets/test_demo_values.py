"""The demo sheets' key numbers against independent libraries (scipy, astropy)."""

from __future__ import annotations

import math
from pathlib import Path

import pytest
import scipy.constants as sc
from astropy import constants as ac

from worksheet.document import read_document
from worksheet.runner import SheetRunner

ROOT = Path(__file__).resolve().parents[2]

# IAU 2015 Resolution B3 (Prsa et al. 2016, AJ 152, 41): GM_sun nominal; M_sun = GM_sun / G.
M_SUN = 1.3271244e20 / sc.G


@pytest.fixture(scope="module")
def results():
    runner = SheetRunner()
    found = {}
    try:
        for name in ("burst-budget", "mass-ladder", "eddington-source"):
            run = runner.run(read_document(ROOT / "sheets" / f"{name}.sheet.md"))
            assert run.all_hold, [r.record for r in run.results if r.status != "ok"]
            found[name] = {(r.name or r.text): r for r in run.results}
    finally:
        runner.close()
    return found


def close(actual: float, expected: float, rel: float = 1e-9) -> bool:
    return math.isclose(actual, expected, rel_tol=rel, abs_tol=0.0)


def test_mass_ladder_hawking_values(results) -> None:
    ladder = results["mass-ladder"]
    # Hawking temperature T = hbar c^3 / (8 pi G M k_B) (Hawking 1975), scipy CODATA 2022.
    t_pbh = sc.hbar * sc.c**3 / (8 * math.pi * sc.G * 1e12 * sc.k)
    assert close(ladder["T(M_pbh) in [K]"].si_value, t_pbh)
    assert close(t_pbh, 1.22690e11, 1e-5)  # REFERENCE.md worked value for 1e12 kg
    t_sun = sc.hbar * sc.c**3 / (8 * math.pi * sc.G * M_SUN * sc.k)
    assert close(ladder["T(1 [M_sun]) in [K]"].si_value, t_sun)
    # Bekenstein-Hawking entropy S/k_B = 4 pi G M^2 / (hbar c).
    assert close(ladder["S(1 [M_sun])"].si_value, 4 * math.pi * sc.G * M_SUN**2 / (sc.hbar * sc.c))
    # Photon-only lifetime 5120 pi G^2 M^3 / (hbar c^4), in Julian years (IAU: 365.25 d).
    life = 5120 * math.pi * sc.G**2 * 1e12**3 / (sc.hbar * sc.c**4)
    assert close(ladder["t_life(M_pbh) in [yr]"].value, life / (365.25 * 86400))
    # Schwarzschild radius of the Sun against astropy's IAU 2015 solar mass.
    r_sun = 2 * ac.G.value * ac.M_sun.value / ac.c.value**2
    assert close(ladder["r(1 [M_sun]) in [km]"].value, r_sun / 1e3, 1e-9)
    # k_B T for 1e12 kg in MeV (REFERENCE.md: 10.5726 MeV).
    assert close(ladder["T(M_pbh)*k_B in [MeV]"].value, t_pbh * sc.k / sc.e / 1e6)


def test_mass_ending_now(results) -> None:
    age = 13.79e9 * 365.25 * 86400
    expected = (age * sc.hbar * sc.c**4 / (5120 * math.pi * sc.G**2)) ** (1 / 3)
    assert close(results["mass-ladder"]["M_now"].si_value, expected, 1e-12)


def test_burst_budget_chain(results) -> None:
    burst = results["burst-budget"]
    mass = (1.0 * sc.hbar * sc.c**4 / (5120 * math.pi * sc.G**2)) ** (1 / 3)
    assert close(burst["M_burst"].si_value, mass, 1e-12)
    temperature = sc.hbar * sc.c**3 / (8 * math.pi * sc.G * mass * sc.k)
    assert close(burst["T_burst"].si_value, temperature, 1e-12)
    photons = mass * sc.c**2 / (2.701 * sc.k * temperature)
    distance = math.sqrt(photons * 4e4 / (4 * math.pi * 30))
    # Parsec = 648000/pi au exactly (IAU 2015 Resolution B2), au = 149597870700 m (IAU 2012 B2).
    parsec = 648000 / math.pi * 149597870700
    assert close(burst["d_max"].value, distance / parsec, 1e-12)


def test_eddington_luminosity(results) -> None:
    edd = results["eddington-source"]
    # L_Edd = 4 pi G M m_p c / sigma_T (Rybicki & Lightman, Radiative Processes, eq. 1.4x).
    lum = (
        4
        * math.pi
        * sc.G
        * 9
        * M_SUN
        * sc.m_p
        * sc.c
        / sc.physical_constants["Thomson cross section"][0]
    )
    assert close(edd["L_Edd"].si_value, lum, 1e-12)
    assert close(edd["L_Edd"].value, lum / 1e-7, 1e-12)  # 1 erg = 1e-7 J
    rate = lum / (0.1 * sc.c**2) / M_SUN * (365.25 * 86400)
    assert close(edd["Mdot_Edd"].value, rate, 1e-12)
