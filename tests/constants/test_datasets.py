"""The pinned datasets against scipy, astropy and published values; the loader's rules."""

from __future__ import annotations

import dataclasses
import math
import subprocess
import sys
from decimal import Decimal
from importlib import resources
from pathlib import Path

import astropy.units as apu
import mpmath
import pint
import pytest
import scipy.constants
from astropy.constants import codata2018 as ap2018
from astropy.constants import codata2022 as ap2022
from astropy.constants import iau2015 as ap_iau

# scipy 1.17 exposes only its newest table (CODATA 2022) publicly; the 2018 table is read from
# the private module scipy.constants._codata, which holds every year scipy ships.
from scipy.constants import _codata as scipy_codata

from worksheet.constants import (
    DATASET_NAMES,
    DEFAULT_DATASET,
    Dataset,
    load_dataset,
    parse_dataset_text,
    read_dataset_files,
)
from worksheet.errors import ConstantsError

SCIPY_TABLES = {
    "CODATA2018": scipy_codata._physical_constants_2018,
    "CODATA2022": scipy.constants.physical_constants,
}
ASTROPY_CODATA = {"CODATA2018": ap2018, "CODATA2022": ap2022}

# Our symbol -> the key of the same constant in scipy's CODATA tables.
SCIPY_KEYS = {
    "c": "speed of light in vacuum",
    "G": "Newtonian constant of gravitation",
    "h": "Planck constant",
    "hbar": "reduced Planck constant",
    "k_B": "Boltzmann constant",
    "sigma_SB": "Stefan-Boltzmann constant",
    "m_e": "electron mass",
    "m_p": "proton mass",
    "m_n": "neutron mass",
    "m_u": "atomic mass constant",
    "q_e": "elementary charge",
    "eps_0": "vacuum electric permittivity",
    "mu_0": "vacuum mag. permeability",  # NIST's ASCII table abbreviates "magnetic"
    "N_A": "Avogadro constant",
    "R_gas": "molar gas constant",
    "alpha_fs": "fine-structure constant",
    "sigma_T": "Thomson cross section",
    "a_0": "Bohr radius",
    "r_e": "classical electron radius",
    "R_inf": "Rydberg constant",
    "b_Wien": "Wien wavelength displacement law constant",
    "mu_B": "Bohr magneton",
    "g_n": "standard acceleration of gravity",
    "l_P": "Planck length",
    "m_P": "Planck mass",
    "t_P": "Planck time",
    "T_P": "Planck temperature",
}

# Our symbol -> astropy's name, in astropy.constants.codata2018 / codata2022.
ASTROPY_CODATA_NAMES = {
    "c": "c",
    "G": "G",
    "h": "h",
    "hbar": "hbar",
    "k_B": "k_B",
    "sigma_SB": "sigma_sb",
    "m_e": "m_e",
    "m_p": "m_p",
    "m_n": "m_n",
    "m_u": "u",
    "q_e": "e",
    "eps_0": "eps0",
    "mu_0": "mu0",
    "N_A": "N_A",
    "R_gas": "R",
    "alpha_fs": "alpha",
    "sigma_T": "sigma_T",
    "a_0": "a0",
    "R_inf": "Ryd",
    "b_Wien": "b_wien",
    "mu_B": "muB",
    "g_n": "g0",
}

# Nominal (exact) values in astropy.constants.iau2015 under the same symbols as ours.
ASTROPY_IAU_NOMINAL = ("GM_sun", "GM_earth", "GM_jup", "R_sun", "R_earth", "R_jup", "L_sun")
MASSES = {"M_sun": "GM_sun", "M_earth": "GM_earth", "M_jup": "GM_jup"}

REQUIRED_SYMBOLS = (
    *SCIPY_KEYS,
    "a_rad",
    *ASTROPY_IAU_NOMINAL,
    *MASSES,
    "T_sun",
)
REQUIRED_UNITS = (
    "au",
    "pc",
    "ly",
    "yr",
    "Jy",
    "M_sun",
    "R_sun",
    "L_sun",
    "M_earth",
    "R_earth",
    "M_jup",
    "R_jup",
)

UREG: pint.UnitRegistry = pint.UnitRegistry()


