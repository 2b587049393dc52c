"""The ``use`` statement: bring names of another sheet (or of the shipped library) in.

Its quoted path is not part of the expression language, so it is read here with one
anchored pattern instead of by the tokenizer.
"""

from __future__ import annotations

import re

from worksheet.errors import ParseError
from worksheet.syntax import tree as t

_NAME = r"[^\W\d]\w*"
_START = re.compile(r'\s*use\s+(?=["\w])')
_FORM = re.compile(
    rf"""\s*(?P<statement>use\s+
    (?:(?P<names>{_NAME}(?:\s*,\s*{_NAME})*)\s+from\s+)?
    (?P<library>library\s+)?
    "(?P<path>[^"\n]*)")
    \s*(?:\#.*)?$""",
    re.VERBOSE | re.DOTALL,
)
FORMS = 'use "other.sheet.md", use A, B from "other.sheet.md" or use library "blackhole"'


def looks_like_use(text: str) -> bool:
    """A statement starting with the word ``use`` that is not a definition of ``use``.

    >>> looks_like_use('use "bh.sheet.md"'), looks_like_use("use = 3 [m]")
    (True, False)
    """
    return _START.match(text) is not None


def parse_use(text: str, line: int = 1, column: int = 1) -> t.Use:
    """Parse a ``use`` statement; anything else starting with ``use`` is a ParseError.

    >>> parse_use('use T_H, r_s from library "blackhole"  # standard relations')
    ... # doctest: +NORMALIZE_WHITESPACE
    Use(line=1, column=1, source='use T_H, r_s from library "blackhole"',
        names=('T_H', 'r_s'), path='blackhole', library=True)
    """
    offset = len(text) - len(text.lstrip())
    start = column + offset
    match = _FORM.match(text)
    if match is None or "\n" in text.strip():
        raise ParseError(f"a use statement is written {FORMS}", line, start)
    names = tuple(part.strip() for part in (match.group("names") or "").split(",") if part.strip())
    for name in names:
        if name.startswith("_"):
            raise ParseError(f"names starting with '_' are refused ('{name}')", line, start)
    if len(set(names)) != len(names):
        raise ParseError("a use statement names each quantity once", line, start)
    path = match.group("path")
    if not path.strip():
        raise ParseError("a use statement needs a file name between the quotes", line, start)
    source = match.group("statement").strip()
    return t.Use(line, start, source, names, path, match.group("library") is not None)
