"""Sheets end to end: a document's settings and cells through the engine, results recorded.

This is the one place where the file layer (``worksheet.document``) meets the engine; the
command line, the app and the Python API all go through it.
"""

from __future__ import annotations

import dataclasses
import operator
import os
import re
from collections.abc import Callable, Sequence
from dataclasses import dataclass, field
from functools import cached_property
from itertools import accumulate, compress

from worksheet.constants import DATASET_NAMES, DEFAULT_DATASET
from worksheet.document import (
    CalcCell,
    ResultBlock,
    SheetDocument,
    parse_document,
    render_document,
    with_results,
)
from worksheet.engine import (
    Context,
    SheetEvaluator,
    SourceStatement,
    StatementResult,
    make_context,
    split_statements,
)
from worksheet.engine.budget import DEFAULT_SECONDS, Worker
from worksheet.engine.collector import collector_paused
from worksheet.engine.distributions import (
    DEFAULT_SAMPLES,
    DEFAULT_SEED,
    MAX_SAMPLES,
    MIN_SAMPLES,
)
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
    seed: int = DEFAULT_SEED
    samples: int = DEFAULT_SAMPLES


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
    seed = _whole_number(doc, "seed", DEFAULT_SEED, 0, 2**63 - 1)
    samples = _whole_number(doc, "samples", DEFAULT_SAMPLES, MIN_SAMPLES, MAX_SAMPLES)
    return SheetSettings(dataset, digits, seconds, pinned, tuple(warnings), guard, seed, samples)


def _whole_number(doc: SheetDocument, key: str, default: int, low: int, high: int) -> int:
    """A whole-number front-matter key (``seed``, ``samples``) within bounds."""
    text = doc.get(key)
    if text is None or not text.strip():
        return default
    cleaned = text.strip().replace("_", "")
    if not cleaned.isdigit():
        raise DocumentError(
            f"front matter '{key}: {text.strip()}' is not a whole number", _key_line(doc, key)
        )
    value = int(cleaned)
    if not low <= value <= high:
        raise DocumentError(
            f"front matter '{key}' must be from {low} to {high}", _key_line(doc, key)
        )
    return value


def _key_line(doc: SheetDocument, key: str) -> int | None:
    if doc.front_matter is None:
        return None
    for number, line in enumerate(doc.front_matter.raw.splitlines(), start=1):
        if line.split(":", 1)[0].strip() == key:
            return number
    return None


def document_statements(
    doc: SheetDocument,
    cache: dict[tuple[str, int, int], list[SourceStatement]] | None = None,
    sizes: list[int] | None = None,
) -> list[SourceStatement]:
    """Every statement of every calc cell, in reading order, with its file line.

    ``cache`` (the runner's) keeps each cell's statements by its body, first line and
    position, so a re-run after an edit splits only the cells that changed; ``sizes``
    receives the number of statements of each cell.
    """
    statements: list[SourceStatement] = []
    for cell_index, cell in enumerate(doc.calc_cells()):
        key = (cell.body, cell.first_line, cell_index)
        split = cache.get(key) if cache is not None else None
        if split is None:
            body = "\n".join(cell.body_lines())
            split = split_statements(body, cell.first_line, cell_index)
            if cache is not None:
                cache[key] = split
        statements.extend(split)
        if sizes is not None:
            sizes.append(len(split))
    return statements


@dataclass(frozen=True)
class StaleLine:
    statement: StatementResult
    recorded: str | None
    recomputed: str
    extra: bool = False  # recorded lines past the cell's last statement


@dataclass(frozen=True)
class SheetRun:
    """The outcome of running a sheet: results, and the document with results recorded."""

    settings: SheetSettings
    statements: tuple[SourceStatement, ...]
    results: tuple[StatementResult, ...]
    document: SheetDocument
    stale: tuple[StaleLine, ...] = field(default=())

    @cached_property
    def text(self) -> str:
        """The document as written to the file (rendered when first asked: an edit in the
        app needs the results at once and the whole text only when it saves)."""
        return render_document(self.document)

    @property
    def cites_written_lines(self) -> bool:
        """Whether the line numbers in the results are those of ``text`` (the file written)."""
        return _same_lines(document_statements(self.document), self.statements)

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
                message = f"recorded: {recorded}; recomputed: {item.recomputed}"
                if result.kind == "use":
                    from worksheet.imports import stale_use_message

                    message = stale_use_message(item.recorded, result)
                result = dataclasses.replace(result, status="stale", message=message)
            marked.append(result)
        return tuple(marked)


