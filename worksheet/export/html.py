"""The HTML export: one self-contained page (inline CSS, no script, no network resource).

All sheet text is escaped; notes go through markdown-it with raw HTML turned off, so a
``<script>`` in a note is shown as text. Plots are inline SVG (no ``id`` attributes, so
several share a page), tables real ``<table>``s.
"""

from __future__ import annotations

from fractions import Fraction
from html import escape

from worksheet import CAUTION
from worksheet.engine.formatting import format_number
from worksheet.engine.sweeps import ScalingExponent
from worksheet.errors import WorksheetError
from worksheet.export.html_math import (
    MINUS,
    expr_html,
    frac_html,
    name_html,
    number_html,
    operator_html,
    tolerance_html,
    unit_html,
    unit_text_html,
    value_html,
)
from worksheet.export.notes import note_parser
from worksheet.export.report import (
    CellItem,
    NoteItem,
    Report,
    Step,
    ValueText,
    outcome_sentence,
    value_text,
    written_with_verb,
)
from worksheet.export.sampled import fraction_html, ranged_html, sampled_html
from worksheet.export.svg_plot import plot_svg
from worksheet.export.sweep_table import (
    SweepTable,
    is_number,
    plot_table,
    result_table,
    split_number,
)
from worksheet.syntax import parse_expression
from worksheet.syntax import tree as t
from worksheet.syntax.unparse import to_text

STYLE = """\
body { font-family: Georgia, 'Times New Roman', serif; max-width: 60rem; margin: 2rem auto;
  padding: 0 1rem; line-height: 1.5; color: #1a1a1a; background: #ffffff; }
h1.title { font-size: 1.8rem; }
.caution { border-left: 0.3rem solid #8a6d00; padding: 0.4rem 0.8rem; background: #fff8e0; }
.provenance { color: #444444; font-size: 0.95rem; }
table { border-collapse: collapse; margin: 0.8rem 0; }
th, td { padding: 0.2rem 0.6rem; vertical-align: middle; text-align: left; }
table.steps td.line, table.claims td.line { color: #555555; font-size: 0.85rem; white-space: nowrap;
  text-align: right; }
table.steps td.math { white-space: nowrap; }
table.claims, table.constants { border-top: 1px solid #333333;
  border-bottom: 1px solid #333333; }
table.claims th, table.constants th { border-bottom: 1px solid #333333; }
table.constants { font-size: 0.9rem; }
.status { font-family: sans-serif; font-size: 0.85rem; font-weight: bold; }
.status-ok .status { color: #1b5e20; }
.status-failed .status, .status-error .status { color: #b00020; }
.status-skipped .status, .status-stale .status { color: #6d4c00; }
.unit { font-style: normal; white-space: nowrap; }
var { font-style: italic; }
.frac { display: inline-flex; flex-direction: column; vertical-align: middle;
  text-align: center; margin: 0 0.15em; }
.frac > .num { border-bottom: 1px solid currentColor; padding: 0 0.2em; }
.frac > .den { padding: 0 0.2em; }
.radicand { border-top: 1px solid currentColor; padding-left: 0.1em; }
pre, code { font-family: 'DejaVu Sans Mono', Menlo, Consolas, monospace; font-size: 0.9rem; }
pre.record { margin: 0.2rem 0; overflow-x: auto; }
figure.plot { margin: 0.4rem 0; }
figure.plot svg { max-width: 100%; height: auto; }
table.sweep { border-top: 1px solid #333333; border-bottom: 1px solid #333333; }
table.sweep th { border-bottom: 1px solid #333333; text-align: right; }
table.sweep td { text-align: right; font-variant-numeric: tabular-nums; }
.note { color: #444444; font-size: 0.85rem; }
table.constants td.number { white-space: nowrap; }
div.wide { max-width: min(56rem, 90vw); overflow-x: auto; }
.math { white-space: nowrap; }
.math .upright var, .math .upright { font-style: normal; }
.math.display { display: block; text-align: center; margin: 0.5rem 0; }
"""


