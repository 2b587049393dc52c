"""A ``table`` or ``plot`` statement's numbers as headers and cells, for real tables.

Built from the structured data the engine attaches to the result (the columns of a table,
the series of a plot), never from the fixed-width record; cells are in the recorded
notation (``format_number`` to the sheet's digits), so they read as the result block does.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass

from worksheet.engine import StatementResult
from worksheet.engine.formatting import format_number
from worksheet.engine.plots import PlotData
from worksheet.engine.sweeps import TableColumn


@dataclass(frozen=True)
class Column:
    name: str
    unit: str


@dataclass(frozen=True)
class SweepTable:
    columns: tuple[Column, ...]
    rows: tuple[tuple[str, ...], ...]
    notes: tuple[str, ...]


def result_table(result: StatementResult, digits: int) -> SweepTable | None:
    """The table of a ``table`` result, or None when it has none (an error, another kind).

    >>> from worksheet.engine.sweeps import TableColumn
    >>> r = StatementResult(3, "table", "table ...", "ok", detail=(
    ...     TableColumn("M", "kg", (1.0, 2.0)), TableColumn("T_H", "K", (1.227e23, 6.135e22))))
    >>> result_table(r, 4).rows
    (('1.000', '1.227e23'), ('2.000', '6.135e22'))
    """
    detail = result.detail
    if result.kind != "table" or result.status != "ok" or not detail:
        return None
    return columns_table(detail, digits)


def columns_table(columns: Sequence[TableColumn], digits: int) -> SweepTable:
    """Columns of numbers as a table in the recorded notation; not-finite cells counted."""
    heads = tuple(Column(c.name, c.unit) for c in columns)
    count = len(columns[0].values) if columns else 0
    rows = tuple(tuple(format_number(c.values[i], digits) for c in columns) for i in range(count))
    bad = sum(1 for c in columns[1:] for v in c.values if not math.isfinite(v))
    notes = (f"({bad} cells are not finite numbers in double precision)",) if bad else ()
    return SweepTable(heads, rows, notes)


def plot_table(data: PlotData, digits: int) -> SweepTable:
    """A plot's numbers as a table (the swept column first), in the recorded notation."""
    columns = (
        TableColumn(data.x_name, data.x_unit, data.x_values),
        *(TableColumn(s.name, s.unit, s.values) for s in data.series),
    )
    return columns_table(columns, digits)


def split_number(cell: str) -> tuple[str, int | None]:
    """``2.665e12`` into mantissa and exponent; plain numbers have no exponent."""
    mantissa, sep, exponent = cell.partition("e")
    if sep and exponent.lstrip("-").isdigit():
        return mantissa, int(exponent)
    return cell, None


def is_number(cell: str) -> bool:
    try:
        float(cell)
    except ValueError:
        return False
    return cell.lower() not in ("nan", "inf", "-inf")
