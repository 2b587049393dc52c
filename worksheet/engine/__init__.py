"""The evaluation engine: statements, bindings, dependency graph, results. No UI imports."""

from worksheet.engine.context import Context, make_context
from worksheet.engine.results import StatementResult
from worksheet.engine.sheet import SheetEvaluator, SourceStatement, split_statements
from worksheet.engine.single import calculate

__all__ = [
    "Context",
    "SheetEvaluator",
    "SourceStatement",
    "StatementResult",
    "calculate",
    "make_context",
    "split_statements",
]