def near(expected: float, rel: float) -> object:
    """pytest.approx with no absolute floor: its default 1e-12 would pass any tiny constant."""
    return pytest.approx(expected, rel=rel, abs=0)


def _pairs() -> list[tuple[str, str]]:
    return [(name, symbol) for name in DATASET_NAMES for symbol in SCIPY_KEYS]


# --- the packaged datasets -------------------------------------------------------------


def test_scipy_public_table_is_codata_2022() -> None:
    # Premise of the comparisons below. Electron mass, CODATA 2022 (REFERENCE.md, NIST
    # web version 9.0): 9.1093837139e-31 kg.
    assert scipy.constants.physical_constants["electron mass"][0] == 9.1093837139e-31
    assert scipy_codata._physical_constants_2018["electron mass"][0] == 9.1093837015e-31


@pytest.mark.parametrize("name", DATASET_NAMES)
def test_every_required_constant_and_unit_present(name: str) -> None:
    dataset = load_dataset(name)
    assert set(REQUIRED_SYMBOLS) <= set(dataset.constants)
    assert set(REQUIRED_UNITS) <= set(dataset.units)


@pytest.mark.parametrize(("name", "symbol"), _pairs())
def test_constant_matches_scipy_table_of_same_year(name: str, symbol: str) -> None:
    ours = load_dataset(name).constants[symbol]
    value, unit, uncertainty = SCIPY_TABLES[name][SCIPY_KEYS[symbol]]
    # Ours are the correctly rounded 17 digits of an exact formula (hbar, sigma_SB, b_Wien);
    # scipy evaluates the formula in floats, a few ulp off. Transcribed values agree exactly.
    assert ours.si_value == near(value, rel=1e-15 if symbol in EXACT_FORMULAS else 0)
    assert ours.si_uncertainty == near(uncertainty, rel=1e-12)
    assert ours.exact == (uncertainty == 0)
    assert ours.name == SCIPY_KEYS[symbol].replace("mag.", "magnetic")
    # Same dimension as scipy's unit string, and ours is coherent SI (factor exactly 1).
    ours_q = UREG.Quantity(1, ours.unit)
    assert ours_q.dimensionality == UREG.Quantity(1, unit or "").dimensionality
    assert ours_q.to_base_units().magnitude == near(1, rel=1e-15)


@pytest.mark.parametrize("name", DATASET_NAMES)
@pytest.mark.parametrize("symbol", sorted(ASTROPY_CODATA_NAMES))
def test_constant_matches_astropy_codata(name: str, symbol: str) -> None:
    ours = load_dataset(name).constants[symbol]
    theirs = getattr(ASTROPY_CODATA[name], ASTROPY_CODATA_NAMES[symbol])
    # Converting astropy's quantity to our unit string checks the unit and the value at once.
    assert theirs.to_value(apu.Unit(ours.unit)) == near(ours.si_value, rel=1e-12)
    assert theirs.uncertainty == near(ours.si_uncertainty, rel=1e-12)


@pytest.mark.parametrize("name", DATASET_NAMES)
@pytest.mark.parametrize("symbol", ASTROPY_IAU_NOMINAL)
def test_nominal_value_matches_astropy_iau2015(name: str, symbol: str) -> None:
    ours = load_dataset(name).constants[symbol]
    theirs = getattr(ap_iau, symbol)
    assert theirs.to_value(apu.Unit(ours.unit)) == near(ours.si_value, rel=1e-12)
    assert ours.exact and theirs.uncertainty == 0


@pytest.mark.parametrize("name", DATASET_NAMES)
@pytest.mark.parametrize(("mass", "gm"), sorted(MASSES.items()))
def test_mass_is_gm_over_the_dataset_g(name: str, mass: str, gm: str) -> None:
    # Expected from astropy alone: its nominal GM over its G of the same CODATA year, with
    # G's relative uncertainty (astropy's iau2015 masses are built the same way).
    g = ASTROPY_CODATA[name].G
    expected = getattr(ap_iau, gm).value / g.value
    ours = load_dataset(name).constants[mass]
    assert ours.unit == "kg"
    assert ours.si_value == near(expected, rel=1e-12)
    assert ours.si_uncertainty == near(expected * g.uncertainty / g.value, rel=1e-12)
    assert ours.relative_uncertainty == near(
        load_dataset(name).constants["G"].relative_uncertainty, rel=1e-12
    )
    assert not ours.exact
    assert "CODATA" in ours.source and "IAU 2015 Resolution B3" in ours.source


