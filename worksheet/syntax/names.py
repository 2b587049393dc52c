"""Which names a statement refers to, read off its tree (for the dependency graph)."""

from __future__ import annotations

from worksheet.syntax import tree as t

VERB_NAMES = frozenset(
    {
        "diff",
        "integrate",
        "solve",
        "simplify",
        "expand",
        "factor",
        "series",
        "limit",
        "dsolve",
        "subs",
    }
)
"""The derivation verbs (symbolic work, run in the worker process)."""


def _expr_names(expr: t.Expr | None) -> set[str]:
    names: set[str] = set()
    if expr is None:
        return names
    stack: list[t.Expr] = [expr]
    push = stack.append
    while stack:  # by exact type: the tree's node classes have no subclasses
        node = stack.pop()
        kind = type(node)
        if kind is t.Name:
            names.add(node.id)  # type: ignore[union-attr]
        elif kind is t.BinOp or kind is t.Equation:
            push(node.left)  # type: ignore[union-attr]
            push(node.right)  # type: ignore[union-attr]
        elif kind is t.Power:
            push(node.base)  # type: ignore[union-attr]
            push(node.exponent)  # type: ignore[union-attr]
        elif kind is t.Neg:
            push(node.operand)  # type: ignore[union-attr]
        elif kind is t.Call:
            names.add(node.func)  # type: ignore[union-attr]
            stack.extend(node.args)  # type: ignore[union-attr]
    return names


def referenced_names(stmt: t.AnyStatement) -> set[str]:
    """Names a statement may read (an over-estimate: verb variables are included).

    >>> from worksheet.syntax import parse_statement
    >>> sorted(referenced_names(parse_statement("T(m) = hbar/(m*c)")))
    ['c', 'hbar']
    """
    if isinstance(stmt, t.Definition):
        names = _expr_names(stmt.expr)
        if stmt.uncertainty is not None:
            names |= _expr_names(stmt.uncertainty.absolute)
        if stmt.ranged is not None:
            names |= _expr_names(stmt.ranged.high)
        return names
    if isinstance(stmt, t.Relation):
        return _expr_names(stmt.expr) - set(stmt.params)
    if isinstance(stmt, t.Display):
        return _expr_names(stmt.expr)
    if isinstance(stmt, t.Check):
        return (
            _expr_names(stmt.left) | _expr_names(stmt.right) | _expr_names(stmt.absolute_tolerance)
        )
    if isinstance(stmt, t.Scaling):
        names = {stmt.target}
        for name, expr in stmt.around:
            names |= {name} | _expr_names(expr)
        return names
    if isinstance(stmt, t.Table | t.Plot):
        names = {stmt.sweep.name} | {column for column, _ in stmt.columns}
        for expr in stmt.sweep.values:
            names |= _expr_names(expr)
        return names
    if isinstance(stmt, t.Estimate):
        return set(stmt.inputs)
    if isinstance(stmt, t.Variance | t.Histogram):
        return {stmt.target}
    return set()
