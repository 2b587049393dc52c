"""The calc editors' syntax colours, made from the app theme's ``syntax-*`` variables.

textual's TextArea colours highlights from its own themes, whose colours are fixed for a
dark background; these follow the app's theme instead (see ``theme_files``).
"""

from __future__ import annotations

from collections.abc import Mapping
from typing import TYPE_CHECKING

from rich.style import Style

from worksheet.app.highlight import STYLE_OF
from worksheet.app.theme_files import SYNTAX_DEFAULTS, SYNTAX_FALLBACK

if TYPE_CHECKING:  # the editors' module loads after the first paint
    from textual.widgets.text_area import TextAreaTheme

# Kinds drawn in italics or bold as well as in colour, so they read in monochrome too.
EMPHASIS = {"comment": {"italic": True}, "verb": {"bold": True}, "keyword": {"bold": True}}


def syntax_theme_name(app_theme: str) -> str:
    return f"worksheet-{app_theme}"


def syntax_styles(variables: Mapping[str, str]) -> dict[str, Style]:
    """One style per highlight name, from the theme's variables (editors and their
    first-paint stand-ins colour alike)."""
    styles = {}
    for kind, highlight in STYLE_OF.items():
        colour = variables.get(f"syntax-{kind}") or SYNTAX_FALLBACK[SYNTAX_DEFAULTS[kind]]
        styles[highlight] = Style(color=colour, **EMPHASIS.get(kind, {}))
    return styles


def syntax_theme(app_theme: str, variables: Mapping[str, str]) -> TextAreaTheme:
    """A TextAreaTheme with one style per grammar kind, from the theme's variables."""
    from textual.widgets.text_area import TextAreaTheme

    return TextAreaTheme(name=syntax_theme_name(app_theme), syntax_styles=syntax_styles(variables))
