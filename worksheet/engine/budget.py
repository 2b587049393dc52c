"""Time and memory budgets that really stop runaway work.

Symbolic verbs (simplify, integrate, solve, ...) run in a worker process that is killed when
its budget runs out: a signal cannot interrupt a long C loop, a kill can. Everything else a
statement does is bounded by the parser's guards; as a second belt, the main thread also
arms an interval timer (``statement_timer``) that interrupts pure-Python loops.

One budget covers one whole statement: the verbs of a statement share what is left of it.
The worker's address space is capped, so a verb that would swallow the machine's memory is
stopped with a clear message instead. The worker dies with the process that started it.

Every request to the worker carries a serial number and a reply is accepted only for the
request waited on; any exception while waiting (the statement timer, Ctrl-C) kills the
worker, so an answer can never be handed to a later verb.
"""

from __future__ import annotations

import contextlib
import ctypes
import ctypes.util
import multiprocessing
import os
import signal
import sys
import threading
import time
from collections.abc import Callable
from typing import Any

from worksheet.errors import BudgetError, EvaluationError, WorksheetError

try:  # imported here, not in a new worker: a first import there costs a millisecond or so
    import resource
except ImportError:  # not on this platform (Windows): no memory cap
    resource = None  # type: ignore[assignment]

DEFAULT_SECONDS = 5.0

DEFAULT_MEMORY_BYTES = 1 << 30
"""Address space the worker may add to what it had when it started (1 GiB)."""

TIMER_GRACE_SECONDS = 0.2
"""The interval timer fires this much after the statement's budget, so that a verb waited on
when the budget ends is stopped (and named in the message) by its own deadline first."""

TIMER_REPEAT_SECONDS = 0.25
"""After the first alarm, the timer fires again this often until the statement has ended."""

PARENT_POLL_SECONDS = 0.5
"""How often the worker's watchdog asks whether the process that started it is still there."""

_RAISE_HINT = "(raise it with the 'budget' front-matter key or --budget)"
_PR_SET_PDEATHSIG = 1  # from <linux/prctl.h>

_deadline = threading.local()


def _time_left(seconds: float) -> tuple[float, float]:
    """The time a verb may take and the budget to name if it runs out.

    ``seconds``, or less when the statement under way has less of its budget left (then
    the statement's budget is the one named).
    """
    deadline = getattr(_deadline, "at", None)
    if deadline is None:
        return seconds, seconds
    left = deadline - time.monotonic()
    return (seconds, seconds) if seconds <= left else (left, _deadline.seconds)


def _over_budget(what: str, seconds: float) -> BudgetError:
    return BudgetError(
        f"{what} ran past its time budget of {seconds:g} s and was stopped {_RAISE_HINT}"
    )


def _memory_message(what: str, limit: int | None) -> str:
    cap = "its memory cap" if limit is None else f"its memory cap of {limit >> 20} MiB"
    return f"{what} ran past {cap} and was stopped (the expression grows too large to handle)"


# --- the worker side ----------------------------------------------------------------------


def _die_with_parent(parent_pid: int, use_death_signal: bool) -> None:
    """End this worker when the process that started it ends, however it ends.

    On Linux the kernel sends SIGKILL at once (``PR_SET_PDEATHSIG``); it fires when the
    *thread* that started the worker ends, so it is asked for only when that thread is the
    main one. Everywhere, a watchdog thread (``_watch_parent``) also checks the parent id
    twice a second.
    """
    if use_death_signal and sys.platform.startswith("linux"):
        with contextlib.suppress(OSError, AttributeError, TypeError):
            # The running program's own symbols include libc's; find_library would run
            # ldconfig (milliseconds at every worker start) and is needed only without.
            libc = ctypes.CDLL(None, use_errno=True)
            if not hasattr(libc, "prctl"):
                libc = ctypes.CDLL(ctypes.util.find_library("c") or None, use_errno=True)
            libc.prctl(_PR_SET_PDEATHSIG, signal.SIGKILL, 0, 0, 0)
    if os.getppid() != parent_pid:
        os._exit(0)  # the parent ended before the signal was asked for


def _watch_parent(parent_pid: int) -> None:
    """Start the watchdog thread of ``_die_with_parent`` (after the worker's 'ready', which
    waits for nothing it does)."""

    def watch() -> None:
        while True:
            time.sleep(PARENT_POLL_SECONDS)
            if os.getppid() != parent_pid:
                os._exit(0)

    threading.Thread(target=watch, name="parent-watchdog", daemon=True).start()


def _address_space_bytes() -> int | None:
    """This process's current address-space size, where the platform tells it."""
    # os-level calls: the first text-mode open() in a new worker costs about a millisecond.
    try:
        handle = os.open("/proc/self/statm", os.O_RDONLY)
        try:
            pages = int(os.read(handle, 256).split()[0])
        finally:
            os.close(handle)
        return pages * os.sysconf("SC_PAGE_SIZE")
    except (OSError, ValueError, IndexError):
        return None


