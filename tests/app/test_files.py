"""Recovery copies, restoring them, and quitting with unsaved edits."""

from __future__ import annotations

import os
from pathlib import Path

from worksheet.app.app import WorksheetApp
from worksheet.app.recovery import newer_recovery, recovery_path
from worksheet.app.screens.choice import ChoiceScreen
from worksheet.app.widgets.calc_cell import CalcCellView


def test_recovery_copy_is_kept_while_unsaved_and_removed_on_save(basic_sheet: Path, ui) -> None:
    app = WorksheetApp(str(basic_sheet))
    app.RECOVERY_SECONDS = 0.2
    copy = recovery_path(basic_sheet)

    async def scenario(pilot, app: WorksheetApp) -> None:
        await ui.settle(pilot, app)
        assert not copy.exists()  # nothing unsaved yet
        editor = app.query(CalcCellView).last().editor
        editor.focus()
        editor.move_cursor((0, len(editor.document.lines[0])))
        await pilot.press(*" * 2")
        # The copy follows the edits: the last one reaches it within a few intervals.
        await ui.wait_for(
            pilot,
            lambda: copy.exists() and "A = 4*pi*r_s^2 * 2\n" in copy.read_text(encoding="utf-8"),
        )
        await pilot.press("ctrl+s")
        await ui.wait_for(pilot, lambda: not app.session.dirty)
        await pilot.pause(0.4)
        assert not copy.exists()

    ui.drive(app, scenario)


def test_newer_recovery_copy_is_offered_and_restored(basic_sheet: Path, ui) -> None:
    copy = recovery_path(basic_sheet)
    copy.write_text(ui.basic_text.replace("M = 5e11 [kg]", "M = 7e11 [kg]"), encoding="utf-8")
    sheet_time = basic_sheet.stat().st_mtime
    os.utime(copy, (sheet_time + 10, sheet_time + 10))
    assert newer_recovery(basic_sheet) is not None
    app = WorksheetApp(str(basic_sheet))

    async def scenario(pilot, app: WorksheetApp) -> None:
        await ui.wait_for(pilot, lambda: isinstance(app.screen, ChoiceScreen))
        assert "recovery copy" in ui.screen_text(app)
        await pilot.click("#restore")
        await ui.settle(pilot, app)
        assert app.session.dirty
        assert "M = 7e11 [kg]" in ui.screen_text(app)
        assert "M = 7.000e11 kg" in ui.screen_text(app)
        await pilot.press("ctrl+s")
        await ui.wait_for(pilot, lambda: not app.session.dirty)

    ui.drive(app, scenario)
    assert "M = 7e11 [kg]" in basic_sheet.read_text(encoding="utf-8")
    assert not copy.exists()


def test_older_recovery_copy_is_not_offered(basic_sheet: Path, ui) -> None:
    copy = recovery_path(basic_sheet)
    copy.write_text("stale copy\n", encoding="utf-8")
    sheet_time = basic_sheet.stat().st_mtime
    os.utime(copy, (sheet_time - 100, sheet_time - 100))
    assert newer_recovery(basic_sheet) is None


def test_quit_with_unsaved_edits_asks(basic_sheet: Path, ui) -> None:
    app = WorksheetApp(str(basic_sheet))

    async def scenario(pilot, app: WorksheetApp) -> None:
        await ui.settle(pilot, app)
        editor = app.query(CalcCellView).first().editor
        editor.focus()
        await pilot.press(*"# edited", "enter")
        await pilot.press("ctrl+q")
        await ui.wait_for(pilot, lambda: isinstance(app.screen, ChoiceScreen))
        assert "unsaved edits" in ui.screen_text(app)
        await pilot.press("escape")  # keep editing
        await ui.wait_for(pilot, lambda: not isinstance(app.screen, ChoiceScreen))
        assert app.is_running
        await pilot.press("ctrl+q")
        await ui.wait_for(pilot, lambda: isinstance(app.screen, ChoiceScreen))
        await pilot.click("#discard")
        await ui.wait_for(pilot, lambda: not app.is_running)

    ui.drive(app, scenario)
    assert basic_sheet.read_text(encoding="utf-8") == ui.basic_text
    assert app.return_code == 0


def test_quit_without_edits_does_not_ask(basic_sheet: Path, ui) -> None:
    app = WorksheetApp(str(basic_sheet))

    async def scenario(pilot, app: WorksheetApp) -> None:
        await ui.settle(pilot, app)
        await pilot.press("ctrl+q")
        await ui.wait_for(pilot, lambda: not app.is_running)

    ui.drive(app, scenario)
    assert basic_sheet.read_text(encoding="utf-8") == ui.basic_text


UNRECORDED = """\
---
title: Two cells, no results yet
constants: CODATA2022
---

```calc
a = 1 [m]
b = 2 [s]
```

```calc
d = a + b
```
"""
"""No result blocks: the first save inserts one after each cell, moving the second cell."""


def test_issue10_save_cites_the_lines_of_the_file_written(tmp_path: Path, ui) -> None:
    """The app's save writes what `worksheet run` writes: errors cite the saved file's lines."""
    sheet = tmp_path / "moved.sheet.md"
    sheet.write_text(UNRECORDED, encoding="utf-8")
    app = WorksheetApp(str(sheet))

    async def scenario(pilot, app: WorksheetApp) -> None:
        await ui.settle(pilot, app)
        await pilot.press("ctrl+s")
        await ui.wait_for(pilot, lambda: sheet.read_text(encoding="utf-8") != UNRECORDED)
        await ui.wait_for(pilot, lambda: not app.session.dirty)

    ui.drive(app, scenario)
    saved = sheet.read_text(encoding="utf-8").splitlines()
    written_line = saved.index("d = a + b") + 1  # 1-based, in the file as saved
    errors = [line for line in saved if "cannot add" in line]
    assert errors and errors[0].startswith(f"line {written_line}, "), errors
    assert written_line != UNRECORDED.splitlines().index("d = a + b") + 1  # it did move
