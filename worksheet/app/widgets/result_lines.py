"""The results recorded for one calc cell, each line marked by a word, not colour alone."""

from __future__ import annotations

from collections.abc import Iterable

from rich.text import Text
from textual.containers import Vertical
from textual.widgets import Static

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


class ResultLines(Vertical):
    """One line per statement result; CSS classes ``-ok -failed -error -skipped -stale``."""

    DEFAULT_CSS = """
    ResultLines { height: auto; }
    ResultLines > Static { height: auto; }
    """

    def show(self, results: Iterable[StatementResult]) -> None:
        """Replace the shown lines (sheet text goes in as Text, so [kg] stays visible)."""
        self.remove_children()
        lines = []
        for result in results:
            word = STATUS_WORDS.get(result.status, result.status.upper())
            line = Static(Text(f"{word:<7} {result_text(result)}"), classes=f"-{result.status}")
            lines.append(line)
        if not lines:
            lines.append(Static(Text("(nothing to record)"), classes="-empty"))
        self.mount_all(lines)

    def show_waiting(self, message: str) -> None:
        """A placeholder while the cell is being computed."""
        self.remove_children()
        self.mount(Static(Text(message), classes="-waiting"))
