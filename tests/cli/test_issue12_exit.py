"""The console command's quick exit, and one worker process for all the files of a command."""

from __future__ import annotations

import json
import os
import subprocess
import sys
import threading
from pathlib import Path

import pytest

from worksheet import cli
from worksheet.engine import budget
from worksheet.runner import SheetRunner

ROOT = Path(__file__).resolve().parents[2]
SHEETS = sorted((ROOT / "sheets").glob("*.sheet.md"))
VERB_SHEETS = [ROOT / "sheets" / "burst-budget.sheet.md", ROOT / "sheets" / "mass-ladder.sheet.md"]

# An exit hook that prints: it runs on a normal exit and is skipped by the quick one.
WITH_EXIT_HOOK = (
    "import atexit, sys\n"
    "atexit.register(lambda: print('TEARDOWN RAN', flush=True))\n"
    "sys.argv = ['worksheet', *sys.argv[1:]]\n"
    "from worksheet.cli import entry\n"
    "entry()\n"
)


def _command(*args: str, full_exit: bool = False) -> subprocess.CompletedProcess[str]:
    env = {k: v for k, v in os.environ.items() if k != "WORKSHEET_FULL_EXIT"}
    if full_exit:
        env["WORKSHEET_FULL_EXIT"] = "1"
    return subprocess.run(
        [sys.executable, "-c", WITH_EXIT_HOOK, *args],
        capture_output=True,
        text=True,
        env=env,
        cwd=ROOT,
        timeout=120,
    )


def test_issue12_the_command_ends_without_tearing_down_and_keeps_its_output() -> None:
    done = _command("calc", "2 [m] * 3")
    assert done.returncode == 0, done.stderr
    assert done.stdout.splitlines() == ["6.000 m"]
    assert "TEARDOWN RAN" not in done.stdout


def test_issue12_worksheet_full_exit_keeps_the_normal_exit() -> None:
    done = _command("calc", "2 [m] * 3", full_exit=True)
    assert done.returncode == 0, done.stderr
    assert done.stdout.splitlines() == ["6.000 m", "TEARDOWN RAN"]


@pytest.mark.parametrize(
    ("args", "code", "stream", "words"),
    [
        (("calc", "1 [m] + 1 [s]"), 1, "stderr", "error:"),
        (("no-such-command",), 2, "stderr", "is neither a command nor an existing file"),
        (("--version",), 0, "stdout", "worksheet"),
        (("check", "--bogus-option", "x.sheet.md"), 2, "stderr", "unrecognized arguments"),
    ],
)
def test_issue12_exit_statuses_survive_the_quick_exit(
    args: tuple[str, ...], code: int, stream: str, words: str
) -> None:
    done = _command(*args)
    assert done.returncode == code, (done.stdout, done.stderr)
    assert words in getattr(done, stream)
    assert "TEARDOWN RAN" not in done.stdout


def test_issue12_long_output_through_a_pipe_arrives_whole() -> None:
    # Block-buffered stdout must be flushed before the process ends.
    done = _command("check", "--json", *map(str, SHEETS))
    assert done.returncode == 0, done.stderr
    lines = done.stdout.splitlines()
    assert len(lines) == len(SHEETS)
    files = [json.loads(line)["file"] for line in lines]
    assert files == [str(path) for path in SHEETS]
    assert all(json.loads(line)["ok"] for line in lines)


def test_issue12_a_running_thread_keeps_the_normal_exit() -> None:
    release = threading.Event()
    thread = threading.Thread(target=release.wait)
    thread.start()
    try:
        assert cli._threads_still_running()
    finally:
        release.set()
        thread.join()
    assert not cli._threads_still_running()


def test_issue12_check_of_several_sheets_starts_one_worker(monkeypatch, capsys) -> None:
    started: list[int] = []
    original = budget.Worker._launch

    def counting_launch(self: budget.Worker, warm: bool) -> None:
        original(self, warm)
        started.append(self.pid or 0)

    monkeypatch.setattr(budget.Worker, "_launch", counting_launch)
    assert cli.main(["check", *map(str, VERB_SHEETS)]) == 0
    out = capsys.readouterr().out
    assert out.count("all hold") == 2
    assert len(started) == 1  # both sheets' verbs ran in the first sheet's worker


def test_issue12_a_lent_worker_outlives_the_runner() -> None:
    worker = budget.Worker()
    try:
        runner = SheetRunner(VERB_SHEETS[0], worker=worker)
        from worksheet.document import read_document

        run = runner.run(read_document(VERB_SHEETS[0]))
        assert run.all_hold
        pid = worker.pid
        assert pid is not None
        runner.close()
        assert worker.pid == pid  # still running: its owner closes it
    finally:
        worker.close()
    assert worker.pid is None
