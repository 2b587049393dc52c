"""Fixtures shared by the tests of every part."""

from __future__ import annotations

import gc
from collections.abc import Iterator

import pytest


@pytest.fixture
def collections_seen() -> Iterator[list[int]]:
    """The generation of each cycle collection Python starts while the test runs (2 is a
    full one); clear it to count from a later point."""
    seen: list[int] = []

    def count(phase: str, info: dict[str, int]) -> None:
        if phase == "start":
            seen.append(info["generation"])

    gc.callbacks.append(count)
    try:
        yield seen
    finally:
        gc.callbacks.remove(count)
