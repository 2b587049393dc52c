"""The pytest plugin, run in a throwaway pytest session (pytester) on sheets made here.

The plugin is loaded through its installed ``pytest11`` entry point, as for any user.
"""

from __future__ import annotations

import math
import re
import shutil
from importlib.metadata import entry_points
from pathlib import Path

import pytest
import scipy.constants as sc

import worksheet

pytest_plugins = ["pytester"]

CORPUS = Path(__file__).resolve().parents[1] / "document" / "corpus"

M_PBH = 1e12  # kg
# Hawking temperature T = hbar c^3 / (8 pi G M k_B) (Hawking 1975), scipy CODATA 2022.
T_HAWKING = sc.hbar * sc.c**3 / (8 * math.pi * sc.G * M_PBH * sc.k)


def sheet_text(*lines: str) -> str:
    return "---\nconstants: CODATA2022\n---\n\n```calc\n" + "\n".join(lines) + "\n```\n"


# Holds only if the engine's temperature agrees with scipy's to 1e-9.
HOLDING = sheet_text(
    "M = 1e12 [kg]",
    "T_H = hbar*c^3/(8*pi*G*M*k_B) in [K]",
    f"check T_H == {T_HAWKING!r} [K] within 1e-9",
    "check T_H > 1e11 [K]",
)

# Line 7: a holding claim; 8: fails (T_H is 1.23e11 K); 9: a dimension error;
# 10: a claim on the erring line, skipped. Never saved, so its results are not current.
FAILING = sheet_text(
    "T_H = hbar*c^3/(8*pi*G*1e12 [kg]*k_B) in [K]",
    "check T_H > 1e10 [K]",
    "check T_H < 1e11 [K]",
    "x = 1 [m] + 2 [s]",
    "check x > 0 [m]",
)


@pytest.fixture
def two_sheets(pytester: pytest.Pytester) -> pytest.Pytester:
    folder = pytester.mkdir("sheets")
    (folder / "holding.sheet.md").write_text(HOLDING, encoding="utf-8")
    worksheet.load(folder / "holding.sheet.md").save()  # record its results
    (folder / "failing.sheet.md").write_text(FAILING, encoding="utf-8")
    return pytester


def test_entry_point_is_declared() -> None:
    found = [ep for ep in entry_points(group="pytest11") if ep.name == "worksheet"]
    assert [ep.value for ep in found] == ["worksheet.pytest_plugin"]


def test_holding_and_failing_sheets_give_the_right_counts(two_sheets: pytest.Pytester) -> None:
    outcome = two_sheets.runpytest("--sheets", "-v", "-rs")
    # holding: two claims and "current" pass. failing: one claim passes; the failing claim,
    # the erring line and "current" fail; the claim on the erring line is skipped.
    outcome.assert_outcomes(passed=4, failed=3, skipped=1)
    outcome.stdout.fnmatch_lines(
        [
            "*failing.sheet.md::line 8: check T_H < 1e11 [[]K[]] FAILED*",
            "*failing.sheet.md::line 9: x = 1 [[]m[]] + 2 [[]s[]] FAILED*",
            "*failing.sheet.md::line 10: check x > 0 [[]m[]] SKIPPED*",
            "*failing.sheet.md::recorded results are current FAILED*",
            "*holding.sheet.md::line 8: check T_H == * [[]K[]] within 1e-9 PASSED*",
            "*holding.sheet.md::recorded results are current PASSED*",
            # The skip is reported at the sheet's line, with the engine's reason.
            "SKIPPED [[]1[]] sheets/failing.sheet.md: line 10: depends on line 9, which failed",
        ]
    )


def test_failure_text_shows_left_and_right(two_sheets: pytest.Pytester) -> None:
    text = two_sheets.runpytest("--sheets").stdout.str()
    assert "_ failing.sheet.md:8: check T_H < 1e11 [K] _" in text  # the failure's headline
    assert "check T_H < 1e11 [K]: fails" in text
    found = re.search(r"left (\S+) K, right (\S+) K", text)
    assert found is not None, text
    left, right = (float(number) for number in found.groups())
    assert math.isclose(left, T_HAWKING, rel_tol=1e-5)  # printed to 6 digits
    assert right == 1e11
    assert "cannot add length (1 [m], m) and time (2 [s], s)" in text


def test_staleness_shows_recorded_and_recomputed(two_sheets: pytest.Pytester) -> None:
    holding = two_sheets.path / "sheets" / "holding.sheet.md"
    holding.write_text(
        holding.read_text(encoding="utf-8").replace("M = 1e12 [kg]", "M = 2e12 [kg]"),
        encoding="utf-8",
    )
    outcome = two_sheets.runpytest("--sheets", "sheets/holding.sheet.md")
    # The exact claim fails now (the temperature halved); the "> 1e11 K" one still fails
    # too (6.1e10 K), and the recorded results are stale.
    outcome.assert_outcomes(passed=0, failed=3)
    text = outcome.stdout.str()
    assert "recorded: M = 1.000e12 kg; recomputed: M = 2.000e12 kg" in text
    assert "worksheet run holding.sheet.md" in text


def test_sheets_are_not_collected_unless_enabled(pytester: pytest.Pytester) -> None:
    for odd in sorted(CORPUS.glob("*.sheet.md")):
        shutil.copy(odd, pytester.path / odd.name)
    pytester.makepyfile(test_plain="def test_plain():\n    assert 1 + 1 == 2\n")
    outcome = pytester.runpytest()
    outcome.assert_outcomes(passed=1)
    assert ".sheet.md" not in outcome.stdout.str()


def test_ini_setting_enables_collection(pytester: pytest.Pytester) -> None:
    (pytester.path / "holding.sheet.md").write_text(HOLDING, encoding="utf-8")
    pytester.makeini("[pytest]\nworksheet_sheets = true\n")
    outcome = pytester.runpytest()
    # Two holding claims; never saved, so not current.
    outcome.assert_outcomes(passed=2, failed=1)


def test_unrunnable_sheet_is_one_failing_item(pytester: pytest.Pytester) -> None:
    (pytester.path / "old.sheet.md").write_text(
        "---\nconstants: CODATA1999\n---\n\n```calc\nx = 1 [m]\n```\n", encoding="utf-8"
    )
    outcome = pytester.runpytest("--sheets", "-v")
    outcome.assert_outcomes(failed=1)
    outcome.stdout.fnmatch_lines(["*old.sheet.md::sheet can be run FAILED*"])
    assert "'constants: CODATA1999' is not a known dataset" in outcome.stdout.str()


def test_unpinned_sheet_warns(pytester: pytest.Pytester) -> None:
    (pytester.path / "loose.sheet.md").write_text("```calc\nx = 1 [m]\n```\n", encoding="utf-8")
    outcome = pytester.runpytest("--sheets")
    outcome.assert_outcomes(failed=1, warnings=1)  # only "current" (never saved)
    assert "does not pin its constants" in outcome.stdout.str()
