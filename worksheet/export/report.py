"""What every export shows, gathered once from a sheet run: notes, steps, claims, constants.

The writers (LaTeX, HTML, Markdown) only format this model, so they cannot disagree about
which claims or constants a sheet has.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from decimal import Decimal

import sympy

from worksheet.constants import Dataset, load_dataset
from worksheet.document import CalcCell, NoteBlock
from worksheet.engine import SourceStatement, StatementResult
from worksheet.engine.formatting import format_number, format_uncertainty
from worksheet.engine.results import built
from worksheet.engine.translate import VERBS  # a step using one shows its symbolic form
from worksheet.errors import WorksheetError
from worksheet.runner import SheetRun
from worksheet.syntax import parse_statement, parse_unit
from worksheet.syntax import tree as t
from worksheet.syntax.tokens import Kind, tokenize

STATUS_WORDS: dict[str, str] = {
    "ok": "holds",
    "failed": "fails",
    "error": "error",
    "skipped": "skipped",
    "stale": "stale",
}
"""How a claim's status is said in words (never by colour alone)."""


@dataclass(frozen=True)
class Step:
    """One statement with its result; ``tree`` is None when the text does not parse."""

    source: SourceStatement
    result: StatementResult
    tree: t.AnyStatement | None

    @property
    def is_claim(self) -> bool:
        return self.result.kind == "check"

    @property
    def status_word(self) -> str:
        return STATUS_WORDS.get(self.result.status, self.result.status)


@dataclass(frozen=True)
class NoteItem:
    text: str


@dataclass(frozen=True)
class CellItem:
    index: int
    steps: tuple[Step, ...]


Item = NoteItem | CellItem


@dataclass(frozen=True)
class ConstantRow:
    """A constant (or a dataset unit written in brackets) the sheet uses, with provenance."""

    symbol: str
    name: str
    value: str
    uncertainty: str  # "exact" or the published standard uncertainty
    unit: str
    source: str
    as_unit: bool  # used inside brackets, as in [M_sun]


@dataclass(frozen=True)
class Report:
    title: str
    source_name: str | None
    dataset_name: str
    dataset_title: str
    digits: int
    pinned: bool
    items: tuple[Item, ...]
    constants: tuple[ConstantRow, ...]

    @property
    def steps(self) -> tuple[Step, ...]:
        return tuple(
            step for item in self.items if isinstance(item, CellItem) for step in item.steps
        )

    @property
    def claims(self) -> tuple[Step, ...]:
        return tuple(step for step in self.steps if step.is_claim)

    @property
    def errors(self) -> tuple[Step, ...]:
        """Steps that could not be evaluated (their dependents are skipped)."""
        return tuple(step for step in self.steps if step.result.status == "error")

    @property
    def has_problems(self) -> bool:
        """A claim that does not hold or a line that errs: the export must say so."""
        return bool(self.errors) or any(step.result.status != "ok" for step in self.claims)


def _count(number: int, word: str) -> str:
    return f"{number} {word}" + ("" if number == 1 else "s")


def outcome_sentence(report: Report) -> str:
    """One sentence every export shows near the top (and the command line prints on error).

    >>> outcome_sentence(Report("t", None, "D", "D", 4, True, (), ()))
    'The sheet makes no claim; every line was evaluated.'
    """
    claims = report.claims
    held = sum(1 for step in claims if step.result.status == "ok")
    failed = sum(1 for step in claims if step.result.status == "failed")
    unchecked = len(claims) - held - failed
    errors = report.errors
    if not report.has_problems:
        if not claims:
            return "The sheet makes no claim; every line was evaluated."
        if len(claims) == 1:
            return "The sheet's one claim holds; every line was evaluated."
        return f"All {len(claims)} claims hold; every line was evaluated."
    parts = []
    if failed:
        parts.append(
            f"{failed} of {_count(len(claims), 'claim')} {'fails' if failed == 1 else 'fail'}"
        )
    if unchecked:
        verb = "was" if unchecked == 1 else "were"
        parts.append(f"{_count(unchecked, 'claim')} {verb} not checked")
    if errors:
        lines = ", ".join(str(step.source.line) for step in errors)
        word = "line errs" if len(errors) == 1 else "lines err"
        parts.append(f"{len(errors)} {word} ({'line' if len(errors) == 1 else 'lines'} {lines})")
    return "Not everything holds: " + "; ".join(parts) + "."


@dataclass(frozen=True)
class ValueText:
    """A result's number in the recorded notation, split for typesetting.

    ``mantissa``/``exponent`` split ``2.454e11``; ``uncertainty`` is scaled to the same
    exponent (``5.000 +- 1.0 e11``), so siunitx and HTML can both show it.
    """

    mantissa: str
    exponent: int | None
    uncertainty: str | None
    unit: str | None
    finite: bool

    @property
    def plain(self) -> str:
        """The number as the result block records it (``2.454e11``)."""
        if self.exponent is None:
            return self.mantissa
        return f"{self.mantissa}e{self.exponent}"


