"""Issue 14: the shipped library of standard relations, each against an independent reference.

The sheet below is pinned to CODATA 2022, the dataset scipy.constants (1.17) and
astropy.constants.codata2022 ship, so formula checks agree to rounding (1e-9); quantities
with G carry its 2.2e-5 uncertainty but use the same central value in both.
"""

from __future__ import annotations

import math

import astropy.units as u
import pytest
import scipy.constants as sc
from astropy.cosmology import FlatLambdaCDM
from astropy.modeling.models import BlackBody
from scipy import integrate, optimize, special

from worksheet.library import library_names, library_sheet
from worksheet.runner import run_text

EXPRESSIONS = {
    "r_s": "r_s(1e12 [kg])",
    "A_H": "A_H(1e12 [kg])",
    "kappa_H": "kappa_H(1e12 [kg])",
    "T_H": "T_H(1e12 [kg])",
    "S_BH": "S_BH(1e12 [kg])/k_B",
    "L_photon": "L_photon(1e12 [kg])",
    "t_photon": "t_photon(1e12 [kg])",
    "T_H_sun": "T_H(1 [M_sun])",
    "B_nu": "B_nu(3e14 [Hz], 5772 [K])",
    "B_lambda": "B_lambda(500 [nm], 5772 [K])",
    "nu_peak": "nu_peak(5772 [K])",
    "lambda_peak": "lambda_peak(5772 [K])",
    "E_mean": "E_mean(300 [K])",
    "n_gamma": "n_gamma(2.7255 [K])",
    "u_rad": "u_rad(1000 [K])",
    "F_bb": "F_bb(1000 [K])",
    "L_Edd": "L_Edd(10 [M_sun])",
    "Mdot_Edd": "Mdot_Edd(10 [M_sun], 0.1)",
    "t_Edd": "t_Edd",
    "t_Salpeter": "t_Salpeter(0.1)",
    "t_Hubble": "t_Hubble(67.4 [km/s/Mpc])",
    "d_Hubble": "d_Hubble(67.4 [km/s/Mpc])",
    "rho_crit": "rho_crit(67.4 [km/s/Mpc])",
    "omega_p": "omega_p(1e18 [1/m^3])",
    "f_p": "f_p(1 [1/cm^3])",
    "lambda_D": "lambda_D(1 [eV]/k_B, 1 [1/cm^3])",
    "omega_ce": "omega_ce(1 [T])",
    "sigma_Thomson": "sigma_Thomson",
    "lambda_Compton": "lambda_Compton(m_p)",
    "lambda_C_e": "lambda_C_e",
}
SUBJECTS = ("blackhole", "blackbody", "accretion", "cosmology", "plasma")


@pytest.fixture(scope="module")
def si() -> dict[str, float]:
    body = "\n".join(f'use library "{s}"' for s in SUBJECTS)
    body += "\n" + "\n".join(EXPRESSIONS.values())
    run = run_text(f"---\nconstants: CODATA2022\n---\n\n```calc\n{body}\n```\n")
    assert run.all_hold, [r.message for r in run.results if r.status != "ok"]
    values = [r.si_value for r in run.results if r.kind == "display"]
    return dict(zip(EXPRESSIONS, values, strict=True))


def test_issue14_library_subjects_are_shipped_with_sources():
    assert set(SUBJECTS) <= set(library_names())
    for name in library_names():
        text = library_sheet(name).read_text()
        body = text.split("```calc\n", 1)[1].split("```", 1)[0]
        for line in body.splitlines():
            # every relation names its published source (or says it is common practice)
            assert "#" in line and line.split("#", 1)[1].strip(), line


M = 1e12  # kg
G, c, hbar, k = sc.G, sc.c, sc.hbar, sc.k


