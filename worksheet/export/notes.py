"""The Markdown reader for notes, set up once for every export (no raw HTML, no images)."""

from __future__ import annotations

from functools import cache

from markdown_it import MarkdownIt


@cache
def note_parser() -> MarkdownIt:
    """CommonMark with tables; raw HTML is read as text and images as links (no fetching)."""
    parser = MarkdownIt("commonmark", {"html": False, "linkify": False, "typographer": False})
    parser.enable("table")
    parser.disable("image")
    return parser
