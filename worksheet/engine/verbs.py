"""The derivation verbs: dimension rules here, the sympy work in a budgeted worker."""

from __future__ import annotations

from typing import TYPE_CHECKING

import sympy

from worksheet.engine import symbolic_ops as ops
from worksheet.engine.bindings import Origin
from worksheet.errors import DimensionError, EvaluationError, NameResolutionError, ParseError
from worksheet.syntax import tree as t
from worksheet.syntax.unparse import to_text
from worksheet.units.dimension import Dimension

if TYPE_CHECKING:
    from worksheet.engine.translate import Translator, Typed


def _typed(expr: sympy.Expr, dim: Dimension) -> Typed:
    from worksheet.engine.translate import Typed

    return Typed(expr, dim)


def _describe(node: t.Expr, typed: Typed) -> str:
    from worksheet.engine.translate import describe

    return describe(node, typed)


def _whole_number(node: t.Expr, what: str, most: int) -> int:
    if not isinstance(node, t.Number) or node.value.denominator != 1 or not 0 < node.value <= most:
        raise ParseError(f"{what} must be a whole number from 1 to {most}", node.line, node.column)
    return int(node.value)


def _variable(
    tr: Translator,
    node: t.Expr,
    local: dict[str, Typed],
    verb: str,
    inferred: Dimension | None = None,
) -> tuple[sympy.Symbol, Dimension, dict[str, Typed]]:
    """The symbol a verb works in, and the local names to translate its body with."""
    if not isinstance(node, t.Name):
        raise ParseError(
            f"{verb}: the variable must be a name, not {to_text(node)}", node.line, node.column
        )
    if node.id in local:
        typed = local[node.id]
        if not typed.expr.is_Symbol:
            raise ParseError(
                f"{verb}: '{node.id}' is not a plain symbol here", node.line, node.column
            )
        return typed.expr, typed.dim, local
    binding = tr.lookup(node.id)
    if binding is not None:
        if binding.origin in (Origin.GIVEN, Origin.DECLARED):
            tr.used.append(node.id)
            return binding.symbol, binding.dimension, local
        raise NameResolutionError(
            f"{verb}: '{node.id}' is {binding.origin.value}, not a symbol to work in; "
            f"declare one, e.g. {node.id}_ : [unit]"
            if binding.origin is not Origin.DERIVED
            else f"{verb}: '{node.id}' is derived (line {binding.line}); work in the quantity "
            "it is derived from, or declare a new symbol",
            node.line,
            node.column,
        )
    if inferred is None:
        raise NameResolutionError(
            f"{verb}: unknown variable '{node.id}'; declare it first, e.g. {node.id} : [kg]",
            node.line,
            node.column,
        )
    symbol = sympy.Symbol(node.id, positive=True)
    scope = dict(local)
    scope[node.id] = _typed(symbol, inferred)
    return symbol, inferred, scope


def _same_dimension(
    what: str, left_node: t.Expr, left: Typed, right_node: t.Expr, right: Typed, at: t.Node
) -> None:
    if left.dim != right.dim and left.expr != 0 and right.expr != 0:
        raise DimensionError(
            f"{what}: {_describe(left_node, left)} and {_describe(right_node, right)} differ",
            at.line,
            at.column,
        )


