"""Recursive-descent parser: tokens of one statement -> a statement tree. Nothing is evaluated."""

from __future__ import annotations

from fractions import Fraction

from worksheet.errors import ParseError
from worksheet.syntax import tree as t
from worksheet.syntax.tokens import Kind, Token, tokenize
from worksheet.syntax.units import parse_unit
from worksheet.syntax.use import looks_like_use, parse_use

MAX_NESTING = 60
"""Parentheses, calls and unary signs nested deeper than this are refused."""

MAX_DECIMAL_EXPONENT = 400
"""Literals like ``1e999999`` would build huge exact integers; refuse them."""

MAX_FACTOR = 1e6
"""'within factor F' is a log-normal spread; wider than this is a log range's job."""

RESERVED = frozenset({"check", "in", "within"})
_OP = Kind.OP
_ADDITIVE = ("+", "-")
_MULTIPLICATIVE = ("*", "/")
COMPARISONS = ("==", "<=", ">=", "<", ">", "~")


class _Parser:
    def __init__(self, tokens: list[Token]):
        self.tokens = tokens
        self.index = 0
        self.depth = 0

    # --- token helpers ---
    def peek(self, offset: int = 0) -> Token:
        index = self.index + offset
        tokens = self.tokens
        return tokens[index] if index < len(tokens) else tokens[-1]

    def take(self) -> Token:
        token = self.tokens[self.index]
        if token.kind is not Kind.END:
            self.index += 1
        return token

    def at(self, text: str, kind: Kind = Kind.OP) -> bool:
        token = self.peek()
        return token.kind is kind and token.text == text

    def at_word(self, word: str) -> bool:
        return self.at(word, Kind.NAME)

    def expect(self, text: str, kind: Kind = Kind.OP, what: str | None = None) -> Token:
        if not self.at(text, kind):
            raise self.error(f"expected {what or repr(text)}, found {self.peek().describe()}")
        return self.take()

    def expect_name(self, what: str = "a name") -> Token:
        token = self.peek()
        if token.kind is not Kind.NAME:
            raise self.error(f"expected {what}, found {token.describe()}")
        check_name(token)
        return self.take()

    def expect_unit(self, what: str = "a unit in brackets") -> tuple[t.UnitExpr, Token]:
        token = self.peek()
        if token.kind is not Kind.UNIT:
            raise self.error(f"expected {what}, found {token.describe()}")
        self.take()
        return parse_unit(token.text, token.line, token.column + 1), token

    def error(self, message: str, token: Token | None = None) -> ParseError:
        token = token or self.peek()
        return ParseError(message, token.line, token.column)

    def expect_end(self) -> None:
        token = self.peek()
        if token.kind is not Kind.END:
            hint = ""
            if token.kind is Kind.UNIT:
                hint = "; a unit in brackets goes right after a number or ')'"
            elif token.kind is Kind.OP and token.text == "=":
                hint = "; to compare, write 'check A == B'"
            raise self.error(f"unexpected {token.describe()}{hint}")

    # --- expressions ---
    def enter(self) -> None:
        self.depth += 1
        if self.depth > MAX_NESTING:
            raise self.error(f"expression nested more than {MAX_NESTING} levels deep")

    def expression(self) -> t.Expr:
        self.enter()
        try:
            node = self.term()
            tokens = self.tokens
            while (op := tokens[self.index]).kind is _OP and op.text in _ADDITIVE:
                self.index += 1
                right = self.term()
                node = t.binop(op.text, node, right, op.line, op.column)
            return node
        finally:
            self.depth -= 1

    def term(self) -> t.Expr:
        node = self.unary()
        tokens = self.tokens
        while (op := tokens[self.index]).kind is _OP and op.text in _MULTIPLICATIVE:
            self.index += 1
            right = self.unary()
            node = t.binop(op.text, node, right, op.line, op.column)
        return node

    def unary(self) -> t.Expr:
        op = self.tokens[self.index]
        if op.kind is _OP and op.text in _ADDITIVE:
            self.index += 1
            self.enter()
            try:
                operand = self.unary()
            finally:
                self.depth -= 1
            if op.text == "+":
                return operand
            return t.Neg(operand, line=op.line, column=op.column)
        return self.power()

    def power(self) -> t.Expr:
        base = self.postfix()
        following = self.tokens[self.index]
        if following.kind is _OP and following.text == "^":
            if isinstance(base, t.Unit):
                raise self.error(
                    f"unit powers go inside the brackets: write [{base.unit.source}^2]"
                )
            op = self.take()
            self.enter()
            try:
                exponent = self.unary()  # right-associative, allows 2^-1
            finally:
                self.depth -= 1
            return t.power(base, exponent, op.line, op.column)
        return base

    def postfix(self) -> t.Expr:
        """A primary, with a unit bound to it when one follows a number or ')'."""
        start = self.tokens[self.index]
        node = self.primary()
        if self.tokens[self.index].kind is Kind.UNIT:
            closes = self.tokens[self.index - 1].text == ")" if self.index else False
            if not (isinstance(node, t.Number) or closes):
                raise self.error(
                    f"a unit in brackets goes right after a number or ')'; write "
                    f"{start.text}*[{self.peek().text}] to multiply"
                )
            unit_token = self.peek()
            unit, _ = self.expect_unit()
            unit_node = t.unit(unit, unit_token.line, unit_token.column)
            node = t.binop("*", node, unit_node, unit_token.line, unit_token.column)
            if self.at("^"):
                raise self.error(
                    f"unit powers go inside the brackets: write [({unit.source})^2] "
                    f"or ({start.text} [{unit.source}])^2"
                    if not unit.source.isidentifier()
                    else f"unit powers go inside the brackets: write [{unit.source}^2]"
                )
        return node

    def primary(self) -> t.Expr:
        token = self.tokens[self.index]
        if token.kind is Kind.NUMBER:
            self.index += 1
            return number_node(token)
        if token.kind is Kind.UNIT:
            unit, _ = self.expect_unit()
            return t.unit(unit, token.line, token.column)
        if token.kind is Kind.NAME:
            check_name(token)
            self.index += 1
            following = self.tokens[self.index]
            if following.kind is _OP and following.text == "(":
                return self.call(token)
            return t.name(token.text, token.line, token.column)
        if self.at("("):
            self.take()
            self.enter()
            try:
                inner = self.expression()
            finally:
                self.depth -= 1
            self.expect(")", what="')'")
            return inner
        if token.kind is Kind.END:
            raise self.error("the expression ends too early")
        raise self.error(f"unexpected {token.describe()}")

    def call(self, name: Token) -> t.Call:
        self.expect("(")
        self.enter()
        try:
            args: list[t.Expr] = []
            if not self.at(")"):
                while True:
                    args.append(self.argument())
                    if self.at(","):
                        self.take()
                        continue
                    break
            self.expect(")", what="',' or ')'")
        finally:
            self.depth -= 1
        return t.Call(name.text, tuple(args), line=name.line, column=name.column)

    def argument(self) -> t.Expr:
        left = self.expression()
        if self.at("=="):
            op = self.take()
            right = self.expression()
            return t.Equation(left, right, line=op.line, column=op.column)
        return left

    # --- statement pieces ---
    def conversion(self) -> t.Conversion | None:
        if not self.at_word("in"):
            return None
        word = self.take()
        natural = False
        if self.at_word("planck"):
            self.take()
            return t.Conversion(
                t.UnitExpr((), Fraction(1), "planck"), False, word.line, word.column, planck=True
            )
        if self.at_word("natural"):
            self.take()
            natural = True
        unit, _ = self.expect_unit("a unit in brackets after 'in'")
        return t.Conversion(unit, natural, word.line, word.column)

    def uncertainty(self) -> t.Uncertainty | None:
        if not self.at("+-"):
            return None
        self.take()
        if self.peek().kind is Kind.NUMBER and self.peek(1).kind is Kind.PERCENT:
            value = number_node(self.take()).value
            self.take()
            return t.Uncertainty(value / 100, None)
        return t.Uncertainty(None, self.expression())

    def ranged(self, low: t.Expr) -> tuple[t.Expr, t.Ranged | None]:
        """``a .. b log`` / ``a .. b lin`` or ``within factor F`` after a definition's value."""
        if self.at(".."):
            dots = self.take()
            high = self.expression()
            word = self.peek()
            if not (word.kind is Kind.NAME and word.text in ("log", "lin")):
                raise self.error(
                    "after a range say 'log' (log-uniform) or 'lin' (uniform), as in "
                    "'1e-3 .. 1e-1 [1/(pc^3*yr)] log'"
                )
            self.take()
            ranged = t.Ranged(word.text, high=high, line=dots.line, column=dots.column)
            return _shared_unit(low, high), ranged
        if self.at_word("within"):
            word = self.take()
            if not self.at_word("factor"):
                raise self.error(
                    "a definition takes 'within factor F' (a log-normal input); a tolerance "
                    "'within ...' belongs to a 'check'"
                )
            self.take()
            token = self.peek()
            if token.kind is not Kind.NUMBER:
                raise self.error(
                    f"expected the factor (a number above 1), found {token.describe()}"
                )
            factor = number_node(self.take()).value
            if not 1 < factor <= MAX_FACTOR:
                raise self.error(
                    "the factor of 'within factor F' must be above 1 and at most 1e6 "
                    "(for a wider spread write a log range, 'a .. b log')",
                    token,
                )
            return low, t.Ranged("factor", factor=factor, line=word.line, column=word.column)
        return low, None


