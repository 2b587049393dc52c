"""Plain text made safe for LaTeX: every special character and common symbol escaped."""

from __future__ import annotations

from worksheet.export.names import LETTER_MACRO

_SPECIAL: dict[str, str] = {
    "\\": "\\textbackslash{}",
    "{": "\\{",
    "}": "\\}",
    "$": "\\$",
    "&": "\\&",
    "#": "\\#",
    "^": "\\textasciicircum{}",
    "_": "\\_",
    "%": "\\%",
    "~": "\\textasciitilde{}",
    "<": "\\textless{}",
    ">": "\\textgreater{}",
    "|": "\\textbar{}",
    '"': "\\textquotedbl{}",
    "\u00a0": "~",
}

_SYMBOLS: dict[str, str] = {
    "±": "\\ensuremath{\\pm}",
    "×": "\\ensuremath{\\times}",
    "·": "\\ensuremath{\\cdot}",
    "−": "\\ensuremath{-}",
    "≈": "\\ensuremath{\\approx}",
    "≤": "\\ensuremath{\\leq}",
    "≥": "\\ensuremath{\\geq}",
    "≠": "\\ensuremath{\\neq}",
    "∼": "\\ensuremath{\\sim}",
    "→": "\\ensuremath{\\to}",
    "∞": "\\ensuremath{\\infty}",
    "°": "\\ensuremath{^\\circ}",
    "ħ": "\\ensuremath{\\hbar}",
    "⊙": "\\ensuremath{\\odot}",
    "µ": "\\ensuremath{\\mu}",
    "²": "\\ensuremath{^2}",
    "³": "\\ensuremath{^3}",
    "…": "\\ldots{}",
    "–": "--",
    "—": "---",
    "‘": "`",
    "’": "'",
    "“": "``",
    "”": "''",
}


def escape_text(text: str) -> str:
    """Text for a LaTeX paragraph: specials escaped, Greek and common symbols as math.

    Other non-ASCII letters pass through (the standalone document reads UTF-8 input).

    >>> escape_text("50% of T_H & #1")
    '50\\\\% of T\\\\_H \\\\& \\\\#1'
    """
    out: list[str] = []
    for char in text:
        if char in _SPECIAL:
            out.append(_SPECIAL[char])
        elif char in _SYMBOLS:
            out.append(_SYMBOLS[char])
        elif char in LETTER_MACRO:
            out.append("\\ensuremath{" + LETTER_MACRO[char] + "}")
        elif char in "\t\r\n":
            out.append(" ")
        elif not char.isprintable():
            out.append("?")
        else:
            out.append(char)
    return "".join(out)


def escape_code(text: str, keep_spaces: bool = True) -> str:
    """Text for ``\\texttt``: as escape_text, no ligatures (``--``), spaces kept if asked.

    Kept spaces are unbreakable (``~``), so use them only for short lines; without them the
    text may also break after ``*`` and ``/``.
    """
    out: list[str] = []
    for char in escape_text(text):
        if char == " " and keep_spaces:
            out.append("~")
        elif char == "-":
            out.append("-{}")
        elif char in "*/" and not keep_spaces:
            out.append(char + "\\allowbreak{}")  # long formulas wrap after an operator
        else:
            out.append(char)
    return "".join(out)


def texttt(text: str, keep_spaces: bool = True) -> str:
    """Monospace sheet text, escaped."""
    return "\\texttt{" + escape_code(text, keep_spaces) + "}"
