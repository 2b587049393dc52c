"""The quantity ledger: every named quantity with value, unit, dimension and origin.

Each quantity is a wrapped entry of the list, never a cell cut to a column's width: the
value wraps at spaces (a number is split only if it is wider than the whole panel, and
then folded, never cut), and the dimension and origin are on the line beneath, so
everything is reachable at any width by moving up and down.
"""

from __future__ import annotations

from collections.abc import Sequence

from rich.table import Table
from rich.text import Text
from textual import on
from textual.message import Message
from textual.widgets import OptionList
from textual.widgets.option_list import Option

from worksheet.app.quantity_row import QuantityRow

# Names up to this long get a column of their own; longer ones fold within it.
MAX_NAME_COLUMN = 14


def name_column_width(rows: Sequence[QuantityRow]) -> int:
    return min(MAX_NAME_COLUMN, max((len(row.name) for row in rows), default=1))


def entry(row: QuantityRow, name_width: int) -> Table:
    """``name  = value +- u unit`` and, beneath the value, ``dimension; origin``.

    Two columns, so wrapped lines hang under the value; text is never read as markup.
    """
    grid = Table.grid(padding=(0, 1))
    grid.add_column(width=name_width, overflow="fold", no_wrap=False)
    grid.add_column(ratio=1, overflow="fold")
    details = Text(f"= {row.shown_value}")
    details.append(f"\n{row.dimension}; {row.origin}", style="dim")
    grid.add_row(Text(row.name), details)
    return grid


class QuantityLedger(OptionList):
    """An entry per quantity; moving the highlight posts ``QuantityLedger.Chosen``.

    Keys: the arrow keys move between entries; enter chooses one.
    """

    class Chosen(Message):
        """The quantity ``row`` is now the selected one."""

        def __init__(self, row: QuantityRow) -> None:
            super().__init__()
            self.row = row

    def __init__(self, **kwargs: object) -> None:
        super().__init__(**kwargs)  # type: ignore[arg-type]
        self._rows: dict[str, QuantityRow] = {}
        self.name_width = 1

    def show(self, rows: Sequence[QuantityRow]) -> None:
        """Show ``rows``: only changed entries are redrawn when the names stay the same."""
        fresh = {row.name: row for row in rows}
        width = name_column_width(rows)
        if list(fresh) == list(self._rows) and width == self.name_width:
            for name, row in fresh.items():
                if row != self._rows[name]:
                    self.replace_option_prompt(name, entry(row, width))
            self._rows = fresh
            return
        keep = self.chosen_name()
        self._rows = fresh
        self.name_width = width
        self.set_options([Option(entry(row, width), id=row.name) for row in rows])
        if keep in fresh:
            self.highlighted = list(fresh).index(keep)
        elif fresh:
            self.highlighted = 0

    @property
    def rows(self) -> tuple[QuantityRow, ...]:
        return tuple(self._rows.values())

    def chosen_name(self) -> str | None:
        index = self.highlighted
        if index is None or not 0 <= index < len(self._rows):
            return None
        return list(self._rows)[index]

    def row_named(self, name: str) -> QuantityRow | None:
        return self._rows.get(name)

    def choose(self, name: str) -> None:
        """Highlight the quantity ``name`` (from the sheet's cursor); unknown names: nothing."""
        if name in self._rows:
            index = list(self._rows).index(name)
            if self.highlighted != index:
                self.highlighted = index

    @on(OptionList.OptionHighlighted)
    def _highlighted(self, event: OptionList.OptionHighlighted) -> None:
        event.stop()
        row = self._rows.get(event.option.id or "")
        if row is not None:
            self.post_message(self.Chosen(row))

    @on(OptionList.OptionSelected)
    def _selected(self, event: OptionList.OptionSelected) -> None:
        event.stop()
        row = self._rows.get(event.option.id or "")
        if row is not None:
            self.post_message(self.Chosen(row))
