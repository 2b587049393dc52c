"""The LaTeX export: a fragment, or a standalone article with amsmath and siunitx v3.

Each calc cell is a list whose labels are the sheet's line numbers (a narrow margin, so a
number never pushes the text off the page); each statement is typeset from its tree (as
written) and its value from the structured result, in text-style math that TeX may break
after a relation when it is too long for the line. ``scaling`` and ``estimate`` are
typeset as formulas, engine notes (natural and Planck views, precision) with their
expressions as math. Tables become ``tabular``, plots pgfplots (loaded only when the sheet
has one); the claims and constants tables are ``longtable``s whose text columns wrap, and
long numbers may break between digit groups. Deterministic byte for byte (no dates, no
paths).
"""

from __future__ import annotations

from fractions import Fraction

from worksheet import CAUTION
from worksheet.engine.formatting import format_number
from worksheet.engine.sweeps import ScalingExponent
from worksheet.errors import WorksheetError
from worksheet.export.latex_math import (
    breakable_num,
    expr_latex,
    name_latex,
    operator_latex,
    tolerance_latex,
    value_latex,
)
from worksheet.export.latex_messages import message_latex
from worksheet.export.latex_notes import note_latex
from worksheet.export.latex_text import escape_code, escape_text, texttt
from worksheet.export.latex_units import unit_latex, unit_text_latex
from worksheet.export.pgf_plot import PACKAGES as PLOT_PACKAGES
from worksheet.export.pgf_plot import plot_pgfplots, title_latex
from worksheet.export.report import (
    CellItem,
    NoteItem,
    Report,
    Step,
    outcome_sentence,
    value_text,
    written_with_verb,
)
from worksheet.export.sampled import fraction_latex, ranged_latex, sampled_latex
from worksheet.export.sweep_table import (
    Column,
    SweepTable,
    is_number,
    result_table,
    split_number,
)
from worksheet.syntax import parse_expression
from worksheet.syntax import tree as t
from worksheet.syntax.unparse import to_text

PACKAGES = ("amsmath", "amssymb", "siunitx", "array", "longtable")
PREAMBLE = "\\documentclass{article}\n\\usepackage[T1]{fontenc}\n" + "".join(
    f"\\usepackage{{{p}}}\n" for p in PACKAGES
)
FRAGMENT_HEADER = (
    "% worksheet export; needs \\usepackage{" + ",".join(PACKAGES) + "} (siunitx v3)\n"
)
PLOT_FRAGMENT_HEADER = FRAGMENT_HEADER + (
    "% and, for its plots, \\usepackage{pgfplots}\\pgfplotsset{compat=1.16}\n"
)
STEPS_OPEN = (
    "\\begin{list}{}{\\setlength{\\leftmargin}{3em}\\setlength{\\labelwidth}{2.4em}"
    "\\setlength{\\labelsep}{0.6em}\\setlength{\\itemsep}{0.5ex}"
    "\\setlength{\\parsep}{0.3ex}\\setlength{\\topsep}{1ex}}\\raggedright\n"
)
"""A calc cell: a list labelled with line numbers, ragged right so broken lines stay even."""
STEPS_CLOSE = "\\end{list}\n\n"


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
        + "\\par}\n\\bigskip\n\n"
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
    outcome = outcome_sentence(report)
    lines.append(("\\textbf{" + escape_text(outcome) + "}") if report.has_problems else outcome)
    return "\\noindent " + "\\\\\n".join(lines) + "\n\n"


def cell_latex(steps: tuple[Step, ...], digits: int) -> str:
    """One calc cell as a list of its steps, each labelled with its line number."""
    if not steps:
        return ""
    items = [
        f"\\item[{{\\footnotesize {step.source.line}}}] " + step_latex(step, digits)
        for step in steps
    ]
    return STEPS_OPEN + "\n".join(items) + "\n" + STEPS_CLOSE


def step_latex(step: Step, digits: int) -> str:
    """A step as typeset math with its value, or as sheet text with what it recorded."""
    math = step_math(step, digits)
    if math is None:
        return step_text(step, digits)
    note = _note(step)
    return math + ("\\newline\n" + note if note else "")


