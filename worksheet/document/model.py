"""The sheet file as data: front matter, notes and calc cells, each holding its exact text.

Every piece keeps the bytes it was read from (line ends included), so writing a document
back gives the same text. The statement language is not known here: a calc cell's body is
opaque text.
"""

from __future__ import annotations

import re
from bisect import bisect_left
from collections.abc import Mapping
from dataclasses import dataclass, replace
from functools import cached_property

_LINE_END = re.compile(r"(\r\n|\n|\r)")


def split_lines(text: str) -> list[str]:
    """Split ``text`` into lines that keep their line ends.

    A line end is ``\\n``, ``\\r\\n`` or a lone ``\\r`` (as in CommonMark), and nothing else:
    ``str.splitlines`` also breaks on form feeds and Unicode separators, which would make
    line numbers disagree with what an editor shows.

    >>> split_lines("a\\r\\nb\\nc")
    ['a\\r\\n', 'b\\n', 'c']
    >>> split_lines("")
    []
    """
    parts = _LINE_END.split(text)
    lines = [parts[k] + parts[k + 1] for k in range(0, len(parts) - 1, 2)]
    if parts[-1]:
        lines.append(parts[-1])
    return lines


def strip_line_end(line: str) -> str:
    """The line without its line end.

    >>> strip_line_end("x = 1\\r\\n")
    'x = 1'
    """
    if line.endswith("\r\n"):
        return line[:-2]
    if line.endswith(("\n", "\r")):
        return line[:-1]
    return line


def has_line_end(text: str) -> bool:
    """Whether ``text`` ends with a line end (so that something can follow it)."""
    return text.endswith(("\n", "\r"))


def content_lines(text: str) -> tuple[str, ...]:
    """The lines of ``text`` without their line ends."""
    return tuple(strip_line_end(line) for line in split_lines(text))


@dataclass(frozen=True)
class FrontMatter:
    """The ``---`` block at the top of a sheet.

    ``raw`` is its exact text, both ``---`` lines and their line ends included; ``entries``
    are the simple ``key: value`` lines in file order, values unquoted and stripped. Other
    lines (nested YAML, comments) are only in ``raw``.
    """

    raw: str
    entries: tuple[tuple[str, str], ...]

    def get(self, key: str, default: str | None = None) -> str | None:
        """The value of ``key``; the last one wins when a key is repeated (as in YAML).

        >>> FrontMatter("---\\ndigits: 4\\n---\\n", (("digits", "4"),)).get("digits")
        '4'
        """
        for name, value in reversed(self.entries):
            if name == key:
                return value
        return default


@dataclass(frozen=True)
class NoteBlock:
    """Free Markdown between calc cells, kept byte for byte.

    ``first_line`` is the 1-based file line where the note starts (0 for a block not yet
    placed in a document).
    """

    text: str
    first_line: int


@dataclass(frozen=True)
class ResultBlock:
    """The ``result`` fence recorded after a calc cell.

    ``gap`` is the exact whitespace-only lines between the cell's closing fence and this
    block's opening fence (often one empty line).
    """

    gap: str
    fence_open: str
    body: str
    fence_close: str

    def lines(self) -> tuple[str, ...]:
        """The recorded result lines, without line ends.

        >>> ResultBlock("\\n", "```result\\n", "x = 1 m\\n", "```\\n").lines()
        ('x = 1 m',)
        """
        return content_lines(self.body)


@dataclass(frozen=True)
class CalcCell:
    """A fenced block whose info string is ``calc``, with its recorded result if any.

    ``first_line`` is the 1-based file line of the first body line, so statement line k of
    the body (0-based) is on file line ``first_line + k``.
    """

    fence_open: str
    body: str
    fence_close: str
    first_line: int
    result: ResultBlock | None

    def body_lines(self) -> tuple[str, ...]:
        """The body's lines without line ends, split as the reader counts lines.

        Use this (not ``str.splitlines``) so that line k maps to ``first_line + k``.

        >>> CalcCell("```calc\\n", "a = 1\\nb = 2\\n", "```\\n", 2, None).body_lines()
        ('a = 1', 'b = 2')
        """
        return content_lines(self.body)


Block = NoteBlock | CalcCell


@dataclass(frozen=True)
class SheetDocument:
    """A whole sheet file.

    ``newline`` is the dominant line end (``"\\n"``, ``"\\r\\n"`` or a bare ``"\\r"``), used
    for new text.
    ``bom`` records a leading UTF-8 byte order mark, which is written back.
    """

    front_matter: FrontMatter | None
    blocks: tuple[Block, ...]
    newline: str
    bom: bool = False

    def calc_cells(self) -> tuple[CalcCell, ...]:
        """The calc cells in file order."""
        return self._calc_cells

    def calc_cell_indices(self) -> tuple[int, ...]:
        """The block index of each calc cell, in file order."""
        return self._calc_cell_indices

    # Worked out once per document (it is frozen): an edit of a long sheet asks for them
    # several times.
    @cached_property
    def _calc_cells(self) -> tuple[CalcCell, ...]:
        return tuple(block for block in self.blocks if isinstance(block, CalcCell))

    @cached_property
    def _calc_cell_indices(self) -> tuple[int, ...]:
        return tuple(k for k, block in enumerate(self.blocks) if isinstance(block, CalcCell))

    def with_blocks(
        self, blocks: tuple[Block, ...], cells_replaced: Mapping[int, CalcCell] | None = None
    ) -> SheetDocument:
        """This document holding ``blocks``.

        ``cells_replaced`` says that ``blocks`` are this document's blocks with only the calc
        cells at those block indices replaced: the new document then takes its cell tables
        from this one instead of walking every block again (an edit of a long sheet).
        """
        new = replace(self, blocks=blocks)
        if cells_replaced is None:
            return new
        indices = self._calc_cell_indices
        cells = list(self._calc_cells)
        for index, cell in cells_replaced.items():
            cells[bisect_left(indices, index)] = cell
        # cached_property keeps its values in the instance dictionary, which a frozen
        # dataclass leaves writable.
        new.__dict__["_calc_cell_indices"] = indices
        new.__dict__["_calc_cells"] = tuple(cells)
        return new

    def get(self, key: str, default: str | None = None) -> str | None:
        """A front-matter value, or ``default`` when the key or the front matter is missing."""
        if self.front_matter is None:
            return default
        return self.front_matter.get(key, default)
