"""The LaTeX export: a fragment, or a standalone article with amsmath and siunitx v3.

Each calc statement is typeset from its tree (as written), then its recorded value; steps
that cannot be typeset (errors, skipped, kinds without a math form) are shown as sheet text
with their record. Plots are drawn with pgfplots from their data (loaded only when the
sheet has one), tables become ``tabular``. Output is deterministic byte for byte (no dates,
no paths).
"""

from __future__ import annotations

from dataclasses import dataclass

from worksheet import CAUTION
from worksheet.errors import WorksheetError
from worksheet.export.latex_math import (
    expr_latex,
    name_latex,
    operator_latex,
    tolerance_latex,
    value_latex,
)
from worksheet.export.latex_notes import code_lines_latex, note_latex
from worksheet.export.latex_text import escape_text, texttt
from worksheet.export.latex_units import unit_latex, unit_text_latex
from worksheet.export.pgf_plot import PACKAGES as PLOT_PACKAGES
from worksheet.export.pgf_plot import plot_pgfplots, title_latex
from worksheet.export.report import (
    CellItem,
    NoteItem,
    Report,
    Step,
    value_text,
    written_with_verb,
)
from worksheet.export.sampled import fraction_latex, ranged_latex, sampled_latex
from worksheet.export.sweep_table import SweepTable, is_number, read_table_record
from worksheet.syntax import parse_expression
from worksheet.syntax import tree as t
from worksheet.syntax.unparse import to_text

PREAMBLE = (
    "\\documentclass{article}\n"
    "\\usepackage[T1]{fontenc}\n"
    "\\usepackage{amsmath}\n"
    "\\usepackage{amssymb}\n"
    "\\usepackage{siunitx}\n"
)
FRAGMENT_HEADER = "% worksheet export; needs \\usepackage{amsmath,amssymb,siunitx} (siunitx v3)\n"
PLOT_FRAGMENT_HEADER = (
    "% worksheet export; needs \\usepackage{amsmath,amssymb,siunitx} (siunitx v3)\n"
    "% and, for its plots, \\usepackage{pgfplots}\\pgfplotsset{compat=1.16}\n"
)


@dataclass(frozen=True)
class _MathLine:
    left: str
    right: str  # starts with the relation, e.g. "= ..."
    note: str  # text for the annotation column


def latex_document(report: Report, standalone: bool = True) -> str:
    """The whole export as LaTeX source."""
    body = latex_body(report)
    plots = has_plots(report)
    if not standalone:
        return (PLOT_FRAGMENT_HEADER if plots else FRAGMENT_HEADER) + body
    return (
        PREAMBLE
        + (PLOT_PACKAGES if plots else "")
        + "\\begin{document}\n\n"
        + "{\\centering\\LARGE "
        + escape_text(report.title)
        + "\\par}\n\n"
        + "\\noindent\\textbf{Caution.} "
        + escape_text(CAUTION)
        + "\n\n"
        + body
        + "\\end{document}\n"
    )


def has_plots(report: Report) -> bool:
    """Whether pgfplots is needed (only then is it loaded, so other sheets need no more)."""
    return any(
        (step.result.plot is not None or step.result.kind == "histogram")
        and step.result.status == "ok"
        for step in report.steps
    )


def latex_body(report: Report) -> str:
    parts = [_provenance(report)]
    for item in report.items:
        if isinstance(item, NoteItem):
            parts.append(note_latex(item.text) + "\n")
        elif isinstance(item, CellItem):
            parts.append(cell_latex(item.steps, report.digits))
    parts.append(_claims_table(report))
    parts.append(_constants_table(report))
    return "".join(parts)


def _provenance(report: Report) -> str:
    lines = []
    if report.source_name:
        lines.append("Sheet: " + texttt(report.source_name, keep_spaces=False) + ".")
    pinned = "" if report.pinned else " (the sheet does not pin its constants; default used)"
    lines.append(
        "Constants: "
        + escape_text(report.dataset_name + " -- " + report.dataset_title)
        + escape_text(pinned)
        + "."
    )
    lines.append(f"Numbers recorded to {report.digits} significant figures.")
    return "\\noindent " + "\\\\\n".join(lines) + "\n\n"


