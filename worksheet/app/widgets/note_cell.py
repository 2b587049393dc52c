"""One note on the sheet: rendered Markdown, or a plain editor while it is being edited.

At the app's first paint a note shows its source text instead (``source_first``): the
Markdown widget costs an import and a dozen widgets, and the sheet's first screen should
not wait for them; the app swaps the rendered note in right after that paint.
"""

from __future__ import annotations

import contextlib
from typing import TYPE_CHECKING

from rich.text import Text
from textual.app import ComposeResult
from textual.containers import Vertical
from textual.message import Message
from textual.widget import MountError
from textual.widgets import Static

if TYPE_CHECKING:  # loaded after the first paint
    from textual.widgets import Markdown, TextArea


# Lines that start a block of their own in Markdown (not joined to the line above).
_BLOCK_STARTS = ("#", "-", "*", "+", ">", "|", "```", "~~~", "    ", "\t")


def source_text(text: str) -> Text:
    """The note's source as it reads before rendering: paragraphs' lines joined, headings
    bold (a plain stand-in, no Markdown parser: it is drawn for a fraction of a second)."""
    lines: list[str] = []
    joinable = False
    for line in text.strip().splitlines():
        stripped = line.strip()
        if not stripped:
            lines.append("")
            joinable = False
        elif joinable and not line.startswith(_BLOCK_STARTS) and not stripped[0].isdigit():
            lines[-1] += " " + stripped
        else:
            lines.append(line.rstrip())
            joinable = not line.startswith(("#", "|", "```", "~~~"))
    shown = Text()
    for position, line in enumerate(lines):
        if position:
            shown.append("\n")
        if line.startswith("#"):
            shown.append(line.lstrip("#").strip(), style="bold")
        else:
            shown.append(line)
    return shown


def _markdown(text: str) -> Markdown:
    from textual.widgets import Markdown

    return Markdown(text.strip())


class NoteCellView(Vertical, can_focus=True):
    """A note; focus it and press the edit-note key to edit, press it again to show it.

    Posts ``NoteCellView.Edited`` on every change while editing. Stylable: ``Markdown``,
    ``TextArea``, ``.note-source`` (the source text shown until ``render_markdown``),
    class ``-editing``.
    """

    DEFAULT_CSS = """
    NoteCellView .note-source { margin: 0 1 1 1; }
    """

    class Edited(Message):
        """The text of the note at ``index`` changed to ``text``."""

        def __init__(self, index: int, text: str) -> None:
            super().__init__()
            self.index = index
            self.text = text

    def __init__(self, index: int, text: str, source_first: bool = False) -> None:
        super().__init__(classes="cell note-cell")
        self.index = index
        self.text = text
        self.source_first = source_first
        # The blank lines between two calc cells are a note too, in the file's model; on
        # screen they are hidden and out of the tab order.
        self.blank = not text.strip()
        self.set_class(self.blank, "-blank")
        self.can_focus = not self.blank

    @property
    def editing(self) -> bool:
        return self.has_class("-editing")

    def compose(self) -> ComposeResult:
        if self.source_first:  # a blank note too: it is hidden, and Markdown not loaded yet
            yield Static(source_text(self.text), classes="note-source")
        else:
            yield _markdown(self.text)

    async def render_markdown(self) -> None:
        """Show the note rendered, in place of its source text (once, after the first paint)."""
        if not self.source_first:
            return
        self.source_first = False
        if self.editing or self.blank or not self.is_mounted:
            return
        # The app may be closing already (quit at once): then there is nothing to render.
        with contextlib.suppress(MountError):
            await self.remove_children()
            await self.mount(_markdown(self.text))

    async def toggle_editing(self) -> None:
        """Swap between the rendered note and its editor."""
        if self.editing:
            from textual.widgets import TextArea

            editor = self.query_one(TextArea)
            self.text = editor.text
            await editor.remove()
            self.source_first = False
            await self.mount(_markdown(self.text))
            self.remove_class("-editing")
            self.focus()
            return
        await self.remove_children()
        from textual.widgets import TextArea

        editor = TextArea(self.text, tab_behavior="focus", soft_wrap=True)
        await self.mount(editor)
        self.add_class("-editing")
        editor.focus()

    def on_text_area_changed(self, event: TextArea.Changed) -> None:
        # By name rather than ``@on``: the TextArea module loads after the first paint.
        event.stop()
        self.text = event.text_area.text
        self.post_message(self.Edited(self.index, self.text))