def value_text(result: StatementResult, digits: int) -> ValueText | None:
    """The value of a result for display, or None when it has no number.

    >>> from worksheet.engine import StatementResult
    >>> r = StatementResult(1, "definition", "M = 5e11 [kg]", "ok", value=5e11, unit="kg",
    ...                     uncertainty=1e11)
    >>> value_text(r, 4)
    ValueText(mantissa='5.000', exponent=11, uncertainty='1.0', unit='kg', finite=True)
    """
    if result.value is None or result.status != "ok":
        return None
    if result.precision is not None and isinstance(result.detail, str):
        # The guard's high-precision value, as recorded: beyond the double range the
        # double value is inf or 0, which the record (rightly) does not show.
        number = result.detail
        finite = True
    else:
        number = format_number(result.value, digits)
        finite = math.isfinite(result.value)
    mantissa, _, exponent_text = number.partition("e")
    exponent = int(exponent_text) if exponent_text else None
    uncertainty = None
    if result.uncertainty is not None and finite and math.isfinite(result.uncertainty):
        u = Decimal(format_uncertainty(result.uncertainty))
        if exponent is not None:
            u = u.scaleb(-exponent)
        uncertainty = format(u, "f")
    unit = result.unit if result.unit not in (None, "", "1") else None
    return ValueText(mantissa, exponent, uncertainty, unit, finite)


def build_report(run: SheetRun, source_name: str | None = None) -> Report:
    """Gather what the exports show, in sheet order; deterministic for a given run."""
    dataset = load_dataset(run.settings.dataset)
    steps = [
        Step(source, result, _parse(source))
        for source, result in zip(run.statements, run.results, strict=True)
    ]
    by_cell: dict[int, list[Step]] = {}
    for step in steps:
        by_cell.setdefault(step.source.cell, []).append(step)
    items: list[Item] = []
    cell_index = 0
    for block in run.document.blocks:
        if isinstance(block, NoteBlock):
            if block.text.strip():
                items.append(NoteItem(block.text))
        elif isinstance(block, CalcCell):
            cell_steps = [s for s in by_cell.get(cell_index, []) if s.result.kind != "blank"]
            items.append(CellItem(cell_index, tuple(cell_steps)))
            cell_index += 1
    title = run.document.get("title") or (source_name or "Worksheet")
    return Report(
        title=title,
        source_name=source_name,
        dataset_name=dataset.name,
        dataset_title=dataset.title,
        digits=run.settings.digits,
        pinned=run.settings.pinned,
        items=tuple(items),
        constants=constants_used(steps, dataset),
    )


def _parse(source: SourceStatement) -> t.AnyStatement | None:
    try:
        return parse_statement(source.text, source.line)
    except WorksheetError:
        return None


def constants_used(steps: list[Step], dataset: Dataset) -> tuple[ConstantRow, ...]:
    """Dataset constants named in the sheet or reached through its expressions, then
    dataset units written in brackets.

    A name counts when it is a NAME token of a statement, or a constant symbol of the
    expression the engine evaluated for it (``result.form``): a call of a relation another
    sheet lends (``T_H(1e12 [kg])``) is expanded there, so the constants of its body count
    too; and every constant the definitions a ``use`` line brings in read (its ``detail``),
    so a value or relation reached only through a check still counts. Names the sheet
    declares itself (``G : [...]`` keeps G symbolic) and relation parameters do not count.
    Order: first use.
    """
    declared = {step.tree.name for step in steps if isinstance(step.tree, t.Declaration)}
    seen: dict[str, ConstantRow] = {}
    for step in steps:
        params = set(step.tree.params) if isinstance(step.tree, t.Relation) else set()
        try:
            tokens = tokenize(step.source.text, step.source.line)
        except WorksheetError:
            tokens = []
        for token in tokens:
            if token.kind is Kind.NAME:
                if token.text in dataset.constants and token.text not in declared | params:
                    _add_constant(seen, dataset, token.text, as_unit=False)
            elif token.kind is Kind.UNIT:
                for name in _unit_names(token.text):
                    _add_unit(seen, dataset, name)
        for name in _evaluated_constants(step.result, dataset):
            if name not in declared:
                _add_constant(seen, dataset, name, as_unit=False)
        if step.result.kind == "use" and isinstance(step.result.detail, tuple):
            for name in step.result.detail:  # what the definitions it brings in read
                if name in dataset.constants and name not in declared:
                    _add_constant(seen, dataset, name, as_unit=False)
    return tuple(seen.values())


def _evaluated_constants(result: StatementResult, dataset: Dataset) -> list[str]:
    """Constant symbols of the expression the engine evaluated, by name (sorted: a set)."""
    symbols = getattr(built(result.form), "free_symbols", ())
    return sorted(
        symbol.name
        for symbol in symbols
        if isinstance(symbol, sympy.Symbol) and symbol.name in dataset.constants
    )


def _unit_names(text: str) -> list[str]:
    try:
        return [name for name, _ in parse_unit(text).factors]
    except WorksheetError:
        return []


def _add_constant(
    seen: dict[str, ConstantRow], dataset: Dataset, symbol: str, as_unit: bool
) -> None:
    if symbol in seen:
        return
    constant = dataset.constants[symbol]
    seen[symbol] = ConstantRow(
        symbol=constant.symbol,
        name=constant.name,
        value=constant.value,
        uncertainty="exact" if constant.exact else constant.uncertainty,
        unit=constant.unit,
        source=constant.source,
        as_unit=as_unit,
    )


def _add_unit(seen: dict[str, ConstantRow], dataset: Dataset, name: str) -> None:
    unit = dataset.units.get(name)
    if unit is None or name in seen:
        return
    if name in dataset.constants:
        _add_constant(seen, dataset, name, as_unit=True)
        return
    seen[name] = ConstantRow(
        symbol=unit.symbol,
        name=unit.name,
        value=unit.value,
        uncertainty="exact" if unit.exact else "not given",
        unit=unit.unit,
        source=unit.source,
        as_unit=True,
    )


def written_with_verb(expr: t.Expr | None) -> bool:
    """Whether an expression calls a derivation verb (its result is then worth showing)."""
    if expr is None:
        return False
    return any(isinstance(node, t.Call) and node.func in VERBS for node in t.walk(expr))
