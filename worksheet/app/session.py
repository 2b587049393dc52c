"""One open sheet: its document, its file, undo and redo; no UI and no evaluation here."""

from __future__ import annotations

import time
from dataclasses import dataclass, field
from pathlib import Path

from worksheet.document import (
    CalcCell,
    NoteBlock,
    SheetDocument,
    insert_block,
    move_block,
    new_calc_cell,
    new_note_block,
    new_sheet_text,
    parse_document,
    read_document,
    remove_block,
    render_document,
    replace_cell_body,
    replace_note_text,
)

# Keystrokes in one cell less than this many seconds apart make one undo step.
TYPING_PAUSE = 1.5


def sheet_title(path: Path) -> str:
    """A title for a new sheet, from its file name."""
    name = path.name
    for suffix in (".sheet.md", ".md"):
        if name.endswith(suffix):
            return name[: -len(suffix)] or "Untitled"
    return name or "Untitled"


def editor_text(body: str) -> str:
    """A cell body as the editor shows it: without the final line end."""
    for end in ("\r\n", "\n", "\r"):
        if body.endswith(end):
            return body[: -len(end)]
    return body


def body_from_editor(text: str) -> str:
    """Editor text back to a cell body (the final line end restored)."""
    return text + "\n" if text else ""


@dataclass
class SheetSession:
    """The document being edited, the last saved state and the edit history."""

    path: Path
    doc: SheetDocument
    saved: SheetDocument | None
    undo_stack: list[SheetDocument] = field(default_factory=list)
    redo_stack: list[SheetDocument] = field(default_factory=list)
    _typing: tuple[int, float] | None = None

    @classmethod
    def open(cls, path: Path) -> SheetSession:
        """Read ``path``; a missing file gives a new sheet (not written until saved)."""
        if not path.exists():
            from worksheet.constants import DEFAULT_DATASET  # its data loads on first use

            doc = parse_document(new_sheet_text(sheet_title(path), DEFAULT_DATASET, 4))
            return cls(path, doc, None)
        doc = read_document(path)
        return cls(path, doc, doc)

    @property
    def dirty(self) -> bool:
        """Whether the document differs from what was last read or saved."""
        if self.saved is None:
            return True
        return self.doc is not self.saved and render_document(self.doc) != render_document(
            self.saved
        )

    def _apply(self, doc: SheetDocument, typing_in: int | None = None) -> SheetDocument:
        now = time.monotonic()
        coalesce = (
            typing_in is not None
            and self._typing is not None
            and self._typing[0] == typing_in
            and now - self._typing[1] < TYPING_PAUSE
        )
        if not coalesce:
            self.undo_stack.append(self.doc)
        self._typing = (typing_in, now) if typing_in is not None else None
        self.redo_stack.clear()
        self.doc = doc
        return doc

    def edit_cell(self, index: int, editor: str) -> bool:
        """Store a calc cell's editor text; False when it is unchanged."""
        block = self.doc.blocks[index]
        assert isinstance(block, CalcCell)
        if editor_text(block.body) == editor:
            return False
        self._apply(replace_cell_body(self.doc, index, body_from_editor(editor)), index)
        return True

    def edit_note(self, index: int, text: str) -> bool:
        """Store a note's text; False when it is unchanged."""
        block = self.doc.blocks[index]
        assert isinstance(block, NoteBlock)
        if block.text == text:
            return False
        self._apply(replace_note_text(self.doc, index, text), index)
        return True

    def add_calc(self, index: int, body: str = "") -> int:
        """Insert an empty calc cell before block ``index``; returns its index."""
        self._apply(insert_block(self.doc, index, new_calc_cell(body, self.doc.newline)))
        return index

    def add_note(self, index: int, text: str = "A new note.") -> int:
        """Insert a note before block ``index``; returns its index."""
        self._apply(insert_block(self.doc, index, new_note_block(text, self.doc.newline)))
        return min(index, len(self.doc.blocks) - 1)

    def delete(self, index: int) -> None:
        self._apply(remove_block(self.doc, index))

    def move(self, index: int, delta: int) -> int:
        """Move block ``index`` by ``delta``; returns its new index."""
        self._apply(move_block(self.doc, index, delta))
        return index + delta

    def undo(self) -> bool:
        if not self.undo_stack:
            return False
        self.redo_stack.append(self.doc)
        self.doc = self.undo_stack.pop()
        self._typing = None
        return True

    def redo(self) -> bool:
        if not self.redo_stack:
            return False
        self.undo_stack.append(self.doc)
        self.doc = self.redo_stack.pop()
        self._typing = None
        return True

    def replace_all(self, doc: SheetDocument) -> None:
        """Take a whole new document (a restored recovery copy), undoable."""
        self._apply(doc)

    def mark_saved(self, written_from: SheetDocument, written: SheetDocument) -> None:
        """After a save of ``written_from``: ``written`` (with fresh results) is on disk."""
        if self.doc is written_from:
            self.doc = written
        self.saved = written
