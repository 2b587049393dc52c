"""worksheet: unit-checked derivation worksheets. Small public API: load, run, check."""

from __future__ import annotations

import os
from typing import TYPE_CHECKING, Any

__version__ = "0.3.2"

CAUTION = (
    "Results are estimates for research planning; verify them independently before any use "
    "where safety, money or health is at stake."
)
"""The caution the command line and every standalone export carry."""

if TYPE_CHECKING:
    from worksheet.api import Sheet, SheetResult

# The engine is imported inside each function, so that ``import worksheet`` (which the
# command line and the pytest plugin do) stays fast.


def load(path: str | os.PathLike[str], *, ureg: Any | None = None) -> Sheet:
    """Read the sheet file at ``path``; ``.run()`` it in memory, ``.save()`` its results."""
    from worksheet.api import load as _load

    return _load(path, ureg=ureg)


def loads(text: str, *, ureg: Any | None = None) -> Sheet:
    """A sheet from its text (``.save(path)`` then needs a path)."""
    from worksheet.api import loads as _loads

    return _loads(text, ureg=ureg)


def run(path: str | os.PathLike[str]) -> SheetResult:
    """Run the sheet at ``path`` in memory and return its results (nothing is written)."""
    return load(path).run()


def check(path: str | os.PathLike[str]) -> bool:
    """Whether every claim of the sheet holds, nothing errs and no recorded result is stale."""
    return load(path).check()


__all__ = ["CAUTION", "__version__", "check", "load", "loads", "run"]
