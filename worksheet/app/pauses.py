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
