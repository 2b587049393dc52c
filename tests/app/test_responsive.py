"""A statement that runs into its budget leaves the app responsive."""

from __future__ import annotations

import time
from pathlib import Path

from worksheet.app.app import WorksheetApp
from worksheet.app.screens.help import HelpScreen
from worksheet.app.widgets.calc_cell import CalcCellView

# This integral has no closed form sympy finds quickly; with a 0.5 s budget it is stopped.
SLOW_SHEET = """---
title: Slow integral
constants: CODATA2018
budget: 0.5
---

```calc
x : [m]
y = integrate(exp(-x^7/[m^7])*sin(x/[m])^9, x)
```
"""


def test_budget_overrun_keeps_keys_working(tmp_path: Path, ui) -> None:
    path = tmp_path / "slow.sheet.md"
    path.write_text(SLOW_SHEET, encoding="utf-8")
    app = WorksheetApp(str(path))

    async def scenario(pilot, app: WorksheetApp) -> None:
        await ui.wait_for(pilot, lambda: len(app.query(CalcCellView)) == 1)
        await pilot.pause(0.1)
        assert app.outcome is None  # the run is still going
        started = time.monotonic()
        await pilot.press("f1")
        await ui.wait_for(pilot, lambda: isinstance(app.screen, HelpScreen))
        assert time.monotonic() - started < 0.4  # well inside the budget of the slow line
        assert app.outcome is None  # the help screen came up while the run was going on
        await pilot.press("escape")
        editor = app.query(CalcCellView).first().editor
        editor.focus()
        editor.move_cursor((1, 0))
        await pilot.press(*"# typed while computing", "enter")
        assert editor.text.startswith("x : [m]\n# typed while computing\n")
        await ui.settle(pilot, app)
        text = ui.screen_text(app)
        assert "ERROR" in text and "time budget" in text
        assert app.is_running

    ui.drive(app, scenario)
