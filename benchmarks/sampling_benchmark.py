"""Issue 13: 1e5 samples through a 20-statement chain, against the same by hand in numpy.

Run: python benchmarks/sampling_benchmark.py

Both sides do the same work: draw four inputs (log-uniform, uniform, log-normal, normal)
from seeded PCG64 streams, push them through the same 20 steps, and take the median and
the 68% and 95% intervals of every step (from one sort each, on both sides). The target,
at most 3x the hand-written numpy, is on the whole sheet run (parsing, dimension checks,
point values, first-order derivatives and records included); what sampling adds over the
same sheet with plain inputs is printed beside it.
"""

from __future__ import annotations

import math
import statistics
import time

import numpy as np

from worksheet.engine import SheetEvaluator, SourceStatement, make_context
from worksheet.engine.distributions import _seed_sequence, standard_normal

SAMPLES = 100_000
SEED = 20261202

INPUTS_RANGED = [
    "a = 1e-3 .. 1e-1 [1/(pc^3*yr)] log",
    "b = 0.2 .. 0.8 lin",
    "e = 0.3 within factor 3",
    "A = 4e4 [m^2] +- 15%",
]
INPUTS_POINT = [
    "a = 0.01 [1/(pc^3*yr)]",
    "b = 0.5",
    "e = 0.3",
    "A = 4e4 [m^2]",
]
CHAIN = [
    "s1 = a*b",
    "s2 = s1*e",
    "s3 = s2*A/(1 [m^2])",
    "s4 = s3*(1 [pc^3*yr])",
    "s5 = sqrt(s4)",
    "s6 = s5*b + e",
    "s7 = s6^2",
    "s8 = s7/b",
    "s9 = log(s8 + 1)",
    "s10 = s9*e",
    "s11 = s10 + s4",
    "s12 = s11*2",
    "s13 = s12/(1 + b)",
    "s14 = s13^3",
    "s15 = s14*e*b",
    "s16 = s15 + 1",
    "s17 = sqrt(s16)",
    "s18 = s17*s5",
    "s19 = s18 - s5",
    "s20 = s19*A/(1 [m^2])",
]


def sheet(inputs: list[str]) -> list[SourceStatement]:
    return [SourceStatement(i + 1, text) for i, text in enumerate([*inputs, *CHAIN])]


CONTEXT = make_context("CODATA2022", digits=4, seed=SEED, samples=SAMPLES)
"""One context for every run (its unit registry is built once, as in the app)."""


def engine_run(inputs: list[str]) -> float:
    """A fresh evaluator each time, so nothing of an earlier run is reused."""
    evaluator = SheetEvaluator(CONTEXT)
    start = time.perf_counter()
    results = evaluator.run(sheet(inputs))
    elapsed = time.perf_counter() - start
    assert all(r.status == "ok" for r in results), [r.record for r in results]
    return elapsed


def by_hand() -> float:
    start = time.perf_counter()

    def generator(name: str):
        return np.random.Generator(np.random.PCG64(_seed_sequence(SEED, name)))

    pc, yr = 3.0856775814913673e16, 31557600.0
    low, high = math.log(1e-3 / (pc**3 * yr)), math.log(1e-1 / (pc**3 * yr))
    a = np.exp(low + (high - low) * generator("a").random(SAMPLES))
    b = 0.2 + 0.6 * generator("b").random(SAMPLES)
    e = 0.3 * np.exp(math.log(3.0) * standard_normal(generator("e"), SAMPLES))
    area = 4e4 + 6e3 * standard_normal(generator("A"), SAMPLES)
    s1 = a * b
    s2 = s1 * e
    s3 = s2 * area
    s4 = s3 * (pc**3 * yr)
    s5 = np.sqrt(s4)
    s6 = s5 * b + e
    s7 = s6 * s6
    s8 = s7 / b
    s9 = np.log(s8 + 1)
    s10 = s9 * e
    s11 = s10 + s4
    s12 = s11 * 2
    s13 = s12 / (1 + b)
    s14 = s13 * s13 * s13
    s15 = s14 * e * b
    s16 = s15 + 1
    s17 = np.sqrt(s16)
    s18 = s17 * s5
    s19 = s18 - s5
    s20 = s19 * area
    steps = [a, b, e, s1, s2, s3, s4, s5, s6, s7, s8, s9, s10]
    steps += [s11, s12, s13, s14, s15, s16, s17, s18, s19, s20]
    last = SAMPLES - 1
    for values in steps:  # quantiles from one sort (faster here than numpy.quantile)
        ordered = np.sort(values[np.isfinite(values)])
        last = ordered.size - 1
        for p in (0.5, 0.16, 0.84, 0.025, 0.975):
            j = int(last * p)
            g = last * p - j
            ordered[j] + g * (ordered[min(j + 1, last)] - ordered[j])
    return time.perf_counter() - start


def main() -> None:
    engine_run(INPUTS_RANGED)  # warm-up: imports, registry, caches
    engine_run(INPUTS_POINT)
    by_hand()
    ranged = statistics.median(engine_run(INPUTS_RANGED) for _ in range(7))
    point = statistics.median(engine_run(INPUTS_POINT) for _ in range(7))
    hand = statistics.median(by_hand() for _ in range(7))
    extra = ranged - point
    print(f"samples: {SAMPLES}, chain of {len(CHAIN)} statements on 4 inputs")
    print(f"hand-written numpy (draws, steps, quantiles): {hand * 1000:.1f} ms")
    whole = f"{ranged * 1000:.1f} ms ({ranged / hand:.2f} x; target 3 x)"
    print(f"engine, the whole sampled run: {whole}")
    print(f"engine, the same sheet with plain inputs: {point * 1000:.1f} ms")
    print(f"engine, what sampling adds: {extra * 1000:.1f} ms ({extra / hand:.2f} x)")
    CONTEXT.worker.close()


if __name__ == "__main__":
    main()
