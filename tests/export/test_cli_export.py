"""``worksheet export --to svg|png``: one picture per plot, named by the plot's line."""

from __future__ import annotations

import xml.etree.ElementTree as ET

import pytest

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


ERRING = """\
---
constants: CODATA2022
---

```calc
x = 1 [m]
y = x + 1 [s]
z = 2*y
check x < 2 [m]
check z > 1 [m]
check x > 3 [m]
```
"""
"""A line that errs, one that depends on it, a claim that holds, one skipped, one failing."""


@pytest.mark.parametrize("to", ["latex", "html", "md"])
def test_issue10_export_of_a_sheet_with_errors_exits_1_and_says_so(tmp_path, capsys, to):
    sheet = tmp_path / "erring.sheet.md"
    sheet.write_text(ERRING, encoding="utf-8")
    assert main(["export", str(sheet), "--to", to]) == 1
    err = capsys.readouterr().err
    summary = "1 of 3 claims fails; 1 claim was not checked; 1 line errs (line 7)"
    assert summary in err
    (written,) = [p for p in tmp_path.iterdir() if p.name != sheet.name]
    document = written.read_text(encoding="utf-8")  # still written, and honest
    assert "Not everything holds" in document and "1 line errs (line 7)" in document
    assert "All 3 claims hold" not in document
    assert "1 of 3 claims hold." in document


def test_issue10_export_of_a_sound_sheet_exits_0(tmp_path, capsys):
    sheet = tmp_path / "sound.sheet.md"
    sheet.write_text("```calc\nx = 1 [m]\ncheck x < 2 [m]\n```\n", encoding="utf-8")
    assert main(["export", str(sheet), "--to", "md"]) == 0
    assert capsys.readouterr().err == ""
    report = (tmp_path / "sound.sheet.report.md").read_text(encoding="utf-8")
    assert "The sheet's one claim holds; every line was evaluated." in report


def test_issue10_svg_export_of_a_failing_sheet_exits_1(tmp_path, plot_text, capsys):
    sheet = tmp_path / "sweep.sheet.md"
    sheet.write_text(plot_text.replace("x = 1e-9 [rad]", "check 1 [m] > 2 [m]"), encoding="utf-8")
    assert main(["export", str(sheet), "--to", "svg"]) == 1
    assert "1 of 1 claim fails" in capsys.readouterr().err
    assert len(list(tmp_path.glob("*.svg"))) == 2
