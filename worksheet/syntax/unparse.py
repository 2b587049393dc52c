"""Expression trees back to sheet text, for messages that quote the operands."""

from __future__ import annotations

from worksheet.syntax import tree as t

PRECEDENCE = {"+": 1, "-": 1, "*": 2, "/": 2}
"""Binding strength of the binary operators; a quantity is 5, a power 4, an atom 6."""


def is_quantity(node: t.Expr) -> bool:
    """``5 [kg]``: a number with its unit, which binds tighter than any operator."""
    return (
        isinstance(node, t.BinOp)
        and node.op == "*"
        and isinstance(node.left, t.Number)
        and isinstance(node.right, t.Unit)
    )


def precedence(node: t.Expr) -> int:
    """How tightly a node binds, for deciding where a writer needs parentheses."""
    if isinstance(node, t.BinOp):
        return 5 if is_quantity(node) else PRECEDENCE[node.op]
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
        return f"-({inner})" if precedence(node.operand) <= 2 else f"-{inner}"
    if isinstance(node, t.Power):
        base = to_text(node.base)
        if precedence(node.base) <= 5:
            base = f"({base})"
        exponent = to_text(node.exponent)
        if precedence(node.exponent) < 4 or isinstance(node.exponent, t.Neg):
            exponent = f"({exponent})"
        return f"{base}^{exponent}"
    if isinstance(node, t.BinOp):
        if precedence(node) == 5:
            return f"{to_text(node.left)} {to_text(node.right)}"
        mine = PRECEDENCE[node.op]
        left = to_text(node.left)
        if precedence(node.left) < mine:
            left = f"({left})"
        right = to_text(node.right)
        right_prec = precedence(node.right)
        if right_prec < mine or (right_prec == mine and node.op in "-/"):
            right = f"({right})"
        return f"{left}{node.op}{right}" if mine == 2 else f"{left} {node.op} {right}"
    raise TypeError(f"not an expression node: {node!r}")
