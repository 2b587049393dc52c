"""Plots in the app: the chart drawing as plain text, and the chart widget under a cell."""

from __future__ import annotations

import math
from pathlib import Path

import numpy as np
import scipy.constants as sc

from worksheet.app.app import WorksheetApp
from worksheet.app.chart_canvas import Axis, draw_chart, fallback_rows, tick_text, ticks
from worksheet.app.widgets.calc_cell import CalcCellView
from worksheet.app.widgets.plot_chart import MIN_CHART_WIDTH, PlotChart
from worksheet.engine.plots import PlotData, Series

BRAILLE = range(0x2801, 0x2900)


def hawking_plot() -> PlotData:
    """Temperature and photon-only lifetime against mass, computed here from scipy."""
    masses = np.logspace(9, 15, 40)
    temperature = sc.hbar * sc.c**3 / (8 * sc.pi * sc.G * masses * sc.k)
    year = sc.Julian_year
    lifetime = 5120 * sc.pi * sc.G**2 * masses**3 / (sc.hbar * sc.c**4) / year
    return PlotData(
        "M",
        "kg",
        tuple(masses),
        "log",
        (Series("T_H", "K", tuple(temperature)), Series("t_ev", "yr", tuple(lifetime))),
        "log",
    )


def text_of(rows: list) -> list[str]:
    return ["".join(text for text, _ in row) for row in rows]


def test_tick_labels_are_short_and_decades_on_log_axes() -> None:
    assert [tick_text(v) for v in (1e10, 0.5, 250.0, -3.2e-5, 0.0)] == [
        "1e10",
        "0.5",
        "250",
        "-3.2e-5",
        "0",
    ]
    found = ticks(Axis(9.0, 15.0, log=True), 4)
    assert [text for _, text in found] == ["1e9", "1e11", "1e13", "1e15"]
    linear = [value for value, _ in ticks(Axis(0.0, 1.0, log=False), 6)]
    assert linear[0] == 0 and linear[-1] == 1 and len(linear) <= 7
    # Less than one decade: the ends are labelled instead.
    assert len(ticks(Axis(2.1, 2.4, log=True), 4)) == 2


def test_chart_draws_both_curves_with_axes_and_legend() -> None:
    lines = text_of(draw_chart(hawking_plot(), 70, plot_rows=10))
    plot = lines[1:11]
    assert all(len(line) <= 70 for line in lines)
    assert any(chr(code) in "".join(plot) for code in BRAILLE)
    # Each curve ends in its digit at the right edge. The lifetime (growing as M^3) ends
    # at the overall maximum, the top row; the temperature (falling as 1/M) ends in the
    # row where log10 of its last value falls between the smallest and largest values.
    data = hawking_plot()
    values = [v for series in data.series for v in series.values]
    low, high = math.log10(min(values)), math.log10(max(values))
    fraction = (math.log10(data.series[0].values[-1]) - low) / (high - low)
    expected_row = round((1 - fraction) * (10 * 4 - 1)) // 4
    assert plot[0].rstrip().endswith("2")
    assert plot[expected_row].rstrip().endswith("1")
    assert "1e9" in lines[12] and "1e15" in lines[12]
    assert lines[13].strip() == "x: M [kg], log scale"
    assert lines[14].strip() == "1 T_H [K]   2 t_ev [yr]"
    assert "y: units in the legend, log scale" in lines[0]


def test_non_finite_values_leave_gaps_and_nothing_drawable_says_so() -> None:
    data = hawking_plot()
    broken = [math.nan, math.inf, -1.0, *data.series[0].values[3:]]
    gappy = PlotData("M", "kg", data.x_values, "log", (Series("T_H", "K", tuple(broken)),), "log")
    lines = text_of(draw_chart(gappy, 50))
    assert any("1" in line for line in lines[1:11])
    nothing = PlotData(
        "M", "kg", data.x_values, "log", (Series("T_H", "K", (math.nan,) * 40),), "log"
    )
    lines = text_of(draw_chart(nothing, 50))
    assert lines[0].startswith("(nothing to draw") and lines[1] == "1 T_H [K]"