@pytest.mark.parametrize("mass", sorted(MASSES))
def test_mass_matches_astropy_iau2015(mass: str) -> None:
    # astropy 8 builds its masses with its default CODATA, 2022.
    theirs = getattr(ap_iau, mass)
    ours = load_dataset("CODATA2022").constants[mass]
    assert ours.si_value == near(theirs.value, rel=1e-12)
    assert ours.si_uncertainty == near(theirs.uncertainty, rel=1e-12)


@pytest.mark.parametrize(
    ("symbol", "published", "rel"),
    [
        # IAU 2015 Resolution B3 nominal values (Prsa et al. 2016, AJ 152, 41), as listed in
        # the project's REFERENCE.md.
        ("GM_sun", 1.3271244e20, 0),
        ("R_sun", 6.957e8, 0),
        ("L_sun", 3.828e26, 0),
        ("T_sun", 5772, 0),
        ("GM_earth", 3.986004e14, 0),
        ("GM_jup", 1.2668653e17, 0),
        # Equatorial radii of the same resolution (from memory; also checked against astropy
        # above).
        ("R_earth", 6.3781e6, 0),
        ("R_jup", 7.1492e7, 0),
        # GM_sun / G as REFERENCE.md gives it, 7 significant digits.
        ("M_sun", 1.988410e30, 5e-7),
    ],
)
def test_iau_values_against_publication(symbol: str, published: float, rel: float) -> None:
    for name in DATASET_NAMES:
        assert load_dataset(name).constants[symbol].si_value == near(published, rel=rel)


@pytest.mark.parametrize(
    ("symbol", "value_2018", "value_2022"),
    [
        # Values that changed from CODATA 2018 to 2022 (NIST web versions 8.1 and 9.0), as
        # listed in REFERENCE.md.
        ("m_e", 9.1093837015e-31, 9.1093837139e-31),
        ("m_p", 1.67262192369e-27, 1.67262192595e-27),
        ("alpha_fs", 7.2973525693e-3, 7.2973525643e-3),
        ("eps_0", 8.8541878128e-12, 8.8541878188e-12),
        ("mu_0", 1.25663706212e-6, 1.25663706127e-6),
        ("sigma_T", 6.6524587321e-29, 6.6524587051e-29),
        # G is the same in both: 6.67430e-11 with relative uncertainty 2.2e-5.
        ("G", 6.67430e-11, 6.67430e-11),
    ],
)
def test_each_year_has_its_own_values(symbol: str, value_2018: float, value_2022: float) -> None:
    assert load_dataset("CODATA2018").constants[symbol].si_value == value_2018
    assert load_dataset("CODATA2022").constants[symbol].si_value == value_2022


def test_g_relative_uncertainty() -> None:
    # CODATA 2018 and 2022: u_r(G) = 2.2e-5 (REFERENCE.md).
    for name in DATASET_NAMES:
        assert load_dataset(name).constants["G"].relative_uncertainty == near(2.2e-5, rel=0.03)


@pytest.mark.parametrize("name", DATASET_NAMES)
def test_radiation_density_constant_is_four_sigma_over_c(name: str) -> None:
    # Not a CODATA entry: a_rad = 4 sigma_SB / c from scipy's values of the same year.
    table = SCIPY_TABLES[name]
    sigma = table["Stefan-Boltzmann constant"][0]
    c = table["speed of light in vacuum"][0]
    a_rad = load_dataset(name).constants["a_rad"]
    assert a_rad.si_value == near(4 * sigma / c, rel=1e-15)
    assert a_rad.exact
    energy_density_per_k4 = UREG.Quantity(1, "J/m^3/K^4").dimensionality
    assert UREG.Quantity(1, a_rad.unit).dimensionality == energy_density_per_k4


