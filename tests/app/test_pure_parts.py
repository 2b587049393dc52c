"""The app's pure parts: highlighting spans, the session's history, the quantity ledger."""

from __future__ import annotations

import subprocess
import sys
from pathlib import Path

import pytest

from worksheet.app.evaluation import RunService
from worksheet.app.highlight import line_spans
from worksheet.app.session import SheetSession, body_from_editor, editor_text, sheet_title
from worksheet.document import parse_document, render_document


@pytest.mark.parametrize(
    ("line", "kinds"),
    [
        ("M = 5e11 [kg]", ["name", "number", "unit"]),  # a given with a unit
        ("y = integrate(f, x)", ["name", "verb", "name", "name"]),  # a derivation verb
        ("check T ~ 1e11 [K]", ["keyword", "name", "number", "unit"]),  # a claim
        ("z = sqrt(2)  # root", ["name", "function", "number", "comment"]),  # function, comment
        ("q = 3 [m", ["name", "number", "unit"]),  # an unclosed bracket while typing
        ("ħ = 1.5e-3", ["name", "number"]),  # a non-ASCII name
        ("", []),  # an empty line
    ],
)
def test_highlight_kinds(line: str, kinds: list[str]) -> None:
    assert [kind for _, _, kind in line_spans(line)] == kinds


def test_highlight_spans_cover_the_token_text() -> None:
    line = "T = hbar*c^3 in [K]  # note"
    pieces = [line[start:end] for start, end, _ in line_spans(line)]
    assert pieces == ["T", "hbar", "c", "3", "in", "[K]", "# note"]


def test_editor_text_round_trip() -> None:
    for body in ("", "x = 1\n", "x = 1\ny = 2\n"):
        assert body_from_editor(editor_text(body)) == body


def test_sheet_title_from_file_name() -> None:
    assert sheet_title(Path("burst.sheet.md")) == "burst"
    assert sheet_title(Path("notes.md")) == "notes"


SHEET = "---\ntitle: t\nconstants: CODATA2018\n---\n\n```calc\na = 1 [m]\n```\n\nA note.\n"


def _session(tmp_path: Path) -> SheetSession:
    path = tmp_path / "s.sheet.md"
    path.write_text(SHEET, encoding="utf-8")
    return SheetSession.open(path)


def test_session_typing_coalesces_and_undo_restores(tmp_path: Path) -> None:
    session = _session(tmp_path)
    assert not session.dirty
    assert session.edit_cell(1, "a = 1 [m]\nb")
    assert session.edit_cell(1, "a = 1 [m]\nb = 2")  # same cell, at once: one undo step
    assert not session.edit_cell(1, "a = 1 [m]\nb = 2")  # unchanged text is no edit
    assert session.dirty
    assert len(session.undo_stack) == 1
    assert session.undo()
    assert render_document(session.doc) == SHEET
    assert not session.dirty
    assert session.redo()
    assert session.doc.blocks[1].body == "a = 1 [m]\nb = 2\n"


def test_session_cell_operations(tmp_path: Path) -> None:
    session = _session(tmp_path)  # blocks: the blank line, the calc cell, the note
    session.add_calc(3, "c = 3 [s]")
    assert [type(b).__name__ for b in session.doc.blocks] == [
        "NoteBlock",
        "CalcCell",
        "NoteBlock",
        "CalcCell",
    ]
    session.move(3, -1)
    assert session.doc.blocks[2].body == "c = 3 [s]\n"
    session.delete(2)
    assert len(session.doc.blocks) == 3
    session.undo()
    session.undo()
    session.undo()
    assert render_document(session.doc) == SHEET


def test_missing_file_gives_a_new_unsaved_sheet(tmp_path: Path) -> None:
    session = SheetSession.open(tmp_path / "new.sheet.md")
    assert session.dirty
    assert session.doc.get("title") == "new"


