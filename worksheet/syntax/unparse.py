"""Expression trees back to sheet text, for messages that quote the operands."""

from __future__ import annotations

from worksheet.syntax import tree as t

_PRECEDENCE = {"+": 1, "-": 1, "*": 2, "/": 2}


def _precedence(node: t.Expr) -> int:
    if isinstance(node, t.BinOp):
        if node.op == "*" and isinstance(node.right, t.Unit) and isinstance(node.left, t.Number):
            return 5
        return _PRECEDENCE[node.op]
    if isinstance(node, t.Neg):
        return 2
    if isinstance(node, t.Power):
        return 4
    if isinstance(node, t.Equation):
        return 0
    return 6


def to_text(node: t.Expr) -> str:
    """Sheet text for an expression, with only the parentheses it needs.

    >>> from worksheet.syntax import parse_expression
    >>> to_text(parse_expression("2*G*M/(c^2)"))
    '2*G*M/c^2'
    """
    if isinstance(node, t.Number):
        return node.literal
    if isinstance(node, t.Name):
        return node.id
    if isinstance(node, t.Unit):
        return f"[{node.unit.source}]"
    if isinstance(node, t.Call):
        return f"{node.func}({', '.join(to_text(arg) for arg in node.args)})"
    if isinstance(node, t.Equation):
        return f"{to_text(node.left)} == {to_text(node.right)}"
    if isinstance(node, t.Neg):
        inner = to_text(node.operand)
        return f"-({inner})" if _precedence(node.operand) <= 2 else f"-{inner}"
    if isinstance(node, t.Power):
        base = to_text(node.base)
        if _precedence(node.base) <= 5:
            base = f"({base})"
        exponent = to_text(node.exponent)
        if _precedence(node.exponent) < 4 or isinstance(node.exponent, t.Neg):
            exponent = f"({exponent})"
        return f"{base}^{exponent}"
    if isinstance(node, t.BinOp):
        if _precedence(node) == 5:
            return f"{to_text(node.left)} {to_text(node.right)}"
        mine = _PRECEDENCE[node.op]
        left = to_text(node.left)
        if _precedence(node.left) < mine:
            left = f"({left})"
        right = to_text(node.right)
        right_prec = _precedence(node.right)
        if right_prec < mine or (right_prec == mine and node.op in "-/"):
            right = f"({right})"
        return f"{left}{node.op}{right}" if mine == 2 else f"{left} {node.op} {right}"
    raise TypeError(f"not an expression node: {node!r}")
