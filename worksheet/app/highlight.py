"""Spans of the calc-cell grammar (numbers, units, names, verbs, comments) for colouring."""

from __future__ import annotations

import re

# The words are listed here rather than imported from the engine's translator, which loads
# sympy: the highlighter runs at the first paint, before the engine is imported.
# tests/app/test_highlight_words.py keeps the two lists in step.
VERBS = frozenset(
    {
        "diff",
        "integrate",
        "solve",
        "simplify",
        "expand",
        "factor",
        "series",
        "limit",
        "dsolve",
        "subs",
        "natural",
    }
)
KEYWORDS = frozenset(
    {
        "check",
        "in",
        "within",
        "around",
        "scaling",
        "table",
        "estimate",
        "from",
        "log",
        "lin",
        "use",
        "library",
        "variance",
        "histogram",
    }
)
FUNCTIONS = frozenset(
    {
        "sqrt",
        "exp",
        "ln",
        "log10",
        "sin",
        "cos",
        "tan",
        "asin",
        "acos",
        "atan",
        "sinh",
        "cosh",
        "tanh",
        "abs",
        "min",
        "max",
    }
)

# Which highlight name (as TextArea themes spell them) each kind of token gets.
STYLE_OF = {
    "comment": "comment",
    "unit": "type",
    "number": "number",
    "verb": "keyword.function",
    "keyword": "keyword",
    "function": "function.call",
    "name": "class",
}

_TOKEN = re.compile(
    r"(?P<comment>#.*$)"
    r"|(?P<unit>\[[^\]]*\]?)"
    r"|(?P<number>(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?%?)"
    r"|(?P<word>[^\W\d]\w*)"
)


def line_spans(line: str) -> list[tuple[int, int, str]]:
    """Character spans ``(start, end, kind)`` of one line; partial text is fine.

    >>> line_spans("x = 2 [m]  # two")
    [(0, 1, 'name'), (4, 5, 'number'), (6, 9, 'unit'), (11, 16, 'comment')]
    """
    spans: list[tuple[int, int, str]] = []
    for match in _TOKEN.finditer(line):
        kind = match.lastgroup or "word"
        if kind == "word":
            word = match.group()
            if word in VERBS:
                kind = "verb"
            elif word in KEYWORDS:
                kind = "keyword"
            elif word in FUNCTIONS:
                kind = "function"
            else:
                kind = "name"
        spans.append((match.start(), match.end(), kind))
    return spans
