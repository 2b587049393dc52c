"""A question with a few answers, as a modal screen handing back the chosen answer's id."""

from __future__ import annotations

from collections.abc import Sequence
from typing import ClassVar

from rich.text import Text
from textual.app import ComposeResult
from textual.binding import Binding, BindingType
from textual.containers import Horizontal, Vertical
from textual.screen import ModalScreen
from textual.widgets import Button, Static


class ChoiceScreen(ModalScreen[str]):
    """Shows ``question`` and one button per ``(id, label)``; escape answers ``cancel_id``."""

    BINDINGS: ClassVar[list[BindingType]] = [Binding("escape", "cancel", "Cancel")]

    def __init__(self, question: str, answers: Sequence[tuple[str, str]], cancel_id: str) -> None:
        super().__init__(classes="dialog-screen")
        self._question = question
        self._answers = tuple(answers)
        self._cancel_id = cancel_id

    def compose(self) -> ComposeResult:
        with Vertical(classes="dialog"):
            yield Static(Text(self._question), classes="dialog-question")
            with Horizontal(classes="dialog-buttons"):
                for answer_id, label in self._answers:
                    yield Button(label, id=answer_id)

    def on_mount(self) -> None:
        self.query(Button).first().focus()

    def on_button_pressed(self, event: Button.Pressed) -> None:
        event.stop()
        self.dismiss(event.button.id or self._cancel_id)

    def action_cancel(self) -> None:
        self.dismiss(self._cancel_id)