@dataclass
class _LastRun:
    """What the runner keeps of its last run, for the next one after an edit."""

    settings: SheetSettings
    cells: tuple[CalcCell, ...]
    statements: list[SourceStatement]
    results: list[StatementResult]
    sizes: list[int]
    starts: list[int]
    cell_of: list[int]
    per_cell: list[list[str]]
    lines_of: list[list[str]]
    not_current: set[int]
    stale: dict[int, StaleLine] = field(default_factory=dict)
    uses_sheets: bool = False  # a 'use' line: every run re-reads the used files
    # The evaluator's run count just after this run: when it still reads so, the evaluator
    # holds these very statements, and an edit may name the ones it replaces.
    evaluator_runs: int = -1

    @classmethod
    def of(
        cls,
        settings: SheetSettings,
        doc: SheetDocument,
        statements: list[SourceStatement],
        results: list[StatementResult],
        sizes: list[int],
        per_cell: list[list[str]],
        lines_of: list[list[str]],
    ) -> _LastRun:
        cells = doc.calc_cells()
        starts = list(accumulate(sizes, initial=0))[:-1]
        cell_of = [position for position, size in enumerate(sizes) for _ in range(size)]
        not_current = {
            position
            for position, (cell, lines) in enumerate(zip(cells, per_cell, strict=True))
            if cell.result is None or cell.result.lines() != tuple(lines)
        }
        return cls(
            settings,
            cells,
            list(statements),
            list(results),
            list(sizes),
            starts,
            cell_of,
            per_cell,
            lines_of,
            not_current,
        )


def _reading_order(item: StaleLine) -> tuple[bool, int]:
    """Statement-level staleness in reading order, then the extra recorded lines (as
    ``_staleness`` lists them)."""
    return (item.extra, item.statement.line)


MAX_RENUMBERING_RUNS = 3
"""A run whose result blocks move later cells is repeated with the new line numbers; the
second run keeps every block's size (one record per statement), so it is final."""

_USE_LINE = re.compile(r"^\s*use[\s\"]", re.MULTILINE)


