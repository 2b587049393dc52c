"""The sheet's screen (the first on the stack): it takes no focus of its own accord."""

from __future__ import annotations

from textual import events
from textual.screen import Screen


class SheetScreen(Screen[None]):
    """The app's default screen; the app puts the focus on a cell itself.

    textual's default screen focuses its first focusable widget (the sheet) when it is
    composed; the app then moves the focus to a cell, and each of the two moves restyles
    the widgets it touches before the first paint.
    """

    AUTO_FOCUS = ""

    _resumed = False

    def _on_screen_resume(self, event: events.ScreenResume) -> None:
        # The first resume is the app's start: every widget was styled as it was mounted,
        # with the theme already set, so textual's second styling pass would change nothing.
        if not self._resumed:
            self._resumed = True
            event.refresh_styles = False
        super()._on_screen_resume(event)
