"""Reading a sheet file into a ``SheetDocument`` that keeps every byte it was given."""

from __future__ import annotations

import os
import re
from dataclasses import dataclass
from pathlib import Path

from worksheet.document.model import (
    Block,
    CalcCell,
    FrontMatter,
    NoteBlock,
    ResultBlock,
    SheetDocument,
    split_lines,
    strip_line_end,
)
from worksheet.errors import DocumentError

BOM = "\ufeff"
CALC_INFO = "calc"
RESULT_INFO = "result"

# CommonMark fences: up to three spaces of indent, then three or more backticks or tildes.
_OPENING = re.compile(r"^( {0,3})(`{3,}|~{3,})(.*)$", re.DOTALL)
_CLOSING = re.compile(r"^( {0,3})(`{3,}|~{3,})[ \t]*$")
_BLANK = re.compile(r"^[ \t]*$")
_FRONT_MATTER_FENCE = re.compile(r"^---[ \t]*$")
_ENTRY = re.compile(r"^([A-Za-z_][A-Za-z0-9_.-]*)[ \t]*:(?:[ \t]+(.*))?$")
_DOUBLE_QUOTED = re.compile(r'^"((?:[^"\\]|\\.)*)"[ \t]*(?:#.*)?$')
_SINGLE_QUOTED = re.compile(r"^'((?:[^']|'')*)'[ \t]*(?:#.*)?$")
_LINE_END_BYTES = re.compile(rb"\r\n|\n|\r")
_LINE_END_TEXT = re.compile(r"\r\n|\n|\r")


@dataclass(frozen=True)
class Fence:
    """An opening fence line taken apart: indent, fence run, info string."""

    indent: str
    run: str
    info: str


def opening_fence(line: str) -> Fence | None:
    """The fence that ``line`` opens, or ``None`` when it opens none.

    >>> opening_fence("```calc  \\n")
    Fence(indent='', run='```', info='calc')
    >>> opening_fence("    ```calc") is None
    True
    """
    match = _OPENING.match(strip_line_end(line))
    if match is None:
        return None
    indent, run, rest = match.groups()
    if run[0] == "`" and "`" in rest:
        return None  # CommonMark: a backtick fence's info string may not contain backticks
    return Fence(indent, run, rest.strip(" \t"))


def closing_run(line: str) -> str | None:
    """The fence run of ``line`` if it has the shape of a closing fence, else ``None``.

    >>> closing_run("  ````  \\n"), closing_run("```calc")
    ('````', None)
    """
    match = _CLOSING.match(strip_line_end(line))
    return None if match is None else match.group(2)


def closes_fence(line: str, fence: Fence) -> bool:
    """Whether ``line`` closes ``fence``: same character, at least as long, nothing after.

    >>> closes_fence("````\\n", Fence("", "```", "calc"))
    True
    >>> closes_fence("~~~\\n", Fence("", "```", "calc"))
    False
    """
    run = closing_run(line)
    return run is not None and run[0] == fence.run[0] and len(run) >= len(fence.run)


def is_blank(line: str) -> bool:
    """Whether ``line`` holds only spaces and tabs."""
    return _BLANK.match(strip_line_end(line)) is not None


def dominant_newline(text: str) -> str:
    """The most common line end: ``"\\n"``, ``"\\r\\n"`` or a bare ``"\\r"`` (ties go to LF).

    New text (result blocks, cells) is written with it, so a file of bare CR line ends (old
    Mac style) stays one kind of line end and every byte outside the results is kept.

    >>> dominant_newline("a\\r\\nb\\r\\nc\\n"), dominant_newline("a\\rb\\rc\\n")
    ('\\r\\n', '\\r')
    """
    crlf = text.count("\r\n")
    lf = text.count("\n") - crlf
    cr = text.count("\r") - crlf
    if cr > lf and cr > crlf:
        return "\r"
    return "\r\n" if crlf > lf else "\n"


def _unquote(value: str) -> str:
    """A front-matter value without its YAML-style quotes or trailing ``# comment``.

    >>> _unquote('"Run #3"  # the third'), _unquote("'it''s'"), _unquote("CODATA2018 # pin")
    ('Run #3', "it's", 'CODATA2018')
    """
    double = _DOUBLE_QUOTED.match(value)
    if double is not None:
        return re.sub(r'\\(["\\])', r"\1", double.group(1))
    single = _SINGLE_QUOTED.match(value)
    if single is not None:
        return single.group(1).replace("''", "'")
    comment = re.search(r"(?:^|[ \t])#", value)
    if comment is not None:
        value = value[: comment.start()]
    return value.strip(" \t")


def _front_matter_entry(line: str) -> tuple[str, str] | None:
    match = _ENTRY.match(strip_line_end(line))
    if match is None:
        return None
    return match.group(1), _unquote((match.group(2) or "").strip(" \t"))


def _read_front_matter(lines: list[str]) -> tuple[FrontMatter | None, int]:
    """The front matter at the top of ``lines`` and how many lines it spans."""
    if not lines or not _FRONT_MATTER_FENCE.match(strip_line_end(lines[0])):
        return None, 0
    for end in range(1, len(lines)):
        if _FRONT_MATTER_FENCE.match(strip_line_end(lines[end])):
            inner = lines[1:end]
            entries = tuple(e for e in map(_front_matter_entry, inner) if e is not None)
            return FrontMatter("".join(lines[: end + 1]), entries), end + 1
    raise DocumentError(
        "the front matter opened on line 1 is never closed: add a line '---' after it",
        1,
        1,
    )


