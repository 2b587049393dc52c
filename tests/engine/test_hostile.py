"""Hostile input: each is a clear error, quickly, with no side effect."""

from __future__ import annotations

import os
import time
from decimal import Decimal
from pathlib import Path

import pytest

from worksheet.engine import SheetEvaluator, calculate, split_statements
from worksheet.errors import WorksheetError
from worksheet.syntax import parse_statement

# Wall-clock limit per hostile statement: the budget is 5 s, so a clear error must come well
# before a human gives up waiting.
QUICK = 12.0

HOSTILE = [
    # Python code of every kind the sheet language has no place for.
    pytest.param("__import__('os')", id="import"),
    pytest.param("a.b", id="attribute"),
    pytest.param("x.__class__", id="dunder-attribute"),
    pytest.param("__builtins__", id="dunder-name"),
    pytest.param("lambda x: x", id="lambda"),
    pytest.param("[x for x in (1, 2)]", id="comprehension"),
    pytest.param("exec('1')", id="exec-call"),
    pytest.param("eval('1')", id="eval-call"),
    pytest.param("open('f', 'w')", id="open-call"),
    # Work that would never end or would exhaust memory.
    pytest.param("9^9^9^9", id="tower"),
    pytest.param("9**9**9**9", id="tower-stars"),
    pytest.param("factorial(10^10)", id="factorial"),
    pytest.param("(" * 3000 + "1" + ")" * 3000, id="deep-3000"),
    pytest.param("(" * 1500 + "1" + ")" * 1500, id="deep-1500-under-length-limit"),
    pytest.param("-" * 3000 + "1", id="many-signs"),
    pytest.param("1e99999", id="huge-literal"),
    pytest.param("1" * 100000, id="long-number"),
    pytest.param("+".join(["1"] * 50000), id="100000-chars"),
    pytest.param("exp(exp(exp(1000)))", id="nested-exp"),
    pytest.param("2^(10^10)", id="big-exponent"),
    pytest.param("(1 [m])^(10^10)", id="big-unit-exponent"),
]


@pytest.mark.parametrize("text", HOSTILE)
def test_hostile_calc_is_a_clear_error(ctx, text: str) -> None:
    started = time.monotonic()
    result = calculate(ctx, text)
    elapsed = time.monotonic() - started
    assert result.status == "error"
    assert result.message and result.message.startswith("line 1")
    assert elapsed < QUICK


@pytest.mark.parametrize("text", HOSTILE)
def test_hostile_statement_in_a_sheet(run_sheet, text: str) -> None:
    started = time.monotonic()
    results = run_sheet(f"a_ = 1\nb_ = {text}\nc_ = b_ + 1\nd_ = a_ + 1\n")
    elapsed = time.monotonic() - started
    assert [r.status for r in results[:2]] == ["ok", "error"]
    assert results[1].message.startswith("line 2")
    # The dependent must not compute; whether it is 'skipped' after a line that does not
    # parse is held by test_dependent_of_an_unparsable_definition_is_skipped.
    assert results[2].status in ("skipped", "error")
    assert results[3].status == "ok"
    assert elapsed < QUICK


def test_dependent_of_an_unparsable_definition_is_skipped(run_sheet) -> None:
    # 'b_ = a.b' is a definition of b_ that failed (SPEC 5: skipped = depends on a line
    # that erred), so line 3 should say it depends on line 2, not that b_ is unknown.
    results = run_sheet("a_ = 1\nb_ = a.b\nc_ = b_ + 1\n")
    assert results[1].status == "error"
    assert results[2].status == "skipped", results[2].message
    assert "depends on line 2" in results[2].message


@pytest.mark.parametrize(
    "text",
    [
        "__import__('os')",
        "a.b",
        "lambda x: x",
        "9^9^9^9" + "^9" * 2,
    ],
)
def test_parser_raises_its_own_error_types(text: str) -> None:
    # The tower may be refused by the parser or later by the translator; either way no
    # non-project exception.
    try:
        parse_statement(text, 3)
    except WorksheetError as err:
        assert err.line == 3
        assert err.message


def test_payloads_have_no_side_effect(ctx, tmp_path: Path) -> None:
    marker = tmp_path / "marker"
    cwd_before = os.getcwd()
    payloads = [
        f"__import__('os').system('touch {marker}')",
        f"open('{marker}', 'w')",
        f"__import__('pathlib').Path('{marker}').touch()",
        "x = __import__('os').getcwd()",
        "y = exec('import os')",
    ]
    for payload in payloads:
        result = calculate(ctx, payload)
        assert result.status == "error"
        sheet = SheetEvaluator(ctx).run(split_statements(payload + "\n", 1))
        assert all(r.status == "error" for r in sheet)
    assert not marker.exists()
    assert os.getcwd() == cwd_before
    assert list(tmp_path.iterdir()) == []


def test_runaway_symbolic_work_is_stopped(run_sheet) -> None:
    # A symbolic verb on a huge expansion (about two million terms): stopped by the time
    # budget or by the worker's memory cap, whichever it reaches first (both are the
    # statement's budget, SPEC section 6); the sheet goes on.
    started = time.monotonic()
    results = run_sheet("x : [1]\ny : [1]\nw = expand((x+y+1)^2000)\nq = 2\n")
    elapsed = time.monotonic() - started
    assert [r.status for r in results] == ["ok", "ok", "error", "ok"]
    message = results[2].message
    # The worker's own message ("expand ran past ...") or, on a loaded machine, the
    # statement timer's ("the statement ran past its time budget ...").
    assert "ran past its time budget" in message or "expand ran past its memory cap" in message
    assert message.startswith("line 3, col 5: "), message
    assert elapsed < 2 * QUICK


def test_continuation_of_a_hostile_statement(run_sheet) -> None:
    # An open parenthesis continues the statement; unbalanced text to the end is one error.
    results = run_sheet("z_ = (1 +\n__import__('os')\n")
    assert results[0].status == "error"
    assert results[0].line == 1


@pytest.mark.parametrize(
    ("text", "exact"),
    [
        # accepted by the parser (decimal exponents up to 400), past the double range
        ("1e400", Decimal(10) ** 400),
        ("-1e400 [kg]", -(Decimal(10) ** 400)),
        ("10^309", Decimal(10) ** 309),  # an exact power under the 5000-digit limit
        ("2^1024", Decimal(2) ** 1024),
        ("1e200*1e200", Decimal(10) ** 400),  # each factor representable, the product not
        ("(1e200 [kg])*(1e200 [kg])", Decimal(10) ** 400),
    ],
)
def test_numbers_past_the_double_range_are_flagged(ctx, text: str, exact: Decimal) -> None:
    # SPEC 6 and 8: no crash; the precision guard catches the float overflow, records the
    # high-precision value and says "precision loss" (expected value computed exactly here
    # with Python's decimal module).
    result = calculate(ctx, text)
    assert result.status == "ok", result.message
    assert result.precision == "overflow"
    mantissa, exponent = f"{exact:.3e}".split("e")
    assert f" = {mantissa}e{int(exponent)}" in result.record
    assert "precision loss: overflow" in result.record