EXACT_FORMULAS = {
    # symbol: its defining formula, from CODATA's exact c, h and k_B (scipy's values).
    "hbar": lambda c, h, k: h / (2 * mpmath.pi),
    "sigma_SB": lambda c, h, k: 2 * mpmath.pi**5 * k**4 / (15 * h**3 * c**2),
    "a_rad": lambda c, h, k: 8 * mpmath.pi**5 * k**4 / (15 * h**3 * c**3),
    # Wien: x solves (x - 5) e^x + 5 = 0, x = 5 + W0(-5 e^-5).
    "b_Wien": lambda c, h, k: h * c / ((5 + mpmath.lambertw(-5 * mpmath.exp(-5)).real) * k),
}


@pytest.mark.parametrize("name", DATASET_NAMES)
@pytest.mark.parametrize("symbol", sorted(EXACT_FORMULAS))
def test_exact_formula_values_are_correctly_rounded(name: str, symbol: str) -> None:
    # Evaluated here at 40 digits with mpmath; 17 correctly rounded digits are within 1e-16.
    table = SCIPY_TABLES[name]
    with mpmath.workdps(40):
        # repr of scipy's float gives the shortest decimal, which is CODATA's exact one.
        exact = [
            mpmath.mpf(repr(table[key][0]))
            for key in ("speed of light in vacuum", "Planck constant", "Boltzmann constant")
        ]
        expected = EXACT_FORMULAS[symbol](*exact)
        ours = mpmath.mpf(load_dataset(name).constants[symbol].value)
        assert abs(ours / expected - 1) < mpmath.mpf("1e-16")


@pytest.mark.parametrize("name", DATASET_NAMES)
def test_exact_non_decimal_values_have_17_digits(name: str) -> None:
    # The data-file promise: exact values that are not finite decimals carry 17 digits.
    for symbol in ("hbar", "sigma_SB", "a_rad", "b_Wien"):
        mantissa = load_dataset(name).constants[symbol].value.split("e")[0].replace(".", "")
        assert len(mantissa.lstrip("0")) == 17


# --- astronomical units ------------------------------------------------------------------


@pytest.mark.parametrize("name", DATASET_NAMES)
@pytest.mark.parametrize(
    ("symbol", "astropy_name"),
    [
        ("au", "au"),
        ("pc", "pc"),
        ("ly", "lyr"),
        ("yr", "yr"),  # astropy's yr is the Julian year
        ("Jy", "Jy"),
        ("M_sun", "M_sun"),
        ("R_sun", "R_sun"),
        ("L_sun", "L_sun"),
        ("M_earth", "M_earth"),
        ("R_earth", "R_earth"),
        ("M_jup", "M_jup"),
        ("R_jup", "R_jup"),
    ],
)
def test_unit_matches_astropy_units(name: str, symbol: str, astropy_name: str) -> None:
    ours = load_dataset(name).units[symbol]
    theirs = getattr(apu, astropy_name)
    assert theirs.to(apu.Unit(ours.unit)) == near(ours.si_value, rel=1e-12)


@pytest.mark.parametrize("name", DATASET_NAMES)
def test_unit_definitions_from_their_definitions(name: str) -> None:
    units = load_dataset(name).units
    c = scipy.constants.c
    # IAU 2012 Resolution B2: the au is 149597870700 m exactly.
    assert Decimal(units["au"].value) == 149597870700
    assert units["au"].exact and units["au"].unit == "m"
    # IAU 2015 Resolution B2: 1 pc = (648000 / pi) au.
    assert units["pc"].si_value == near(648000 / math.pi * 149597870700, rel=1e-15)
    # Julian year = 365.25 d of 86400 s; light-year = c times the Julian year (exact).
    assert Decimal(units["yr"].value) == Decimal("365.25") * 86400
    assert Decimal(units["ly"].value) == int(c) * 31557600
    # Jansky: 1e-26 W m^-2 Hz^-1 (IAU, 1973).
    assert units["Jy"].si_value == 1e-26
    assert UREG.Quantity(1, units["Jy"].unit).to("W/m^2/Hz").magnitude == near(1, rel=1e-15)


@pytest.mark.parametrize("name", DATASET_NAMES)
@pytest.mark.parametrize(
    "symbol", ["M_sun", "R_sun", "L_sun", "M_earth", "R_earth", "M_jup", "R_jup"]
)
def test_astronomical_unit_equals_its_constant(name: str, symbol: str) -> None:
    dataset = load_dataset(name)
    unit, constant = dataset.units[symbol], dataset.constants[symbol]
    assert (unit.value, unit.unit, unit.exact, unit.source) == (
        constant.value,
        constant.unit,
        constant.exact,
        constant.source,
    )