def _shared_unit(low: t.Expr, high: t.Expr) -> t.Expr:
    """``1e-3 .. 1e-1 [1/(pc^3*yr)]``: a bare number at the low end takes the high end's unit."""
    bare = low.operand if isinstance(low, t.Neg) else low
    if (
        isinstance(bare, t.Number)
        and isinstance(high, t.BinOp)
        and high.op == "*"
        and isinstance(high.left, t.Number)
        and isinstance(high.right, t.Unit)
    ):
        return t.BinOp("*", low, high.right, line=low.line, column=low.column)
    return low


def number_node(token: Token) -> t.Number:
    literal = token.text
    mantissa, _, exponent = literal.lower().partition("e")
    if exponent and abs(int(exponent)) > MAX_DECIMAL_EXPONENT:
        raise ParseError(
            f"number {literal} is out of range (decimal exponents up to {MAX_DECIMAL_EXPONENT})",
            token.line,
            token.column,
        )
    if len(mantissa.replace(".", "")) > 60:
        raise ParseError(f"number {literal[:20]}... has too many digits", token.line, token.column)
    value = _LITERALS.get(literal)
    if value is None:
        value = Fraction(int(literal)) if literal.isdigit() else Fraction(literal)
        if len(_LITERALS) < _LITERALS_KEPT:
            _LITERALS[literal] = value
    return t.number(value, literal, token.line, token.column)


