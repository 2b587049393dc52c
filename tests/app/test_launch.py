"""The first paint needs textual and the file layer only; the engine loads after it."""

from __future__ import annotations

import subprocess
import sys
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[2]

# Open the app headless; at the first refresh with the cells drawn (where the app starts
# its first run) report which heavy modules are loaded, then let the run go on and report
# again once its results are shown.
CHILD = """
import sys
from worksheet.app.app import WorksheetApp

HEAVY = ("sympy", "numpy", "pint", "worksheet.engine", "worksheet.runner")


class Watched(WorksheetApp):
    painted = False

    def start_run(self):
        if not self.painted:
            self.painted = True
            text = "\\n".join(s.text for s in self.screen._compositor.render_strips())
            print("painted", "calc  from line" in text, flush=True)
            print("at paint", [m for m in HEAVY if m in sys.modules], flush=True)
        super().start_run()

    def apply_outcome(self, outcome, generation):
        super().apply_outcome(outcome, generation)
        print("after run", [m for m in HEAVY if m in sys.modules], flush=True)
        self.call_later(self.finish, 0)  # after this callback has returned to the run


app = Watched(sys.argv[1])
app.run(headless=True, size=(100, 30))
app.close_service()
"""


@pytest.mark.slow
def test_first_paint_before_the_engine_is_imported() -> None:
    sheet = ROOT / "sheets" / "burst-budget.sheet.md"
    done = subprocess.run(
        [sys.executable, "-c", CHILD, str(sheet)],
        capture_output=True,
        text=True,
        cwd=ROOT,
        timeout=120,
    )
    assert done.returncode == 0, done.stderr
    lines = done.stdout.splitlines()
    assert lines[0] == "painted True"
    assert lines[1] == "at paint []"
    assert lines[2].startswith("after run") and "sympy" in lines[2]


def test_the_run_service_is_made_once_and_never_after_close() -> None:
    from worksheet.app.lazy_service import LazyRunService

    closed = LazyRunService()
    closed.close()
    assert closed.get() is None and closed.started is None
    lazy = LazyRunService()
    assert lazy.started is None
    try:
        first = lazy.get()
        assert first is not None and lazy.get() is first and lazy.started is first
    finally:
        lazy.close()
    assert lazy.get() is None
