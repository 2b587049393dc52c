"""The Markdown report: the sheet's notes as written, each step with what it recorded, the
claims and the constants used, in plain CommonMark with pipe tables.

A plot keeps its text chart (a fenced block), so the report stays one self-contained file;
``worksheet export --to svg`` writes pictures to put beside it. A sweep table becomes a
pipe table inside its step's list item."""

from __future__ import annotations

import re

from worksheet import CAUTION
from worksheet.export.report import CellItem, NoteItem, Report, Step, outcome_sentence
from worksheet.export.sampled import sampled_markdown
from worksheet.export.sweep_table import SweepTable, result_table

_SPECIAL = re.compile(r"([\\`*_{}\[\]<>#|!~&])")
_BACKTICKS = re.compile(r"`+")


def escape_markdown(text: str) -> str:
    """Inline text with every Markdown-active character backslash-escaped.

    >>> escape_markdown("T_H < 1e11 [K] & *x*")
    'T\\\\_H \\\\< 1e11 \\\\[K\\\\] \\\\& \\\\*x\\\\*'
    """
    return _SPECIAL.sub(r"\\\1", text.replace("\n", " "))


def code_span(text: str) -> str:
    """Text as a code span whose fence is longer than any backtick run inside it."""
    text = text.replace("\n", " ")
    longest = max((len(run) for run in _BACKTICKS.findall(text)), default=0)
    fence = "`" * (longest + 1)
    if text.startswith(("`", " ")) or text.endswith(("`", " ")):
        text = f" {text} "
    return fence + text + fence


def _cell(text: str) -> str:
    """Escaped text for a pipe-table cell."""
    return escape_markdown(text)


def _code_cell(text: str) -> str:
    return code_span(text).replace("|", "\\|")


def markdown_document(report: Report) -> str:
    """The whole report as Markdown text, deterministic for a given report."""
    parts = [
        "# " + escape_markdown(report.title) + "\n",
        "> **Caution.** " + escape_markdown(CAUTION) + "\n",
        _provenance(report),
    ]
    for item in report.items:
        if isinstance(item, NoteItem):
            parts.append(item.text.strip("\r\n") + "\n")
        elif isinstance(item, CellItem):
            parts.append(cell_markdown(item.steps, report.digits))
    parts.append(_claims_table(report))
    parts.append(_constants_table(report))
    return "\n".join(part for part in parts if part)


def _provenance(report: Report) -> str:
    lines = []
    if report.source_name:
        lines.append("Sheet: " + code_span(report.source_name) + ".")
    pinned = "" if report.pinned else " (the sheet does not pin its constants; default used)"
    lines.append(
        "Constants: "
        + escape_markdown(f"{report.dataset_name} – {report.dataset_title}{pinned}")
        + "."
    )
    lines.append(f"Numbers recorded to {report.digits} significant figures.")
    outcome = escape_markdown(outcome_sentence(report))
    lines.append(f"**{outcome}**" if report.has_problems else outcome)
    return "  \n".join(lines) + "\n"


def cell_markdown(steps: tuple[Step, ...], digits: int) -> str:
    """One calc cell as a list: each statement as written, then what it recorded."""
    if not steps:
        return ""
    return "".join(step_markdown(step, digits) for step in steps)


def step_markdown(step: Step, digits: int) -> str:
    result = step.result
    head = f"- line {step.source.line}: {code_span(step.source.text)}"
    if result.status != "ok":
        message = f": {escape_markdown(result.message)}" if result.message else ""
        return f"{head} — **{step.status_word}**{message}\n"
    if step.is_claim:
        return f"{head} — **{step.status_word}**\n"
    lines = result.record.split("\n") if result.record else []
    if not lines:
        return head + "\n"
    if result.kind in ("plot", "histogram"):
        return f"{head} →\n\n{_fenced(lines[1:])}\n"
    if (drawn := sampled_markdown(result)) is not None:
        return f"{head} →\n\n{drawn}\n"
    if (table := result_table(result, digits)) is not None:
        return f"{head} →\n\n{sweep_table_markdown(table)}\n"
    if len(lines) == 1:
        return f"{head} → {code_span(lines[0])}\n"
    block = "".join("      " + line + "\n" for line in lines)
    return f"{head} →\n\n{block}\n"


def _fenced(lines: list[str], indent: str = "  ") -> str:
    """A text chart as a fenced block inside the list item (a longer fence than any inside)."""
    longest = max((len(run) for line in lines for run in _BACKTICKS.findall(line)), default=0)
    fence = "`" * max(3, longest + 1)
    body = "".join(indent + line + "\n" if line else "\n" for line in lines)
    return f"{indent}{fence}text\n{body}{indent}{fence}\n"


def sweep_table_markdown(table: SweepTable, indent: str = "  ") -> str:
    """A sweep as a pipe table inside the list item, numbers right-aligned."""
    head = " | ".join(
        _code_cell(c.name) + (" \\[" + _cell(c.unit) + "\\]" if c.unit else "")
        for c in table.columns
    )
    rule = "|".join("---:" for _ in table.columns)
    rows = "".join(
        indent + "| " + " | ".join(_cell(cell) for cell in row) + " |\n" for row in table.rows
    )
    notes = "".join(f"\n{indent}{escape_markdown(note)}\n" for note in table.notes)
    return f"{indent}| {head} |\n{indent}|{rule}|\n{rows}{notes}"


def _claims_table(report: Report) -> str:
    claims = report.claims
    if not claims:
        return ""
    held = sum(1 for step in claims if step.result.status == "ok")
    rows = []
    for step in claims:
        detail = ""
        if step.result.status != "ok" and step.result.message:
            detail = " (" + _cell(step.result.message) + ")"
        rows.append(
            f"| {step.source.line} | {_code_cell(step.source.text)}{detail} | "
            f"{step.status_word} |\n"
        )
    return (
        f"## Claims\n\n{held} of {len(claims)} claims hold.\n\n"
        "| Line | Claim | Status |\n|---:|---|---|\n" + "".join(rows)
    )


def _constants_table(report: Report) -> str:
    head = (
        "## Constants used\n\nDataset: "
        + escape_markdown(f"{report.dataset_name} – {report.dataset_title}")
        + ".\n"
    )
    if not report.constants:
        return head + "\nThe sheet uses no constant of the dataset.\n"
    rows = []
    for row in report.constants:
        symbol = _code_cell(row.symbol) + (" (unit)" if row.as_unit else "")
        rows.append(
            f"| {symbol} | {_cell(row.name)} | {_cell(row.value)} | "
            f"{_cell(row.uncertainty)} | {_code_cell(row.unit)} | {_cell(row.source)} |\n"
        )
    return (
        head + "\n| Symbol | Name | Value | Uncertainty | Unit | Source |\n"
        "|---|---|---|---|---|---|\n" + "".join(rows)
    )
