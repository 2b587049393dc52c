"""Issue 14 (and 10): `new`, `compare`, `--version`, `--budget`, and hints for mistypings."""

from __future__ import annotations

import json
import subprocess
import sys

import pytest
import scipy.constants as sc

from worksheet import __version__
from worksheet.cli import main
from worksheet.document import read_document
from worksheet.runner import SheetRunner


def sheet(body: str, dataset: str = "CODATA2022", extra: str = "") -> str:
    return f"---\ntitle: t\nconstants: {dataset}\n{extra}---\n\n```calc\n{body}\n```\n"


# --- the first word -------------------------------------------------------------------


def test_issue10_mistyped_command_is_a_usage_error_with_a_hint(tmp_path, capsys, monkeypatch):
    monkeypatch.chdir(tmp_path)
    (tmp_path / "a.sheet.md").write_text(sheet("x = 1 [m]"))
    assert main(["chek", "a.sheet.md"]) == 2
    assert "'chek' is not a command; did you mean 'check'?" in capsys.readouterr().err
    assert not (tmp_path / "chek").exists()  # no sheet was made of the mistyped word


def test_issue10_missing_file_as_first_word_names_the_explicit_ways(tmp_path, capsys, monkeypatch):
    monkeypatch.chdir(tmp_path)
    assert main(["new-idea.sheet.md"]) == 2
    err = capsys.readouterr().err
    assert "worksheet new new-idea.sheet.md" in err and "worksheet open new-idea" in err
    assert list(tmp_path.iterdir()) == []


def test_issue10_an_existing_file_still_opens(tmp_path, capsys, monkeypatch):
    monkeypatch.chdir(tmp_path)
    monkeypatch.delenv("WORKSHEET_ALLOW_NO_TTY", raising=False)
    (tmp_path / "a.sheet.md").write_text(sheet("x = 1 [m]"))
    # stdin is not a terminal under pytest: reaching `open` shows up as its refusal
    assert main(["a.sheet.md"]) == 2
    assert "the app needs a terminal" in capsys.readouterr().err


def test_issue14_version(capsys):
    with pytest.raises(SystemExit) as stop:
        main(["--version"])
    assert stop.value.code == 0
    assert capsys.readouterr().out.strip() == f"worksheet {__version__}"


def test_issue14_unknown_dataset_gets_a_hint(capsys):
    assert main(["calc", "1", "--constants", "CODATA2020"]) == 2
    assert "did you mean" in capsys.readouterr().err


# --- new --------------------------------------------------------------------------------


def test_issue14_new_writes_a_pinned_starter_that_checks(tmp_path, capsys):
    path = tmp_path / "trial.sheet.md"
    assert main(["new", str(path), "--constants", "CODATA2018"]) == 0
    doc = read_document(path)
    assert doc.get("constants") == "CODATA2018" and doc.get("title") == "trial"
    text = path.read_text()
    assert "Notes in Markdown" in text  # a note
    assert "```calc" in text and "```result" in text
    assert main(["check", str(path)]) == 0
    assert "all hold" in capsys.readouterr().out


def test_issue14_new_never_overwrites(tmp_path, capsys):
    path = tmp_path / "trial.sheet.md"
    path.write_text("mine\n")
    assert main(["new", str(path)]) == 2
    assert "already exists" in capsys.readouterr().err
    assert path.read_text() == "mine\n"


# --- compare ----------------------------------------------------------------------------


def test_issue14_compare_two_sheets(tmp_path, capsys):
    old = tmp_path / "old.sheet.md"
    new = tmp_path / "new.sheet.md"
    old.write_text(sheet("M = 1e12 [kg]\nr = 2*G*M/c^2\nk = 3 [m]"))
    new.write_text(sheet("M = 1.1e12 [kg]\nr = 2*G*M/c^2\nk = 3 [m]\nz = 1 [s]"))
    assert main(["compare", str(old), str(new)]) == 1
    out = capsys.readouterr().out
    row = next(line for line in out.splitlines() if line.startswith("M "))
    assert "1.000e12 kg" in row and "1.100e12 kg" in row and "+0.1000" in row
    assert any(line.startswith("z ") and "(absent)" in line for line in out.splitlines())
    assert not any(line.startswith("k ") for line in out.splitlines())  # agrees: not listed
    assert "3 of 4 quantities differ" in out


