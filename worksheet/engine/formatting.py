"""The recorded notation of numbers and symbolic forms (fixed, documented, deterministic).

Numbers: ``digits`` significant figures, correctly rounded from the binary double. Plain
decimal when the decimal exponent is between -3 and ``digits - 1`` (so no padding zeros
are invented: 2953, 0.06170), otherwise ``m.mmmeN`` with no ``+`` and no leading zeros in
the exponent (6.170e-8, 2.454e11). Symbolic forms: sympy's canonical term order with ``^``
for powers.
"""

from __future__ import annotations

import math
from decimal import Decimal

import sympy
from sympy.printing.str import StrPrinter


def format_number(value: float, digits: int = 4) -> str:
    """A number in the recorded notation.

    >>> format_number(2953.2501, 4), format_number(6.17026e-8, 4), format_number(2.4538e11, 4)
    ('2953', '6.170e-8', '2.454e11')
    >>> format_number(0.0617, 4), format_number(-1.0, 3), format_number(0.0, 4)
    ('0.06170', '-1.00', '0')
    """
    if value == 0:
        return "0"
    if math.isnan(value):
        return "nan"
    if math.isinf(value):
        return "inf" if value > 0 else "-inf"
    digits = max(1, min(int(digits), 17))
    mantissa, exponent_text = f"{value:.{digits - 1}e}".split("e")
    exponent = int(exponent_text)
    if -3 <= exponent <= digits - 1:
        decimals = max(digits - 1 - exponent, 0)
        return f"{value:.{decimals}f}"
    return f"{mantissa}e{exponent}"


def format_precise(value: object, digits: int = 4) -> str:
    """An mpmath number (possibly beyond the double range) in the same notation.

    >>> import mpmath
    >>> format_precise(mpmath.mpf(10) ** 434 * 1.97, 4)
    '1.970e434'
    """
    from decimal import Decimal

    import mpmath

    text = mpmath.nstr(value, 30, strip_zeros=False, min_fixed=1, max_fixed=0)
    number = Decimal(text.replace("e+", "e"))
    if number == 0:
        return "0"
    digits = max(1, min(int(digits), 17))
    mantissa, exponent_text = f"{number:.{digits - 1}e}".split("e")
    exponent = int(exponent_text)
    if -3 <= exponent <= digits - 1:
        return f"{number:.{max(digits - 1 - exponent, 0)}f}"
    return f"{mantissa}e{exponent}"


def format_uncertainty(value: float) -> str:
    """A standard uncertainty to two significant figures, in the same notation."""
    return format_number(value, 2)


class _SheetPrinter(StrPrinter):
    """sympy's string printer, with the sheet's spelling of powers and functions."""

    def _print_Pow(self, expr: sympy.Pow, rational: bool = False) -> str:
        return super()._print_Pow(expr, rational).replace("**", "^")

    def _print_Function(self, expr: sympy.Function) -> str:
        return super()._print_Function(expr)

    def _print_Abs(self, expr: sympy.Abs) -> str:
        return f"abs({self._print(expr.args[0])})"

    def _print_Min(self, expr: sympy.Min) -> str:
        return "min(" + ", ".join(self._print(a) for a in expr.args) + ")"

    def _print_Max(self, expr: sympy.Max) -> str:
        return "max(" + ", ".join(self._print(a) for a in expr.args) + ")"

    def _print_Integer(self, expr: sympy.Integer) -> str:
        """Long round numbers as the sheet writes them: 10^400 is ``1e400`` (still exact)."""
        value = int(expr)
        # Decimal has no digit limit for int -> text (Python refuses str() past 4300 digits).
        text = str(Decimal(abs(value))) if value.bit_length() > 14000 else str(abs(value))
        zeros = len(text) - len(text.rstrip("0"))
        if zeros >= 6:
            return ("-" if value < 0 else "") + f"{text[:-zeros]}e{zeros}"
        return ("-" if value < 0 else "") + text

    def _print_Exp1(self, expr: sympy.Expr) -> str:
        return "exp(1)"


_PRINTER = _SheetPrinter({"order": None})


def format_expr(expr: sympy.Expr) -> str:
    """A symbolic form as sheet-like text.

    >>> G, M, c = sympy.symbols("G M c", positive=True)
    >>> format_expr(2 * G * M / c**2)
    '2*G*M/c^2'
    """
    return _PRINTER.doprint(expr).replace("**", "^")
