"""The export entry point the command line calls, and which constants count as used."""

from __future__ import annotations

import os
import subprocess
import sys

import pytest

from worksheet.errors import WorksheetError
from worksheet.export import FORMATS, build_report, export_run
from worksheet.runner import run_text


def test_suffixes(burst_run):
    assert {to: export_run(burst_run, to)[1] for to in ("latex", "html", "md")} == {
        "latex": ".tex",
        "html": ".html",
        "md": ".report.md",
    }
    assert set(FORMATS) == {"latex", "html", "md"}


def test_unknown_format_is_refused(burst_run):
    with pytest.raises(WorksheetError, match="unknown export format 'pdf'"):
        export_run(burst_run, "pdf")


def test_constants_used_in_first_use_order_with_units_in_brackets():
    run = run_text(
        "---\nconstants: CODATA2022\n---\n\n```calc\n"
        "m = 2 [M_sun]\n"  # a dataset unit that is also a constant
        "L = 3 [kpc]\n"  # a prefixed name is not the dataset's pc
        "d = 1 [pc]\n"
        "E = m_e*c^2\n"
        "f(G) = G^2\n"  # a relation parameter, not the constant G
        "h : [J*s]\n"  # declared by the sheet, so not the constant h
        "y = h*2\n"
        "```\n"
    )
    rows = build_report(run).constants
    assert [(row.symbol, row.as_unit) for row in rows] == [
        ("M_sun", True),
        ("pc", True),
        ("m_e", False),
        ("c", False),
    ]
    # The dataset's own wording and provenance (IAU 2015 Resolution B3 for M_sun).
    assert rows[0].name == "solar mass"
    assert "IAU 2015 Resolution B3" in rows[0].source
    assert rows[2].uncertainty != "exact" and rows[3].uncertainty == "exact"


@pytest.mark.slow
def test_exports_do_not_depend_on_hash_seed(tmp_path, burst_text):
    sheet = tmp_path / "burst.sheet.md"
    sheet.write_text(burst_text, encoding="utf-8")
    script = (
        "import sys\n"
        "from pathlib import Path\n"
        "from worksheet.export import export_run\n"
        "from worksheet.runner import run_text\n"
        "run = run_text(Path(sys.argv[1]).read_text(encoding='utf-8'))\n"
        "for to in ('latex', 'html', 'md'):\n"
        "    sys.stdout.write(export_run(run, to, 'burst.sheet.md')[0])\n"
    )
    outputs = []
    for seed in ("0", "1", "12345"):
        env = {**os.environ, "PYTHONHASHSEED": seed}
        done = subprocess.run(
            [sys.executable, "-c", script, str(sheet)],
            env=env,
            capture_output=True,
            timeout=300,
            check=True,
        )
        outputs.append(done.stdout)
    assert outputs[0] == outputs[1] == outputs[2]
    assert b"\\documentclass{article}" in outputs[0]


@pytest.mark.slow
def test_importing_the_exports_loads_no_ui_library():
    code = (
        "import sys, worksheet.export\n"
        "print(sorted(m for m in ('textual', 'rich') if m in sys.modules))"
    )
    done = subprocess.run(
        [sys.executable, "-c", code], capture_output=True, text=True, timeout=120, check=True
    )
    assert done.stdout.strip() == "[]"
