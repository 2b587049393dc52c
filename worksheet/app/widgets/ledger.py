"""The quantity ledger: every named quantity with value, unit, dimension and origin."""

from __future__ import annotations

from collections.abc import Sequence

from rich.text import Text
from textual import on
from textual.message import Message
from textual.widgets import DataTable

from worksheet.app.quantities import QuantityRow

COLUMNS = ("name", "value", "dimension", "origin")


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

    def on_mount(self) -> None:
        self.add_columns(*COLUMNS)

    def show(self, rows: Sequence[QuantityRow]) -> None:
        """Replace the rows, keeping the cursor on the same name where possible."""
        keep = self.chosen_name()
        self.clear()
        self._rows = {row.name: row for row in rows}
        for row in rows:
            # Text cells: a plain str would be read as markup and lose "[...]".
            value = f"{row.value} {row.unit}".strip()
            self.add_row(Text(row.name), Text(value), Text(row.dimension), Text(row.origin),
                         key=row.name)
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