_LITERALS: dict[str, Fraction] = {}
"""Exact values of literals already read (a Fraction is immutable, so one may be shared):
a sheet writes the same few numbers, 2, 8, 1e3, over and over."""
_LITERALS_KEPT = 4096


def check_name(token: Token) -> None:
    if token.text[0] == "_":
        raise ParseError(
            f"names starting with '_' are refused ('{token.text}')", token.line, token.column
        )
    if token.text in RESERVED:
        raise ParseError(f"'{token.text}' is a keyword, not a name", token.line, token.column)


def _source_text(text: str) -> str:
    """The statement without its comment, with continuation lines joined."""
    lines = []
    for raw in text.split("\n"):
        head = raw.split("#", 1)[0]
        lines.append(head.strip())
    return " ".join(part for part in lines if part)


def parse_statement(text: str, line: int = 1, column: int = 1) -> t.AnyStatement:
    """Parse one statement (possibly spanning continuation lines).

    >>> parse_statement("r_s = 2*G*M/c^2").name
    'r_s'
    """
    if looks_like_use(text):  # its quoted path is not an expression token
        return parse_use(text, line, column)
    tokens = tokenize(text, line, column)
    source = _source_text(text)
    first = tokens[0]
    parser = _Parser(tokens)
    if first.kind is Kind.END:
        return t.Blank(line, column, "")
    pos = (first.line, first.column, source)
    if first.kind is Kind.NAME and first.text == "check":
        return _parse_check(parser, pos)
    if first.kind is Kind.NAME and parser.peek(1).kind is Kind.NAME:
        keyword = {
            "scaling": _parse_scaling,
            "table": _parse_table,
            "plot": _parse_plot,
            "variance": _parse_variance,
            "histogram": _parse_histogram,
        }.get(first.text)
        if keyword:
            return keyword(parser, pos)
    if first.kind is Kind.NAME and first.text == "estimate" and parser.peek(1).kind is Kind.NAME:
        return _parse_estimate(parser, pos)
    if first.kind is Kind.NAME:
        second = parser.peek(1)
        if second.kind is Kind.OP and second.text == "=":
            check_name(first)
            parser.index = 2
            expr, ranged = parser.ranged(parser.expression())
            uncertainty = parser.uncertainty()
            conversion = parser.conversion()
            if uncertainty is None:
                uncertainty = parser.uncertainty()
            if ranged is not None and uncertainty is not None:
                raise ParseError(
                    "a ranged input takes no '+-': the range already says how uncertain it is",
                    ranged.line,
                    ranged.column,
                )
            parser.expect_end()
            return t.Definition(*pos, first.text, expr, conversion, uncertainty, ranged)
        if second.kind is Kind.OP and second.text == ":":
            check_name(first)
            parser.index = 2
            unit, _ = parser.expect_unit("a unit in brackets after ':' (a declaration)")
            parser.expect_end()
            return t.Declaration(*pos, first.text, unit)
        if second.kind is Kind.OP and second.text == "(" and _is_relation_head(tokens):
            check_name(first)
            parser.index = 2
            params: list[str] = []
            while True:
                params.append(parser.expect_name("a parameter name").text)
                if parser.at(","):
                    parser.take()
                    continue
                break
            parser.expect(")")
            parser.expect("=")
            if len(set(params)) != len(params):
                raise ParseError(f"a parameter of {first.text} is named twice", *pos[:2])
            expr = parser.expression()
            parser.expect_end()
            return t.Relation(*pos, first.text, tuple(params), expr)
    expr = parser.expression()
    conversion = parser.conversion()
    parser.expect_end()
    return t.Display(*pos, expr, conversion)