def _cap_memory(extra_bytes: int | None) -> int | None:
    """Limit the address space to its present size plus ``extra_bytes``; the limit set."""
    if extra_bytes is None or resource is None:
        return None
    present = _address_space_bytes()
    if present is None:
        return None
    limit = present + extra_bytes
    with contextlib.suppress(ValueError, OSError):
        _, hard = resource.getrlimit(resource.RLIMIT_AS)
        if hard != resource.RLIM_INFINITY:
            limit = min(limit, hard)
        resource.setrlimit(resource.RLIMIT_AS, (limit, hard))
        return limit
    return None


def _answer(function: Callable[..., Any], args: tuple[Any, ...]) -> tuple[str, Any]:
    """(status, payload) for one request; ``memory`` means the cap was hit."""
    try:
        return "ok", function(*args)
    except MemoryError:
        return "memory", ""
    except SystemError as err:
        # Under the address-space cap a C extension's failed allocation can surface as
        # "returned NULL without setting an exception" instead of a MemoryError.
        if "without setting an exception" in str(err):
            return "memory", ""
        return "error", f"{type(err).__name__}: {err}"
    except EvaluationError as err:
        return "error", err.message
    except RecursionError:
        return "error", "the expression is too deeply nested to process"
    except Exception as err:  # any failure of one verb is that verb's error, not the worker's
        return "error", f"{type(err).__name__}: {err}"


def _serve(
    connection: Any,
    inherited: Any,
    parent_pid: int,
    use_death_signal: bool,
    memory_bytes: int | None,
    warm: bool = False,
) -> None:
    """Worker loop: receive (serial, function, args), send back (serial, status, payload).

    ``warm``: first import what the verbs need and run one small integral and solve, as a
    worker started early does while its parent goes on with other work.
    """
    with contextlib.suppress(OSError):
        inherited.close()  # the parent's end, copied by fork: keep it from holding the pipe
    # Ctrl-C reaches the whole process group; the parent handles it and stops the worker,
    # which must not die on its own with a traceback of its own.
    with contextlib.suppress(ValueError, OSError):
        signal.signal(signal.SIGINT, signal.SIG_IGN)
    _die_with_parent(parent_pid, use_death_signal)
    if warm:  # an optimisation only: if it fails, the verbs themselves say what fails
        with contextlib.suppress(Exception):
            preload_verb_modules()
            from worksheet.engine.symbolic_ops import warm_up

            warm_up()
    limit = _cap_memory(memory_bytes)
    connection.send((0, "ready", limit))
    _watch_parent(parent_pid)
    while True:
        try:
            request = connection.recv()
        except (EOFError, OSError):
            return
        if request is None:
            return
        serial, function, args = request
        status, payload = _answer(function, args)
        try:
            connection.send((serial, status, payload))
        except MemoryError:
            status = "memory"
            connection.send((serial, status, ""))
        except Exception as err:  # the answer could not be sent (not picklable, too deep)
            connection.send((serial, "error", f"the answer could not be passed back ({err})"))
        if status == "memory":
            return  # after a MemoryError the worker's state is not to be trusted


