"""The sheet's screen (the first on the stack): it takes no focus of its own accord."""

from __future__ import annotations

from textual.screen import Screen


class SheetScreen(Screen[None]):
    """The app's default screen; the app puts the focus on a cell itself.

    textual's default screen focuses its first focusable widget (the sheet) when it is
    composed; the app then moves the focus to a cell, and each of the two moves restyles
    the widgets it touches before the first paint.
    """

    AUTO_FOCUS = ""
