"""A ``table`` statement's record read back into headers and cells, for real tables.

The engine records a sweep as fixed-width text: the statement, a header line, one line per
row, perhaps a closing note in parentheses. Cells are numbers without spaces, so the
column starts are where the first row's cells start; headers (which may hold spaces, as
in ``M [kg]``) are cut at those positions.
"""

from __future__ import annotations

import re
from dataclasses import dataclass

from worksheet.engine.formatting import format_number
from worksheet.engine.plots import PlotData

_CELL = re.compile(r"\S+")


@dataclass(frozen=True)
class Column:
    name: str
    unit: str


@dataclass(frozen=True)
class SweepTable:
    columns: tuple[Column, ...]
    rows: tuple[tuple[str, ...], ...]
    notes: tuple[str, ...]


def split_header(header: str) -> Column:
    """``T_H [K]`` into name and unit (the form the engine writes headers in)."""
    name, _, rest = header.strip().partition(" [")
    return Column(name.strip(), rest[:-1] if rest.endswith("]") else rest)


def read_table_record(record: str | None) -> SweepTable | None:
    """The table in a ``table`` record, or None when the record is not one.

    >>> read_table_record("table M = 1 [kg], 2 [kg]: T_H:\\n  M [kg]  T_H [K]\\n"
    ...                   "  1.000   1.227e23\\n  2.000   6.135e22").rows
    (('1.000', '1.227e23'), ('2.000', '6.135e22'))
    """
    if not record:
        return None
    lines = record.split("\n")[1:]
    body = [line for line in lines[1:] if line.strip() and not line.strip().startswith("(")]
    notes = tuple(line.strip() for line in lines[1:] if line.strip().startswith("("))
    if not lines or not body:
        return None
    starts = [match.start() for match in _CELL.finditer(body[0])]
    rows = tuple(tuple(_CELL.findall(line)) for line in body)
    if any(len(row) != len(starts) for row in rows):
        return None
    header = lines[0]
    bounds = [*starts[1:], len(header)]
    columns = tuple(
        split_header(header[start:end]) for start, end in zip(starts, bounds, strict=True)
    )
    return SweepTable(columns, rows, notes)


def plot_table(data: PlotData, digits: int) -> SweepTable:
    """A plot's numbers as a table (the swept column first), in the recorded notation."""
    columns = (Column(data.x_name, data.x_unit), *(Column(s.name, s.unit) for s in data.series))
    rows = tuple(
        (format_number(x, digits), *(format_number(s.values[i], digits) for s in data.series))
        for i, x in enumerate(data.x_values)
    )
    return SweepTable(columns, rows, ())


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
