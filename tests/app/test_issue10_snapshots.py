"""Issue 10, how the app looks: fixed-size snapshots of the screen text in every theme, and
the colours of the sheet's text checked against its background.

The snapshots are of a sheet of our own (nothing on screen varies: no clock, no paths). Run
with ``WORKSHEET_UPDATE_SNAPSHOTS=1`` to rewrite them after an intended change, then read
the difference before committing it.
"""

from __future__ import annotations

import os
from pathlib import Path

import pytest
from rich.segment import Segment
from textual.color import Color

from worksheet.app.app import WorksheetApp
from worksheet.app.theme_files import BUILT_IN, load_themes
from worksheet.app.widgets.calc_editor import CalcEditor
from worksheet.app.widgets.result_lines import ResultLines

SNAPSHOTS = Path(__file__).parent / "snapshots"
SIZES = ((80, 24), (120, 40))

# Our own scenario: a fictional bolometer pixel and the hole whose radius matches it.
SNAPSHOT_SHEET = """---
title: Bolometer pixel
constants: CODATA2018
digits: 4
---

A fictional bolometer pixel, and the hole whose radius it matches.

```calc
L_pix = 7.426e-16 [m] +- 3.3e-20 [m]   # pitch of the pixel
M = L_pix*c^2/(2*G) in [kg]
T_H = hbar*c^3/(8*pi*G*M*k_B) in [K]
check T_H ~ 1e11 [K]
```
"""


def relative_luminance(colour: Color) -> float:
    """WCAG 2.1 relative luminance (W3C, Web Content Accessibility Guidelines 2.1, 1.4.3)."""

    def channel(value: int) -> float:
        c = value / 255
        return c / 12.92 if c <= 0.04045 else ((c + 0.055) / 1.055) ** 2.4

    return 0.2126 * channel(colour.r) + 0.7152 * channel(colour.g) + 0.0722 * channel(colour.b)


def contrast(one: Color, two: Color) -> float:
    """WCAG 2.1 contrast ratio; 4.5 is the level AA minimum for normal text."""
    high, low = sorted((relative_luminance(one), relative_luminance(two)), reverse=True)
    return (high + 0.05) / (low + 0.05)


def _screens(tmp_path: Path, ui, theme: str, size: tuple[int, int]) -> list[str]:
    path = tmp_path / "pixel.sheet.md"
    path.write_text(SNAPSHOT_SHEET, encoding="utf-8")
    shots: list[str] = []

    async def scenario(pilot, app: WorksheetApp) -> None:
        await ui.settle(pilot, app)
        await pilot.press("tab")  # the calc cell, cursor on its first line
        await pilot.pause(0.2)
        shots.append(ui.screen_text(app))
        await pilot.press("f4")  # the quantities panel
        await pilot.pause(0.2)
        shots.append(ui.screen_text(app))

    ui.drive(WorksheetApp(str(path), theme=theme), scenario, size=size)
    return shots


@pytest.mark.parametrize("size", SIZES, ids=[f"{w}x{h}" for w, h in SIZES])
def test_issue10_screen_snapshots_in_every_theme(size, tmp_path: Path, ui) -> None:
    width, height = size
    by_theme = {theme: _screens(tmp_path, ui, theme, size) for theme in BUILT_IN}
    first = by_theme[BUILT_IN[0]]
    for theme, shots in by_theme.items():
        assert shots == first, f"the {theme} theme changes more than colours"
    text = "\n\n".join(first) + "\n"
    snapshot = SNAPSHOTS / f"issue10-{width}x{height}.txt"
    if os.environ.get("WORKSHEET_UPDATE_SNAPSHOTS") == "1":
        snapshot.parent.mkdir(exist_ok=True)
        snapshot.write_text(text, encoding="utf-8")
    assert text == snapshot.read_text(encoding="utf-8")
    for shot in first:
        lines = shot.splitlines()
        assert len(lines) == height and all(len(line) == width for line in lines)
        # a number is shown whole wherever it appears, never cut at an edge
        assert "7.426e-16 +- 3.3e-20 m" in shot


def _text_segments(strips) -> list[Segment]:
    return [seg for strip in strips for seg in strip if seg.text.strip() and seg.style]


@pytest.mark.parametrize("theme", BUILT_IN)
def test_issue10_sheet_text_is_readable_in_every_theme(theme: str, tmp_path: Path, ui) -> None:
    path = tmp_path / "pixel.sheet.md"
    path.write_text(SNAPSHOT_SHEET, encoding="utf-8")
    surface = Color.parse(next(t for t in load_themes().themes if t.name == theme).surface)
    worst: list[tuple[float, str]] = []

    async def scenario(pilot, app: WorksheetApp) -> None:
        await ui.settle(pilot, app)
        editor = app.query_one(CalcEditor)
        results = app.query_one(ResultLines)
        for widget in (editor, results):
            strips = [widget.render_line(y) for y in range(widget.size.height)]
            for seg in _text_segments(strips):
                if seg.style.color is None or seg.style.reverse:
                    continue
                fg = Color.from_rich_color(seg.style.color)
                bg = (
                    Color.from_rich_color(seg.style.bgcolor)
                    if seg.style.bgcolor is not None
                    else surface
                )
                worst.append((contrast(fg, bg), seg.text))

    ui.drive(WorksheetApp(str(path), theme=theme), scenario, size=(120, 40))
    assert worst, "nothing coloured was drawn"
    kinds = {text.strip() for _ratio, text in worst}
    assert {"7.426e-16", "[m]"} <= kinds  # numbers and units are among the coloured spans
    low = sorted(item for item in worst if item[0] < 4.5)
    assert not low, f"{theme}: text below the WCAG AA contrast of 4.5: {low[:5]}"