def html_document(report: Report) -> str:
    """The whole page as text, deterministic for a given report."""
    parts = [
        "<!DOCTYPE html>\n",
        '<html lang="en">\n<head>\n<meta charset="utf-8">\n',
        '<meta name="viewport" content="width=device-width, initial-scale=1">\n',
        "<title>" + escape(report.title) + "</title>\n",
        "<style>\n" + STYLE + "</style>\n</head>\n<body>\n<main>\n",
        '<h1 class="title">' + escape(report.title) + "</h1>\n",
        '<p class="caution"><strong>Caution.</strong> ' + escape(CAUTION) + "</p>\n",
        _provenance(report),
    ]
    for item in report.items:
        if isinstance(item, NoteItem):
            parts.append('<div class="prose">\n' + note_parser().render(item.text) + "</div>\n")
        elif isinstance(item, CellItem):
            parts.append(cell_html(item.steps, report.digits))
    parts.append(_claims_table(report))
    parts.append(_constants_table(report))
    parts.append("</main>\n</body>\n</html>\n")
    return "".join(parts)


def _provenance(report: Report) -> str:
    lines = []
    if report.source_name:
        lines.append("Sheet: <code>" + escape(report.source_name) + "</code>.")
    pinned = "" if report.pinned else " (the sheet does not pin its constants; default used)"
    lines.append(
        "Constants: "
        + escape(f"{report.dataset_name} – {report.dataset_title}")
        + escape(pinned)
        + "."
    )
    lines.append(f"Numbers recorded to {report.digits} significant figures.")
    outcome = escape(outcome_sentence(report))
    lines.append(f"<strong>{outcome}</strong>" if report.has_problems else outcome)
    return '<p class="provenance">' + "<br>\n".join(lines) + "</p>\n"


def cell_html(steps: tuple[Step, ...], digits: int) -> str:
    """One calc cell as a table of steps: line, left side, right side, status."""
    rows = [_step_row(step, digits) for step in steps]
    return '<table class="steps">\n' + "".join(rows) + "</table>\n"


def _row_class(step: Step) -> str:
    return f' class="step status-{escape(step.result.status)}"'


def _step_row(step: Step, digits: int) -> str:
    line = f'<td class="line">line {step.source.line}</td>'
    math = step_math_html(step, digits)
    if math is not None:
        left, right, status = math
        if result_note(step):
            status += (
                ("<br>" if status else "") + '<span class="note">' + result_note(step) + "</span>"
            )
        return (
            f'<tr{_row_class(step)}>{line}<td class="math">{left}</td>'
            f'<td class="math">{right}</td><td class="status">{status}</td></tr>\n'
        )
    result = step.result
    body = "<code>" + escape(step.source.text) + "</code>"
    if result.status != "ok" and result.message:
        body += " — " + escape(result.message)
    elif result.kind == "plot" and result.plot is not None:
        body += plot_figure_html(step, digits)
    elif (table := result_table(result, digits)) is not None:
        body += sweep_table_html(table)
    elif drawn := sampled_html(result, f"{step.source.text} (line {step.source.line})"):
        body += drawn
    elif result.record:
        body += '<pre class="record">' + escape(result.record) + "</pre>"
    status = escape(step.status_word) if (result.status != "ok" or step.is_claim) else ""
    return (
        f'<tr{_row_class(step)}>{line}<td colspan="2">{body}</td>'
        f'<td class="status">{status}</td></tr>\n'
    )


def result_note(step: Step) -> str:
    """What the engine noted about a shown value (precision loss, poor uncertainty), escaped."""
    result = step.result
    if result.kind == "scaling" and result.detail:
        local = [e.name for e in result.detail if not isinstance(e.exponent, Fraction)]
        if local:
            return escape(
                "local logarithmic slopes at the fiducial point: not a power law in "
                + ", ".join(local)
            )
    return escape(result.message) if result.status == "ok" and result.message else ""


