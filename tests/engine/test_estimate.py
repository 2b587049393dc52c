"""Dimensional-analysis estimates, held against dimensions and values from outside the project.

Input dimensions come from astropy's units of the CODATA constants (never from the package's
own tables); values come from scipy.constants. Each solution is also checked directly: the
product of the input dimensions to the found powers must be the target dimension.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from fractions import Fraction
from itertools import permutations

import pytest
from astropy import constants as ac
from astropy import units as u
from scipy import constants as sc

from worksheet.engine.context import Context
from worksheet.engine.estimate import (
    EstimateSolution,
    Outcome,
    format_monomial,
    solve_exponents,
)
from worksheet.errors import EvaluationError, NameResolutionError
from worksheet.syntax import parse_expression
from worksheet.units.dimension import Dimension

_ASTROPY_BASES = {
    "m": "length",
    "kg": "mass",
    "s": "time",
    "A": "current",
    "K": "temperature",
    "mol": "amount",
    "cd": "luminous_intensity",
}


def dim(unit: u.UnitBase | str) -> Dimension:
    """The dimension of an astropy unit, read from its decomposition into SI base units."""
    si = u.Unit(unit).decompose()
    assert si.scale == pytest.approx(1.0)
    powers = {
        _ASTROPY_BASES[base.name]: Fraction(power).limit_denominator(100)
        for base, power in zip(si.bases, si.powers, strict=True)
    }
    return Dimension.of(**powers)


# Dimensions of the inputs, from astropy.
HBAR = dim(ac.hbar.unit)
C = dim(ac.c.unit)
G = dim(ac.G.unit)
K_B = dim(ac.k_B.unit)
SIGMA_T = dim(ac.sigma_T.unit)
MASS = dim(u.kg)
LENGTH = dim(u.m)
TIME = dim(u.s)
TEMPERATURE = dim(u.K)
POWER = dim(u.W)
PRESSURE = dim(u.Pa)
OPACITY = dim(u.m**2 / u.kg)
GRAV_PARAMETER = dim(u.m**3 / u.s**2)  # G*M as one input

# Values, from scipy.constants (CODATA 2022 in scipy 1.17).
VALUES = {
    "hbar": sc.hbar,
    "c": sc.c,
    "G": sc.G,
    "k_B": sc.k,
    "m_p": sc.m_p,
    "sigma_T": sc.physical_constants["Thomson cross section"][0],
}


def product_dimension(inputs: Sequence[tuple[str, Dimension]], powers: Sequence) -> Dimension:
    result = Dimension()
    for (_, dimension), power in zip(inputs, powers, strict=True):
        result = result * dimension ** Fraction(power)
    return result


def monomial_value(names: Sequence[str], powers: Sequence, values: dict[str, float]) -> float:
    return math.prod(values[n] ** float(p) for n, p in zip(names, powers, strict=True))


def solved(target: Dimension, inputs: list[tuple[str, Dimension]]) -> EstimateSolution:
    """Solve, and check every claim of the answer against plain dimension arithmetic."""
    found = solve_exponents(target, inputs)
    assert found.names == tuple(n for n, _ in inputs)
    if found.exponents is not None:
        assert product_dimension(inputs, found.exponents) == target
    for group in found.groups:
        assert product_dimension(inputs, group).dimensionless
        assert math.gcd(*group) == 1
    return found


# --- unique solutions ---------------------------------------------------------------

UNIQUE_CASES = [
    # Hawking temperature: T_H = hbar*c/(4*pi*k_B*r_s) (Hawking 1975), so hbar*c/(k_B*r_s).
    (
        "hawking",
        TEMPERATURE,
        [("hbar", HBAR), ("c", C), ("k_B", K_B), ("r_s", LENGTH)],
        (1, 1, -1, -1),
        "hbar*c/(k_B*r_s)",
    ),
    # Casimir pressure between plates: pi^2*hbar*c/(240*d^4) (Casimir 1948).
    ("casimir", PRESSURE, [("hbar", HBAR), ("c", C), ("d", LENGTH)], (1, 1, -4), "hbar*c/d^4"),
    # Eddington luminosity 4*pi*G*M*c/kappa with G*M passed as one input mu (kappa an opacity).
    (
        "eddington",
        POWER,
        [("mu", GRAV_PARAMETER), ("c", C), ("kappa", OPACITY)],
        (1, 1, -1),
        "mu*c/kappa",
    ),
    # Planck mass sqrt(hbar*c/G).
    (
        "planck mass",
        MASS,
        [("hbar", HBAR), ("c", C), ("G", G)],
        (Fraction(1, 2), Fraction(1, 2), Fraction(-1, 2)),
        "(hbar*c/G)^(1/2)",
    ),
    # A dimensionless target from dimensioned inputs: all powers zero, written 1.
    ("dimensionless", Dimension(), [("c", C), ("r", LENGTH)], (0, 0), "1"),
]


@pytest.mark.parametrize(
    ("target", "inputs", "powers", "text"),
    [case[1:] for case in UNIQUE_CASES],
    ids=[case[0] for case in UNIQUE_CASES],
)
def test_unique_solutions(
    target: Dimension, inputs: list[tuple[str, Dimension]], powers: tuple, text: str
) -> None:
    found = solved(target, inputs)
    assert found.outcome is Outcome.UNIQUE and found.unique
    assert found.exponents == tuple(Fraction(p) for p in powers)
    assert all(isinstance(p, Fraction) for p in found.exponents)
    assert found.groups == ()
    assert found.monomial() == text


def test_hawking_estimate_times_one_over_four_pi_is_the_hawking_temperature() -> None:
    # Textbook T_H = hbar*c^3/(8*pi*G*M*k_B) with r_s = 2*G*M/c^2, evaluated here.
    mass = 1e12
    values = {**VALUES, "r_s": 2 * sc.G * mass / sc.c**2}
    found = solved(TEMPERATURE, [("hbar", HBAR), ("c", C), ("k_B", K_B), ("r_s", LENGTH)])
    assert found.exponents is not None
    estimate = monomial_value(found.names, found.exponents, values)
    expected = sc.hbar * sc.c**3 / (8 * math.pi * sc.G * mass * sc.k)
    assert estimate / (4 * math.pi) == pytest.approx(expected, rel=1e-12)


PLANCK_CASES = [
    # CODATA defines the Planck units by exactly these monomials of hbar, c, G (and k_B),
    # so the values agree to the rounding of the published digits (7 significant figures).
    ("Planck mass", MASS, ["hbar", "c", "G"]),
    ("Planck length", LENGTH, ["hbar", "c", "G"]),
    ("Planck time", TIME, ["hbar", "c", "G"]),
    ("Planck temperature", TEMPERATURE, ["hbar", "c", "G", "k_B"]),
]
_DIMS = {"hbar": HBAR, "c": C, "G": G, "k_B": K_B}


@pytest.mark.parametrize(("codata_name", "target", "names"), PLANCK_CASES)
def test_planck_units_match_codata(codata_name: str, target: Dimension, names: list[str]) -> None:
    found = solved(target, [(n, _DIMS[n]) for n in names])
    assert found.unique and found.exponents is not None
    value, _unit, _uncertainty = sc.physical_constants[codata_name]
    assert monomial_value(names, found.exponents, VALUES) == pytest.approx(value, rel=1e-6)


def test_planck_mass_text_evaluates_in_the_sheet_language(ctx: Context) -> None:
    # The recorded text must be the sheet's own notation, with the precedence it implies.
    from worksheet.engine import calculate

    found = solved(MASS, [("hbar", HBAR), ("c", C), ("G", G)])
    text = found.monomial()
    assert text is not None
    result = calculate(ctx, text, "kg")
    assert result.status == "ok", result.message
    codata = sc.physical_constants["Planck mass"][0]
    assert result.si_value == pytest.approx(codata, rel=1e-6)


def test_casimir_pressure_at_one_micron() -> None:
    # Casimir pressure at d = 1 um is about 1.30 mPa (Casimir 1948 formula; the number is
    # the commonly quoted one, from memory): estimate times pi^2/240.
    found = solved(PRESSURE, [("hbar", HBAR), ("c", C), ("d", LENGTH)])
    assert found.exponents is not None
    estimate = monomial_value(found.names, found.exponents, {**VALUES, "d": 1e-6})
    assert estimate * math.pi**2 / 240 == pytest.approx(1.30e-3, rel=0.01)


def test_eddington_luminosity_of_the_sun() -> None:
    # L_Edd = 4*pi*G*M*c*m_p/sigma_T = 1.26e31 W per solar mass for ionised hydrogen
    # (the standard textbook figure, 1.26e38 erg/s, from memory).
    found = solved(POWER, [("mu", GRAV_PARAMETER), ("c", C), ("kappa", OPACITY)])
    assert found.exponents is not None
    values = {
        "mu": sc.G * ac.M_sun.to_value(u.kg),
        "c": sc.c,
        "kappa": VALUES["sigma_T"] / sc.m_p,
    }
    estimate = monomial_value(found.names, found.exponents, values)
    assert 4 * math.pi * estimate == pytest.approx(1.26e31, rel=0.01)


# --- powers not unique --------------------------------------------------------------

BH_INPUTS = [("hbar", HBAR), ("c", C), ("G", G), ("M", MASS), ("k_B", K_B)]


def test_temperature_from_hbar_c_g_m_kb_leaves_one_group() -> None:
    # The one free group is G*M^2/(hbar*c) = (M/m_Planck)^2; k_B cannot enter a group
    # because it alone carries a temperature.
    found = solved(TEMPERATURE, BH_INPUTS)
    assert found.outcome is Outcome.NOT_UNIQUE and not found.unique
    assert found.groups == ((-1, -1, 1, 2, 0),)
    assert found.group_texts() == ("G*M^2/(hbar*c)",)
    # A particular solution is still given, and it needs k_B to the power -1.
    assert found.exponents is not None and found.exponents[4] == -1


def test_eddington_with_two_masses_is_not_unique() -> None:
    # M and m_p are both masses, so M/m_p is free; G*M*m_p*c/sigma_T is one member.
    inputs = [("G", G), ("M", MASS), ("m_p", MASS), ("c", C), ("sigma_T", SIGMA_T)]
    found = solved(POWER, inputs)
    assert found.outcome is Outcome.NOT_UNIQUE
    assert (0, 1, -1, 0, 0) in found.groups
    # Five inputs, three base dimensions (mass, length, time) among them: two groups.
    assert len(found.groups) == 2
    assert product_dimension(inputs, (1, 1, 1, 1, -1)) == POWER


def test_g_m_c_kappa_is_not_unique_either() -> None:
    # With G and M separate, kappa*M/(G*M/c^2)^2 = c^4*kappa/(G^2*M) is dimensionless,
    # so G*M*c/kappa is only one member of a family.
    inputs = [("G", G), ("M", MASS), ("c", C), ("kappa", OPACITY)]
    found = solved(POWER, inputs)
    assert found.outcome is Outcome.NOT_UNIQUE
    assert found.groups == ((-2, -1, 4, 1),)
    assert product_dimension(inputs, (1, 1, 1, -1)) == POWER


def test_dimensionless_input_is_a_group_by_itself() -> None:
    # A pure number (here a coupling) can enter to any power.
    found = solved(LENGTH, [("alpha", Dimension()), ("r", LENGTH)])
    assert found.outcome is Outcome.NOT_UNIQUE
    assert found.groups == ((1, 0),)
    assert found.exponents == (0, 1)


# --- unreachable targets ------------------------------------------------------------

UNREACHABLE_CASES = [
    # No input carries a temperature.
    ("temperature", TEMPERATURE, [("hbar", HBAR), ("c", C), ("G", G)], ("temperature",)),
    # One input carries no mass.
    ("mass from c", MASS, [("c", C)], ("mass",)),
    # Length and time occur, but only as length/time: a length alone is out of reach.
    ("length from c", LENGTH, [("c", C)], ("length", "time")),
    # Nothing to build from.
    ("no inputs", LENGTH, [], ("length",)),
]


@pytest.mark.parametrize(
    ("target", "inputs", "blocked"),
    [case[1:] for case in UNREACHABLE_CASES],
    ids=[case[0] for case in UNREACHABLE_CASES],
)
def test_unreachable_targets(
    target: Dimension, inputs: list[tuple[str, Dimension]], blocked: tuple[str, ...]
) -> None:
    found = solved(target, inputs)
    assert found.outcome is Outcome.UNREACHABLE
    assert found.exponents is None and found.monomial() is None
    assert found.unreachable == blocked
    for base in blocked:
        assert base in found.reason


def test_unreachable_message_names_the_inputs() -> None:
    found = solved(TEMPERATURE, [("hbar", HBAR), ("c", C), ("G", G)])
    assert found.reason == "temperature: none of hbar, c, G has a temperature"


# --- canonical order ----------------------------------------------------------------


def _by_name(found: EstimateSolution) -> list[dict[str, int]]:
    return [dict(zip(found.names, group, strict=True)) for group in found.groups]


@pytest.mark.parametrize(
    ("target", "inputs"),
    [
        (TEMPERATURE, BH_INPUTS),
        (POWER, [("G", G), ("M", MASS), ("m_p", MASS), ("c", C), ("sigma_T", SIGMA_T)]),
    ],
    ids=["one group", "two groups"],
)
def test_same_inputs_in_any_order_give_the_same_answer(
    target: Dimension, inputs: list[tuple[str, Dimension]]
) -> None:
    # Canonical order: groups and the particular solution are computed with the inputs in
    # code-point order of their names, so only the position of each exponent follows the
    # input order.
    reference = solved(target, inputs)
    assert reference.exponents is not None
    reference_powers = dict(zip(reference.names, reference.exponents, strict=True))
    for order in permutations(inputs):
        found = solved(target, list(order))
        assert _by_name(found) == _by_name(reference)
        assert found.exponents is not None
        assert dict(zip(found.names, found.exponents, strict=True)) == reference_powers


def test_groups_are_in_lowest_terms_with_a_fixed_sign() -> None:
    # Sign rule: exponents sum positive; on a tie the first name in code-point order is
    # positive ("M" < "m_p", so M/m_p rather than m_p/M).
    found = solved(Dimension(), [("m_p", MASS), ("M", MASS)])
    assert found.groups == ((-1, 1),)
    assert found.group_texts() == ("M/m_p",)


def test_duplicate_names_are_refused() -> None:
    with pytest.raises(NameResolutionError, match="hbar"):
        solve_exponents(TEMPERATURE, [("hbar", HBAR), ("hbar", HBAR)])


# --- notation -----------------------------------------------------------------------

HALF = Fraction(1, 2)
FORMAT_CASES: list[tuple[str, list[str], list, str]] = [
    # Integer powers: numerator, then a bracketed denominator when it has several factors.
    ("fraction", ["hbar", "c", "k_B", "r_s"], [1, 1, -1, -1], "hbar*c/(k_B*r_s)"),
    ("one below", ["hbar", "c", "d"], [1, 1, -4], "hbar*c/d^4"),
    ("only below", ["G", "c"], [-1, 0], "1/G"),
    ("nothing", ["G"], [0], "1"),
    # A common root taken out.
    ("root", ["hbar", "c", "G"], [HALF, HALF, -HALF], "(hbar*c/G)^(1/2)"),
    (
        "root with k_B",
        ["hbar", "c", "G", "k_B"],
        [HALF, 5 * HALF, -HALF, -1],
        "(hbar*c^5/(G*k_B^2))^(1/2)",
    ),
    # A single factor keeps its own rational power.
    ("single", ["c"], [3 * HALF], "c^(3/2)"),
    ("single below", ["G"], [-HALF], "1/G^(1/2)"),
]


@pytest.mark.parametrize(
    ("names", "powers", "text"),
    [case[1:] for case in FORMAT_CASES],
    ids=[case[0] for case in FORMAT_CASES],
)
def test_format_monomial(names: list[str], powers: list, text: str) -> None:
    assert format_monomial(names, powers) == text
    parse_expression(text)  # the sheet's parser reads it back


def test_format_monomial_needs_one_power_per_name() -> None:
    with pytest.raises(EvaluationError, match="one exponent per name"):
        format_monomial(["a", "b"], [1])
