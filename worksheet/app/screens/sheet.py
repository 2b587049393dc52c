"""The sheet's screen (the first on the stack): it takes no focus of its own accord, and
it lays itself out no more often than its size or content asks."""

from __future__ import annotations

from textual import events, messages
from textual._time import get_time  # the clock textual stamps its messages with
from textual.geometry import Size
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
        waiting = (
            self._layout_required
            or self._scroll_required
            or self._repaint_required  # textual's resume handler asks for one after its pass
            or self._dirty_widgets
        )
        if waiting and self.eager_layout and self.is_current and not self.app._batch_count:
            self._on_timer_update()

    # Before the first paint, when the last full layout pass started and when the first
    # pass (the one that lays out and draws every widget) started, on textual's message
    # clock: the notices of layout and repaint asked for before them are answered already.
    _laid_out_at = float("-inf")
    _first_drawn_at = float("-inf")

    def _refresh_layout(self, size: Size | None = None, scroll: bool = False) -> None:
        if not self.eager_layout:  # after the first paint: textual's own, nothing more
            super()._refresh_layout(size, scroll)
            return
        full = bool(self.outer_size if size is None else size) and not (
            scroll and not self._layout_widgets
        )
        first = full and not self._compositor.widgets  # nothing laid out yet: all is new
        started = get_time()
        super()._refresh_layout(size, scroll)
        if full:
            self._laid_out_at = started
            if first:
                self._first_drawn_at = started
            # textual's frame timer clears this after its own passes; the pass of the
            # screen's first appearance leaves it set, and the next tick would lay the
            # whole screen out again for requests this pass has just met.
            self._layout_required = False

    async def _on_layout(self, message: messages.Layout) -> None:
        # Widgets mounted at start ask for a layout while they are styled and filled; the
        # notices reach the screen after its first full pass (which reflowed everything,
        # their arrangement caches cleared when they asked), and each would ask for one
        # more pass of the whole screen. Notices posted since are handled as textual does.
        if self.eager_layout and message.time < self._laid_out_at:
            message.stop()
            message.prevent_default()  # Screen's own handler, next in the MRO, is not called

    async def _on_update(self, message: messages.Update) -> None:
        # Likewise for repaints: the first pass draws every widget as it is when the pass
        # runs, so a repaint asked for before it would draw the same again, and the app's
        # first-paint callback would wait for that second render.
        if self.eager_layout and message.time < self._first_drawn_at:
            message.stop()
            message.prevent_default()
