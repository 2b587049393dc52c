"""The sheet: its cells in file order, each calc cell with its results."""

from __future__ import annotations

from textual.containers import VerticalScroll
from textual.widget import Widget

from worksheet.app.session import editor_text
from worksheet.app.widgets.calc_cell import CalcCellView
from worksheet.app.widgets.note_cell import NoteCellView
from worksheet.document import CalcCell, SheetDocument
from worksheet.runner import SheetRun

CellView = CalcCellView | NoteCellView


class SheetView(VerticalScroll):
    """Holds one view per block; knows which cell has the focus."""

    DEFAULT_CSS = """
    SheetView { height: 1fr; }
    """

    def cells(self) -> list[CellView]:
        return [child for child in self.children if isinstance(child, CalcCellView | NoteCellView)]

    def current_index(self) -> int | None:
        """Block index of the cell holding the focus, if any."""
        focused: Widget | None = self.screen.focused
        while focused is not None:
            if isinstance(focused, CalcCellView | NoteCellView):
                return focused.index
            parent = focused.parent
            focused = parent if isinstance(parent, Widget) else None
        return None

    async def rebuild(self, doc: SheetDocument) -> None:
        """Replace every cell view by fresh ones for ``doc``."""
        await self.remove_children()
        views: list[CellView] = []
        for index, block in enumerate(doc.blocks):
            if isinstance(block, CalcCell):
                views.append(CalcCellView(index, editor_text(block.body), block.first_line))
            else:
                views.append(NoteCellView(index, block.text))
        await self.mount_all(views)
        for view in views:
            if isinstance(view, CalcCellView):
                view.show_waiting("computing ...")

    def replace_places(self, doc: SheetDocument) -> None:
        """After an edit inside one cell, refresh the line numbers of all calc cells."""
        for view, block in zip(self.cells(), doc.blocks, strict=False):
            if isinstance(view, CalcCellView) and isinstance(block, CalcCell):
                view.place(view.index, block.first_line)

    def show_run(self, run: SheetRun) -> None:
        """Show each calc cell's results (with staleness against the recorded text)."""
        marked = run.with_staleness()
        calc_views = [view for view in self.cells() if isinstance(view, CalcCellView)]
        for ordinal, view in enumerate(calc_views):
            view.show_results([result for source, result in zip(run.statements, marked,
                                                                 strict=True)
                               if source.cell == ordinal])

    def focus_block(self, index: int) -> None:
        cells = self.cells()
        if not cells:
            return
        view = cells[max(0, min(index, len(cells) - 1))]
        if isinstance(view, CalcCellView):
            view.editor.focus()
        else:
            view.focus()
        view.scroll_visible()

    def focus_line(self, doc: SheetDocument, line: int) -> bool:
        """Focus the calc cell holding file line ``line``, cursor on it; False if none."""
        for view, block in zip(self.cells(), doc.blocks, strict=False):
            if isinstance(view, CalcCellView) and isinstance(block, CalcCell):
                rows = max(1, len(block.body_lines()))
                if block.first_line <= line < block.first_line + rows:
                    view.focus_row(line - block.first_line)
                    view.scroll_visible()
                    return True
        return False
