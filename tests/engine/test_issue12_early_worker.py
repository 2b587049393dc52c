"""A worker started early, before this process imports sympy, answers like any other."""

from __future__ import annotations

import os
import subprocess
import sys
from pathlib import Path

import pytest

from worksheet import cli
from worksheet.engine import budget
from worksheet.engine.budget import Worker

ROOT = Path(__file__).resolve().parents[2]


def test_issue12_an_early_worker_answers_and_reports_its_cap() -> None:
    import sympy

    from worksheet.engine import symbolic_ops as ops

    worker = Worker()
    try:
        worker.start_early()
        assert worker.pid is not None  # started, not waited for
        x = sympy.Symbol("x", positive=True)
        assert worker.call(ops.integrate, (x**2, x, 0, 1), 30.0, "integrate") == sympy.Rational(
            1, 3
        )
        if sys.platform.startswith("linux"):
            assert worker.memory_limit is not None  # the 'ready' message was read
        worker.start_early()  # a no-op once running
        assert worker.call(ops.solve, (x**2, sympy.Integer(4), x), 30.0, "solve") == [2]
    finally:
        worker.close()
    assert worker.pid is None


def test_issue12_an_early_worker_closed_unused_is_gone() -> None:
    worker = Worker()
    worker.start_early()
    process = worker._process
    worker.close()
    process.join(timeout=5)
    assert not process.is_alive()


def test_issue12_the_worker_can_start_before_sympy_is_imported() -> None:
    code = (
        "import sys\n"
        "from worksheet.engine.budget import Worker\n"
        "worker = Worker()\n"
        "worker.start_early()\n"
        "print('sympy' in sys.modules)\n"
        "import sympy\n"
        "from worksheet.engine import symbolic_ops as ops\n"
        "m = sympy.Symbol('m', positive=True)\n"
        "print(worker.call(ops.integrate, (m**2, m, 0, 3), 30.0, 'integrate'))\n"
        "worker.close()\n"
    )
    env = dict(os.environ, PYTHONPATH=str(ROOT))
    done = subprocess.run(
        [sys.executable, "-c", code], capture_output=True, text=True, env=env, timeout=120
    )
    assert done.returncode == 0, done.stderr
    assert done.stdout.split() == ["False", "9"]


@pytest.mark.parametrize(
    ("body", "expected"),
    [
        ("t = integrate(x^2, x, 0, 1)", True),
        ("r = solve (x^2 == 4, x)", True),
        ("scaling T_H with M", True),
        ("check P_left == P_right", True),
        ("M = 5e11 [kg]\nr_s = 2*G*M/c^2", False),
        ("check r_s > 1 [m]  # not == anything", False),
        ("integrated = 3 [m]", False),
    ],
)
def test_issue12_symbolic_work_is_seen_in_the_text(tmp_path, body: str, expected: bool) -> None:
    path = tmp_path / "a.sheet.md"
    path.write_text(f"---\ntitle: t\n---\n\n```calc\n{body}\n```\n", encoding="utf-8")
    assert cli._mentions_symbolic_work(str(path)) is expected


def test_issue12_check_starts_the_worker_early_only_for_symbolic_sheets(
    monkeypatch, capsys, tmp_path
) -> None:
    early: list[int] = []
    original = budget.Worker.start_early

    def recording(self: Worker) -> None:
        early.append(1)
        original(self)

    monkeypatch.setattr(budget.Worker, "start_early", recording)
    assert cli.main(["check", str(ROOT / "sheets" / "burst-budget.sheet.md")]) == 0
    assert early == [1]
    plain = tmp_path / "plain.sheet.md"
    plain.write_text("---\ntitle: t\n---\n\n```calc\nx = 2 [m]\ny = 3*x\n```\n", "utf-8")
    assert cli.main(["run", str(plain)]) == 0  # records its results
    assert cli.main(["check", str(plain)]) == 0
    assert early == [1]
    assert capsys.readouterr().out.count("all hold") == 2
