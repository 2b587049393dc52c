"""Speed figures for the README's Performance section (a script, never a timed test).

Run: python benchmarks/run_benchmarks.py [--quick]

Every figure is a median of interleaved runs, printed as a ratio against a floor timed in
the same run (``timing.py``), after the package's bytecode is written as an install writes
it: H is ``python -c "import sympy, numpy, pint;
pint.UnitRegistry()"``. ``--quick`` leaves out the 50,000-statement sheet.
"""

from __future__ import annotations

import math
import sys
import tempfile
import time
from pathlib import Path

from timing import (
    FLOOR_CODE,
    PYTHON,
    ROOT,
    command,
    compile_package,
    interleaved,
    interleaved_reported,
    row,
    timed_in_child,
    verdict,
)

DEMOS = [str(ROOT / "sheets" / name) for name in sorted((ROOT / "sheets").glob("*.sheet.md"))]


def generated_lines(size: int, given_value: str = "5e11") -> list[str]:
    """A chain of givens and derived steps, like a long derivation sheet."""
    lines = [f"M = {given_value} [kg]"]
    lines += [f"d{k} = G*M/c^2*{k + 1}" for k in range(10)]  # ten dependents of M
    k = 0
    while len(lines) < size:
        lines.append(f"x{k} = {k + 1}.5 [m]")
        lines.append(f"y{k} = x{k}*2/(3 [s])")
        lines.append(f"check y{k} > 0 [m/s]")
        k += 1
    return lines[:size]


def generated_sheet(size: int, per_cell: int = 10) -> str:
    """The chain as a sheet file, ``per_cell`` statements to a calc cell."""
    lines = generated_lines(size)
    parts = ["---\ntitle: Long chain\nconstants: CODATA2018\ndigits: 4\n---\n"]
    for start in range(0, len(lines), per_cell):
        body = "\n".join(lines[start : start + per_cell])
        parts.append(f"Step {start // per_cell + 1}.\n\n```calc\n{body}\n```\n")
    return "\n".join(parts)


def startup(rounds: int) -> dict[str, float]:
    """H, ``calc '1'`` and ``check`` of the demo sheets, as fresh processes in turn."""
    times = interleaved(
        {
            "floor": command(PYTHON, "-c", FLOOR_CODE),
            "calc": command(PYTHON, "-m", "worksheet", "calc", "1"),
            "check": command(PYTHON, "-m", "worksheet", "check", *DEMOS),
            # The same command with the interpreter's full teardown at exit, for comparison:
            # the command line normally skips it (cli.entry), which H does not.
            "check, full exit": command(
                "env", "WORKSHEET_FULL_EXIT=1", PYTHON, "-m", "worksheet", "check", *DEMOS
            ),
        },
        rounds,
    )
    floor = times["floor"]
    print(f"H (import sympy, numpy, pint; build a registry): {floor * 1000:.0f} ms")
    calc = times["calc"]
    print(row("worksheet calc '1'", f"{calc * 1000:.0f} ms", calc / floor, "H", 0.7))
    print(
        row(
            f"worksheet check of the {len(DEMOS)} demo sheets",
            f"{times['check'] * 1000:.0f} ms",
            times["check"] / floor,
            "H",
            1.0,
        )
    )
    full = times["check, full exit"]
    print(
        f"  (the same check with the interpreter's full teardown at exit: {full * 1000:.0f} ms"
        f" = {full / floor:.2f} x H; for comparison only)"
    )
    return times


