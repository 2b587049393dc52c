"""The named quantities of a run, with where they come from and what reads them."""

from __future__ import annotations

from collections.abc import Mapping, Sequence

from worksheet.app.quantity_row import QuantityRow
from worksheet.engine import SourceStatement, StatementResult
from worksheet.engine.bindings import Binding, Origin
from worksheet.engine.formatting import format_number, format_uncertainty
from worksheet.errors import WorksheetError
from worksheet.syntax import parse_statement
from worksheet.syntax.names import referenced_names


def statement_names(statements: Sequence[SourceStatement]) -> dict[int, frozenset[str]]:
    """The names each statement refers to, by its first line (unparsable lines: none)."""
    names: dict[int, frozenset[str]] = {}
    for source in statements:
        try:
            parsed = parse_statement(source.text, source.line)
        except WorksheetError:
            names[source.line] = frozenset()
            continue
        names[source.line] = frozenset(referenced_names(parsed))
    return names


def _origin_text(binding: Binding) -> str:
    return f"{binding.origin.value}, line {binding.line}"


def dimension_text(binding: Binding) -> str:
    """The dimension's word, or its SI base-unit form when it has no word."""
    return binding.dimension.name().removeprefix("dimension ")


def _recorded(result: StatementResult | None, binding: Binding, digits: int) -> tuple[str, str]:
    if binding.origin is Origin.DECLARED:
        return "(symbol)", ""
    if binding.origin is Origin.RELATION:
        return "(relation)", ""
    if result is not None and result.value is not None:
        return format_number(result.value, digits), result.unit or ""
    if binding.value is not None:
        return format_number(binding.value, digits), binding.dimension.si_unit()
    if result is not None and result.symbolic:
        return result.symbolic, result.unit or ""
    return "(no value)", binding.dimension.si_unit()


def _spread(result: StatementResult | None, binding: Binding) -> str:
    """The uncertainty in the unit the value is shown in (results carry it so)."""
    if result is not None and result.value is not None:
        return format_uncertainty(result.uncertainty) if result.uncertainty else ""
    if binding.uncertainty:
        return format_uncertainty(binding.uncertainty)
    return ""


def quantity_rows(
    bindings: Mapping[str, Binding],
    constants: Mapping[str, Binding],
    dataset: str,
    statements: Sequence[SourceStatement],
    results: Sequence[StatementResult],
    digits: int,
) -> list[QuantityRow]:
    """Sheet quantities in reading order, then the dataset constants the sheet uses."""
    names_of = statement_names(statements)
    result_of = {r.name: r for r in results if r.name is not None and r.status == "ok"}
    defined_on = {name: b.line for name, b in bindings.items() if b.line is not None}

    def read_by(name: str, own_line: int | None) -> tuple[int, ...]:
        return tuple(
            sorted(line for line, used in names_of.items() if name in used and line != own_line)
        )

    rows: list[QuantityRow] = []
    for name, binding in bindings.items():
        value, unit = _recorded(result_of.get(name), binding, digits)

        used = names_of.get(binding.line, frozenset()) if binding.line is not None else frozenset()
        reads = tuple(
            sorted(
                ((n, defined_on[n]) for n in used if n in defined_on and n != name),
                key=lambda item: item[1],
            )
        )
        result = result_of.get(name)
        rows.append(
            QuantityRow(
                name,
                value,
                unit,
                dimension_text(binding),
                _origin_text(binding),
                binding.line,
                reads,
                read_by(name, binding.line),
                _spread(result, binding),
            )
        )
    used_constants = sorted(
        {n for used in names_of.values() for n in used if n in constants and n not in bindings}
    )
    for name in used_constants:
        binding = constants[name]
        value = format_number(binding.value, digits) if binding.value is not None else "(none)"
        spread = (
            format_uncertainty(binding.uncertainty)
            if binding.uncertainty
            else "exact"
            if binding.value is not None
            else ""
        )
        rows.append(
            QuantityRow(
                name,
                value,
                binding.dimension.si_unit(),
                dimension_text(binding),
                f"constant, {dataset}",
                None,
                (),
                read_by(name, None),
                spread,
                binding.source,
            )
        )
    return rows
