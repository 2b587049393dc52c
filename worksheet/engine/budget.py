"""Time budgets that really stop runaway work.

Symbolic verbs (simplify, integrate, solve, ...) run in a worker process that is killed when
its budget runs out: a signal cannot interrupt a long C loop, a kill can. Everything else a
statement does is bounded by the parser's guards; as a second belt, the main thread also
arms an interval timer (``statement_timer``) that interrupts pure-Python loops.
"""

from __future__ import annotations

import contextlib
import multiprocessing
import signal
import threading
from collections.abc import Callable, Iterator
from typing import Any

from worksheet.errors import BudgetError, EvaluationError

DEFAULT_SECONDS = 5.0


def _serve(connection: Any) -> None:
    """Worker loop: receive (function, args), send back ("ok", result) or ("error", text)."""
    while True:
        try:
            request = connection.recv()
        except EOFError:
            return
        if request is None:
            return
        function, args = request
        try:
            connection.send(("ok", function(*args)))
        except EvaluationError as err:
            connection.send(("error", err.message))
        except RecursionError:
            connection.send(("error", "the expression is too deeply nested to process"))
        except (ValueError, TypeError, NotImplementedError, ArithmeticError, AttributeError) as err:
            connection.send(("error", f"{type(err).__name__}: {err}"))


# What sympy's integrate and solve import on their first call (lazily): imported once in
# the parent before a fork, so that no later worker (after a budget kill, or the app's
# next runner) pays for them again. (simplify's own lazy imports are left out: most verb
# results are monomials, which skip simplify.)
VERB_MODULES = (
    "sympy.integrals.manualintegrate",
    "sympy.integrals.risch",
    "sympy.integrals.heurisch",
    "sympy.tensor.tensor",
    "worksheet.engine.symbolic_ops",
)


def preload_verb_modules() -> None:
    """Import what the verbs need, in this process (a no-op after the first time)."""
    import importlib

    for name in VERB_MODULES:
        importlib.import_module(name)


class Worker:
    """One persistent helper process; replaced after a budget kill."""

    def __init__(self) -> None:
        self._process: Any = None
        self._connection: Any = None
        self._lock = threading.Lock()

    def _start(self) -> None:
        preload_verb_modules()
        methods = multiprocessing.get_all_start_methods()
        context = multiprocessing.get_context("fork" if "fork" in methods else "spawn")
        parent, child = context.Pipe()
        process = context.Process(target=_serve, args=(child,), daemon=True)
        process.start()
        child.close()
        self._process, self._connection = process, parent

    def _stop(self) -> None:
        if self._process is not None:
            self._process.kill()
            self._process.join(timeout=2)
            with contextlib.suppress(OSError):
                self._connection.close()
        self._process = self._connection = None

    def call(
        self, function: Callable[..., Any], args: tuple[Any, ...], seconds: float, what: str
    ) -> Any:
        """``function(*args)`` in the worker; BudgetError after ``seconds``."""
        with self._lock:
            if self._process is None or not self._process.is_alive():
                self._start()
            try:
                self._connection.send((function, args))
                ready = self._connection.poll(seconds)
            except (OSError, EOFError) as err:
                self._stop()
                raise EvaluationError(f"{what} failed: the worker process stopped") from err
            if not ready:
                self._stop()
                raise BudgetError(
                    f"{what} ran past its time budget of {seconds:g} s and was stopped "
                    "(raise it with the 'budget' front-matter key or --budget)"
                )
            try:
                status, payload = self._connection.recv()
            except (OSError, EOFError) as err:
                self._stop()
                raise EvaluationError(f"{what} failed: the worker process stopped") from err
        if status == "error":
            raise EvaluationError(f"{what} failed: {payload}")
        return payload

    def interrupt(self) -> None:
        """Stop the call under way, from any thread: its caller gets an EvaluationError.

        Does not take the call lock (the caller holds it while waiting); killing the
        process makes the waiting ``poll``/``recv`` fail, and the next call starts afresh.
        """
        process = self._process
        if process is not None:
            with contextlib.suppress(OSError, ValueError, AttributeError):
                process.kill()

    def close(self) -> None:
        with self._lock:
            if self._connection is not None:
                with contextlib.suppress(OSError, BrokenPipeError):
                    self._connection.send(None)
            self._stop()


@contextlib.contextmanager
def statement_timer(seconds: float) -> Iterator[None]:
    """Interrupt pure-Python work in the main thread after ``seconds`` (a no-op elsewhere)."""
    if (
        threading.current_thread() is not threading.main_thread()
        or not hasattr(signal, "setitimer")
        or seconds <= 0
    ):
        yield
        return

    def expire(signum: int, frame: Any) -> None:
        raise BudgetError(
            f"the statement ran past {seconds:g} s (twice the budget per verb) and was stopped "
            "(raise it with the 'budget' front-matter key or --budget)"
        )

    previous = signal.signal(signal.SIGALRM, expire)
    signal.setitimer(signal.ITIMER_REAL, seconds)
    try:
        yield
    finally:
        signal.setitimer(signal.ITIMER_REAL, 0)
        signal.signal(signal.SIGALRM, previous)
