"""End-to-end: the `worksheet` command on real sheet files (issue 3)."""

from __future__ import annotations

import json
import os
import subprocess
import sys
from pathlib import Path

import pytest
import scipy.constants as sc

ROOT = Path(__file__).resolve().parents[2]
SHEETS = sorted((ROOT / "sheets").glob("*.sheet.md"))

SMALL = """---
title: small
constants: CODATA2022
digits: 4
---

{prose}

```calc
M = 5e11 [kg]                      # mass
r_s = 2*G*M/c^2
T_H = hbar*c^3/(8*pi*G*M*k_B) in [K]
check T_H ~ 1e11 [K]
```
""".format(prose="Some prose with ħ and tabs\t and trailing spaces   ")


def _two_figures(x: float) -> str:
    mantissa, exponent = f"{x:.1e}".split("e")
    return f"{mantissa}e{int(exponent)}"


_G_RELATIVE = sc.physical_constants["Newtonian constant of gravitation"][2] / sc.G
# Expected first-order uncertainties for M = 5e11 kg, from scipy's CODATA 2022 values.
RS_U = _two_figures(2 * sc.G * 5e11 / sc.c**2 * _G_RELATIVE)
TH_U = _two_figures(sc.hbar * sc.c**3 / (8 * sc.pi * sc.G * 5e11 * sc.k) * _G_RELATIVE)


def cli(*args: str, env: dict[str, str] | None = None, cwd: Path | None = None):
    full_env = dict(os.environ)
    full_env.update(env or {})
    return subprocess.run(
        [sys.executable, "-m", "worksheet", *args],
        capture_output=True,
        text=True,
        env=full_env,
        cwd=cwd,
        timeout=120,
    )


@pytest.fixture
def small(tmp_path: Path) -> Path:
    path = tmp_path / "small.sheet.md"
    path.write_text(SMALL, encoding="utf-8")
    return path


@pytest.mark.slow
def test_run_writes_results_then_check_passes(small: Path) -> None:
    done = cli("run", str(small))
    assert done.returncode == 0, done.stdout + done.stderr
    text = small.read_text(encoding="utf-8")
    # r_s ~ G and T_H ~ 1/G carry G's CODATA relative uncertainty (scipy.constants).
    assert (
        f"```result\nM = 5.000e11 kg\nr_s = 7.426e-16 +- {RS_U} m\nT_H = 2.454e11 +- {TH_U} K\n"
        in text
    )
    assert "check T_H ~ 1e11 [K]: holds" in text
    # Notes survive byte for byte, including the tab and trailing spaces.
    assert "Some prose with ħ and tabs\t and trailing spaces   \n" in text
    assert cli("check", str(small)).returncode == 0


@pytest.mark.slow
def test_determinism_across_hash_seeds(tmp_path: Path) -> None:
    outputs = []
    for seed in ("0", "12345"):
        target = tmp_path / f"out{seed}.sheet.md"
        done = cli("run", str(SHEETS[0]), "-o", str(target), env={"PYTHONHASHSEED": seed})
        assert done.returncode == 0, done.stdout + done.stderr
        outputs.append(target.read_bytes())
    assert outputs[0] == outputs[1]
    # And equal to the committed file: the sheet re-runs to the same bytes.
    assert outputs[0] == SHEETS[0].read_bytes()


@pytest.mark.slow
def test_stale_result_is_reported_with_both_values(small: Path) -> None:
    assert cli("run", str(small)).returncode == 0
    recomputed = f"T_H = 2.454e11 +- {TH_U} K"
    edited = small.read_text(encoding="utf-8").replace(recomputed, "T_H = 9.999e11 K")
    small.write_text(edited, encoding="utf-8")
    done = cli("check", str(small))
    assert done.returncode == 1
    assert "stale" in done.stdout
    assert "recorded: T_H = 9.999e11 K" in done.stdout
    assert f"recomputed: {recomputed}" in done.stdout
    assert small.read_text(encoding="utf-8") == edited  # check writes nothing


@pytest.mark.slow
def test_exit_codes(tmp_path: Path, small: Path) -> None:
    failing = tmp_path / "failing.sheet.md"
    failing.write_text("```calc\ncheck 1 [m] > 2 [m]\nx = 1 [m] + 1 [s]\n```\n", encoding="utf-8")
    done = cli("run", str(failing))
    assert done.returncode == 1
    assert "cannot add length (1 [m], m) and time (1 [s], s)" in failing.read_text()
    assert cli("check", str(failing)).returncode == 1
    # Missing file and a usage error: exit 2 with a message on stderr.
    missing = cli("check", str(tmp_path / "nope.sheet.md"))
    assert missing.returncode == 2 and "no such file" in missing.stderr
    usage = cli("check")
    assert usage.returncode == 2 and "worksheet" in usage.stderr
    # Not UTF-8: exit 2, where it is said, and nothing written.
    binary = tmp_path / "bad.sheet.md"
    binary.write_bytes(b"```calc\nx = 1\n```\n\xff\xfe\n")
    done = cli("run", str(binary))
    assert done.returncode == 2 and "line 4" in done.stderr
    assert binary.read_bytes() == b"```calc\nx = 1\n```\n\xff\xfe\n"
    # An unclosed fence is unreadable too.
    unclosed = tmp_path / "open.sheet.md"
    unclosed.write_text("```calc\nx = 1\n", encoding="utf-8")
    done = cli("check", str(unclosed))
    assert done.returncode == 2 and "line 1" in done.stderr


@pytest.mark.slow
def test_check_json_fields(small: Path) -> None:
    cli("run", str(small))
    done = cli("check", str(small), "--json")
    assert done.returncode == 0
    report = json.loads(done.stdout)
    assert report["file"] == str(small) and report["ok"] is True
    fields = {
        "line",
        "kind",
        "name",
        "text",
        "status",
        "message",
        "value",
        "unit",
        "si_value",
        "si_unit",
        "dimension",
        "symbolic",
    }
    for statement in report["statements"]:
        assert fields <= set(statement)
    by_name = {s["name"]: s for s in report["statements"] if s["name"]}
    assert by_name["T_H"]["unit"] == "K" and by_name["T_H"]["dimension"] == "temperature"
    assert by_name["r_s"]["si_unit"] == "m" and by_name["r_s"]["symbolic"] == "2*G*M/c^2"
    assert [s["kind"] for s in report["statements"]] == ["definition"] * 3 + ["check"]


@pytest.mark.slow
def test_unpinned_sheet_warns(tmp_path: Path) -> None:
    path = tmp_path / "loose.sheet.md"
    path.write_text("```calc\nx = 2 [m]\n```\n\n```result\nx = 2.000 m\n```\n", encoding="utf-8")
    done = cli("check", str(path))
    assert done.returncode == 0
    assert "does not pin its constants" in done.stdout


@pytest.mark.slow
@pytest.mark.parametrize("sheet", SHEETS, ids=[p.name for p in SHEETS])
def test_every_demo_sheet_checks_clean(sheet: Path) -> None:
    done = cli("check", str(sheet))
    assert done.returncode == 0, done.stdout + done.stderr