def _note(step: Step) -> str:
    """What the engine noted about a value shown as math (a view's factor, precision)."""
    result = step.result
    if result.status == "ok" and result.message and result.kind != "estimate":
        return "\\emph{" + message_latex(result.message) + "}"
    return ""


def _math(text: str) -> str:
    return "\\(\\displaystyle " + text + "\\)"


def step_math(step: Step, digits: int) -> str | None:
    """A step as one formula (TeX may break it after a relation), or None without a form."""
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
        return _math(name_latex(tree.name) + " " + right)
    if isinstance(tree, t.Display):
        right = _symbolic(step, tree.expr, always=value is None) + shown_value
        if not right:
            right = "" if tree.conversion is None else " \\to " + unit_latex(tree.conversion.unit)
        return _math(expr_latex(tree.expr) + right)
    if isinstance(tree, t.Relation):
        params = ",\\,".join(name_latex(p) for p in tree.params)
        left = name_latex(tree.name) + "(" + params + ")"
        return _math(left + " = " + expr_latex(tree.expr))
    if isinstance(tree, t.Declaration):
        return _math("[" + name_latex(tree.name) + "] = " + unit_latex(tree.unit)) + (
            " \\quad declared without a value"
        )
    if isinstance(tree, t.Check):
        return _check_math(step, tree)
    if isinstance(tree, t.Scaling) and result.status == "ok":
        return _scaling_math(step, tree, digits)
    if isinstance(tree, t.Estimate) and result.status == "ok" and result.symbolic:
        return _estimate_math(step, tree, digits)
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
        # Not in the sheet's syntax: as text, out of math so that it may break.
        return " = \\) " + texttt(symbolic, keep_spaces=False) + " \\(\\displaystyle "


def _check_math(step: Step, tree: t.Check) -> str:
    right = operator_latex(tree.op) + " " + expr_latex(tree.right)
    if tree.absolute_tolerance is not None:
        right += "\\quad\\text{within }" + expr_latex(tree.absolute_tolerance)
    elif tree.tolerance is not None:
        right += "\\quad\\text{within }" + tolerance_latex(tree.tolerance)
    right += fraction_latex(tree)
    text = _math(expr_latex(tree.left) + " " + right)
    text += " \\hfill\\mbox{claim: \\textbf{" + escape_text(step.status_word) + "}}"
    if step.result.status != "ok" and step.result.message:
        text += "\\newline\n" + message_latex(step.result.message)
    return text


def _exponent_latex(exponent: Fraction | float) -> str:
    if isinstance(exponent, Fraction):
        if exponent.denominator == 1:
            return str(exponent.numerator)
        return f"{exponent.numerator}/{exponent.denominator}"
    return format_number(exponent, 3)


def _scaling_math(step: Step, tree: t.Scaling, digits: int) -> str | None:
    """``X = X_0 (M / M_0)^p``: the value at the fiducial point, the exact exponents."""
    value = value_text(step.result, digits)
    exponents = step.result.detail
    if value is None or exponents is None:
        return None
    fiducial = dict(tree.around)
    parts = []
    local = []
    for item in exponents:
        assert isinstance(item, ScalingExponent)
        ratio = (
            "\\left(\\frac{"
            + name_latex(item.name)
            + "}{"
            + expr_latex(fiducial[item.name])
            + "}\\right)"
        )
        power = _exponent_latex(item.exponent)
        parts.append(ratio + ("" if power == "1" else "^{" + power + "}"))
        if not isinstance(item.exponent, Fraction):
            local.append(item.name)
    formula = (
        name_latex(tree.target) + " = " + value_latex(value) + "".join("\\," + p for p in parts)
    )
    text = _math(formula)
    if local:
        names = ", ".join("\\(" + name_latex(n) + "\\)" for n in local)
        text += (
            "\\newline\n\\emph{local logarithmic slopes at the fiducial point: "
            "not a power law in " + names + "}"
        )
    return text