# --- the loader ----------------------------------------------------------------------------


def test_default_dataset_is_the_newest() -> None:
    assert DATASET_NAMES == ("CODATA2018", "CODATA2022")
    assert DEFAULT_DATASET == "CODATA2022"


@pytest.mark.parametrize(
    "bad_name",
    [
        "CODATA2014",  # a real CODATA year the project does not ship
        "",  # nothing at all
        "IAU2015",  # the astronomical file is not a dataset on its own
    ],
)
def test_unknown_dataset_names_the_valid_ones(bad_name: str) -> None:
    with pytest.raises(ConstantsError) as caught:
        load_dataset(bad_name)
    assert "CODATA2018" in str(caught.value) and "CODATA2022" in str(caught.value)


def test_dataset_is_cached_and_name_case_is_free() -> None:
    assert load_dataset("codata2018") is load_dataset("CODATA2018")
    assert load_dataset("CODATA2018").name == "CODATA2018"


@pytest.mark.parametrize("name", DATASET_NAMES)
def test_title_names_codata_year_and_iau(name: str) -> None:
    title = load_dataset(name).title
    assert f"CODATA {name[-4:]}" in title and "IAU 2015" in title and "\n" not in title


def test_find() -> None:
    dataset = load_dataset("CODATA2022")
    # CODATA's wording, any case, finds G.
    assert [c.symbol for c in dataset.find("gravitation")] == ["G"]
    assert [c.symbol for c in dataset.find("GRAVITATION")] == ["G"]
    # A symbol matches too, in any case: proton mass m_p and Planck mass m_P.
    assert [c.symbol for c in dataset.find("m_p")] == ["m_p", "m_P"]
    # Names and symbols together, in file order.
    assert [c.symbol for c in dataset.find("planck")] == ["h", "hbar", "l_P", "m_P", "t_P", "T_P"]
    # "" gives every constant, in file order.
    assert dataset.find("") == list(dataset.constants.values())
    # Nothing matches: an empty list.
    assert dataset.find("phlogiston") == []


def test_mappings_are_read_only() -> None:
    dataset = load_dataset("CODATA2022")
    with pytest.raises(TypeError):
        dataset.constants["c"] = dataset.constants["G"]  # type: ignore[index]
    with pytest.raises(TypeError):
        dataset.units["au"] = dataset.units["pc"]  # type: ignore[index]
    with pytest.raises(dataclasses.FrozenInstanceError):
        dataset.constants["c"].value = "3e8"  # type: ignore[misc]


@pytest.mark.slow
def test_nothing_is_loaded_at_import() -> None:
    # A fresh interpreter imports the package and checks that no dataset has been read yet.
    root = Path(__file__).resolve().parents[2]
    code = (
        "import worksheet.constants as k\n"
        "from worksheet.constants import dataset as d\n"
        "assert d._load_packaged.cache_info().currsize == 0\n"
        "k.load_dataset('CODATA2022')\n"
        "assert d._load_packaged.cache_info().currsize == 1\n"
    )
    done = subprocess.run(
        [sys.executable, "-c", code], cwd=root, capture_output=True, text=True, check=False
    )
    assert done.returncode == 0, done.stderr


# A tiny CODATA-like file of our own invention for the parser tests: G deliberately not the
# real one, so the mass computed from it proves the loader uses the dataset's own G.
FAKE_CODATA = """\
# a test file
c | speed of light in vacuum | 299792458 | 0 | m/s | exact | test table 2000
G | gravitation | 6.0e-11 | 3.0e-15 | m^3/(kg*s^2) | measured | test table 2000
"""


