"""Axis ranges and tick marks for the SVG plots: decades on log axes, 1-2-5 steps on linear.

Everything works in *scaled* coordinates (log10 of the value on a log axis), so drawing
is one linear map. Labels are split into a mantissa and a power of ten, so each writer
can typeset the exponent its own way.
"""

from __future__ import annotations

import math
from collections.abc import Iterable
from dataclasses import dataclass

MAX_MAJOR = 8
"""At most this many labelled ticks on an axis (decades are thinned beyond it)."""


@dataclass(frozen=True)
class TickLabel:
    """``mantissa`` times ten to ``exponent``; either part may be absent (``10^3``, ``250``)."""

    mantissa: str | None
    exponent: int | None


@dataclass(frozen=True)
class Axis:
    scale: str  # 'log' or 'lin'
    low: float  # scaled
    high: float  # scaled
    major: tuple[tuple[float, TickLabel], ...]
    minor: tuple[float, ...]

    def fraction(self, scaled: float) -> float:
        """Where a scaled value sits between the ends, 0 at ``low`` and 1 at ``high``."""
        return (scaled - self.low) / (self.high - self.low)


def scaled(value: float, scale: str) -> float | None:
    """The value in axis coordinates, or None when the axis cannot show it."""
    if not math.isfinite(value) or (scale == "log" and value <= 0):
        return None
    return math.log10(value) if scale == "log" else value


def make_axis(values: Iterable[float], scale: str) -> Axis:
    """An axis covering the scaled ``values`` (already finite), with ticks at its ends."""
    shown = list(values)
    if scale == "log":
        return _log_axis(shown)
    return _lin_axis(shown)


def _log_axis(values: list[float]) -> Axis:
    low = math.floor(min(values)) if values else 0
    high = math.ceil(max(values)) if values else 1
    if high == low:
        high = low + 1
    step = max(1, -(-(high - low) // MAX_MAJOR))
    low, high = (low // step) * step, -(-high // step) * step
    major = tuple((float(k), TickLabel(None, k)) for k in range(low, high + 1, step))
    if step == 1:
        minor = tuple(k + math.log10(m) for k in range(low, high) for m in range(2, 10))
    else:
        minor = tuple(float(k) for k in range(low, high + 1) if k % step)
    return Axis("log", float(low), float(high), major, minor)


def _nice_step(span: float) -> float:
    raw = span / 5
    magnitude = 10.0 ** math.floor(math.log10(raw))
    for factor in (1, 2, 5, 10):
        if factor * magnitude >= raw * (1 - 1e-9):
            return factor * magnitude
    return 10 * magnitude


def _lin_axis(values: list[float]) -> Axis:
    low, high = (min(values), max(values)) if values else (0.0, 1.0)
    if high == low:
        pad = abs(low) * 0.5 or 1.0
        low, high = low - pad, high + pad
    step = _nice_step(high - low)
    first, last = math.floor(low / step + 1e-9), math.ceil(high / step - 1e-9)
    ticks = [i * step for i in range(first, last + 1)]
    labels = _lin_labels(ticks, step)
    return Axis("lin", first * step, last * step, tuple(zip(ticks, labels, strict=True)), ())


def _lin_labels(ticks: list[float], step: float) -> list[TickLabel]:
    """Plain decimals for moderate numbers, else each tick in scientific notation.

    >>> [_.mantissa for _ in _lin_labels([0.0, 0.5, 1.0], 0.5)]
    ['0', '0.5', '1.0']
    >>> [(_.mantissa, _.exponent) for _ in _lin_labels([0.0, 5e13, 1e14, 1.5e14], 5e13)]
    [('0', None), ('5', 13), ('1.0', 14), ('1.5', 14)]
    """
    largest = max(abs(tick) for tick in ticks)
    step_power = math.floor(math.log10(step) + 1e-9)
    if 1e-3 <= largest < 1e5:
        decimals = max(0, -step_power)
        return [TickLabel(_fixed(tick, decimals), None) for tick in ticks]
    labels = []
    for tick in ticks:
        if abs(tick) < step * 1e-9:
            labels.append(TickLabel("0", None))
            continue
        power = math.floor(math.log10(abs(tick)) + 1e-9)
        labels.append(TickLabel(_fixed(tick / 10**power, max(0, power - step_power)), power))
    return labels


def _fixed(value: float, decimals: int) -> str:
    text = f"{value:.{decimals}f}"
    return "0" if float(text) == 0 else text
