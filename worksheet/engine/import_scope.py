"""Names another sheet lends to this one, as the evaluator sees them (no file access here).

``worksheet.imports`` reads and runs the other sheets; this is only what the result of
that work looks like to :class:`~worksheet.engine.sheet.SheetEvaluator`: the bindings
brought in, the ones they silently depend on, and the recorded line of each ``use``.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass, field

from worksheet.engine.bindings import Binding
from worksheet.engine.results import StatementResult


@dataclass(frozen=True)
class LentName:
    """One name from another sheet: its binding, the ``use`` line, the file it is from."""

    binding: Binding
    use_line: int
    file: str  # as written in the use statement
    brought_in: bool  # False: a dependency of a brought-in name, not for this sheet's text


@dataclass(frozen=True)
class ImportScope:
    """Everything the ``use`` statements of one sheet bring; ``token`` changes with any
    imported file's bytes, so the evaluator knows when its cached results are void."""

    names: Mapping[str, LentName] = field(default_factory=dict)
    results: Mapping[int, StatementResult] = field(default_factory=dict)  # by use line
    failed: Mapping[str, int] = field(default_factory=dict)  # named in a failed use: line
    token: tuple = ()

    def binding(self, name: str) -> Binding | None:
        lent = self.names.get(name)
        return None if lent is None else lent.binding

    def refusal(self, name: str, line: int, defines: bool) -> str | None:
        """Why this sheet's line may not define or read ``name`` (None: it may)."""
        lent = self.names.get(name)
        if lent is None:
            return None
        if defines:
            if lent.brought_in:
                return (
                    f"'{name}' is brought in from {lent.file} by line {lent.use_line}; "
                    f"line {line} defines it again (pick a new name)"
                )
            return (
                f"'{name}' is defined in {lent.file}, and the names line {lent.use_line} "
                f"brings in are computed from it; pick a new name"
            )
        if not lent.brought_in:
            return (
                f"'{name}' is defined in {lent.file} but line {lent.use_line} does not bring "
                f"it in; add it to the names of that use statement"
            )
        if line < lent.use_line:
            return (
                f"'{name}' is brought in by line {lent.use_line}, below its use on line "
                f"{line}; move the use statement up"
            )
        return None
