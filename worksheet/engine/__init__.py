"""The evaluation engine: statements, bindings, dependency graph, results. No UI imports.

The names below load on first use (PEP 562): ``worksheet.engine.budget`` can then be
imported, and its worker process started, before sympy is (see ``Worker.start_early``).
"""

from __future__ import annotations

import importlib
from typing import TYPE_CHECKING, Any

if TYPE_CHECKING:
    from worksheet.engine.context import Context, make_context
    from worksheet.engine.results import StatementResult
    from worksheet.engine.sheet import SheetEvaluator, SourceStatement, split_statements
    from worksheet.engine.single import calculate

_HOMES = {
    "Context": "worksheet.engine.context",
    "make_context": "worksheet.engine.context",
    "StatementResult": "worksheet.engine.results",
    "SheetEvaluator": "worksheet.engine.sheet",
    "SourceStatement": "worksheet.engine.sheet",
    "split_statements": "worksheet.engine.sheet",
    "calculate": "worksheet.engine.single",
}

__all__ = [
    "Context",
    "SheetEvaluator",
    "SourceStatement",
    "StatementResult",
    "calculate",
    "make_context",
    "split_statements",
]


def __getattr__(name: str) -> Any:
    home = _HOMES.get(name)
    if home is None:
        raise AttributeError(f"module 'worksheet.engine' has no attribute {name!r}")
    value = getattr(importlib.import_module(home), name)
    globals()[name] = value
    return value


def __dir__() -> list[str]:
    return sorted(set(globals()) | set(_HOMES))
