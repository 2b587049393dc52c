"""``scaling`` and ``table``: quantities recomputed with some givens replaced.

Both work on a quantity's form (its expression in givens, declared symbols and constants),
so the sheet's own values stay as they are. The dimensions are checked once, on the forms;
a table then evaluates each form once on whole numpy arrays.
"""

from __future__ import annotations

import collections
import math
from dataclasses import dataclass
from fractions import Fraction
from typing import TYPE_CHECKING, Any

import sympy

from worksheet.engine import symbolic_ops as ops
from worksheet.engine.bindings import Binding, Origin
from worksheet.engine.figures import SymbolValues
from worksheet.engine.formatting import format_number
from worksheet.engine.numeric import (
    MissingValue,
    evaluate,
    evaluate_on_array,
    numpy_backend,
)
from worksheet.engine.results import StatementResult
from worksheet.errors import DimensionError, EvaluationError, NameResolutionError
from worksheet.syntax import tree as t
from worksheet.units.dimension import Dimension

if TYPE_CHECKING:
    from worksheet.engine.statements import StatementEvaluator


@dataclass(frozen=True)
class ScalingExponent:
    """One factor of a scaling form: exact where d ln X / d ln M is constant, else the
    local slope at the fiducial point (a float, recorded to three figures)."""

    name: str
    exponent: Fraction | float


@dataclass(frozen=True)
class TableColumn:
    """One column of a ``table`` in the unit its header names ("" for a pure number)."""

    name: str
    unit: str
    values: tuple[float, ...]


@dataclass(frozen=True)
class _Input:
    binding: Binding
    value: float  # SI
    shown: str  # as the record writes it, e.g. "1e12 kg"


def _input_binding(ev: StatementEvaluator, name: str, stmt: t.Statement, what: str) -> Binding:
    binding = ev.lookup(name)
    if binding is None or binding.origin not in (Origin.GIVEN, Origin.DECLARED):
        kind = "unknown" if binding is None else binding.origin.value
        raise NameResolutionError(
            f"{what}: '{name}' must be a given or a declared symbol defined above (it is {kind})",
            stmt.line,
            stmt.column,
        )
    return binding


def _target_binding(ev: StatementEvaluator, name: str, stmt: t.Statement, what: str) -> Binding:
    binding = ev.lookup(name)
    if binding is None or binding.origin in (Origin.RELATION, Origin.CONSTANT):
        raise NameResolutionError(
            f"{what}: '{name}' must be a quantity defined above", stmt.line, stmt.column
        )
    return binding


def _fiducial(ev: StatementEvaluator, binding: Binding, node: t.Expr, what: str) -> _Input:
    quantity = ev.quantity(ev.translator(), node)
    if quantity.typed.dim != binding.dimension:
        raise DimensionError(
            f"{what}: {binding.name} is {binding.dimension.name()} "
            f"({binding.dimension.si_unit() or '1'}) but the value given is "
            f"{quantity.typed.dim.name()} ({quantity.typed.dim.si_unit() or '1'})",
            node.line,
            node.column,
        )
    if quantity.si is None:
        raise EvaluationError(
            f"{what}: the value for {binding.name} must be a number", node.line, node.column
        )
    if quantity.lone_unit is not None and isinstance(node, t.BinOp):
        assert isinstance(node.left, t.Number)
        shown = f"{node.left.literal} {quantity.lone_unit.source}"
    else:
        unit = binding.dimension.si_unit()
        shown = format_number(quantity.si, ev.ctx.digits) + (f" {unit}" if unit else "")
    return _Input(binding, quantity.si, shown)


def _unit(
    ev: StatementEvaluator, unit: t.UnitExpr | None, dim: Dimension, name: str, stmt: t.Statement
) -> tuple[str, float, float]:
    if unit is None:
        return dim.si_unit(), 1.0, 0.0
    resolved = ev.ctx.registry.resolve(unit, stmt.line, stmt.column)
    if resolved.dimension != dim:
        raise DimensionError(
            f"cannot express {name}, {dim.name()} ({dim.si_unit() or '1'}), in [{unit.source}], "
            f"which is {resolved.dimension.name()} ({resolved.dimension.si_unit() or '1'})",
            stmt.line,
            stmt.column,
        )
    return unit.source, resolved.factor, resolved.offset


def _exponent_text(power: Fraction) -> str:
    if power == 1:
        return ""
    if power.denominator == 1:
        return f"^{power.numerator}"
    return f"^({power.numerator}/{power.denominator})"


