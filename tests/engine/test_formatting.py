"""The recorded number notation documented in worksheet/engine/formatting.py."""

from __future__ import annotations

import pytest
import sympy

from worksheet.engine.formatting import format_expr, format_number, format_uncertainty

# (value, digits, expected text): plain decimal for decimal exponents -3 .. digits-1, else
# m.mmmeN with no '+' and no leading exponent zeros; correctly rounded from the double.
CASES = [
    (2953.2501, 4, "2953"),  # exponent 3 = digits-1: plain, no decimals
    (6.17026e-8, 4, "6.170e-8"),  # small: scientific, trailing zero kept (4 figures)
    (2.4538e11, 4, "2.454e11"),  # large: no '+' in the exponent
    (0.0617, 4, "0.06170"),  # exponent -2: plain, padded to 4 significant figures
    (-1.0, 3, "-1.00"),  # sign kept, 3 figures
    (0.0, 4, "0"),  # zero is just 0
    (-0.0, 4, "0"),  # negative zero is not recorded with a sign
    (0.001, 4, "0.001000"),  # exponent -3: the smallest plain decimal
    (0.000999, 4, "9.990e-4"),  # exponent -4: scientific
    (1234.0, 4, "1234"),  # exponent 3 with 4 digits: plain
    (12345.0, 4, "1.234e4"),  # exponent 4 > digits-1; 1.2345 rounds half-even on the double
    (9999.6, 4, "1.000e4"),  # rounding carries into a new decade: exponent after rounding
    (0.00099996, 4, "0.001000"),  # rounding carries up into the plain range
    (2.675, 3, "2.67"),  # the double is 2.67499999...: correctly rounded down
    (0.125, 2, "0.12"),  # exactly half: round half to even, as the double is exact
    (1e21, 4, "1.000e21"),  # no 'e+21'
    (1e-300, 4, "1.000e-300"),  # three-digit negative exponent
    (123456789.0, 4, "1.235e8"),
    (15.0, 1, "2e1"),  # one digit: no decimal point in the mantissa
    (7.0, 1, "7"),
    (0.05, 1, "0.05"),
    (3.14159, 6, "3.14159"),
    (-6.17026e-8, 4, "-6.170e-8"),
    (float("inf"), 4, "inf"),
    (float("-inf"), 4, "-inf"),
    (float("nan"), 4, "nan"),
]


@pytest.mark.parametrize(("value", "digits", "expected"), CASES)
def test_format_number(value: float, digits: int, expected: str) -> None:
    assert format_number(value, digits) == expected


@pytest.mark.parametrize(
    ("value", "expected"),
    [
        (0.012345, "0.012"),  # two significant figures
        (1.5e-15, "1.5e-15"),
        (12345.0, "1.2e4"),
    ],
)
def test_format_uncertainty(value: float, expected: str) -> None:
    assert format_uncertainty(value) == expected


def test_format_expr_uses_caret_for_powers() -> None:
    G, M, c, hbar = sympy.symbols("G M c hbar", positive=True)
    text = format_expr(5120 * sympy.pi * G**2 * M**3 / (hbar * c**4))
    assert "**" not in text
    assert "G^2" in text and "M^3" in text and "c^4" in text


def test_recorded_line_uses_the_notation(ctx) -> None:
    from worksheet.engine import calculate

    result = calculate(ctx, "hbar*c^3/(8*pi*G*(1 [M_sun])*k_B)", "K")
    assert result.record.endswith(" = 6.170e-8 K")
