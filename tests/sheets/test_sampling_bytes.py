"""Issue 13: a sampled sheet records the same bytes under other hash seeds and locales."""

from __future__ import annotations

import os
import shutil
import subprocess
import sys
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[2]
DEMO = ROOT / "sheets" / "detection-rate.sheet.md"

# Runs the command line after switching the process to the environment's locale, which
# Python does not do by itself: a locale-dependent format would then show a comma.
DRIVER = (
    "import locale, sys; locale.setlocale(locale.LC_ALL, ''); "
    "print('decimal point', repr(locale.localeconv()['decimal_point']), file=sys.stderr); "
    "from worksheet.cli import main; sys.exit(main(sys.argv[1:]))"
)


def _run(out: Path, env_extra: dict[str, str]) -> subprocess.CompletedProcess:
    env = {**os.environ, **env_extra}
    return subprocess.run(
        [sys.executable, "-c", DRIVER, "run", str(DEMO), "-o", str(out)],
        env=env,
        capture_output=True,
        text=True,
        timeout=300,
    )


@pytest.mark.slow
def test_issue13_same_bytes_under_other_hash_seeds(tmp_path):
    expected = DEMO.read_bytes()
    for seed in ("0", "1", "4242"):
        out = tmp_path / f"hash{seed}.sheet.md"
        done = _run(out, {"PYTHONHASHSEED": seed, "LC_ALL": "C"})
        assert done.returncode == 0, done.stderr
        assert out.read_bytes() == expected, f"PYTHONHASHSEED={seed}"


@pytest.mark.slow
def test_issue13_same_bytes_under_a_comma_decimal_locale(tmp_path):
    localedef = shutil.which("localedef")
    if localedef is None:
        pytest.skip("localedef is not installed: no comma-decimal locale can be built")
    locales = tmp_path / "locales"
    locales.mkdir()
    built = subprocess.run(
        [localedef, "-i", "de_DE", "-f", "UTF-8", str(locales / "de_DE.UTF-8")],
        capture_output=True,
        text=True,
        timeout=120,
    )
    if not (locales / "de_DE.UTF-8").exists():
        pytest.skip(f"the de_DE locale could not be built: {built.stderr.strip()[:200]}")
    out = tmp_path / "de.sheet.md"
    done = _run(out, {"LOCPATH": str(locales), "LC_ALL": "de_DE.UTF-8", "PYTHONHASHSEED": "7"})
    assert done.returncode == 0, done.stderr
    assert "decimal point ','" in done.stderr  # the locale really was in force
    assert out.read_bytes() == DEMO.read_bytes()
