"""The statement tree typeset as plain HTML: italics, sub and sup, CSS fractions (no script)."""

from __future__ import annotations

from fractions import Fraction
from html import escape

from worksheet.errors import ParseError
from worksheet.export.names import GREEK, SOLAR_SUBSCRIPT, SPECIAL, split_name
from worksheet.export.report import ValueText
from worksheet.syntax import tree as t
from worksheet.syntax.tree import UnitExpr
from worksheet.syntax.units import parse_unit
from worksheet.syntax.unparse import PRECEDENCE, is_quantity, precedence

MINUS = "\u2212"
THIN = "\u2009"
_OPERATORS = {"==": "=", "<": "&lt;", "<=": "≤", ">": "&gt;", ">=": "≥", "~": "∼"}
_FUNCTIONS = {"asin": "arcsin", "acos": "arccos", "atan": "arctan", "log": "ln"}
_UNIT_SIGNS = {
    "M_sun": "M<sub>⊙</sub>",
    "R_sun": "R<sub>⊙</sub>",
    "L_sun": "L<sub>⊙</sub>",
    "M_earth": "M<sub>⊕</sub>",
    "R_earth": "R<sub>⊕</sub>",
    "M_jup": "M<sub>J</sub>",
    "R_jup": "R<sub>J</sub>",
    "ohm": "Ω",
    "degC": "°C",
    "percent": "%",
    "deg": "°",
}


def name_html(name: str) -> str:
    """A sheet name as HTML: ``T_H`` is an italic T with an upright subscript H.

    >>> name_html("T_H"), name_html("hbar"), name_html("sigma_SB")
    ('<var>T</var><sub>H</sub>', '<var>ħ</var>', '<var>σ</var><sub>SB</sub>')
    """
    parts = split_name(name)
    special = SPECIAL.get(parts.base)
    base = special[0] if special else GREEK.get(parts.base, parts.base)
    out = "<var>" + escape(base) + "</var>"
    if parts.subscripts:
        subs = []
        for sub in parts.subscripts:
            if sub == SOLAR_SUBSCRIPT:
                subs.append("⊙")
            else:
                subs.append(escape(GREEK.get(sub, sub)))
        out += "<sub>" + ",".join(subs) + "</sub>"
    return out


def _sup(text: str) -> str:
    return "<sup>" + text + "</sup>"


def number_html(literal: str) -> str:
    """A decimal literal with its exponent shown as a power of ten (``5e11`` is 5 × 10¹¹)."""
    lowered = literal.lower()
    mantissa, sep, exponent = lowered.partition("e")
    if not sep:
        return escape(literal)
    sign = MINUS if exponent.startswith("-") else ""
    digits = exponent.lstrip("+-").lstrip("0") or "0"
    return escape(mantissa) + THIN + "×" + THIN + "10" + _sup(sign + digits)


def _power(power: Fraction) -> str:
    text = (
        str(abs(power.numerator))
        if power.denominator == 1
        else (f"{abs(power.numerator)}/{power.denominator}")
    )
    return (MINUS if power < 0 else "") + text


def unit_html(unit: UnitExpr) -> str:
    """A unit upright, factors separated by thin spaces, powers as superscripts.

    >>> unit_html(parse_unit("m^3/(kg*s^2)"))
    '<span class="unit">m<sup>3</sup>\u2009kg<sup>−1</sup>\u2009s<sup>−2</sup></span>'
    """
    parts = []
    for name, power in unit.factors:
        text = _UNIT_SIGNS.get(name, escape(name))
        if power != 1:
            text += _sup(_power(power))
        parts.append(text)
    body = THIN.join(parts)
    if unit.scale != 1:
        scale = (
            str(unit.scale.numerator)
            if unit.scale.denominator == 1
            else f"{float(unit.scale):.15g}"
        )
        body = number_html(scale) + (THIN + body if body else "")
    return '<span class="unit">' + (body or "1") + "</span>"


def unit_text_html(text: str | None) -> str:
    """A recorded unit string as HTML; empty when dimensionless."""
    if not text or text == "1":
        return ""
    try:
        return unit_html(parse_unit(text))
    except ParseError:
        return '<span class="unit">' + escape(text) + "</span>"


def _paren(text: str) -> str:
    return "(" + text + ")"


def frac_html(top: str, bottom: str) -> str:
    return (
        '<span class="frac"><span class="num">'
        + top
        + '</span><span class="den">'
        + bottom
        + "</span></span>"
    )


