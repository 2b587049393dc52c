"""Cell work: the constants finder, delete and undo, add and move, note editing."""

from __future__ import annotations

from pathlib import Path

from worksheet.app.app import WorksheetApp
from worksheet.app.screens.finder import ConstantFinder
from worksheet.app.widgets.calc_cell import CalcCellView
from worksheet.app.widgets.note_cell import NoteCellView
from worksheet.document import CalcCell, NoteBlock, render_document


def test_finder_inserts_constant_and_unit(basic_sheet: Path, ui) -> None:
    app = WorksheetApp(str(basic_sheet))

    async def scenario(pilot, app: WorksheetApp) -> None:
        await ui.settle(pilot, app)
        editor = app.query(CalcCellView).last().editor
        editor.focus()
        editor.move_cursor((0, len(editor.document.lines[0])))
        await pilot.press(*" * ")
        await pilot.press("f2")
        await ui.wait_for(pilot, lambda: isinstance(app.screen, ConstantFinder))
        await pilot.press(*"boltzmann", "enter")  # k_B comes before sigma_SB in the dataset
        await ui.wait_for(pilot, lambda: not isinstance(app.screen, ConstantFinder))
        await pilot.press(*" / ")
        await pilot.press("f2")
        await ui.wait_for(pilot, lambda: isinstance(app.screen, ConstantFinder))
        await pilot.press(*"parsec", "enter")
        await ui.wait_for(pilot, lambda: not isinstance(app.screen, ConstantFinder))
        assert editor.text == "A = 4*pi*r_s^2 * k_B / [pc]"
        await ui.settle(pilot, app)
        assert "A = 4*pi*r_s^2 * k_B / [pc]" in app.session.doc.blocks[-1].body

    ui.drive(app, scenario)


def test_finder_escape_inserts_nothing(basic_sheet: Path, ui) -> None:
    app = WorksheetApp(str(basic_sheet))

    async def scenario(pilot, app: WorksheetApp) -> None:
        await ui.settle(pilot, app)
        editor = app.query(CalcCellView).last().editor
        editor.focus()
        await pilot.press("f2")
        await ui.wait_for(pilot, lambda: isinstance(app.screen, ConstantFinder))
        await pilot.press(*"gravitation", "escape")
        await ui.wait_for(pilot, lambda: not isinstance(app.screen, ConstantFinder))
        assert editor.text == "A = 4*pi*r_s^2"

    ui.drive(app, scenario)


def test_delete_cell_then_undo_and_redo(basic_sheet: Path, ui) -> None:
    app = WorksheetApp(str(basic_sheet))

    async def scenario(pilot, app: WorksheetApp) -> None:
        await ui.settle(pilot, app)
        original = render_document(app.session.doc)
        blocks = len(app.session.doc.blocks)
        app.query(CalcCellView).last().editor.focus()
        await pilot.press("alt+x")
        await ui.settle(pilot, app)
        assert len(app.session.doc.blocks) == blocks - 1
        assert "A = 4*pi*r_s^2" not in ui.screen_text(app)
        assert "deleted the cell" in ui.screen_text(app)
        await pilot.press("ctrl+z")
        await ui.settle(pilot, app)
        assert render_document(app.session.doc) == original
        assert "A = 4*pi*r_s^2" in ui.screen_text(app)
        await pilot.press("ctrl+y")
        await ui.settle(pilot, app)
        assert len(app.session.doc.blocks) == blocks - 1

    ui.drive(app, scenario)


def test_add_move_and_edit_note(basic_sheet: Path, ui) -> None:
    app = WorksheetApp(str(basic_sheet))

    async def scenario(pilot, app: WorksheetApp) -> None:
        await ui.settle(pilot, app)
        app.query(CalcCellView).first().editor.focus()  # block 1
        await pilot.press("alt+c")  # new calc cell becomes block 2
        await ui.settle(pilot, app)
        block = app.session.doc.blocks[2]
        assert isinstance(block, CalcCell) and block.body == ""
        await pilot.press(*"B = 2*M")
        await ui.settle(pilot, app)
        assert "B = 1.000e12 kg" in ui.screen_text(app)
        await pilot.press("alt+up")  # above the first calc cell: B before M is an error
        await ui.settle(pilot, app)
        assert app.session.doc.blocks[1].body == "B = 2*M\n"
        assert "used before its definition" in ui.screen_text(app)
        await pilot.press("alt+down")
        await ui.settle(pilot, app)
        assert app.session.doc.blocks[2].body == "B = 2*M\n"
        note = app.query(NoteCellView).first()
        note.focus()
        await pilot.press("f3")
        await pilot.press("ctrl+end", *"More [m] here.")
        await pilot.press("f3")
        await ui.settle(pilot, app)
        first = app.session.doc.blocks[0]
        assert isinstance(first, NoteBlock) and "More [m] here." in first.text
        assert "More [m] here." in ui.screen_text(app)

    ui.drive(app, scenario)


def test_blank_notes_are_hidden_and_out_of_the_tab_order(tmp_path: Path, ui) -> None:
    path = tmp_path / "two.sheet.md"  # two calc cells with only a blank line between
    path.write_text(
        "---\ntitle: two\nconstants: CODATA2018\n---\n\n```calc\na = 1 [m]\n```"
        "\n\n```calc\nb = 2*a\n```\n",
        encoding="utf-8",
    )
    app = WorksheetApp(str(path))

    async def scenario(pilot, app: WorksheetApp) -> None:
        await ui.settle(pilot, app)
        blank = [view for view in app.query(NoteCellView) if not view.text.strip()]
        assert blank  # the blank lines between fences are blocks of the file
        app.query(CalcCellView).first().editor.focus()
        for _ in range(8):
            await pilot.press("tab")
            assert not any(view.has_focus for view in blank)

    ui.drive(app, scenario)


def test_undo_puts_the_cursor_back(basic_sheet: Path, ui) -> None:
    app = WorksheetApp(str(basic_sheet))

    async def scenario(pilot, app: WorksheetApp) -> None:
        await ui.settle(pilot, app)
        editor = app.query(CalcCellView).first().editor
        editor.focus()
        editor.move_cursor((2, 5))
        await pilot.press(*"(1)*")
        await ui.settle(pilot, app)
        await pilot.press("ctrl+z")
        await ui.settle(pilot, app)
        editor = app.query(CalcCellView).first().editor
        assert editor.has_focus
        assert editor.document.get_line(2) == "T_H = hbar*c^3/(8*pi*G*M*k_B) in [K]"
        assert editor.cursor_location[0] == 2

    ui.drive(app, scenario)
