"""The quantity ledger: every named quantity with value, unit, dimension and origin.

Each quantity is a wrapped entry of the list, never a cell cut to a column's width: the
value line folds at spaces (a number is never split), and the dimension and origin are on
the line beneath, so everything is reachable at any width by moving up and down.
"""

from __future__ import annotations

from collections.abc import Sequence

from rich.text import Text
from textual import on
from textual.message import Message
from textual.widgets import OptionList
from textual.widgets.option_list import Option

from worksheet.app.quantity_row import QuantityRow


def entry_text(row: QuantityRow) -> Text:
    """``name = value +- u unit`` and, beneath, ``dimension; origin`` (plain, never markup)."""
    text = Text(f"{row.name} = {row.shown_value}")
    text.append(f"\n  {row.dimension}; {row.origin}", style="dim")
    return text


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

    def show(self, rows: Sequence[QuantityRow]) -> None:
        """Show ``rows``: only changed entries are redrawn when the names stay the same."""
        fresh = {row.name: row for row in rows}
        if list(fresh) == list(self._rows):
            for name, row in fresh.items():
                if row != self._rows[name]:
                    self.replace_option_prompt(name, entry_text(row))
            self._rows = fresh
            return
        keep = self.chosen_name()
        self._rows = fresh
        self.set_options([Option(entry_text(row), id=row.name) for row in rows])
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
