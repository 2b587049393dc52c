"""Sampled quantities in the exports: ranged inputs as written, histograms, variance tables.

Everything here is drawn from the engine's structured results (``HistogramData``,
``VarianceBudget``), never from the recorded text. The SVG and pgfplots writers follow the
plot writers' rules: fixed order, fixed number formats, nothing fetched.
"""

from __future__ import annotations

import math
from fractions import Fraction
from xml.sax.saxutils import escape

from worksheet.engine.distributions import HistogramData
from worksheet.engine.formatting import format_number
from worksheet.engine.results import StatementResult
from worksheet.engine.sampling import VarianceBudget
from worksheet.export.html_math import expr_html, name_html
from worksheet.export.latex_math import expr_latex, name_latex
from worksheet.export.latex_text import escape_text
from worksheet.export.pgf_plot import title_latex
from worksheet.export.plot_style import style
from worksheet.syntax import tree as t

SAMPLED_KINDS = ("histogram", "variance")
"""Result kinds whose export is drawn here."""

_SHAPES = {"log": "log-uniform", "lin": "uniform"}


def _percent(fraction: Fraction) -> str:
    value = fraction * 100
    return f"{float(value):g}%"


# --- ranged inputs and claims as written ----------------------------------------------------


def ranged_html(ranged: t.Ranged) -> str:
    if ranged.shape == "factor":
        return f" within a factor {float(ranged.factor or 0):g}"
    assert ranged.high is not None
    return " … " + expr_html(ranged.high) + f" ({_SHAPES[ranged.shape]})"


def ranged_latex(ranged: t.Ranged) -> str:
    if ranged.shape == "factor":
        return f"\\quad\\text{{within a factor {float(ranged.factor or 0):g}}}"
    assert ranged.high is not None
    return " \\ldots " + expr_latex(ranged.high) + f"\\ \\text{{({_SHAPES[ranged.shape]})}}"


def fraction_html(check: t.Check) -> str:
    return "" if check.fraction is None else f" in {_percent(check.fraction)} of the samples"


def fraction_latex(check: t.Check) -> str:
    if check.fraction is None:
        return ""
    return "\\quad\\text{in " + _percent(check.fraction).replace("%", "\\%") + " of the samples}"


# --- histograms -----------------------------------------------------------------------------

SVG_WIDTH = 560
SVG_HEIGHT = 220
_MARGIN = (56, 12, 14, 44)  # left, right, top, bottom
FONT = "DejaVu Sans, Helvetica, Arial, sans-serif"


def _n(value: float) -> str:
    text = f"{value:.2f}"
    return "0.00" if text == "-0.00" else text


def _axis_value(value: float, scale: str) -> float:
    return math.log10(value) if scale == "log" else value


def histogram_svg(data: HistogramData, title: str) -> str:
    """The histogram as an inline SVG: bars, the median and the 68% interval marked."""
    left, right, top, bottom = _MARGIN
    width, height = SVG_WIDTH - left - right, SVG_HEIGHT - top - bottom
    low = _axis_value(data.edges[0], data.scale)
    high = _axis_value(data.edges[-1], data.scale)
    span = (high - low) or 1.0
    peak = max(data.counts) or 1

    def x(value: float) -> float:
        return left + (_axis_value(value, data.scale) - low) / span * width

    colour = style(0).colour
    parts = [
        f'<svg xmlns="http://www.w3.org/2000/svg" width="{SVG_WIDTH}" height="{SVG_HEIGHT}" '
        f'viewBox="0 0 {SVG_WIDTH} {SVG_HEIGHT}" role="img" font-family="{FONT}" '
        'font-size="12">',
        f"<title>{escape(title)}</title>",
        f'<rect x="{left}" y="{top}" width="{width}" height="{height}" fill="none" '
        'stroke="#333333"/>',
    ]
    for index, count in enumerate(data.counts):
        x0, x1 = x(data.edges[index]), x(data.edges[index + 1])
        bar = count / peak * height
        parts.append(
            f'<rect x="{_n(x0)}" y="{_n(top + height - bar)}" width="{_n(x1 - x0)}" '
            f'height="{_n(bar)}" fill="{colour}" fill-opacity="0.55" stroke="{colour}"/>'
        )
    interval = data.intervals[0] if data.intervals else None
    if interval is not None:
        for edge in (interval.low, interval.high):
            parts.append(
                f'<line x1="{_n(x(edge))}" y1="{top}" x2="{_n(x(edge))}" y2="{top + height}" '
                'stroke="#000000" stroke-dasharray="4 3"/>'
            )
    parts.append(
        f'<line x1="{_n(x(data.median))}" y1="{top}" x2="{_n(x(data.median))}" '
        f'y2="{top + height}" stroke="#000000" stroke-width="2"/>'
    )
    for edge, anchor in ((data.edges[0], "start"), (data.edges[-1], "end")):
        parts.append(
            f'<text x="{_n(x(edge))}" y="{top + height + 16}" text-anchor="{anchor}">'
            f"{escape(format_number(edge, 3))}</text>"
        )
    unit = f" [{data.unit}]" if data.unit else ""
    caption = (
        f"{data.name}{unit}, {data.scale} bins; median {format_number(data.median, 3)} "
        "(solid), 68% interval (dashed)"
    )
    parts.append(
        f'<text x="{left + width / 2:.2f}" y="{SVG_HEIGHT - 8}" text-anchor="middle">'
        f"{escape(caption)}</text>"
    )
    parts.append(
        f'<text x="{left - 6}" y="{top + 10}" text-anchor="end">{peak}</text>'
        f'<text x="{left - 6}" y="{top + height}" text-anchor="end">0</text>'
    )
    parts.append("</svg>")
    return "\n".join(parts) + "\n"