def scalar_statement(rounds: int) -> None:
    """One new Hawking-temperature statement on a warm evaluator vs the formula in pint."""
    import pint

    from worksheet.engine import SheetEvaluator, SourceStatement, make_context

    context = make_context()
    evaluator = SheetEvaluator(context)
    given = SourceStatement(1, "M = 5e11 [kg]")
    formula = "T_H = hbar*c^3/(8*pi*G*M*k_B) in [K]"
    evaluator.run([given, SourceStatement(2, formula)])
    counter = iter(range(10**9))

    def ours() -> None:
        # A new comment makes a new statement text: parsed and evaluated afresh.
        evaluator.run([given, SourceStatement(2, f"{formula}  # {next(counter)}")])

    ureg = pint.UnitRegistry(cache_folder=None)
    constants = context.constants
    hbar, c, g, k_b = (
        ureg.Quantity(constants[name].value, constants[name].dimension.si_unit().replace("^", "**"))
        for name in ("hbar", "c", "G", "k_B")
    )
    kelvin = ureg.kelvin

    def bare_pint() -> float:
        mass = ureg.Quantity(5e11, "kg")
        return (hbar * c**3 / (8 * math.pi * g * mass * k_b)).to(kelvin).magnitude

    for _ in range(50):  # warm both (pint caches its unit conversions)
        ours()
        bare_pint()
    batch = 20

    def batched(case):
        return lambda: [case() for _ in range(batch)]

    times = interleaved({"pint": batched(bare_pint), "ours": batched(ours)}, rounds)
    mine, floor = times["ours"] / batch, times["pint"] / batch
    print(
        row(
            "one scalar statement (Hawking temperature in K)",
            f"{mine * 1e6:.0f} us",
            mine / floor,
            f"bare pint ({floor * 1e6:.0f} us)",
            1.0,
        )
    )
    context.worker.close()


def large_checks(sizes: list[int], calc_one: float, floor: float, rounds: int) -> None:
    """``worksheet check`` of generated sheets of ``sizes`` statements (results recorded)."""
    with tempfile.TemporaryDirectory() as folder:
        paths = {}
        for size in sizes:
            path = Path(folder) / f"chain-{size}.sheet.md"
            path.write_text(generated_sheet(size), encoding="utf-8")
            command(PYTHON, "-m", "worksheet", "run", str(path))()
            paths[size] = path
        cases = {"floor": command(PYTHON, "-c", FLOOR_CODE)}
        cases |= {
            str(size): command(PYTHON, "-m", "worksheet", "check", str(path))
            for size, path in paths.items()
        }
        times = interleaved(cases, rounds)
    floor = times["floor"]
    for size in sizes:
        elapsed = times[str(size)]
        per_statement = (elapsed - calc_one) / size
        print(
            f"worksheet check of {size:,} statements: {elapsed:.2f} s = {elapsed / floor:.1f} x H; "
            f"{per_statement * 1000:.3f} ms per statement beyond calc '1' "
            f"(target <= 0.15 ms; {verdict(per_statement * 1000, 0.15)})"
        )


def edit_path(sizes: list[int], rounds: int) -> None:
    """One edit of a given with 10 dependents, as the app and the API apply it."""
    from worksheet.document import parse_document, replace_cell_body
    from worksheet.runner import SheetRunner

    for size in sizes:
        runner = SheetRunner()
        doc = runner.run(parse_document(generated_sheet(size))).document
        cell = next(i for i, block in enumerate(doc.blocks) if hasattr(block, "body_lines"))
        first_body = "\n".join(generated_lines(10)) + "\n"
        values = iter(range(10**9))

        def edit(doc=doc, runner=runner, cell=cell, first_body=first_body, values=values) -> None:
            new_value = f"{5 + next(values) % 7}e11"
            body = first_body.replace("5e11", new_value, 1)
            edited = replace_cell_body(doc, cell, body)
            runner.run(edited)

        edit()
        elapsed = interleaved({"edit": edit}, rounds)["edit"]
        runner.close()
        print(
            f"one edit of a given with 10 dependents, {size:,} statements: "
            f"{elapsed * 1000:.1f} ms (target <= 10 ms; {verdict(elapsed, 0.010)})"
        )