# --- the caller side ----------------------------------------------------------------------


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
    """One persistent helper process; replaced after a budget kill.

    Args:
        memory_bytes: address space the worker may add to its size at start; ``None``
            leaves it uncapped.
    """

    def __init__(self, memory_bytes: int | None = DEFAULT_MEMORY_BYTES) -> None:
        self._process: Any = None
        self._connection: Any = None
        self._lock = threading.Lock()
        self._serial = 0
        self.memory_bytes = memory_bytes
        self.memory_limit: int | None = None  # the address-space limit the worker reported
        self._starting = False  # launched, its 'ready' not read yet

    @property
    def pid(self) -> int | None:
        """The worker's process id while it runs (for tests and diagnostics)."""
        process = self._process
        return None if process is None else process.pid

    def start_early(self) -> None:
        """Start the worker now, without waiting for it: it imports sympy and warms up the
        verbs on another core while this process goes on (the ``check`` of a sheet with
        verbs, before this process has imported sympy itself). The first call waits for
        it to be ready."""
        with self._lock:
            if self._process is None:
                self._launch(warm=True)

    def _start(self) -> None:
        preload_verb_modules()
        self._launch(warm=False)
        self._wait_until_ready()

    def _launch(self, warm: bool) -> None:
        methods = multiprocessing.get_all_start_methods()
        context = multiprocessing.get_context("fork" if "fork" in methods else "spawn")
        parent, child = context.Pipe()
        main = threading.current_thread() is threading.main_thread()
        process = context.Process(
            target=_serve,
            args=(child, parent, os.getpid(), main, self.memory_bytes, warm),
            daemon=True,
        )
        process.start()
        child.close()
        self._process, self._connection = process, parent
        self._starting = True

    def _wait_until_ready(self) -> None:
        try:
            if not self._connection.poll(30):
                raise EvaluationError("the worker process did not start")
            _, _, self.memory_limit = self._connection.recv()
            self._starting = False
        except BaseException:
            self._stop()
            raise

    def _stop(self) -> None:
        # Forget the process first: an alarm landing in here must not leave it half-stopped.
        process, connection = self._process, self._connection
        self._process = self._connection = None
        self._starting = False
        if process is not None:
            with contextlib.suppress(OSError, ValueError, AttributeError):
                process.kill()
            with contextlib.suppress(OSError):
                connection.close()
            process.join(timeout=2)

    def _stopped(self, what: str) -> WorksheetError:
        """The error for a worker that ended while answering, with its cause if known."""
        process = self._process
        code = None
        if process is not None:
            process.join(timeout=1)
            code = process.exitcode
        if code is not None and code < 0 and -code in (signal.SIGSEGV, signal.SIGABRT):
            return BudgetError(_memory_message(what, self.memory_limit))
        return EvaluationError(f"{what} failed: the worker process stopped")

    def _await(
        self, serial: int, seconds: float, what: str, budget: float | None = None
    ) -> tuple[str, Any]:
        """The reply to request ``serial``; replies to earlier requests are dropped."""
        deadline = time.monotonic() + seconds
        while True:
            remaining = deadline - time.monotonic()
            try:
                if remaining <= 0 or not self._connection.poll(remaining):
                    raise _over_budget(what, seconds if budget is None else budget)
                number, status, payload = self._connection.recv()
            except (OSError, EOFError) as err:
                raise self._stopped(what) from err
            if number == serial:
                return status, payload

    def call(
        self, function: Callable[..., Any], args: tuple[Any, ...], seconds: float, what: str
    ) -> Any:
        """``function(*args)`` in the worker; BudgetError after ``seconds``.

        ``seconds`` is cut to what the statement under way (``statement_timer``) has left.
        """
        with self._lock:
            allowed, budget = _time_left(seconds)
            if allowed <= 0:
                raise _over_budget(what, budget)
            if self._process is None or not self._process.is_alive():
                self._start()
            elif self._starting:  # started early: wait for its 'ready'
                self._wait_until_ready()
            self._serial += 1
            try:
                try:
                    self._connection.send((self._serial, function, args))
                except (OSError, EOFError) as err:  # it died between the check and now
                    raise self._stopped(what) from err
                status, payload = self._await(self._serial, allowed, what, budget)
            except BaseException:
                # Timer, Ctrl-C, budget, a dead pipe: the worker may still be busy with this
                # request, and its late answer must never reach the next one.
                self._stop()
                raise
            if status == "memory":
                self._stop()
                raise BudgetError(_memory_message(what, self.memory_limit))
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


_MAIN_THREAD_ID = threading.main_thread().ident
_CAN_INTERRUPT = hasattr(signal, "setitimer")
try:  # signal.getsignal wraps the answer in an enum, which costs microseconds per call
    from _signal import getsignal as _current_handler
except ImportError:  # another Python than CPython
    _current_handler = signal.getsignal


class _Alarm:
    """The interval timer's state, shared by every statement of the main thread.

    The handler stays installed between statements (installing one is a system call, and a
    sheet runs thousands of statements); while no statement is timed it hands an alarm on
    to the handler it replaced, so a timer of someone else's is not swallowed.
    """

    seconds: float | None = None  # the budget of the statement being timed, else None
    replaced: Any = None  # the handler before ours


def _on_alarm(signum: int, frame: Any) -> None:
    seconds = _Alarm.seconds
    if seconds is not None:
        raise BudgetError(
            f"the statement ran past its time budget of {seconds:g} s and was stopped {_RAISE_HINT}"
        )
    replaced = _Alarm.replaced
    if callable(replaced):
        replaced(signum, frame)


class statement_timer:
    """One budget of ``seconds`` for a whole statement.

    Verbs called inside share what is left of it (in any thread). In the main thread an
    interval timer also interrupts pure-Python work when it runs out; a statement timed
    inside another leaves the outer one's timer running.
    """

    __slots__ = ("_armed", "_previous", "seconds")

    def __init__(self, seconds: float) -> None:
        self.seconds = seconds
        self._previous: tuple[Any, Any] = (None, None)
        self._armed = False

    def __enter__(self) -> None:
        seconds = self.seconds
        local = _deadline.__dict__
        self._previous = local.get("at"), local.get("seconds")
        if seconds <= 0:
            return
        local["at"], local["seconds"] = time.monotonic() + seconds, seconds
        if (
            not _CAN_INTERRUPT
            or _Alarm.seconds is not None
            or threading.get_ident() != _MAIN_THREAD_ID
        ):
            return
        if _current_handler(signal.SIGALRM) is not _on_alarm:
            _Alarm.replaced = signal.signal(signal.SIGALRM, _on_alarm)
        _Alarm.seconds = seconds
        self._armed = True
        # The timer repeats: an exception raised inside a garbage-collector callback or a
        # __del__ is swallowed by Python, and one swallowed alarm must not free the statement.
        signal.setitimer(signal.ITIMER_REAL, seconds + TIMER_GRACE_SECONDS, TIMER_REPEAT_SECONDS)

    def __exit__(self, *exc: object) -> None:
        try:
            if self._armed:
                try:
                    _Alarm.seconds = None
                finally:  # reached even when an alarm lands on the line above
                    self._armed = False
                    signal.setitimer(signal.ITIMER_REAL, 0)
        finally:
            local = _deadline.__dict__
            local["at"], local["seconds"] = self._previous
