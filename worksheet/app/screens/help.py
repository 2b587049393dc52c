"""Every key of the app and what it does."""

from __future__ import annotations

from typing import ClassVar

from rich.table import Table
from rich.text import Text
from textual.app import ComposeResult
from textual.binding import Binding, BindingType
from textual.containers import VerticalScroll
from textual.screen import ModalScreen
from textual.widgets import Static

from worksheet.app.keys import KEY_ACTIONS

EXTRA_KEYS = (
    ("tab / shift+tab", "Move to the next / previous cell or panel"),
    ("ctrl+p", "Command palette: every action by name"),
    ("enter (quantities)", "Choose a quantity; enter on a link jumps to its line"),
    ("escape", "Close this screen or a dialog"),
)


class HelpScreen(ModalScreen[None]):
    """A list of keys; escape or the help key closes it."""

    BINDINGS: ClassVar[list[BindingType]] = [
        Binding("escape", "close", "Close"),
        Binding("f1", "close", "Close"),
    ]

    def compose(self) -> ComposeResult:
        rows = [(k.key, k.description) for k in KEY_ACTIONS] + list(EXTRA_KEYS)
        # Two columns, so a description that wraps stays under its own column.
        grid = Table.grid(padding=(0, 2))
        grid.add_column(no_wrap=True, style="bold")
        grid.add_column(ratio=1)
        for key, description in rows:
            grid.add_row(Text(key), Text(description))
        with VerticalScroll(classes="dialog help"):
            yield Static(Text("Keys\n"))
            yield Static(grid)

    def action_close(self) -> None:
        self.dismiss(None)
