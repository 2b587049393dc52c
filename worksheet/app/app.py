"""The worksheet app: wires key actions and widget messages to the session and the runner.

No physics here: the runner computes, the session edits, the widgets show.
"""

from __future__ import annotations

import contextlib
import dataclasses
from collections import Counter
from collections.abc import Callable, Iterable
from functools import partial
from pathlib import Path
from typing import TYPE_CHECKING

from rich.text import Text
from textual import events, on, work
from textual.app import App, ComposeResult, SystemCommand
from textual.containers import Horizontal, Vertical
from textual.events import Resize
from textual.message import Message
from textual.screen import ModalScreen, Screen
from textual.theme import BUILTIN_THEMES
from textual.timer import Timer
from textual.widget import Widget
from textual.widgets import Static
from textual.worker import get_current_worker

from worksheet.app.keys import KEY_ACTIONS, app_bindings
from worksheet.app.lazy_service import LazyRunService
from worksheet.app.pauses import CollectorHold, QuietCollector, settle_long_lived
from worksheet.app.recovery import newer_recovery, remove_recovery, write_recovery
from worksheet.app.screens.choice import ChoiceScreen
from worksheet.app.screens.sheet import SheetScreen
from worksheet.app.session import SheetSession
from worksheet.app.theme_files import (
    FALLBACK,
    STATE_DEFAULTS,
    STYLESHEET_NAME,
    load_themes,
    read_stylesheet,
    read_theme_file,
)
from worksheet.app.widgets.calc_cell import CalcCellView
from worksheet.app.widgets.editors import is_calc_editor, is_text_area
from worksheet.app.widgets.key_hints import KeyHints
from worksheet.app.widgets.ledger import QuantityLedger
from worksheet.app.widgets.links import QuantityLinks
from worksheet.app.widgets.note_cell import NoteCellView
from worksheet.app.widgets.panel_stand_in import LINKS_HINT, PanelStandIn
from worksheet.app.widgets.result_lines import STATUS_WORDS, result_text
from worksheet.app.widgets.sheet_view import SheetView
from worksheet.app.widgets.status_line import StatusLine
from worksheet.document import CalcCell, atomic_write_text, parse_document, render_document
from worksheet.errors import WorksheetError

if TYPE_CHECKING:  # the engine is imported by the first run, the editors after the first paint
    from textual.widgets import TextArea

    from worksheet.app.evaluation import RunOutcome
    from worksheet.engine import StatementResult

# Actions that stay available while a dialog is open.
DIALOG_ACTIONS = frozenset({"leave"})
# Below this many columns the side panels are hidden; the panel key shows them instead of
# the sheet (at 80 columns a side panel would leave neither the sheet nor the numbers room).
NARROW_WIDTH = 100
# The status line while the first run is going: the result lines shown are the file's.
RECORDED_NOTICE = "results as recorded in the file (pending); computing ..."


def summary(results: Iterable[StatementResult]) -> str:
    """``5 results: 4 ok, 1 ERROR`` (status words as the result lines show them)."""
    counts = Counter(r.status for r in results if r.kind != "blank")
    total = sum(counts.values())
    order = ("ok", "failed", "error", "skipped", "stale")
    parts = [f"{counts[s]} {s if s == 'ok' else s.upper()}" for s in order if counts[s]]
    noun = "result" if total == 1 else "results"
    return f"{total} {noun}: " + ", ".join(parts) if parts else "no results"


class KeyHandled(Message):
    """Follows a released key through the widgets it went to, back to the app."""

    def __init__(self, number: int) -> None:
        super().__init__()
        self.number = number