def test_issue14_black_hole_relations(si):
    # Schwarzschild radius 2GM/c^2; REFERENCE.md: 1.48523e-15 m at 1e12 kg
    assert si["r_s"] == pytest.approx(2 * G * M / c**2, rel=1e-12)
    assert si["r_s"] == pytest.approx(1.48523e-15, rel=1e-5)
    assert si["A_H"] == pytest.approx(4 * math.pi * si["r_s"] ** 2, rel=1e-12)
    # Hawking 1975: T = hbar kappa / (2 pi c k_B) with kappa = c^4/(4 G M) (Wald 1984)
    assert si["kappa_H"] == pytest.approx(c**4 / (4 * G * M), rel=1e-12)
    assert si["T_H"] == pytest.approx(hbar * si["kappa_H"] / (2 * math.pi * c * k), rel=1e-12)
    assert si["T_H"] == pytest.approx(1.22690e11, rel=1e-5)  # REFERENCE.md
    assert si["T_H_sun"] == pytest.approx(6.17026e-8, rel=1e-5)  # REFERENCE.md
    # Bekenstein-Hawking S = k_B c^3 A / (4 G hbar), from the area (Bekenstein 1973)
    assert si["S_BH"] == pytest.approx(c**3 * si["A_H"] / (4 * G * hbar), rel=1e-12)
    assert si["S_BH"] == pytest.approx(2.6529e40, rel=1e-4)  # REFERENCE.md
    # photon-only: sigma_SB T^4 times the horizon area (common practice, no greybody)
    assert si["L_photon"] == pytest.approx(sc.sigma * si["T_H"] ** 4 * si["A_H"], rel=1e-12)
    assert si["L_photon"] == pytest.approx(3.5616e8, rel=1e-4)  # REFERENCE.md
    # the lifetime integrates dM/dt = -L/c^2 numerically, independent of the closed form
    coefficient = si["L_photon"] * M**2  # L = coefficient / M^2
    lifetime, _ = integrate.quad(lambda m: c**2 * m**2 / coefficient, 0, M)
    assert si["t_photon"] == pytest.approx(lifetime, rel=1e-9)
    assert si["t_photon"] == pytest.approx(8.4115e19, rel=1e-4)  # REFERENCE.md


T_SUN = 5772.0  # K


def test_issue14_planck_spectrum_against_astropy(si):
    # astropy.modeling BlackBody gives B_nu in erg / (cm^2 Hz s sr)
    bb = BlackBody(temperature=T_SUN * u.K)
    b_nu = bb(3e14 * u.Hz).to(u.W / (u.m**2 * u.Hz * u.sr)).value
    assert si["B_nu"] == pytest.approx(b_nu, rel=1e-9)
    nu = c / 500e-9
    b_lambda = bb(nu * u.Hz).to(u.W / (u.m**2 * u.Hz * u.sr)).value * c / (500e-9) ** 2
    assert si["B_lambda"] == pytest.approx(b_lambda, rel=1e-9)


def test_issue14_wien_peaks_found_numerically(si):
    # the maxima of Planck's law found by a bounded search, and astropy's nu_max/lambda_max
    def planck_nu(nu: float) -> float:
        return 2 * sc.h * nu**3 / c**2 / math.expm1(sc.h * nu / (k * T_SUN))

    def planck_lambda(lam: float) -> float:
        return 2 * sc.h * c**2 / lam**5 / math.expm1(sc.h * c / (lam * k * T_SUN))

    found_nu = (
        optimize.minimize_scalar(
            lambda x: -planck_nu(x * 1e14),
            bounds=(1, 10),
            method="bounded",
            options={"xatol": 1e-10},
        ).x
        * 1e14
    )
    found_lambda = (
        optimize.minimize_scalar(
            lambda x: -planck_lambda(x * 1e-7),
            bounds=(1, 10),
            method="bounded",
            options={"xatol": 1e-10},
        ).x
        * 1e-7
    )
    assert si["nu_peak"] == pytest.approx(found_nu, rel=1e-6)
    assert si["lambda_peak"] == pytest.approx(found_lambda, rel=1e-6)
    bb = BlackBody(temperature=T_SUN * u.K)
    assert si["nu_peak"] == pytest.approx(bb.nu_max.to(u.Hz).value, rel=1e-6)
    assert si["lambda_peak"] == pytest.approx(bb.lambda_max.to(u.m).value, rel=1e-6)
    # CODATA's Wien wavelength constant b = lambda_max T (exact in the 2019 SI)
    b_wien = sc.physical_constants["Wien wavelength displacement law constant"][0]
    assert si["lambda_peak"] * T_SUN == pytest.approx(b_wien, rel=1e-9)