def test_mass_uses_the_dataset_own_g() -> None:
    iau = resources.files("worksheet.constants").joinpath("iau.txt").read_text(encoding="utf-8")
    dataset = parse_dataset_text("fake", "fake", [("fake.txt", FAKE_CODATA), ("iau.txt", iau)])
    m_sun = dataset.constants["M_sun"]
    # 1.3271244e20 / 6.0e-11 with u_r = 3e-15 / 6e-11 = 5e-5.
    assert m_sun.si_value == near(1.3271244e20 / 6.0e-11, rel=1e-15)
    assert m_sun.relative_uncertainty == near(5e-5, rel=1e-12)
    assert "G from test table 2000" in m_sun.source
    assert dataset.units["M_sun"].si_value == m_sun.si_value


GOOD_LINES = FAKE_CODATA  # three lines, so a bad line appended is line 4


@pytest.mark.parametrize(
    ("bad_line", "says"),
    [
        # too few columns
        ("h | Planck constant | 6.62607015e-34 | 0 | J*s", "columns"),
        # too many columns
        ("h | Planck constant | 6.6e-34 | 0 | J*s | exact | src | note | extra", "columns"),
        # a value that is not a decimal number
        ("h | Planck constant | six | 0 | J*s | exact | src", "decimal"),
        # a negative uncertainty
        ("h | Planck constant | 6.6e-34 | -1e-40 | J*s | measured | src", "negative"),
        # exact but with an uncertainty
        ("h | Planck constant | 6.6e-34 | 1e-40 | J*s | exact | src", "exact"),
        # measured but without an uncertainty
        ("h | Planck constant | 6.6e-34 | 0 | J*s | measured | src", "measured"),
        # neither exact nor measured
        ("h | Planck constant | 6.6e-34 | 0 | J*s | defined | src", "exact"),
        # a unit symbol outside the SI list (gram)
        ("h | Planck constant | 6.6e-34 | 0 | g*m^2/s | exact | src", "'g'"),
        # an unclosed parenthesis in the unit
        ("h | Planck constant | 6.6e-34 | 0 | J/(m*s | exact | src", "unit"),
        # a fractional exponent in the unit
        ("h | Planck constant | 6.6e-34 | 0 | m^1.5 | exact | src", "unit"),
        # a symbol starting with an underscore
        ("_h | Planck constant | 6.6e-34 | 0 | J*s | exact | src", "symbol"),
        # an empty source
        ("h | Planck constant | 6.6e-34 | 0 | J*s | exact |  ", "source"),
        # the same symbol twice
        ("c | speed of light | 3e8 | 0 | m/s | exact | src", "twice"),
        # an unknown section
        ("[planets]", "section"),
        # a computed value from an undefined constant
        ("M_x | a mass | GM_x / G | - | kg | - | src", "GM_x"),
        # a computed value with an uncertainty written in
        ("M_x | a mass | c / G | 1e20 | kg | - | src", "uncertainty"),
        # a unit naming a constant that does not exist
        ("[units]\nM_x | a mass | M_x | - | - | - | src", "M_x"),
        # a unit with a size of zero
        ("[units]\nzz | nothing | 0 | m | exact | src", "positive"),
    ],
)
def test_malformed_line_reports_file_and_line(bad_line: str, says: str, tmp_path: Path) -> None:
    path = tmp_path / "broken.txt"
    path.write_text(GOOD_LINES + bad_line + "\n", encoding="utf-8")
    with pytest.raises(ConstantsError) as caught:
        read_dataset_files("broken", "broken", [path])
    expected_line = 4 + bad_line.count("\n")
    assert caught.value.line == expected_line
    assert "broken.txt" in caught.value.message
    assert says in caught.value.message
    assert str(caught.value).startswith(f"line {expected_line}: ")


def test_good_lines_parse(tmp_path: Path) -> None:
    path = tmp_path / "fine.txt"
    path.write_text(GOOD_LINES, encoding="utf-8")
    dataset = read_dataset_files("fine", "a fine file", [path])
    assert isinstance(dataset, Dataset)
    assert list(dataset.constants) == ["c", "G"]
    assert dataset.constants["G"].note == ""


def test_unreadable_file(tmp_path: Path) -> None:
    # Not UTF-8, and not there at all: both are ConstantsError, naming the file.
    binary = tmp_path / "binary.txt"
    binary.write_bytes(b"\xff\xfe\x00bad")
    for path in (binary, tmp_path / "missing.txt"):
        with pytest.raises(ConstantsError) as caught:
            read_dataset_files("x", "x", [path])
        assert path.name in str(caught.value)
