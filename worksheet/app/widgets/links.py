"""The lines the chosen quantity reads from, and the lines that read it; enter jumps there."""

from __future__ import annotations

from rich.text import Text
from textual import on
from textual.message import Message
from textual.widgets import OptionList
from textual.widgets.option_list import Option

from worksheet.app.quantity_row import QuantityRow
from worksheet.app.widgets.panel_stand_in import LINKS_HINT


class QuantityLinks(OptionList):
    """Options ``reads NAME (line N)`` and ``used on line N``; posts ``JumpTo`` on enter."""

    class JumpTo(Message):
        """Go to file line ``line``."""

        def __init__(self, line: int) -> None:
            super().__init__()
            self.line = line

    _shown: QuantityRow | bool | None = False  # False: nothing shown yet

    def show(self, row: QuantityRow | None) -> None:
        """Show the links of ``row``; unchanged links are left alone (no relayout)."""
        if self._shown is not False and row == self._shown:
            return
        self._shown = row
        self.clear_options()
        if row is None:
            self.add_option(Option(Text(LINKS_HINT), disabled=True))
            return
        options: list[Option] = [
            Option(
                Text(f"{row.name} = {row.shown_value}  ({row.dimension}; {row.origin})"),
                disabled=True,
            )
        ]
        if row.uncertainty == "exact":
            options.append(Option(Text("exact by definition"), disabled=True))
        if row.source:
            options.append(Option(Text(f"source: {row.source}"), disabled=True))
        if row.line is not None:
            options.append(Option(Text(f"defined on line {row.line}"), id=f"line-{row.line}"))
        for name, line in row.reads:
            options.append(Option(Text(f"reads {name} (line {line})"), id=f"line-{line}-{name}"))
        if not row.reads and row.line is not None:
            options.append(Option(Text("reads no other sheet quantity"), disabled=True))
        for line in row.read_by:
            options.append(Option(Text(f"used on line {line}"), id=f"used-{line}"))
        if not row.read_by:
            options.append(Option(Text("no line uses it"), disabled=True))
        self.add_options(options)

    @on(OptionList.OptionSelected)
    def _selected(self, event: OptionList.OptionSelected) -> None:
        event.stop()
        option_id = event.option.id or ""
        parts = option_id.split("-")
        if len(parts) >= 2 and parts[1].isdigit():
            self.post_message(self.JumpTo(int(parts[1])))
