"""Fewer long pauses of the screen's loop from Python's cycle collector.

After the engine is loaded and the first run is done, the process holds a few hundred
thousand long-lived objects (sympy's caches, the sheet's results). A full collection
walks all of them, some 50 ms on a small machine, and it stops every thread, the screen's
included, wherever it is triggered. Freezing them once moves them out of the collector's
sight; objects made later are collected as usual, the full collections among them at the
user's pauses (``QuietCollector``).
"""

from __future__ import annotations

import gc
import time
from collections.abc import Callable

_settled = False


def settle_long_lived() -> None:
    """Freeze the objects alive now, once per process (later calls do nothing)."""
    global _settled
    if not _settled:
        _settled = True
        gc.freeze()


class CollectorHold:
    """No cycle collection from the app's start to its first paint.

    The start makes tens of thousands of objects (styles, widgets, strips) that stay
    alive, and each young-generation collection triggered on the way walks them again; a
    full one walks everything textual's import made too. Nothing made before the first
    paint is garbage worth collecting that early: the collector is held until just after
    it, then runs as usual.
    """

    def __init__(self) -> None:
        self._was_enabled = False

    def hold(self) -> None:
        self._was_enabled = gc.isenabled()
        gc.disable()

    def release(self) -> None:
        """Collect as before the hold (idempotent; a collector off before stays off)."""
        if self._was_enabled:
            self._was_enabled = False
            gc.enable()


# A generation-2 threshold no count reaches: full collections only when asked for.
_NO_AUTOMATIC_FULL = 1 << 30
# The thresholds are the process's: how many collectors defer now, and the generation-2
# threshold from before the first of them (put back when the last one restores).
_deferring_collectors = 0
_threshold_before = 10


class QuietCollector:
    """Full collections at the user's pauses, not in the middle of a burst of keys.

    After the freeze, each edit's run and redraw still leave tens of thousands of objects
    that live on, and a full collection of them (15 to 35 ms here) stops the screen's loop
    wherever the collector's counts say, often between two keys. While deferring, Python
    makes no full collection of its own (the young generations, which reclaim almost all
    garbage, are collected as usual); the app asks for one once a run has ended and no key
    came for ``quiet_seconds``, and in a long burst of typing every ``most_seconds``.
    """

    def __init__(
        self,
        quiet_seconds: float = 0.5,
        most_seconds: float = 20.0,
        clock: Callable[[], float] = time.monotonic,
    ) -> None:
        self.quiet_seconds = quiet_seconds
        self.most_seconds = most_seconds
        self._clock = clock
        self._deferring = False
        self._pending = False  # a run ended since the last full collection
        self._last_input = clock()
        self._last_full = clock()
        self.collections = 0  # full collections made here (for tests and benchmarks)

    @property
    def deferring(self) -> bool:
        return self._deferring

    def defer(self) -> None:
        """From now on no automatic full collection (idempotent)."""
        global _deferring_collectors, _threshold_before
        if not self._deferring:
            self._deferring = True
            if _deferring_collectors == 0:
                young, middle, _threshold_before = gc.get_threshold()
                gc.set_threshold(young, middle, _NO_AUTOMATIC_FULL)
            _deferring_collectors += 1
            self._last_full = self._clock()

    def restore(self) -> None:
        """Python's own full collections again, once no collector defers (idempotent)."""
        global _deferring_collectors
        if self._deferring:
            self._deferring = False
            _deferring_collectors -= 1
            if _deferring_collectors == 0:
                young, middle, _ = gc.get_threshold()
                gc.set_threshold(young, middle, _threshold_before)

    def note_input(self) -> None:
        """A key (or a click) came now."""
        self._last_input = self._clock()

    def note_run(self) -> None:
        """A run ended: its garbage is for the next full collection."""
        self._pending = True

    def collect_if_quiet(self) -> float | None:
        """Collect if a run ended and no key came for ``quiet_seconds``; the seconds to
        wait before asking again, or None when nothing waits."""
        if not (self._pending and self.deferring):
            return None
        waited = self._clock() - self._last_input
        if waited < self.quiet_seconds:
            return self.quiet_seconds - waited
        self._collect()
        return None

    def collect_if_overdue(self) -> bool:
        """Collect now if the last full collection is ``most_seconds`` old (a long burst)."""
        overdue = self._clock() - self._last_full >= self.most_seconds
        if self._pending and self.deferring and overdue:
            self._collect()
            return True
        return False

    def _collect(self) -> None:
        gc.collect()
        self._pending = False
        self._last_full = self._clock()
        self.collections += 1
