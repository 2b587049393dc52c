"""A note's ``$...$`` as plain HTML math (italic letters, sub and sup, CSS fractions).

The page has no script, so TeX is not typeset by a library in the browser; instead the
short list of macros that ``note_math`` lets through is read here. Math that uses anything
else (or does not pass that check) is shown as its TeX source, dollars included, in a
``<code>`` span: left for the reader, never lost.
"""

from __future__ import annotations

import re
from html import escape

from worksheet.export.html_math import MINUS, frac_html
from worksheet.export.names import GREEK
from worksheet.export.note_math import safe_tex_math

_SYMBOLS: dict[str, str] = {
    **GREEK,
    "varpi": "ϖ",
    "varrho": "ϱ",
    "varsigma": "ς",
    "cdot": "·",
    "times": "×",
    "pm": "±",
    "mp": "∓",
    "div": "÷",
    "sim": "∼",
    "simeq": "≃",
    "approx": "≈",
    "propto": "∝",
    "equiv": "≡",
    "neq": "≠",
    "ne": "≠",
    "leq": "≤",
    "le": "≤",
    "geq": "≥",
    "ge": "≥",
    "ll": "≪",
    "gg": "≫",
    "to": "→",
    "rightarrow": "→",
    "leftarrow": "←",
    "infty": "∞",
    "partial": "∂",
    "nabla": "∇",
    "hbar": "ħ",
    "ell": "ℓ",
    "odot": "⊙",
    "oplus": "⊕",
    "circ": "∘",
    "prime": "′",
    "dots": "…",
    "ldots": "…",
    "cdots": "⋯",
    "sum": "∑",
    "prod": "∏",
    "int": "∫",
    "oint": "∮",
    "langle": "⟨",
    "rangle": "⟩",
    "vert": "|",
    "Vert": "‖",
    "mid": "|",
    "in": "∈",
    "notin": "∉",
    "subset": "⊂",
    "cup": "∪",
    "cap": "∩",
}
_SPACED = frozenset(
    [
        "cdot",
        "times",
        "pm",
        "mp",
        "div",
        "sim",
        "simeq",
        "approx",
        "propto",
        "equiv",
        "neq",
        "ne",
        "leq",
        "le",
        "geq",
        "ge",
        "ll",
        "gg",
        "to",
        "rightarrow",
        "leftarrow",
        "in",
        "notin",
        "subset",
        "cup",
        "cap",
    ]
)
_WORDS = frozenset(
    [
        "log",
        "ln",
        "exp",
        "sin",
        "cos",
        "tan",
        "sinh",
        "cosh",
        "tanh",
        "arcsin",
        "arccos",
        "arctan",
        "min",
        "max",
        "det",
        "lim",
    ]
)
_SPACES = {",": "\u2009", ";": "\u2005", ":": "\u2005", "!": "", " ": " ", "quad": "\u2003"}
_SPACES["qquad"] = "\u2003\u2003"
_IGNORED = frozenset({"left", "right", "big", "Big", "bigl", "bigr"})
_TOKEN = re.compile(r"\\([A-Za-z]+|.)|(\s+)|(.)")


class _Unknown(Exception):
    """A part of the math this reader does not know: the source is shown instead."""


def _tokens(source: str) -> list[str]:
    out = []
    for match in _TOKEN.finditer(source):
        if match.group(1) is not None:
            out.append("\\" + match.group(1))
        elif match.group(2) is None:
            out.append(match.group(3))
    return out


class _Reader:
    def __init__(self, tokens: list[str]) -> None:
        self.tokens = tokens
        self.index = 0

    def until(self, end: str | None) -> str:
        out = []
        while self.index < len(self.tokens):
            token = self.tokens[self.index]
            if token == end:
                self.index += 1
                return "".join(out)
            out.append(self.atom_with_scripts())
        if end is not None:
            raise _Unknown(end)
        return "".join(out)

    def argument(self) -> str:
        if self.index >= len(self.tokens):
            raise _Unknown("missing argument")
        token = self.tokens[self.index]
        if token == "{":
            self.index += 1
            return self.until("}")
        return self.atom()

    def atom_with_scripts(self) -> str:
        text = self.atom()
        while self.index < len(self.tokens) and self.tokens[self.index] in ("^", "_"):
            tag = "sup" if self.tokens[self.index] == "^" else "sub"
            self.index += 1
            text += f"<{tag}>{self.argument()}</{tag}>"
        return text

    def atom(self) -> str:
        token = self.tokens[self.index]
        self.index += 1
        if token == "{":
            return self.until("}")
        if not token.startswith("\\"):
            if token.isalpha():
                return "<var>" + escape(token) + "</var>"
            if token == "-":
                return MINUS
            if token in "=<>+":
                return " " + escape(token) + " "
            return escape(token)
        name = token[1:]
        if name in ("frac", "dfrac", "tfrac"):
            top = self.argument()
            return frac_html(top, self.argument())
        if name == "sqrt":
            return '√<span class="radicand">' + self.argument() + "</span>"
        if name == "mathrm":
            return '<span class="upright">' + self.argument() + "</span>"
        if name in ("mathit", "mathcal"):
            return "<i>" + self.argument() + "</i>"
        if name == "mathbf":
            return "<b>" + self.argument() + "</b>"
        if name in _IGNORED:
            return ""
        if name in _SPACES:
            return _SPACES[name]
        if name in _WORDS:
            return name
        if name in _SYMBOLS:
            return f" {_SYMBOLS[name]} " if name in _SPACED else _SYMBOLS[name]
        if name in ("{", "}", "|"):
            return escape(name)
        raise _Unknown(name)


def tex_math_html(source: str, display: bool = False, block: bool = False) -> str:
    """A note's math as HTML, or its TeX source in ``<code>`` when it cannot be read.

    ``display`` centres it on its own line; ``block`` uses a ``div`` (a block of the note,
    not math inside a paragraph).

    >>> tex_math_html(r"M^{-1} \\propto T")
    '<span class="math"><var>M</var><sup>−1</sup> ∝ <var>T</var></span>'
    """
    tag = "div" if block else "span"
    shown = "math display" if display else "math"
    safe = safe_tex_math(source.strip())
    if safe is not None:
        try:
            body = _Reader(_tokens(safe)).until(None)
        except (_Unknown, IndexError):
            body = None
        if body is not None:
            return f'<{tag} class="{shown}">' + body + f"</{tag}>"
    dollars = "$$" if display else "$"
    code = "<code>" + escape(dollars + source + dollars) + "</code>"
    return f'<{tag} class="tex">' + code + f"</{tag}>"
