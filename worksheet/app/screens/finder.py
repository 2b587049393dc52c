"""The constants finder: search the pinned dataset's constants and units by symbol or words."""

from __future__ import annotations

from dataclasses import dataclass
from typing import ClassVar

from rich.table import Table
from rich.text import Text
from textual import on
from textual.app import ComposeResult
from textual.binding import Binding, BindingType
from textual.containers import Vertical
from textual.screen import ModalScreen
from textual.widgets import Input, OptionList, Static
from textual.widgets.option_list import Option

from worksheet.app.unit_list import COMMON_UNITS
from worksheet.constants import Dataset


@dataclass(frozen=True)
class Found:
    """One entry: what to insert and how it is described."""

    insert: str
    description: str


def _rank(symbol: str, typed: str) -> int:
    """0: the symbol is what was typed; 1: the same but for case; 2: it starts so; 3: other."""
    bare = typed.strip().strip("[]")
    if symbol == bare:
        return 0
    if symbol.casefold() == bare.casefold():
        return 1
    if bare and symbol.casefold().startswith(bare.casefold()):
        return 2
    return 3


def search(dataset: Dataset, words: str) -> list[Found]:
    """Constants, the dataset's units, then common SI units, matching every word (any case).

    A word matches the symbol, the name, or (for the common units) what the unit measures.
    Symbols equal to what was typed come first, then those that start with it; otherwise
    the order above is kept.
    """
    needles = [needle.strip("[]") for needle in words.casefold().split()]

    def matches(symbol: str, name: str) -> bool:
        haystack = f"{symbol} {name}".casefold()
        return all(needle in haystack for needle in needles)

    found = [
        (c.symbol, Found(c.symbol, f"{c.symbol}  {c.name} = {c.value} {c.unit}"))
        for c in dataset.constants.values()
        if matches(c.symbol, c.name)
    ]
    found += [
        (u.symbol, Found(f"[{u.symbol}]", f"[{u.symbol}]  {u.name} = {u.value} {u.unit}"))
        for u in dataset.units.values()
        if matches(u.symbol, u.name)
    ]
    found += [
        (symbol, Found(f"[{symbol}]", f"[{symbol}]  {name} ({kind})"))
        for symbol, name, kind in COMMON_UNITS
        if symbol not in dataset.units and matches(symbol, f"{name} {kind}")
    ]
    found.sort(key=lambda item: _rank(item[0], words))  # stable: ties keep their order
    return [entry for _symbol, entry in found]


def _entry(found: Found) -> Table:
    """What to insert in its own column, the rest wrapping beside it (a hanging indent)."""
    grid = Table.grid(padding=(0, 2))
    grid.add_column(no_wrap=True, style="bold")
    grid.add_column(ratio=1)
    grid.add_row(Text(found.insert), Text(found.description.split("  ", 1)[-1]))
    return grid


class ConstantFinder(ModalScreen[str | None]):
    """Type words; up/down choose; enter hands back the text to insert; escape gives None."""

    BINDINGS: ClassVar[list[BindingType]] = [
        Binding("escape", "cancel", "Cancel"),
        Binding("down", "next", "Next", show=False),
        Binding("up", "previous", "Previous", show=False),
    ]

    def __init__(self, dataset: Dataset) -> None:
        super().__init__(classes="dialog-screen")
        self._dataset = dataset
        self._found: list[Found] = []

    def compose(self) -> ComposeResult:
        with Vertical(classes="dialog finder"):
            yield Static(Text(f"Constants and units of {self._dataset.name}"))
            yield Input(placeholder="symbol or words, e.g. boltzmann", id="finder-words")
            yield OptionList(id="finder-matches")

    def on_mount(self) -> None:
        self._fill("")
        self.query_one(Input).focus()

    def _fill(self, words: str) -> None:
        self._found = search(self._dataset, words)
        options = self.query_one(OptionList)
        options.clear_options()
        options.add_options([Option(_entry(f), id=str(k)) for k, f in enumerate(self._found)])
        if self._found:
            options.highlighted = 0

    @on(Input.Changed)
    def _typed(self, event: Input.Changed) -> None:
        self._fill(event.value)

    @on(Input.Submitted)
    def _submitted(self, event: Input.Submitted) -> None:
        highlighted = self.query_one(OptionList).highlighted
        if highlighted is not None and self._found:
            self.dismiss(self._found[highlighted].insert)

    @on(OptionList.OptionSelected)
    def _chosen(self, event: OptionList.OptionSelected) -> None:
        self.dismiss(self._found[event.option_index].insert)

    def action_next(self) -> None:
        self.query_one(OptionList).action_cursor_down()

    def action_previous(self) -> None:
        self.query_one(OptionList).action_cursor_up()

    def action_cancel(self) -> None:
        self.dismiss(None)