def _is_relation_head(tokens: list[Token]) -> bool:
    """``NAME ( NAME , ... ) =``: a relation rather than a call being displayed."""
    i = 2
    while i < len(tokens) and tokens[i].kind is Kind.NAME:
        i += 1
        if tokens[i].text == ",":
            i += 1
            continue
        break
    return (
        i + 1 < len(tokens)
        and tokens[i].text == ")"
        and tokens[i + 1].kind is Kind.OP
        and tokens[i + 1].text == "="
    )


def _parse_check(parser: _Parser, pos: tuple[int, int, str]) -> t.Check:
    parser.take()
    left = parser.expression()
    token = parser.peek()
    if not (token.kind is Kind.OP and token.text in COMPARISONS):
        raise parser.error(f"expected a comparison (==, <, <=, >, >=, ~), found {token.describe()}")
    op = parser.take().text
    right = parser.expression()
    tolerance: Fraction | None = None
    absolute: t.Expr | None = None
    if parser.at_word("within"):
        word = parser.take()
        if op != "==":
            raise parser.error("'within' goes with '==' only", word)
        if parser.peek().kind is Kind.NUMBER and parser.peek(1).kind is Kind.PERCENT:
            tolerance = number_node(parser.take()).value / 100
            parser.take()
        else:
            bound = parser.expression()
            if isinstance(bound, t.Number):
                tolerance = bound.value
            else:
                absolute = bound
    fraction: Fraction | None = None
    if parser.at_word("in"):
        parser.take()
        if not (parser.peek().kind is Kind.NUMBER and parser.peek(1).kind is Kind.PERCENT):
            raise parser.error("expected the share of samples, as in 'in 95%'")
        token = parser.peek()
        fraction = number_node(parser.take()).value / 100
        parser.take()
        if not 0 < fraction <= 1:
            raise parser.error("the share of samples must be above 0% and at most 100%", token)
    parser.expect_end()
    return t.Check(*pos, op, left, right, tolerance, absolute, fraction)


def _parse_scaling(parser: _Parser, pos: tuple[int, int, str]) -> t.Scaling:
    parser.take()
    target = parser.expect_name("the quantity to scale").text
    unit = None
    if parser.at_word("in"):
        parser.take()
        unit, _ = parser.expect_unit()
    if not parser.at_word("around"):
        raise parser.error(f"expected 'around', found {parser.peek().describe()}")
    parser.take()
    around: list[tuple[str, t.Expr]] = []
    while True:
        name = parser.expect_name("an input name").text
        parser.expect("=")
        around.append((name, parser.expression()))
        if parser.at(","):
            parser.take()
            continue
        break
    parser.expect_end()
    return t.Scaling(*pos, target, unit, tuple(around))


