"""Fuzz the statement evaluator with hostile statements from the grammar and count outcomes.

Not a test (the suite runs a few hundred of the same statements); this runs many, for the
claim that every input ends as a recorded error on its own line. Prints counts by status,
every statement that reached the last-resort guard or escaped as an exception, and the
slowest statements.

    python benchmarks/fuzz_statements.py              # 100,000 statements
    python benchmarks/fuzz_statements.py -n 5000 --seed 7
"""

from __future__ import annotations

import argparse
import collections
import importlib.util
import sys
import time
import traceback
from pathlib import Path

from hypothesis import HealthCheck, given, seed, settings

from worksheet.engine import SheetEvaluator, make_context, split_statements

ROOT = Path(__file__).resolve().parent.parent


def _grammar():
    path = ROOT / "tests" / "engine" / "statement_grammar.py"
    spec = importlib.util.spec_from_file_location("statement_grammar", path)
    assert spec is not None and spec.loader is not None
    module = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(module)
    return module


def main() -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("-n", "--count", type=int, default=100_000)
    parser.add_argument("--seed", type=int, default=11)
    parser.add_argument("--budget", type=float, default=0.5, help="seconds per statement")
    args = parser.parse_args()

    grammar = _grammar()
    ctx = make_context("CODATA2022", digits=4, seconds=args.budget)
    statuses: collections.Counter[str] = collections.Counter()
    bad: list[tuple[str, str]] = []
    slowest: list[tuple[float, str]] = []
    seen = 0
    started = time.monotonic()

    @seed(args.seed)
    @settings(
        max_examples=args.count,
        deadline=None,
        database=None,
        suppress_health_check=list(HealthCheck),
    )
    @given(statement=grammar.STATEMENTS)
    def one(statement: str) -> None:
        nonlocal seen
        seen += 1
        t0 = time.monotonic()
        try:
            results = SheetEvaluator(ctx).run(split_statements(grammar.sheet_body(statement), 1))
        except Exception:  # counted and shown, never hidden
            bad.append((statement, traceback.format_exc(limit=-3)))
            statuses["exception"] += 1
            return
        elapsed = time.monotonic() - t0
        slowest.append((elapsed, statement))
        if len(slowest) > 200:
            slowest.sort(reverse=True)
            del slowest[10:]
        fuzzed = [r for r in results if r.line == 5]
        statuses[fuzzed[0].status if fuzzed else "no result"] += 1
        for problem in grammar.problems(results):
            bad.append((statement, problem))
        if seen % 10_000 == 0:
            rate = seen / (time.monotonic() - started)
            print(f"  {seen} statements, {rate:.0f}/s", file=sys.stderr, flush=True)

    try:
        one()
    finally:
        ctx.worker.close()
    elapsed = time.monotonic() - started
    print(f"statements: {seen} in {elapsed:.0f} s (budget {args.budget:g} s, seed {args.seed})")
    for status, count in statuses.most_common():
        print(f"  {status}: {count} ({100 * count / max(seen, 1):.2f}%)")
    print(f"problems (internal error, unlocated, exception, sheet stopped): {len(bad)}")
    for statement, problem in bad[:40]:
        print(f"  {statement!r}\n    {problem.strip()}")
    slowest.sort(reverse=True)
    print("slowest:")
    for seconds, statement in slowest[:5]:
        print(f"  {seconds:.2f} s  {statement[:100]!r}")
    return 1 if bad else 0


if __name__ == "__main__":
    sys.exit(main())
