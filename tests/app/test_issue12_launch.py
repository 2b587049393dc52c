"""Issue 12: the first paint shows the file's recorded results before the engine starts."""

from __future__ import annotations

import subprocess
import sys
import threading
from pathlib import Path

from worksheet.app.app import RECORDED_NOTICE, WorksheetApp
from worksheet.app.widgets.calc_cell import CalcCellView
from worksheet.app.widgets.note_cell import NoteCellView
from worksheet.app.widgets.result_lines import STATUS_WORDS, ResultLines
from worksheet.app.widgets.status_line import StatusLine

ROOT = Path(__file__).resolve().parents[2]

# A sheet of our own whose result block records a radius the engine will not give
# (r_s = 2GM/c^2 for 5e11 kg is about 7.426e-16 m), so the recorded line and the computed
# one can be told apart on screen.
RECORDED_SHEET = """---
title: Recorded hole
constants: CODATA2018
digits: 4
---

A note.

```calc
M = 5e11 [kg]
r_s = 2*G*M/c^2 in [m]
```

```result
M = 5.000e11 kg
r_s = 9.999e-16 m
```
"""


def _cell_lines(app: WorksheetApp) -> str:
    return "\n".join(str(w.render()) for w in app.query(CalcCellView).first().query(ResultLines))


def test_issue12_recorded_lines_are_on_screen_before_the_engine_runs(tmp_path: Path, ui) -> None:
    path = tmp_path / "recorded.sheet.md"
    path.write_text(RECORDED_SHEET, encoding="utf-8")
    app = WorksheetApp(str(path))
    gate = threading.Event()
    app.service.gate = gate  # the engine may not start until the test says so
    ok_word = STATUS_WORDS["ok"]

    async def scenario(pilot, app: WorksheetApp) -> None:
        await pilot.pause(0.3)
        screen = ui.screen_text(app)
        assert app.service.started is None and app.outcome is None
        assert "pending r_s = 9.999e-16 m" in screen
        assert "pending M = 5.000e11 kg" in screen
        assert "7.426e-16" not in screen
        # No status word before a run has checked the lines; the status line says whose
        # lines they are.
        assert f"{ok_word} " not in _cell_lines(app)
        assert str(app.query_one(StatusLine).render()).startswith(RECORDED_NOTICE)
        gate.set()
        await ui.settle(pilot, app)
        lines = _cell_lines(app)
        assert "7.426e-16" in lines and "9.999e-16" not in lines
        assert "pending" not in lines and f"{ok_word} " in lines
        assert RECORDED_NOTICE not in ui.screen_text(app)
        # The note drawn from its source at the first paint is rendered Markdown by now.
        note = app.query(NoteCellView).first()
        assert not note.source_first and len(note.query("Markdown")) == 1

    ui.drive(app, scenario)


# Import what the app needs for its first paint and list the heavy modules then loaded.
def loaded_after_first_paint_imports(modules: tuple[str, ...]) -> str:
    """A program that imports the first paint's modules and prints which of ``modules``
    they loaded."""
    return f"""
import sys
import worksheet.app.app, worksheet.app.session, worksheet.document
import worksheet.app.widgets.sheet_view, worksheet.app.widgets.calc_cell
print(sorted(m for m in {modules!r} if m in sys.modules))
"""


IMPORTS = loaded_after_first_paint_imports(("sympy", "numpy", "pint", "worksheet.engine"))


def test_issue12_first_paint_modules_do_not_import_sympy() -> None:
    done = subprocess.run(
        [sys.executable, "-c", IMPORTS], capture_output=True, text=True, cwd=ROOT, timeout=120
    )
    assert done.returncode == 0, done.stderr
    assert done.stdout.strip() == "[]"


# Modules only a later step needs: the dataset (the constants finder, a new sheet's
# front matter), the chart widgets (a run's plots), rendered Markdown and the editors
# (after the paint).
LATER = (
    "worksheet.constants",
    "worksheet.app.chart_canvas",
    "textual.widgets._markdown",
    "textual.widgets._text_area",
)
LATER_IMPORTS = loaded_after_first_paint_imports(LATER)


def test_issue12_first_paint_modules_leave_later_steps_unloaded() -> None:
    done = subprocess.run(
        [sys.executable, "-c", LATER_IMPORTS], capture_output=True, text=True, cwd=ROOT, timeout=120
    )
    assert done.returncode == 0, done.stderr
    assert done.stdout.strip() == "[]"


def test_issue12_note_source_joins_paragraph_lines_and_keeps_blocks() -> None:
    from worksheet.app.widgets.note_cell import source_text

    shown = source_text("# Budget\n\nA long\nparagraph here.\n\n- one\n- two\n1. first\n")
    assert shown.plain == "Budget\n\nA long paragraph here.\n\n- one\n- two\n1. first"
    heading = shown.plain.index("Budget")
    assert any(span.style == "bold" and span.start == heading for span in shown.spans)
