"""Issue 10, the app: the numbers a person reads in the app are the numbers computed.

Each test drives the app with keys (textual's pilot), then reads the screen's text and,
where a file is involved, the file back.
"""

from __future__ import annotations

from pathlib import Path

from textual.command import CommandPalette
from textual.widgets import Input, TextArea

from worksheet.app.app import WorksheetApp
from worksheet.app.widgets.calc_cell import CalcCellView
from worksheet.app.widgets.calc_editor import CalcEditor
from worksheet.app.widgets.ledger import QuantityLedger
from worksheet.app.widgets.note_cell import NoteCellView
from worksheet.app.widgets.result_lines import ResultLines
from worksheet.document import NoteBlock, read_document

# Our own sheet: a fictional detector pixel of 7.426e-16 m known to 3.3e-20 m, a scaling
# line on a derived quantity, a relation, and blank and comment-only lines.
PIXEL_SHEET = """---
title: Pixel budget
constants: CODATA2018
digits: 4
---

A fictional detector pixel.

```calc
L_pix = 7.426e-16 [m] +- 3.3e-20 [m]   # pitch of the fictional pixel

# a comment-only line, and a blank one above it
M = 5e11 [kg]
t_ev = 5120*pi*G^2*M^3/(hbar*c^4) in [yr]
scaling t_ev in [yr] around M = 1e12 [kg]
P(m) = hbar*c^6/(15360*pi*G^2*m^2)
```
"""


def write(tmp_path: Path, text: str, name: str = "pixel.sheet.md") -> Path:
    path = tmp_path / name
    path.write_text(text, encoding="utf-8")
    return path


def test_issue10_panel_never_cuts_a_number_at_80x24(tmp_path: Path, ui) -> None:
    path = write(tmp_path, PIXEL_SHEET)

    async def scenario(pilot, app: WorksheetApp) -> None:
        await ui.settle(pilot, app)
        await pilot.press("f4")  # the quantities, in the sheet's place at 80 columns
        await pilot.pause(0.1)
        text = ui.screen_text(app)
        assert "Quantities" in text
        entries = ui.panel_entries(app)
        assert entries["L_pix"].startswith("= 7.426e-16 +- 3.3e-20 m ")
        # dimension and origin are on screen too, not in a column out of reach
        assert entries["L_pix"].endswith("length; given, line 10")

    ui.drive(WorksheetApp(str(path)), scenario, size=(80, 24))


def test_issue10_scaling_line_does_not_replace_the_quantitys_value(tmp_path: Path, ui) -> None:
    path = write(tmp_path, PIXEL_SHEET)

    async def scenario(pilot, app: WorksheetApp) -> None:
        await ui.settle(pilot, app)
        ledger = app.query_one(QuantityLedger)
        row = ledger.row_named("t_ev")
        assert row is not None
        # its own line records a number in yr, the scaling line a form around 1e12 kg
        own = next(r for r in app.outcome.run.results if r.line == 14)
        assert row.value == own.record.split(" = ")[1].split(" ")[0]
        assert "M / 1e12" not in row.shown_value
        await pilot.press("f4")
        await pilot.pause(0.1)
        assert "(M / 1e12" not in ui.panel_entries(app)["t_ev"]

    ui.drive(WorksheetApp(str(path)), scenario, size=(120, 40))


def test_issue10_relation_is_not_described_as_dimensionless(tmp_path: Path, ui) -> None:
    path = write(tmp_path, PIXEL_SHEET)

    async def scenario(pilot, app: WorksheetApp) -> None:
        await ui.settle(pilot, app)
        await pilot.press("f4")
        for _ in range(4):
            await pilot.press("down")
        await pilot.pause(0.1)
        entry = ui.panel_entries(app)["P"]
        assert "dimensionless" not in entry
        assert entry.endswith("relation of m; relation, line 16")

    ui.drive(WorksheetApp(str(path)), scenario, size=(120, 40))


