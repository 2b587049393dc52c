"""The Markdown reader for notes, set up once for every export (no raw HTML, no images)."""

from __future__ import annotations

from functools import cache

from markdown_it import MarkdownIt
from mdit_py_plugins.dollarmath import dollarmath_plugin


@cache
def note_parser() -> MarkdownIt:
    """CommonMark with tables and ``$...$`` math; raw HTML is read as text and images as links
    (no fetching). ``$5 and $10`` stays text: a dollar followed or preceded by a space does
    not open or close math."""
    parser = MarkdownIt("commonmark", {"html": False, "linkify": False, "typographer": False})
    parser.enable("table")
    parser.disable("image")
    parser.use(dollarmath_plugin, allow_space=False, allow_digits=False, double_inline=True)
    return parser