def _estimate_math(step: Step, tree: t.Estimate, digits: int) -> str:
    """``X ~ product of powers = value``, with the caveat that a pure factor is unknown."""
    symbolic = step.result.symbolic or ""
    try:
        product = expr_latex(parse_expression(symbolic))
    except WorksheetError:
        product = texttt(symbolic, keep_spaces=False)
    value = value_text(step.result, digits)
    shown = " = " + value_latex(value) if value is not None else ""
    inputs = ", ".join("\\(" + name_latex(name) + "\\)" for name in tree.inputs)
    text = _math(name_latex(tree.name) + " \\sim " + product + shown)
    caveat = message_latex(step.result.message) if step.result.message else ""
    text += "\\newline\n\\emph{estimate from " + inputs + (", " + caveat if caveat else "") + "}"
    return text


def step_text(step: Step, digits: int) -> str:
    """A step shown as sheet text: the statement, its status and what it computed."""
    result = step.result
    head = texttt(step.source.text, keep_spaces=False)
    if result.kind == "check" or result.status != "ok":
        head += " --- \\textbf{" + escape_text(step.status_word) + "}"
    if result.status != "ok" and result.message:
        return head + ": " + escape_text(result.message) + "\n"
    if result.kind == "plot" and result.plot is not None:
        return head + "\n" + plot_pgfplots(result.plot)
    if (drawn := sampled_latex(result)) is not None:
        return head + "\n" + drawn
    table = result_table(result, digits)
    if table is not None:
        return head + "\n" + sweep_table_latex(table)
    if result.kind == "use" and result.imported:
        return head + "\\newline\n" + digest_latex(result.imported["sha256"]) + "\n"
    if result.message:  # an estimate that is not unique: the free groups, as its note says
        return head + "\\newline\n" + message_latex(result.message) + "\n"
    if result.record:
        return (
            head
            + "\\newline\n"
            + texttt(result.record.replace("\n", " "), keep_spaces=False)
            + "\n"
        )
    return head + "\n"


DIGEST_GROUP = 8
"""Hex digits between the break points of a typeset digest."""


def digest_latex(digest: str) -> str:
    """A used sheet's sha256 in small monospace, every digit kept, breakable between groups
    of eight (64 digits in one piece run past the line).

    >>> digest_latex("0123456789abcdef01")
    '{\\\\footnotesize sha256 \\\\texttt{01234567\\\\allowbreak{}89abcdef\\\\allowbreak{}01}}'
    """
    groups = [digest[i : i + DIGEST_GROUP] for i in range(0, len(digest), DIGEST_GROUP)]
    return (
        "{\\footnotesize sha256 \\texttt{"
        + "\\allowbreak{}".join(escape_code(group) for group in groups)
        + "}}"
    )


def _cell_latex(cell: str) -> str:
    return breakable_num(cell) if is_number(cell) else texttt(cell)


TABLE_WIDTH_EM = 34.0
"""What a sweep's columns may take, in em of the table's small type (the line is ~39 em)."""


def _cell_width_em(cell: str) -> float:
    """A rough width of a cell as typeset (digits 0.5 em; an exponent adds x 10^n)."""
    mantissa, exponent = split_number(cell)
    width = 0.5 * len(mantissa)
    return width + (2.2 + 0.35 * len(str(exponent)) if exponent is not None else 0.0)


def _header_width_em(column: Column) -> float:
    return 0.55 * len(column.name) + (0.5 * len(column.unit) + 1.2 if column.unit else 0.0)


def column_groups(table: SweepTable) -> list[list[int]]:
    """Columns in groups that fit the line, each group after the swept column (which every
    group repeats), so a wide table becomes several tables instead of running off the page."""
    widths = [
        max([_header_width_em(column)] + [_cell_width_em(row[i]) for row in table.rows]) + 0.8
        for i, column in enumerate(table.columns)
    ]
    groups: list[list[int]] = []
    current: list[int] = []
    used = widths[0]
    for index in range(1, len(table.columns)):
        if current and used + widths[index] > TABLE_WIDTH_EM:
            groups.append(current)
            current, used = [], widths[0]
        current.append(index)
        used += widths[index]
    groups.append(current)
    return [[0, *group] for group in groups]