def evaluate_scaling(ev: StatementEvaluator, stmt: t.Scaling) -> StatementResult:
    """``scaling X in [U] around A = a, B = b``: X at the fiducial point times power laws."""
    target = _target_binding(ev, stmt.target, stmt, "scaling")
    form = target.form()
    inputs = [
        _fiducial(ev, _input_binding(ev, name, stmt, "scaling"), node, "scaling")
        for name, node in stmt.around
    ]
    unit, factor, offset = _unit(ev, stmt.unit, target.dimension, stmt.target, stmt)
    if offset:
        raise DimensionError("scaling forms need a unit without an offset (use [K])", stmt.line)
    point = {item.binding.symbol: sympy.Float(item.value, 17) for item in inputs}
    values = collections.ChainMap(
        {item.binding.symbol: item.value for item in inputs},
        SymbolValues(ev.values, ev.ctx, "float"),
    )
    try:
        at_point = float(evaluate(form, values))
    except MissingValue as err:
        raise EvaluationError(
            f"scaling: {err.symbol.name} has no value; name it after 'around'", stmt.line
        ) from err
    if at_point == 0 or not math.isfinite(at_point):
        raise EvaluationError(
            f"scaling: {stmt.target} is {at_point} at the fiducial point", stmt.line
        )
    parts: list[str] = []
    local = []
    exponents: list[ScalingExponent] = []
    for item in inputs:
        slope = ev.translator().run(ops.log_slope, (form, item.binding.symbol), "scaling", stmt)
        assert isinstance(slope, sympy.Expr)
        if slope.is_Rational:
            power = Fraction(int(slope.p), int(slope.q))
            if power == 0:
                continue
            text = _exponent_text(power)
            exponents.append(ScalingExponent(item.binding.name, power))
        else:
            try:
                number = float(evaluate(slope.xreplace(point), values))
            except MissingValue as err:
                raise EvaluationError(
                    f"scaling: {err.symbol.name} has no value; name it after 'around'",
                    stmt.line,
                ) from err
            local.append(item.binding.name)
            text = f"^{format_number(number, 3)}"
            exponents.append(ScalingExponent(item.binding.name, number))
        parts.append(f"({item.binding.name} / {item.shown}){text}")
    value_text = format_number(at_point / factor, ev.ctx.digits) + (f" {unit}" if unit else "")
    record = f"{stmt.target} = {value_text}" + "".join(f" * {part}" for part in parts)
    if local:
        record += (
            f" (local logarithmic slopes at the fiducial point: not a power law in "
            f"{', '.join(local)})"
        )
    return StatementResult(
        stmt.line,
        "scaling",
        stmt.source,
        "ok",
        name=stmt.target,
        value=at_point / factor,
        unit=unit,
        si_value=at_point,
        si_unit=target.dimension.base_units(),
        dimension=target.dimension.name(),
        record=record,
        detail=tuple(exponents),
    )


MAX_TABLE_ROWS = 10_000


def sweep_values(ev: StatementEvaluator, stmt: t.Table, binding: Binding) -> tuple[Any, str, float]:
    """The swept input as an SI array, the unit its column is written in, and its factor."""
    np = numpy_backend().np
    ends = [_fiducial(ev, binding, node, "table") for node in stmt.sweep.values]
    first_node = stmt.sweep.values[0]
    lone = ev.quantity(ev.translator(), first_node).lone_unit
    unit, factor = (
        (lone.source, lone.factor)
        if lone is not None and not lone.is_offset
        else (binding.dimension.si_unit(), 1.0)
    )
    if stmt.sweep.spacing is None:
        return np.array([item.value for item in ends]), unit, factor
    low, high = ends[0].value, ends[1].value
    if stmt.sweep.spacing == "log":
        if low <= 0 or high <= 0:
            raise EvaluationError("a log sweep needs two positive ends", stmt.line, stmt.column)
        return np.geomspace(low, high, stmt.sweep.count), unit, factor
    return np.linspace(low, high, stmt.sweep.count), unit, factor


def table_columns(ev: StatementEvaluator, stmt: t.Table) -> tuple[list[str], list[Any]]:
    """Headers and numpy columns (in their shown units) of a ``table`` statement."""
    np = numpy_backend().np
    swept = _input_binding(ev, stmt.sweep.name, stmt, "table")
    inputs, input_unit, input_factor = sweep_values(ev, stmt, swept)
    headers = [f"{swept.name} [{input_unit}]" if input_unit else swept.name]
    columns = [inputs / input_factor]
    values = SymbolValues(ev.values, ev.ctx, "float")
    for name, unit_expr in stmt.columns:
        target = _target_binding(ev, name, stmt, "table")
        unit, factor, offset = _unit(ev, unit_expr, target.dimension, name, stmt)
        try:
            column = evaluate_on_array(target.form(), swept.symbol, inputs, values)
        except MissingValue as err:
            raise EvaluationError(
                f"table: {err.symbol.name} has no value, so {name} cannot be tabulated",
                stmt.line,
            ) from err
        column = np.broadcast_to(np.asarray(column, dtype=float), inputs.shape)
        columns.append((column - offset) / factor)
        headers.append(f"{name} [{unit}]" if unit else name)
    return headers, columns


def evaluate_table(ev: StatementEvaluator, stmt: t.Table) -> StatementResult:
    """``table M = a .. b log N: X in [U], ...``: a fixed-width table in the record."""
    headers, columns = table_columns(ev, stmt)
    digits = ev.ctx.digits
    cells = [[format_number(float(v), digits) for v in column] for column in columns]
    widths = [max(len(h), *(len(c) for c in col)) for h, col in zip(headers, cells, strict=True)]
    lines = [f"{stmt.source}:"]
    lines.append(
        "  " + "  ".join(h.ljust(w) for h, w in zip(headers, widths, strict=True)).rstrip()
    )
    for row in zip(*cells, strict=True):
        lines.append(
            "  " + "  ".join(c.ljust(w) for c, w in zip(row, widths, strict=True)).rstrip()
        )
    bad = sum(1 for col in columns[1:] for v in col if not math.isfinite(float(v)))
    if bad:
        lines.append(f"  ({bad} cells are not finite numbers in double precision)")
    return StatementResult(
        stmt.line,
        "table",
        stmt.source,
        "ok",
        name=None,
        record="\n".join(lines),
        detail=tuple(
            TableColumn(*_header_parts(header), tuple(float(v) for v in column))
            for header, column in zip(headers, columns, strict=True)
        ),
    )


def _header_parts(header: str) -> tuple[str, str]:
    """``T_H [K]`` as its name and unit (headers are built that way in table_columns)."""
    name, _, rest = header.partition(" [")
    return name, rest[:-1] if rest else ""
