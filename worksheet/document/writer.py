"""Turning a ``SheetDocument`` back into text, byte for byte what was read."""

from __future__ import annotations

from collections.abc import Sequence

from worksheet.document.model import Block, CalcCell, SheetDocument, split_lines, strip_line_end
from worksheet.document.reader import BOM


def render_block(block: Block) -> str:
    """The exact text of one block (a calc cell includes its result)."""
    if not isinstance(block, CalcCell):
        return block.text
    text = block.fence_open + block.body + block.fence_close
    if block.result is not None:
        result = block.result
        text += result.gap + result.fence_open + result.body + result.fence_close
    return text


def render_document(doc: SheetDocument) -> str:
    """The text of ``doc``; ``render_document(parse_document(t)) == t`` for any readable t.

    >>> from worksheet.document.reader import parse_document
    >>> text = "---\\ntitle: x\\n---\\nNote\\r\\n```calc\\nx = 1\\n```"
    >>> render_document(parse_document(text)) == text
    True
    """
    head = BOM if doc.bom else ""
    if doc.front_matter is not None:
        head += doc.front_matter.raw
    return head + "".join(render_block(block) for block in doc.blocks)


def render_result_body(lines: Sequence[str], newline: str) -> str:
    """The body of a result block: each line ended with ``newline``.

    A line that itself holds line breaks is split there, so the body has one kind of
    line end throughout.

    >>> render_result_body(["T_H = 2.454e11 K", "check: holds"], "\\r\\n")
    'T_H = 2.454e11 K\\r\\ncheck: holds\\r\\n'
    """
    pieces: list[str] = []
    for line in lines:
        parts = split_lines(line) or [""]
        pieces.extend(strip_line_end(part) + newline for part in parts)
    return "".join(pieces)
