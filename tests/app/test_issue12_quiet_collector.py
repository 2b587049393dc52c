"""Issue 12: after the first run the app makes Python's full collections at the user's
pauses, not between two keys; the process's collector thresholds are put back at exit."""

from __future__ import annotations

import gc
from pathlib import Path

import pytest

from worksheet.app import pauses
from worksheet.app.app import WorksheetApp
from worksheet.app.pauses import QuietCollector
from worksheet.app.widgets.calc_cell import CalcCellView


class FakeClock:
    def __init__(self) -> None:
        self.now = 100.0

    def __call__(self) -> float:
        return self.now


def test_issue12_deferring_stops_automatic_collections_seen_and_restore_puts_them_back() -> None:
    before = gc.get_threshold()
    collector = QuietCollector()
    collector.defer()
    try:
        young, middle, full = gc.get_threshold()
        assert (young, middle) == before[:2]  # the young generations are collected as usual
        assert full == pauses._NO_AUTOMATIC_FULL
        collector.defer()  # idempotent
    finally:
        collector.restore()
    assert gc.get_threshold() == before
    collector.restore()  # idempotent
    assert gc.get_threshold() == before


def test_issue12_two_collectors_put_the_threshold_back_when_the_last_one_restores() -> None:
    before = gc.get_threshold()
    first, second = QuietCollector(), QuietCollector()
    first.defer()
    second.defer()
    first.restore()
    assert gc.get_threshold()[2] == pauses._NO_AUTOMATIC_FULL  # the second still defers
    second.restore()
    assert gc.get_threshold() == before


def test_issue12_full_collection_waits_for_a_quiet_moment_after_a_run(
    collections_seen: list[int],
) -> None:
    clock = FakeClock()
    collector = QuietCollector(quiet_seconds=0.5, most_seconds=20.0, clock=clock)
    collector.defer()
    try:
        assert collector.collect_if_quiet() is None  # no run yet: nothing waits
        collector.note_run()
        clock.now += 0.2
        collector.note_input()  # a key just now
        clock.now += 0.1
        assert collector.collect_if_quiet() == pytest.approx(0.4)
        assert 2 not in collections_seen and collector.collections == 0
        clock.now += 0.4
        assert collector.collect_if_quiet() is None
        assert collector.collections == 1 and 2 in collections_seen
        # Nothing ran since: no second collection however quiet it stays.
        clock.now += 5.0
        assert collector.collect_if_quiet() is None and collector.collections == 1
    finally:
        collector.restore()


def test_issue12_a_long_burst_of_typing_still_gets_a_full_collection() -> None:
    clock = FakeClock()
    collector = QuietCollector(quiet_seconds=0.5, most_seconds=20.0, clock=clock)
    collector.defer()
    try:
        for _ in range(50):  # a key every 0.3 s and a run after each, for 15 s
            clock.now += 0.3
            collector.note_input()
            collector.note_run()
            assert not collector.collect_if_overdue()
        assert collector.collections == 0
        clock.now += 6.0
        collector.note_input()
        collector.note_run()
        assert collector.collect_if_overdue()  # 20 s since deferring began
        assert collector.collections == 1
    finally:
        collector.restore()


def test_issue12_not_deferring_the_collector_asks_for_nothing() -> None:
    collector = QuietCollector(clock=FakeClock())
    collector.note_run()
    assert collector.collect_if_quiet() is None
    assert not collector.collect_if_overdue()
    assert collector.collections == 0


def test_issue12_the_app_collects_in_full_only_at_a_pause_and_restores_the_threshold(
    basic_sheet: Path, ui, collections_seen: list[int]
) -> None:
    before = gc.get_threshold()
    app = WorksheetApp(str(basic_sheet))
    seen_while_typing: list[int] = []

    async def scenario(pilot, app: WorksheetApp) -> None:
        await ui.settle(pilot, app)
        collector = app._quiet_collector
        assert collector.deferring and gc.get_threshold()[2] == pauses._NO_AUTOMATIC_FULL
        await pilot.pause(collector.quiet_seconds + 0.3)  # the first run's own pause
        collections_seen.clear()
        made_before = collector.collections
        # Longer than a key's run takes even on a slow machine: the keys below come
        # faster than this (each waits only for its run).
        collector.quiet_seconds = 2.0
        editor = app.query(CalcCellView).first().editor  # M = 5e11 [kg] heads it
        editor.focus()
        editor.move_cursor((0, 5))
        await pilot.press("1")  # M = 51e11 [kg]
        await pilot.pause(0.1)
        await ui.settle(pilot, app)
        assert editor.document.get_line(0).startswith("M = 51e11")
        await pilot.press("backspace")
        await pilot.pause(0.1)
        await ui.settle(pilot, app)
        assert collector._pending  # the runs of these edits wait for their pause
        seen_while_typing.extend(collections_seen)
        assert collector.collections == made_before
        await pilot.pause(collector.quiet_seconds + 0.5)
        assert collector.collections == made_before + 1
        # Every full collection since the keys is the app's own, made at the pause.
        assert collections_seen.count(2) == 1

    ui.drive(app, scenario)
    assert 2 not in seen_while_typing
    assert gc.get_threshold() == before