def test_issue10_side_panel_hides_when_narrow_and_comes_back(tmp_path: Path, ui) -> None:
    path = write(tmp_path, PIXEL_SHEET)

    async def scenario(pilot, app: WorksheetApp) -> None:
        await ui.settle(pilot, app)
        text = ui.screen_text(app)
        assert "Quantities" not in text
        assert "A fictional detector pixel." in text
        await pilot.press("f4")
        await pilot.pause(0.1)
        text = ui.screen_text(app)
        assert "Quantities" in text and "A fictional detector pixel." not in text
        await pilot.press("f4")
        await pilot.pause(0.1)
        text = ui.screen_text(app)
        assert "Quantities" not in text and "A fictional detector pixel." in text

    ui.drive(WorksheetApp(str(path)), scenario, size=(80, 24))

    async def wide(pilot, app: WorksheetApp) -> None:
        await ui.settle(pilot, app)
        text = ui.screen_text(app)
        assert "Quantities" in text and "A fictional detector pixel." in text

    ui.drive(WorksheetApp(str(path)), wide, size=(120, 40))


def test_issue10_the_cursor_lines_result_is_shown_while_typing(tmp_path: Path, ui) -> None:
    path = write(tmp_path, PIXEL_SHEET)

    async def scenario(pilot, app: WorksheetApp) -> None:
        await ui.settle(pilot, app)
        view = next(v for v in app.sheet.cells() if isinstance(v, CalcCellView))
        view.focus_row(0, 999)  # the end of the first line (clamped)
        await pilot.press("enter", *"w = 3 [m] * 2")
        await ui.settle(pilot, app)
        text = ui.screen_text(app)
        assert "line 11: ok  w = 6.000 m" in text
        await pilot.press("up")  # the line above: the pixel's pitch
        await pilot.pause(0.1)
        assert "line 10: ok  L_pix = 7.426e-16 +- 3.3e-20 m" in ui.screen_text(app)

    ui.drive(WorksheetApp(str(path)), scenario, size=(80, 24))


def test_issue10_fresh_results_are_not_stale_before_or_after_save(tmp_path: Path, ui) -> None:
    path = write(tmp_path, PIXEL_SHEET)  # no result block yet

    async def scenario(pilot, app: WorksheetApp) -> None:
        await ui.settle(pilot, app)
        text = ui.screen_text(app)
        assert "STALE" not in text
        assert "ok      L_pix = 7.426e-16 +- 3.3e-20 m" in text
        assert "the file records 5 results differently" in text
        await pilot.press("ctrl+s")
        await ui.wait_for(pilot, lambda: "saved pixel.sheet.md" in ui.screen_text(app))
        text = ui.screen_text(app)
        assert "STALE" not in text and "differently" not in text
        await pilot.press("ctrl+r")
        await ui.settle(pilot, app)
        text = ui.screen_text(app)
        assert "STALE" not in text and "differently" not in text
        assert "saved" in text

    ui.drive(WorksheetApp(str(path)), scenario, size=(120, 40))
    assert "L_pix = 7.426e-16 +- 3.3e-20 m" in path.read_text(encoding="utf-8")


def test_issue10_blank_and_comment_lines_get_no_result_rows(tmp_path: Path, ui) -> None:
    path = write(tmp_path, PIXEL_SHEET)

    async def scenario(pilot, app: WorksheetApp) -> None:
        await ui.settle(pilot, app)
        lines = app.query(ResultLines).first().lines
        words = [text.split()[0] for _kind, text in lines]
        assert words == ["ok"] * 5  # L_pix, M, t_ev, scaling, P: no row for lines 11-12
        assert all(text.strip() != "ok" for _kind, text in lines)
        assert "5 results: 5 ok" in ui.screen_text(app)

    ui.drive(WorksheetApp(str(path)), scenario, size=(120, 40))


LONG_SHEET = "---\ntitle: Many cells\nconstants: CODATA2018\n---\n\n" + "".join(
    f"Note {k}.\n\n```calc\nx{k} = {k} [m]\n```\n\n" for k in range(12)
)


def _visible_in_sheet(app: WorksheetApp, widget) -> bool:
    sheet = app.sheet.region
    return sheet.y <= widget.region.y and widget.region.bottom <= sheet.bottom


