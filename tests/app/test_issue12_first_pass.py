"""Issue 12: before its first paint the app lays the screen out once, draws it once more at
most, and parses its stylesheet once, with the chosen theme's colours; the side lists are
plain stand-ins then and the real lists right after, with nothing typed meanwhile lost."""

from __future__ import annotations

import asyncio
from pathlib import Path

import pytest
from textual.color import Color
from textual.css import stylesheet as stylesheet_module
from textual.geometry import Size
from textual.screen import Screen

from worksheet.app.app import WorksheetApp
from worksheet.app.screens.sheet import SheetScreen
from worksheet.app.widgets.ledger import QuantityLedger
from worksheet.app.widgets.links import QuantityLinks
from worksheet.app.widgets.panel_stand_in import LINKS_HINT, PanelStandIn
from worksheet.app.widgets.sheet_view import SheetView

ROOT = Path(__file__).resolve().parents[2]
DEMO = ROOT / "sheets" / "burst-budget.sheet.md"


class CountingApp(WorksheetApp):
    """Stops at the first paint (where the app would start the engine and put the editors
    in) and keeps what the screen text was then."""

    def __init__(self, path: str, counts: dict[str, int], theme: str | None = None) -> None:
        super().__init__(path, theme=theme)
        self.counts = counts  # updated by the counting hooks as the app starts
        self.counts_at_first_paint: dict[str, int] = {}
        self.first_paint_text: str | None = None
        self.first_paint_background: Color | None = None
        self.first_paint_widgets: list[str] = []
        self.first_paint_thumb = ""
        self.first_paint_bar_placed = False

    async def _after_first_paint(self) -> None:
        self.counts_at_first_paint = dict(self.counts)
        strips = self.screen._compositor.render_strips()
        self.first_paint_text = "\n".join(strip.text for strip in strips)
        self.first_paint_background = self.screen.styles.background
        self.first_paint_widgets = [type(w).__name__ for w in self.screen.walk_children()]
        sheet = self.query_one(SheetView)
        # Placed by a layout pass before this paint (the compositor knows where it is).
        self.first_paint_bar_placed = sheet.vertical_scrollbar in self.screen._compositor._full_map
        if sheet.show_vertical_scrollbar:
            bar = sheet.vertical_scrollbar.region  # where the sheet's scroll bar is drawn
            rows = self.first_paint_text.splitlines()[bar.y : bar.bottom]
            self.first_paint_thumb = "".join(row[bar.x : bar.right] for row in rows).strip()


def run_to_first_paint(
    monkeypatch: pytest.MonkeyPatch,
    path: Path,
    theme: str | None = None,
    size: tuple[int, int] = (100, 30),
):
    """The counts (full layout passes, renders, parses of the app's own CSS) at the first
    paint, and the app."""
    counts = {"layouts": 0, "renders": 0, "app_css_parses": 0}
    original_layout = Screen._refresh_layout
    original_render = Screen._compositor_refresh
    original_parse = stylesheet_module.parse

    def counted_layout(self: Screen, size: Size | None = None, scroll: bool = False) -> None:
        if isinstance(self, SheetScreen) and not (scroll and not self._layout_widgets):
            counts["layouts"] += 1
        original_layout(self, size, scroll)

    def counted_render(self: Screen) -> None:
        if isinstance(self, SheetScreen):
            counts["renders"] += 1
        original_render(self)

    def counted_parse(scope: str, css: str, read_from, *args, **kwargs):
        # The parser proper, called by a stylesheet when its cache has no answer.
        if read_from[1] == "CountingApp.CSS":
            counts["app_css_parses"] += 1
        return original_parse(scope, css, read_from, *args, **kwargs)

    monkeypatch.setattr(Screen, "_refresh_layout", counted_layout)
    monkeypatch.setattr(Screen, "_compositor_refresh", counted_render)
    monkeypatch.setattr(stylesheet_module, "parse", counted_parse)
    app = CountingApp(str(path), counts, theme=theme)

    async def main() -> None:
        async with app.run_test(size=size) as pilot:
            for _ in range(200):
                if app.first_paint_text is not None:
                    break
                await pilot.pause(0.01)

    try:
        asyncio.run(main())
    finally:
        app.close_service()
    return app.counts_at_first_paint, app


