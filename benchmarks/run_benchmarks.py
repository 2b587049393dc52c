"""Speed figures for the README's Performance section (a script, never a timed test).

Run: python benchmarks/run_benchmarks.py
"""

from __future__ import annotations

import statistics
import subprocess
import sys
import time

from worksheet.engine import SheetEvaluator, SourceStatement, make_context


def wall(command: list[str], repeat: int = 5) -> float:
    """Median wall time of a command, in seconds."""
    times = []
    for _ in range(repeat):
        start = time.perf_counter()
        subprocess.run(command, check=True, capture_output=True)
        times.append(time.perf_counter() - start)
    return statistics.median(times)


def generated_sheet(size: int, given_value: str = "5e11") -> list[SourceStatement]:
    """A chain of givens and derived steps, like a long derivation sheet."""
    lines = [f"M = {given_value} [kg]"]
    lines += [f"d{k} = G*M/c^2*{k + 1}" for k in range(10)]  # ten dependents of M
    k = 0
    while len(lines) < size:
        lines.append(f"x{k} = {k + 1}.5 [m]")
        lines.append(f"y{k} = x{k}*2/(3 [s])")
        lines.append(f"check y{k} > 0 [m/s]")
        k += 1
    return [SourceStatement(i + 1, text) for i, text in enumerate(lines[:size])]


def main() -> None:
    python = sys.executable
    floor = wall([python, "-c", "import sympy, numpy, pint; pint.UnitRegistry()"])
    calc = wall([python, "-m", "worksheet", "calc", "1"])
    print(f"import floor (sympy+numpy+pint+registry): {floor * 1000:.0f} ms")
    print(f"worksheet calc '1': {calc * 1000:.0f} ms ({calc / floor:.2f} x floor)")

    context = make_context()
    evaluator = SheetEvaluator(context)
    base = [SourceStatement(1, "M = 5e11 [kg]")]
    evaluator.run(base + [SourceStatement(2, "r = 2*G*M/c^2")])
    samples = []
    for k in range(200):
        statements = base + [SourceStatement(2, f"r = 2*G*M/c^2*{k + 2}")]
        start = time.perf_counter()
        evaluator.run(statements)
        samples.append(time.perf_counter() - start)
    print(f"one derived statement after warm-up: {statistics.median(samples) * 1000:.3f} ms")

    for size in (100, 1000, 5000):
        evaluator = SheetEvaluator(context)
        sheet = generated_sheet(size)
        start = time.perf_counter()
        evaluator.run(sheet)
        full = time.perf_counter() - start
        times = []
        for k in range(15):
            changed = list(sheet)
            changed[0] = SourceStatement(1, f"M = {5 + k % 2 + 1}e11 [kg]")
            start = time.perf_counter()
            evaluator.run(changed)
            times.append(time.perf_counter() - start)
        print(f"{size:>5} statements: full run {full * 1000:.0f} ms, "
              f"one given with 10 dependents changed {statistics.median(times) * 1000:.1f} ms")
    context.worker.close()


if __name__ == "__main__":
    main()
