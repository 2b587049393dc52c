"""The project's error types: one root, each carrying where in the sheet it happened."""

from __future__ import annotations


class WorksheetError(Exception):
    """Root of every error the project raises on purpose.

    ``line`` and ``column`` are 1-based positions in the sheet file (or in the single
    expression given to ``worksheet calc``); either may be ``None`` when unknown.
    """

    def __init__(self, message: str, line: int | None = None, column: int | None = None):
        super().__init__(message)
        self.message = message
        self.line = line
        self.column = column

    def located(self) -> str:
        """The message prefixed with ``line N, col M:`` where known."""
        where = []
        if self.line is not None:
            where.append(f"line {self.line}")
        if self.column is not None:
            where.append(f"col {self.column}")
        return f"{', '.join(where)}: {self.message}" if where else self.message

    def __str__(self) -> str:
        return self.located()


class ParseError(WorksheetError):
    """The text is not a statement of the sheet language."""


class DimensionError(WorksheetError):
    """A step combines quantities of incompatible physical dimension."""


class NameResolutionError(WorksheetError):
    """A name is unknown, defined twice, or used before its definition."""


class BudgetError(WorksheetError):
    """A statement ran past its time or size budget and was stopped."""


class EvaluationError(WorksheetError):
    """A well-formed, dimension-consistent statement could not be evaluated."""


class DocumentError(WorksheetError):
    """A sheet file cannot be read (not UTF-8, binary, an unclosed fence, ...)."""


class ConstantsError(WorksheetError):
    """A constants dataset is unknown or its data file is malformed."""
