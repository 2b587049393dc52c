"""One calc cell on the sheet: a header, the editor and the results beneath it.

At the app's first paint the editor is a light stand-in (``CalcSource``) that the cell
swaps for the editor right after that paint (``go_live``).
"""

from __future__ import annotations

from collections.abc import Iterable
from typing import TYPE_CHECKING

from rich.text import Text
from textual.app import ComposeResult
from textual.containers import Vertical
from textual.message import Message
from textual.widgets import Static

from worksheet.app.widgets.calc_source import CalcSource
from worksheet.app.widgets.result_lines import PlotPart, ResultLines, result_parts

if TYPE_CHECKING:  # the engine, the charts and the editor load after the first paint
    from textual.widgets import TextArea

    from worksheet.app.widgets.calc_editor import CalcEditor
    from worksheet.app.widgets.plot_chart import PlotChart
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

    def __init__(
        self,
        index: int,
        text: str,
        first_line: int,
        recorded: Iterable[str] = (),
        live: bool = True,
    ) -> None:
        """``recorded``: the result lines the file holds, shown until a run replaces them;
        ``live``: with its editor (else with the first paint's stand-in until ``go_live``)."""
        super().__init__(classes="cell calc-cell")
        self.live = live
        self.index = index
        self.first_line = first_line
        self._initial = text
        recorded = tuple(recorded)
        self.recorded_count = len(recorded)
        lines = ResultLines()
        lines.show_recorded(recorded)
        self._results: list[ResultLines | PlotChart] = [lines]

    def compose(self) -> ComposeResult:
        yield Static(self._header(), classes="cell-header")
        if self.live:
            from worksheet.app.widgets.calc_editor import CalcEditor

            yield CalcEditor(self._initial)
        else:
            yield CalcSource(self._initial)
        yield self._results[0]

    async def go_live(self) -> None:
        """Put the editor in the stand-in's place, with its focus and cursor."""
        if self.live:
            return
        from worksheet.app.widgets.calc_editor import CalcEditor

        source = self.query_one(CalcSource)
        editor = CalcEditor(source.text)
        editor.display = False
        await self.mount(editor, after=source)
        self.live = True
        had_focus = self.screen.focused is source
        source.display = False
        editor.display = True
        if had_focus:
            self.screen.set_focus(editor, scroll_visible=False)
            editor.move_cursor(source.cursor)
        await source.remove()

    blank = False  # only blank notes are hidden

    @property
    def initial_text(self) -> str:
        """The text the cell was made with (its editor's text may have changed since)."""
        return self._initial

    def _header(self) -> Text:
        return Text(f"calc  from line {self.first_line}")

    @property
    def editor(self) -> CalcEditor:
        from worksheet.app.widgets.calc_editor import CalcEditor

        return self.query_one(CalcEditor)

    def on_text_area_changed(self, event: TextArea.Changed) -> None:
        # By name rather than ``@on(TextArea.Changed)``: the editor's module is not loaded
        # for the first paint.
        event.stop()
        self.post_message(self.Edited(self.index, event.text_area.text))

    def _result_widgets(self) -> list[ResultLines | PlotChart]:
        # Kept by hand: a removed widget can stay among the children for a moment.
        return list(self._results)

    def show_results(self, results: list[StatementResult]) -> None:
        """Text lines with a chart in place of each plot's text chart.

        The widgets are updated in place while the cell's sequence of text and plots stays
        the same (the usual case while typing); otherwise the ones after the first are
        replaced.
        """
        from worksheet.app.widgets.histogram_chart import chart_class, chart_widget
        from worksheet.app.widgets.plot_chart import PlotChart

        parts = result_parts(results)
        widgets = self._result_widgets()
        kinds = [
            chart_class(part.data) if isinstance(part, PlotPart) else ResultLines for part in parts
        ]
        if kinds != [type(widget) for widget in widgets]:
            for widget in widgets[1:]:
                widget.remove()
            fresh: list[ResultLines | PlotChart] = [
                chart_widget(part.data, part.chart_lines)
                if isinstance(part, PlotPart)
                else ResultLines()
                for part in parts[1:]
            ]
            if fresh:
                self.mount_all(fresh)
            widgets = [widgets[0], *fresh]
            self._results = widgets
        for widget, part in zip(widgets, parts, strict=True):
            if isinstance(widget, PlotChart) and isinstance(part, PlotPart):
                widget.show(part.data, part.chart_lines)
            elif isinstance(widget, ResultLines) and not isinstance(part, PlotPart):
                widget.show_lines(part)

    def _only_lines(self) -> ResultLines:
        """The first result widget, the others removed (for placeholders)."""
        first, *rest = self._result_widgets()
        for widget in rest:
            widget.remove()
        assert isinstance(first, ResultLines)
        self._results = [first]
        return first

    def show_waiting(self, message: str) -> None:
        self._only_lines().show_waiting(message)

    def place(self, index: int, first_line: int) -> None:
        """Update where the cell sits after edits elsewhere in the sheet."""
        self.index = index
        if first_line != self.first_line:
            self.first_line = first_line
            self.query_one(".cell-header", Static).update(self._header())

    def focus_editor(self, scroll: bool = True) -> None:
        """Focus the editor (or its stand-in, which hands the focus on when it goes)."""
        if self.live:
            self.editor.focus(scroll_visible=scroll)
        else:
            self.query_one(CalcSource).focus(scroll_visible=scroll)

    def focus_row(self, row: int, column: int = 0, scroll: bool = True) -> None:
        """Put the cursor at body row ``row`` (and ``column``, clamped) and focus the editor."""
        if not self.live:
            source = self.query_one(CalcSource)
            lines = source.text.split("\n")
            row = max(0, min(row, len(lines) - 1))
            source.cursor = (row, max(0, min(column, len(lines[row]))))
            source.focus(scroll_visible=scroll)
            return
        editor = self.editor
        editor.focus(scroll_visible=scroll)
        row = max(0, min(row, editor.document.line_count - 1))
        column = max(0, min(column, len(editor.document.get_line(row))))
        editor.move_cursor((row, column))
