"""Runs sheets for the app: one run at a time, a slow run given up when a newer one waits.

Called from worker threads. Each runner is single-threaded (its lock); when the run in
progress has gone on for long (a verb running into its budget) and a newer edit is waiting,
``give_up_slow_run`` hands the next run a fresh runner at once and makes the old run finish
quickly: its symbolic work is stopped and its results are thrown away, never shown.
"""

from __future__ import annotations

import threading
import time
from collections.abc import Callable
from dataclasses import dataclass, field
from typing import Any

from worksheet.app.quantities import QuantityRow, quantity_rows
from worksheet.document import SheetDocument
from worksheet.engine.budget import Worker
from worksheet.errors import BudgetError, WorksheetError
from worksheet.runner import SheetRun, SheetRunner, read_settings


@dataclass(frozen=True)
class RunOutcome:
    """What one run gave: the run and the ledger, or a message saying why there is none."""

    doc: SheetDocument
    run: SheetRun | None
    rows: tuple[QuantityRow, ...] = ()
    problem: str | None = None


class _StoppedWorker(Worker):
    """Stands in for the worker of a run that was given up: every verb stops at once."""

    def call(
        self, function: Callable[..., Any], args: tuple[Any, ...], seconds: float, what: str
    ) -> Any:
        raise BudgetError(f"{what} was stopped: a newer edit replaced this run")


@dataclass
class _Engine:
    """One runner, the lock that keeps it single-threaded, and the run it is doing."""

    runner: SheetRunner = field(default_factory=SheetRunner)
    lock: threading.Lock = field(default_factory=threading.Lock)
    started: float | None = None  # monotonic time the run in progress started
    doc: SheetDocument | None = None  # the document of the run in progress
    given_up: bool = False
    replaced: list[Worker] = field(default_factory=list)  # workers taken from the run

    def give_up(self) -> None:
        """Mark the run given up and stop its symbolic work (safe from another thread)."""
        self.given_up = True
        doc = self.doc
        if doc is None:
            return
        try:
            context = self.runner.evaluator(read_settings(doc)).ctx
        except WorksheetError:
            return  # settings that do not parse: that run runs no verb
        busy, context.worker = context.worker, _StoppedWorker()
        self.replaced.append(busy)
        _stop_process(busy)

    def close(self) -> None:
        """Stop every worker process of this engine (call with the lock held)."""
        self.runner.close()
        for worker in self.replaced:
            worker.close()


class RunService:
    """Owns the runners (and so their worker processes) for the app's lifetime."""

    def __init__(self, sheet_path: Any = None) -> None:
        self._sheet_path = sheet_path  # where the sheet's 'use' paths start from
        self._engine = _Engine(SheetRunner(sheet_path))
        self._guard = threading.Lock()  # protects the choice of engine
        self._closed = False

    def run(
        self,
        doc: SheetDocument,
        cancelled: Callable[[], bool] = lambda: False,
        lines_as_written: bool = False,
    ) -> RunOutcome | None:
        """Run ``doc``; None when cancelled while waiting, or when the run was given up.

        ``lines_as_written`` (for saving) makes messages cite the lines of the file written,
        as ``worksheet run`` does."""
        while True:
            engine = self._engine
            with engine.lock:
                if cancelled() or self._closed:
                    return None
                if engine is not self._engine:  # replaced while this run waited
                    continue
                with self._guard:
                    engine.started, engine.doc = time.monotonic(), doc
                try:
                    outcome = self._run_on(engine.runner, doc, lines_as_written)
                finally:
                    with self._guard:
                        engine.started, engine.doc = None, None
                        given_up = engine.given_up
                if given_up:
                    engine.close()
                    return None
                return outcome

    @staticmethod
    def _run_on(
        runner: SheetRunner, doc: SheetDocument, lines_as_written: bool = False
    ) -> RunOutcome:
        try:
            run = runner.run(doc, lines_as_written)
            evaluator = runner.evaluator(run.settings)
            rows = quantity_rows(
                evaluator.bindings,
                evaluator.ctx.constants,
                run.settings.dataset,
                run.statements,
                run.results,
                run.settings.digits,
            )
        except WorksheetError as err:
            return RunOutcome(doc, None, (), err.located())
        except Exception as err:  # a crash in the engine must not close the app
            problem = f"the evaluation stopped unexpectedly: {type(err).__name__}: {err}"
            return RunOutcome(doc, None, (), problem)
        return RunOutcome(doc, run, tuple(rows))

    def give_up_slow_run(self, after: float) -> bool:
        """Give up the run in progress if it has gone on for ``after`` seconds or more.

        The next run starts on a fresh runner (losing the cache of earlier results, so it
        recomputes everything once); the old run ends at its next verb.
        """
        with self._guard:
            engine = self._engine
            started, doc = engine.started, engine.doc
            if started is None or doc is None or time.monotonic() - started < after:
                return False
            self._engine = _Engine(SheetRunner(self._sheet_path))
            engine.give_up()
        return True

    def close(self) -> None:
        """Stop the runners' worker processes."""
        self._closed = True
        with self._guard:
            engine = self._engine
        if engine.lock.acquire(timeout=0.5):
            try:
                engine.close()
            finally:
                engine.lock.release()
        else:  # a run is still going: stop its verb; the run closes the engine as it ends
            engine.give_up()


def _stop_process(worker: Worker) -> None:
    """Kill the worker's process now; the verb waiting on it fails and the worker restarts."""
    worker.interrupt()
