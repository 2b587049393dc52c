"""The side panels' lists as the first paint draws them: plain text in their places.

At start the quantities list is empty (its entries come with the first run) and the links
list holds one hint line, yet each of textual's OptionLists costs its styling, its line
count and the extra layout pass that count asks for (together about 8 ms of a 100 x 30
launch, measured here). A plain Static shows the same; the app swaps the lists in right
after the first paint (``WorksheetApp._swap_in_panels``), before it hands on the keys
typed meanwhile, so no key reaches a stand-in.
"""

from __future__ import annotations

from rich.text import Text
from textual.widgets import Static

# What the links list says while no quantity is chosen (QuantityLinks shows it too).
LINKS_HINT = "choose a quantity above"


class PanelStandIn(Static):
    """Stands where a side list (``ledger`` or ``links``) will be until the first paint."""

    def __init__(self, place: str, text: str = "") -> None:
        super().__init__(Text(text), id=f"{place}-stand-in", classes="panel-stand-in")
        self.place = place
