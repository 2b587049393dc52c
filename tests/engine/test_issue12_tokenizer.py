"""The regular-expression reading of plain ASCII tokens agrees with the character loop.

``tokenize`` reads plain tokens with one regular expression and leaves everything else to
the character loop; ``plain=False`` reads all of it with the loop. The two must give the
same tokens, or the same error at the same line and column, for any text.
"""

from __future__ import annotations

from hypothesis import given, settings
from hypothesis import strategies as st

from worksheet.errors import ParseError
from worksheet.syntax.tokens import tokenize

PIECES = [
    "x",
    "M_1",
    "_a",
    "e",
    "E",
    "5",
    "12",
    "1.",
    ".5",
    "1.5",
    "1e3",
    "2E-7",
    "3e+",
    "1..2",
    "..",
    ".",
    " ",
    "\t",
    "\r",
    "\n",
    "#c",
    "[kg]",
    "[m/s",
    "]",
    "*",
    "**",
    "/",
    "^",
    "+",
    "-",
    "+-",
    "=",
    "==",
    "<",
    "<=",
    ">",
    ">=",
    "~",
    ":",
    ",",
    "(",
    ")",
    "%",
    "'",
    "@",
    "π",
    "ħ",
    "±",
    "²",
    "×",
    "−",
    "é",
    "ψ1",
    "٣",
    "①",
    "¹",
    "\u00a0",
    "\u2028",
]


def reading(text: str, plain: bool) -> object:
    try:
        return [(tok.kind, tok.text, tok.line, tok.column) for tok in tokenize(text, 3, 5, plain)]
    except ParseError as err:
        return ("error", err.message, err.line, err.column)


@settings(max_examples=600, deadline=None)
@given(st.lists(st.sampled_from(PIECES), max_size=14).map("".join) | st.text(max_size=40))
def test_issue12_plain_tokens_read_as_the_character_loop_reads_them(text: str) -> None:
    assert reading(text, plain=True) == reading(text, plain=False)


def test_issue12_plain_tokens_cover_a_typical_line() -> None:
    text = "T_H = hbar*c**3/(8*pi*G*M*k_B) in [K]  # Hawking temperature"
    assert reading(text, True) == reading(text, False)
    assert [tok.text for tok in tokenize(text)][:6] == ["T_H", "=", "hbar", "*", "c", "^"]