def translate_verb(tr: Translator, node: t.Call, local: dict[str, Typed]) -> Typed:
    name = node.func
    args = node.args
    if name in ("simplify", "expand", "factor"):
        (arg,) = tr._args(node, 1, 1)
        body = tr.translate(arg, local, expand=True)
        function = {"simplify": ops.simplify, "expand": ops.expand, "factor": ops.factor}[name]
        return _typed(tr.run(function, (body.expr,), name, node), body.dim)
    if name == "diff":
        tr._args(node, 2, 3)
        variable, var_dim, scope = _variable(tr, args[1], local, name)
        order = _whole_number(args[2], "the order of diff", 20) if len(args) == 3 else 1
        body = tr.translate(args[0], scope, expand=True)
        result = tr.run(ops.differentiate, (body.expr, variable, order), name, node)
        return _typed(result, body.dim / var_dim**order)
    if name == "integrate":
        tr._args(node, 2, 4)
        if len(args) == 3:
            raise ParseError("integrate takes (f, x) or (f, x, from, to)", node.line, node.column)
        bounds: list[Typed] = [tr.translate(arg, local, expand=True) for arg in args[2:]]
        inferred = None
        for bound in bounds:
            if bound.expr != 0:
                inferred = bound.dim
        if bounds and inferred is None:
            inferred = Dimension()
        variable, var_dim, scope = _variable(tr, args[1], local, name, inferred)
        for bound_node, bound in zip(args[2:], bounds, strict=True):
            if bound.expr != 0 and bound.dim != var_dim:
                raise DimensionError(
                    f"integrate: the bound {_describe(bound_node, bound)} does not match the "
                    f"variable {args[1].id if isinstance(args[1], t.Name) else ''} "
                    f"({var_dim.name()}, {var_dim.si_unit() or '1'})",
                    bound_node.line,
                    bound_node.column,
                )
        body = tr.translate(args[0], scope, expand=True)
        call_args = (body.expr, variable, *(b.expr for b in bounds))
        return _typed(tr.run(ops.integrate, call_args, name, node), body.dim * var_dim)
    if name == "solve":
        tr._args(node, 2, 2)
        equation = args[0]
        if not isinstance(equation, t.Equation):
            raise ParseError("solve needs an equation: solve(L == R, x)", node.line, node.column)
        variable, var_dim, scope = _variable(tr, args[1], local, name)
        left = tr.translate(equation.left, scope, expand=True)
        right = tr.translate(equation.right, scope, expand=True)
        _same_dimension(
            "cannot solve, the two sides", equation.left, left, equation.right, right, equation
        )
        roots = tr.run(ops.solve, (left.expr, right.expr, variable), name, node)
        assert isinstance(roots, list)
        if not roots:
            raise EvaluationError(
                f"solve: no real solution for {variable.name}", node.line, node.column
            )
        if len(roots) > 1:
            shown = "; ".join(str(root) for root in roots)
            raise EvaluationError(
                f"solve: {len(roots)} solutions for {variable.name} remain: {shown}",
                node.line,
                node.column,
            )
        return _typed(roots[0], var_dim)
    if name in ("series", "limit", "subs"):
        counts = {"series": (4, 4), "limit": (3, 3), "subs": (3, 3)}[name]
        tr._args(node, *counts)
        variable, var_dim, scope = _variable(tr, args[1], local, name)
        body = tr.translate(args[0], scope, expand=True)
        point = tr.translate(args[2], local, expand=True)
        if point.expr != 0 and point.dim != var_dim:
            raise DimensionError(
                f"{name}: {_describe(args[2], point)} does not match the variable "
                f"{variable.name} ({var_dim.name()}, {var_dim.si_unit() or '1'})",
                args[2].line,
                args[2].column,
            )
        if name == "series":
            order = _whole_number(args[3], "the order of series", 30)
            result = tr.run(ops.series, (body.expr, variable, point.expr, order), name, node)
        elif name == "limit":
            result = tr.run(ops.limit, (body.expr, variable, point.expr), name, node)
        else:
            result = tr.run(ops.substitute, (body.expr, variable, point.expr), name, node)
        return _typed(result, body.dim)
    if name == "dsolve":
        return _dsolve(tr, node, local)
    raise ParseError(f"unknown verb {name}", node.line, node.column)


def _dsolve(tr: Translator, node: t.Call, local: dict[str, Typed]) -> Typed:
    """``dsolve(diff(M, t) == -a/M^2, M, t, t0, M0)``: M(t) with M(t0) = M0."""
    tr._args(node, 5, 5)
    equation, unknown_node, variable_node, start_node, initial_node = node.args
    if not isinstance(equation, t.Equation):
        raise ParseError(
            "dsolve needs an equation first: dsolve(diff(M, t) == f, M, t, t0, M0)",
            node.line,
            node.column,
        )
    start = tr.translate(start_node, local, expand=True)
    inferred = start.dim if start.expr != 0 else None
    variable, _, scope = _variable(tr, variable_node, local, "dsolve", inferred)
    unknown, unknown_dim, _ = _variable(tr, unknown_node, local, "dsolve")
    initial = tr.translate(initial_node, local, expand=True)
    if initial.expr != 0 and initial.dim != unknown_dim:
        raise DimensionError(
            f"dsolve: the initial value {_describe(initial_node, initial)} does not match "
            f"{unknown.name} ({unknown_dim.name()}, {unknown_dim.si_unit() or '1'})",
            initial_node.line,
            initial_node.column,
        )
    function = sympy.Function(unknown.name)(variable)
    scope = dict(scope)
    scope[unknown.name] = _typed(function, unknown_dim)
    left = tr.translate(equation.left, scope, expand=True)
    right = tr.translate(equation.right, scope, expand=True)
    _same_dimension("dsolve: the two sides", equation.left, left, equation.right, right, equation)
    result = tr.run(
        ops.dsolve,
        (left.expr, right.expr, function, variable, start.expr, initial.expr),
        "dsolve",
        node,
    )
    return _typed(result, unknown_dim)
