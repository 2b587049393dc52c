"""Issue 12: the first paint draws calc cells as light stand-ins, and the editors that take
their place right after it lose none of the keys typed meanwhile."""

from __future__ import annotations

import asyncio
from pathlib import Path

from worksheet.app.app import WorksheetApp
from worksheet.app.widgets.calc_cell import CalcCellView
from worksheet.app.widgets.calc_editor import CalcEditor
from worksheet.app.widgets.calc_source import CalcSource
from worksheet.app.widgets.sheet_view import SheetView

ROOT = Path(__file__).resolve().parents[2]


class HeldApp(WorksheetApp):
    """The app with its editors held back after the first paint until the test says so,
    so that keys are typed for certain while the stand-ins are on screen."""

    def __init__(self, path: str) -> None:
        super().__init__(path)
        self.release = asyncio.Event()

    async def _after_first_paint(self) -> None:
        async def later() -> None:
            await self.release.wait()
            await WorksheetApp._after_first_paint(self)

        # A worker, so the screen goes on handling its messages (and keys) meanwhile.
        self.run_worker(later())


def test_keys_typed_before_the_editor_is_in_reach_it_in_order(tmp_path: Path, ui) -> None:
    # A new sheet starts with the focus in its empty calc cell.
    app = HeldApp(str(tmp_path / "fresh.sheet.md"))

    async def scenario(pilot, app: HeldApp) -> None:
        await pilot.pause(0.1)
        view = app.query(CalcCellView).first()
        assert not view.live and isinstance(app.focused, CalcSource)
        # Characters, a cursor move and a deletion: their order matters.
        await pilot.press("x", "=", "1", "left", "2", "backspace", "3", "0")
        assert not view.live and isinstance(app.focused, CalcSource)
        app.release.set()
        await ui.settle(pilot, app)
        assert view.live and not app.query(CalcSource)
        assert isinstance(app.focused, CalcEditor) and app.focused is view.editor
        assert view.editor.text == "x=301"
        assert app.session is not None and "x=301" in app.session.doc.blocks[view.index].body
        assert view.editor.cursor_location == (0, 4)

    ui.drive(app, scenario, size=(100, 30))


def test_app_keys_typed_before_the_editors_are_in_take_effect_after(tmp_path: Path, ui) -> None:
    app = HeldApp(str(tmp_path / "fresh.sheet.md"))

    async def scenario(pilot, app: HeldApp) -> None:
        await pilot.pause(0.1)
        assert app.query(CalcSource)
        await pilot.press("a", "f1")
        await pilot.pause(0.1)
        assert type(app.screen).__name__ == "SheetScreen"  # held, not lost
        app.release.set()
        await ui.wait_for(pilot, lambda: type(app.screen).__name__ == "HelpScreen")
        await pilot.press("escape", "b")
        await ui.settle(pilot, app)
        assert app.query(CalcCellView).first().editor.text == "ab"

    ui.drive(app, scenario, size=(100, 30))


def test_stand_ins_show_the_cells_text_framed_like_the_editors(tmp_path: Path, ui) -> None:
    path = tmp_path / "light.sheet.md"
    path.write_text(ui.basic_text, encoding="utf-8")
    app = HeldApp(str(path))

    async def scenario(pilot, app: HeldApp) -> None:
        await pilot.pause(0.1)
        before = ui.screen_text(app)
        assert "│ M = 5e11 [kg]   # starting mass" in before
        assert "pending" in before
        heights = [view.query_one(CalcSource).outer_size.height for view in app.query(CalcCellView)]
        app.release.set()
        await ui.settle(pilot, app)
        after = [view.editor.outer_size.height for view in app.query(CalcCellView)]
        assert heights == after  # the editors take the stand-ins' room exactly

    ui.drive(app, scenario, size=(100, 30))


def test_every_cell_of_a_long_sheet_gets_an_editable_editor(ui) -> None:
    app = WorksheetApp(str(ROOT / "sheets" / "burst-budget.sheet.md"))

    async def scenario(pilot, app: WorksheetApp) -> None:
        await ui.settle(pilot, app)
        views = list(app.query(CalcCellView))
        assert len(views) > 3 and all(view.live for view in views)
        assert not app.query(CalcSource)
        assert not app.query_one(SheetView).has_class("-first-paint")
        # The last cell: scrolled to, typed into, and the sheet follows.
        last = views[-1]
        last.focus_row(0)
        await pilot.pause(0.1)
        sheet = app.query_one(SheetView)
        assert sheet.scroll_y > 0 and last.region.height > 0
        first_line = last.editor.document.get_line(0)
        await pilot.press("home", "q", "z", "backspace")
        await pilot.pause(0.1)
        assert app.session is not None
        body = app.session.doc.blocks[last.index].body
        assert body.splitlines()[0] == "q" + first_line

    ui.drive(app, scenario, size=(100, 30))


def test_the_cycle_collector_runs_again_after_the_first_paint(tmp_path: Path, ui) -> None:
    import gc

    app = HeldApp(str(tmp_path / "fresh.sheet.md"))

    async def scenario(pilot, app: HeldApp) -> None:
        await pilot.pause(0.1)
        assert not gc.isenabled()  # held while the first screen is made
        app.release.set()
        await ui.settle(pilot, app)
        assert gc.isenabled()

    assert gc.isenabled()
    ui.drive(app, scenario, size=(100, 30))
    assert gc.isenabled()


def test_a_long_sheet_paints_its_first_screenful_and_adds_the_rest_after(ui) -> None:
    from worksheet.document import parse_document

    path = ROOT / "sheets" / "burst-budget.sheet.md"
    blocks = len(parse_document(path.read_text(encoding="utf-8")).blocks)
    app = HeldApp(str(path))

    async def scenario(pilot, app: HeldApp) -> None:
        await pilot.pause(0.1)
        sheet = app.query_one(SheetView)
        first = sheet.cells()
        assert 0 < len(first) < blocks and not sheet.complete
        # The cells composed fill the sheet's height: its last row shows a cell.
        assert sheet.virtual_size.height > sheet.scrollable_content_region.height
        app.release.set()
        await ui.settle(pilot, app)
        assert sheet.complete and len(sheet.cells()) == blocks
        assert [view.index for view in sheet.cells()] == list(range(blocks))
        # Scrolled to its end, the sheet shows its last cell's results.
        sheet.scroll_end(animate=False, immediate=True)
        await pilot.pause(0.1)
        last = sheet.cells()[-1]
        assert isinstance(last, CalcCellView) or last.blank or last.region.height > 0
        calc = [view for view in sheet.cells() if isinstance(view, CalcCellView)][-1]
        assert calc.first_line > 1 and f"calc  from line {calc.first_line}" in ui.screen_text(app)

    ui.drive(app, scenario, size=(100, 30))


def test_least_rows_never_exceeds_what_is_drawn(ui) -> None:
    app = WorksheetApp(str(ROOT / "sheets" / "burst-budget.sheet.md"))

    async def scenario(pilot, app: WorksheetApp) -> None:
        from worksheet.app.widgets.sheet_view import least_rows

        await ui.settle(pilot, app)
        for view in app.query_one(SheetView).cells():
            if isinstance(view, CalcCellView):
                drawn = view.outer_size.height + 1  # and its margin
                assert least_rows(view) <= drawn, view.index

    ui.drive(app, scenario, size=(100, 30))
