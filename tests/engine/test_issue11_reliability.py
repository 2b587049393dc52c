"""Issue 11: a stopped verb never poisons a later one; every hostile input is a recorded error."""

from __future__ import annotations

import importlib.util
import json
import math
import operator
import os
import signal
import time
from collections.abc import Iterator
from pathlib import Path

import pytest
from hypothesis import HealthCheck, example, given, settings

from worksheet import cli
from worksheet.document import NoteBlock, parse_document
from worksheet.engine import Context, SheetEvaluator, calculate, make_context, split_statements
from worksheet.engine import sheet as sheet_module
from worksheet.engine.budget import Worker, statement_timer
from worksheet.engine.statements import StatementEvaluator
from worksheet.errors import BudgetError, DocumentError, WorksheetError
from worksheet.runner import SheetRunner

_spec = importlib.util.spec_from_file_location(
    "statement_grammar", Path(__file__).with_name("statement_grammar.py")
)
assert _spec is not None and _spec.loader is not None
grammar = importlib.util.module_from_spec(_spec)
_spec.loader.exec_module(grammar)


@pytest.fixture(scope="module")
def short_ctx() -> Iterator[Context]:
    """A one-second budget, as in the issue's reproduction."""
    context = make_context("CODATA2022", digits=4, seconds=1.0)
    yield context
    context.worker.close()


@pytest.fixture(scope="module")
def doc_runner() -> Iterator[SheetRunner]:
    runner = SheetRunner()
    yield runner
    runner.close()


class _Interrupted(Exception):
    """Stands for anything that stops the caller while the worker still computes."""


# --- the worker protocol ----------------------------------------------------------------


def test_issue11_an_interrupted_call_never_hands_its_answer_to_the_next() -> None:
    worker = Worker()

    def interrupt(signum, frame):
        raise _Interrupted

    previous = signal.signal(signal.SIGALRM, interrupt)
    try:
        signal.setitimer(signal.ITIMER_REAL, 0.3)
        with pytest.raises(_Interrupted):
            worker.call(time.sleep, (1.5,), 10.0, "slow")
        # Before the fix the worker went on sleeping, and its late None came back as the
        # answer to the addition, the sum as the answer to the subtraction, and so on.
        assert worker.call(operator.add, (2, 3), 10.0, "add") == 5
        assert worker.call(operator.sub, (9, 4), 10.0, "sub") == 5
        assert worker.call(operator.mul, (6, 7), 10.0, "mul") == 42
    finally:
        signal.setitimer(signal.ITIMER_REAL, 0)
        signal.signal(signal.SIGALRM, previous)
        worker.close()


def test_issue11_a_call_interrupted_while_waiting_kills_the_worker() -> None:
    worker = Worker()

    def interrupt(signum, frame):
        raise _Interrupted

    previous = signal.signal(signal.SIGALRM, interrupt)
    try:
        worker.call(operator.add, (1, 1), 10.0, "warm-up")
        first = worker.pid
        signal.setitimer(signal.ITIMER_REAL, 0.3)
        with pytest.raises(_Interrupted):
            worker.call(time.sleep, (30,), 60.0, "sleep")
        assert worker.pid is None  # stopped, not left computing
        assert worker.call(operator.add, (1, 2), 10.0, "add") == 3
        assert worker.pid != first
    finally:
        signal.setitimer(signal.ITIMER_REAL, 0)
        signal.signal(signal.SIGALRM, previous)
        worker.close()


class _ScriptedConnection:
    """A pipe end that replays replies, to show that stale ones are dropped."""

    def __init__(self, replies: list[tuple[int, str, object]]):
        self.replies = list(replies)

    def poll(self, timeout: float) -> bool:
        return bool(self.replies)

    def recv(self) -> tuple[int, str, object]:
        return self.replies.pop(0)


def test_issue11_replies_to_other_requests_are_dropped() -> None:
    worker = Worker()
    worker._connection = _ScriptedConnection([(3, "ok", "late"), (4, "ok", "later"), (5, "ok", 7)])
    assert worker._await(5, 1.0, "verb") == ("ok", 7)
    worker._connection = _ScriptedConnection([(3, "ok", "late")])
    with pytest.raises(BudgetError):
        worker._await(5, 0.2, "verb")


def test_issue11_issue_reproduction_later_verbs_get_their_own_answers(short_ctx) -> None:
    terms = " + ".join(f"integrate(y^{k}*exp(y), y)" for k in range(14, 24))
    body = f"y : [1]\nq1 = {terms}\nq2 = expand(y + 1)\nq3 = factor(y^2 - 1)\nq4 = diff(y^3, y)\n"
    results = {r.name: r for r in SheetEvaluator(short_ctx).run(split_statements(body, 1))}
    assert results["q1"].status == "error"
    assert "time budget of 1 s" in results["q1"].message
    for name, expected in [("q2", "y + 1"), ("q3", "(y - 1)*(y + 1)"), ("q4", "3*y^2")]:
        assert results[name].status == "ok", results[name]
        assert results[name].to_json()["symbolic"] == expected


