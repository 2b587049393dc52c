"""One line under the sheet saying what the app is doing and whether edits are saved."""

from __future__ import annotations

from rich.text import Text
from textual.widgets import Static


class StatusLine(Static):
    """Plain text (never markup); class ``-problem`` when it reports one."""

    DEFAULT_CSS = """
    StatusLine { height: 1; }
    """

    def say(self, message: str, problem: bool = False) -> None:
        self.set_class(problem, "-problem")
        self.update(Text(message), layout=False)  # one line high: no relayout of the sheet
