"""worksheet: unit-checked derivation worksheets. Small public API: load, run, check."""

from __future__ import annotations

from typing import TYPE_CHECKING

__version__ = "0.1.0"

CAUTION = (
    "Results are estimates for research planning; verify them independently before any use "
    "where safety, money or health is at stake."
)
"""The caution the command line and every standalone export carry."""

if TYPE_CHECKING:
    from worksheet.runner import SheetRun


def run(path: str) -> SheetRun:
    """Run the sheet at ``path`` in memory and return its results (nothing is written)."""
    from worksheet.document import read_document
    from worksheet.runner import SheetRunner

    runner = SheetRunner()
    try:
        return runner.run(read_document(path))
    finally:
        runner.close()


def check(path: str) -> bool:
    """Whether every claim of the sheet holds, nothing errs and no recorded result is stale."""
    result = run(path)
    return all(r.status == "ok" for r in result.with_staleness() if r.kind != "blank")


__all__ = ["CAUTION", "__version__", "check", "run"]
