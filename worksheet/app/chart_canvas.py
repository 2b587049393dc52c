"""A plot drawn as terminal text: braille dots for the curves, labelled axes, a legend.

Pure functions over plain numbers (no textual, no engine), so the drawing can be tested
without a screen. The result is a list of rows, each a list of ``(text, role)`` pieces;
the widget gives each role a theme colour. Every curve carries a digit at its right end
and the legend repeats the digit, so the chart reads without colour too.
"""

from __future__ import annotations

import math
import textwrap
from collections.abc import Sequence
from dataclasses import dataclass
from typing import Protocol

# Braille dot bits by (column, row) inside one character cell of 2 x 4 dots.
_DOT_BITS = ((0x01, 0x02, 0x04, 0x40), (0x08, 0x10, 0x20, 0x80))
_BRAILLE_BLANK = 0x2800
MARKS = "1234567"

Piece = tuple[str, str]  # (text, role): roles "axis", "label", "title", "series-N", ""
Row = list[Piece]


class SeriesLike(Protocol):
    name: str
    unit: str
    values: tuple[float, ...]


class PlotLike(Protocol):
    """What the chart reads from the engine's ``PlotData`` (not imported: it loads sympy)."""

    x_name: str
    x_unit: str
    x_values: tuple[float, ...]
    x_scale: str
    series: Sequence[SeriesLike]
    y_scale: str


@dataclass(frozen=True)
class Axis:
    """A value range on a linear or logarithmic scale, as positions 0..1."""

    low: float  # in scaled units (log10 of the value on a log axis)
    high: float
    log: bool

    def scaled(self, value: float) -> float | None:
        """The value in axis units; None when it cannot be drawn (not finite, <= 0 on log)."""
        if not math.isfinite(value) or (self.log and value <= 0):
            return None
        return math.log10(value) if self.log else value

    def fraction(self, scaled: float) -> float:
        return (scaled - self.low) / (self.high - self.low)


def _axis(values: Sequence[float], log: bool) -> Axis | None:
    probe = Axis(0.0, 1.0, log)
    scaled = [s for s in (probe.scaled(v) for v in values) if s is not None]
    if not scaled:
        return None
    low, high = min(scaled), max(scaled)
    if high - low < 1e-12 * max(1.0, abs(high)):
        spread = 0.5 if log else max(abs(low) * 0.1, 1.0)
        low, high = low - spread, high + spread
    return Axis(low, high, log)


def tick_text(value: float) -> str:
    """A short axis label: ``1e10``, ``0.5``, ``250``, ``-3.2e-5``."""
    if value == 0:
        return "0"
    text = f"{value:.3g}"
    if "e" in text:
        mantissa, exponent = text.split("e")
        text = f"{mantissa}e{int(exponent)}"
    return text


def _nice_step(span: float, most: int) -> float:
    raw = span / max(most, 1)
    power = 10 ** math.floor(math.log10(raw))
    for factor in (1, 2, 5, 10):
        if factor * power >= raw:
            return factor * power
    return 10 * power


def ticks(axis: Axis, most: int) -> list[tuple[float, str]]:
    """Tick positions (in axis units) with labels: whole decades on a log axis, 1-2-5 steps
    on a linear one; the two ends when no tick falls inside the range."""
    most = max(most, 2)
    found: list[tuple[float, str]] = []
    if axis.log:
        first, last = math.ceil(axis.low - 1e-9), math.floor(axis.high + 1e-9)
        if last >= first:
            stride = max(1, math.ceil((last - first + 1) / most))
            found = [(float(k), tick_text(10.0**k)) for k in range(first, last + 1, stride)]
    else:
        step = _nice_step(axis.high - axis.low, most - 1)
        start = math.ceil(axis.low / step - 1e-9)
        value = start * step
        while value <= axis.high + step * 1e-9 and len(found) <= most:
            found.append((value, tick_text(0.0 if abs(value) < step * 1e-9 else value)))
            value += step
    if not found:
        ends = (axis.low, axis.high)
        found = [(v, tick_text(10.0**v if axis.log else v)) for v in ends]
    return found


def _line_dots(a: tuple[int, int], b: tuple[int, int]) -> list[tuple[int, int]]:
    """The dots of a straight segment between two dot positions (both ends included)."""
    (x0, y0), (x1, y1) = a, b
    steps = max(abs(x1 - x0), abs(y1 - y0), 1)
    return [
        (round(x0 + (x1 - x0) * k / steps), round(y0 + (y1 - y0) * k / steps))
        for k in range(steps + 1)
    ]


def legend_rows(data: PlotLike, width: int) -> list[Row]:
    """``1 T_H [K]   2 t_ev [yr]`` wrapped to ``width``, each entry in its series' role."""
    entries = []
    for index, series in enumerate(data.series[: len(MARKS)]):
        unit = f" [{series.unit}]" if series.unit else ""
        entries.append((f"{MARKS[index]} {series.name}{unit}", f"series-{index}"))
    rows: list[Row] = [[]]
    used = 0
    for text, role in entries:
        gap = 3 if rows[-1] else 0
        if rows[-1] and used + gap + len(text) > width:
            rows.append([])
            used, gap = 0, 0
        if gap:
            rows[-1].append((" " * gap, ""))
        rows[-1].append((text, role))
        used += gap + len(text)
    return rows