def test_ledger_rows_origins_and_links() -> None:
    doc = parse_document(
        "---\nconstants: CODATA2018\n---\n\n```calc\n"
        "M = 2 [kg]\n"  # line 6: a given
        "E = M*c^2\n"  # line 7: derived from M and the constant c
        "x : [m]\n"  # line 8: declared
        "check E > 1 [J]\n"  # line 9: a claim reading E
        "```\n"
    )
    service = RunService()
    try:
        outcome = service.run(doc)
    finally:
        service.close()
    assert outcome is not None and outcome.run is not None
    rows = {row.name: row for row in outcome.rows}
    assert rows["M"].origin == "given, line 6"
    assert rows["E"].origin == "derived, line 7"
    assert rows["x"].origin == "declared, line 8"
    assert rows["c"].origin == "constant, CODATA2018"
    assert rows["E"].reads == (("M", 6),)
    assert rows["M"].read_by == (7,)
    assert rows["E"].read_by == (9,)
    assert rows["c"].read_by == (7,)
    assert rows["E"].dimension == "energy"
    assert rows["E"].unit == "J"


def test_a_broken_front_matter_is_a_message_not_a_crash() -> None:
    doc = parse_document("---\nconstants: NOPE\n---\n\n```calc\na = 1\n```\n")
    service = RunService()
    try:
        outcome = service.run(doc)
    finally:
        service.close()
    assert outcome is not None and outcome.run is None
    assert "NOPE" in (outcome.problem or "")


def test_importing_the_app_package_does_not_load_textual() -> None:
    # The command line imports worksheet.app only for `open`; launch imports textual late.
    code = "import sys, worksheet.app; print('textual' in sys.modules)"
    done = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    assert done.stdout.strip() == "False"


def test_finder_offers_common_si_units_by_name_or_kind() -> None:
    from worksheet.app.screens.finder import search
    from worksheet.constants import load_dataset

    dataset = load_dataset("CODATA2018")
    assert "[J]" in [found.insert for found in search(dataset, "joule")]
    assert "[Pa]" in [found.insert for found in search(dataset, "pressure")]
    assert "[TeV]" in [found.insert for found in search(dataset, "teraelectronvolt")]


def test_common_units_resolve_to_the_dimension_they_are_listed_under() -> None:
    from worksheet.app.unit_list import COMMON_UNITS
    from worksheet.constants import load_dataset
    from worksheet.syntax.units import parse_unit
    from worksheet.units.registry import UnitRegistry

    registry = UnitRegistry(load_dataset("CODATA2018"))
    for symbol, _name, kind in COMMON_UNITS:
        unit = registry.resolve(parse_unit(symbol))
        assert unit.dimension.name().removeprefix("dimension ") == kind, symbol
    # Spot checks of factors against SI definitions (exact by the 2019 SI).
    assert registry.resolve(parse_unit("eV")).factor == pytest.approx(1.602176634e-19)
    assert registry.resolve(parse_unit("bar")).factor == pytest.approx(1e5)


def test_ledger_rows_carry_uncertainties() -> None:
    import scipy.constants as sc

    doc = parse_document(
        "---\nconstants: CODATA2018\n---\n\n```calc\n"
        "M = 2 [kg] +- 5%\n"  # a given with a standard uncertainty of 0.1 kg
        "E = M*c^2\n"
        "F = G*M^2/(1 [m])^2\n"
        "```\n"
    )
    service = RunService()
    try:
        outcome = service.run(doc)
    finally:
        service.close()
    assert outcome is not None and outcome.run is not None
    rows = {row.name: row for row in outcome.rows}
    assert rows["M"].shown_value == "2.000 +- 0.10 kg"
    assert rows["c"].uncertainty == "exact"  # c is exact in the SI
    # G's standard uncertainty from scipy (CODATA 2018 there too), two figures.
    expected = f"{sc.physical_constants['Newtonian constant of gravitation'][2]:.1e}"
    assert rows["G"].uncertainty == expected