class WorksheetApp(App[int]):
    """The terminal app on one sheet file. Keys: see ``worksheet.app.keys``."""

    TITLE = "worksheet"
    BINDINGS = app_bindings()  # type: ignore[assignment]
    DEBOUNCE_SECONDS = 0.15
    RECOVERY_SECONDS = 3.0
    # A run still going after this long when a newer edit waits is given up (see RunService).
    GIVE_UP_AFTER = 1.0

    def __init__(self, path: str, theme: str | None = None) -> None:
        self._collector = CollectorHold()
        super().__init__()
        stylesheet = read_stylesheet()
        if stylesheet is not None:
            # Read through importlib.resources, so it works from a wheel as from the tree.
            self.CSS = stylesheet
        self.sheet_path = Path(path)
        self.requested_theme = theme
        self.service = LazyRunService(self.sheet_path)
        self.session: SheetSession | None = None
        self.outcome: RunOutcome | None = None
        self.theme_names: list[str] = []
        self.problems: list[str] = (
            []
            if stylesheet is not None
            else [f"the stylesheet {STYLESHEET_NAME} is missing; the layout is plain"]
        )
        self._generation = 0
        self._run_timer: Timer | None = None
        # Full collections at the user's pauses, from the first run on (see pauses.py).
        self._quiet_collector = QuietCollector()
        self._quiet_timer: Timer | None = None
        self._last_recovery: str | None = None
        self._closed = False
        self._notes_rendered = False  # notes show their source text until after first paint
        self._panels_live = False  # the side lists are stand-ins until after first paint
        self._open_error: WorksheetError | None = None
        self._notice = ""  # the last cell operation, kept in the status line
        # Where the sheet's focus was when the panel key moved it to the side panel.
        self._place: tuple[Widget, float] | None = None
        # Keys typed before the editors are in, handed on one at a time after (None: not
        # holding any more); the number of the key last handed on.
        self._held: list[events.Event] | None = []
        self._released = 0
        # Before the first stylesheet pass: a theme set after mounting would style every
        # widget twice before the first paint.
        self._install_themes()

    # ----- building the screen

    def compose(self) -> ComposeResult:
        # The sheet is read here, so its cells are composed with the rest of the screen.
        try:
            self.session = SheetSession.open(self.sheet_path)
        except WorksheetError as err:
            self._open_error = err
        # Narrow from the start, so the widgets are not styled twice before the first paint.
        self.screen.set_class(self.size.width < NARROW_WIDTH, "-narrow", update=False)
        yield Static(id="title")
        with Horizontal(id="body"):
            # The cells of the first screenful (and the focused one); the rest after it.
            yield SheetView(
                self.session.doc if self.session else None,
                rows=self.size.height,
                through=self._first_focus(),
                id="sheet",
            )
            with Vertical(id="side"):
                yield Static(Text("Quantities"), classes="panel-title")
                # Plain text in the lists' places until right after the first paint.
                yield PanelStandIn("ledger")
                yield Static(Text("Links of the chosen quantity"), classes="panel-title")
                yield PanelStandIn("links", LINKS_HINT)
        yield Static(id="at-cursor")
        yield StatusLine(id="status")
        yield KeyHints()

    def on_load(self) -> None:
        # Only once running: an app made and never run leaves the collector alone.
        self._collector.hold()  # until the first paint (see _after_first_paint)

    def get_default_screen(self) -> Screen:
        return SheetScreen(id="_default")

    def get_theme_variable_defaults(self) -> dict[str, str]:
        # Our state colours exist in every theme, textual's own included.
        return {name: FALLBACK[source] for name, source in STATE_DEFAULTS.items()}

    async def on_mount(self) -> None:
        self.watch(self.screen, "focused", self._focus_moved, init=False)
        if self.session is None:
            err = self._open_error
            where = err.located() if err is not None else "not read"
            self.exit(2, message=f"cannot open {self.sheet_path.name}: {where}")
            return
        # Paint the sheet with the results its file records first, then compute: the run
        # would otherwise compete with the first paint for the interpreter.
        self._place_focus(self._first_focus())
        self.say(RECORDED_NOTICE)
        self.call_after_refresh(self._after_first_paint)
        self.set_interval(self.RECOVERY_SECONDS, self.keep_recovery)
        if self.problems:
            self.say("; ".join(self.problems), problem=True)
        recovered = newer_recovery(self.sheet_path)
        if recovered is not None:
            self.push_screen(
                ChoiceScreen(
                    f"A recovery copy of {self.sheet_path.name} is newer than the sheet "
                    "(unsaved edits from an earlier session).",
                    [
                        ("restore", "Restore it"),
                        ("discard", "Discard the copy"),
                        ("later", "Decide later"),
                    ],
                    "later",
                ),
                lambda answer: self._recovery_answer(answer, recovered),
            )

    async def _after_first_paint(self) -> None:
        """Start the engine (in its thread), then put the editors in and render the notes
        while it loads."""
        screen = self.main_screen
        if isinstance(screen, SheetScreen):
            screen.eager_layout = False  # back to textual's frame timer
        self._collector.release()
        self.start_run()
        await self.sheet.mount_rest()
        await self.sheet.go_live()
        await self._swap_in_panels()
        await self._release_next_key()
        await self.sheet.render_notes()
        self._notes_rendered = True

    async def _swap_in_panels(self) -> None:
        """The side panels' lists in place of their first-paint stand-ins."""
        side = self.query_one("#side")
        places = {stand_in.place: stand_in for stand_in in side.query(PanelStandIn)}
        ledger, links = QuantityLedger(id="ledger"), QuantityLinks(id="links")
        with self.batch_update():
            for widget, place in ((ledger, "ledger"), (links, "links")):
                await side.mount(widget, before=places[place])
                await places[place].remove()
        links.show(None)
        self._panels_live = True

    # ----- keys typed before the editors are in

    async def on_event(self, event: events.Event) -> None:
        if isinstance(event, events.Key | events.Paste | events.MouseDown):
            self._quiet_collector.note_input()
        # Until the calc cells have their editors (right after the first paint) the keys
        # typed wait here, in order; then they go on one at a time (see _release_next_key),
        # as textual would have handed them on, so none is lost or overtaken.
        if (
            self._held is not None
            and isinstance(event, events.Key | events.Paste)
            and not event.is_forwarded
        ):
            self._held.append(event)
            return
        await super().on_event(event)

    async def _release_next_key(self) -> None:
        """Hand the oldest held key on; the next one goes once this one has been handled
        by every widget it went to (or after a second, should that widget go meanwhile)."""
        if not self._held:
            self._held = None
            return
        event = self._held.pop(0)
        self._released += 1
        number = self._released
        await super().on_event(event)  # as if it came from the terminal now
        # Bubbling up from where the key went, through the same queues, this comes back
        # after the key's handling (its bindings run when the key reaches the app).
        (self.focused or self.screen).post_message(KeyHandled(number))
        self.set_timer(1.0, partial(self._key_handled_by, number))

    @on(KeyHandled)
    async def _key_handled(self, message: KeyHandled) -> None:
        await self._key_handled_by(message.number)

    async def _key_handled_by(self, number: int) -> None:
        # Only for the key last handed on: a late timer or message of an earlier one is
        # ignored.
        if number == self._released and self._held is not None:
            await self._release_next_key()

    def refresh_css(self, animate: bool = True) -> None:
        if not self._screen_stack:
            # The theme set in __init__ asks for this before any screen exists: nothing is
            # styled yet, so the theme's variables are all it needs. textual would parse
            # the whole stylesheet now in a scratch copy and throw that parse away, and
            # the first styling pass would parse it again.
            self.stylesheet.set_variables(self.get_css_variables())
            return
        super().refresh_css(animate)

    def _install_themes(self) -> None:
        loaded = load_themes()
        for theme in loaded.themes:
            self.register_theme(theme)
        self.theme_names = [theme.name for theme in loaded.themes]
        self.problems.extend(loaded.problems)
        fallback = (
            "dark"
            if "dark" in self.theme_names
            else (self.theme_names[0] if self.theme_names else "textual-dark")
        )
        wanted = self.requested_theme or fallback
        if wanted not in self.theme_names:
            candidate = Path(wanted)
            if candidate.suffix == ".toml" or candidate.is_file():
                try:
                    theme = read_theme_file(candidate)
                except WorksheetError as err:
                    self.problems.append(f"{err.message}; using the {fallback} theme")
                    wanted = fallback
                else:
                    self.register_theme(theme)
                    self.theme_names.append(theme.name)
                    wanted = theme.name
            else:
                self.problems.append(
                    f"no theme called {wanted!r} (have "
                    f"{', '.join(self.theme_names)}); using {fallback}"
                )
                wanted = fallback
        self.theme = wanted
        if self.theme_names:
            # Only the app's own themes are offered (textual's stock themes are not ours).
            for name in BUILTIN_THEMES:
                if name != wanted:
                    self.unregister_theme(name)

    # ----- helpers

    def _first_focus(self) -> int:
        """The block focused at start: the top of a saved sheet; a new sheet's empty calc
        cell, so the first keys typed go into it."""
        if self.session is None or self.session.saved is not None:
            return 0
        return self._first_calc_block()

    def _first_calc_block(self) -> int:
        assert self.session is not None
        for index, block in enumerate(self.session.doc.blocks):
            if isinstance(block, CalcCell):
                return index
        return 0

    @property
    def main_screen(self) -> Screen:
        """The sheet's screen (dialogs are pushed above it)."""
        return self.screen_stack[0]

    def on_resize(self, event: Resize) -> None:
        self.main_screen.set_class(event.size.width < NARROW_WIDTH, "-narrow")

    @property
    def sheet(self) -> SheetView:
        return self.query_one(SheetView)

    def say(self, message: str, problem: bool = False) -> None:
        self.query_one(StatusLine).say(message, problem)

    def _refresh_title(self) -> None:
        if self.session is None:
            return
        title = self.session.doc.get("title") or self.sheet_path.name
        mark = "  * unsaved edits" if self.session.dirty else ""
        text = Text(f"{title}  ({self.sheet_path.name}){mark}")
        self.query_one("#title", Static).update(text, layout=False)  # one line high

    async def _show_document(
        self,
        focus: int | None,
        cursor: tuple[int, int] | None = None,
        run: bool = True,
    ) -> None:
        """Rebuild every cell view from the session and run the sheet (at once by default).

        The sheet keeps its scroll position; it scrolls only as far as needed to show the
        focused cell.
        """
        assert self.session is not None
        scrolled = self.sheet.scroll_y
        await self.sheet.rebuild(self.session.doc)
        self._place_focus(focus, cursor, scrolled)
        if run:
            self.start_run()

    def _place_focus(
        self, focus: int | None, cursor: tuple[int, int] | None = None, scrolled: float = 0.0
    ) -> None:
        """Focus the cell ``focus`` (cursor back in place) and scroll back to ``scrolled``,
        then only as far as needed to show that cell once it is laid out."""
        sheet = self.sheet
        view = sheet.focus_block(focus, cursor) if focus is not None else None

        def back_in_place() -> None:
            sheet.scroll_to(y=scrolled, animate=False, immediate=True)
            if view is not None and view.is_mounted:
                sheet.scroll_to_widget(view, animate=False, immediate=True, top=False)

        self.call_after_refresh(back_in_place)
        self._refresh_title()

    @property
    def settled(self) -> bool:
        """No run is pending, the shown results are those of the current document, and the
        notes are rendered (their height is final, so scroll positions are too)."""
        return (
            self._notes_rendered
            and self.session is not None
            and self._run_timer is None
            and self.outcome is not None
            and self.outcome.doc is self.session.doc
        )

    def _current_block(self) -> int | None:
        return self.sheet.current_index()

    # ----- evaluation

    def schedule_run(self) -> None:
        """Run shortly after the last key (debounced)."""
        if self._run_timer is not None:
            self._run_timer.stop()
        self._run_timer = self.set_timer(self.DEBOUNCE_SECONDS, self.start_run)

    def start_run(self) -> None:
        if self.session is None:
            return
        if self._run_timer is not None:
            self._run_timer.stop()
            self._run_timer = None
        self._generation += 1
        # Until the first run is back, the lines on screen are the file's, not computed.
        self.say(RECORDED_NOTICE if self.outcome is None else "computing ...")
        # A run going on for long (a verb in its budget) would hold this one back.
        service = self.service.started
        if service is not None and service.give_up_slow_run(self.GIVE_UP_AFTER):
            self._notice = "gave up a slow run for the newer edit"
        self._evaluate(self.session.doc, self._generation)

    @work(thread=True, exclusive=True, group="evaluate", exit_on_error=False)
    def _evaluate(self, doc: object, generation: int) -> None:
        worker = get_current_worker()
        service = self.service.get()  # the first run imports the engine here
        if service is None:
            return
        outcome = service.run(doc, lambda: worker.is_cancelled)  # type: ignore[arg-type]
        if outcome is None or worker.is_cancelled or self._closed:
            return
        # The app may have closed while the run was going on: then nobody needs the result.
        with contextlib.suppress(RuntimeError):
            self.call_from_thread(self.apply_outcome, outcome, generation)

    def apply_outcome(self, outcome: RunOutcome, generation: int) -> None:
        """Show one run's results, unless a newer run has started since."""
        if generation != self._generation or self.session is None:
            return
        if not (self.sheet.complete and self._panels_live):  # a quick first run, before
            # the sheet's lower cells or the side lists are in
            self.set_timer(0.02, partial(self.apply_outcome, outcome, generation))
            return
        first = self.outcome is None
        self.outcome = outcome
        if first:
            settle_long_lived()
            self._quiet_collector.defer()
        self._collect_at_a_pause()
        if outcome.run is None:
            for view in self.sheet.cells():
                if isinstance(view, CalcCellView):
                    view.show_waiting("not computed (see the status line)")
            self.say(f"cannot run the sheet: {outcome.problem}", problem=True)
            return
        self.sheet.show_run(outcome.run)
        ledger = self.query_one(QuantityLedger)
        ledger.show(outcome.rows)
        chosen = ledger.chosen_name()
        self.query_one(QuantityLinks).show(ledger.row_named(chosen) if chosen else None)
        self._show_status()
        self._show_cursor_result()
        self._refresh_title()

    def _collect_at_a_pause(self) -> None:
        """A run ended: a full collection once no key comes for a moment (at once in a
        burst of typing long enough to be overdue)."""
        collector = self._quiet_collector
        collector.note_run()
        if not collector.collect_if_overdue() and self._quiet_timer is None:
            self._quiet_timer = self.set_timer(collector.quiet_seconds, self._quiet_check)

    def _quiet_check(self) -> None:
        wait = self._quiet_collector.collect_if_quiet()
        self._quiet_timer = None if wait is None else self.set_timer(wait, self._quiet_check)

    def _show_status(self) -> bool:
        """What the last run gave and whether the file holds it (False: no run to tell)."""
        if self.outcome is None or self.outcome.run is None or self.session is None:
            return False
        run = self.outcome.run
        if self.session.dirty:
            state = "unsaved edits"
        elif run.stale:
            # The lines shown are computed afresh; only the file's result blocks lag behind.
            count = len(run.stale)
            state = f"the file records {count} result{'s' if count > 1 else ''} differently"
        else:
            state = "saved"
        parts = [summary(run.results), state]
        parts.extend(run.settings.warnings)
        if self._notice:
            parts.append(self._notice)
        self.say("  |  ".join(parts))
        return True

    # ----- the cursor's line

    def on_text_area_selection_changed(self, event: TextArea.SelectionChanged) -> None:
        # By name rather than ``@on``: the TextArea module loads after the first paint.
        if is_calc_editor(event.text_area):
            self._show_cursor_result()

    def _focus_moved(self, _focused: Widget | None) -> None:
        self._show_cursor_result()

    def _cursor_file_line(self) -> int | None:
        """The file line of the cursor when it is in a calc cell's editor."""
        editor = self.focused
        view = editor.parent if is_calc_editor(editor) else None
        if not isinstance(view, CalcCellView) or not is_calc_editor(editor):
            return None
        return view.first_line + editor.cursor_location[0]

    def _show_cursor_result(self) -> None:
        """The result of the statement under the cursor, beneath the sheet, in full."""
        strip = self.query_one("#at-cursor", Static)
        line = self._cursor_file_line()
        run = self.outcome.run if self.outcome is not None else None
        strip.display = line is not None
        if line is None or run is None:
            strip.update(Text(""))
            return
        found = None
        for source, result in zip(run.statements, run.results, strict=True):
            if source.line <= line <= source.line + source.text.count("\n"):
                found = result
                break
        if found is None or found.kind == "blank":
            text = f"line {line}: nothing to record"
        else:
            word = STATUS_WORDS.get(found.status, found.status.upper())
            text = f"line {found.line}: {word}  {result_text(found)}"
            if found.name is not None:
                self.query_one(QuantityLedger).choose(found.name)
        strip.update(Text(text))

    # ----- edits inside cells

    @on(CalcCellView.Edited)
    def _calc_edited(self, event: CalcCellView.Edited) -> None:
        if self.session is not None:
            self._store_edit(self.session.edit_cell, event.index, event.text, "edit")

    @on(NoteCellView.Edited)
    def _note_edited(self, event: NoteCellView.Edited) -> None:
        if self.session is not None:
            self._store_edit(self.session.edit_note, event.index, event.text, "note")

    def _store_edit(
        self, edit: Callable[[int, str], bool], index: int, text: str, what: str
    ) -> None:
        """Put a cell's new text into the sheet and schedule a run; keep it on screen if not."""
        try:
            changed = edit(index, text)
        except WorksheetError as err:
            self.say(
                f"this {what} is kept on screen but not in the sheet yet: {err.located()}",
                problem=True,
            )
            return
        if changed:
            self._notice = ""
            self.sheet.replace_places(self.session.doc)
            self._refresh_title()
            self.schedule_run()

    @on(QuantityLedger.Chosen)
    def _quantity_chosen(self, event: QuantityLedger.Chosen) -> None:
        self.query_one(QuantityLinks).show(event.row)

    @on(QuantityLinks.JumpTo)
    def _jump(self, event: QuantityLinks.JumpTo) -> None:
        self.main_screen.remove_class("-side-shown")  # the sheet again, in a narrow terminal
        if self.session is not None and not self.sheet.focus_line(self.session.doc, event.line):
            self.say(f"line {event.line} is not in a calc cell now", problem=True)

    # ----- actions

    def check_action(self, action: str, parameters: tuple[object, ...]) -> bool | None:
        if isinstance(self.screen, ModalScreen) and action in {k.action for k in KEY_ACTIONS}:
            return action in DIALOG_ACTIONS
        return True

    def get_system_commands(self, screen: Screen) -> Iterable[SystemCommand]:
        # Only the app's own actions: textual's stock commands are not part of this app.
        for key in KEY_ACTIONS:
            yield SystemCommand(
                f"{key.label} ({key.key})", key.description, getattr(self, f"action_{key.action}")
            )

    def action_show_help(self) -> None:
        from worksheet.app.screens.help import HelpScreen  # dialogs load when first opened

        self.push_screen(HelpScreen())

    def action_rerun(self) -> None:
        self.start_run()

    def action_next_theme(self) -> None:
        if not self.theme_names:
            self.say("no themes were loaded", problem=True)
            return
        position = self.theme_names.index(self.theme) if self.theme in self.theme_names else -1
        self.theme = self.theme_names[(position + 1) % len(self.theme_names)]
        self.say(f"theme: {self.theme}")

    def action_switch_panel(self) -> None:
        """To the quantities panel and back to the same place: cell, cursor and scroll."""
        side = self.query_one("#side")
        if side.has_focus_within:
            self.main_screen.remove_class("-side-shown")
            self._back_to_sheet()
            return
        focused = self.focused
        if focused is not None and self.sheet in focused.ancestors_with_self:
            self._place = (focused, self.sheet.scroll_y)
        self.main_screen.add_class("-side-shown")
        self.query_one(QuantityLedger).focus()

    def _back_to_sheet(self) -> None:
        place, self._place = self._place, None
        if place is not None and place[0].is_mounted:
            widget, scrolled = place
            widget.focus(scroll_visible=False)
            sheet = self.sheet
            self.call_after_refresh(
                lambda: sheet.scroll_to(y=scrolled, animate=False, immediate=True)
            )
            return
        index = self._current_block()
        self.sheet.focus_block(index if index is not None else 0)

    def action_find_constant(self) -> None:
        from worksheet.constants import DATASET_NAMES, DEFAULT_DATASET, load_dataset

        target: TextArea | None = self.focused if is_text_area(self.focused) else None  # type: ignore[assignment]
        # The front matter's dataset, read as the runner reads it (a bad name is reported
        # by the run); the runner itself is not imported here, it would load the engine.
        pinned = self.session.doc.get("constants") if self.session is not None else None
        dataset_name = pinned if pinned is not None and pinned in DATASET_NAMES else DEFAULT_DATASET

        def insert(text: str | None) -> None:
            if text is None:
                return
            if target is None or not target.is_mounted:
                self.say(f"put the cursor in a cell to insert {text}", problem=True)
                return
            target.focus()
            target.insert(text)

        from worksheet.app.screens.finder import ConstantFinder  # loads when first opened

        self.push_screen(ConstantFinder(load_dataset(dataset_name)), insert)

    async def action_toggle_note(self) -> None:
        index = self._current_block()
        views = self.sheet.cells()
        if index is None or not isinstance(views[index], NoteCellView):
            self.say("choose a note first (tab moves between cells)", problem=True)
            return
        await views[index].toggle_editing()  # type: ignore[union-attr]

    async def _structural(
        self, change: str, focus: int | None, cursor: tuple[int, int] | None = None
    ) -> None:
        """Rebuild after a change to the list of cells and say what happened."""
        self._notice = change
        await self._show_document(focus, cursor)
        self.say(change)

    def _cursor(self) -> tuple[int, int] | None:
        """Where the cursor is in the focused editor, to put it back after a rebuild."""
        focused = self.focused
        return focused.cursor_location if is_text_area(focused) else None  # type: ignore[union-attr]

    async def action_add_calc(self) -> None:
        await self._insert("calc")

    async def action_add_note(self) -> None:
        await self._insert("note")

    async def _insert(self, kind: str) -> None:
        if self.session is None:
            return
        index = self._current_block()
        where = len(self.session.doc.blocks) if index is None else index + 1
        try:
            if kind == "calc":
                self.session.add_calc(where)
            else:
                self.session.add_note(where)
        except WorksheetError as err:
            self.say(f"cannot add a cell here: {err.located()}", problem=True)
            return
        await self._structural(f"added a {kind} cell", where)
        view = self.sheet.cells()[where]
        if isinstance(view, NoteCellView):
            # A new note opens in its editor with its placeholder chosen: typing replaces it.
            await view.toggle_editing()
            from textual.widgets import TextArea

            editor = view.query_one(TextArea)
            editor.select_all()

    async def action_delete_cell(self) -> None:
        index = self._current_block()
        if self.session is None or index is None:
            self.say("choose a cell first", problem=True)
            return
        try:
            self.session.delete(index)
        except WorksheetError as err:
            self.say(f"cannot delete this cell: {err.located()}", problem=True)
            return
        await self._structural("deleted the cell (ctrl+z brings it back)", index)

    async def action_move_up(self) -> None:
        await self._move(-1)

    async def action_move_down(self) -> None:
        await self._move(1)

    async def _move(self, delta: int) -> None:
        index = self._current_block()
        if self.session is None or index is None:
            self.say("choose a cell first", problem=True)
            return
        target = index + delta
        if not 0 <= target < len(self.session.doc.blocks):
            self.say("the cell is already at the edge of the sheet")
            return
        try:
            self.session.move(index, delta)
        except WorksheetError as err:
            self.say(f"cannot move this cell: {err.located()}", problem=True)
            return
        await self._structural("moved the cell", target)

    async def action_undo(self) -> None:
        index, cursor = self._current_block(), self._cursor()
        if self.session is None or not self.session.undo():
            self.say("nothing to undo")
            return
        await self._structural("undone", index, cursor)

    async def action_redo(self) -> None:
        index, cursor = self._current_block(), self._cursor()
        if self.session is None or not self.session.redo():
            self.say("nothing to redo")
            return
        await self._structural("redone", index, cursor)

    # ----- files

    def keep_recovery(self) -> None:
        """Write the recovery copy when there are unsaved edits it does not hold yet."""
        if self.session is None or not self.session.dirty:
            return
        text = render_document(self.session.doc)
        if text == self._last_recovery:
            return
        try:
            write_recovery(self.sheet_path, text)
        except WorksheetError as err:
            self.say(f"cannot keep a recovery copy: {err.located()}", problem=True)
            return
        self._last_recovery = text

    async def _recovery_answer(self, answer: str | None, text: str) -> None:
        if self.session is None:
            return
        if answer == "restore":
            try:
                doc = parse_document(text)
            except WorksheetError as err:
                self.say(f"the recovery copy cannot be read: {err.located()}", problem=True)
                return
            self.session.replace_all(doc)
            await self._structural("restored the recovery copy (not saved yet)", 0)
        elif answer == "discard":
            remove_recovery(self.sheet_path)
            self.say("discarded the recovery copy")

    def action_save(self) -> None:
        if self.session is not None:
            self.say("saving ...")
            self._save(self.session.doc, False)

    @work(thread=True, group="save", exit_on_error=False)
    def _save(self, doc: object, then_quit: bool) -> None:
        outcome = None
        service = self.service.get()
        for _ in range(3 if service is not None else 0):
            # A run given up for a newer edit gives None: the save is still wanted.
            outcome = service.run(doc, lines_as_written=True)  # type: ignore[union-attr, arg-type]
            if outcome is not None or self._closed:
                break
        problem = None
        if outcome is None or outcome.run is None:
            problem = f"not saved: {outcome.problem if outcome else 'cancelled'}"
        else:
            try:
                atomic_write_text(self.sheet_path, outcome.run.text)
            except WorksheetError as err:
                problem = f"not saved: {err.located()}"
        with contextlib.suppress(RuntimeError):  # the app closed meanwhile
            self.call_from_thread(self._saved, doc, outcome, problem, then_quit)

    def _saved(
        self, doc: object, outcome: RunOutcome | None, problem: str | None, then_quit: bool
    ) -> None:
        if problem is not None or outcome is None or outcome.run is None or not self.session:
            self.say(problem or "not saved", problem=True)
            return
        self.session.mark_saved(doc, outcome.run.document)  # type: ignore[arg-type]
        if self.outcome is not None and self.outcome.doc is doc and self.outcome.run:
            # The file now records exactly these results.
            run = dataclasses.replace(self.outcome.run, document=self.session.doc, stale=())
            self.outcome = dataclasses.replace(self.outcome, doc=self.session.doc, run=run)
        remove_recovery(self.sheet_path)
        self._last_recovery = None
        self._refresh_title()
        self._notice = f"saved {self.sheet_path.name}"
        if not self._show_status():
            self.say(self._notice)
        if then_quit:
            self.finish(0)

    def action_leave(self) -> None:
        if self.session is None or not self.session.dirty:
            self.finish(0)
            return
        if isinstance(self.screen, ChoiceScreen):
            return
        self.push_screen(
            ChoiceScreen(
                "The sheet has unsaved edits.",
                [
                    ("save", "Save and quit"),
                    ("discard", "Quit without saving"),
                    ("stay", "Keep editing"),
                ],
                "stay",
            ),
            self._leave_answer,
        )

    async def action_quit(self) -> None:
        # textual's own quit (palette, ctrl+c hint) goes through the unsaved-edits question.
        self.action_leave()

    def _leave_answer(self, answer: str | None) -> None:
        if self.session is None:
            return
        if answer == "save":
            self.say("saving ...")
            self._save(self.session.doc, True)
        elif answer == "discard":
            remove_recovery(self.sheet_path)
            self.finish(0)

    def finish(self, code: int) -> None:
        self.close_service()
        self.exit(code)

    def close_service(self) -> None:
        """Stop the runner's worker process (idempotent)."""
        if not self._closed:
            self._closed = True
            self.service.close()

    def on_unmount(self) -> None:
        self._collector.release()  # an app that never painted (a sheet it cannot open)
        self._quiet_collector.restore()
        self.close_service()
