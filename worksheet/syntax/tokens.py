"""Tokenizer for the statement language: text in, positioned tokens out (no evaluation)."""

from __future__ import annotations

import re
import unicodedata
from enum import Enum
from typing import NamedTuple

from worksheet.errors import ParseError

MAX_STATEMENT_LENGTH = 4000
"""Characters in one statement: longer input is refused before any work is done."""


class Kind(Enum):
    NUMBER = "number"
    NAME = "name"
    UNIT = "unit"  # a bracketed unit, text without the brackets
    OP = "operator"
    PERCENT = "percent"
    END = "end of statement"


class Token(NamedTuple):
    """One token with its position (a tuple: a line makes a few dozen of them)."""

    kind: Kind
    text: str
    line: int
    column: int

    def describe(self) -> str:
        if self.kind is Kind.END:
            return "the end of the statement"
        if self.kind is Kind.UNIT:
            return f"unit [{self.text}]"
        return f"'{self.text}'"


# Longest first so that '**' wins over '*', '<=' over '<', '+-' over '+'.
_OPERATORS = (
    "**",
    "==",
    "<=",
    ">=",
    "+-",
    "..",
    "+",
    "-",
    "*",
    "/",
    "^",
    "(",
    ")",
    ",",
    "=",
    "<",
    ">",
    "~",
    ":",
    "±",
)
_ALIASES = {"π": "pi", "ħ": "hbar", "×": "*", "·": "*", "−": "-", "²": "^2", "³": "^3"}


_DIGITS = frozenset("0123456789")

_PLAIN = re.compile(
    r"(?P<space>[ \t\r]+)"
    r"|(?P<number>(?:[0-9]+(?:\.(?!\.)[0-9]*)?|\.[0-9]+)(?:[eE][+-]?[0-9]+)?)"
    r"|(?P<name>[A-Za-z_][A-Za-z0-9_]*)"
    r"|(?P<op>\*\*|==|<=|>=|\+-|\.\.|[-+*/^(),=<>~:%])"
)
"""The plain ASCII tokens, read by one regular expression. Anything else (a newline, a
comment, a bracketed unit, a non-ASCII letter or alias, every error) is read by the
character loop below, which the expression must agree with token for token."""
_LINE_TOKEN = re.compile(
    r"[ \t\r]*(?:"
    r"(?P<number>(?:[0-9]+(?:\.(?!\.)[0-9]*)?|\.[0-9]+)(?:[eE][+-]?[0-9]+)?)"
    r"|(?P<name>[A-Za-z_][A-Za-z0-9_]*)"
    r"|(?P<op>\*\*|==|<=|>=|\+-|\.\.|[-+*/^(),=<>~:%])"
    r"|\[(?P<unit>[^\[\]]*)\]"
    r"|(?P<comment>#.*)"
    r")"
)
"""One token of a one-line ASCII statement with the blanks before it: the whole line is
read by this expression when its matches cover it end to end. A gap (a character no token
takes, an unclosed bracket) or a number running into a name leaves the line to the readers
below, which raise the error with its column."""
_ASCII_NAME_PART = frozenset("abcdefghijklmnopqrstuvwxyzABCDEFGHIJKLMNOPQRSTUVWXYZ0123456789_")


def _is_digit(char: str) -> bool:
    """An ASCII digit: ``str.isdigit`` also takes '¹', '①' and other scripts' digits."""
    return char in _DIGITS


def _is_name_start(char: str) -> bool:
    return char == "_" or unicodedata.category(char).startswith("L")


def _is_name_part(char: str) -> bool:
    return _is_name_start(char) or _is_digit(char)


def foreign_digit_error(char: str, line: int, column: int) -> ParseError:
    """The refusal of a digit-like character outside 0-9 (superscripts, circled, Arabic)."""
    name = unicodedata.name(char, "").lower() or repr(char)
    return ParseError(
        f"'{char}' ({name}) is not a digit of the sheet language: write numbers with 0-9 "
        "and powers with ^ (only ² and ³ stand for ^2 and ^3)",
        line,
        column,
    )


def _scan_number(text: str, start: int) -> int:
    """Index just past a decimal literal beginning at ``start``."""
    i = start
    n = len(text)
    while i < n and _is_digit(text[i]):
        i += 1
    if i < n and text[i] == "." and not text.startswith("..", i):
        i += 1
        while i < n and _is_digit(text[i]):
            i += 1
    if i < n and text[i] in "eE":
        j = i + 1
        if j < n and text[j] in "+-":
            j += 1
        if j < n and _is_digit(text[j]):
            while j < n and _is_digit(text[j]):
                j += 1
            i = j
    return i


def _tokenize_ascii_line(text: str, line: int, column: int) -> list[Token] | None:
    """The tokens of a one-line ASCII statement, or None where the slower readers must look."""
    tokens: list[Token] = []
    append = tokens.append
    new = tuple.__new__  # Token(...) less its Python-level __new__: a line has dozens
    position = 0
    for found in _LINE_TOKEN.finditer(text):
        start, end = found.span()
        if start != position:
            return None
        position = end
        group = found.lastindex
        first, last = found.span(group)
        if group == 3:  # an operator
            operator = text[first:last]
            if operator == "%":
                append(new(Token, (_PERCENT, operator, line, first + column)))
            else:
                canonical = "^" if operator == "**" else operator
                append(new(Token, (_OPERATOR, canonical, line, first + column)))
        elif group < 3:  # a number or a name
            if last < len(text) and text[last] in _ASCII_NAME_PART:
                return None  # '5e' or '3kg': the character loop says what is wrong
            kind = _NUMBER if group == 1 else _NAME
            append(new(Token, (kind, text[first:last], line, first + column)))
        elif group == 4:  # the text inside a unit's brackets
            append(new(Token, (_UNIT, text[first:last].strip(), line, first - 1 + column)))
    if position != len(text) and text[position:].strip(" \t\r"):
        return None
    append(new(Token, (_END, "", line, len(text) + column)))
    return tokens


