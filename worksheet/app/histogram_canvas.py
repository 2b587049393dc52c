"""A sampled quantity's histogram drawn as terminal text: eighth-block bars, the median
and the 68% interval marked on a scale line, a caption.

Pure functions over plain numbers (no textual, no engine), like ``chart_canvas``; rows are
lists of ``(text, role)`` pieces that the widget colours from the theme. The marks are
characters (``|`` median, ``[`` ``]`` interval), so the picture reads without colour.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from typing import Protocol

from worksheet.app.chart_canvas import Row, tick_text

_BLOCKS = " ▁▂▃▄▅▆▇█"


class IntervalLike(Protocol):
    content: float
    low: float
    high: float


class HistogramLike(Protocol):
    """What the drawing reads from the engine's ``HistogramData`` (not imported here)."""

    name: str
    unit: str
    scale: str
    edges: tuple[float, ...]
    counts: tuple[int, ...]
    median: float
    intervals: Sequence[IntervalLike]


def is_histogram(data: object) -> bool:
    return hasattr(data, "counts") and hasattr(data, "edges")


def _position(data: HistogramLike, value: float, columns: int) -> int | None:
    def scaled(v: float) -> float | None:
        if not math.isfinite(v) or (data.scale == "log" and v <= 0):
            return None
        return math.log10(v) if data.scale == "log" else v

    low, high, at = scaled(data.edges[0]), scaled(data.edges[-1]), scaled(value)
    if low is None or high is None or at is None or high <= low:
        return None
    column = math.floor((at - low) / (high - low) * columns)
    return min(max(column, 0), columns - 1)


def histogram_rows(data: HistogramLike, width: int, height: int = 6) -> list[Row]:
    """The histogram in ``width`` columns and ``height`` rows of bars, plus three lines."""
    columns = max(width - 2, 8)
    bins = len(data.counts)
    peak = max(data.counts) if data.counts else 0
    if not bins or peak == 0:
        return [[("(no samples to draw)", "title")]]
    levels = []
    for column in range(columns):
        count = data.counts[min(column * bins // columns, bins - 1)]
        levels.append(count / peak * height * 8)
    rows: list[Row] = []
    for row in range(height):
        floor = (height - 1 - row) * 8
        text = "".join(_BLOCKS[int(min(max(level - floor, 0), 8))] for level in levels)
        rows.append([("  ", ""), (text.rstrip() or " ", "series-0")])
    scale = ["-"] * columns
    interval = data.intervals[0] if data.intervals else None
    if interval is not None:
        for value, mark in ((interval.low, "["), (interval.high, "]")):
            at = _position(data, value, columns)
            if at is not None:
                scale[at] = mark
    at = _position(data, data.median, columns)
    if at is not None:
        scale[at] = "|"
    rows.append([("  ", ""), ("".join(scale), "axis")])
    left, right = tick_text(data.edges[0]), tick_text(data.edges[-1])
    gap = max(columns - len(left) - len(right), 1)
    rows.append([("  ", ""), (left + " " * gap + right, "label")])
    unit = f" [{data.unit}]" if data.unit else ""
    caption = f"{data.name}{unit}, {data.scale} bins: | median {tick_text(data.median)}"
    if interval is not None:
        caption += f", [ ] {round(interval.content * 100)}% interval"
    rows.append([("  ", ""), (caption, "title")])
    return rows
