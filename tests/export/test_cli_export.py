"""``worksheet export --to svg|png``: one picture per plot, named by the plot's line."""

from __future__ import annotations

import xml.etree.ElementTree as ET

from worksheet.cli import main


def test_svg_files_are_written_and_named(tmp_path, plot_text, capsys):
    sheet = tmp_path / "sweep.sheet.md"
    sheet.write_text(plot_text, encoding="utf-8")
    assert main(["export", str(sheet), "--to", "svg"]) == 0
    names = sorted(p.name for p in tmp_path.glob("*.svg"))
    assert names == ["sweep.sheet.plot-11.svg", "sweep.sheet.plot-12.svg"]
    out = capsys.readouterr().out
    assert all(name in out for name in names)
    ET.fromstring((tmp_path / names[0]).read_bytes())  # well-formed XML


def test_svg_into_a_folder_and_a_sheet_without_plots(tmp_path, capsys):
    sheet = tmp_path / "flat.sheet.md"
    sheet.write_text("```calc\nx = 1 [m]\n```\n", encoding="utf-8")
    assert main(["export", str(sheet), "--to", "svg", "-o", str(tmp_path)]) == 0
    assert "no plot to draw" in capsys.readouterr().out
    assert main(["export", str(sheet), "--to", "svg", "-o", str(tmp_path / "missing")]) == 2
    assert "not a folder" in capsys.readouterr().err


def test_png_without_matplotlib_names_the_extra(tmp_path, plot_text, capsys, monkeypatch):
    # Runs whether or not matplotlib is installed: its absence is simulated.
    monkeypatch.setattr("worksheet.export.png_plot.matplotlib_available", lambda: False)
    sheet = tmp_path / "sweep.sheet.md"
    sheet.write_text(plot_text, encoding="utf-8")
    assert main(["export", str(sheet), "--to", "png"]) == 2
    assert "pip install 'worksheet[plots]'" in capsys.readouterr().err
    assert not list(tmp_path.glob("*.png"))
