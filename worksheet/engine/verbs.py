"""The derivation verbs: dimension rules here, the sympy work in a budgeted worker."""

from __future__ import annotations

from typing import TYPE_CHECKING

import sympy

from worksheet.engine import symbolic_ops as ops
from worksheet.engine.bindings import Origin, unit_symbol
from worksheet.errors import (
    BudgetError,
    DimensionError,
    EvaluationError,
    NameResolutionError,
    ParseError,
)
from worksheet.syntax import tree as t
from worksheet.syntax.units import parse_unit
from worksheet.syntax.unparse import to_text
from worksheet.units.dimension import BASE_UNITS, Dimension

if TYPE_CHECKING:
    from worksheet.engine.translate import Translator, Typed


def _typed(expr: sympy.Expr, dim: Dimension) -> Typed:
    from worksheet.engine.translate import Typed

    return Typed(expr, dim)


def _describe(node: t.Expr, typed: Typed) -> str:
    from worksheet.engine.translate import describe

    return describe(node, typed)


def _infinite(expr: sympy.Expr) -> bool:
    return expr is sympy.oo or expr is sympy.S.NegativeInfinity


def _dimension_free(expr: sympy.Expr) -> bool:
    """0 and +-inf fit a bound or a limit point of any dimension."""
    return expr == 0 or _infinite(expr)


def _si_unit_expr(tr: Translator, dim: Dimension) -> sympy.Expr:
    """The coherent SI unit of ``dim`` as a product of base-unit symbols ([m], [kg], ...)."""
    result = sympy.Integer(1)
    for unit, power in zip(BASE_UNITS, dim.exponents, strict=True):
        if power:
            symbol = unit_symbol(unit)
            tr.unit_values[symbol] = 1.0
            result *= symbol ** sympy.Rational(power.numerator, power.denominator)
    return result


def _units_in_base_symbols(tr: Translator, *exprs: sympy.Expr) -> dict[sympy.Symbol, sympy.Expr]:
    """Each bracketed unit as its exact factor times SI base-unit symbols, so that sympy sees
    [m^2] = [m]^2 and can tell which root of ``x^2 - 2 [m]*x == 3 [m^2]`` is positive."""
    replacements: dict[sympy.Symbol, sympy.Expr] = {}
    for expr in exprs:
        for symbol in expr.free_symbols:
            if symbol in replacements or symbol not in tr.unit_values:
                continue
            resolved = tr.registry.resolve(parse_unit(symbol.name[1:-1]))
            factor = sympy.Rational(repr(resolved.factor))
            replacements[symbol] = factor * _si_unit_expr(tr, resolved.dimension)
    return {k: v for k, v in replacements.items() if v != k}


def _known_values(
    tr: Translator, exprs: tuple[sympy.Expr, ...], variable: sympy.Symbol
) -> dict[sympy.Symbol, float] | None:
    """SI numbers of every symbol in ``exprs`` but ``variable``; None when one has none."""
    values: dict[sympy.Symbol, float] = {}
    for expr in exprs:
        for symbol in expr.free_symbols - {variable}:
            if symbol in tr.unit_values:
                values[symbol] = tr.unit_values[symbol]
                continue
            binding = tr.lookup(symbol.name)
            if binding is None or binding.symbol != symbol or binding.value is None:
                return None
            values[symbol] = binding.value
    return values


def _has_uncertain_inputs(
    tr: Translator, exprs: tuple[sympy.Expr, ...], variable: sympy.Symbol
) -> bool:
    """Whether a numeric fallback drops an uncertainty (a given's +-, a constant's, or G's
    share in a unit such as [M_sun]); the record then says so."""
    for expr in exprs:
        for symbol in expr.free_symbols - {variable}:
            if symbol in tr.unit_values:
                names = [name for name, _ in parse_unit(symbol.name[1:-1]).factors]
                g = tr.lookup("G")
                if (
                    g is not None
                    and g.uncertainty
                    and any(
                        n.startswith("M_") and tr.lookup(f"GM_{n[2:]}") is not None for n in names
                    )
                ):
                    return True
                continue
            binding = tr.lookup(symbol.name)
            if binding is not None and (binding.gradient or binding.uncertainty):
                return True
    return False