def histogram_pgfplots(data: HistogramData) -> str:
    """The histogram as a pgfplots ``ybar interval`` plot, with the median marked."""
    r, g, b = style(0).rgb
    coords = [f"({edge:.8e},{count})" for edge, count in zip(data.edges, data.counts, strict=False)]
    coords.append(f"({data.edges[-1]:.8e},{data.counts[-1] if data.counts else 0})")
    peak = max(data.counts) if data.counts else 1
    axis = [
        "width=0.8\\linewidth",
        "height=0.4\\linewidth",
        f"xmode={'log' if data.scale == 'log' else 'normal'}",
        "ymin=0",
        "xlabel={" + title_latex(data.name, data.unit) + "}",
        "ylabel={samples per bin}",
        "scaled y ticks=false",
    ]
    lines = [
        "\\begin{center}",
        "\\begin{tikzpicture}",
        "\\begin{axis}[",
        *("  " + option + "," for option in axis),
        "]",
        f"\\addplot[ybar interval, fill={{rgb,255:red,{r};green,{g};blue,{b}}}, "
        "fill opacity=0.55] coordinates {",
        *("  " + " ".join(coords[i : i + 4]) for i in range(0, len(coords), 4)),
        "};",
        f"\\draw[thick] (axis cs:{data.median:.8e},0) -- (axis cs:{data.median:.8e},{peak});",
        "\\end{axis}",
        "\\end{tikzpicture}",
        "\\end{center}",
        "",
    ]
    median = format_number(data.median, 3)
    return "\n".join(lines) + f"\\noindent Median {median} (the vertical line).\n\n"


# --- variance tables ------------------------------------------------------------------------


def _budget_title(budget: VarianceBudget) -> str:
    quantity = f"log10 {budget.name}" if budget.space == "log10" else budget.name
    how = "to first order" if budget.method == "first order" else "from the samples"
    return f"Shares of var({quantity}) = {format_number(budget.variance, 3)}, {how}"


def budget_html(budget: VarianceBudget) -> str:
    rows = "".join(
        f"<tr><td>{name_html(row.name)}</td><td>{row.share * 100:.1f}%</td>"
        f"<td>{escape(row.input)}</td></tr>\n"
        for row in budget.rows
    )
    if budget.remainder is not None:
        rows += f"<tr><td>interactions</td><td>{budget.remainder * 100:.1f}%</td><td></td></tr>\n"
    return (
        '<table class="sweep">\n'
        f"<caption>{escape(_budget_title(budget))}</caption>\n"
        "<tr><th>input</th><th>share</th><th>distribution</th></tr>\n"
        f"{rows}</table>\n"
    )


def budget_latex(budget: VarianceBudget) -> str:
    rows = [
        f"\\({name_latex(row.name)}\\) & {row.share * 100:.1f}\\% & {escape_text(row.input)} \\\\"
        for row in budget.rows
    ]
    if budget.remainder is not None:
        rows.append(f"interactions & {budget.remainder * 100:.1f}\\% & \\\\")
    return (
        "\\begin{center}\n"
        + escape_text(_budget_title(budget))
        + "\\\\[2pt]\n\\begin{tabular}{lrl}\n\\hline\ninput & share & distribution \\\\\n"
        + "\\hline\n"
        + "\n".join(rows)
        + "\n\\hline\n\\end{tabular}\n\\end{center}\n\n"
    )


def budget_markdown(budget: VarianceBudget, indent: str = "  ") -> str:
    rows = "".join(
        f"{indent}| `{row.name}` | {row.share * 100:.1f}% | {row.input} |\n" for row in budget.rows
    )
    if budget.remainder is not None:
        rows += f"{indent}| interactions | {budget.remainder * 100:.1f}% | |\n"
    return (
        f"{indent}{_budget_title(budget)}:\n\n"
        f"{indent}| input | share | distribution |\n{indent}|---|---:|---|\n{rows}"
    )


# --- one entry point per writer -------------------------------------------------------------


def sampled_html(result: StatementResult, title: str) -> str | None:
    """The HTML of a ``histogram`` or ``variance`` result, or None for other results."""
    if result.kind == "histogram" and result.sampled is not None:
        histogram = result.sampled.histogram
        if histogram is not None:
            svg = histogram_svg(histogram, title)
            return f'<figure class="plot">\n{svg}</figure>\n'
    if result.kind == "variance" and isinstance(result.sampled, VarianceBudget):
        return budget_html(result.sampled)
    return None


def sampled_latex(result: StatementResult) -> str | None:
    if result.kind == "histogram" and result.sampled is not None:
        histogram = result.sampled.histogram
        if histogram is not None:
            return histogram_pgfplots(histogram)
    if result.kind == "variance" and isinstance(result.sampled, VarianceBudget):
        return budget_latex(result.sampled)
    return None


def sampled_markdown(result: StatementResult) -> str | None:
    """Markdown keeps the histogram's text (a fenced block drawn from its data)."""
    if result.kind == "variance" and isinstance(result.sampled, VarianceBudget):
        return budget_markdown(result.sampled)
    return None


__all__ = [
    "SAMPLED_KINDS",
    "budget_html",
    "budget_latex",
    "budget_markdown",
    "fraction_html",
    "fraction_latex",
    "histogram_pgfplots",
    "histogram_svg",
    "ranged_html",
    "ranged_latex",
    "sampled_html",
    "sampled_latex",
    "sampled_markdown",
]
