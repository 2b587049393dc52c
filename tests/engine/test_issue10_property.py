"""Property: verbs with inf and the numeric fallbacks evaluate or err, never raise (issue 10)."""

from __future__ import annotations

import time
from collections.abc import Iterator

import pytest
from hypothesis import HealthCheck, example, given, settings
from hypothesis import strategies as st

from worksheet.engine import Context, SheetEvaluator, make_context, split_statements

SHEET = "y : [1]\nx : [m]\nL = 2 [m]\nq : [1]\n"
ATOMS = ["y", "2", "0.5", "1e-300", "1e300", "inf", "-inf", "q", "pi"]
FUNCTIONS = ["exp", "log", "sin", "cos", "sqrt", "atan", "tanh", "abs"]
BOUNDS = ["0", "1", "-1", "inf", "-inf", "1e300", "q", "1 [m]", "y"]
STATUSES = {"ok", "failed", "error", "skipped"}


@pytest.fixture(scope="module")
def short_ctx() -> Iterator[Context]:
    context = make_context("CODATA2022", digits=4, seconds=2.0)
    yield context
    context.worker.close()


def _extend(inner: st.SearchStrategy[str]) -> st.SearchStrategy[str]:
    binary = st.tuples(inner, st.sampled_from(["+", "-", "*", "/", "^"]), inner).map(
        lambda p: f"({p[0]} {p[1]} {p[2]})"
    )
    call = st.tuples(st.sampled_from(FUNCTIONS), inner).map(lambda p: f"{p[0]}({p[1]})")
    return st.one_of(binary, call)


BODIES = st.recursive(st.sampled_from(ATOMS), _extend, max_leaves=5)
BOUND = st.sampled_from(BOUNDS)


@st.composite
def statements(draw: st.DrawFn) -> str:
    body = draw(BODIES)
    kind = draw(st.sampled_from(["integrate", "limit", "solve", "series"]))
    if kind == "integrate":
        return f"integrate({body}, y, {draw(BOUND)}, {draw(BOUND)})"
    if kind == "limit":
        return f"limit({body}, y, {draw(BOUND)})"
    if kind == "series":
        return f"series({body}, y, {draw(BOUND)}, 3)"
    return f"solve({body} == {draw(BODIES)}, y)"


@settings(
    max_examples=40,
    deadline=None,
    derandomize=True,
    database=None,
    suppress_health_check=[HealthCheck.function_scoped_fixture, HealthCheck.too_slow],
)
@given(statement=statements())
@example(statement="integrate(cos(cos(0.5)), y, inf, 0)")  # once a TypeError inside sympy
def test_issue10_verbs_with_inf_never_raise(short_ctx: Context, statement: str) -> None:
    started = time.monotonic()
    results = SheetEvaluator(short_ctx).run(split_statements(SHEET + f"v = {statement}\n", 1))
    # Each statement runs under twice its 2 s budget (the interval timer), plus slack.
    assert time.monotonic() - started < 15, statement
    result = results[-1]
    assert result.status in STATUSES
    if result.status == "error":
        assert result.message and result.message.startswith("line 5"), result
