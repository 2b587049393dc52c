"""The engine and the headless command line never load the terminal UI libraries."""

from __future__ import annotations

import os
import subprocess
import sys
from pathlib import Path

import pytest

REPO = Path(__file__).resolve().parents[2]


def _python(code: str) -> subprocess.CompletedProcess[str]:
    env = dict(os.environ)
    env["PYTHONPATH"] = str(REPO) + os.pathsep + env.get("PYTHONPATH", "")
    env["WORKSHEET_FULL_EXIT"] = "1"  # the checks below report from exit hooks
    return subprocess.run(
        [sys.executable, "-c", code],
        capture_output=True,
        text=True,
        timeout=120,
        cwd=REPO,
        env=env,
        check=False,
    )


@pytest.mark.slow
def test_importing_the_engine_loads_no_ui() -> None:
    done = _python(
        "import sys\n"
        "import worksheet.engine\n"
        "from worksheet.engine import SheetEvaluator, calculate, make_context\n"
        "print('textual' in sys.modules, 'rich' in sys.modules)\n"
    )
    assert done.returncode == 0, done.stderr
    assert done.stdout.split() == ["False", "False"]


@pytest.mark.slow
def test_cli_calc_loads_no_ui() -> None:
    done = _python(
        "import sys\n"
        "from worksheet.cli import main\n"
        "code = main(['calc', '1'])\n"
        "print(code, 'textual' in sys.modules, 'rich' in sys.modules)\n"
    )
    assert done.returncode == 0, done.stderr
    assert done.stdout.split()[-3:] == ["0", "False", "False"]


@pytest.mark.slow
def test_python_dash_m_worksheet_calc_loads_no_ui() -> None:
    # Run the module entry point as the shell would, and report the loaded modules at exit.
    done = _python(
        "import atexit, runpy, sys\n"
        "atexit.register(lambda: print('UI', 'textual' in sys.modules, 'rich' in sys.modules))\n"
        "sys.argv = ['worksheet', 'calc', '1']\n"
        "runpy.run_module('worksheet', run_name='__main__')\n"
    )
    assert "UI False False" in done.stdout, (done.stdout, done.stderr)
