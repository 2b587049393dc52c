"""The statement tree typeset as LaTeX math: our own writer, with siunitx for quantities."""

from __future__ import annotations

from fractions import Fraction

from worksheet.export.latex_units import unit_body, unit_latex, unit_text_latex
from worksheet.export.names import GREEK_MACRO, LETTER_MACRO, SOLAR_SUBSCRIPT, SPECIAL, split_name
from worksheet.export.report import ValueText
from worksheet.syntax import tree as t
from worksheet.syntax.unparse import PRECEDENCE, is_quantity, precedence

_FUNCTIONS = {
    "sin": "\\sin",
    "cos": "\\cos",
    "tan": "\\tan",
    "sinh": "\\sinh",
    "cosh": "\\cosh",
    "tanh": "\\tanh",
    "asin": "\\arcsin",
    "acos": "\\arccos",
    "atan": "\\arctan",
    "exp": "\\exp",
    "log": "\\ln",
    "ln": "\\ln",
    "log10": "\\log_{10}",
    "min": "\\min",
    "max": "\\max",
}
_OPERATORS = {"==": "=", "<": "<", "<=": "\\leq", ">": ">", ">=": "\\geq", "~": "\\sim"}


def _mathrm_word(text: str) -> str:
    safe = "".join(
        char if char.isascii() and char.isalnum() else f"\\text{{{char}}}" for char in text
    )
    return "\\mathrm{" + safe + "}"


def _base(base: str) -> str:
    if base in SPECIAL:
        return SPECIAL[base][1]
    if base in GREEK_MACRO:
        return GREEK_MACRO[base]
    if len(base) == 1:
        return base if base.isascii() else _unicode_letter(base)
    safe = "".join(char if char.isascii() else _unicode_letter(char) for char in base)
    return "\\mathit{" + safe + "}"


def _unicode_letter(char: str) -> str:
    if char in LETTER_MACRO:
        return LETTER_MACRO[char]
    return f"\\text{{{char}}}"


def name_latex(name: str) -> str:
    """A sheet name in math mode: ``T_H`` is ``T_{\\mathrm{H}}``, ``sigma_SB`` Greek.

    >>> name_latex("T_H"), name_latex("hbar"), name_latex("M_sun"), name_latex("x_0")
    ('T_{\\\\mathrm{H}}', '\\\\hbar', 'M_{\\\\odot}', 'x_{0}')
    """
    parts = split_name(name)
    base = _base(parts.base)
    if not parts.subscripts:
        return base
    subs = []
    for sub in parts.subscripts:
        if sub == SOLAR_SUBSCRIPT:
            subs.append("\\odot")
        elif sub in GREEK_MACRO:
            subs.append(GREEK_MACRO[sub])
        elif sub.isdigit():
            subs.append(sub)
        else:
            subs.append(_mathrm_word(sub))
    return base + "_{" + ",".join(subs) + "}"


def number_latex(literal: str) -> str:
    """A number as written: small integers bare, anything else through ``\\num``."""
    if literal.isdigit() and len(literal) <= 4:
        return literal
    return "\\num{" + literal + "}"


def _paren(text: str) -> str:
    return "\\left(" + text + "\\right)"


def expr_latex(node: t.Expr, inline: bool = False) -> str:
    """An expression in math mode; ``inline`` writes divisions with a slash (in exponents).

    >>> from worksheet.syntax import parse_expression
    >>> expr_latex(parse_expression("2*G*M/c^2"))
    '\\\\frac{2\\\\,G\\\\,M}{c^{2}}'
    """
    if isinstance(node, t.Number):
        return number_latex(node.literal)
    if isinstance(node, t.Name):
        return name_latex(node.id)
    if isinstance(node, t.Unit):
        return unit_latex(node.unit)
    if isinstance(node, t.Call):
        return _call_latex(node, inline)
    if isinstance(node, t.Equation):
        return expr_latex(node.left, inline) + " = " + expr_latex(node.right, inline)
    if isinstance(node, t.Neg):
        inner = expr_latex(node.operand, inline)
        if precedence(node.operand) <= 2 and not _is_fraction(node.operand, inline):
            inner = _paren(inner)
        return "-" + inner
    if isinstance(node, t.Power):
        base = expr_latex(node.base, inline)
        decimal_base = isinstance(node.base, t.Number) and not node.base.literal.isdigit()
        if precedence(node.base) <= 5 or decimal_base:
            base = _paren(base)
        return base + "^{" + expr_latex(node.exponent, inline=True) + "}"
    if isinstance(node, t.BinOp):
        return _binop_latex(node, inline)
    raise TypeError(f"not an expression node: {node!r}")


def _is_fraction(node: t.Expr, inline: bool) -> bool:
    return isinstance(node, t.BinOp) and node.op == "/" and not inline


