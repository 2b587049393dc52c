"""Reading and writing ``.sheet.md`` files, round-trip exact; no statement language here."""

from worksheet.document.edit import (
    insert_block,
    move_block,
    new_calc_cell,
    new_note_block,
    new_sheet_text,
    remove_block,
    replace_cell_body,
    replace_note_text,
    with_newlines,
    with_results,
)
from worksheet.document.model import (
    Block,
    CalcCell,
    FrontMatter,
    NoteBlock,
    ResultBlock,
    SheetDocument,
    split_lines,
)
from worksheet.document.reader import decode_sheet_bytes, parse_document, read_document
from worksheet.document.storage import atomic_write_bytes, atomic_write_text
from worksheet.document.writer import render_block, render_document, render_result_body

__all__ = [
    "Block",
    "CalcCell",
    "FrontMatter",
    "NoteBlock",
    "ResultBlock",
    "SheetDocument",
    "atomic_write_bytes",
    "atomic_write_text",
    "decode_sheet_bytes",
    "insert_block",
    "move_block",
    "new_calc_cell",
    "new_note_block",
    "new_sheet_text",
    "parse_document",
    "read_document",
    "remove_block",
    "render_block",
    "render_document",
    "render_result_body",
    "replace_cell_body",
    "replace_note_text",
    "split_lines",
    "with_newlines",
    "with_results",
]
