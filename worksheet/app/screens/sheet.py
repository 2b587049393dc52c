"""The sheet's screen (the first on the stack): it takes no focus of its own accord, and
it lays itself out no more often than its size or content asks."""

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
            # textual then hides its (empty) notification rack a moment later, and that
            # change of display asks for one more layout pass: hidden already, it does not.
            for rack in self.query_children("ToastRack"):
                rack.display = False
        # textual calls Screen's own handler next (handlers run along the class's MRO).

    async def _on_resize(self, event: events.Resize) -> None:
        # At start the screen is told its size several times over, and textual lays the
        # whole screen out again each time; at the size already laid out, with nothing
        # waiting for a layout, that pass would change nothing.
        if event.size == self._compositor.size and not self._layout_widgets:
            event.stop()
            event.prevent_default()  # Screen's own handler, next in the MRO, is not called
        # Otherwise Screen's handler lays the screen out (handlers run along the MRO).

    # Until the app's first paint is on screen, a layout asked for is done when the screen
    # is next idle instead of at the next tick of textual's frame timer (up to 1/60 s of
    # waiting, with nothing else to do). The app turns this off after the first paint.
    eager_layout = True

    async def _on_idle(self, event: events.Idle) -> None:
        waiting = self._layout_required or self._scroll_required or self._dirty_widgets
        if waiting and self.eager_layout and self.is_current and not self.app._batch_count:
            self._on_timer_update()
