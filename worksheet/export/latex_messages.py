"""What the engine says about a result (a view's factor, an estimate's caveat, a precision
note), typeset: sheet expressions in it become math, the words stay text.

The message is the structured ``message`` field of a result, never the record line. A run
of ``a = b = 1`` or a word with an operator, a subscript or a known constant's name is
parsed with the sheet's own expression parser and typeset; a word that does not parse
stays escaped text.
"""

from __future__ import annotations

import re

from worksheet.errors import WorksheetError
from worksheet.export.latex_math import expr_latex
from worksheet.export.latex_text import escape_text
from worksheet.syntax import parse_expression

_TOKEN = r"[A-Za-z0-9_.*/^()+\-]+"
_PIECE = re.compile(rf"(?<![\w\[])({_TOKEN}(?: = {_TOKEN})*)")
_MATHY = re.compile(r"[*/^_(]")
_CONSTANT_WORDS = frozenset({"hbar", "c", "G", "k_B", "pi", "sigma_SB", "m_P", "l_P", "t_P"})


def _as_math(piece: str) -> str | None:
    core = piece.rstrip(".,;:)")
    if core.count("(") != core.count(")"):
        core = piece.rstrip(".,;:")
    parts = core.split(" = ")
    if len(parts) == 1 and not (_MATHY.search(core) or core in _CONSTANT_WORDS):
        return None
    if core[:1].isdigit() and len(parts) == 1:
        return None  # a bare number reads fine as text
    try:
        shown = " = ".join(expr_latex(parse_expression(part), inline=True) for part in parts)
    except WorksheetError:
        return None
    return "\\(" + shown + "\\)" + escape_text(piece[len(core) :])


def message_latex(message: str) -> str:
    """A result's note with its expressions typeset.

    >>> print(message_latex("natural units, hbar = c = k_B = 1: times k_B"))
    natural units, \\(\\hbar = c = k_{\\mathrm{B}} = 1\\): times \\(k_{\\mathrm{B}}\\)
    """
    out: list[str] = []
    last = 0
    for match in _PIECE.finditer(message):
        shown = _as_math(match.group(1))
        if shown is None:
            continue
        out.append(escape_text(message[last : match.start()]))
        out.append(shown)
        last = match.end()
    out.append(escape_text(message[last:]))
    return "".join(out)
