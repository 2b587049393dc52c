"""Issue 10, the app's face of the cross-face check: the quantities panel shows, for every
quantity of every demo sheet, the value, uncertainty and unit of the Python API.

The panel is read from the screen text at 120 x 40, each entry while it is highlighted
(so every entry is reached by moving through the panel, and seen whole).
"""

from __future__ import annotations

import math
import re
from pathlib import Path

import pytest

import worksheet
from worksheet.app.app import WorksheetApp

SHEETS = sorted((Path(__file__).parents[2] / "sheets").glob("*.sheet.md"))
ENTRY = re.compile(r"^= (?P<value>\S+)(?: \+- (?P<spread>\S+))? (?P<rest>.*)$")


def _number(text: str) -> float | None:
    try:
        return float(text)
    except ValueError:
        return None


def _close(shown: float, exact: float, digits: int) -> bool:
    """``shown`` is ``exact`` rounded to ``digits`` significant figures (half an ulp)."""
    if exact == 0:
        return shown == 0
    return abs(shown - exact) <= 0.5 * 10 ** (math.floor(math.log10(abs(exact))) - digits + 1)


@pytest.mark.parametrize("path", SHEETS, ids=[p.name for p in SHEETS])
def test_issue10_panel_shows_the_apis_numbers(path: Path, tmp_path: Path, ui) -> None:
    assert SHEETS, "no demo sheets found"
    copy = tmp_path / path.name  # the app may write a recovery copy beside the sheet
    copy.write_text(path.read_text(encoding="utf-8"), encoding="utf-8")
    result = worksheet.load(copy).run()
    digits = result.settings.digits
    seen: dict[str, str] = {}

    async def scenario(pilot, app: WorksheetApp) -> None:
        await ui.settle(pilot, app)
        await pilot.press("f4")
        seen.update(await ui.all_panel_entries(pilot, app))

    ui.drive(WorksheetApp(str(copy)), scenario, size=(120, 40))

    quantities = {q.name: q for q in result if q.name is not None}
    first = {}
    for q in result:
        if q.name is not None and q.name not in first:
            first[q.name] = q  # a later scaling or display line is a view, not the value
    assert set(first) <= set(seen), f"missing from the panel: {set(first) - set(seen)}"
    checked = 0
    for name, api in first.items():
        entry = seen[name]
        match = ENTRY.match(entry)
        assert match is not None, entry
        shown = _number(match["value"])
        if api.value is None or not api.ok:
            assert shown is None, f"{name}: the API has no number, the panel shows {entry!r}"
            continue
        assert shown is not None, f"{name}: {entry!r}"
        assert _close(shown, api.value, digits), f"{name}: panel {entry!r}, API {api.value}"
        if api.uncertainty:
            spread = _number(match["spread"] or "")
            assert spread is not None, f"{name}: the API has +- {api.uncertainty}: {entry!r}"
            assert _close(spread, api.uncertainty, 2), f"{name}: {entry!r} vs {api.uncertainty}"
        else:
            assert match["spread"] is None, f"{name}: no uncertainty in the API: {entry!r}"
        unit = api.unit or ""
        dimension = (api.dimension or "").removeprefix("dimension ")
        assert match["rest"].startswith(f"{unit} {dimension}; ".lstrip()), (name, entry, unit)
        checked += 1
    assert checked >= 5  # each demo sheet has at least that many numbers
    assert quantities  # the API saw the sheet's quantities
