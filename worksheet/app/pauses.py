"""Fewer long pauses of the screen's loop from Python's cycle collector.

After the engine is loaded and the first run is done, the process holds a few hundred
thousand long-lived objects (sympy's caches, the sheet's results). A full collection
walks all of them, some 50 ms on a small machine, and it stops every thread, the screen's
included, wherever it is triggered. Freezing them once moves them out of the collector's
sight; objects made later are collected as usual.
"""

from __future__ import annotations

import gc

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
