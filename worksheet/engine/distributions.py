"""Ranged inputs as distributions, drawn reproducibly, and their summaries in numbers.

Reproducible bytes: each input draws from its own stream, a PCG64 generator seeded by a
``SeedSequence`` of the sheet's seed and a SHA-256 digest of the input's name (integer
hashing only, so adding an input never moves another's samples, and Python's hash seed
plays no part). Only raw uniform doubles are taken from the generator
(``Generator.random``: the top 53 bits of each 64-bit output, exact integer arithmetic on
any machine); every shape is made from them by an explicit transform written here, not by
numpy's distribution methods, whose algorithms numpy's compatibility policy allows to
change between builds. The transforms use numpy's exp, log, sqrt and cos, which may differ
between CPUs in the last bit; recorded numbers are quantiles rounded to the sheet's
digits, so such a difference could show only where a quantile sits on a rounding boundary.
Quantiles follow Hyndman and Fan's definition 7 (Amer. Statist. 50 (1996) 361; numpy's
default ``linear`` method), computed here from one sort of the samples: for a sorted
sample x of size n, Q(p) = x[j] + g (x[j+1] - x[j]) with j + g = (n - 1) p.
"""

from __future__ import annotations

import hashlib
import math
from collections.abc import Sequence
from dataclasses import dataclass, field
from typing import Any

from worksheet.engine.formatting import format_number

DEFAULT_SEED = 0
"""The seed when the front matter names none (the results are reproducible either way)."""

DEFAULT_SAMPLES = 100_000
MIN_SAMPLES = 100
MAX_SAMPLES = 2_000_000

HISTOGRAM_BINS = 24

INTERVALS = ((0.68, 0.16, 0.84), (0.95, 0.025, 0.975))
"""Central intervals recorded for every sampled quantity: (content, lower and upper
quantile). 16th-84th percentiles are the usual 68% (one-sigma-like) interval."""


@dataclass(frozen=True)
class Spread:
    """One ranged input in SI units.

    ``log-uniform`` and ``uniform`` run from ``low`` to ``high``; ``log-normal`` has median
    ``center`` and 68% of its mass within a factor ``width`` of it (sigma of ln x = ln width);
    ``normal`` has mean ``center`` and standard deviation ``width``.
    """

    shape: str
    low: float = 0.0
    high: float = 0.0
    center: float = 0.0
    width: float = 0.0

    @property
    def median(self) -> float:
        """The median, used as the input's central value in the point calculation."""
        if self.shape == "log-uniform":
            return math.sqrt(self.low) * math.sqrt(self.high)
        if self.shape == "uniform":
            return 0.5 * (self.low + self.high)
        return self.center

    def draw(self, count: int, seed: int, name: str) -> Any:
        """``count`` samples for the input called ``name`` (the same on every call)."""
        np = _np()
        generator = np.random.Generator(np.random.PCG64(_seed_sequence(seed, name)))
        if self.shape in ("log-uniform", "uniform"):
            u = generator.random(count)
            if self.shape == "uniform":
                return self.low + (self.high - self.low) * u
            log_low, log_high = math.log(self.low), math.log(self.high)
            return np.exp(log_low + (log_high - log_low) * u)
        z = standard_normal(generator, count)
        if self.shape == "normal":
            return self.center + self.width * z
        return self.center * np.exp(math.log(self.width) * z)

    def describe(self, show, unit: str = "") -> str:
        """In words, with ``show`` turning an SI number into the recorded number in ``unit``."""
        if self.shape in ("log-uniform", "uniform"):
            tail = f" {unit}" if unit else ""
            return f"{self.shape} {show(self.low)} .. {show(self.high)}{tail}"
        if self.shape == "log-normal":
            return f"log-normal, within a factor {self.width:g} at 68%"
        return "normal"


def standard_normal(generator: Any, count: int) -> Any:
    """Standard normal deviates by the Box-Muller transform of the generator's uniforms.

    Box and Muller, Ann. Math. Statist. 29 (1958) 610: z = sqrt(-2 ln u1) cos(2 pi u2).
    """
    np = _np()
    uniforms = generator.random(2 * count)
    first = 1.0 - uniforms[:count]  # in (0, 1]: the logarithm stays finite
    second = uniforms[count:]
    return np.sqrt(-2.0 * np.log(first)) * np.cos(2.0 * math.pi * second)


def _seed_sequence(seed: int, name: str) -> Any:
    digest = hashlib.sha256(name.encode("utf-8")).digest()
    words = [int.from_bytes(digest[i : i + 4], "little") for i in range(0, 16, 4)]
    return _np().random.SeedSequence([seed, *words])


def _np() -> Any:
    import numpy

    return numpy


@dataclass(frozen=True)
class Interval:
    content: float  # 0.68 or 0.95
    low: float
    high: float


@dataclass(frozen=True)
class HistogramData:
    """Counts of the finite samples in equal bins (of log10 x when ``scale`` is 'log')."""

    name: str
    unit: str
    scale: str
    edges: tuple[float, ...]  # in the shown unit, len(counts) + 1
    counts: tuple[int, ...]
    median: float
    intervals: tuple[Interval, ...]

    def to_json(self) -> dict[str, Any]:
        return {
            "name": self.name,
            "unit": self.unit,
            "scale": self.scale,
            "edges": list(self.edges),
            "counts": list(self.counts),
            "median": self.median,
            "intervals": [vars(i) for i in self.intervals],
        }