def sweep(rounds: int) -> None:
    """A 1e6-point sweep of T_H and t_ev: the table's array path vs fair hand-written numpy."""
    import numpy as np

    from worksheet.engine import SheetEvaluator, SourceStatement, make_context
    from worksheet.engine.figures import SymbolValues
    from worksheet.engine.numeric import evaluate_on_array

    context = make_context()
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
    k1 = hbar * c**3 / (8 * np.pi * g * k)  # constants folded, as a careful hand would
    k2 = 5120 * np.pi * g**2 / (hbar * c**4)

    def by_hand() -> None:
        # Fresh result arrays (the engine returns them too), the other products in place.
        np.divide(k1, masses)
        lifetime = masses * k2
        lifetime *= masses
        lifetime *= masses

    interleaved({"numpy": by_hand, "ours": ours}, 5)  # warm both
    times = interleaved({"numpy": by_hand, "ours": ours}, rounds)
    print(
        row(
            "1e6-point sweep of T_H and t_ev",
            f"{times['ours'] * 1000:.1f} ms",
            times["ours"] / times["numpy"],
            f"fair numpy ({times['numpy'] * 1000:.1f} ms)",
            1.2,
        )
    )
    context.worker.close()


_VERB_SETUP = """
import sys, time
import sympy
import worksheet.engine, worksheet.engine.symbolic_ops as ops
from worksheet.engine.budget import Worker
m, M0, G, c, hbar = sympy.symbols("m M0 G c hbar", positive=True)
integrand = 15360*sympy.pi*G**2*m**2/(hbar*c**4)
"""
VERB_IN_WORKER = (
    _VERB_SETUP
    + """
worker = Worker()
start = time.perf_counter()
worker.call(ops.integrate, (integrand, m, 0, M0), 5.0, "integrate")
print(time.perf_counter() - start)
worker.close()
"""
)
VERB_DIRECT = (
    _VERB_SETUP
    + """
start = time.perf_counter()
sympy.integrate(integrand, (m, 0, M0))
print(time.perf_counter() - start)
"""
)

DSOLVE = """
import time
from worksheet.engine import SheetEvaluator, SourceStatement, make_context
context = make_context()
evaluator = SheetEvaluator(context)
head = ["M : [kg]", "a : [kg^3/s]", "t : [s]", "M0 : [kg]"]
evaluator.run([SourceStatement(i + 1, text) for i, text in enumerate(head)])
statements = [SourceStatement(i + 1, text) for i, text in enumerate(head)]
statements.append(SourceStatement(5, "M_t = dsolve(diff(M, t) == -a/M^2, M, t, 0, M0)"))
context.worker.call(abs, (1,), 5.0, "start")  # the worker's start is not the verb's time
start = time.perf_counter()
(result,) = evaluator.run(statements)[-1:]
elapsed = time.perf_counter() - start
assert result.status == "ok", result.message
print(elapsed)
context.worker.close()
"""


def verbs(rounds: int) -> None:
    """The first verb in a fresh worker vs the same sympy call made directly; dsolve."""
    times = interleaved_reported(
        {"direct": timed_in_child(VERB_DIRECT), "worker": timed_in_child(VERB_IN_WORKER)}, rounds
    )
    print(
        row(
            "first verb (the lifetime integral) in a fresh worker",
            f"{times['worker'] * 1000:.0f} ms",
            times["worker"] / times["direct"],
            f"a direct sympy call ({times['direct'] * 1000:.0f} ms)",
            1.3,
        )
    )
    dsolve = interleaved_reported({"dsolve": timed_in_child(DSOLVE)}, max(3, rounds // 2))
    seconds = dsolve["dsolve"]
    print(
        f"the mass-loss dsolve (dM/dt = -a/M^2, M(0) = M0), first call in a process: "
        f"{seconds:.2f} s (target < 1 s; {verdict(seconds, 0.999)})"
    )


def main() -> None:
    quick = "--quick" in sys.argv[1:]
    started = time.perf_counter()
    compile_package()
    times = startup(rounds=7)
    scalar_statement(rounds=15)
    sizes = [10_000] if quick else [10_000, 50_000]
    large_checks(sizes, times["calc"], times["floor"], rounds=3)
    edit_path([100, 1000, 10_000] if quick else [100, 1000, 10_000, 50_000], rounds=11)
    sweep(rounds=41)
    verbs(rounds=7)
    print(f"(all figures measured in {time.perf_counter() - started:.0f} s)")


if __name__ == "__main__":
    main()
