"""Parser for the text inside unit brackets: ``kg``, ``m^3/(kg*s^2)``, ``erg/s``, ``1/s``.

Our own small grammar, so that bracket text never reaches a library parser unchecked.
"""

from __future__ import annotations

import re
from fractions import Fraction

from worksheet.errors import ParseError
from worksheet.syntax.tokens import foreign_digit_error
from worksheet.syntax.tree import UnitExpr

MAX_UNIT_POWER = 100

_TOKEN = re.compile(
    r"\s*(?:(?P<number>[0-9]+(?:\.[0-9]*)?(?:[eE][+-]?[0-9]+)?|\.[0-9]+(?:[eE][+-]?[0-9]+)?)"
    r"|(?P<name>[^\W\d]\w*)|(?P<op>\*\*|[*/^()\-]))"
)


class _UnitParser:
    def __init__(self, text: str, line: int, column: int):
        self.text = text
        self.line = line
        self.column = column  # column of the first character inside the brackets
        self.tokens: list[tuple[str, str, int]] = []
        pos = 0
        stripped = text.rstrip()
        while pos < len(stripped):
            match = _TOKEN.match(stripped, pos)
            if not match or match.end() == pos:
                bad = stripped[pos:].lstrip()[:1]
                where = column + pos + (len(stripped[pos:]) - len(stripped[pos:].lstrip()))
                if bad.isnumeric():
                    raise foreign_digit_error(bad, line, where)
                raise ParseError(f"unexpected character '{bad}' in unit [{text}]", line, where)
            kind = match.lastgroup or ""
            value = match.group(kind)
            foreign = next((c for c in value if c.isnumeric() and not c.isascii()), None)
            if foreign is not None:  # a name may not carry '¹' or '٣' either
                raise foreign_digit_error(foreign, line, column + match.start(kind))
            self.tokens.append((kind, "^" if value == "**" else value, column + match.start(kind)))
            pos = match.end()
        self.tokens.append(("end", "", column + len(stripped)))
        self.index = 0

    def error(self, message: str) -> ParseError:
        where = self.tokens[min(self.index, len(self.tokens) - 1)][2]
        return ParseError(f"{message} in unit [{self.text}]", self.line, where)

    def peek(self) -> tuple[str, str, int]:
        return self.tokens[self.index]

    def take(self) -> tuple[str, str, int]:
        token = self.tokens[self.index]
        if token[0] != "end":  # the end is taken as often as asked, never passed
            self.index += 1
        return token

    def parse(self) -> UnitExpr:
        if self.peek()[0] == "end":
            raise self.error("no unit")
        scale, factors = self.product(depth=0)
        if self.peek()[0] != "end":
            raise self.error(f"unexpected '{self.peek()[1]}'")
        merged: dict[str, Fraction] = {}
        for name, power in factors:
            merged[name] = merged.get(name, Fraction(0)) + power
        kept = tuple((name, power) for name, power in merged.items() if power != 0)
        return UnitExpr(kept, scale, self.text.strip())

    def product(self, depth: int) -> tuple[Fraction, list[tuple[str, Fraction]]]:
        scale, factors = self.power(depth)
        while True:
            kind, value, _ = self.peek()
            if value in ("*", "/"):
                self.take()
                sign = 1 if value == "*" else -1
            elif kind in ("name", "number") or value == "(":
                sign = 1  # a space multiplies, as in 'kg m'
            else:
                return scale, factors
            more_scale, more = self.power(depth)
            scale *= more_scale if sign == 1 else 1 / more_scale
            factors.extend((name, power * sign) for name, power in more)

    def power(self, depth: int) -> tuple[Fraction, list[tuple[str, Fraction]]]:
        kind, value, _ = self.peek()
        if kind == "number":
            self.take()
            number = Fraction(value)
            if number == 0:
                raise self.error("a unit cannot be scaled by zero")
            scale, factors = number, []
        elif kind == "name":
            self.take()
            scale, factors = Fraction(1), [(value, Fraction(1))]
        elif value == "(":
            if depth > 20:
                raise self.error("units nested too deeply")
            self.take()
            scale, factors = self.product(depth + 1)
            if self.take()[1] != ")":
                raise self.error("missing ')'")
        else:
            raise self.error("expected a unit name" if kind != "end" else "unit ends too early")
        if self.peek()[1] == "^":
            self.take()
            exponent = self.exponent()
            if scale != 1:
                if exponent.denominator != 1:
                    raise self.error("a number in a unit can only take a whole power")
                scale = scale ** int(exponent)
            factors = [(name, power * exponent) for name, power in factors]
        return scale, factors

    def exponent(self) -> Fraction:
        sign = 1
        if self.peek()[1] == "-":
            self.take()
            sign = -1
        kind, value, _ = self.peek()
        if kind == "number":
            self.take()
            result = Fraction(value)
        elif value == "(":
            self.take()
            if self.peek()[1] == "-":
                self.take()
                sign = -sign
            num = self.take()
            if num[0] != "number":
                raise self.error("a unit power must be a number")
            result = Fraction(num[1])
            if self.peek()[1] == "/":
                self.take()
                den = self.take()
                if den[0] != "number" or Fraction(den[1]) == 0:
                    raise self.error("a unit power must be a number")
                result /= Fraction(den[1])
            if self.take()[1] != ")":
                raise self.error("missing ')'")
        else:
            raise self.error("a unit power must be a number")
        result *= sign
        if abs(result) > MAX_UNIT_POWER:
            raise self.error(f"unit power {result} is out of range (at most {MAX_UNIT_POWER})")
        return result


# Parsed bracket texts: a sheet writes the same few units again and again, and a parsed
# unit holds no position (errors, which do, are not kept).
_PARSED: dict[str, UnitExpr] = {}
_PARSED_LIMIT = 4096


def parse_unit(text: str, line: int = 1, column: int = 1) -> UnitExpr:
    """Parse bracket contents into a product of named units to exact powers.

    >>> parse_unit("m^3/(kg*s^2)").factors
    (('m', Fraction(3, 1)), ('kg', Fraction(-1, 1)), ('s', Fraction(-2, 1)))
    """
    parsed = _PARSED.get(text)
    if parsed is None:
        parsed = _UnitParser(text, line, column).parse()
        if len(_PARSED) >= _PARSED_LIMIT:
            _PARSED.clear()
        _PARSED[text] = parsed
    return parsed
