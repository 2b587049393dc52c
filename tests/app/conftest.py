"""Helpers for driving the app with textual's pilot (plain functions, no async plugin)."""

from __future__ import annotations

import asyncio
import time
from collections.abc import Awaitable, Callable
from pathlib import Path

import pytest
from textual.pilot import Pilot

from worksheet.app.app import WorksheetApp

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


@pytest.fixture
def ui() -> Driver:
    return Driver()


@pytest.fixture
def basic_sheet(tmp_path: Path) -> Path:
    path = tmp_path / "hole.sheet.md"
    path.write_text(BASIC_SHEET, encoding="utf-8")
    return path
