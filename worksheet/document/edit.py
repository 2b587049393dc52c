"""Pure edits of a ``SheetDocument``: each returns a new document that reads back as itself.

Every edit ends by rendering the new document and reading it back: the returned document
is that reading, so ``first_line`` numbers are always right, and an edit that would change
how the file reads back (a note holding a ``calc`` fence, an unclosed fence, ...) is refused
with a ``DocumentError`` instead of producing a file that means something else.

An edit that only replaces calc cells of a document that came from an edit (and so is known
to read back as itself) reads back only the changed cells (``_finish_cells``): a cell is
closed by its own fences, so what it holds cannot change how its neighbours read. That keeps
typing in a long sheet independent of the sheet's size.

Text given to an edit has its line ends changed to the document's ``newline``. Empty notes
are dropped and neighbouring notes merge into one, as the reader would see them, so block
indices can shift after an edit: take them from the returned document.
"""

from __future__ import annotations

import re
import weakref
from collections.abc import Mapping, Sequence
from dataclasses import replace

from worksheet.document.model import (
    Block,
    CalcCell,
    FrontMatter,
    NoteBlock,
    ResultBlock,
    SheetDocument,
    has_line_end,
    split_lines,
)
from worksheet.document.reader import (
    CALC_INFO,
    RESULT_INFO,
    closing_run,
    is_blank,
    opening_fence,
    parse_document,
)
from worksheet.document.writer import render_block, render_document, render_result_body
from worksheet.errors import DocumentError

_ANY_LINE_END = re.compile(r"\r\n|\n|\r")
_NEWLINES = ("\n", "\r\n", "\r")
_PLAIN_SCALAR = re.compile(r"[A-Za-z0-9_][A-Za-z0-9_ .,;()+/=-]*")


def with_newlines(text: str, newline: str) -> str:
    """``text`` with every line end replaced by ``newline``.

    >>> with_newlines("a\\nb\\r\\nc\\r", "\\r\\n")
    'a\\r\\nb\\r\\nc\\r\\n'
    """
    return _ANY_LINE_END.sub(newline, text)


def _sealed(text: str, newline: str) -> str:
    """``text`` ending with a line end, so that another line can follow it."""
    return text if not text or has_line_end(text) else text + newline


def _check_newline(newline: str) -> None:
    if newline not in _NEWLINES:
        raise DocumentError(f"a line end must be '\\n', '\\r\\n' or '\\r', not {newline!r}")


def _fences_for(fence_open: str, fence_close: str, body: str) -> tuple[str, str]:
    """The two fence lines, lengthened if a line of ``body`` would otherwise close them."""
    fence = opening_fence(fence_open)
    if fence is None:
        raise DocumentError(f"not an opening fence: {fence_open!r}")
    char = fence.run[0]
    inner = [run for run in map(closing_run, split_lines(body)) if run and run[0] == char]
    needed = max([len(fence.run), *(len(run) + 1 for run in inner)])
    if needed == len(fence.run):
        return fence_open, fence_close
    run = char * needed
    new_open = fence.indent + run + fence_open[len(fence.indent) + len(fence.run) :]
    close_run = closing_run(fence_close)
    if close_run is None:
        return new_open, run + fence_close
    start = fence_close.index(close_run)
    return new_open, fence_close[:start] + run + fence_close[start + len(close_run) :]


def _fit_cell(cell: CalcCell, newline: str, followed: bool) -> CalcCell:
    """The cell with bodies ended, fences long enough and line ends where text follows."""
    body = _sealed(cell.body, newline)
    fence_open, fence_close = _fences_for(cell.fence_open, cell.fence_close, body)
    result = cell.result
    if result is not None:
        result_body = _sealed(result.body, newline)
        result_open, result_close = _fences_for(result.fence_open, result.fence_close, result_body)
        if followed:
            result_close = _sealed(result_close, newline)
        result = ResultBlock(_sealed(result.gap, newline), result_open, result_body, result_close)
    if followed or result is not None:
        fence_close = _sealed(fence_close, newline)
    return CalcCell(fence_open, body, fence_close, cell.first_line, result)