def test_issue14_compare_datasets_of_one_sheet(tmp_path, capsys):
    # sigma_T: CODATA 2022 6.6524587051e-29 m^2, CODATA 2018 6.6524587321e-29 (REFERENCE.md)
    path = tmp_path / "s.sheet.md"
    path.write_text(sheet("s = sigma_T\nx = 2 [m]"))
    assert main(["compare", str(path), "--constants", "CODATA2018", "--json"]) == 1
    report = json.loads(capsys.readouterr().out)
    rows = {row["quantity"]: row for row in report["quantities"]}
    expected = 6.6524587321e-29 / 6.6524587051e-29 - 1
    assert rows["s"]["differs"] and rows["s"]["relative_change"] == pytest.approx(expected, 1e-3)
    assert not rows["x"]["differs"]
    assert main(["compare", str(path), "--constants", "CODATA2018", "--within", "1e-6"]) == 0


def test_issue14_compare_needs_a_second_side(tmp_path, capsys):
    path = tmp_path / "s.sheet.md"
    path.write_text(sheet("x = 1 [m]"))
    assert main(["compare", str(path)]) == 2
    assert main(["compare", str(path), "--constants", "CODATA2018", "--within", "lots"]) == 2


# --- budget -----------------------------------------------------------------------------


def test_issue14_budget_overrides_the_front_matter(tmp_path):
    path = tmp_path / "s.sheet.md"
    path.write_text(sheet("x = 1 [m]", extra="budget: 30\n"))
    doc = read_document(path)
    assert SheetRunner(path).settings(doc).seconds == 30
    assert SheetRunner(path, budget=0.5).settings(doc).seconds == 0.5


ENTRY = "import sys; from worksheet.cli import main; sys.exit(main())"


@pytest.mark.slow
def test_issue14_budget_flag_stops_a_long_verb(tmp_path):
    path = tmp_path / "s.sheet.md"
    path.write_text(sheet("x : [1]\ny : [1]\nw = expand((x+y+1)^2000)", extra="budget: 600\n"))
    done = subprocess.run(
        [sys.executable, "-c", ENTRY, "check", str(path), "--budget", "0.5"],
        capture_output=True,
        text=True,
        timeout=60,
        check=False,
    )
    assert done.returncode == 1
    assert "expand ran past its time budget" in done.stdout


def test_issue14_bad_budget_is_a_usage_error(tmp_path, capsys):
    path = tmp_path / "s.sheet.md"
    path.write_text(sheet("x = 1 [m]"))
    assert main(["run", str(path), "--budget", "0"]) == 2
    assert main(["check", str(path), "--budget", "soon"]) == 2


# --- hints inside sheets ----------------------------------------------------------------


@pytest.mark.parametrize(
    ("expression", "hint"),
    [
        ("hbarr*c", "did you mean 'hbar'?"),
        ("1 [kgg]", "did you mean 'kg'?"),
        ("1 [M_son]", "did you mean 'M_sun'?"),
        ("1 [Mev]", "'MeV'"),
        ("sqr(2)", "did you mean 'sqrt'?"),
    ],
)
def test_issue14_did_you_mean_for_names_units_functions(expression, hint, capsys):
    assert main(["calc", expression]) == 1
    assert hint in capsys.readouterr().err


def test_issue14_scipy_reference_for_the_starter_radius(tmp_path):
    # the starter's r_s of 1e12 kg: 2 G M / c^2 with scipy's CODATA 2022 G and c
    path = tmp_path / "trial.sheet.md"
    main(["new", str(path)])
    runner = SheetRunner(path)
    run = runner.run(read_document(path))
    runner.close()
    radius = next(r for r in run.results if r.name == "r_s")
    assert radius.si_value == pytest.approx(2 * sc.G * 1e12 / sc.c**2, rel=1e-12)


def test_issue14_did_you_mean_for_a_sheet_quantity():
    from worksheet.runner import run_text

    run = run_text(sheet("M_pbh = 1e12 [kg]\nr = 2*G*M_pbhh/c^2"))
    assert "unknown name 'M_pbhh'; did you mean 'M_pbh'?" in run.results[1].message