def plot_figure_html(step: Step, digits: int) -> str:
    """The plot inline as SVG, with its numbers in a table one click away (no script)."""
    data = step.result.plot
    svg = plot_svg(data, f"{step.source.text} (line {step.source.line})", standalone=False)
    return (
        '<figure class="plot">\n'
        + svg
        + "<figcaption><details><summary>The plotted numbers</summary>\n"
        + sweep_table_html(plot_table(data, digits))
        + "</details></figcaption>\n</figure>\n"
    )


def _number_cell(cell: str) -> str:
    if not is_number(cell):
        return escape(cell)
    mantissa, exponent = split_number(cell)
    return value_html(ValueText(mantissa, exponent, None, None, True))


def _header_html(name: str, unit: str) -> str:
    shown = unit_text_html(unit)
    return name_html(name) + (" [" + shown + "]" if shown else "")


def sweep_table_html(table: SweepTable) -> str:
    """A sweep as a real table: typeset names and units, numbers with powers of ten."""
    head = "".join(f"<th>{_header_html(c.name, c.unit)}</th>" for c in table.columns)
    rows = "".join(
        "<tr>" + "".join(f"<td>{_number_cell(cell)}</td>" for cell in row) + "</tr>\n"
        for row in table.rows
    )
    notes = "".join(f'<p class="note">{escape(note)}</p>\n' for note in table.notes)
    table_html = f'<table class="sweep">\n<tr>{head}</tr>\n{rows}</table>\n'
    return f'<div class="wide">\n{table_html}</div>\n{notes}'


def step_math_html(step: Step, digits: int) -> tuple[str, str, str] | None:
    """A step as (left, right, status) HTML, or None when it has no math form."""
    tree, result = step.tree, step.result
    if tree is None or result.status not in ("ok", "failed"):
        return None
    value = value_text(result, digits)
    shown_value = " = " + value_html(value) if value is not None else ""
    if isinstance(tree, t.Definition):
        right = "= " + expr_html(tree.expr)
        if tree.uncertainty is not None:
            right += _uncertainty_html(tree.uncertainty)
        if tree.ranged is not None:
            right += ranged_html(tree.ranged)
        right += _symbolic(step, tree.expr) + shown_value
        return name_html(tree.name), right, ""
    if isinstance(tree, t.Display):
        right = _symbolic(step, tree.expr, always=value is None) + shown_value
        if not right and tree.conversion is not None:
            right = " → " + unit_html(tree.conversion.unit)
        return expr_html(tree.expr), right, ""
    if isinstance(tree, t.Relation):
        params = ", ".join(name_html(p) for p in tree.params)
        return name_html(tree.name) + "(" + params + ")", "= " + expr_html(tree.expr), ""
    if isinstance(tree, t.Declaration):
        return ("[" + name_html(tree.name) + "]", "= " + unit_html(tree.unit), "declared")
    if isinstance(tree, t.Scaling) and result.status == "ok" and result.detail and value:
        return name_html(tree.target), "= " + value_html(value) + _scaling_factors(tree, step), ""
    if isinstance(tree, t.Estimate) and result.status == "ok" and result.symbolic:
        try:
            product = expr_html(parse_expression(result.symbolic))
        except WorksheetError:
            product = "<code>" + escape(result.symbolic) + "</code>"
        inputs = ", ".join(name_html(name) for name in tree.inputs)
        return name_html(tree.name), "∼ " + product + shown_value, "estimate from " + inputs
    if isinstance(tree, t.Check):
        right = operator_html(tree.op) + " " + expr_html(tree.right)
        if tree.absolute_tolerance is not None:
            right += " within " + expr_html(tree.absolute_tolerance)
        elif tree.tolerance is not None:
            right += " within " + tolerance_html(tree.tolerance)
        right += fraction_html(tree)
        status = "claim " + escape(step.status_word)
        if result.status != "ok" and result.message:
            status += ": " + escape(result.message)
        return expr_html(tree.left), right, status
    return None


