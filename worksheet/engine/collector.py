"""The cycle collector held off while a whole sheet is read, run and recorded.

Each statement leaves long-lived results, bindings and sympy objects behind, and every
full collection would scan all of them again: on a long sheet that grows with the square
of its length (a 50,000-statement check spent a third of its time there). Reading,
running and recording make little cyclic garbage (a 50,000-statement check holds 2 % more
memory without the collector), so it waits until the work is done and is left as found.
"""

from __future__ import annotations

import contextlib
import gc
from collections.abc import Iterator


@contextlib.contextmanager
def collector_paused() -> Iterator[None]:
    """Hold the collector for the block (nests: only the outermost hold re-enables it)."""
    was_enabled = gc.isenabled()
    gc.disable()
    try:
        yield
    finally:
        if was_enabled:
            gc.enable()