class SheetRunner:
    """Runs documents, keeping one evaluator per settings so re-runs are incremental.

    ``sheet_path`` is where the sheet lives (its ``use`` paths are relative to it);
    ``budget`` and ``dataset`` override the front matter (``--budget``, ``--constants``).
    """

    def __init__(
        self,
        sheet_path: str | os.PathLike[str] | None = None,
        *,
        budget: float | None = None,
        dataset: str | None = None,
        worker: Worker | None = None,
    ) -> None:
        from worksheet.imports import SheetImports

        self.sheet_path = sheet_path
        self.budget = budget
        self.dataset = dataset
        self._worker = worker  # lent by the caller, who closes it; None: one per context
        self._imports = SheetImports()
        self._contexts: dict[tuple, Context] = {}
        self._evaluators: dict[tuple, SheetEvaluator] = {}
        self._cells: dict[tuple[str, int, int], list[SourceStatement]] = {}
        self._records: dict[tuple[int, ...], tuple[tuple, list[str], list[list[str]]]] = {}
        self._recorded: dict[int, tuple[ResultBlock, tuple[str, ...]]] = {}
        self._last: _LastRun | None = None

    def settings(self, doc: SheetDocument) -> SheetSettings:
        """The front matter's settings with this runner's overrides applied."""
        settings = read_settings(doc)
        if self.budget is not None:
            settings = dataclasses.replace(settings, seconds=self.budget)
        if self.dataset is not None:
            settings = dataclasses.replace(settings, dataset=self.dataset)
        return settings

    def evaluator(self, settings: SheetSettings) -> SheetEvaluator:
        key = (
            settings.dataset,
            settings.digits,
            settings.seconds,
            settings.guard,
            settings.seed,
            settings.samples,
        )
        if key not in self._evaluators:
            context = make_context(*key)  # the key is make_context's arguments, in order
            if self._worker is not None:
                context.worker = self._worker
            self._contexts[key] = context
            self._evaluators[key] = SheetEvaluator(context)
        return self._evaluators[key]

    def run(
        self,
        doc: SheetDocument,
        lines_as_written: bool = False,
        path: str | os.PathLike[str] | None = None,
    ) -> SheetRun:
        """Run ``doc``. Messages cite the lines of ``doc`` itself (what ``check``, exports
        and the app show), or with ``lines_as_written`` those of the file this run writes
        (what ``worksheet run`` and saving use). ``use`` paths resolve from ``path`` (or the
        runner's ``sheet_path``)."""
        with collector_paused():
            return self._run(doc, lines_as_written, path)

    def _run(
        self,
        doc: SheetDocument,
        lines_as_written: bool,
        path: str | os.PathLike[str] | None,
    ) -> SheetRun:
        settings = self.settings(doc)
        if not lines_as_written:
            after_edit = self._run_after_edit(doc, settings)
            if after_edit is not None:
                return after_edit
        self._last = None
        if len(self._cells) > 2 * len(doc.blocks) + 100:
            self._cells.clear()
        evaluator = self.evaluator(settings)
        pinned = read_settings(doc).dataset
        sizes: list[int] = []
        statements = document_statements(doc, self._cells, sizes)
        renumbered = False
        for _ in range(MAX_RENUMBERING_RUNS):
            scope = self._imports.scope_for(
                statements, path or self.sheet_path, evaluator.ctx, pinned
            )
            evaluator.set_imports(scope)
            results = evaluator.run(statements)
            per_cell, lines_of = self._recorded_lines(results, sizes)
            new_doc = with_results(doc, per_cell)
            if not lines_as_written:
                break
            as_written = document_statements(new_doc)
            if _same_lines(as_written, statements):
                break
            # Result blocks were inserted or resized, so later cells moved: run again with
            # the line numbers of the file as it is written, which messages cite.
            statements, renumbered = as_written, True
        stale = _staleness(doc, statements, results, lines_of, per_cell, self._result_lines, sizes)
        if not renumbered:  # an edit's re-run splits cells at the lines of ``doc``
            self._last = _LastRun.of(settings, doc, statements, results, sizes, per_cell, lines_of)
            self._last.stale = {id(item.statement): item for item in stale}
            self._last.uses_sheets = any(result.kind == "use" for result in results)
            self._last.evaluator_runs = evaluator.runs
        return SheetRun(
            settings,
            tuple(statements),
            tuple(results),
            new_doc,
            tuple(stale),
        )

    def _run_after_edit(self, doc: SheetDocument, settings: SheetSettings) -> SheetRun | None:
        """A re-run that looks only at the cells that changed since the last run.

        Cells are compared by identity (an edit keeps the cells it does not touch), and so
        are the evaluator's results (it keeps those of statements it did not re-run); only
        the cells with a new cell object or a new result are split, recorded and compared
        with their recorded lines again. None when the last run is not comparable (other
        settings, cells added or removed, a cell with a new number of statements).
        """
        last = self._last
        cells = doc.calc_cells()
        if (
            last is None
            or last.uses_sheets
            or last.settings != settings
            or len(cells) != len(last.cells)
        ):
            return None
        edited = list(compress(range(len(cells)), map(operator.is_not, cells, last.cells)))
        statements = list(last.statements)
        replaced: list[int] = []
        for position in edited:
            cell = cells[position]
            if _USE_LINE.search(cell.body):
                return None  # a new 'use' line: the full run resolves the used files
            split = split_statements("\n".join(cell.body_lines()), cell.first_line, position)
            start, size = last.starts[position], last.sizes[position]
            if len(split) != size:
                return None
            statements[start : start + size] = split
            replaced.extend(range(start, start + size))
        evaluator = self.evaluator(settings)
        in_step = evaluator.runs == last.evaluator_runs
        results = evaluator.run(statements, replaced if in_step else None)
        if len(results) != len(statements):
            return None
        moved = evaluator.rerun
        if moved is None:
            moved = compress(range(len(results)), map(operator.is_not, results, last.results))
        touched = sorted(set(edited) | {last.cell_of[index] for index in moved})
        # The last run's tables are brought up to date in place (a copy of a long sheet's
        # tables would cost more than the edit); should anything below fail, the next run is
        # a full one.
        self._last = None
        per_cell = last.per_cell
        lines_of = last.lines_of
        stale = dict(last.stale)
        for position in touched:
            start, size = last.starts[position], last.sizes[position]
            for old in last.results[start : start + size]:
                stale.pop(id(old), None)
            each = [r.record.split("\n") if r.record else [] for r in results[start : start + size]]
            lines_of[start : start + size] = each
            per_cell[position] = [line for lines in each for line in lines]
        for item in _staleness(
            doc,
            statements,
            results,
            lines_of,
            per_cell,
            self._result_lines,
            last.sizes,
            only=touched,
        ):
            stale[id(item.statement)] = item
        new_doc = with_results(doc, per_cell, only=sorted(set(touched) | last.not_current))
        ordered = sorted(stale.values(), key=_reading_order)
        not_current = last.not_current - set(touched)
        for position in touched:
            recorded = cells[position].result
            if recorded is None or self._result_lines(recorded) != tuple(per_cell[position]):
                not_current.add(position)
        self._last = _LastRun(
            settings,
            cells,
            statements,
            results,
            last.sizes,
            last.starts,
            last.cell_of,
            per_cell,
            lines_of,
            not_current,
            stale,
            last.uses_sheets,
            evaluator.runs,
        )
        return SheetRun(
            settings,
            tuple(statements),
            tuple(results),
            new_doc,
            tuple(ordered),
        )

    def _result_lines(self, block: ResultBlock) -> tuple[str, ...]:
        """A recorded block's lines, split once per block object."""
        found = self._recorded.get(id(block))
        if found is None or found[0] is not block:
            if len(self._recorded) > 4 * len(self._cells) + 100:
                self._recorded.clear()
            found = self._recorded[id(block)] = (block, block.lines())
        return found[1]

    def _recorded_lines(
        self, results: Sequence[StatementResult], sizes: Sequence[int]
    ) -> tuple[list[list[str]], list[list[str]]]:
        """The lines each cell records and each statement records, cell by cell.

        A cell whose results are the very objects of the last run (the evaluator reuses
        them for unchanged statements) takes its lines from the last run, so an edit costs
        what its own cells cost.
        """
        per_cell: list[list[str]] = []
        lines_of: list[list[str]] = []
        previous = self._records
        kept: dict[tuple[int, ...], tuple[tuple, list[str], list[list[str]]]] = {}
        start = 0
        for size in sizes:
            end = start + size
            own = tuple(results[start:end])
            key = tuple(map(id, own))
            found = previous.get(key)
            if found is None:
                each = [r.record.split("\n") if r.record else [] for r in own]
                found = (own, [line for lines in each for line in lines], each)
            kept[key] = found
            per_cell.append(found[1])
            lines_of.extend(found[2])
            start = end
        self._records = kept
        return per_cell, lines_of

    def close(self) -> None:
        """Stop the workers this runner started (a lent one stays with its owner)."""
        for context in self._contexts.values():
            if context.worker is not self._worker:
                context.worker.close()