def sweep_table_latex(table: SweepTable) -> str:
    """A sweep as real tables: names and units typeset, numbers right-aligned; a
    ``longtable`` (so a long sweep continues on the next page, its header repeated),
    split into column groups when it is wider than the line."""
    parts = []
    for group in column_groups(table):
        head = " & ".join(title_latex(table.columns[i].name, table.columns[i].unit) for i in group)
        rows = [" & ".join(_cell_latex(row[i]) for i in group) + " \\\\" for row in table.rows]
        parts.append(
            "{\\small\\setlength{\\tabcolsep}{0.4em}\\begin{longtable}{"
            + "r" * len(group)
            + "}\n\\hline\n"
            + head
            + " \\\\\n\\hline\n\\endhead\n\\hline\n\\endfoot\n"
            + "\n".join(rows)
            + "\n\\end{longtable}}\n"
        )
    notes = "".join("\\par " + escape_text(note) + "\n" for note in table.notes)
    return "".join(parts) + notes


def _claims_table(report: Report) -> str:
    claims = report.claims
    if not claims:
        return ""
    rows = []
    for step in claims:
        detail = step.result.message or ""
        text = texttt(step.source.text, keep_spaces=False)
        if detail and step.result.status != "ok":
            text += " (" + message_latex(detail) + ")"
        rows.append(f"{step.source.line} & {text} & {escape_text(step.status_word)} \\\\")
    held = sum(1 for step in claims if step.result.status == "ok")
    return (
        "\\section*{Claims}\n\n"
        f"{held} of {len(claims)} claims hold.\n\n"
        "\\begin{longtable}{@{}>{\\raggedleft}p{2.4em}"
        ">{\\raggedright}p{\\dimexpr\\linewidth-7.4em-4\\tabcolsep\\relax}"
        ">{\\raggedright\\arraybackslash}p{5em}@{}}\n\\hline\n"
        "Line & Claim & Status \\\\\n\\hline\n\\endhead\n"
        + "\n".join(rows)
        + "\n\\hline\n\\end{longtable}\n\n"
    )


def _constant_number(text: str) -> str:
    return breakable_num(text) if _is_number(text) else escape_text(text)


def _constants_table(report: Report) -> str:
    head = (
        "\\section*{Constants used}\n\n"
        "Dataset: " + escape_text(report.dataset_name + " -- " + report.dataset_title) + ".\n\n"
    )
    if not report.constants:
        return head + "\\noindent The sheet uses no constant of the dataset.\n\n"
    rows = []
    for row in report.constants:
        if row.as_unit:
            symbol = "\\(" + unit_text_latex(row.symbol) + "\\) (unit)"
        else:
            symbol = "\\(" + name_latex(row.symbol) + "\\)"
        unit = unit_text_latex(row.unit)
        value = _constant_number(row.value) + ("\\ \\(" + unit + "\\)" if unit else "")
        uncertainty = (
            "exact"
            if row.uncertainty == "exact"
            else "\\(\\pm\\)\\," + _constant_number(row.uncertainty)
        )
        name = escape_text(row.name) + "\\newline{\\footnotesize " + escape_text(row.source) + "}"
        rows.append(f"{symbol} & {name} & {value}\\newline {uncertainty} \\\\")
    return (
        head + "{\\small\\begin{longtable}{@{}>{\\raggedright}p{4.6em}"
        ">{\\raggedright}p{\\dimexpr0.52\\linewidth-4.6em-2\\tabcolsep\\relax}"
        ">{\\raggedright\\arraybackslash}p{\\dimexpr0.48\\linewidth-2\\tabcolsep\\relax}@{}}\n"
        "\\hline\nSymbol & Name and source & Value and standard uncertainty \\\\\n"
        "\\hline\n\\endhead\n" + "\n".join(rows) + "\n\\hline\n\\end{longtable}}\n\n"
    )


def _is_number(text: str) -> bool:
    try:
        float(text)
    except ValueError:
        return False
    return True
