"""Sheets end to end: a document's settings and cells through the engine, results recorded.

This is the one place where the file layer (``worksheet.document``) meets the engine; the
command line, the app and the Python API all go through it.
"""

from __future__ import annotations

import dataclasses
from collections.abc import Sequence
from dataclasses import dataclass, field

from worksheet.constants import DATASET_NAMES, DEFAULT_DATASET
from worksheet.document import SheetDocument, parse_document, render_document, with_results
from worksheet.engine import (
    Context,
    SheetEvaluator,
    SourceStatement,
    StatementResult,
    make_context,
    split_statements,
)
from worksheet.engine.budget import DEFAULT_SECONDS
from worksheet.errors import DocumentError


@dataclass(frozen=True)
class SheetSettings:
    """What the front matter asks for, with the defaults of SPEC section 1."""

    dataset: str = DEFAULT_DATASET
    digits: int = 4
    seconds: float = DEFAULT_SECONDS
    pinned: bool = False
    warnings: tuple[str, ...] = ()
    guard: bool = True


def read_settings(doc: SheetDocument) -> SheetSettings:
    """Settings from the front matter; a bad value is a DocumentError naming the key."""
    warnings: list[str] = []
    dataset = doc.get("constants")
    pinned = dataset is not None
    if dataset is None:
        dataset = DEFAULT_DATASET
        warnings.append(
            f"the sheet does not pin its constants; {DEFAULT_DATASET} was used "
            f"(add 'constants: {DEFAULT_DATASET}' to the front matter)"
        )
    elif dataset not in DATASET_NAMES:
        raise DocumentError(
            f"front matter 'constants: {dataset}' is not a known dataset; use one of "
            + ", ".join(DATASET_NAMES),
            _key_line(doc, "constants"),
        )
    digits_text = doc.get("digits", "4") or "4"
    try:
        if not digits_text.isascii():  # int() would take '٣' as 3
            raise ValueError(digits_text)
        digits = int(digits_text)
    except ValueError as err:
        raise DocumentError(
            f"front matter 'digits: {digits_text}' is not a whole number", _key_line(doc, "digits")
        ) from err
    if not 1 <= digits <= 15:
        raise DocumentError("front matter 'digits' must be from 1 to 15", _key_line(doc, "digits"))
    budget_text = doc.get("budget")
    seconds = DEFAULT_SECONDS
    if budget_text is not None:
        try:
            if not budget_text.isascii():  # float() would take '٣' as 3
                raise ValueError(budget_text)
            seconds = float(budget_text.removesuffix("s").strip())
        except ValueError as err:
            raise DocumentError(
                f"front matter 'budget: {budget_text}' is not a number of seconds",
                _key_line(doc, "budget"),
            ) from err
        if not 0.1 <= seconds <= 600:
            raise DocumentError(
                "front matter 'budget' must be from 0.1 to 600 seconds", _key_line(doc, "budget")
            )
    guard_text = (doc.get("precision_guard", "on") or "on").strip().lower()
    if guard_text not in ("on", "off", "true", "false", "yes", "no"):
        raise DocumentError(
            f"front matter 'precision_guard: {guard_text}' must be on or off",
            _key_line(doc, "precision_guard"),
        )
    guard = guard_text in ("on", "true", "yes")
    return SheetSettings(dataset, digits, seconds, pinned, tuple(warnings), guard)


def _key_line(doc: SheetDocument, key: str) -> int | None:
    if doc.front_matter is None:
        return None
    for number, line in enumerate(doc.front_matter.raw.splitlines(), start=1):
        if line.split(":", 1)[0].strip() == key:
            return number
    return None


def document_statements(doc: SheetDocument) -> list[SourceStatement]:
    """Every statement of every calc cell, in reading order, with its file line."""
    statements: list[SourceStatement] = []
    for cell_index, cell in enumerate(doc.calc_cells()):
        body = "\n".join(cell.body_lines())
        statements.extend(split_statements(body, cell.first_line, cell_index))
    return statements


@dataclass(frozen=True)
class StaleLine:
    statement: StatementResult
    recorded: str | None
    recomputed: str


