"""A long sheet is read, run and recorded with the cycle collector held off."""

from __future__ import annotations

import gc
import os
import subprocess
import sys
from pathlib import Path

from worksheet import cli
from worksheet.document import parse_document
from worksheet.engine.collector import collector_paused
from worksheet.runner import SheetRunner


def _long_sheet(cells: int) -> str:
    parts = ["---\ntitle: Long chain\nconstants: CODATA2018\n---\n"]
    for k in range(cells):
        body = "\n".join(f"x{k}_{j} = {j + 1}.5 [m]\ny{k}_{j} = x{k}_{j}/(3 [s])" for j in range(3))
        parts.append(f"Step {k}.\n\n```calc\n{body}\n```\n")
    return "\n".join(parts)


def test_issue12_a_whole_run_of_a_long_sheet_makes_no_collection(
    collections_seen: list[int],
) -> None:
    # Each full collection walks every result made so far: held off, a long run has none,
    # and the collector is on again afterwards, as it was found.
    doc = parse_document(_long_sheet(300))  # 1,800 statements
    runner = SheetRunner()
    try:
        assert gc.isenabled()
        collections_seen.clear()
        run = runner.run(doc)
        seen = list(collections_seen)
        during = len(seen)
        # Without the hold this run made some 150 collections, one of them full; with it,
        # at most the one young collection made when the collector comes back on.
        assert during <= 1 and 2 not in seen, seen
        assert gc.isenabled()
        assert all(result.status == "ok" for result in run.results)
    finally:
        runner.close()


def test_issue12_the_hold_nests_and_leaves_the_collector_as_found() -> None:
    with collector_paused():
        with collector_paused():
            assert not gc.isenabled()
        assert not gc.isenabled()  # the inner hold does not re-enable it early
    assert gc.isenabled()
    gc.disable()
    try:
        with collector_paused():
            pass
        assert not gc.isenabled()  # off before, off after
    finally:
        gc.enable()


def test_issue12_a_library_call_of_the_command_line_leaves_the_collector_on(
    tmp_path: Path, capsys
) -> None:
    path = tmp_path / "chain.sheet.md"
    path.write_text(_long_sheet(20), encoding="utf-8")
    assert cli.main(["run", str(path)]) == 0  # results recorded: the check compares them
    assert gc.isenabled()
    assert cli.main(["check", str(path)]) == 0
    assert gc.isenabled()
    assert "120 statements, all hold" in capsys.readouterr().out


# Counts the collections that start once the console command is under way, and prints
# them from an exit hook (the full exit runs it).
COUNTING_ENTRY = (
    "import atexit, gc, sys\n"
    "seen = []\n"
    "gc.callbacks.append(\n"
    "    lambda phase, info: phase == 'start' and seen.append(info['generation'])\n"
    ")\n"
    "atexit.register(lambda: print('COLLECTIONS', seen, gc.isenabled(), flush=True))\n"
    "sys.argv = ['worksheet', *sys.argv[1:]]\n"
    "from worksheet.cli import entry\n"
    "entry()\n"
)


def test_issue12_the_console_check_of_a_long_sheet_makes_no_collection(tmp_path: Path) -> None:
    path = tmp_path / "chain.sheet.md"
    path.write_text(_long_sheet(300), encoding="utf-8")
    assert cli.main(["run", str(path)]) == 0  # results recorded: the check compares them
    env = dict(os.environ, WORKSHEET_FULL_EXIT="1")  # so the exit hook runs
    done = subprocess.run(
        [sys.executable, "-c", COUNTING_ENTRY, "check", str(path)],
        capture_output=True,
        text=True,
        env=env,
        timeout=300,
    )
    assert done.returncode == 0, done.stderr
    assert "1800 statements, all hold" in done.stdout
    counted = done.stdout.split("COLLECTIONS ", 1)[1]
    seen = [int(g) for g in counted[counted.index("[") + 1 : counted.index("]")].split(",") if g]
    # A few young collections while the command line itself is imported, then none: the
    # same check through main() without the hold makes over a hundred, full ones among them.
    assert len(seen) < 10 and 2 not in seen, seen
    assert counted.rstrip().endswith("False")  # the collector still off at the exit