def test_issue12_one_layout_pass_and_one_stylesheet_parse_before_the_first_paint(
    monkeypatch: pytest.MonkeyPatch,
) -> None:
    counts, app = run_to_first_paint(monkeypatch, DEMO)
    assert app.first_paint_text is not None
    assert "calc  from line" in app.first_paint_text and "f1 Help" in app.first_paint_text
    assert "Quantities" in app.first_paint_text
    # Seen here on textual 8.2 before this change: 3 full passes, 4 renders and 2 parses
    # (the theme's re-parse in a scratch stylesheet, then the first styling pass).
    assert counts["layouts"] == 1, counts
    assert counts["renders"] <= 2, counts
    assert counts["app_css_parses"] == 1, counts


def test_issue12_the_theme_chosen_at_start_colours_the_first_paint(
    monkeypatch: pytest.MonkeyPatch,
) -> None:
    # Values from themes/light.toml; the app's stylesheet paints the screen $background.
    counts, app = run_to_first_paint(monkeypatch, DEMO, theme="light")
    assert counts["app_css_parses"] == 1, counts
    assert app.first_paint_background == Color.parse("#f7f7f4")


def test_issue12_switching_theme_after_start_still_restyles(basic_sheet: Path, ui) -> None:
    app = WorksheetApp(str(basic_sheet), theme="light")

    async def scenario(pilot, app: WorksheetApp) -> None:
        await ui.settle(pilot, app)
        assert app.screen.styles.background == Color.parse("#f7f7f4")  # themes/light.toml
        while app.theme != "dark":
            await pilot.press("f6")
            await pilot.pause(0.05)
        assert app.screen.styles.background == Color.parse("#1b1d23")  # themes/dark.toml

    ui.drive(app, scenario)


def test_issue12_side_lists_are_stand_ins_at_first_paint(
    monkeypatch: pytest.MonkeyPatch,
) -> None:
    _counts, app = run_to_first_paint(monkeypatch, DEMO)
    assert "PanelStandIn" in app.first_paint_widgets
    assert "QuantityLedger" not in app.first_paint_widgets
    assert "QuantityLinks" not in app.first_paint_widgets
    assert LINKS_HINT in str(app.first_paint_text)


@pytest.mark.parametrize(
    ("sheet", "size"),
    [
        # Taller than the screen with cells left for later (the first screenful is full).
        ("burst-budget.sheet.md", (100, 30)),
        # Every cell in the first screenful, and still taller than the screen.
        ("eddington-source.sheet.md", (120, 40)),
    ],
)
def test_issue12_a_sheet_taller_than_the_screen_has_its_scroll_bar_on_the_first_paint(
    monkeypatch: pytest.MonkeyPatch, sheet: str, size: tuple[int, int]
) -> None:
    counts, app = run_to_first_paint(monkeypatch, ROOT / "sheets" / sheet, size=size)
    # Not one layout pass later: the first paint shows the thumb (its end, a partial
    # block, is the only text a thumb has at these sizes).
    assert app.first_paint_bar_placed, "the scroll bar was not placed before the first paint"
    assert app.first_paint_thumb, "no scroll thumb on the first paint"
    assert counts["layouts"] == 1, counts


def test_issue12_lists_replace_stand_ins_and_a_panel_key_typed_at_once_reaches_them(
    basic_sheet: Path, ui
) -> None:
    app = WorksheetApp(str(basic_sheet))

    async def scenario(pilot, app: WorksheetApp) -> None:
        # Typed at once, before the first paint: held until the editors and lists are in.
        await pilot.press("f4")
        await ui.settle(pilot, app)
        assert not app.query(PanelStandIn)
        ledger = app.query_one(QuantityLedger)
        assert app.focused is ledger
        assert [row.name for row in ledger.rows][:2] == ["M", "r_s"]
        links = app.query_one(QuantityLinks)
        assert links.option_count >= 1
        assert ui.screen_text(app).count("Quantities") == 1

    ui.drive(app, scenario)
