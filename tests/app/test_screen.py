"""The screen at a fixed size (80x24), the help screen and the command palette."""

from __future__ import annotations

from pathlib import Path

import scipy.constants as sc

from worksheet.app.app import WorksheetApp
from worksheet.app.keys import KEY_ACTIONS
from worksheet.app.screens.help import HelpScreen
from worksheet.app.widgets.calc_cell import CalcCellView
from worksheet.document import CalcCell


def recorded(value: float) -> str:
    """4 significant figures in the sheet's documented notation (SPEC section 4)."""
    mantissa, exponent = f"{value:.3e}".split("e")
    return f"{mantissa}e{int(exponent)}"


def test_screen_at_80x24(basic_sheet: Path, ui) -> None:
    shots: list[str] = []
    # References from scipy.constants, not from the engine.
    radius = recorded(2 * sc.G * 5e11 / sc.c**2)
    temperature = recorded(sc.hbar * sc.c**3 / (8 * sc.pi * sc.G * 5e11 * sc.k))

    async def scenario(pilot, app: WorksheetApp) -> None:
        await ui.settle(pilot, app)
        shots.append(ui.screen_text(app))

    for _ in range(2):
        ui.drive(WorksheetApp(str(basic_sheet)), scenario, size=(80, 24))
    first, second = shots
    assert first == second  # nothing variable (clock, blink, timing) on screen
    lines = first.splitlines()
    assert len(lines) == 24 and all(len(line) == 80 for line in lines)
    assert lines[0].startswith(" Light hole  (hole.sheet.md)")
    assert str(basic_sheet.parent) not in first  # no paths of this machine
    # Below 100 columns the sheet has the whole width; the panel key shows the quantities.
    assert "Quantities" not in first
    assert any("Notes with a unit: [kg] stays visible." in line for line in lines)
    assert any("M = 5e11 [kg]   # starting mass" in line for line in lines)
    # Freshly computed lines say ok; the status line says the file records them otherwise.
    # Values, not whole lines: a line may also carry the uncertainty that G brings in.
    assert any(line.strip().startswith(f"ok      r_s = {radius} ") for line in lines)
    assert any(line.strip().startswith(f"ok      T_H = {temperature} ") for line in lines)
    assert any(line.strip() == "ok      check T_H ~ 1e11 [K]: holds" for line in lines)
    assert "STALE" not in first
    status = " 5 results: 5 ok  |  the file records 5 results differently"
    assert lines[22].startswith(status), lines[22]
    assert "f1 Help" in lines[23] and "^s Save" in lines[23] and "f2 Constant" in lines[23]


def test_help_lists_every_key(basic_sheet: Path, ui) -> None:
    app = WorksheetApp(str(basic_sheet))

    async def scenario(pilot, app: WorksheetApp) -> None:
        await ui.settle(pilot, app)
        await pilot.press("f1")
        await ui.wait_for(pilot, lambda: isinstance(app.screen, HelpScreen))
        await pilot.pause(0.1)
        text = ui.screen_text(app)
        for key in KEY_ACTIONS:
            assert key.key in text, key
        await pilot.press("escape")
        await ui.wait_for(pilot, lambda: not isinstance(app.screen, HelpScreen))

    ui.drive(app, scenario, size=(110, 50))


def test_every_action_is_in_the_command_palette(basic_sheet: Path, ui) -> None:
    app = WorksheetApp(str(basic_sheet))

    async def scenario(pilot, app: WorksheetApp) -> None:
        await ui.settle(pilot, app)
        titles = [command.title for command in app.get_system_commands(app.screen)]
        for key in KEY_ACTIONS:
            assert f"{key.label} ({key.key})" in titles
        app.query(CalcCellView).last().editor.focus()
        blocks = len(app.session.doc.blocks)
        await pilot.press("ctrl+p")
        await pilot.pause(0.2)
        await pilot.press(*"New calc")
        await pilot.pause(0.5)
        await pilot.press("enter")
        await ui.wait_for(pilot, lambda: len(app.session.doc.blocks) == blocks + 1)
        assert isinstance(app.session.doc.blocks[-1], CalcCell)

    ui.drive(app, scenario)


def test_ledger_links_jump_to_the_line(basic_sheet: Path, ui) -> None:
    app = WorksheetApp(str(basic_sheet))

    async def scenario(pilot, app: WorksheetApp) -> None:
        await ui.settle(pilot, app)
        await pilot.press("f4")  # the ledger; its first row is M
        await pilot.press("down")  # r_s, defined on line 11
        await pilot.pause(0.1)
        text = ui.screen_text(app)
        assert "reads M (line 10)" in text
        assert "used on line 19" in text  # A = 4*pi*r_s^2
        await pilot.press("tab")  # the links list
        links = app.query_one("#links")
        assert links.has_focus
        # Options: header, defined on 11, reads M (10), used on 19.
        while links.highlighted is None or "19" not in (links.highlighted_option.id or ""):
            await pilot.press("down")
        await pilot.press("enter")
        await pilot.pause(0.1)
        last = app.query(CalcCellView).last()
        assert last.editor.has_focus

    ui.drive(app, scenario)
