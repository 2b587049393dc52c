"""One expression with no sheet around it: what ``worksheet calc`` evaluates."""

from __future__ import annotations

from worksheet.engine.context import Context
from worksheet.engine.results import StatementResult
from worksheet.engine.sheet import SheetEvaluator, SourceStatement


def calculate(context: Context, expression: str, unit: str | None = None) -> StatementResult:
    """Evaluate ``expression`` (optionally ``in [unit]``) as a lone display statement.

    ``unit`` may be written with or without its brackets.
    """
    text = expression.strip()
    if unit:
        inner = unit.strip()
        if not (inner.startswith("[") and inner.endswith("]")):
            inner = f"[{inner}]"
        text = f"{text} in {inner}"
    (result,) = SheetEvaluator(context).run([SourceStatement(1, text)])
    return result
