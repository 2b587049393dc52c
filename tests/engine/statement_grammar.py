"""Hostile statements drawn from the statement grammar (hypothesis strategies).

Shared by the property test (a few hundred examples) and ``benchmarks/fuzz_statements.py``
(a hundred thousand). The grammar is the README's, pushed to its edges: numbers past the
double range, unit powers at and past their limit, views of extreme dimensions, verbs on
huge exact numbers, digits from other scripts, broken brackets, and random characters
dropped into otherwise good text.
"""

from __future__ import annotations

from hypothesis import strategies as st

PRELUDE = "y : [1]\nM = 5e11 [kg]\nr_s = 2*G*M/c^2\nf(a) = a^2 + 1\n"
"""Lines 1-4 of every fuzzed sheet: a declared symbol, a given, a derived value, a relation."""

SENTINEL = "zz_after = 1"
"""The line after the fuzzed ones: it must always evaluate, whatever came before."""

NAMES = ["y", "M", "r_s", "G", "c", "hbar", "k_B", "pi", "M_sun", "l_P", "undefined_name"]
UNIT_NAMES = ["m", "s", "kg", "K", "pc", "M_sun", "MeV", "erg", "au", "Jy", "degC", "gauss"]
FUNCTIONS = ["sqrt", "exp", "log", "log10", "sin", "atan", "abs", "f"]
# Digit-like characters outside 0-9, operators and brackets in odd places, code-like text.
ODD_CHARACTERS = list("¹²³⁴①٣۵०½⅓∞−×·±πħ[](){}^*/+-.,:=<>~%#'\"\\$@!;_eE0 \t")

_DIGITS = st.text("0123456789", min_size=1, max_size=5)
_EXPONENT = st.integers(-450, 450)


def _number() -> st.SearchStrategy[str]:
    plain = st.one_of(
        _DIGITS,
        st.tuples(_DIGITS, _DIGITS).map(lambda p: f"{p[0]}.{p[1]}"),
        st.tuples(_DIGITS, _EXPONENT).map(lambda p: f"{p[0]}e{p[1]}"),
        st.sampled_from(["0", "1", "1e300", "1e-300", "1e308", "1e400", "1e-400", "10", "2"]),
    )
    return plain


def _unit() -> st.SearchStrategy[str]:
    name = st.sampled_from(UNIT_NAMES)
    power = st.one_of(
        st.integers(-130, 130).map(str),
        st.tuples(st.integers(-5, 130), st.sampled_from(["1", "2", "01", "3", "0"])).map(
            lambda p: f"({p[0]}/{p[1]})"
        ),
        st.sampled_from(["(2/01", "(-3)", "-", "", "1e2", "٣", "¹"]),
    )
    factor = st.one_of(
        name,
        st.tuples(name, power).map(lambda p: f"{p[0]}^{p[1]}"),
        st.tuples(_number(), name).map(lambda p: f"{p[0]} {p[1]}"),
    )
    joined = st.lists(
        st.tuples(st.sampled_from(["*", "/", " "]), factor), min_size=0, max_size=2
    ).map(lambda rest: "".join(op + f for op, f in rest))
    return st.tuples(factor, joined).map(lambda p: p[0] + p[1])


def _leaf() -> st.SearchStrategy[str]:
    return st.one_of(
        _number(),
        st.sampled_from(NAMES),
        st.tuples(_number(), _unit()).map(lambda p: f"{p[0]} [{p[1]}]"),
    )


def _extend(inner: st.SearchStrategy[str]) -> st.SearchStrategy[str]:
    binary = st.tuples(inner, st.sampled_from(["+", "-", "*", "/", "^"]), inner).map(
        lambda p: f"{p[0]} {p[1]} {p[2]}"
    )
    big_power = st.tuples(inner, st.integers(-5000, 5000)).map(lambda p: f"({p[0]})^{p[1]}")
    function = st.tuples(st.sampled_from(FUNCTIONS), inner).map(lambda p: f"{p[0]}({p[1]})")
    verb = st.one_of(
        st.tuples(st.sampled_from(["diff", "integrate"]), inner).map(
            lambda p: f"{p[0]}({p[1]}, y)"
        ),
        st.tuples(st.sampled_from(["expand", "factor", "simplify"]), inner).map(
            lambda p: f"{p[0]}({p[1]})"
        ),
        st.tuples(inner, inner).map(lambda p: f"subs({p[0]}, y, {p[1]})"),
        st.tuples(inner, inner).map(lambda p: f"limit({p[0]}, y, {p[1]})"),
        st.tuples(inner, st.integers(-2, 8)).map(lambda p: f"series({p[0]}, y, 0, {p[1]})"),
    )
    return st.one_of(
        binary,
        big_power,
        function,
        verb,
        inner.map(lambda e: f"({e})"),
        inner.map(lambda e: f"-{e}"),
    )


EXPRESSIONS = st.recursive(_leaf(), _extend, max_leaves=6)


