"""The statement timer keeps its alarm handler installed between statements: what that
must not change."""

from __future__ import annotations

import signal
import time

import pytest

from worksheet.engine import SheetEvaluator, SourceStatement, make_context
from worksheet.engine.budget import statement_timer
from worksheet.errors import BudgetError

pytestmark = pytest.mark.skipif(
    not hasattr(signal, "setitimer"), reason="interval timers are POSIX (the CI runs Linux)"
)


def _spin(seconds: float) -> None:
    started = time.monotonic()
    while time.monotonic() - started < seconds:
        pass


def test_issue12_no_timer_is_left_running_after_a_statement() -> None:
    with statement_timer(5.0):
        assert signal.getitimer(signal.ITIMER_REAL)[0] > 0
    assert signal.getitimer(signal.ITIMER_REAL) == (0.0, 0.0)


def test_issue12_between_statements_an_alarm_reaches_the_handler_it_replaced() -> None:
    seen: list[int] = []

    def theirs(signum, frame) -> None:
        seen.append(signum)

    before = signal.signal(signal.SIGALRM, theirs)
    try:
        with statement_timer(5.0):
            pass  # our handler is installed now, and stays
        signal.setitimer(signal.ITIMER_REAL, 0.05)
        _spin(1.0)
        if not seen:
            time.sleep(0.2)
        assert seen == [signal.SIGALRM]
    finally:
        signal.setitimer(signal.ITIMER_REAL, 0)
        signal.signal(signal.SIGALRM, before)


def test_issue12_a_handler_installed_between_statements_is_replaced_again() -> None:
    # Someone installs a handler of their own after a statement: the next statement's
    # budget must still stop it with a BudgetError, not go to their handler.
    with statement_timer(5.0):
        pass
    before = signal.signal(signal.SIGALRM, lambda signum, frame: None)
    try:
        started = time.monotonic()
        with pytest.raises(BudgetError, match=r"time budget of 0\.2 s"), statement_timer(0.2):
            _spin(5.0)
        assert time.monotonic() - started < 2
    finally:
        signal.signal(signal.SIGALRM, before)


def test_issue12_a_timer_inside_another_leaves_the_outer_budget_running() -> None:
    started = time.monotonic()
    with pytest.raises(BudgetError, match=r"time budget of 0\.3 s"), statement_timer(0.3):
        with statement_timer(10.0):
            pass
        _spin(5.0)
    assert time.monotonic() - started < 2


def test_issue12_a_runaway_statement_still_stops_on_its_line(monkeypatch) -> None:
    # The sheet path: a statement that never ends (a pure-Python loop stands for it) is
    # stopped by its budget, and the next statement runs under a fresh budget.
    evaluator = SheetEvaluator(make_context(seconds=0.3))
    from worksheet.engine import statements

    original = statements.StatementEvaluator.evaluate

    def slow_for_x(self, stmt):
        if getattr(stmt, "name", None) == "x":
            _spin(10.0)
        return original(self, stmt)

    monkeypatch.setattr(statements.StatementEvaluator, "evaluate", slow_for_x)
    started = time.monotonic()
    results = evaluator.run([SourceStatement(1, "x = 1 [m]"), SourceStatement(2, "y = 2 [m]")])
    assert time.monotonic() - started < 3
    assert results[0].status == "error"
    assert "time budget of 0.3 s" in (results[0].message or "")
    assert results[1].status == "ok"