def _axis_title(name: str, unit: str, log: bool) -> str:
    unit_text = f" [{unit}]" if unit else ""
    return f"{name}{unit_text}" + (", log scale" if log else "")


def _y_title(data: PlotLike) -> str:
    units = []
    for series in data.series:
        if series.unit not in units:
            units.append(series.unit)
    if len(units) == 1:
        unit = f"[{units[0]}]" if units[0] else "no unit"
    else:
        unit = "units in the legend"
    return f"y: {unit}" + (", log scale" if data.y_scale == "log" else "")


def draw_chart(data: PlotLike, width: int, plot_rows: int = 10) -> list[Row]:
    """The whole chart in ``width`` columns: y title, plot rows, x axis, x title, legend."""
    x_axis = _axis(data.x_values, data.x_scale == "log")
    ys = [v for series in data.series for v in series.values]
    y_axis = _axis(ys, data.y_scale == "log")
    legend = legend_rows(data, width)
    if x_axis is None or y_axis is None:
        note: Row = [("(nothing to draw: no finite values on these axes)", "title")]
        return [note, *legend]
    y_ticks = ticks(y_axis, max(2, plot_rows // 2))
    label_width = max(len(text) for _, text in y_ticks)
    plot_width = max(width - label_width - 2, 4)
    dots_x, dots_y = plot_width * 2, plot_rows * 4

    def dot_row(scaled: float) -> int:
        return round((1 - y_axis.fraction(scaled)) * (dots_y - 1))

    def dot_column(scaled: float) -> int:
        return round(x_axis.fraction(scaled) * (dots_x - 1))

    cells: dict[tuple[int, int], dict[int, int]] = {}  # (row, col) -> series -> bits
    ends: dict[tuple[int, int], int] = {}
    xs = [x_axis.scaled(x) for x in data.x_values]
    for index, series in enumerate(data.series[: len(MARKS)]):
        previous: tuple[int, int] | None = None
        last: tuple[int, int] | None = None
        for x, value in zip(xs, series.values, strict=False):
            y = y_axis.scaled(value)
            if x is None or y is None:
                previous = None  # a gap: the curve is not joined across it
                continue
            here = (dot_column(x), dot_row(y))
            for column, row in _line_dots(previous or here, here):
                key = (row // 4, column // 2)
                bits = cells.setdefault(key, {})
                bits[index] = bits.get(index, 0) | _DOT_BITS[column % 2][row % 4]
            previous = last = here
        if last is not None:
            ends[(last[1] // 4, last[0] // 2)] = index

    label_of_row: dict[int, str] = {}
    for value, text in y_ticks:
        label_of_row.setdefault(dot_row(value) // 4, text)
    rows: list[Row] = [[(" " * (label_width + 1) + _y_title(data), "title")]]
    for row in range(plot_rows):
        label = label_of_row.get(row, "")
        pieces: Row = [(f"{label:>{label_width}}", "label"), ("┤" if label else "│", "axis")]
        for column in range(plot_width):
            if (row, column) in ends:
                index = ends[(row, column)]
                pieces.append((MARKS[index], f"series-{index}"))
                continue
            bits = cells.get((row, column))
            if not bits:
                pieces.append((" ", ""))
                continue
            strongest = max(bits, key=lambda i: (bin(bits[i]).count("1"), -i))
            union = 0
            for value in bits.values():
                union |= value
            pieces.append((chr(_BRAILLE_BLANK + union), f"series-{strongest}"))
        rows.append(_merged(pieces))
    axis_line = ["─"] * plot_width
    label_line = [" "] * plot_width
    free_from = 0
    for value, text in ticks(x_axis, max(2, plot_width // 12)):
        column = dot_column(value) // 2
        start = min(max(column - len(text) // 2, 0), plot_width - len(text))
        if start < free_from or start < 0:
            continue
        axis_line[column] = "┬"
        label_line[start : start + len(text)] = list(text)
        free_from = start + len(text) + 1
    rows.append([(" " * label_width + "└" + "".join(axis_line), "axis")])
    rows.append([(" " * (label_width + 1) + "".join(label_line).rstrip(), "label")])
    title = _axis_title(data.x_name, data.x_unit, x_axis.log)
    rows.append([(f"{' ' * (label_width + 1)}x: {title}", "title")])
    return rows + legend


def _merged(pieces: Row) -> Row:
    """Neighbouring pieces of one role joined (fewer spans to style)."""
    merged: Row = []
    for text, role in pieces:
        if merged and merged[-1][1] == role:
            merged[-1] = (merged[-1][0] + text, role)
        else:
            merged.append((text, role))
    return merged


def fallback_rows(chart_lines: Sequence[str], width: int) -> list[Row]:
    """The text chart the file records, for a space too narrow for ``draw_chart``.

    Its lines are kept as they are (cut at the edge by the widget), except the last one,
    the legend, which is folded to the width so that names and units stay readable.
    """
    if not chart_lines:
        return [[("(no chart recorded)", "title")]]
    *body, legend = chart_lines
    folded = textwrap.wrap(
        legend.strip(), max(width - 2, 8), initial_indent="  ", subsequent_indent="  "
    ) or [legend]
    return [[(line, "label")] for line in [*body, *folded]]