def test_issue10_focus_and_scroll_stay_after_cell_operations(tmp_path: Path, ui) -> None:
    path = write(tmp_path, LONG_SHEET, "long.sheet.md")

    async def scenario(pilot, app: WorksheetApp) -> None:
        await ui.settle(pilot, app)
        calcs = [v for v in app.sheet.cells() if isinstance(v, CalcCellView)]
        calcs[8].focus_row(0)
        await pilot.pause(0.3)
        index = calcs[8].index
        scrolled = app.sheet.scroll_y
        assert scrolled > 0

        await pilot.press("alt+c")  # a calc cell below the chosen one
        await ui.settle(pilot, app)
        assert app.sheet.current_index() == index + 1
        assert isinstance(app.focused, CalcEditor)
        assert _visible_in_sheet(app, app.focused)
        assert round(app.sheet.scroll_y) == round(
            scrolled
        )  # it was in view: nothing needed to move
        scrolled = app.sheet.scroll_y

        await pilot.press("alt+x")  # delete it again: the focus goes to a neighbour
        await ui.settle(pilot, app)
        assert app.sheet.current_index() in (index, index + 1)
        assert _visible_in_sheet(app, app.focused)
        assert round(app.sheet.scroll_y) == round(scrolled)
        scrolled = app.sheet.scroll_y

        calcs = [v for v in app.sheet.cells() if isinstance(v, CalcCellView)]
        calcs[8].focus_row(0)
        await pilot.pause(0.2)
        await pilot.press("alt+up")  # the chosen cell moves above its note and keeps focus
        await ui.settle(pilot, app)
        assert app.sheet.current_index() == index - 1
        assert isinstance(app.focused, CalcEditor) and app.focused.text == "x8 = 8 [m]"
        assert _visible_in_sheet(app, app.focused)
        assert round(app.sheet.scroll_y) == round(scrolled)

    ui.drive(WorksheetApp(str(path)), scenario, size=(100, 30))


def test_issue10_a_new_note_takes_typing(tmp_path: Path, ui) -> None:
    path = write(tmp_path, PIXEL_SHEET)

    async def scenario(pilot, app: WorksheetApp) -> None:
        await ui.settle(pilot, app)
        calc = next(v for v in app.sheet.cells() if isinstance(v, CalcCellView))
        calc.focus_row(0)
        await pilot.press("alt+n")
        await pilot.pause(0.2)
        await pilot.press(*"Pitch from the vendor sheet.")
        await ui.settle(pilot, app)
        await pilot.press("ctrl+s")
        await ui.wait_for(pilot, lambda: "saved pixel.sheet.md" in ui.screen_text(app))

    ui.drive(WorksheetApp(str(path)), scenario, size=(120, 40))
    notes = [b.text for b in read_document(path).blocks if isinstance(b, NoteBlock)]
    assert any("Pitch from the vendor sheet." in note for note in notes)
    assert not any("A new note." in note for note in notes)  # the placeholder was replaced


def test_issue10_panel_key_and_back_keeps_the_place(tmp_path: Path, ui) -> None:
    path = write(tmp_path, LONG_SHEET, "long.sheet.md")
    for size in ((80, 24), (120, 40)):

        async def scenario(pilot, app: WorksheetApp) -> None:
            await ui.settle(pilot, app)
            calcs = [v for v in app.sheet.cells() if isinstance(v, CalcCellView)]
            calcs[7].focus_row(0, 2)
            await pilot.pause(0.3)
            editor, scrolled = app.focused, app.sheet.scroll_y
            await pilot.press("f4")
            await pilot.pause(0.1)
            assert isinstance(app.focused, QuantityLedger)
            await pilot.press("down", "down")
            await pilot.press("f4")
            await pilot.pause(0.2)
            assert app.focused is editor
            assert editor.cursor_location == (0, 2)
            assert round(app.sheet.scroll_y) == round(scrolled)
            await pilot.press(*"9")  # typing goes on where it was
            await ui.settle(pilot, app)
            assert editor.text == "x79 = 7 [m]"

        ui.drive(WorksheetApp(str(path)), scenario, size=size)


