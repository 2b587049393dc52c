"""Dimension errors: caught symbolically, located by line and column, both sides named."""

from __future__ import annotations

import re

import pytest

from worksheet.engine import calculate

GIVENS = "M = 1e12 [kg]\nt = 3 [s]\nr_s = 2*G*M/c^2\n"  # lines 1-3


# Each case: a statement placed on line 4 after GIVENS, the columns the error may point at
# (1-based, counted in the statement as written: the operator of a bad sum, else somewhere
# inside the offending operand), and words the message must contain.
CASES = [
    # A sum of a length and a time: points at the '+', names both operands and dimensions.
    ("bad = r_s + t", (11, 11), ["length", "r_s", "m", "time", "t", "s"]),
    # A difference is a sum too.
    ("bad = t - r_s", (9, 9), ["time", "length", "r_s"]),
    # exp of a length: points at the argument, names it and its dimension.
    ("bad = exp(r_s)", (11, 13), ["exp", "length", "r_s"]),
    # log of a mass.
    ("bad = log(M)", (11, 11), ["log", "mass", "M", "kg"]),
    # sin of a time.
    ("bad = sin(t)", (11, 11), ["sin", "time", "t"]),
    # sqrt is fine on any dimension, but ln is not.
    ("bad = ln(t/2)", (10, 12), ["ln", "time"]),
    # A dimensional exponent: points at the exponent.
    ("bad = 2^r_s", (9, 11), ["exponent", "length", "r_s"]),
    ("bad = r_s^t", (11, 11), ["exponent", "time", "t"]),
    # A unit power outside the brackets: refused with the hint to write it inside.
    ("bad = 3 [m]^2", (12, 12), ["[m^2]"]),
    # An offset temperature in a product: points at its bracket.
    ("bad = 2 * 25 [degC]", (11, 19), ["degC", "product"]),
    # min/max need one dimension.
    ("bad = min(r_s, t)", (11, 16), ["min", "length", "time"]),
    # A comparison needs one dimension: the claim names both sides.
    ("check r_s < t", (7, 13), ["length", "r_s", "time", "t"]),
    ("check r_s == 1 [s] within 2%", (7, 19), ["length", "time"]),
]


def _column(message: str, line: int) -> int:
    match = re.match(rf"line {line}, col (\d+): ", message)
    assert match is not None, message
    return int(match.group(1))


@pytest.mark.parametrize(("statement", "span", "words"), CASES)
def test_dimension_error_is_located_and_names_both_sides(
    run_sheet, statement: str, span: tuple[int, int], words: list[str]
) -> None:
    results = run_sheet(GIVENS + statement)
    assert [r.status for r in results[:3]] == ["ok", "ok", "ok"]
    result = results[3]
    assert result.status == "error"
    assert result.message is not None
    assert span[0] <= _column(result.message, 4) <= span[1], (span, result.message)
    for word in words:
        assert word in result.message, (word, result.message)


def test_continued_line_reports_the_line_of_the_operator(run_sheet) -> None:
    # The statement starts on line 4 and its '+' is on line 4, col 13; the second operand
    # is on line 5.
    results = run_sheet(GIVENS + "bad2 = (r_s +\n   t)\n")
    assert results[3].line == 4
    assert results[3].status == "error"
    assert results[3].message.startswith("line 4, col 13: cannot add length")


@pytest.mark.parametrize(
    ("expression", "span", "words"),
    [
        # Same rules for a single calc expression (line 1).
        ("1 [m] + 1 [s]", (7, 7), ["cannot add", "length", "1 [m]", "time", "1 [s]"]),
        ("1 [kg] - 1 [K]", (8, 8), ["mass", "temperature"]),
        ("exp(x_)", (5, 6), ["unknown name"]),
        ("2^(3 [m])", (3, 9), ["exponent", "length"]),
        ("cos(1 [m]/(1 [s]))", (5, 17), ["cos", "velocity"]),
        ("(25 [degC])*2", (2, 10), ["degC"]),
        ("25 [degC] + 1 [K]", (1, 9), ["degC"]),
    ],
)
def test_calc_dimension_errors(
    ctx, expression: str, span: tuple[int, int], words: list[str]
) -> None:
    result = calculate(ctx, expression)
    assert result.status == "error"
    # The column must lie inside the offending operand or on its operator.
    assert span[0] <= _column(result.message, 1) <= span[1], (span, result.message)
    for word in words:
        assert word in result.message, (word, result.message)


@pytest.mark.parametrize(
    "expression",
    [
        # Dimensionless combinations of dimensional quantities are fine inside functions.
        "exp(1 [m]/(2 [m]))",
        "log(2*G*(1 [M_sun])/c^2/(1 [km]))",
        "sin(3 [s]/(1 [s]))",
        # A number to a dimensionless, numeric power.
        "(4 [m^2])^(1/2)",
        # A lone offset temperature and its conversion are allowed.
        "25 [degC]",
    ],
)
def test_dimensionally_sound_expressions_evaluate(ctx, expression: str) -> None:
    result = calculate(ctx, expression)
    assert result.status == "ok", result.message


def test_offset_temperature_conversion(ctx) -> None:
    # 25 degC is 298.15 K by the definition of the Celsius scale.
    result = calculate(ctx, "25 [degC]", "K")
    assert result.status == "ok"
    assert result.value == pytest.approx(298.15, rel=1e-12)


def test_conversion_to_a_unit_of_another_dimension(ctx) -> None:
    result = calculate(ctx, "1 [m]", "s")
    assert result.status == "error"
    assert "length" in result.message and "time" in result.message