_NUMBER, _NAME, _OPERATOR, _UNIT, _PERCENT, _END = (
    Kind.NUMBER,
    Kind.NAME,
    Kind.OP,
    Kind.UNIT,
    Kind.PERCENT,
    Kind.END,
)


def tokenize(text: str, line: int = 1, column: int = 1, plain: bool = True) -> list[Token]:
    """Split one statement into tokens; ``#`` starts a comment.

    ``line``/``column`` give the position of ``text[0]`` in the file. Newlines inside the
    text (continuation lines) advance the line count.

    >>> [t.text for t in tokenize("M = 5e11 [kg]  # mass")]
    ['M', '=', '5e11', 'kg', '']
    """
    if len(text) > MAX_STATEMENT_LENGTH:
        raise ParseError(
            f"statement is {len(text)} characters long; the limit is {MAX_STATEMENT_LENGTH}",
            line,
            column,
        )
    if plain and text.isascii() and "\n" not in text:
        whole = _tokenize_ascii_line(text, line, column)
        if whole is not None:
            return whole
    tokens: list[Token] = []
    i = 0
    n = len(text)
    cur_line, line_start = line, -column + 1  # column of text[i] is i - line_start + 1

    def col(index: int) -> int:
        return index - line_start + 1

    match_plain = _PLAIN.match if plain else (lambda text, index: None)
    while i < n:
        plain_token = match_plain(text, i)
        if plain_token is not None:
            end = plain_token.end()
            after = text[end] if end < n else ""
            group = plain_token.lastgroup
            if group == "space":
                i = end
                continue
            if group == "op":
                found = plain_token.group()
                kind = Kind.PERCENT if found == "%" else Kind.OP
                canonical = "^" if found == "**" else found
                tokens.append(Token(kind, canonical, cur_line, col(i)))
                i = end
                continue
            if not after or (after.isascii() and after not in _ASCII_NAME_PART):
                kind = Kind.NUMBER if group == "number" else Kind.NAME
                tokens.append(Token(kind, plain_token.group(), cur_line, col(i)))
                i = end
                continue
            # a number running into a name, or a name going on in another script: below
        char = text[i]
        if char == "\n":
            cur_line += 1
            line_start = i + 1
            i += 1
            continue
        if char in " \t\r":
            i += 1
            continue
        if char == "#":
            while i < n and text[i] != "\n":
                i += 1
            continue
        if char in _ALIASES:
            alias = _ALIASES[char]
            if alias[0] == "^":
                tokens.append(Token(Kind.OP, "^", cur_line, col(i)))
                tokens.append(Token(Kind.NUMBER, alias[1:], cur_line, col(i)))
            else:
                kind = Kind.NAME if alias[0].isalpha() else Kind.OP
                tokens.append(Token(kind, alias, cur_line, col(i)))
            i += 1
            continue
        if char.isnumeric() and not _is_digit(char):
            raise foreign_digit_error(char, cur_line, col(i))
        if _is_digit(char) or (char == "." and i + 1 < n and _is_digit(text[i + 1])):
            end = _scan_number(text, i)
            if end < n and _is_name_start(text[end]):
                raise ParseError(
                    f"a number runs into a name ('{text[i : end + 1]}'); put '*' between them, "
                    "or brackets around a unit",
                    cur_line,
                    col(i),
                )
            tokens.append(Token(Kind.NUMBER, text[i:end], cur_line, col(i)))
            i = end
            continue
        if _is_name_start(char):
            end = i
            while end < n and _is_name_part(text[end]):
                end += 1
            tokens.append(Token(Kind.NAME, text[i:end], cur_line, col(i)))
            i = end
            continue
        if char == "[":
            end = text.find("]", i + 1)
            newline = text.find("\n", i + 1)
            if end == -1 or (newline != -1 and newline < end):
                raise ParseError("'[' opens a unit that is never closed with ']'", cur_line, col(i))
            inner = text[i + 1 : end]
            if "[" in inner:
                raise ParseError("units cannot be nested inside brackets", cur_line, col(i))
            tokens.append(Token(Kind.UNIT, inner.strip(), cur_line, col(i)))
            i = end + 1
            continue
        if char == "]":
            raise ParseError("']' without a matching '['", cur_line, col(i))
        if char == "%":
            tokens.append(Token(Kind.PERCENT, "%", cur_line, col(i)))
            i += 1
            continue
        for op in _OPERATORS:
            if text.startswith(op, i):
                canonical = {"**": "^", "±": "+-"}.get(op, op)
                tokens.append(Token(Kind.OP, canonical, cur_line, col(i)))
                i += len(op)
                break
        else:
            shown = char if char.isprintable() else repr(char)
            hint = ""
            if char in "'\"":
                hint = " (the sheet language has no strings)"
            elif char in ".@{};!&|$`\\":
                hint = (
                    " (the sheet language has no attribute access, code or statements of that kind)"
                )
            raise ParseError(f"unexpected character {shown}{hint}", cur_line, col(i))
    tokens.append(Token(Kind.END, "", cur_line, col(n)))
    return tokens