def _fit_blocks(blocks: Sequence[Block], newline: str) -> list[Block]:
    """Blocks that can stand next to each other: empty notes dropped, neighbours merged."""
    kept = [b for b in blocks if not (isinstance(b, NoteBlock) and not b.text)]
    fitted: list[Block] = []
    for index, block in enumerate(kept):
        followed = index < len(kept) - 1
        if isinstance(block, CalcCell):
            fitted.append(_fit_cell(block, newline, followed))
            continue
        text = _sealed(block.text, newline) if followed else block.text
        if fitted and isinstance(fitted[-1], NoteBlock):
            fitted[-1] = NoteBlock(fitted[-1].text + text, fitted[-1].first_line)
        else:
            fitted.append(NoteBlock(text, block.first_line))
    return fitted


def _unplaced(doc: SheetDocument) -> tuple[FrontMatter | None, tuple[Block, ...]]:
    """What must survive a round trip: everything except the line numbers."""
    return doc.front_matter, tuple(replace(b, first_line=0) for b in doc.blocks)


def _starts_with_result_fence(text: str) -> bool:
    for line in split_lines(text):
        if not is_blank(line):
            fence = opening_fence(line)
            return fence is not None and fence.info == RESULT_INFO
    return False


def _hint(blocks: Sequence[Block], index: int) -> str:
    """What about block ``index`` makes it read back as something else."""
    block = blocks[index]
    following = blocks[index + 1] if index + 1 < len(blocks) else None
    if (
        isinstance(block, CalcCell)
        and block.result is None
        and isinstance(following, NoteBlock)
        and _starts_with_result_fence(following.text)
    ):
        return (
            f"note {index + 1} starts with a {RESULT_INFO} fence right after a calc cell, "
            "so it would read back as that cell's result"
        )
    if isinstance(block, NoteBlock):
        try:
            # The leading empty line keeps a first '---' from reading as front matter.
            alone = parse_document("\n" + block.text)
        except DocumentError:
            return f"note {index} opens a fence that it never closes"
        if alone.calc_cells():
            return f"note {index} holds a {CALC_INFO} fence; insert a calc cell instead"
    return f"block {index} would read back differently"


def _why_different(candidate: SheetDocument, reread: SheetDocument) -> str:
    """A hint at what made ``candidate`` read back as something else."""
    if candidate.front_matter is None and reread.front_matter is not None:
        return "a note at the top of a sheet cannot start with a '---' line"
    for index, block in enumerate(candidate.blocks):
        if index >= len(reread.blocks) or replace(block, first_line=0) != replace(
            reread.blocks[index], first_line=0
        ):
            return _hint(candidate.blocks, index)
    return "the blocks would read back differently"


def _finish(doc: SheetDocument) -> SheetDocument:
    """The edited document as it reads back, or an error if that differs from the edit."""
    blocks = _fit_blocks(doc.blocks, doc.newline)
    front_matter = doc.front_matter
    if front_matter is not None and blocks:
        front_matter = replace(front_matter, raw=_sealed(front_matter.raw, doc.newline))
    candidate = replace(doc, front_matter=front_matter, blocks=tuple(blocks))
    try:
        reread = parse_document(render_document(candidate))
    except DocumentError as err:
        raise DocumentError(
            f"the edit would make the sheet unreadable: {err.message}", err.line, err.column
        ) from err
    if _unplaced(reread) != _unplaced(candidate):
        raise DocumentError(
            f"the edit would change the sheet's meaning: {_why_different(candidate, reread)}"
        )
    return _verified(replace(reread, newline=doc.newline))


# Documents known to read back as themselves (every edit's output), by identity: weak, so
# the set never keeps a document alive.
_READ_BACK: dict[int, weakref.ref[SheetDocument]] = {}


def _verified(doc: SheetDocument) -> SheetDocument:
    key = id(doc)
    _READ_BACK[key] = weakref.ref(doc, lambda _ref, key=key: _READ_BACK.pop(key, None))
    return doc


def _is_verified(doc: SheetDocument) -> bool:
    ref = _READ_BACK.get(id(doc))
    return ref is not None and ref() is doc