def test_issue10_finder_puts_the_exact_match_first(tmp_path: Path, ui) -> None:
    path = write(tmp_path, PIXEL_SHEET)

    async def scenario(pilot, app: WorksheetApp) -> None:
        await ui.settle(pilot, app)
        calc = next(v for v in app.sheet.cells() if isinstance(v, CalcCellView))
        calc.focus_row(0, 999)  # the end of the first line (clamped)
        await pilot.press("enter", *"E_q = ")
        await pilot.press("f2")
        await pilot.pause(0.2)
        await pilot.press("h")  # Planck's constant; hbar and others contain h too
        await pilot.pause(0.2)
        await pilot.press("enter")
        await pilot.pause(0.1)
        await pilot.press(*"*1 [Hz]")
        await ui.settle(pilot, app)
        await pilot.press("ctrl+s")
        await ui.wait_for(pilot, lambda: "saved pixel.sheet.md" in ui.screen_text(app))

    ui.drive(WorksheetApp(str(path)), scenario, size=(120, 40))
    assert "E_q = h*1 [Hz]\n" in path.read_text(encoding="utf-8")


def test_issue10_command_list_has_only_the_apps_own_commands(tmp_path: Path, ui) -> None:
    path = write(tmp_path, PIXEL_SHEET)
    from worksheet.app.keys import KEY_ACTIONS

    ours = {f"{key.label} ({key.key})" for key in KEY_ACTIONS}

    async def scenario(pilot, app: WorksheetApp) -> None:
        await ui.settle(pilot, app)
        assert sorted(app.available_themes) == ["contrast", "dark", "light"]
        await pilot.press("ctrl+p")
        await ui.wait_for(pilot, lambda: isinstance(app.screen, CommandPalette))
        for word in ("theme", "screenshot", "keys", "maximize", "quit"):
            palette = app.screen
            palette.query_one(Input).value = word
            await pilot.pause(0.4)
            shown = [line.strip() for line in ui.screen_text(app).splitlines()]
            for stock in (
                "Change the current theme",
                "Save an SVG",
                "Show help for the focused",
                "Quit the application as soon as possible",
                "Maximize the focused",
            ):
                assert not any(stock in line for line in shown), (word, stock)
        palette.query_one(Input).value = "quit"
        await pilot.pause(0.4)
        assert "Quit (ctrl+q)" in ui.screen_text(app)
        commands = [c.title for c in app.get_system_commands(app.screen)]
        assert set(commands) == ours

    ui.drive(WorksheetApp(str(path)), scenario, size=(120, 40))


def test_issue10_first_keys_on_a_new_sheet_are_kept(tmp_path: Path, ui) -> None:
    path = tmp_path / "fresh.sheet.md"

    async def scenario(pilot, app: WorksheetApp) -> None:
        await pilot.press(*"x = 2 [m]")  # at once, before anything has been computed
        await ui.settle(pilot, app)
        assert "ok      x = 2.000 m" in ui.screen_text(app)
        await pilot.press("ctrl+s")
        await ui.wait_for(pilot, lambda: path.exists())

    ui.drive(WorksheetApp(str(path)), scenario, size=(80, 24))
    assert "```calc\nx = 2 [m]\n```" in path.read_text(encoding="utf-8")


def test_issue10_note_editor_is_a_text_area(tmp_path: Path, ui) -> None:
    """A new note is edited in place: the editor holds the focus right after alt+n."""
    path = write(tmp_path, PIXEL_SHEET)

    async def scenario(pilot, app: WorksheetApp) -> None:
        await ui.settle(pilot, app)
        calc = next(v for v in app.sheet.cells() if isinstance(v, CalcCellView))
        calc.focus_row(0)
        await pilot.press("alt+n")
        await pilot.pause(0.2)
        assert isinstance(app.focused, TextArea)
        assert isinstance(app.focused.parent, NoteCellView)
        assert app.focused.selected_text.strip() == "A new note."

    ui.drive(WorksheetApp(str(path)), scenario, size=(120, 40))