def _binop_latex(node: t.BinOp, inline: bool) -> str:
    if is_quantity(node):
        assert isinstance(node.left, t.Number) and isinstance(node.right, t.Unit)
        if node.right.unit.scale == 1 and node.right.unit.factors:
            return "\\qty{" + node.left.literal + "}{" + unit_body(node.right.unit) + "}"
        return number_latex(node.left.literal) + "\\," + unit_latex(node.right.unit)
    if node.op == "/" and not inline:
        return "\\frac{" + expr_latex(node.left) + "}{" + expr_latex(node.right) + "}"
    mine = PRECEDENCE[node.op]
    left = expr_latex(node.left, inline)
    if precedence(node.left) < mine:
        left = _paren(left)
    right = expr_latex(node.right, inline)
    right_prec = precedence(node.right)
    if (
        right_prec < mine
        or isinstance(node.right, t.Neg)
        or (right_prec == mine and node.op in "-/" and not _is_fraction(node.right, inline))
    ):
        right = _paren(right)
    if node.op == "*":
        joiner = "\\cdot " if right[:1].isdigit() or right.startswith(("\\num", "\\qty")) else "\\,"
        return left + joiner + right
    if node.op == "/":
        return left + "/" + right
    return left + " " + node.op + " " + right


def _args(node: t.Call, inline: bool) -> list[str]:
    return [expr_latex(arg, inline) for arg in node.args]


def _call_latex(node: t.Call, inline: bool) -> str:
    args = _args(node, inline)
    func, count = node.func, len(node.args)
    if func == "sqrt" and count == 1:
        return "\\sqrt{" + args[0] + "}"
    if func == "abs" and count == 1:
        return "\\left|" + args[0] + "\\right|"
    if func in _FUNCTIONS:
        return _FUNCTIONS[func] + _paren(",\\,".join(args))
    if func == "diff" and count in (2, 3):
        order = "" if count == 2 else "^{" + args[2] + "}"
        return (
            "\\frac{\\mathrm{d}" + order + "}{\\mathrm{d}" + args[1] + order + "}" + _paren(args[0])
        )
    if func == "integrate" and count in (2, 4):
        limits = "" if count == 2 else "_{" + args[2] + "}^{" + args[3] + "}"
        return "\\int" + limits + args[0] + "\\,\\mathrm{d}" + args[1]
    if func == "limit" and count == 3:
        return "\\lim_{" + args[1] + "\\to " + args[2] + "}" + _paren(args[0])
    if func == "subs" and count == 3:
        return "\\left." + args[0] + "\\right|_{" + args[1] + " = " + args[2] + "}"
    if func in ("solve", "simplify", "expand", "factor", "series", "dsolve", "natural"):
        return "\\operatorname{" + func + "}" + _paren(",\\;".join(args))
    return name_latex(func) + _paren(",\\,".join(args))


def tolerance_latex(tolerance: Fraction) -> str:
    """A relative tolerance as a percentage (``2%``) or a plain number when very small."""
    percent = tolerance * 100
    if percent >= Fraction(1, 100):
        return "\\qty{" + _decimal(percent) + "}{\\percent}"
    return "\\num{" + _decimal(tolerance) + "}"


def _decimal(value: Fraction) -> str:
    if value.denominator == 1:
        return str(value.numerator)
    return f"{float(value):.12g}"


BREAKABLE_DIGITS = 8
"""Numbers with more significant digits than this may break between digit groups."""


def breakable_num(literal: str) -> str:
    """``\\num`` of a number; a long one may break between its digit groups, so it wraps
    in a narrow column instead of running off the page (it is never shortened).

    >>> breakable_num("6.67430e-11"), breakable_num("1.0545718176461564e-34")[:37]
    ('\\\\num{6.67430e-11}', '\\\\num[group-separator={\\\\,\\\\allowbreak}]')
    """
    digits = sum(char.isdigit() for char in literal.split("e")[0].split("E")[0])
    if digits > BREAKABLE_DIGITS:
        return "\\num[group-separator={\\,\\allowbreak}]{" + literal + "}"
    return "\\num{" + literal + "}"


def value_latex(value: ValueText) -> str:
    """A recorded value in math mode: its digits exactly as recorded, uncertainty, unit.

    The value and the uncertainty are separate ``\\num``s, so siunitx does not pad the value
    to the uncertainty's decimals (``10.57 \\pm 0.00024``, not ``10.57000``).
    """
    if not value.finite:
        return "\\text{" + value.plain + "}"
    unit = unit_text_latex(value.unit)
    if value.uncertainty is None:
        number = value.mantissa + ("" if value.exponent is None else " e" + str(value.exponent))
        if unit.startswith("\\unit{") and unit.endswith("}"):
            return "\\qty{" + number + "}{" + unit[len("\\unit{") : -1] + "}"
        return breakable_num(number) + ("\\," + unit if unit else "")
    number = breakable_num(value.mantissa) + " \\pm " + breakable_num(value.uncertainty)
    if value.exponent is not None:
        number = "(" + number + ") \\times 10^{" + str(value.exponent) + "}"
    return number + ("\\," + unit if unit else "")


def operator_latex(op: str) -> str:
    return _OPERATORS[op]