@dataclass(frozen=True)
class SampledSummary:
    """What a sampled quantity records, in its shown unit: median, intervals, histogram."""

    name: str
    unit: str
    count: int
    not_finite: int
    median: float
    intervals: tuple[Interval, ...]
    histogram: HistogramData | None = field(default=None, compare=False)
    input: str | None = None  # the stated distribution, for a ranged given

    def to_json(self) -> dict[str, Any]:
        data: dict[str, Any] = {
            "samples": self.count,
            "not_finite": self.not_finite,
            "median": self.median,
            "intervals": [vars(i) for i in self.intervals],
        }
        if self.input is not None:
            data["input"] = self.input
        if self.histogram is not None:
            data["histogram"] = self.histogram.to_json()
        return data

    def record_tail(self, digits: int) -> str:
        """``, 68%: a .. b, 95%: c .. d`` in the recorded notation."""

        def show(value: float) -> str:
            return format_number(value, digits)

        return "".join(
            f", {round(i.content * 100)}%: {show(i.low)} .. {show(i.high)}" for i in self.intervals
        )


def sorted_quantiles(ordered: Any, probabilities: Sequence[float]) -> list[float]:
    """Hyndman and Fan's definition 7 on samples already sorted (see the module's text)."""
    last = ordered.size - 1
    values = []
    for p in probabilities:
        position = last * p
        j = min(math.floor(position), last)
        g = position - j
        low = float(ordered[j])
        values.append(low if g == 0 else low + g * (float(ordered[min(j + 1, last)]) - low))
    return values


def summarize(name: str, unit: str, shown: Any, bins: int = HISTOGRAM_BINS) -> SampledSummary:
    """Median, central intervals and a histogram of samples already in the shown unit."""
    np = _np()
    values = np.asarray(shown, dtype=float)
    finite = values[np.isfinite(values)]  # a fresh array: sorted in place
    finite.sort()
    not_finite = int(values.size - finite.size)
    if finite.size == 0:
        nan = math.nan
        return SampledSummary(name, unit, int(values.size), not_finite, nan, ())
    quantiles = sorted_quantiles(finite, [0.5] + [q for _, lo, hi in INTERVALS for q in (lo, hi)])
    median = quantiles[0]
    intervals = tuple(
        Interval(content, quantiles[1 + 2 * k], quantiles[2 + 2 * k])
        for k, (content, _, _) in enumerate(INTERVALS)
    )
    histogram = histogram_of(name, unit, finite, median, intervals, bins)
    return SampledSummary(name, unit, int(values.size), not_finite, median, intervals, histogram)


def histogram_of(
    name: str,
    unit: str,
    ordered: Any,
    median: float,
    intervals: tuple[Interval, ...],
    bins: int = HISTOGRAM_BINS,
) -> HistogramData:
    """Equal bins over the central 99.8% of the sorted samples (log10 bins for positive
    values spanning more than a decade), so one stray sample does not flatten the picture.
    A bin holds the samples from its lower edge up to, not including, its upper edge; the
    last bin includes its upper edge."""
    np = _np()
    low, high = sorted_quantiles(ordered, [0.001, 0.999])
    scale = "log" if low > 0 and high / low > 10 else "lin"
    if high <= low:
        low, high = (low - 0.5, high + 0.5) if low == 0 else (low * 0.99, high * 1.01)
        if low > high:
            low, high = high, low
        scale = "lin"
    if scale == "log":
        edges = np.logspace(math.log10(low), math.log10(high), bins + 1)
        edges[0], edges[-1] = low, high
    else:
        edges = np.linspace(low, high, bins + 1)
    starts = np.searchsorted(ordered, edges[:-1], side="left")
    end = np.searchsorted(ordered, edges[-1:], side="right")
    counts = np.diff(np.concatenate([starts, end]))
    return HistogramData(
        name,
        unit,
        scale,
        tuple(float(e) for e in edges),
        tuple(int(c) for c in counts),
        median,
        intervals,
    )


BAR_WIDTH = 40


def text_histogram(data: HistogramData, digits: int = 3) -> list[str]:
    """The histogram as text lines: one bar per bin with its lower edge and its count."""
    top = max(data.counts) if data.counts else 0
    labels = [format_number(edge, digits) for edge in data.edges[:-1]]
    width = max((len(label) for label in labels), default=1)
    lines = []
    for label, count in zip(labels, data.counts, strict=True):
        bar = round(BAR_WIDTH * count / top) if top else 0
        lines.append(f"  {label:>{width}} |{'#' * bar}{' ' * (BAR_WIDTH - bar)} {count}".rstrip())
    lines.append(f"  {format_number(data.edges[-1], digits):>{width}} |")
    unit = f" [{data.unit}]" if data.unit else ""
    lines.append(
        f"  ({data.name}{unit}, {len(data.counts)} bins, {data.scale}; "
        f"median {format_number(data.median, digits)})"
    )
    return lines
