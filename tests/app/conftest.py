"""Helpers for driving the app with textual's pilot (plain functions, no async plugin)."""

from __future__ import annotations

import asyncio
import time
from collections.abc import Awaitable, Callable
from pathlib import Path

import pytest
from textual.pilot import Pilot

from worksheet.app.app import WorksheetApp
from worksheet.app.widgets.ledger import QuantityLedger

# A small sheet of our own: a black hole of 5e11 kg, its radius, temperature and a claim.
BASIC_SHEET = """---
title: Light hole
constants: CODATA2018
digits: 4
---

Notes with a unit: [kg] stays visible.

```calc
M = 5e11 [kg]   # starting mass
r_s = 2*G*M/c^2 in [m]
T_H = hbar*c^3/(8*pi*G*M*k_B) in [K]
check T_H ~ 1e11 [K]
```

A second note.

```calc
A = 4*pi*r_s^2
```
"""


def screen_text(app: WorksheetApp) -> str:
    """What the terminal shows, as plain text lines (no styles)."""
    strips = app.screen._compositor.render_strips()
    return "\n".join(strip.text for strip in strips)


async def settle(pilot: Pilot, app: WorksheetApp, timeout: float = 20.0) -> None:
    """Wait until the results shown are those of the current document."""
    deadline = time.monotonic() + timeout
    while not app.settled:
        if time.monotonic() > deadline:
            raise AssertionError("the app did not finish computing in time")
        await pilot.pause(0.05)
    await pilot.pause(0.05)


async def wait_for(pilot: Pilot, condition: Callable[[], bool], timeout: float = 10.0) -> None:
    deadline = time.monotonic() + timeout
    while not condition():
        if time.monotonic() > deadline:
            raise AssertionError("condition not met in time")
        await pilot.pause(0.05)


def panel_entries(app: WorksheetApp) -> dict[str, str]:
    """The quantities panel's entries as the screen shows them: name -> the entry's text.

    Read from the panel's region of the screen text: the name column, then the entry's
    lines joined by spaces (``= 7.426e-16 +- 3.3e-20 m length; given, line 9``). An entry
    cut by the panel's edge is left out.
    """
    ledger = app.query_one(QuantityLedger)
    region = ledger.scrollable_content_region  # without the scrollbar
    lines = screen_text(app).splitlines()
    width = ledger.name_width
    entries: dict[str, list[str]] = {}
    names: list[str] = []
    current: tuple[list[str], list[str]] | None = None
    for y in range(region.y, region.bottom):
        part = lines[y][region.x : region.right]
        name, details = part[:width].strip(), part[width + 1 :].strip()
        if details.startswith("= "):
            current = ([name], [details])
            names.append(name)
            entries[name] = current[1]
        elif current is not None and (name or details):
            if name:
                current[0].append(name)
            current[1].append(details)
        else:
            current = None
    if names and region.bottom <= ledger.region.bottom and ledger.max_scroll_y > ledger.scroll_y:
        entries.pop(names[-1], None)  # may go on below the panel's edge
    return {name: " ".join(parts) for name, parts in entries.items()}


async def all_panel_entries(pilot: Pilot, app: WorksheetApp) -> dict[str, str]:
    """Every entry of the quantities panel, each read while it is highlighted and at the top."""
    ledger = app.query_one(QuantityLedger)
    found: dict[str, str] = {}
    for index, row in enumerate(ledger.rows):
        ledger.highlighted = index
        ledger.scroll_to_highlight(top=True)
        await pilot.pause(0.05)
        seen = panel_entries(app)
        assert row.name in seen, f"{row.name} not readable on the screen"
        found[row.name] = seen[row.name]
    return found


Scenario = Callable[[Pilot, WorksheetApp], Awaitable[None]]


def drive(app: WorksheetApp, scenario: Scenario, size: tuple[int, int] = (110, 40)) -> None:
    """Run ``scenario`` against ``app`` in a headless terminal of ``size``."""

    async def main() -> None:
        async with app.run_test(size=size) as pilot:
            await scenario(pilot, app)

    try:
        asyncio.run(main())
    finally:
        app.close_service()


class Driver:
    """The helpers above, handed to tests as one fixture (conftest is not importable)."""

    basic_text = BASIC_SHEET
    screen_text = staticmethod(screen_text)
    settle = staticmethod(settle)
    wait_for = staticmethod(wait_for)
    drive = staticmethod(drive)
    panel_entries = staticmethod(panel_entries)
    all_panel_entries = staticmethod(all_panel_entries)


@pytest.fixture
def ui() -> Driver:
    return Driver()


@pytest.fixture
def basic_sheet(tmp_path: Path) -> Path:
    path = tmp_path / "hole.sheet.md"
    path.write_text(BASIC_SHEET, encoding="utf-8")
    return path
