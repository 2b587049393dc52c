"""A ``histogram`` result drawn under its cell as block bars (the text record when narrow)."""

from __future__ import annotations

from collections.abc import Sequence

from worksheet.app.chart_canvas import Row, fallback_rows
from worksheet.app.histogram_canvas import histogram_rows, is_histogram
from worksheet.app.widgets.plot_chart import MIN_CHART_WIDTH, PlotChart

HISTOGRAM_ROWS = 6


class HistogramChart(PlotChart):
    """Like ``PlotChart``, for the histogram of a sampled quantity."""

    def _rows(self, width: int) -> list[Row]:
        if self._cache is not None and self._cache[0] == width:
            return self._cache[1]
        if width >= MIN_CHART_WIDTH and is_histogram(self._data):
            rows = histogram_rows(self._data, width, HISTOGRAM_ROWS)  # type: ignore[arg-type]
        else:
            rows = fallback_rows(self._chart_lines, max(width, 1))
        self._cache = (width, rows)
        return rows


def chart_class(data: object) -> type[PlotChart]:
    """The widget class that draws ``data``: a histogram or a plot."""
    return HistogramChart if is_histogram(data) else PlotChart


def chart_widget(data: object, chart_lines: Sequence[str]) -> PlotChart:
    return chart_class(data)(data, chart_lines)  # type: ignore[arg-type]
