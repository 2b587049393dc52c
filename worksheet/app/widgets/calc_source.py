"""A calc cell's text as the first paint draws it: coloured, framed like its editor.

A TextArea costs its module, a large stylesheet, a wrap once it knows its width and a
layout pass or two as its scroll bars settle; the first screen needs none of that to show
the sheet. The cell swaps its editor in right after the first paint; the stand-in takes
the focus an editor would have meanwhile, and the app holds the keys typed until the
editors are in (``WorksheetApp.on_event``), so nothing typed at once is lost.
"""

from __future__ import annotations

from rich.text import Text
from textual.widgets import Static

from worksheet.app.highlight import STYLE_OF, line_spans
from worksheet.app.syntax_theme import syntax_styles


def source_markup(text: str, variables: dict[str, str]) -> Text:
    """The cell's text coloured as its editor colours it (the grammar's spans)."""
    styles = syntax_styles(variables)
    shown = Text(no_wrap=False)
    for row, line in enumerate(text.split("\n")):
        if row:
            shown.append("\n")
        start = len(shown)
        shown.append(line)
        for begin, end, kind in line_spans(line):
            shown.stylize(styles[STYLE_OF[kind]], start + begin, start + end)
    return shown


class CalcSource(Static, can_focus=True):
    """Stands in for a calc cell's editor until the first paint is on screen."""

    DEFAULT_CSS = """
    CalcSource { height: auto; max-height: 30; padding: 0 2 0 1; }
    """

    def __init__(self, text: str) -> None:
        super().__init__(classes="calc-source")
        self.text = text
        self.cursor: tuple[int, int] = (0, 0)  # where the editor's cursor goes

    def on_mount(self) -> None:
        self.update(source_markup(self.text, self.app.current_theme.variables))
