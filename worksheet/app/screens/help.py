"""Every key of the app and what it does."""

from __future__ import annotations

from typing import ClassVar

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
        width = max(len(key) for key, _ in rows) + 2
        text = Text("Keys\n\n")
        for key, description in rows:
            text.append(f"{key:<{width}}", style="bold")
            text.append(description + "\n")
        with VerticalScroll(classes="dialog help"):
            yield Static(text)

    def action_close(self) -> None:
        self.dismiss(None)