@dataclass(frozen=True)
class SheetRun:
    """The outcome of running a sheet: results, and the document with results recorded."""

    settings: SheetSettings
    statements: tuple[SourceStatement, ...]
    results: tuple[StatementResult, ...]
    document: SheetDocument
    text: str
    stale: tuple[StaleLine, ...] = field(default=())

    @property
    def all_hold(self) -> bool:
        """No claim failed and no statement erred or was skipped."""
        return all(r.status in ("ok",) for r in self.results if r.kind != "blank")

    def cell_results(self, cell: int) -> list[StatementResult]:
        return [r for s, r in zip(self.statements, self.results, strict=True) if s.cell == cell]

    def with_staleness(self) -> tuple[StatementResult, ...]:
        """Results with recorded-but-different lines marked ``stale`` (for ``check``)."""
        stale_lines = {id(item.statement): item for item in self.stale}
        marked = []
        for result in self.results:
            item = stale_lines.get(id(result))
            if item is not None and result.status == "ok":
                recorded = item.recorded if item.recorded is not None else "(nothing recorded)"
                result = dataclasses.replace(
                    result,
                    status="stale",
                    message=f"recorded: {recorded}; recomputed: {item.recomputed}",
                )
            marked.append(result)
        return tuple(marked)


class SheetRunner:
    """Runs documents, keeping one evaluator per settings so re-runs are incremental."""

    def __init__(self) -> None:
        self._contexts: dict[tuple[str, int, float, bool], Context] = {}
        self._evaluators: dict[tuple[str, int, float, bool], SheetEvaluator] = {}

    def evaluator(self, settings: SheetSettings) -> SheetEvaluator:
        key = (settings.dataset, settings.digits, settings.seconds, settings.guard)
        if key not in self._evaluators:
            context = make_context(
                settings.dataset, settings.digits, settings.seconds, settings.guard
            )
            self._contexts[key] = context
            self._evaluators[key] = SheetEvaluator(context)
        return self._evaluators[key]

    def run(self, doc: SheetDocument) -> SheetRun:
        settings = read_settings(doc)
        statements = document_statements(doc)
        results = self.evaluator(settings).run(statements)
        per_cell: list[list[str]] = [[] for _ in doc.calc_cells()]
        lines_of: list[list[str]] = []
        for source, result in zip(statements, results, strict=True):
            lines = result.record.split("\n") if result.record else []
            lines_of.append(lines)
            per_cell[source.cell].extend(lines)
        stale = _staleness(doc, statements, results, lines_of)
        new_doc = with_results(doc, per_cell)
        return SheetRun(
            settings,
            tuple(statements),
            tuple(results),
            new_doc,
            render_document(new_doc),
            tuple(stale),
        )

    def close(self) -> None:
        for context in self._contexts.values():
            context.worker.close()


def _staleness(
    doc: SheetDocument,
    statements: Sequence[SourceStatement],
    results: Sequence[StatementResult],
    lines_of: Sequence[list[str]],
) -> list[StaleLine]:
    """Recorded lines that differ from what the run records now, statement by statement."""
    stale: list[StaleLine] = []
    cells = doc.calc_cells()
    position = [0] * len(cells)
    for source, result, lines in zip(statements, results, lines_of, strict=True):
        if not lines:
            continue
        cell = cells[source.cell]
        recorded_all = cell.result.lines() if cell.result is not None else ()
        start = position[source.cell]
        recorded = list(recorded_all[start : start + len(lines)])
        position[source.cell] = start + len(lines)
        if recorded != lines:
            shown = "\n".join(recorded) if recorded else None
            stale.append(StaleLine(result, shown, "\n".join(lines)))
    for index, cell in enumerate(cells):
        extra = cell.result.lines()[position[index] :] if cell.result is not None else ()
        if extra:
            # Extra recorded lines with nothing to match them: the last statement is stale.
            last = [r for s, r in zip(statements, results, strict=True) if s.cell == index]
            if last:
                stale.append(StaleLine(last[-1], "\n".join(extra), "(nothing)"))
    return stale


def run_text(text: str, runner: SheetRunner | None = None) -> SheetRun:
    """Run a sheet given as text (a convenience for tests and the Python API)."""
    own = runner is None
    runner = runner or SheetRunner()
    try:
        return runner.run(parse_document(text))
    finally:
        if own:
            runner.close()
