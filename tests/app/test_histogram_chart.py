"""Issue 13: a sampled quantity's histogram in the app, as block bars under its cell."""

from __future__ import annotations

from pathlib import Path

from worksheet.app.app import WorksheetApp
from worksheet.app.histogram_canvas import histogram_rows
from worksheet.app.widgets.histogram_chart import HistogramChart
from worksheet.engine.distributions import Spread, summarize

SHEET = """---
title: histogram in the app
constants: CODATA2022
digits: 3
seed: 7
samples: 20000
---

```calc
x = 1 .. 100 log
y = 2 within factor 3
z = x*y
histogram z
```
"""


def text_of(rows: list) -> list[str]:
    return ["".join(text for text, _ in row) for row in rows]


def test_issue13_histogram_rows_fill_the_width_and_mark_median_and_interval() -> None:
    samples = Spread("log-normal", center=5.0, width=3.0).draw(50_000, 3, "q")
    data = summarize("q", "m", samples).histogram
    assert data is not None
    lines = text_of(histogram_rows(data, 60, 6))
    assert len(lines) == 6 + 3
    bars = lines[:6]
    # A log-normal in log bins is one hump: the full block in the top row near the middle.
    top = bars[0]
    assert "█" in top and top.index("█") > 15 and top.rstrip().rindex("█") < 45
    scale = lines[6]
    assert scale.count("|") == 1 and scale.index("[") < scale.index("|") < scale.index("]")
    assert len(scale) == 60
    assert "q [m], log bins: | median 5" in lines[8]


def test_issue13_histogram_appears_under_the_cell(tmp_path: Path, ui) -> None:
    path = tmp_path / "h.sheet.md"
    path.write_text(SHEET, encoding="utf-8")
    app = WorksheetApp(str(path))

    async def scenario(pilot, app: WorksheetApp) -> None:
        await ui.settle(pilot, app)
        charts = list(app.query(HistogramChart))
        assert len(charts) == 1 and not charts[0].showing_text_chart
        charts[0].scroll_visible(animate=False)
        await pilot.pause(0.1)
        text = ui.screen_text(app)
        assert "histogram z:" in text
        assert "z, log bins: | median" in text
        assert "█" in text

    ui.drive(app, scenario, size=(120, 48))