def _same_lines(a: Sequence[SourceStatement], b: Sequence[SourceStatement]) -> bool:
    return [s.line for s in a] == [s.line for s in b]


def _staleness(
    doc: SheetDocument,
    statements: Sequence[SourceStatement],
    results: Sequence[StatementResult],
    lines_of: Sequence[list[str]],
    per_cell: Sequence[list[str]],
    recorded_lines: Callable[[ResultBlock], tuple[str, ...]] = ResultBlock.lines,
    sizes: Sequence[int] | None = None,
    only: Sequence[int] | None = None,
) -> list[StaleLine]:
    """Recorded lines that differ from what the run records now, statement by statement.

    A cell whose recorded lines are exactly the new ones is passed over whole; ``only``
    limits the comparison to those cell positions (in order).
    """
    cells = doc.calc_cells()
    if sizes is None:
        sizes = [sum(1 for s in statements if s.cell == index) for index in range(len(cells))]
    starts = list(accumulate(sizes, initial=0))
    stale: list[StaleLine] = []
    extras: list[StaleLine] = []
    for position in range(len(cells)) if only is None else only:
        cell, lines, size = cells[position], per_cell[position], sizes[position]
        first, start = starts[position], starts[position] + size
        recorded_all = recorded_lines(cell.result) if cell.result is not None else ()
        if cell.result is not None and recorded_all == tuple(lines):
            continue
        offset = 0
        for k in range(first, start):
            own = lines_of[k]
            if not own:
                continue
            recorded = list(recorded_all[offset : offset + len(own)])
            offset += len(own)
            if recorded != own:
                shown = "\n".join(recorded) if recorded else None
                stale.append(StaleLine(results[k], shown, "\n".join(own)))
        extra = recorded_all[offset:]
        if extra and size:
            # Extra recorded lines with nothing to match them: the last statement is stale.
            extras.append(StaleLine(results[start - 1], "\n".join(extra), "(nothing)", True))
    return stale + extras


def run_text(text: str, runner: SheetRunner | None = None) -> SheetRun:
    """Run a sheet given as text (a convenience for tests and the Python API)."""
    own = runner is None
    runner = runner or SheetRunner()
    try:
        return runner.run(parse_document(text))
    finally:
        if own:
            runner.close()
