"""``table`` statements as real tables in every export, and notes the engine attached."""

from __future__ import annotations

import dataclasses
import math

import pytest
import scipy.constants as sc
from markdown_it import MarkdownIt

from worksheet.export import export_run
from worksheet.export.sweep_table import result_table
from worksheet.runner import run_text


def _hawking(mass: float) -> float:
    return sc.hbar * sc.c**3 / (8 * sc.pi * sc.G * mass * sc.k)


def test_issue10_table_comes_from_the_result_not_its_record(plot_run):
    result = next(r for r in plot_run.results if r.kind == "table")
    # A record that no longer matches the data would be read back wrongly; the table is
    # built from the columns the engine computed, so the garbled record changes nothing.
    garbled = dataclasses.replace(result, record="table ...:\n  M [kg]  junk\n  x y z")
    table = result_table(garbled, 4)
    assert table is not None
    assert [(c.name, c.unit) for c in table.columns] == [
        ("M", "kg"),
        ("T_H", "K"),
        ("t_ev", "yr"),
    ]
    assert len(table.rows) == 4
    for row, mass in zip(table.rows, (1e9, 1e11, 1e13, 1e15), strict=True):
        assert float(row[0]) == mass
        # Hawking temperature hbar c^3 / (8 pi G M k_B), scipy.constants (CODATA 2018).
        assert math.isclose(float(row[1]), _hawking(mass), rel_tol=5e-4)
    # Same cells as the result block records, row by row.
    recorded = [line.split() for line in result.record.split("\n")[2:]]
    assert [list(row) for row in table.rows] == recorded


def test_a_result_that_is_not_a_table_has_none(plot_run):
    assert all(result_table(r, 4) is None for r in plot_run.results if r.kind != "table")


def test_issue10_not_finite_cells_are_counted_from_the_data():
    run = run_text("```calc\nx = 1\ny = 1/x\ntable x = -1, 0, 1: y\n```\n")
    result = next(r for r in run.results if r.kind == "table")
    table = result_table(result, 4)
    assert table is not None and len(table.rows) == 3
    assert table.notes == tuple(
        line.strip() for line in result.record.split("\n") if line.strip().startswith("(")
    )


def test_latex_table_is_a_tabular_with_numbers(plot_run):
    text, _ = export_run(plot_run, "latex")
    assert "\\begin{longtable}{rrr}" in text
    assert "\\(M\\) [\\(\\unit{\\kilo\\gram}\\)] & \\(T_{\\mathrm{H}}\\)" in text
    mantissa, exponent = f"{_hawking(1e9):.3e}".split("e")
    assert f"\\num{{1.000e9}} & \\num{{{mantissa}e{int(exponent)}}}" in text


def test_html_table_is_a_table(plot_run):
    page, _ = export_run(plot_run, "html")
    section = page.split('<table class="sweep">')
    # Two plots' data tables and the sweep itself.
    assert len(section) == 4
    assert "<th><var>T</var><sub>H</sub> [<span" in section[3]
    sweep = section[3].split("</table>", 1)[0]
    assert sweep.count("<tr>") == 5  # the header and four masses
    assert "1.000\u2009×\u200910<sup>9</sup>" in sweep


def test_markdown_table_parses_as_a_table_inside_the_list(plot_run):
    report, _ = export_run(plot_run, "md")
    tokens = MarkdownIt("commonmark").enable("table").parse(report)
    cells = [t.content for t in tokens if t.type == "inline" and t.level > 4]
    assert "1.000e9" in cells
    types = [t.type for t in tokens]
    first = types.index("table_open")
    # The table sits inside the step's list item.
    assert "list_item_open" in types[:first] and "list_item_close" in types[first:]


@pytest.mark.parametrize("to", ["latex", "html"])
def test_precision_note_is_shown_beside_the_equation(plot_run, to):
    text, _ = export_run(plot_run, to)
    assert "precision loss: cancellation; double precision gave 0" in text