def test_issue11_verbs_of_one_statement_share_one_budget() -> None:
    # Two verbs that each fit a 1 s budget but not together: the statement stops at about
    # one budget (the verb's deadline is what the statement has left), not at two.
    worker = Worker()
    try:
        started = time.monotonic()
        with pytest.raises(BudgetError), statement_timer(1.0):
            worker.call(time.sleep, (0.7,), 1.0, "first")
            worker.call(time.sleep, (0.7,), 1.0, "second")
        assert time.monotonic() - started < 1.6
    finally:
        worker.close()


# --- every hostile statement is a recorded error -----------------------------------------

SEEN_CRASHES = [
    pytest.param("¹", "not a digit", id="superscript-one"),
    pytest.param("①", "not a digit", id="circled-one"),
    pytest.param("x٣", "not a digit", id="arabic-indic-in-name"),
    pytest.param("1 [m^٣]", "not a digit", id="arabic-indic-unit-power"),
    pytest.param("1 [1e400 m]", "outside what a double can hold", id="unit-scale-1e400"),
    pytest.param("1 [M_sun^100]", "about 1e3030", id="unit-power-overflow"),
    pytest.param("1 [pc^-100]", "about 1e-1649", id="unit-power-underflow"),
    pytest.param("1 [m^-60] in planck", "Planck units", id="planck-underflow"),
    pytest.param("1 [m^-20] in natural [MeV]", "natural units", id="natural-overflow"),
    pytest.param("r_s^1000 in planck", "Planck units", id="planck-of-a-power"),
    pytest.param("1 [m^(2/01]", "missing ')'", id="unit-paren-at-end"),
]


@pytest.mark.parametrize(("statement", "says"), SEEN_CRASHES)
def test_issue11_seen_crashes_are_errors_on_their_line(ctx, statement: str, says: str) -> None:
    results = SheetEvaluator(ctx).run(split_statements(grammar.sheet_body(statement), 1))
    assert grammar.problems(results) == []
    fuzzed = results[4]
    assert fuzzed.status == "error"
    assert fuzzed.message.startswith("line 5, col ")
    assert says in fuzzed.message


def test_issue11_seen_crashes_that_have_a_value(ctx) -> None:
    # ² is the alias of ^2 also after a number's exponent: 1e1² = (1e1)^2.
    assert calculate(ctx, "1e1²").value == 100
    # -1e300*G: G's uncertainty times 1e300 squared overflowed; the result is finite.
    big = calculate(ctx, "-1e300*G")
    assert big.status == "ok", big.message
    u = big.to_json()["uncertainty"]
    # CODATA 2022: G = 6.67430(15)e-11, so u = 1e300 * 0.00015e-11 = 1.5e285.
    assert math.isclose(u, 1.5e285, rel_tol=1e-9)
    # subs(y, y, 10^4301): an exact integer past Python's 4300-digit text limit.
    results = SheetEvaluator(ctx).run(split_statements("y : [1]\nsubs(y, y, 10^4301)\n", 1))
    assert results[1].status == "ok", results[1].message
    assert results[1].to_json()["symbolic"] == "1e4301"


@pytest.mark.parametrize(
    "statement", ["--10 [M_sun^7] in planck", "-simplify(simplify(04659e281 [kg])) in planck"]
)
def test_issue11_fuzz_found_planck_uncertainty_overflow(ctx, statement: str) -> None:
    # Found by benchmarks/fuzz_statements.py: the squares of the Planck view's G terms
    # overflowed. The value's relative uncertainty is that of the mass unit's G-dependence.
    result = calculate(ctx, statement)
    assert result.status == "ok", result.message
    u = result.to_json()["uncertainty"]
    assert math.isfinite(u) and 0 < u < abs(result.value)


def test_issue11_an_unexpected_exception_is_that_statement_s_error(ctx, monkeypatch) -> None:
    real = StatementEvaluator.evaluate

    def evaluate(self, stmt):
        if getattr(stmt, "name", None) == "b":
            raise ZeroDivisionError("a cause not yet found")
        return real(self, stmt)

    monkeypatch.setattr(StatementEvaluator, "evaluate", evaluate)
    results = SheetEvaluator(ctx).run(split_statements("a = 1\nb = 2\nd = 3\n", 1))
    assert [r.status for r in results] == ["ok", "error", "ok"]
    assert results[1].message.startswith("line 2: internal error (ZeroDivisionError: a cause")


