"""The sheet: its cells in file order, each calc cell with its results."""

from __future__ import annotations

from typing import TYPE_CHECKING

from textual.app import ComposeResult
from textual.containers import VerticalScroll
from textual.widget import Widget

from worksheet.app.session import editor_text
from worksheet.app.widgets.calc_cell import CalcCellView
from worksheet.app.widgets.note_cell import NoteCellView, source_text
from worksheet.document import CalcCell, SheetDocument

if TYPE_CHECKING:  # the engine loads after the first paint
    from worksheet.engine import StatementResult
    from worksheet.runner import SheetRun

CellView = CalcCellView | NoteCellView


def cell_views(doc: SheetDocument, first_paint: bool = False) -> list[CellView]:
    """A view per block, each calc cell showing the results its file records.

    ``first_paint``: notes as source text and calc cells with their editors' stand-ins."""
    views: list[CellView] = []
    for index, block in enumerate(doc.blocks):
        if isinstance(block, CalcCell):
            recorded = block.result.lines() if block.result is not None else ()
            text = editor_text(block.body)
            live = not first_paint
            views.append(CalcCellView(index, text, block.first_line, recorded, live=live))
        else:
            views.append(NoteCellView(index, block.text, source_first=first_paint))
    return views


def least_rows(view: CellView) -> int:
    """The fewest screen rows ``view`` can take at the first paint, at any width (each
    line of its text, its results and its frame takes one at least)."""
    if isinstance(view, NoteCellView):
        return 0 if view.blank else source_text(view.text).plain.count("\n") + 2
    header, frame, margin = 1, 2, 1
    return header + frame + view.initial_text.count("\n") + 1 + view.recorded_count + margin


def first_screenful(views: list[CellView], rows: int, through: int) -> tuple[int, int]:
    """How many of ``views`` the first paint needs: enough to fill ``rows`` for certain,
    and the one at index ``through`` (it gets the focus); and the fewest rows they take."""
    filled = 0
    for count, view in enumerate(views, start=1):
        filled += least_rows(view)
        if filled >= rows and count > through:
            return count, filled
    return len(views), filled


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

    def __init__(
        self,
        doc: SheetDocument | None = None,
        rows: int | None = None,
        through: int = 0,
        **kwargs: object,
    ) -> None:
        """``doc``: the cells to compose at once (the first paint: notes as source text);
        ``rows``: only as many as fill that many rows (and the one at ``through``) then,
        the rest once ``mount_rest`` is called."""
        super().__init__(**kwargs)  # type: ignore[arg-type]
        self._initial = doc
        self._rows = rows
        self._through = through
        self._later: list[CellView] = []

    @property
    def complete(self) -> bool:
        """Every block of the sheet has its view among the children."""
        return not self._later

    def compose(self) -> ComposeResult:
        # Composed with the screen, the first cells are styled and laid out in the same
        # pass as everything else, instead of in a second one after mounting.
        if self._initial is not None:
            self.add_class("-first-paint")
            views = cell_views(self._initial, first_paint=True)
            count, filled = (
                (len(views), 0)
                if self._rows is None
                else first_screenful(views, self._rows, self._through)
            )
            self._later = views[count:]
            if self._rows is not None and (self._later or filled > self._rows):
                # Cells are left for later only once the screen is full, and more rows
                # than the screen has surely overflow: either way the sheet scrolls, so
                # its first layout places the scroll bar, where textual would find out in
                # that pass and lay the whole screen out again for it.
                self.set_reactive(Widget.show_vertical_scrollbar, True)
            yield from views[:count]
            self._initial = None

    async def mount_rest(self) -> None:
        """Mount the views the first paint left out (below its screenful)."""
        if self._later:
            await self.mount_all(self._later)
            self._later = []

    async def rebuild(self, doc: SheetDocument) -> None:
        """Replace every cell view by fresh ones for ``doc`` (notes rendered at once; only
        the first paint, composed from ``__init__``'s document, shows their source)."""
        self._later = []
        await self.remove_children()
        await self.mount_all(cell_views(doc))

    async def go_live(self) -> None:
        """Swap each calc cell's stand-in for its editor (once, after the first paint)."""
        for view in self.cells():
            if isinstance(view, CalcCellView):
                await view.go_live()
        self.remove_class("-first-paint")

    async def render_notes(self) -> None:
        """Render the notes still showing their source text as Markdown."""
        for view in self.cells():
            if isinstance(view, NoteCellView):
                await view.render_markdown()

    def replace_places(self, doc: SheetDocument) -> None:
        """After an edit inside one cell, refresh the line numbers of all calc cells."""
        for view, block in zip(self.cells(), doc.blocks, strict=False):
            if isinstance(view, CalcCellView) and isinstance(block, CalcCell):
                view.place(view.index, block.first_line)

    def show_run(self, run: SheetRun) -> None:
        """Show each calc cell's results as computed now.

        They are not marked against what the file records: the results are fresh, and
        the status line says when the file's result blocks differ.
        """
        marked = run.results
        calc_views = [view for view in self.cells() if isinstance(view, CalcCellView)]
        per_cell: list[list[StatementResult]] = [[] for _ in calc_views]
        for source, result in zip(run.statements, marked, strict=True):
            if source.cell < len(per_cell):
                per_cell[source.cell].append(result)
        for view, results in zip(calc_views, per_cell, strict=True):
            view.show_results(results)

    def focus_block(self, index: int, cursor: tuple[int, int] | None = None) -> CellView | None:
        """Focus the cell at ``index`` or the nearest one that is shown (blank notes are not).

        ``cursor`` (row, column) goes back into a calc cell's editor, clamped to its text.
        Nothing is scrolled here: the caller scrolls once the cells are laid out.
        """
        cells = [view for view in self.cells() if not view.blank]
        if not cells:
            return None
        view = min(cells, key=lambda v: (abs(v.index - index), v.index < index))
        if isinstance(view, CalcCellView):
            if cursor is not None and view.index == index:
                view.focus_row(*cursor, scroll=False)
            else:
                view.focus_editor(scroll=False)
        else:
            view.focus(scroll_visible=False)
        return view

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