def _parse_sweep(parser: _Parser, most: int, what: str) -> t.Sweep:
    """``M = a .. b log N``, ``M = a .. b lin N`` or ``M = a, b, c``."""
    name = parser.expect_name("the swept input").text
    parser.expect("=")
    values = [parser.expression()]
    spacing: str | None = None
    if parser.at(".."):
        parser.take()
        values.append(parser.expression())
        word = parser.peek()
        if not (word.kind is Kind.NAME and word.text in ("log", "lin")):
            raise parser.error("expected 'log N' or 'lin N' after the range")
        spacing = parser.take().text
        count_token = parser.peek()
        if count_token.kind is not Kind.NUMBER or not count_token.text.isdigit():
            raise parser.error(f"expected a whole number of {what}")
        count = int(parser.take().text)
        if not 2 <= count <= most:
            raise parser.error(f"from 2 to {most} {what}", count_token)
    else:
        while parser.at(","):
            parser.take()
            values.append(parser.expression())
        count = len(values)
    return t.Sweep(name, tuple(values), spacing, count)


def _parse_columns(parser: _Parser, what: str) -> tuple[tuple[str, t.UnitExpr | None], ...]:
    """``T_H in [K], t_ev in [yr]``: quantities, each with an optional unit."""
    columns: list[tuple[str, t.UnitExpr | None]] = []
    while True:
        column = parser.expect_name(what).text
        unit = None
        if parser.at_word("in"):
            parser.take()
            unit, _ = parser.expect_unit()
        columns.append((column, unit))
        if not parser.at(","):
            return tuple(columns)
        parser.take()


def _parse_table(parser: _Parser, pos: tuple[int, int, str]) -> t.Table:
    parser.take()
    sweep = _parse_sweep(parser, 10000, "rows")
    parser.expect(":", what="':' before the columns")
    columns = _parse_columns(parser, "a quantity to tabulate")
    parser.expect_end()
    return t.Table(*pos, sweep, columns)


def _parse_plot(parser: _Parser, pos: tuple[int, int, str]) -> t.Plot:
    """``plot T_H in [K], t_ev in [yr] over M = 1e9 [kg] .. 1e15 [kg] log 40 [y log]``."""
    parser.take()
    columns = _parse_columns(parser, "a quantity to plot")
    if not parser.at_word("over"):
        raise parser.error(f"expected 'over' and the swept input, found {parser.peek().describe()}")
    parser.take()
    sweep = _parse_sweep(parser, 2000, "points")
    y_scale: str | None = None
    if parser.at_word("y"):
        parser.take()
        word = parser.peek()
        if not (word.kind is Kind.NAME and word.text in ("log", "lin")):
            raise parser.error("expected 'y log' or 'y lin'")
        y_scale = parser.take().text
    parser.expect_end()
    return t.Plot(*pos, sweep, columns, y_scale)


def _parse_variance(parser: _Parser, pos: tuple[int, int, str]) -> t.Variance:
    """``variance N_det``: each sampled input's share of the variance of N_det."""
    parser.take()
    target = parser.expect_name("the sampled quantity").text
    parser.expect_end()
    return t.Variance(*pos, target)


def _parse_histogram(parser: _Parser, pos: tuple[int, int, str]) -> t.Histogram:
    """``histogram N_det in [yr^-1]``: the distribution of a sampled quantity."""
    parser.take()
    target = parser.expect_name("the sampled quantity").text
    unit = None
    if parser.at_word("in"):
        parser.take()
        unit, _ = parser.expect_unit()
    parser.expect_end()
    return t.Histogram(*pos, target, unit)


def _parse_estimate(parser: _Parser, pos: tuple[int, int, str]) -> t.Estimate:
    parser.take()
    name = parser.expect_name("the name of the estimate").text
    unit, _ = parser.expect_unit("the target unit in brackets")
    if not parser.at_word("from"):
        raise parser.error(f"expected 'from', found {parser.peek().describe()}")
    parser.take()
    inputs = [parser.expect_name("an input quantity").text]
    while parser.at(","):
        parser.take()
        inputs.append(parser.expect_name("an input quantity").text)
    parser.expect_end()
    return t.Estimate(*pos, name, unit, tuple(inputs))


def parse_expression(text: str, line: int = 1, column: int = 1) -> t.Expr:
    """Parse a lone expression (as given to ``worksheet calc``)."""
    parser = _Parser(tokenize(text, line, column))
    expr = parser.expression()
    parser.expect_end()
    return expr
