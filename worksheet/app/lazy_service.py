"""The run service, made on first use in a worker thread.

Importing the engine (sympy, numpy, pint) takes longer than drawing the first screen, and
the first screen needs none of it: so the app holds this stand-in, and the first run, in
its worker thread, imports the engine and makes the service.
"""

from __future__ import annotations

import threading
from typing import TYPE_CHECKING

if TYPE_CHECKING:
    from worksheet.app.evaluation import RunService


class LazyRunService:
    """Makes the ``RunService`` once, from any thread; none is made after ``close``."""

    def __init__(self, sheet_path: object = None) -> None:
        self._sheet_path = sheet_path  # where the sheet's 'use' paths start from
        self._service: RunService | None = None
        self._lock = threading.Lock()
        self._closed = False
        # A test hook: while set to an unset event, the first ``get`` waits for it before
        # importing the engine (so a test can look at the screen the file's results paint).
        self.gate: threading.Event | None = None

    @property
    def started(self) -> RunService | None:
        """The service if it has been made (never imports the engine)."""
        return self._service

    def get(self) -> RunService | None:
        """The service, importing the engine the first time; None once closed."""
        gate = self.gate
        if gate is not None:
            gate.wait()
        with self._lock:
            if self._closed:
                return None
            if self._service is None:
                from worksheet.app.evaluation import RunService

                self._service = RunService(self._sheet_path)
            return self._service

    def close(self) -> None:
        """Stop the service's worker processes, if it was ever made (idempotent)."""
        with self._lock:
            self._closed = True
            service = self._service
        if self.gate is not None:
            self.gate.set()  # a run waiting at the gate goes on, finds the service closed
        if service is not None:
            service.close()
