"""The quantity ledger: every named quantity with value, unit, dimension and origin."""

from __future__ import annotations

from collections.abc import Sequence

from rich.text import Text
from textual import on
from textual.message import Message
from textual.widgets import DataTable
from textual.widgets.data_table import ColumnKey

from worksheet.app.quantity_row import QuantityRow

COLUMNS = ("name", "value", "dimension", "origin")


def _cells(row: QuantityRow) -> tuple[Text, Text, Text, Text]:
    # Text cells: a plain str would be read as markup and lose "[...]".
    return Text(row.name), Text(row.shown_value), Text(row.dimension), Text(row.origin)


class QuantityLedger(DataTable[Text]):
    """A row per quantity; moving the cursor posts ``QuantityLedger.Chosen``.

    Keys: the arrow keys move between rows; enter chooses a row (as DataTable does).
    """

    class Chosen(Message):
        """The quantity ``row`` is now the selected one."""

        def __init__(self, row: QuantityRow) -> None:
            super().__init__()
            self.row = row

    def __init__(self, **kwargs: object) -> None:
        super().__init__(cursor_type="row", zebra_stripes=True, **kwargs)  # type: ignore[arg-type]
        self._rows: dict[str, QuantityRow] = {}
        self._column_keys: list[ColumnKey] = []

    def on_mount(self) -> None:
        self._column_keys = self.add_columns(*COLUMNS)

    def show(self, rows: Sequence[QuantityRow]) -> None:
        """Show ``rows``: only changed cells are redrawn when the names stay the same."""
        fresh = {row.name: row for row in rows}
        if list(fresh) == list(self._rows):
            for name, row in fresh.items():
                old = self._rows[name]
                if row != old:
                    for column, (new_cell, old_cell) in enumerate(
                        zip(_cells(row), _cells(old), strict=True)
                    ):
                        if new_cell != old_cell:
                            self.update_cell(
                                name, self._column_keys[column], new_cell, update_width=True
                            )
            self._rows = fresh
            return
        keep = self.chosen_name()
        self.clear()
        self._rows = fresh
        for row in rows:
            self.add_row(*_cells(row), key=row.name)
        if keep in self._rows:
            self.move_cursor(row=list(self._rows).index(keep))

    def chosen_name(self) -> str | None:
        if not self._rows or self.cursor_row < 0 or self.cursor_row >= len(self._rows):
            return None
        return list(self._rows)[self.cursor_row]

    def row_named(self, name: str) -> QuantityRow | None:
        return self._rows.get(name)

    @on(DataTable.RowHighlighted)
    def _highlighted(self, event: DataTable.RowHighlighted) -> None:
        event.stop()
        key = event.row_key.value if event.row_key is not None else None
        if key in self._rows:
            self.post_message(self.Chosen(self._rows[key]))