def _fallback_note(
    tr: Translator, what: str, exprs: tuple[sympy.Expr, ...], variable: sympy.Symbol
) -> None:
    note = f"{what}: no closed form that can be computed"
    if _has_uncertain_inputs(tr, exprs, variable):
        note += "; its inputs' uncertainties are not propagated through it"
    tr.numeric_notes.append(note)


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
            if not _dimension_free(bound.expr):
                inferred = bound.dim
        if bounds and inferred is None:
            inferred = Dimension()
        variable, var_dim, scope = _variable(tr, args[1], local, name, inferred)
        for bound_node, bound in zip(args[2:], bounds, strict=True):
            if not _dimension_free(bound.expr) and bound.dim != var_dim:
                raise DimensionError(
                    f"integrate: the bound {_describe(bound_node, bound)} does not match the "
                    f"variable {args[1].id if isinstance(args[1], t.Name) else ''} "
                    f"({var_dim.name()}, {var_dim.si_unit() or '1'})",
                    bound_node.line,
                    bound_node.column,
                )
        body = tr.translate(args[0], scope, expand=True)
        call_args = (body.expr, variable, *(b.expr for b in bounds))
        try:
            result = tr.run(ops.integrate, call_args, name, node)
        except BudgetError:
            if _known_values(tr, tuple(call_args), variable) is None or not bounds:
                raise
            result = None  # no closed form within the budget: a number can still be had
        if result is None or _needs_numbers(tr, result, call_args, variable, bounds):
            result = _numeric_integral(tr, body, variable, var_dim, bounds, node)
        return _typed(result, body.dim * var_dim)
    if name == "solve":
        tr._args(node, 2, 2)
        equation = args[0]
        if not isinstance(equation, t.Equation):
            raise ParseError("solve needs an equation: solve(L == R, x)", node.line, node.column)
        variable, var_dim, scope = _variable(tr, args[1], local, name)
        left = tr.translate(equation.left, scope, expand=True)
        right = tr.translate(equation.right, scope, expand=True)
        _solve_sides_agree(equation, left, right, variable)
        in_base = _units_in_base_symbols(tr, left.expr, right.expr)
        lhs, rhs = left.expr.xreplace(in_base), right.expr.xreplace(in_base)
        roots = tr.run(ops.solve, (lhs, rhs, variable), name, node)
        if roots is None or _roots_need_numbers(tr, roots, lhs - rhs, variable):
            roots = _numeric_roots(tr, lhs - rhs, variable, var_dim, node, left.expr - right.expr)
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
        free_point = _dimension_free(point.expr) if name != "subs" else point.expr == 0
        if not free_point and point.dim != var_dim:
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


def _needs_numbers(
    tr: Translator,
    result: sympy.Expr,
    call_args: tuple[sympy.Expr, ...],
    variable: sympy.Symbol,
    bounds: list[Typed],
) -> bool:
    """A definite integral whose closed form cannot be computed (meijerg, ...) while the
    integral itself can: quadrature gives the number."""
    from worksheet.engine.numeric_fallback import computable

    if not bounds or computable(result):
        return False
    return _known_values(tr, call_args, variable) is not None


def _solve_sides_agree(
    equation: t.Equation, left: Typed, right: Typed, variable: sympy.Symbol
) -> None:
    """Both sides of solve's equation in one dimension. The error points at the side with
    the unknown in it (where the slip usually is) and names the other as the reference."""
    if left.dim == right.dim or left.expr == 0 or right.expr == 0:
        return
    sides = [(equation.left, left), (equation.right, right)]
    if variable in left.expr.free_symbols and variable not in right.expr.free_symbols:
        sides.reverse()
    (reference_node, reference), (wrong_node, wrong) = sides
    raise DimensionError(
        f"cannot solve: the side {_describe(wrong_node, wrong)} does not match the other "
        f"side, {_describe(reference_node, reference)}",
        wrong_node.line,
        wrong_node.column,
    )


def _numeric_integral(
    tr: Translator,
    body: Typed,
    variable: sympy.Symbol,
    var_dim: Dimension,
    bounds: list[Typed],
    node: t.Call,
) -> sympy.Expr:
    """Quadrature where sympy finds no closed form and every other name has a value."""
    from worksheet.engine.numeric_fallback import quadrature

    values = _known_values(tr, (body.expr, *(b.expr for b in bounds)), variable) if bounds else None
    if values is None:
        raise EvaluationError(
            f"no closed form found for the integral of {to_text(node.args[0])}; with numeric "
            "bounds and values for every other name it is integrated numerically",
            node.line,
            node.column,
        )
    try:
        number = quadrature(body.expr, variable, bounds[0].expr, bounds[1].expr, values)
    except EvaluationError as err:
        raise EvaluationError(err.message, node.line, node.column) from err
    _fallback_note(
        tr,
        "integrated numerically (mpmath quadrature)",
        (body.expr, *(b.expr for b in bounds)),
        variable,
    )
    return sympy.Float(number, 17) * _si_unit_expr(tr, body.dim * var_dim)


def _roots_need_numbers(
    tr: Translator, roots: list, difference: sympy.Expr, variable: sympy.Symbol
) -> bool:
    """Closed-form roots that cannot be computed (LambertW, ...) where a number can."""
    from worksheet.engine.numeric_fallback import computable

    if all(computable(root) for root in roots):
        return False
    return _known_values(tr, (difference,), variable) is not None


def _numeric_roots(
    tr: Translator,
    difference: sympy.Expr,
    variable: sympy.Symbol,
    var_dim: Dimension,
    node: t.Call,
    as_written: sympy.Expr,
) -> list[sympy.Expr]:
    """Bracketed numeric roots where sympy has no method and every other name has a value."""
    from worksheet.engine.numeric_fallback import SCAN_DECADES, bracketed_roots

    values = _known_values(tr, (difference,), variable)
    if values is None:
        raise EvaluationError(
            f"solve: no closed form for {variable.name}; with values for every other name it "
            "is solved numerically",
            node.line,
            node.column,
        )
    roots = bracketed_roots(difference, variable, values)
    if not roots:
        low, high = SCAN_DECADES
        raise EvaluationError(
            f"solve: no closed form, and no real root for {variable.name} between "
            f"1e{low} and 1e{high} (SI)",
            node.line,
            node.column,
        )
    _fallback_note(tr, "solved numerically (bracketed root)", (as_written,), variable)
    unit = _si_unit_expr(tr, var_dim)
    return [sympy.Float(root, 17) * unit for root in roots]


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
