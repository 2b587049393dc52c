"""One calc cell on the sheet: a header, the editor and the results beneath it."""

from __future__ import annotations

from collections.abc import Iterable
from typing import TYPE_CHECKING

from rich.text import Text
from textual import on
from textual.app import ComposeResult
from textual.containers import Vertical
from textual.message import Message
from textual.widgets import Static, TextArea

from worksheet.app.widgets.calc_editor import CalcEditor
from worksheet.app.widgets.result_lines import ResultLines

if TYPE_CHECKING:  # the engine loads after the first paint
    from worksheet.engine import StatementResult


class CalcCellView(Vertical):
    """A calc cell; posts ``CalcCellView.Edited`` whenever its text changes.

    Stylable parts: ``.cell-header``, ``CalcEditor``, ``ResultLines``.
    """

    class Edited(Message):
        """The editor text of the cell at ``index`` changed to ``text``."""

        def __init__(self, index: int, text: str) -> None:
            super().__init__()
            self.index = index
            self.text = text

    def __init__(self, index: int, text: str, first_line: int) -> None:
        super().__init__(classes="cell calc-cell")
        self.index = index
        self.first_line = first_line
        self._initial = text

    def compose(self) -> ComposeResult:
        yield Static(self._header(), classes="cell-header")
        yield CalcEditor(self._initial)
        yield ResultLines()

    blank = False  # only blank notes are hidden

    def _header(self) -> Text:
        return Text(f"calc  from line {self.first_line}")

    @property
    def editor(self) -> CalcEditor:
        return self.query_one(CalcEditor)

    @on(TextArea.Changed)
    def _changed(self, event: TextArea.Changed) -> None:
        event.stop()
        self.post_message(self.Edited(self.index, event.text_area.text))

    def show_results(self, results: list[StatementResult]) -> None:
        self.query_one(ResultLines).show(results)

    def show_waiting(self, message: str) -> None:
        self.query_one(ResultLines).show_waiting(message)

    def show_recorded(self, lines: Iterable[str]) -> None:
        self.query_one(ResultLines).show_recorded(lines)

    def place(self, index: int, first_line: int) -> None:
        """Update where the cell sits after edits elsewhere in the sheet."""
        self.index = index
        if first_line != self.first_line:
            self.first_line = first_line
            self.query_one(".cell-header", Static).update(self._header())

    def focus_row(self, row: int, column: int = 0) -> None:
        """Put the cursor at body row ``row`` (and ``column``, clamped) and focus the editor."""
        editor = self.editor
        editor.focus()
        row = max(0, min(row, editor.document.line_count - 1))
        column = max(0, min(column, len(editor.document.get_line(row))))
        editor.move_cursor((row, column))