def test_issue14_photon_mean_energy_and_number_density(si):
    # moments of the Planck distribution by quadrature
    def moment(n: int) -> float:
        return integrate.quad(lambda x: x**n / math.expm1(x), 0, 200)[0]

    assert si["E_mean"] == pytest.approx(moment(3) / moment(2) * k * 300, rel=1e-9)
    thermal = k * 2.7255 / (hbar * c)
    assert si["n_gamma"] == pytest.approx(moment(2) / math.pi**2 * thermal**3, rel=1e-9)
    assert si["n_gamma"] == pytest.approx(2 * special.zeta(3) / math.pi**2 * thermal**3)
    # the CMB photon density: 410.7 cm^-3 at 2.7255 K (PDG, Astrophysical constants)
    assert si["n_gamma"] / 1e6 == pytest.approx(410.7, rel=1e-3)
    assert si["u_rad"] == pytest.approx(4 * sc.sigma / c * 1000.0**4, rel=1e-12)
    assert si["F_bb"] == pytest.approx(sc.sigma * 1000.0**4, rel=1e-12)


def test_issue14_accretion(si):
    m_p = sc.m_p
    sigma_t = sc.physical_constants["Thomson cross section"][0]
    # M_sun = GM_sun / G (IAU 2015 B3 nominal GM_sun), as astropy.constants.M_sun gives
    m = 10 * 1.3271244e20 / G
    l_edd = 4 * math.pi * G * m * m_p * c / sigma_t
    assert si["L_Edd"] == pytest.approx(l_edd, rel=1e-9)
    # Frank, King & Raine 2002 eq. 1.4: about 1.3e38 (M/M_sun) erg/s
    assert si["L_Edd"] / 10 / 1e31 == pytest.approx(1.26, rel=0.01)
    assert si["Mdot_Edd"] == pytest.approx(l_edd / (0.1 * c**2), rel=1e-9)
    t_edd = m * c**2 / l_edd  # the Eddington time, M c^2 / L_Edd
    assert si["t_Edd"] == pytest.approx(t_edd, rel=1e-9)
    # Salpeter 1964: mass grows as exp(t (1 - eta) / (eta t_Edd)) at L_Edd
    assert si["t_Salpeter"] == pytest.approx(0.1 / 0.9 * t_edd, rel=1e-9)


def test_issue14_cosmology_against_astropy(si):
    cosmology = FlatLambdaCDM(H0=67.4, Om0=0.315)
    assert si["t_Hubble"] == pytest.approx(cosmology.hubble_time.to(u.s).value, rel=1e-9)
    assert si["d_Hubble"] == pytest.approx(cosmology.hubble_distance.to(u.m).value, rel=1e-9)
    rho = cosmology.critical_density0.to(u.kg / u.m**3).value
    assert si["rho_crit"] == pytest.approx(rho, rel=1e-6)


def test_issue14_plasma_and_radiation(si):
    e, m_e, eps0 = sc.e, sc.m_e, sc.epsilon_0
    assert si["omega_p"] == pytest.approx(math.sqrt(1e18 * e**2 / (eps0 * m_e)), rel=1e-12)
    # NRL Plasma Formulary (2019), p. 28: f_pe = 8.98e3 n_e^(1/2) Hz (n_e in cm^-3),
    # lambda_D = 7.43e2 T_eV^(1/2) n_e^(-1/2) cm
    assert si["f_p"] == pytest.approx(8.98e3, rel=1e-3)
    assert si["lambda_D"] == pytest.approx(7.43e2 * 1e-2, rel=1e-3)
    # CODATA's electron charge-to-mass quotient is -e/m_e; the angular frequency in 1 T
    quotient = sc.physical_constants["electron charge to mass quotient"][0]
    assert si["omega_ce"] == pytest.approx(abs(quotient) * 1.0, rel=1e-9)
    sigma_t = sc.physical_constants["Thomson cross section"][0]
    assert si["sigma_Thomson"] == pytest.approx(sigma_t, rel=1e-9)
    compton = sc.physical_constants["Compton wavelength"][0]
    assert si["lambda_C_e"] == pytest.approx(compton, rel=1e-9)
    proton = sc.physical_constants["proton Compton wavelength"][0]
    assert si["lambda_Compton"] == pytest.approx(proton, rel=1e-9)


@pytest.mark.parametrize("name", SUBJECTS)
def test_issue14_library_sheets_hold_and_are_current(name):
    from worksheet.document import read_document
    from worksheet.runner import SheetRunner

    path = library_sheet(name)
    runner = SheetRunner(path)
    try:
        run = runner.run(read_document(path))
    finally:
        runner.close()
    assert run.settings.pinned is False  # dataset-neutral: they take the user's dataset
    assert all(r.status == "ok" for r in run.with_staleness() if r.kind != "blank")
