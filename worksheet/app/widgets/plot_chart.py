"""One plot result drawn as a terminal chart under its cell (the text chart when narrow)."""

from __future__ import annotations

from collections.abc import Sequence

from textual.content import Content
from textual.geometry import Size
from textual.widget import Widget

from worksheet.app.chart_canvas import PlotLike, Row, draw_chart, fallback_rows

# Below this many columns the braille chart has too little room: the text chart is shown.
MIN_CHART_WIDTH = 40
PLOT_ROWS = 10

# Colours of the chart's parts: theme variables only, resolved when the chart is drawn.
ROLE_STYLES = {
    "axis": "$text-muted",
    "label": "$foreground",
    "title": "$text-muted italic",
    "": "",
}
SERIES_STYLES = (
    "$accent",
    "$primary",
    "$success",
    "$warning",
    "$secondary",
    "$error",
    "$foreground",
)


def _style(role: str) -> str:
    if role.startswith("series-"):
        return SERIES_STYLES[int(role.removeprefix("series-")) % len(SERIES_STYLES)]
    return ROLE_STYLES.get(role, "")


class PlotChart(Widget):
    """Draws ``data`` in the width it gets, or the recorded text chart when that is narrow.

    ``chart_lines`` are the text chart's lines the engine recorded for the same plot.
    """

    DEFAULT_CSS = """
    PlotChart { height: auto; padding: 0 1; text-wrap: nowrap; text-overflow: clip; }
    """

    def __init__(self, data: PlotLike, chart_lines: Sequence[str]) -> None:
        super().__init__()
        self._data = data
        self._chart_lines = tuple(chart_lines)
        self._cache: tuple[int, list[Row]] | None = None

    @property
    def data(self) -> PlotLike:
        return self._data

    def show(self, data: PlotLike, chart_lines: Sequence[str]) -> None:
        """Draw another plot here (a new run); nothing happens when it is the same."""
        lines = tuple(chart_lines)
        if (data is self._data or data == self._data) and lines == self._chart_lines:
            return
        old_height = len(self._rows(self._cache[0])) if self._cache else None
        self._data, self._chart_lines, self._cache = data, lines, None
        width = self.content_size.width
        self.refresh(layout=old_height is None or len(self._rows(width)) != old_height)

    def _rows(self, width: int) -> list[Row]:
        if self._cache is not None and self._cache[0] == width:
            return self._cache[1]
        if width >= MIN_CHART_WIDTH:
            rows = draw_chart(self._data, width, PLOT_ROWS)
        else:
            rows = fallback_rows(self._chart_lines, max(width, 1))
        self._cache = (width, rows)
        return rows

    @property
    def showing_text_chart(self) -> bool:
        """Whether the space is too narrow for the chart, so the text chart is shown."""
        return self.content_size.width < MIN_CHART_WIDTH

    def get_content_height(self, container: Size, viewport: Size, width: int) -> int:
        return len(self._rows(width))

    def render(self) -> Content:
        parts: list[str | tuple[str, str]] = []
        for index, row in enumerate(self._rows(self.content_size.width)):
            if index:
                parts.append("\n")
            parts.extend((text, _style(role)) for text, role in row)
        return Content.assemble(*parts)
