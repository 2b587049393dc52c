"""The key hints line: the app's shown keys in one line, a click on a hint presses its key."""

from __future__ import annotations

from pathlib import Path

from worksheet.app.app import WorksheetApp
from worksheet.app.keys import KEY_ACTIONS
from worksheet.app.screens.help import HelpScreen
from worksheet.app.widgets.key_hints import KeyHints


def test_key_hints_show_the_footer_keys_and_the_palette(basic_sheet: Path, ui) -> None:
    async def scenario(pilot, app: WorksheetApp) -> None:
        await ui.settle(pilot, app)
        hints = app.query_one(KeyHints)
        shown = {hint.description for hint in hints.hints}
        wanted = {key.label for key in KEY_ACTIONS if key.in_footer}
        assert wanted <= shown
        assert not {key.label for key in KEY_ACTIONS if not key.in_footer} & shown
        last = ui.screen_text(app).splitlines()[-1]
        for key in KEY_ACTIONS:
            if key.in_footer:
                display = key.key.replace("ctrl+", "^")
                assert f" {display} {key.label} " in last, (key, last)
        assert last.endswith("▏^p palette ")
        # Each hint's tooltip is what the key does (as the help screen says it).
        help_hint = next(hint for hint in hints.hints if hint.key == "f1")
        assert help_hint.tooltip == KEY_ACTIONS[0].description

    ui.drive(WorksheetApp(str(basic_sheet)), scenario, size=(100, 30))


def test_a_click_on_the_help_hint_opens_help(basic_sheet: Path, ui) -> None:
    async def scenario(pilot, app: WorksheetApp) -> None:
        await ui.settle(pilot, app)
        hints = app.query_one(KeyHints)
        column = ui.screen_text(app).splitlines()[-1].index("f1 Help")
        assert hints.hint_at(column).key == "f1"
        assert hints.hint_at(column - 2).key != "f1"
        await pilot.click(KeyHints, offset=(column + 1, 0))
        await ui.wait_for(pilot, lambda: isinstance(app.screen, HelpScreen))

    ui.drive(WorksheetApp(str(basic_sheet)), scenario, size=(100, 30))
