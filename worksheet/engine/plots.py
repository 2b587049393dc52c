"""``plot``: quantities against a swept given, as data and as a compact text chart.

The data (``PlotData``) go to the app's terminal chart and to the SVG export; the text
chart goes into the result block, so a reader of the plain file sees the curve. Both are
deterministic: the same sheet gives the same characters and the same numbers.
"""

from __future__ import annotations

import math
from dataclasses import asdict, dataclass
from typing import TYPE_CHECKING, Any

from worksheet.engine.formatting import format_number
from worksheet.engine.results import StatementResult
from worksheet.engine.sweeps import table_columns
from worksheet.errors import EvaluationError
from worksheet.syntax import tree as t

if TYPE_CHECKING:
    from worksheet.engine.statements import StatementEvaluator

CHART_WIDTH = 56
CHART_HEIGHT = 12
MARKS = "*o+x#%@"


@dataclass(frozen=True)
class Series:
    name: str
    unit: str
    values: tuple[float, ...]


@dataclass(frozen=True)
class PlotData:
    """What a plot shows; values are in the units named, scales are 'log' or 'lin'."""

    x_name: str
    x_unit: str
    x_values: tuple[float, ...]
    x_scale: str
    series: tuple[Series, ...]
    y_scale: str

    def to_json(self) -> dict[str, Any]:
        return asdict(self)


def _split_header(header: str) -> tuple[str, str]:
    name, _, rest = header.partition(" [")
    return name, rest[:-1] if rest else ""


def plot_data(ev: StatementEvaluator, stmt: t.Plot) -> PlotData:
    headers, columns = table_columns(ev, stmt)
    x_name, x_unit = _split_header(headers[0])
    series = []
    for header, column in zip(headers[1:], columns[1:], strict=True):
        name, unit = _split_header(header)
        series.append(Series(name, unit, tuple(float(v) for v in column)))
    finite = [v for s in series for v in s.values if math.isfinite(v)]
    if stmt.y_scale is not None:
        y_scale = stmt.y_scale
    else:
        positive = finite and all(v > 0 for v in finite)
        y_scale = "log" if positive and max(finite) / min(finite) > 100 else "lin"
    x_scale = "log" if stmt.sweep.spacing == "log" else "lin"
    return PlotData(
        x_name, x_unit, tuple(float(v) for v in columns[0]), x_scale, tuple(series), y_scale
    )


def _position(value: float, low: float, high: float, cells: int) -> int:
    if high == low:
        return cells // 2
    return round((value - low) / (high - low) * (cells - 1))


def text_chart(data: PlotData, digits: int = 3) -> list[str]:
    """The chart as lines of text: y labels, a frame, x labels and a legend."""

    def scaled(value: float, scale: str) -> float | None:
        if not math.isfinite(value) or (scale == "log" and value <= 0):
            return None
        return math.log10(value) if scale == "log" else value

    xs = [scaled(x, data.x_scale) for x in data.x_values]
    points = [
        (mark, x, scaled(y, data.y_scale))
        for mark, series in zip(MARKS, data.series, strict=False)
        for x, y in zip(xs, series.values, strict=True)
    ]
    shown = [(m, x, y) for m, x, y in points if x is not None and y is not None]
    if not shown:
        return ["  (nothing to draw: no finite values on these axes)"]
    x_low, x_high = min(p[1] for p in shown), max(p[1] for p in shown)
    y_low, y_high = min(p[2] for p in shown), max(p[2] for p in shown)
    grid = [[" "] * CHART_WIDTH for _ in range(CHART_HEIGHT)]
    for mark, x, y in shown:
        column = _position(x, x_low, x_high, CHART_WIDTH)
        row = CHART_HEIGHT - 1 - _position(y, y_low, y_high, CHART_HEIGHT)
        grid[row][column] = mark

    def unscaled(value: float, scale: str) -> str:
        return format_number(10**value if scale == "log" else value, digits)

    top, bottom = unscaled(y_high, data.y_scale), unscaled(y_low, data.y_scale)
    width = max(len(top), len(bottom))
    lines = []
    for index, row in enumerate(grid):
        label = top if index == 0 else bottom if index == CHART_HEIGHT - 1 else ""
        lines.append(f"  {label:>{width}} |{''.join(row)}".rstrip())
    lines.append(f"  {'':>{width}} +{'-' * CHART_WIDTH}")
    left, right = unscaled(x_low, data.x_scale), unscaled(x_high, data.x_scale)
    gap = max(CHART_WIDTH - len(left) - len(right), 1)
    lines.append(f"  {'':>{width}}  {left}{' ' * gap}{right}")
    legend = "   ".join(
        f"{mark} {s.name}" + (f" [{s.unit}]" if s.unit else "")
        for mark, s in zip(MARKS, data.series, strict=False)
    )
    x_label = data.x_name + (f" [{data.x_unit}]" if data.x_unit else "")
    lines.append(f"  {legend}   (x: {x_label}, {data.x_scale}; y: {data.y_scale})")
    return lines


def evaluate_plot(ev: StatementEvaluator, stmt: t.Plot) -> StatementResult:
    if len(stmt.columns) > len(MARKS):
        raise EvaluationError(f"a plot shows at most {len(MARKS)} quantities", stmt.line)
    data = plot_data(ev, stmt)
    record = "\n".join([f"{stmt.source}:", *text_chart(data)])
    return StatementResult(stmt.line, "plot", stmt.source, "ok", record=record, plot=data)
