"""The constants finder: search the pinned dataset's constants and units by symbol or words."""

from __future__ import annotations

from dataclasses import dataclass
from typing import ClassVar

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


def search(dataset: Dataset, words: str) -> list[Found]:
    """Constants, the dataset's units, then common SI units, matching every word (any case).

    A word matches the symbol, the name, or (for the common units) what the unit measures.
    """
    needles = words.casefold().split()

    def matches(symbol: str, name: str) -> bool:
        haystack = f"{symbol} {name}".casefold()
        return all(needle in haystack for needle in needles)

    found = [
        Found(c.symbol, f"{c.symbol}  {c.name} = {c.value} {c.unit}")
        for c in dataset.constants.values()
        if matches(c.symbol, c.name)
    ]
    found += [
        Found(f"[{u.symbol}]", f"[{u.symbol}]  {u.name} = {u.value} {u.unit}")
        for u in dataset.units.values()
        if matches(u.symbol, u.name)
    ]
    found += [
        Found(f"[{symbol}]", f"[{symbol}]  {name} ({kind})")
        for symbol, name, kind in COMMON_UNITS
        if symbol not in dataset.units and matches(symbol, f"{name} {kind}")
    ]
    return found


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
        options.add_options(
            [Option(Text(f.description), id=str(k)) for k, f in enumerate(self._found)]
        )
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
