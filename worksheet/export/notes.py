"""The Markdown reader for notes, set up once for every export (no raw HTML, no images)."""

from __future__ import annotations

from collections.abc import Callable, Sequence
from functools import cache

from markdown_it import MarkdownIt
from markdown_it.token import Token
from mdit_py_plugins.dollarmath import dollarmath_plugin

from worksheet.export.html_note_math import tex_math_html


@cache
def note_parser() -> MarkdownIt:
    """CommonMark with tables and ``$...$`` math; raw HTML is read as text and images as links
    (no fetching). ``$5 and $10`` stays text: a dollar followed or preceded by a space does
    not open or close math."""
    parser = MarkdownIt("commonmark", {"html": False, "linkify": False, "typographer": False})
    parser.enable("table")
    parser.disable("image")
    parser.use(dollarmath_plugin, allow_space=False, allow_digits=False, double_inline=True)
    # Only the HTML export renders with this parser; the LaTeX one reads its tokens.
    parser.add_render_rule("math_inline", _math_rule(display=False))
    parser.add_render_rule("math_inline_double", _math_rule(display=True))
    parser.add_render_rule("math_block", _math_rule(display=True))
    parser.add_render_rule("math_block_label", _math_rule(display=True))
    return parser


def _math_rule(display: bool) -> Callable[..., str]:
    def render(
        self: object, tokens: Sequence[Token], idx: int, options: object, env: object
    ) -> str:
        token = tokens[idx]
        text = tex_math_html(token.content, display=display, block=token.block)
        return text + ("\n" if token.block else "")

    return render
