"""The editor of one calc cell: a TextArea coloured by the sheet grammar."""

from __future__ import annotations

from functools import lru_cache

from textual.widgets import TextArea

from worksheet.app.highlight import STYLE_OF, line_spans
from worksheet.app.syntax_theme import syntax_theme, syntax_theme_name


def _byte_offsets(line: str) -> list[int]:
    """Byte offset of each character position (and of the end) in the UTF-8 line."""
    offsets = [0]
    for char in line:
        offsets.append(offsets[-1] + len(char.encode("utf-8")))
    return offsets


@lru_cache(maxsize=4096)
def line_highlights(line: str) -> tuple[tuple[int, int, str], ...]:
    """Byte spans and highlight names of one line; cached, so a key re-tokenizes one line."""
    spans = line_spans(line)
    if not spans:
        return ()
    offsets = _byte_offsets(line)
    return tuple((offsets[start], offsets[end], STYLE_OF[kind]) for start, end, kind in spans)


class CalcEditor(TextArea):
    """A TextArea without tree-sitter that colours numbers, [units], names, verbs, comments.

    Keys are TextArea's own; tab moves focus (the sheet grammar needs no tabs).
    """

    DEFAULT_CSS = """
    CalcEditor { height: auto; max-height: 30; }
    """

    def __init__(self, text: str, **kwargs: object) -> None:
        super().__init__(text, tab_behavior="focus", soft_wrap=True, **kwargs)  # type: ignore[arg-type]

    def on_mount(self) -> None:
        self._follow_app_theme()
        self.app.theme_changed_signal.subscribe(self, lambda _theme: self._follow_app_theme())

    def _follow_app_theme(self) -> None:
        """Colour the grammar with the app theme's syntax colours (readable on its surface)."""
        name = syntax_theme_name(self.app.theme)
        if name not in self._themes:
            self.register_theme(syntax_theme(self.app.theme, self.app.current_theme.variables))
        self.theme = name

    def _build_highlight_map(self) -> None:
        # Textual's hook for syntax highlighting; filled from our own tokenizer.
        self._line_cache.clear()
        highlights = self._highlights
        highlights.clear()
        for row, line in enumerate(self.document.lines):
            spans = line_highlights(line)
            if spans:
                highlights[row].extend(spans)
