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
    evaluator.run([*base, SourceStatement(2, "r = 2*G*M/c^2")])
    samples = []
    for k in range(200):
        statements = [*base, SourceStatement(2, f"r = 2*G*M/c^2*{k + 2}")]
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
        print(
            f"{size:>5} statements: full run {full * 1000:.0f} ms, "
            f"one given with 10 dependents changed {statistics.median(times) * 1000:.1f} ms"
        )
    sweep_benchmark(context)
    context.worker.close()


def sweep_benchmark(context) -> None:
    """A 1e6-point sweep of T_H and t_ev: the table's array path vs hand-written numpy."""
    import numpy as np

    from worksheet.engine.figures import SymbolValues
    from worksheet.engine.numeric import evaluate_on_array

    evaluator = SheetEvaluator(context)
    evaluator.run(
        [
            SourceStatement(1, "M = 5e11 [kg]"),
            SourceStatement(2, "T_H = hbar*c^3/(8*pi*G*M*k_B)"),
            SourceStatement(3, "t_ev = 5120*pi*G^2*M^3/(hbar*c^4)"),
        ]
    )
    bindings = evaluator.bindings
    masses = np.geomspace(1e9, 1e15, 1_000_000)
    values = SymbolValues(evaluator._state.values, context, "float")
    forms = [bindings["T_H"].form(), bindings["t_ev"].form()]
    mass = bindings["M"].symbol

    def ours() -> None:
        for form in forms:
            evaluate_on_array(form, mass, masses, values)

    hbar, c, g, k = (context.constants[n].value for n in ("hbar", "c", "G", "k_B"))
    k1 = hbar * c**3 / (8 * np.pi * g * k)
    k2 = 5120 * np.pi * g**2 / (hbar * c**4)

    def by_hand() -> None:
        _ = k1 / masses
        _ = k2 * masses * masses * masses

    def best(function) -> float:
        times = []
        for _ in range(15):
            start = time.perf_counter()
            function()
            times.append(time.perf_counter() - start)
        return min(times)

    mine, floor = best(ours), best(by_hand)
    print(
        f"1e6-point sweep of T_H and t_ev: {mine * 1000:.1f} ms, hand-written numpy "
        f"{floor * 1000:.1f} ms ({mine / floor:.2f} x)"
    )


if __name__ == "__main__":
    main()