def test_the_fallback_folds_the_text_charts_legend() -> None:
    recorded = ["  1 |*", "    +--", "  * T_H [K]   o t_ev [yr]   (x: M [kg], log; y: log)"]
    lines = text_of(fallback_rows(recorded, 24))
    assert lines[:2] == recorded[:2]
    assert all(len(line) <= 24 for line in lines[2:])
    assert " ".join(lines[2:]).split() == recorded[2].split()


PLOT_SHEET = """---
title: Plotted hole
constants: CODATA2018
---

```calc
M = 1e12 [kg]
T_H = hbar*c^3/(8*pi*G*M*k_B)
t_ev = 5120*pi*G^2*M^3/(hbar*c^4)
plot T_H in [K], t_ev in [yr] over M = 1e9 [kg] .. 1e15 [kg] log 40
x = 1 [m]
y = log(x/[m])
plot y over x = 0 [m] .. 2 [m] lin 5
check y == 0
```
"""


def write_plot_sheet(tmp_path: Path) -> Path:
    path = tmp_path / "plotted.sheet.md"
    path.write_text(PLOT_SHEET, encoding="utf-8")
    return path


def test_plots_appear_as_charts_under_the_cell(tmp_path: Path, ui) -> None:
    app = WorksheetApp(str(write_plot_sheet(tmp_path)))

    async def scenario(pilot, app: WorksheetApp) -> None:
        await ui.settle(pilot, app)
        charts = list(app.query(PlotChart))
        assert len(charts) == 2 and not any(c.showing_text_chart for c in charts)
        charts[0].scroll_visible(animate=False)
        await pilot.pause(0.1)
        text = ui.screen_text(app)
        assert "plot T_H in [K], t_ev in [yr] over M = 1e9 [kg] .. 1e15" in text
        assert "1 T_H [K]   2 t_ev [yr]" in text
        assert "x: M [kg], log scale" in text
        assert any(chr(code) in text for code in BRAILLE)
        # y = log(x) over 0 .. 2 m starts at log(0) = -inf: a gap, not a crash.
        second = charts[1]
        second.scroll_visible(animate=False)
        await pilot.pause(0.1)
        text = ui.screen_text(app)
        assert "x: x [m]" in text and "1 y" in text
        assert "8 results: 8 ok" in text
        # The plot's own line stays in the text above its chart; the text chart does not.
        assert "plot y over x = 0 [m] .. 2 [m] lin 5:" in text
        assert "+-----" not in text

    ui.drive(app, scenario, size=(120, 48))


def test_an_edited_range_redraws_the_same_chart_widget(tmp_path: Path, ui) -> None:
    app = WorksheetApp(str(write_plot_sheet(tmp_path)))

    async def scenario(pilot, app: WorksheetApp) -> None:
        await ui.settle(pilot, app)
        chart = app.query(PlotChart).first()
        editor = app.query(CalcCellView).first().editor
        editor.focus()
        row = 3
        line = editor.document.get_line(row)
        start = line.index("1e15")
        editor.move_cursor((row, start + 4))
        await pilot.press("backspace", "8")  # the sweep now ends at 1e18 kg
        await ui.settle(pilot, app)
        assert app.query(PlotChart).first() is chart
        assert max(chart.data.x_values) == 1e18
        chart.scroll_visible(animate=False)
        await pilot.pause(0.1)
        assert "1e18" in ui.screen_text(app)

    ui.drive(app, scenario, size=(120, 48))


def test_a_narrow_sheet_shows_the_text_chart(tmp_path: Path, ui) -> None:
    app = WorksheetApp(str(write_plot_sheet(tmp_path)))

    async def scenario(pilot, app: WorksheetApp) -> None:
        await ui.settle(pilot, app)
        chart = app.query(PlotChart).first()
        assert chart.content_size.width < MIN_CHART_WIDTH
        assert chart.showing_text_chart
        chart.scroll_visible(animate=False)
        await pilot.pause(0.1)
        text = ui.screen_text(app)
        assert "+-----" in text  # the recorded text chart's frame
        assert "* T_H [K]" in text

    ui.drive(app, scenario, size=(44, 48))  # the side panel is hidden below 100 columns