def expr_html(node: t.Expr, inline: bool = False) -> str:
    """An expression as HTML; ``inline`` writes divisions with a slash (in exponents).

    >>> from worksheet.syntax import parse_expression
    >>> expr_html(parse_expression("x^2 + 1"), inline=True)
    '<var>x</var><sup>2</sup> + 1'
    """
    if isinstance(node, t.Number):
        return number_html(node.literal)
    if isinstance(node, t.Name):
        return name_html(node.id)
    if isinstance(node, t.Unit):
        return unit_html(node.unit)
    if isinstance(node, t.Call):
        return _call_html(node, inline)
    if isinstance(node, t.Equation):
        return expr_html(node.left, inline) + " = " + expr_html(node.right, inline)
    if isinstance(node, t.Neg):
        inner = expr_html(node.operand, inline)
        if precedence(node.operand) <= 2 and not _is_fraction(node.operand, inline):
            inner = _paren(inner)
        return MINUS + inner
    if isinstance(node, t.Power):
        base = expr_html(node.base, inline)
        if precedence(node.base) <= 5 or (
            isinstance(node.base, t.Number) and not node.base.literal.isdigit()
        ):
            base = _paren(base)
        return base + _sup(expr_html(node.exponent, inline=True))
    if isinstance(node, t.BinOp):
        return _binop_html(node, inline)
    raise TypeError(f"not an expression node: {node!r}")


def _is_fraction(node: t.Expr, inline: bool) -> bool:
    return isinstance(node, t.BinOp) and node.op == "/" and not inline


def _binop_html(node: t.BinOp, inline: bool) -> str:
    if is_quantity(node):
        return expr_html(node.left, inline) + THIN + expr_html(node.right, inline)
    if node.op == "/" and not inline:
        return frac_html(expr_html(node.left), expr_html(node.right))
    mine = PRECEDENCE[node.op]
    left = expr_html(node.left, inline)
    if precedence(node.left) < mine:
        left = _paren(left)
    right = expr_html(node.right, inline)
    right_prec = precedence(node.right)
    if (
        right_prec < mine
        or isinstance(node.right, t.Neg)
        or (right_prec == mine and node.op in "-/" and not _is_fraction(node.right, inline))
    ):
        right = _paren(right)
    if node.op == "*":
        starts_with_number = right[:1].isdigit()
        return left + (THIN + "·" + THIN if starts_with_number else THIN) + right
    if node.op == "/":
        return left + "/" + right
    return left + " " + (MINUS if node.op == "-" else "+") + " " + right


def _call_html(node: t.Call, inline: bool) -> str:
    args = [expr_html(arg, inline) for arg in node.args]
    func, count = node.func, len(node.args)
    if func == "sqrt" and count == 1:
        return '√<span class="radicand">' + args[0] + "</span>"
    if func == "abs" and count == 1:
        return "|" + args[0] + "|"
    if func == "diff" and count in (2, 3):
        order = "" if count == 2 else _sup(args[2])
        top, bottom = "d" + order, "d" + args[1] + order
        shown = top + "/" + bottom if inline else frac_html(top, bottom)
        return shown + _paren(args[0])
    if func == "integrate" and count in (2, 4):
        limits = "" if count == 2 else "<sub>" + args[2] + "</sub>" + _sup(args[3])
        return "∫" + limits + THIN + args[0] + THIN + "d" + args[1]
    if func == "limit" and count == 3:
        return "lim<sub>" + args[1] + "→" + args[2] + "</sub>" + THIN + _paren(args[0])
    if func == "subs" and count == 3:
        return _paren(args[0]) + "|<sub>" + args[1] + "=" + args[2] + "</sub>"
    if func in (
        "sin",
        "cos",
        "tan",
        "sinh",
        "cosh",
        "tanh",
        "exp",
        "ln",
        "log10",
        "min",
        "max",
        "solve",
        "simplify",
        "expand",
        "factor",
        "series",
        "dsolve",
        *_FUNCTIONS,
    ):
        shown = _FUNCTIONS.get(func, func)
        if shown == "log10":
            shown = "log<sub>10</sub>"
        return shown + _paren(", ".join(args))
    return name_html(func) + _paren(", ".join(args))


def tolerance_html(tolerance: Fraction) -> str:
    percent = tolerance * 100
    if percent >= Fraction(1, 100):
        return _decimal(percent) + THIN + "%"
    return number_html(_decimal(tolerance))


def _decimal(value: Fraction) -> str:
    if value.denominator == 1:
        return str(value.numerator)
    return f"{float(value):.12g}"


def value_html(value: ValueText) -> str:
    """A recorded value: (m ± u) × 10ⁿ unit."""
    mantissa = escape(value.mantissa.replace("-", MINUS))
    if not value.finite:
        return escape(value.plain)
    if value.uncertainty is not None:
        mantissa = mantissa + " ± " + escape(value.uncertainty)
        if value.exponent is not None:
            mantissa = _paren(mantissa)
    if value.exponent is not None:
        sign = MINUS if value.exponent < 0 else ""
        mantissa += THIN + "×" + THIN + "10" + _sup(sign + str(abs(value.exponent)))
    unit = unit_text_html(value.unit)
    return mantissa + (THIN + unit if unit else "")


def operator_html(op: str) -> str:
    return _OPERATORS[op]