def cell_latex(steps: tuple[Step, ...], digits: int) -> str:
    """One calc cell: runs of typeset steps in ``align*``, other steps as text between."""
    out: list[str] = []
    pending: list[_MathLine] = []
    notes: list[Step] = []
    for step in steps:
        line = step_math(step, digits)
        if line is not None:
            pending.append(line)
            if step.result.status == "ok" and step.result.message:
                notes.append(step)
            continue
        out.append(_align(pending) + _notes(notes))
        pending, notes = [], []
        out.append(step_text(step))
    out.append(_align(pending) + _notes(notes))
    return "".join(out)


def _notes(steps: list[Step]) -> str:
    """What the engine noted about results shown as equations (precision loss, ...)."""
    return "".join(
        f"\\noindent\\emph{{Line {step.source.line}:}} "
        + escape_text(step.result.message or "")
        + "\n\n"
        for step in steps
    )


def _align(lines: list[_MathLine]) -> str:
    if not lines:
        return ""
    rows = [f"  {line.left} &{line.right} && \\text{{{line.note}}}" for line in lines]
    return "\\begin{align*}\n" + " \\\\\n".join(rows) + "\n\\end{align*}\n\n"


def _where(step: Step) -> str:
    return f"line {step.source.line}"


def step_math(step: Step, digits: int) -> _MathLine | None:
    """A step as one aligned equation, or None when it has no math form."""
    tree, result = step.tree, step.result
    if tree is None or result.status not in ("ok", "failed"):
        return None
    value = value_text(result, digits)
    shown_value = f" = {value_latex(value)}" if value is not None else ""
    if isinstance(tree, t.Definition):
        right = "= " + expr_latex(tree.expr)
        if tree.uncertainty is not None:
            right += _uncertainty_latex(tree.uncertainty)
        if tree.ranged is not None:
            right += ranged_latex(tree.ranged)
        right += _symbolic(step, tree.expr) + shown_value
        return _MathLine(name_latex(tree.name), right, _where(step))
    if isinstance(tree, t.Display):
        right = _symbolic(step, tree.expr, always=value is None) + shown_value
        if not right:
            right = "" if tree.conversion is None else " \\to " + unit_latex(tree.conversion.unit)
        return _MathLine(expr_latex(tree.expr), right, _where(step))
    if isinstance(tree, t.Relation):
        params = ",\\,".join(name_latex(p) for p in tree.params)
        left = name_latex(tree.name) + "\\left(" + params + "\\right)"
        return _MathLine(left, "= " + expr_latex(tree.expr), _where(step))
    if isinstance(tree, t.Declaration):
        unit = unit_latex(tree.unit)
        return _MathLine(
            "\\left[" + name_latex(tree.name) + "\\right]",
            "= " + unit,
            _where(step) + ", declared without a value",
        )
    if isinstance(tree, t.Check):
        return _check_math(step, tree)
    return None


def _uncertainty_latex(uncertainty: t.Uncertainty) -> str:
    if uncertainty.relative is not None:
        return " \\pm " + tolerance_latex(uncertainty.relative)
    if uncertainty.absolute is not None:
        return " \\pm " + expr_latex(uncertainty.absolute)
    return ""


def _symbolic(step: Step, expr: t.Expr, always: bool = False) -> str:
    """The symbolic form the engine produced, when a derivation verb made it (or ``always``).

    Nothing when it reads the same as the expression written.
    """
    symbolic = step.result.symbolic
    if not symbolic or symbolic == to_text(expr) or not (always or written_with_verb(expr)):
        return ""
    try:
        return " = " + expr_latex(parse_expression(symbolic))
    except WorksheetError:
        return " = " + texttt(symbolic)


def _check_math(step: Step, tree: t.Check) -> _MathLine:
    right = operator_latex(tree.op) + " " + expr_latex(tree.right)
    if tree.absolute_tolerance is not None:
        right += "\\quad\\text{within }" + expr_latex(tree.absolute_tolerance)
    elif tree.tolerance is not None:
        right += "\\quad\\text{within }" + tolerance_latex(tree.tolerance)
    right += fraction_latex(tree)
    note = f"claim, {_where(step)}: {step.status_word}"
    return _MathLine(expr_latex(tree.left), right, note)