def _finish_cells(doc: SheetDocument, changed: Mapping[int, CalcCell]) -> SheetDocument | None:
    """``doc`` with the calc cells at ``changed`` replaced, reading back only those cells.

    None when the short cut does not apply (``doc`` not known to read back as itself, or a
    changed cell that would not read back alone as the same cell): the caller then takes
    the full round trip, which also words the error.
    """
    if not _is_verified(doc):
        return None
    if not changed:
        return doc
    blocks = list(doc.blocks)
    last = len(blocks) - 1
    shift_after: dict[int, int] = {}
    placed: dict[int, CalcCell] = {}
    shift = 0
    for index in sorted(changed):
        old = blocks[index]
        if not isinstance(old, CalcCell):
            return None
        cell = _fit_cell(changed[index], doc.newline, followed=index < last)
        following = blocks[index + 1] if index < last else None
        if isinstance(following, NoteBlock) and _starts_with_result_fence(following.text):
            return None
        text = render_block(cell)
        try:
            alone = parse_document(text)
        except DocumentError:
            return None
        if (
            alone.front_matter is not None
            or len(alone.blocks) != 1
            or replace(alone.blocks[0], first_line=0) != replace(cell, first_line=0)
        ):
            return None
        blocks[index] = placed[index] = replace(cell, first_line=old.first_line + shift)
        shift += len(split_lines(text)) - len(split_lines(render_block(old)))
        shift_after[index] = shift
    if shift or any(shift_after.values()):
        running = 0
        for index in range(min(changed), len(blocks)):
            if index in shift_after:
                running = shift_after[index]
            else:
                block = blocks[index]
                blocks[index] = replace(block, first_line=block.first_line + running)
        return _verified(doc.with_blocks(tuple(blocks)))
    # Nothing moved: only the changed cells are new, and the cell tables carry over.
    return _verified(doc.with_blocks(tuple(blocks), cells_replaced=placed))


def _block_at(doc: SheetDocument, index: int) -> Block:
    if not 0 <= index < len(doc.blocks):
        raise DocumentError(f"no block {index}: the sheet has {len(doc.blocks)} blocks")
    return doc.blocks[index]


def _new_result(lines: Sequence[str], old: ResultBlock | None, newline: str) -> ResultBlock:
    body = render_result_body(lines, newline)
    if old is None:
        return ResultBlock(newline, f"```{RESULT_INFO}{newline}", body, f"```{newline}")
    return replace(old, body=body)


def _result_body(lines: Sequence[str], newline: str) -> str:
    """``render_result_body``, joined at C speed when no line holds a line break."""
    plain = "".join(lines)
    if "\n" in plain or "\r" in plain:
        return render_result_body(lines, newline)
    return newline.join(lines) + newline if lines else ""


def with_results(
    doc: SheetDocument,
    results: Sequence[Sequence[str] | None],
    only: Sequence[int] | None = None,
) -> SheetDocument:
    """Record result lines after each calc cell.

    Args:
        doc: the sheet.
        results: one entry per calc cell, in order: the lines to record (the result block is
            created after the cell when missing, its body replaced when present), or
            ``None`` to remove the cell's result block.

        only: the positions (in ``results``) of the cells that may need new results, when
            the caller knows that every other cell already records its entry.

    Returns:
        The new document; a new block is fenced with backticks after one empty line.
    """
    cells = doc.calc_cell_indices()
    if len(results) != len(cells):
        raise DocumentError(
            f"one result entry per calc cell is needed: {len(cells)} cells, {len(results)} entries"
        )
    checked = results if only is None else [results[position] for position in only]
    if any(isinstance(lines, str) for lines in checked):
        raise DocumentError("each result entry must be a list of lines, not a single string")
    blocks = list(doc.blocks)
    changed: dict[int, CalcCell] = {}
    pairs = (
        zip(cells, results, strict=True)
        if only is None
        else ((cells[position], results[position]) for position in only)
    )
    for index, lines in pairs:
        cell = blocks[index]
        assert isinstance(cell, CalcCell)
        if lines is None:
            if cell.result is None:
                continue
            result = None
        else:
            body = _result_body(lines, doc.newline)
            if cell.result is not None and cell.result.body == body:
                continue
            result = _new_result(lines, cell.result, doc.newline)
        blocks[index] = changed[index] = replace(cell, result=result)
    fast = _finish_cells(doc, changed)
    if fast is not None:
        return fast
    return _finish(replace(doc, blocks=tuple(blocks)))


