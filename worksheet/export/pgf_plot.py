"""A plot drawn by pgfplots from its data, for the LaTeX export (our own writer).

Needs ``\\usepackage{pgfplots}`` (Debian: texlive-pictures); the LaTeX export adds it to
the preamble only when the sheet has a plot. Values an axis cannot show (not finite, or
not positive on a log axis) are written as ``nan`` and break the curve there.
"""

from __future__ import annotations

from worksheet.engine.plots import PlotData
from worksheet.export.latex_math import name_latex
from worksheet.export.latex_units import unit_text_latex
from worksheet.export.plot_axes import scaled
from worksheet.export.plot_style import SeriesStyle, marker_step, style

PACKAGES = "\\usepackage{pgfplots}\n\\pgfplotsset{compat=1.16}\n"
"""What a document needs for these plots (compat 1.16: TeX Live 2018 and later)."""

_MARKS = {
    "circle": "*",
    "square": "square*",
    "triangle": "triangle*",
    "diamond": "diamond*",
    "down": "triangle*,every mark/.append style={rotate=180}",
    "cross": "x",
    "plus": "+",
}


def title_latex(name: str, unit: str) -> str:
    """``\\(T_{\\mathrm{H}}\\) [\\(\\unit{\\kelvin}\\)]``: a name and its unit, for text."""
    text = "\\(" + name_latex(name) + "\\)"
    shown = unit_text_latex(unit)
    return text + (" [\\(" + shown + "\\)]" if shown else "")


def _number(value: float, axis_scale: str) -> str:
    return "nan" if scaled(value, axis_scale) is None else f"{value:.8e}"


def _options(look: SeriesStyle, points: int) -> str:
    r, g, b = look.rgb
    parts = [
        f"color={{rgb,255:red,{r};green,{g};blue,{b}}}",
        "thick",
        "mark=" + _MARKS[look.marker],
        f"mark repeat={marker_step(points)}",
        "mark options={solid}",
    ]
    if look.dash:
        pattern = " ".join(
            ("on " if i % 2 == 0 else "off ") + f"{v:g}pt" for i, v in enumerate(look.dash)
        )
        parts.append("dash pattern=" + pattern)
    else:
        parts.append("solid")
    return ", ".join(parts)


def plot_pgfplots(data: PlotData) -> str:
    """A centred ``tikzpicture`` with one ``axis``; a sentence when nothing can be drawn."""
    shown = [
        (x, y)
        for series in data.series
        for x, y in zip(data.x_values, series.values, strict=True)
        if scaled(x, data.x_scale) is not None and scaled(y, data.y_scale) is not None
    ]
    if not shown:
        return "\\noindent (The plot has nothing to draw: no finite values on these axes.)\n\n"
    y_label = ", ".join(title_latex(s.name, s.unit) for s in data.series)
    axis = [
        "width=0.85\\linewidth",
        "height=0.5\\linewidth",
        f"xmode={'log' if data.x_scale == 'log' else 'normal'}",
        f"ymode={'log' if data.y_scale == 'log' else 'normal'}",
        "xlabel={" + title_latex(data.x_name, data.x_unit) + "}",
        "ylabel={" + y_label + "}",
        "grid=major",
        "unbounded coords=jump",
        "filter discard warning=false",
        "legend cell align=left",
        "legend style={at={(0.5,-0.34)}, anchor=north, font=\\small}",
    ]
    lines = [
        "\\begin{center}",
        "\\begin{tikzpicture}",
        "\\begin{axis}[",
        *("  " + option + "," for option in axis),
        "]",
    ]
    for index, series in enumerate(data.series):
        look = style(index)
        coords = [
            f"({_number(x, data.x_scale)},{_number(y, data.y_scale)})"
            for x, y in zip(data.x_values, series.values, strict=True)
        ]
        lines.append(f"\\addplot[{_options(look, len(series.values))}] coordinates {{")
        lines += ["  " + " ".join(coords[i : i + 4]) for i in range(0, len(coords), 4)]
        lines.append("};")
        lines.append("\\addlegendentry{" + title_latex(series.name, series.unit) + "}")
    lines += ["\\end{axis}", "\\end{tikzpicture}", "\\end{center}"]
    return "\n".join(lines) + "\n\n"
