"""Shared fixtures for the engine tests: one evaluation context per test module."""

from __future__ import annotations

from collections.abc import Callable, Iterator

import pytest

from worksheet.engine import (
    Context,
    SheetEvaluator,
    StatementResult,
    make_context,
    split_statements,
)


@pytest.fixture(scope="module")
def ctx() -> Iterator[Context]:
    """A CODATA 2022 context; its worker process is closed when the module is done."""
    context = make_context("CODATA2022", digits=4, seconds=5.0)
    yield context
    context.worker.close()


@pytest.fixture(scope="module")
def run_sheet(ctx: Context) -> Callable[[str], list[StatementResult]]:
    """Run a calc-cell body (first line numbered 1) and return every result."""

    def run(body: str) -> list[StatementResult]:
        return SheetEvaluator(ctx).run(split_statements(body, 1))

    return run


@pytest.fixture(scope="module")
def results_by_name(
    run_sheet: Callable[[str], list[StatementResult]],
) -> Callable[[str], dict[str, StatementResult]]:
    """Run a sheet body and index the results of its named statements."""

    def run(body: str) -> dict[str, StatementResult]:
        return {r.name: r for r in run_sheet(body) if r.name is not None}

    return run
