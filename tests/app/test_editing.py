"""Editing a given updates its dependents on screen; saving writes what `worksheet run` would."""

from __future__ import annotations

from pathlib import Path

import scipy.constants as sc

from worksheet.app.app import WorksheetApp
from worksheet.app.widgets.calc_cell import CalcCellView
from worksheet.document import parse_document
from worksheet.runner import SheetRunner


def recorded(value: float) -> str:
    """4 significant figures in the sheet's documented notation (SPEC section 4)."""
    mantissa, exponent = f"{value:.3e}".split("e")
    return f"{mantissa}e{int(exponent)}"


def test_change_a_given_then_save(basic_sheet: Path, ui) -> None:
    app = WorksheetApp(str(basic_sheet))
    # Independent reference: r_s = 2GM/c^2 with scipy's G (same digits in CODATA 2018/2022).
    old_radius = recorded(2 * sc.G * 5e11 / sc.c**2)
    new_radius = recorded(2 * sc.G * 1e12 / sc.c**2)

    async def scenario(pilot, app: WorksheetApp) -> None:
        await ui.settle(pilot, app)
        # The value, not the whole line: the line may also carry an uncertainty from G.
        assert f"r_s = {old_radius}" in ui.screen_text(app)
        editor = app.query(CalcCellView).first().editor
        editor.focus()
        editor.move_cursor((0, 4))
        await pilot.press("delete", "delete", "delete", "delete", *"1e12")
        await pilot.pause(0.1)
        await ui.settle(pilot, app)
        text = ui.screen_text(app)
        assert f"r_s = {new_radius}" in text
        assert f"r_s = {old_radius}" not in text
        assert app.session.dirty
        await pilot.press("ctrl+s")
        await ui.wait_for(pilot, lambda: not app.session.dirty)

    ui.drive(app, scenario)
    edited = ui.basic_text.replace("M = 5e11 [kg]", "M = 1e12 [kg]")
    runner = SheetRunner()
    try:
        expected = runner.run(parse_document(edited)).text
    finally:
        runner.close()
    assert basic_sheet.read_text(encoding="utf-8") == expected
    assert f"r_s = {new_radius}" in expected


def test_bracketed_units_are_visible(basic_sheet: Path, ui) -> None:
    # The markup trap: "[kg]" and "[K]" must reach the screen from notes, editors and results.
    app = WorksheetApp(str(basic_sheet))

    async def scenario(pilot, app: WorksheetApp) -> None:
        await ui.settle(pilot, app)
        text = ui.screen_text(app)
        assert "Notes with a unit: [kg] stays visible." in text  # rendered note
        assert "M = 5e11 [kg]" in text  # editor
        assert "check T_H ~ 1e11 [K]: holds" in text  # result line

    ui.drive(app, scenario)


def test_missing_file_opens_a_new_sheet(tmp_path: Path, ui) -> None:
    path = tmp_path / "fresh.sheet.md"
    app = WorksheetApp(str(path))

    async def scenario(pilot, app: WorksheetApp) -> None:
        await ui.settle(pilot, app)
        assert "fresh" in ui.screen_text(app).splitlines()[0]
        editor = app.query(CalcCellView).first().editor
        editor.focus()
        await pilot.press(*"x = 3 [m]")
        await ui.settle(pilot, app)
        assert "x = 3.000 m" in ui.screen_text(app)
        await pilot.press("ctrl+s")
        await ui.wait_for(pilot, path.exists)

    ui.drive(app, scenario)
    text = path.read_text(encoding="utf-8")
    assert text.startswith("---\ntitle: fresh\n")
    assert "x = 3 [m]\n```\n\n```result\nx = 3.000 m\n```\n" in text


def test_evaluation_error_keeps_the_app_and_the_edit(basic_sheet: Path, ui) -> None:
    app = WorksheetApp(str(basic_sheet))

    async def scenario(pilot, app: WorksheetApp) -> None:
        await ui.settle(pilot, app)
        editor = app.query(CalcCellView).last().editor
        editor.focus()
        editor.move_cursor((0, len(editor.document.lines[0])))
        await pilot.press(*" + t_unknown")
        await ui.settle(pilot, app)
        text = ui.screen_text(app)
        assert "ERROR" in text and "t_unknown" in text
        assert app.is_running
        assert "A = 4*pi*r_s^2 + t_unknown" in app.session.doc.blocks[-1].body

    ui.drive(app, scenario)