def _scaling_factors(tree: t.Scaling, step: Step) -> str:
    """``(M / M0)^p`` for each factor of a scaling form, exact exponents as recorded."""
    fiducial = dict(tree.around)
    parts = []
    for item in step.result.detail:
        assert isinstance(item, ScalingExponent)
        power = item.exponent
        if isinstance(power, Fraction):
            shown = "" if power == 1 else "<sup>" + escape(_fraction_text(power)) + "</sup>"
        else:
            shown = "<sup>" + escape(format_number(power, 3).replace("-", MINUS)) + "</sup>"
        ratio = frac_html(name_html(item.name), expr_html(fiducial[item.name]))
        parts.append("(" + ratio + ")" + shown)
    return ' <span class="factors">' + " ".join(parts) + "</span>"


def _fraction_text(power: Fraction) -> str:
    text = (
        str(abs(power.numerator))
        if power.denominator == 1
        else f"{abs(power.numerator)}/{power.denominator}"
    )
    return ("−" if power < 0 else "") + text


def _uncertainty_html(uncertainty: t.Uncertainty) -> str:
    if uncertainty.relative is not None:
        return " ± " + tolerance_html(uncertainty.relative)
    if uncertainty.absolute is not None:
        return " ± " + expr_html(uncertainty.absolute)
    return ""


def _symbolic(step: Step, expr: t.Expr, always: bool = False) -> str:
    symbolic = step.result.symbolic
    if not symbolic or symbolic == to_text(expr) or not (always or written_with_verb(expr)):
        return ""
    try:
        return " = " + expr_html(parse_expression(symbolic))
    except WorksheetError:
        return " = <code>" + escape(symbolic) + "</code>"


def _claims_table(report: Report) -> str:
    claims = report.claims
    if not claims:
        return ""
    held = sum(1 for step in claims if step.result.status == "ok")
    rows = []
    for step in claims:
        detail = ""
        if step.result.status != "ok" and step.result.message:
            detail = " (" + escape(step.result.message) + ")"
        rows.append(
            f'<tr{_row_class(step)}><td class="line">{step.source.line}</td>'
            f"<td><code>{escape(step.source.text)}</code>{detail}</td>"
            f'<td class="status">{escape(step.status_word)}</td></tr>\n'
        )
    return (
        "<h2>Claims</h2>\n"
        f"<p>{held} of {len(claims)} claims hold.</p>\n"
        '<table class="claims">\n<tr><th>Line</th><th>Claim</th><th>Status</th></tr>\n'
        + "".join(rows)
        + "</table>\n"
    )


def _constant_number(text: str) -> str:
    """A dataset number in full, its power of ten typeset, the text as published kept in
    ``<data value>`` for a reader that copies it (``exact`` and words as they are)."""
    if not is_number(text):
        return escape(text)
    return f'<data value="{escape(text)}">{number_html(text)}</data>'


def _constants_table(report: Report) -> str:
    head = (
        "<h2>Constants used</h2>\n<p>Dataset: "
        + escape(f"{report.dataset_name} – {report.dataset_title}")
        + ".</p>\n"
    )
    if not report.constants:
        return head + "<p>The sheet uses no constant of the dataset.</p>\n"
    rows = []
    for row in report.constants:
        symbol = (unit_text_html(row.symbol) + " (unit)") if row.as_unit else name_html(row.symbol)
        rows.append(
            f"<tr><td>{symbol}</td><td>{escape(row.name)}</td>"
            f'<td class="number">{_constant_number(row.value)}</td>'
            f'<td class="number">{_constant_number(row.uncertainty)}</td>'
            f"<td>{unit_text_html(row.unit)}</td>"
            f"<td>{escape(row.source)}</td></tr>\n"
        )
    return (
        head + '<table class="constants">\n<tr><th>Symbol</th><th>Name</th><th>Value</th>'
        "<th>Uncertainty</th><th>Unit</th><th>Source</th></tr>\n" + "".join(rows) + "</table>\n"
    )
