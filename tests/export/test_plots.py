"""Plots in the exports: the SVG writer, pgfplots in LaTeX, inline SVG in HTML, PNG (extra)."""

from __future__ import annotations

import importlib.util
import math
import re
import xml.etree.ElementTree as ET

import numpy as np
import pytest
import scipy.constants as sc

from worksheet.engine.plots import PlotData, Series
from worksheet.errors import WorksheetError
from worksheet.export import PLOT_FORMATS, export_run, plot_files
from worksheet.export.plot_axes import make_axis
from worksheet.export.plot_style import STYLES
from worksheet.export.svg_plot import plot_svg
from worksheet.runner import run_text

SVG = "{http://www.w3.org/2000/svg}"


def _plot(run, line: int) -> PlotData:
    return next(r.plot for r in run.results if r.kind == "plot" and r.line == line)


def test_svg_is_well_formed_self_contained_and_byte_stable(plot_text):
    first = plot_svg(_plot(run_text(plot_text), 11), "t")
    second = plot_svg(_plot(run_text(plot_text), 11), "t")
    assert first.encode() == second.encode()
    assert first.startswith('<?xml version="1.0" encoding="UTF-8"?>\n<svg ')
    root = ET.fromstring(first.encode())
    assert root.tag == SVG + "svg"
    lowered = first.lower()
    for forbidden in ("<script", "<image", "href", "url(", "@import", "<style", " id="):
        assert forbidden not in lowered
    # Inline form (for HTML): no XML declaration.
    assert plot_svg(_plot(run_text(plot_text), 11), standalone=False).startswith("<svg ")


def _texts(root: ET.Element) -> list[str]:
    return ["".join(node.itertext()) for node in root.iter(SVG + "text")]


def test_svg_has_decade_ticks_axis_titles_and_a_legend(plot_run):
    data = _plot(plot_run, 11)
    root = ET.fromstring(plot_svg(data).encode())
    texts = _texts(root)
    # x sweeps 1e9 .. 1e15 kg: a labelled tick at each decade, 10^9 to 10^15.
    for power in range(9, 16):
        assert f"10{power}" in texts
    assert "M [kg]" in texts  # x title with its unit
    assert "TH [K]" in texts and "tev [yr]" in texts  # legend (subscripts as tspans)
    # The y axis (log) covers the data: T_H from scipy at the sweep's ends, t_ev too.
    t_low = sc.hbar * sc.c**3 / (8 * sc.pi * sc.G * 1e15 * sc.k)
    t_ev_high = 5120 * sc.pi * sc.G**2 * 1e15**3 / (sc.hbar * sc.c**4) / sc.Julian_year
    y_labels = [int(t[2:].replace("\u2212", "-")) for t in texts if re.fullmatch(r"10−?\d+", t)]
    assert min(y_labels) <= math.floor(math.log10(t_low))
    assert max(y_labels) >= math.ceil(math.log10(t_ev_high))


def test_svg_draws_one_polyline_per_series_with_distinct_dashes(plot_run):
    data = _plot(plot_run, 11)
    root = ET.fromstring(plot_svg(data).encode())
    lines = list(root.iter(SVG + "polyline"))
    assert len(lines) == 2
    assert len({line.get("stroke") for line in lines}) == 2
    assert len({line.get("stroke-dasharray") for line in lines}) == 2
    # Every point of the sweep is a vertex; x grows left to right on the log axis evenly.
    xs = [float(p.split(",")[0]) for p in lines[0].get("points", "").split()]
    assert len(xs) == len(data.x_values) == 25
    steps = np.diff(xs)
    assert np.allclose(steps, steps[0], atol=0.02)
    # Markers: at most 12 per series, shapes differ between series.
    assert len(list(root.iter(SVG + "circle"))) <= 12 + 1  # + the legend's sample
    assert list(root.iter(SVG + "rect"))  # squares for the second series


def test_svg_vertical_positions_follow_the_values(plot_run):
    data = _plot(plot_run, 11)
    root = ET.fromstring(plot_svg(data).encode())
    ys = [float(p.split(",")[1]) for p in root.find(f".//{SVG}polyline").get("points").split()]
    # T_H ~ 1/M: on log-log axes a straight line of slope -1, so equal rises in pixels.
    rises = np.diff(ys)
    assert np.all(rises > 0)  # falling curve: y pixel grows downwards
    assert np.allclose(rises, rises[0], rtol=1e-3, atol=0.02)


