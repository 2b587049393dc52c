"""One note on the sheet: rendered Markdown, or a plain editor while it is being edited."""

from __future__ import annotations

from textual import on
from textual.app import ComposeResult
from textual.containers import Vertical
from textual.message import Message
from textual.widgets import Markdown, TextArea


class NoteCellView(Vertical, can_focus=True):
    """A note; focus it and press the edit-note key to edit, press it again to show it.

    Posts ``NoteCellView.Edited`` on every change while editing. Stylable: ``Markdown``,
    ``TextArea``, class ``-editing``.
    """

    class Edited(Message):
        """The text of the note at ``index`` changed to ``text``."""

        def __init__(self, index: int, text: str) -> None:
            super().__init__()
            self.index = index
            self.text = text

    def __init__(self, index: int, text: str) -> None:
        super().__init__(classes="cell note-cell")
        self.index = index
        self.text = text
        # The blank lines between two calc cells are a note too, in the file's model; on
        # screen they are hidden and out of the tab order.
        self.blank = not text.strip()
        self.set_class(self.blank, "-blank")
        self.can_focus = not self.blank

    @property
    def editing(self) -> bool:
        return self.has_class("-editing")

    def compose(self) -> ComposeResult:
        yield Markdown(self.text.strip())

    async def toggle_editing(self) -> None:
        """Swap between the rendered note and its editor."""
        if self.editing:
            editor = self.query_one(TextArea)
            self.text = editor.text
            await editor.remove()
            await self.mount(Markdown(self.text.strip()))
            self.remove_class("-editing")
            self.focus()
            return
        await self.query_one(Markdown).remove()
        editor = TextArea(self.text, tab_behavior="focus", soft_wrap=True)
        await self.mount(editor)
        self.add_class("-editing")
        editor.focus()

    @on(TextArea.Changed)
    def _changed(self, event: TextArea.Changed) -> None:
        event.stop()
        self.text = event.text_area.text
        self.post_message(self.Edited(self.index, self.text))
