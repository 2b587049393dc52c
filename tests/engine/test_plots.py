"""plot statements: data equal to the sweep's values, a deterministic text chart."""

from __future__ import annotations

import math

import numpy as np
import scipy.constants as sc

SHEET = (
    "M = 5e11 [kg]\n"
    "T_H = hbar*c^3/(8*pi*G*M*k_B) in [K]\n"
    "t_ev = 5120*pi*G^2*M^3/(hbar*c^4)\n"
    "plot T_H in [K], t_ev in [yr] over M = 1e9 [kg] .. 1e15 [kg] log 25\n"
)


def test_plot_data_equal_the_sweep(run_sheet) -> None:
    plot = run_sheet(SHEET)[3]
    assert plot.kind == "plot" and plot.status == "ok"
    data = plot.plot
    masses = np.geomspace(1e9, 1e15, 25)
    assert np.allclose(data.x_values, masses, rtol=1e-14, atol=0)
    assert data.x_scale == "log" and data.y_scale == "log"  # 12 decades: log chosen
    temperature = [sc.hbar * sc.c**3 / (8 * sc.pi * sc.G * m * sc.k) for m in masses]
    years = [5120 * sc.pi * sc.G**2 * m**3 / (sc.hbar * sc.c**4) / (365.25 * 86400) for m in masses]
    (t_series, life_series) = data.series
    assert (t_series.name, t_series.unit) == ("T_H", "K")
    assert np.allclose(t_series.values, temperature, rtol=1e-12, atol=0)
    assert np.allclose(life_series.values, years, rtol=1e-12, atol=0)
    # The same sweep as a table gives the same numbers.
    table = run_sheet(
        SHEET.replace("plot T_H in [K], t_ev in [yr] over ", "table ").replace(
            "log 25", "log 25: T_H in [K], t_ev in [yr]"
        )
    )[3]
    first_row = table.record.split("\n")[2].split()
    assert math.isclose(float(first_row[1]), t_series.values[0], rel_tol=5e-4)


def test_text_chart_is_deterministic_and_shaped(run_sheet) -> None:
    first, second = run_sheet(SHEET)[3].record, run_sheet(SHEET)[3].record
    assert first == second
    lines = first.split("\n")
    assert lines[0].endswith("log 25:")
    chart = lines[1:13]
    # T_H falls with M: its mark is at the top-left and the bottom-right region.
    assert "*" in chart[0][:20] or "*" in chart[4][:20]
    assert lines[-1].strip().startswith("* T_H [K]   o t_ev [yr]")
    assert "(x: M [kg], log; y: log)" in lines[-1]


def test_plot_checks_dimensions_once(run_sheet) -> None:
    results = run_sheet(SHEET + "plot T_H in [m] over M = 1 [kg] .. 2 [kg] lin 5\n")
    assert results[4].status == "error" and "cannot express T_H" in results[4].message


def test_plot_json_carries_the_data(run_sheet) -> None:
    data = run_sheet(SHEET)[3].to_json()["plot"]
    assert data["x_name"] == "M" and len(data["series"]) == 2