def test_issue11_an_unexpected_parser_exception_is_recorded(ctx, monkeypatch) -> None:
    real = sheet_module.parse_statement

    def parse(text, line):
        if text.startswith("b"):
            raise IndexError("list index out of range")
        return real(text, line)

    monkeypatch.setattr(sheet_module, "parse_statement", parse)
    results = SheetEvaluator(ctx).run(split_statements("a = 1\nb = 2\nd = 3\n", 1))
    assert [r.status for r in results] == ["ok", "error", "ok"]
    assert results[1].message.startswith("line 2: internal error (IndexError")


@settings(
    max_examples=120,
    deadline=None,
    derandomize=True,
    database=None,
    suppress_health_check=[HealthCheck.function_scoped_fixture, HealthCheck.too_slow],
)
@given(statement=grammar.STATEMENTS)
@example(statement="subs(y, y, 10^4301)")
@example(statement="-1e300*G")
@example(statement="1 [m^(2/01]")
def test_issue11_fuzzed_statements_end_as_results(short_ctx, statement: str) -> None:
    results = SheetEvaluator(short_ctx).run(split_statements(grammar.sheet_body(statement), 1))
    assert grammar.problems(results) == [], statement


# --- the command line never shows a traceback for a statement ----------------------------


def test_issue11_run_records_every_seen_crash_and_writes(tmp_path: Path, capsys) -> None:
    lines = [p.values[0] for p in SEEN_CRASHES] + ["-1e300*G", "subs(y, y, 10^4301)", "1e1²"]
    body = "y : [1]\nr_s = 2*G*(1 [M_sun])/c^2\n" + "\n".join(lines) + "\nzz = 1\n"
    sheet = tmp_path / "hostile.sheet.md"
    sheet.write_text(f"---\nconstants: CODATA2022\n---\n\n```calc\n{body}```\n", encoding="utf-8")
    assert cli.main(["run", str(sheet)]) == 1
    written = sheet.read_text(encoding="utf-8")
    assert "```result" in written and "zz = 1" in written.split("```result")[1]
    assert "internal error" not in written
    assert "Traceback" not in capsys.readouterr().err
    assert cli.main(["check", str(sheet), "--json"]) == 1
    report = json.loads(capsys.readouterr().out)
    errors = [s for s in report["statements"] if s["status"] == "error"]
    assert len(errors) == len(SEEN_CRASHES)


@pytest.mark.parametrize("expression", ["¹", "1 [M_sun^100]", "1 [m^(2/01]"])
def test_issue11_calc_reports_a_hostile_expression(expression: str, capsys) -> None:
    assert cli.main(["calc", expression]) == 1
    err = capsys.readouterr().err
    assert err.startswith("error: line 1, col ")
    assert "Traceback" not in err


@settings(
    max_examples=40,
    deadline=None,
    derandomize=True,
    database=None,
    suppress_health_check=[HealthCheck.function_scoped_fixture, HealthCheck.too_slow],
)
@given(text=grammar.DOCUMENTS)
@example(text="---\rbudget: 1\r---\r```calc\rx = 1 [m]\r```\r")
def test_issue11_fuzzed_documents_run_or_are_refused_clearly(doc_runner, text: str) -> None:
    # A whole document: refused with a located DocumentError, or run; a run's text reads
    # back and runs again to the same bytes, with every note kept.
    try:
        doc = parse_document(text)
    except DocumentError as err:
        assert err.message
        return
    try:
        run = doc_runner.run(doc)
    except WorksheetError as err:
        assert err.message
        return
    again = doc_runner.run(parse_document(run.text))
    assert again.text == run.text
    notes = [b.text for b in doc.blocks if isinstance(b, NoteBlock)]
    assert [b.text for b in run.document.blocks if isinstance(b, NoteBlock)] == notes


def test_issue11_a_worker_that_died_between_calls_is_replaced() -> None:
    worker = Worker()
    try:
        assert worker.call(operator.add, (1, 1), 10.0, "add") == 2
        first = worker.pid
        assert first is not None
        os.kill(first, signal.SIGKILL)
        deadline = time.monotonic() + 5
        while worker._process.is_alive() and time.monotonic() < deadline:
            time.sleep(0.01)
        assert worker.call(operator.add, (2, 2), 10.0, "add") == 4
        assert worker.pid != first
    finally:
        worker.close()


def test_issue11_superscript_two_after_a_name_is_a_power(run_sheet) -> None:
    # '²' used to be taken as a digit inside a name ('r²' an unknown name); it is the ^2
    # alias wherever it stands, like after a number.
    results = run_sheet("r = 3 [m]\nA = r²\n")
    assert results[1].status == "ok", results[1].message
    assert results[1].record == "A = 9.000 m^2"
