"""The results recorded for one calc cell, each line marked by a word, not colour alone."""

from __future__ import annotations

from collections.abc import Iterable
from dataclasses import dataclass
from typing import TYPE_CHECKING

from rich.cells import cell_len
from textual.content import Content
from textual.widgets import Static

if TYPE_CHECKING:  # the engine and the charts load after the first paint
    from worksheet.app.chart_canvas import PlotLike
    from worksheet.engine import StatementResult

# The word shown before each result, by status (colour comes from the theme on top).
STATUS_WORDS = {
    "ok": "ok",
    "failed": "FAILED",
    "error": "ERROR",
    "skipped": "SKIPPED",
    "stale": "STALE",
}


def result_text(result: StatementResult) -> str:
    """The line shown for one result: the recorded line, or a short note when none."""
    if result.record:
        return result.record
    if result.kind == "declaration":
        return f"{result.text}  (declared {result.dimension or ''})".rstrip()
    return result.text


# The word before a line the file records, shown until the first run has checked it.
PENDING_WORD = "pending"

# How each kind of line is drawn: theme variables only, resolved when the line is drawn.
LINE_STYLES = {
    "ok": "$result-ok",
    "failed": "$result-failed bold",
    "error": "$result-error bold",
    "skipped": "$text-muted italic",
    "stale": "$result-stale",
    "pending": "$text-muted italic",
    "waiting": "$text-muted",
    "empty": "$text-muted",
}

Line = tuple[str, str]  # (kind, text)


def result_line(result: StatementResult) -> Line:
    word = STATUS_WORDS.get(result.status, result.status.upper())
    return result.status, f"{word:<7} {result_text(result)}"


@dataclass(frozen=True)
class PlotPart:
    """A plot among a cell's results: its data and the text chart lines recorded for it."""

    data: PlotLike
    chart_lines: tuple[str, ...]


Part = tuple[Line, ...] | PlotPart


def result_parts(results: Iterable[StatementResult]) -> list[Part]:
    """A cell's results as runs of text lines with plots between them, in order.

    A plot's first recorded line (``plot ...:``) stays with the text; the chart replaces
    the text chart's lines beneath it.
    """
    parts: list[Part] = []
    lines: list[Line] = []
    for result in results:
        if result.kind == "blank" and not result.record:
            continue  # a blank or comment-only line records nothing: no row for it
        data = getattr(result, "plot", None)
        if result.kind == "histogram":  # a sampled quantity's histogram (issue 13)
            data = getattr(getattr(result, "sampled", None), "histogram", None)
        if result.kind in ("plot", "histogram") and data is not None and result.record:
            head, *chart = result.record.split("\n")
            word = STATUS_WORDS.get(result.status, result.status.upper())
            lines.append((result.status, f"{word:<7} {head}"))
            parts.extend([tuple(lines), PlotPart(data, tuple(chart))])
            lines = []
        else:
            lines.append(result_line(result))
    if lines or not parts:
        parts.append(tuple(lines))
    return parts


class ResultLines(Static):
    """The lines of one cell's results in one widget (a widget a line slows long sheets).

    The text is redrawn only when a run changes it; the kinds of the lines shown are kept
    as CSS classes (``-ok -failed -error -skipped -stale -pending``) for stylesheets.
    """

    DEFAULT_CSS = """
    ResultLines { height: auto; }
    """

    def __init__(self) -> None:
        super().__init__("")
        self._shown: tuple[Line, ...] = ()

    @property
    def lines(self) -> tuple[Line, ...]:
        return self._shown

    def show(self, results: Iterable[StatementResult]) -> None:
        """Show the results (sheet text is never read as markup, so [kg] stays visible)."""
        self.show_lines(
            tuple(
                result_line(result) for result in results if result.kind != "blank" or result.record
            )
        )

    def show_lines(self, lines: tuple[Line, ...]) -> None:
        """Show lines made by ``result_line`` (a placeholder when there are none)."""
        self._show_lines(lines or (("empty", "(nothing to record)"),))

    def show_recorded(self, recorded: Iterable[str]) -> None:
        """The lines the file records, marked as not yet checked by a run."""
        lines = tuple(("pending", f"{PENDING_WORD:<7} {text}") for text in recorded)
        self._show_lines(lines or (("waiting", "computing ..."),))

    def show_waiting(self, message: str) -> None:
        """A placeholder while the cell is being computed."""
        self._show_lines((("waiting", message),))

    def _show_lines(self, lines: tuple[Line, ...]) -> None:
        if lines == self._shown:
            return
        parts: list[str | tuple[str, str]] = []
        for position, (kind, text) in enumerate(lines):
            if position:
                parts.append("\n")
            parts.append((text, LINE_STYLES.get(kind, "")))
        self.set_classes(" ".join(sorted({f"-{kind}" for kind, _ in lines})))
        # A relayout of the sheet costs milliseconds per cell: ask for one only when the
        # height can change (another number of lines, or a changed line too long to fit).
        width = self.content_size.width
        changed = [text for _kind, text in set(lines) ^ set(self._shown)]
        layout = (
            width <= 0
            or len(lines) != len(self._shown)
            or any("\n" in text or cell_len(text) >= width for text in changed)
        )
        self.update(Content.assemble(*parts), layout=layout)
        self._shown = lines