def replace_cell_body(doc: SheetDocument, block_index: int, body: str) -> SheetDocument:
    """The sheet with the calc cell at ``block_index`` holding ``body``; its result is kept."""
    cell = _block_at(doc, block_index)
    if not isinstance(cell, CalcCell):
        raise DocumentError(f"block {block_index} is a note, not a calc cell")
    edited = replace(cell, body=with_newlines(body, doc.newline))
    fast = _finish_cells(doc, {block_index: edited})
    if fast is not None:
        return fast
    blocks = list(doc.blocks)
    blocks[block_index] = edited
    return _finish(replace(doc, blocks=tuple(blocks)))


def replace_note_text(doc: SheetDocument, block_index: int, text: str) -> SheetDocument:
    """The sheet with the note at ``block_index`` holding ``text`` (empty text drops it)."""
    note = _block_at(doc, block_index)
    if not isinstance(note, NoteBlock):
        raise DocumentError(f"block {block_index} is a calc cell, not a note")
    blocks = list(doc.blocks)
    blocks[block_index] = replace(note, text=with_newlines(text, doc.newline))
    return _finish(replace(doc, blocks=tuple(blocks)))


def insert_block(doc: SheetDocument, index: int, block: Block) -> SheetDocument:
    """The sheet with ``block`` placed before block ``index`` (``len(blocks)`` appends)."""
    if not 0 <= index <= len(doc.blocks):
        raise DocumentError(f"cannot insert at {index}: the sheet has {len(doc.blocks)} blocks")
    blocks = list(doc.blocks)
    blocks.insert(index, block)
    return _finish(replace(doc, blocks=tuple(blocks)))


def remove_block(doc: SheetDocument, index: int) -> SheetDocument:
    """The sheet without block ``index`` (a calc cell goes with its result)."""
    _block_at(doc, index)
    blocks = list(doc.blocks)
    del blocks[index]
    return _finish(replace(doc, blocks=tuple(blocks)))


def move_block(doc: SheetDocument, index: int, delta: int) -> SheetDocument:
    """The sheet with block ``index`` moved ``delta`` places (negative: towards the top)."""
    _block_at(doc, index)
    target = index + delta
    if not 0 <= target < len(doc.blocks):
        raise DocumentError(
            f"cannot move block {index} by {delta}: the sheet has {len(doc.blocks)} blocks"
        )
    blocks = list(doc.blocks)
    blocks.insert(target, blocks.pop(index))
    return _finish(replace(doc, blocks=tuple(blocks)))


def new_calc_cell(body: str, newline: str) -> CalcCell:
    """A calc cell holding ``body``, not yet placed (``first_line`` 0), without result.

    >>> cell = new_calc_cell("x = 1\\n```", "\\n")
    >>> cell.fence_open, cell.body, cell.fence_close
    ('````calc\\n', 'x = 1\\n```\\n', '````\\n')
    """
    _check_newline(newline)
    cell = CalcCell(
        f"```{CALC_INFO}{newline}", with_newlines(body, newline), f"```{newline}", 0, None
    )
    return _fit_cell(cell, newline, followed=True)


def new_note_block(text: str, newline: str) -> NoteBlock:
    """A note holding ``text`` with a final line end, not yet placed (``first_line`` 0)."""
    _check_newline(newline)
    return NoteBlock(_sealed(with_newlines(text, newline), newline), 0)


def _scalar(value: str) -> str:
    """``value`` as a front-matter value the reader gives back unchanged."""
    value = " ".join(value.splitlines())
    if _PLAIN_SCALAR.fullmatch(value) and value == value.strip():
        return value
    return "'" + value.replace("'", "''") + "'"


def new_sheet_text(title: str, constants: str, digits: int) -> str:
    """The text of a fresh sheet: front matter, a one-line note and one empty calc cell.

    Line breaks in ``title`` become spaces.

    >>> print(new_sheet_text("Burst budget", "CODATA2018", 4), end="")
    ---
    title: Burst budget
    constants: CODATA2018
    digits: 4
    ---
    <BLANKLINE>
    Notes in Markdown go between the calc cells.
    <BLANKLINE>
    ```calc
    ```
    """
    if isinstance(digits, bool) or digits < 1:
        raise DocumentError(f"digits must be a whole number of at least 1, not {digits!r}")
    lines = [
        "---",
        f"title: {_scalar(title)}",
        f"constants: {_scalar(constants)}",
        f"digits: {digits}",
        "---",
        "",
        "Notes in Markdown go between the calc cells.",
        "",
        f"```{CALC_INFO}",
        "```",
    ]
    return "".join(line + "\n" for line in lines)