def _statement() -> st.SearchStrategy[str]:
    e = EXPRESSIONS
    name = st.sampled_from(["v", "w", "r_s", "G", "y", "v2"])
    return st.one_of(
        st.tuples(name, e).map(lambda p: f"{p[0]} = {p[1]}"),
        e,
        st.tuples(e, _unit()).map(lambda p: f"{p[0]} in [{p[1]}]"),
        e.map(lambda x: f"{x} in planck"),
        st.tuples(e, _unit()).map(lambda p: f"{p[0]} in natural [{p[1]}]"),
        st.tuples(e, _unit()).map(lambda p: f"natural({p[0]}, [{p[1]}])"),
        st.tuples(e, st.sampled_from(["==", "<", ">=", "~"]), e).map(
            lambda p: f"check {p[0]} {p[1]} {p[2]}"
        ),
        st.tuples(e, e).map(lambda p: f"check {p[0]} == {p[1]} within 2%"),
        st.tuples(name, e, st.integers(0, 400)).map(lambda p: f"{p[0]} = {p[1]} +- {p[2]}%"),
        st.tuples(name, _unit()).map(lambda p: f"{p[0]} : [{p[1]}]"),
        st.tuples(name, e).map(lambda p: f"{p[0]}(a) = {p[1]}"),
        st.tuples(_unit(), e).map(lambda p: f"solve(r_s == {p[1]}, M) in [{p[0]}]"),
        st.tuples(e, _unit()).map(lambda p: f"scaling {p[0]} in [{p[1]}] around M = 1e12 [kg]"),
        st.tuples(_number(), _number(), st.integers(-1, 30), e).map(
            lambda p: f"table M = {p[0]} [kg] .. {p[1]} [kg] log {p[2]}: {p[3]}"
        ),
        st.tuples(_unit()).map(lambda p: f"estimate v3 [{p[0]}] from hbar, c, G, M"),
    )


def _mutated(text: str, position: int, char: str) -> str:
    """``text`` with ``char`` put in at ``position`` (clipped to the text)."""
    index = min(position, len(text))
    return text[:index] + char + text[index:]


STATEMENTS = st.one_of(
    _statement(),
    st.tuples(_statement(), st.integers(0, 60), st.sampled_from(ODD_CHARACTERS)).map(
        lambda p: _mutated(*p)
    ),
    st.text(st.sampled_from(ODD_CHARACTERS + list("abcxyz19")), min_size=1, max_size=12),
)
"""One hostile statement: from the grammar, with a stray character, or plain noise."""


def sheet_body(statement: str) -> str:
    """The body of a calc cell holding one fuzzed statement between known lines."""
    # A newline inside the statement would make it several; keep it one line.
    line = statement.replace("\n", " ").replace("\r", " ")
    return f"{PRELUDE}{line}\n{SENTINEL}\n"


def problems(results: list, statement_line: int = 5) -> list[str]:
    """What is wrong with the results of one fuzzed sheet (empty when all is as it should be).

    Every statement ends as a result; an error is a message on its own line that starts with
    its line number; nothing reaches the last-resort guard; the line after still evaluates.
    """
    found = []
    statuses = {"ok", "failed", "error", "skipped"}
    for result in results:
        if result.status not in statuses:
            found.append(f"line {result.line}: status {result.status!r}")
        if result.status == "error":
            message = result.message or ""
            if not message.startswith(f"line {result.line}") and not message.startswith("line "):
                found.append(f"line {result.line}: unlocated error {message!r}")
            if "\n" in message:
                found.append(f"line {result.line}: error over several lines {message!r}")
            if "internal error" in message:
                found.append(f"line {result.line}: {message}")
    last = results[-1] if results else None
    # An open parenthesis continues a statement onto the next line, so an unbalanced one
    # takes the sentinel into its own (recorded) error; otherwise the sentinel must hold.
    absorbed = last is not None and last.line == statement_line and SENTINEL in last.text
    if not absorbed and (last is None or last.line != statement_line + 1 or last.status != "ok"):
        found.append(f"the line after the statement did not evaluate: {results[-1:]}")
    return found


_DOCUMENT_LINES = [
    "---",
    "title: Fuzzed",
    "constants: CODATA2022",
    "digits: 3",
    "budget: 0.5",
    "budget: ٣",
    "```calc",
    "```result",
    "```",
    "~~~",
    "````calc",
    "   ```calc",
    "Some prose about the fictional Kestrel Ridge array.",
    "",
    "\ufeff",
    "M = 5e11 [kg]",
    "r_s = 2*G*M/c^2",
    "x = (1 +",
]
DOCUMENTS = st.tuples(
    st.lists(st.one_of(st.sampled_from(_DOCUMENT_LINES), STATEMENTS), max_size=14),
    st.lists(st.sampled_from(["\n", "\r\n", "\r"]), min_size=1, max_size=14),
).map(lambda p: "".join(line + p[1][k % len(p[1])] for k, line in enumerate(p[0])))
"""A random sheet file: front matter, fences and statements with mixed line ends."""
