"""Runs sheets for the app: one runner, one run at a time, any failure turned into a message.

Called from worker threads; the lock keeps the incremental runner single-threaded.
"""

from __future__ import annotations

import threading
from collections.abc import Callable
from dataclasses import dataclass

from worksheet.app.quantities import QuantityRow, quantity_rows
from worksheet.document import SheetDocument
from worksheet.errors import WorksheetError
from worksheet.runner import SheetRun, SheetRunner


@dataclass(frozen=True)
class RunOutcome:
    """What one run gave: the run and the ledger, or a message saying why there is none."""

    doc: SheetDocument
    run: SheetRun | None
    rows: tuple[QuantityRow, ...] = ()
    problem: str | None = None


class RunService:
    """Owns the SheetRunner (and so its worker process) for the app's lifetime."""

    def __init__(self) -> None:
        self._runner = SheetRunner()
        self._lock = threading.Lock()

    def run(self, doc: SheetDocument, cancelled: Callable[[], bool] = lambda: False
            ) -> RunOutcome | None:
        """Run ``doc``; None when ``cancelled()`` turned true while waiting for the runner."""
        with self._lock:
            if cancelled():
                return None
            try:
                run = self._runner.run(doc)
                evaluator = self._runner.evaluator(run.settings)
                rows = quantity_rows(evaluator.bindings, evaluator.ctx.constants,
                                     run.settings.dataset, run.statements, run.results,
                                     run.settings.digits)
            except WorksheetError as err:
                return RunOutcome(doc, None, (), err.located())
            except Exception as err:  # a crash in the engine must not close the app
                problem = f"the evaluation stopped unexpectedly: {type(err).__name__}: {err}"
                return RunOutcome(doc, None, (), problem)
        return RunOutcome(doc, run, tuple(rows))

    def close(self) -> None:
        """Stop the runner's worker process."""
        self._runner.close()
