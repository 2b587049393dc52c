"""Interleaved timing with medians, shared by the benchmark scripts.

The machine these figures come from is shared, so an absolute time means little: every
figure is printed as a ratio against a floor measured in the same run, and the cases of one
comparison take turns (floor, case, floor, case, ...) so that a burst of load from elsewhere
falls on both.
"""

from __future__ import annotations

import compileall
import statistics
import subprocess
import sys
import time
from collections.abc import Callable, Mapping
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
PYTHON = sys.executable
FLOOR_CODE = "import sympy, numpy, pint; pint.UnitRegistry()"


def compile_package() -> None:
    """Write the package's bytecode, as an install does (the floors' libraries have theirs).

    With PYTHONDONTWRITEBYTECODE set, or from a fresh clone, every process would otherwise
    compile our modules from source, which an installed tool never does.
    """
    compileall.compile_dir(ROOT / "worksheet", quiet=1)


def interleaved(cases: Mapping[str, Callable[[], object]], rounds: int) -> dict[str, float]:
    """Median seconds of each case, the cases called in turn ``rounds`` times.

    The order rotates each round so that no case always runs right after another.
    """
    names = list(cases)
    samples: dict[str, list[float]] = {name: [] for name in names}
    for round_index in range(rounds):
        shift = round_index % len(names)
        for name in names[shift:] + names[:shift]:
            start = time.perf_counter()
            cases[name]()
            samples[name].append(time.perf_counter() - start)
    return {name: statistics.median(times) for name, times in samples.items()}


def command(*argv: str, check: bool = True) -> Callable[[], None]:
    """A case that runs one process to its end (output discarded)."""

    def run() -> None:
        done = subprocess.run(list(argv), capture_output=True, cwd=ROOT)
        if check and done.returncode not in (0, 1):
            raise SystemExit(f"{' '.join(argv)} exited {done.returncode}: {done.stderr!r}")

    return run


def timed_in_child(code: str, *args: str) -> Callable[[], float]:
    """A case that runs ``code`` in a fresh interpreter; ``code`` prints its own seconds."""

    def run() -> float:
        done = subprocess.run(
            [PYTHON, "-c", code, *args], capture_output=True, text=True, cwd=ROOT, check=True
        )
        return float(done.stdout.strip().splitlines()[-1])

    return run


def interleaved_reported(cases: Mapping[str, Callable[[], float]], rounds: int) -> dict[str, float]:
    """Like :func:`interleaved`, for cases that report their own time (child processes)."""
    names = list(cases)
    samples: dict[str, list[float]] = {name: [] for name in names}
    for round_index in range(rounds):
        shift = round_index % len(names)
        for name in names[shift:] + names[:shift]:
            samples[name].append(cases[name]())
    return {name: statistics.median(times) for name, times in samples.items()}


def verdict(ratio: float, target: float) -> str:
    """``meets`` or ``MISSES`` the target ratio, said plainly."""
    return "meets" if ratio <= target else "MISSES"


def row(measure: str, figure: str, ratio: float, floor: str, target: float) -> str:
    """One printed line: what, the figure, the ratio to its floor and the target."""
    return (
        f"{measure}: {figure} = {ratio:.2f} x {floor} "
        f"(target <= {target:g} x; {verdict(ratio, target)})"
    )