def step_text(step: Step) -> str:
    """A step shown as sheet text: the statement, its status and what was recorded."""
    result = step.result
    head = f"\\noindent Line {step.source.line}: " + texttt(step.source.text, keep_spaces=False)
    if result.kind == "check" or result.status != "ok":
        head += " --- \\textbf{" + escape_text(step.status_word) + "}"
    lines = result.record.split("\n") if result.record else []
    if result.status != "ok" and result.message:
        return head + ": " + escape_text(result.message) + "\n\n"
    if not lines:
        return head + "\n\n"
    if result.kind == "plot" and result.plot is not None:
        return head + "\n" + plot_pgfplots(result.plot)
    if result.kind == "table":
        table = read_table_record(result.record)
        if table is not None:
            return head + "\n" + sweep_table_latex(table)
    if (drawn := sampled_latex(result)) is not None:
        return head + "\n" + drawn
    if len(lines) == 1:
        # One line (scaling, estimate, ...): breakable at spaces, so it stays on the page.
        return head + "\\\\\n" + texttt(lines[0], keep_spaces=False) + "\n\n"
    return head + "\n" + code_lines_latex(lines)


def _cell_latex(cell: str) -> str:
    return "\\num{" + cell + "}" if is_number(cell) else texttt(cell)


def sweep_table_latex(table: SweepTable) -> str:
    """A sweep as a real ``tabular``: names and units typeset, numbers right-aligned."""
    head = " & ".join(title_latex(c.name, c.unit) for c in table.columns) + " \\\\"
    rows = [" & ".join(_cell_latex(cell) for cell in row) + " \\\\" for row in table.rows]
    notes = "".join(escape_text(note) + "\n\n" for note in table.notes)
    return (
        "\\begin{center}\n\\begin{tabular}{"
        + "r" * len(table.columns)
        + "}\n\\hline\n"
        + head
        + "\n\\hline\n"
        + "\n".join(rows)
        + "\n\\hline\n\\end{tabular}\n\\end{center}\n\n"
        + notes
    )


def _claims_table(report: Report) -> str:
    claims = report.claims
    if not claims:
        return ""
    rows = []
    for step in claims:
        detail = step.result.message or ""
        text = texttt(step.source.text, keep_spaces=False)
        if detail and step.result.status != "ok":
            text += " (" + escape_text(detail) + ")"
        rows.append(f"{step.source.line} & {text} & {escape_text(step.status_word)} \\\\")
    held = sum(1 for step in claims if step.result.status == "ok")
    return (
        "\\section*{Claims}\n\n"
        f"{held} of {len(claims)} claims hold.\n\n"
        "\\noindent\\begin{tabular}{r p{0.7\\linewidth} l}\n\\hline\n"
        "Line & Claim & Status \\\\\n\\hline\n" + "\n".join(rows) + "\n\\hline\n\\end{tabular}\n\n"
    )


def _constants_table(report: Report) -> str:
    head = (
        "\\section*{Constants used}\n\n"
        "Dataset: " + escape_text(report.dataset_name + " -- " + report.dataset_title) + ".\n\n"
    )
    if not report.constants:
        return head + "The sheet uses no constant of the dataset.\n\n"
    rows = []
    for row in report.constants:
        if row.as_unit:
            symbol = "\\(" + unit_text_latex(row.symbol) + "\\) (unit)"
        else:
            symbol = "\\(" + name_latex(row.symbol) + "\\)"
        uncertainty = (
            "exact"
            if row.uncertainty == "exact"
            else "\\num{" + row.uncertainty + "}"
            if _is_number(row.uncertainty)
            else escape_text(row.uncertainty)
        )
        unit = unit_text_latex(row.unit)
        rows.append(
            " & ".join(
                (
                    symbol,
                    escape_text(row.name),
                    "\\num{" + row.value + "}",
                    uncertainty,
                    "\\(" + unit + "\\)" if unit else "",
                    escape_text(row.source),
                )
            )
            + " \\\\"
        )
    return (
        head + "\\noindent{\\small\\begin{tabular}{l p{0.2\\linewidth} l l l p{0.22\\linewidth}}\n"
        "\\hline\nSymbol & Name & Value & Uncertainty & Unit & Source \\\\\n\\hline\n"
        + "\n".join(rows)
        + "\n\\hline\n\\end{tabular}}\n\n"
    )


def _is_number(text: str) -> bool:
    try:
        float(text)
    except ValueError:
        return False
    return True
