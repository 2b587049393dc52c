"""``table`` statements as real tables in every export, and notes the engine attached."""

from __future__ import annotations

import math

import pytest
import scipy.constants as sc
from markdown_it import MarkdownIt

from worksheet.export import export_run
from worksheet.export.sweep_table import read_table_record


def _hawking(mass: float) -> float:
    return sc.hbar * sc.c**3 / (8 * sc.pi * sc.G * mass * sc.k)


def test_record_is_read_back_into_columns_and_cells(plot_run):
    record = next(r.record for r in plot_run.results if r.kind == "table")
    table = read_table_record(record)
    assert table is not None
    assert [(c.name, c.unit) for c in table.columns] == [
        ("M", "kg"),
        ("T_H", "K"),
        ("t_ev", "yr"),
    ]
    assert len(table.rows) == 4
    for row, mass in zip(table.rows, (1e9, 1e11, 1e13, 1e15), strict=True):
        assert float(row[0]) == mass
        assert math.isclose(float(row[1]), _hawking(mass), rel_tol=5e-4)


def test_a_record_that_is_not_a_table_is_refused():
    assert read_table_record(None) is None
    assert read_table_record("x = 1 m") is None


def test_latex_table_is_a_tabular_with_numbers(plot_run):
    text, _ = export_run(plot_run, "latex")
    assert "\\begin{tabular}{rrr}" in text
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