def _find_close(lines: list[str], start: int, fence: Fence) -> int:
    """The index of the line closing ``fence`` opened at ``start``; an error if none."""
    for k in range(start + 1, len(lines)):
        if closes_fence(lines[k], fence):
            return k
    raise DocumentError(
        f"the {fence.run} fence opened on line {start + 1} is never closed: "
        f"add a line {fence.run} after its last line",
        start + 1,
        len(fence.indent) + 1,
    )


def _text_position(text: str, offset: int) -> tuple[int, int]:
    """The 1-based line and column of character ``offset`` (a leading BOM takes no column)."""
    breaks = list(_LINE_END_TEXT.finditer(text, 0, offset))
    line_start = breaks[-1].end() if breaks else 0
    prefix = text[line_start:offset]
    if not breaks:
        prefix = prefix.removeprefix(BOM)
    return len(breaks) + 1, len(prefix) + 1


def _check_text(text: str) -> None:
    nul = text.find("\x00")
    if nul >= 0:
        line, column = _text_position(text, nul)
        raise DocumentError(
            "binary content (a NUL character): a sheet is a UTF-8 text file", line, column
        )


def parse_document(text: str) -> SheetDocument:
    """Parse the text of a sheet file.

    Raises:
        DocumentError: a NUL character, a fence or front matter that is never closed.

    >>> doc = parse_document("Intro\\n```calc\\nx = 1\\n```\\n")
    >>> [type(b).__name__ for b in doc.blocks], doc.calc_cells()[0].first_line
    (['NoteBlock', 'CalcCell'], 3)
    """
    _check_text(text)
    bom = text.startswith(BOM)
    body = text[len(BOM) :] if bom else text
    lines = split_lines(body)
    front_matter, index = _read_front_matter(lines)
    blocks: list[Block] = []
    note_start: int | None = None

    def flush_note(end: int) -> None:
        nonlocal note_start
        if note_start is not None:
            blocks.append(NoteBlock("".join(lines[note_start:end]), note_start + 1))
            note_start = None

    while index < len(lines):
        fence = opening_fence(lines[index])
        if fence is None:
            note_start = index if note_start is None else note_start
            index += 1
            continue
        close = _find_close(lines, index, fence)
        if fence.info != CALC_INFO:
            note_start = index if note_start is None else note_start
            index = close + 1
            continue
        flush_note(index)
        result, after = _read_result(lines, close + 1)
        blocks.append(
            CalcCell(
                fence_open=lines[index],
                body="".join(lines[index + 1 : close]),
                fence_close=lines[close],
                first_line=index + 2,
                result=result,
            )
        )
        index = after
    flush_note(len(lines))
    return SheetDocument(front_matter, tuple(blocks), dominant_newline(text), bom)


def _read_result(lines: list[str], start: int) -> tuple[ResultBlock | None, int]:
    """The result block starting at or after ``start`` (past blank lines), if there is one."""
    index = start
    while index < len(lines) and is_blank(lines[index]):
        index += 1
    if index == len(lines):
        return None, start
    fence = opening_fence(lines[index])
    if fence is None or fence.info != RESULT_INFO:
        return None, start
    close = _find_close(lines, index, fence)
    result = ResultBlock(
        gap="".join(lines[start:index]),
        fence_open=lines[index],
        body="".join(lines[index + 1 : close]),
        fence_close=lines[close],
    )
    return result, close + 1


def _byte_position(data: bytes, offset: int) -> tuple[int, int]:
    """The 1-based line and character column of byte ``offset`` (the prefix must decode)."""
    breaks = list(_LINE_END_BYTES.finditer(data, 0, offset))
    line_start = breaks[-1].end() if breaks else 0
    prefix = data[line_start:offset].decode("utf-8", errors="replace")
    if not breaks:
        prefix = prefix.removeprefix(BOM)
    return len(breaks) + 1, len(prefix) + 1


def decode_sheet_bytes(data: bytes) -> str:
    """The text of a sheet file's bytes; a BOM is kept as the character U+FEFF.

    Raises:
        DocumentError: binary content (a NUL byte) or bytes that are not UTF-8.
    """
    nul = data.find(b"\x00")
    if nul >= 0:
        line, column = _byte_position(data, nul)
        raise DocumentError(
            f"binary content (a NUL byte at byte offset {nul}, line {line}): "
            "a sheet is a UTF-8 text file",
            line,
            column,
        )
    try:
        return data.decode("utf-8")
    except UnicodeDecodeError as err:
        line, column = _byte_position(data, err.start)
        raise DocumentError(
            f"not UTF-8: byte 0x{data[err.start]:02x} at byte offset {err.start} "
            f"(line {line}) is not valid UTF-8; save the sheet as UTF-8",
            line,
            column,
        ) from err


def read_document(path: str | os.PathLike[str]) -> SheetDocument:
    """Read and parse the sheet file at ``path``.

    Raises:
        DocumentError: the file cannot be read, is not UTF-8 text, or is malformed.
    """
    try:
        data = Path(path).read_bytes()
    except OSError as err:
        reason = err.strerror or str(err)
        raise DocumentError(f"cannot read {os.fspath(path)}: {reason}") from err
    return parse_document(decode_sheet_bytes(data))