def test_styles_differ_without_colour():
    looks = [(s.dash, s.marker) for s in STYLES]
    assert len(set(looks)) == len(looks) == 7
    assert len({s.dash for s in STYLES}) == 7 and len({s.marker for s in STYLES}) == 7


def test_undrawable_values_break_the_curve_and_are_counted():
    data = PlotData(
        "x",
        "m",
        (1.0, 2.0, 3.0, 4.0, 5.0),
        "lin",
        (Series("y", "", (1.0, float("nan"), 3.0, -1.0, 5.0)),),
        "log",
    )
    svg = plot_svg(data)
    root = ET.fromstring(svg.encode())
    assert list(root.iter(SVG + "polyline")) == []  # no two drawable neighbours
    assert "2 values not drawn" in svg
    empty = PlotData("x", "", (1.0, 2.0), "lin", (Series("y", "", (math.inf, math.nan)),), "lin")
    assert "nothing to draw" in plot_svg(empty)


@pytest.mark.parametrize(
    ("values", "scale", "ends"),
    [
        ([9.0, 15.0], "log", (9.0, 15.0)),
        ([3.2, 3.4], "log", (3.0, 4.0)),  # within one decade: the whole decade
        ([0.3, 9.7], "lin", (0.0, 10.0)),
        ([5.0], "lin", (2.0, 8.0)),  # a single value is padded
    ],
)
def test_axis_ends_cover_the_values(values, scale, ends):
    axis = make_axis(values, scale)
    assert (axis.low, axis.high) == ends
    assert axis.low <= min(values) and axis.high >= max(values)


def test_latex_draws_plots_with_pgfplots_from_the_data(plot_run):
    text, _ = export_run(plot_run, "latex", "plots.sheet.md")
    assert "\\usepackage{pgfplots}" in text
    assert text.count("\\begin{axis}") == 2
    assert "xmode=log" in text and "ymode=log" in text
    data = _plot(plot_run, 11)
    assert f"({data.x_values[0]:.8e},{data.series[0].values[0]:.8e})" in text
    assert "\\addlegendentry{\\(T_{\\mathrm{H}}\\) [\\(\\unit{\\kelvin}\\)]}" in text
    # A sheet without plots does not need pgfplots.
    plain, _ = export_run(run_text("```calc\nx = 1 [m]\n```\n"), "latex")
    assert "pgfplots" not in plain


def test_html_embeds_each_plot_inline(plot_run):
    page, _ = export_run(plot_run, "html", "plots.sheet.md")
    assert page.count("<svg ") == 2
    assert "<?xml" not in page
    assert "<summary>The plotted numbers</summary>" in page


def test_markdown_keeps_the_text_chart(plot_run):
    report, _ = export_run(plot_run, "md", "plots.sheet.md")
    record = next(r.record for r in plot_run.results if r.line == 11)
    chart = record.split("\n")[1:]
    assert "  ```text\n" + "".join("  " + line + "\n" for line in chart) + "  ```\n" in report


def test_plot_files_are_named_by_line(plot_run):
    files = plot_files(plot_run, "svg", "plots.sheet")
    assert [f.name for f in files] == ["plots.sheet.plot-11.svg", "plots.sheet.plot-12.svg"]
    assert set(PLOT_FORMATS) == {"svg", "png"}
    with pytest.raises(WorksheetError, match="unknown plot format"):
        plot_files(plot_run, "gif", "x")


_HAS_MPL = importlib.util.find_spec("matplotlib") is not None


@pytest.mark.skipif(not _HAS_MPL, reason="matplotlib not installed (pip install '.[plots]')")
def test_png_is_a_stable_png(plot_run):
    first = plot_files(plot_run, "png", "p")[0].content
    second = plot_files(plot_run, "png", "p")[0].content
    assert first[:8] == b"\x89PNG\r\n\x1a\n"
    assert first == second
    assert b"matplotlib" not in first  # no Software metadata


def test_png_without_matplotlib_says_which_extra(plot_run, monkeypatch):
    # Runs whether or not matplotlib is installed: its absence is simulated.
    monkeypatch.setattr("worksheet.export.png_plot.matplotlib_available", lambda: False)
    with pytest.raises(WorksheetError, match=r"worksheet\[plots\]"):
        plot_files(plot_run, "png", "p")
