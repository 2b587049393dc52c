"""Themes travel with the package: the package list is complete and a wheel carries them."""

from __future__ import annotations

import shutil
import subprocess
import sys
import sysconfig
import tomllib
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[2]


def test_package_list_covers_the_source_tree() -> None:
    # pyproject.toml lists packages by hand (themes/ is mapped in); a new subpackage
    # must be added there, or a wheel would silently lack it.
    config = tomllib.loads((ROOT / "pyproject.toml").read_text(encoding="utf-8"))
    listed = set(config["tool"]["setuptools"]["packages"])
    found = {
        ".".join(init.parent.relative_to(ROOT).parts)
        for init in (ROOT / "worksheet").rglob("__init__.py")
    }
    assert listed == found | {"worksheet.themes"}
    assert config["tool"]["setuptools"]["package-dir"]["worksheet.themes"] == "themes"


def test_editable_install_reads_themes_through_the_package() -> None:
    from importlib import resources

    from worksheet.app.theme_files import load_themes

    names = {item.name for item in resources.files("worksheet.themes").iterdir()}
    assert {"dark.toml", "light.toml", "contrast.toml", "worksheet.tcss"} <= names
    assert load_themes().problems == ()


CHECK = """
import asyncio, sys
from importlib import resources
import worksheet
from worksheet.app.app import WorksheetApp
from worksheet.app.theme_files import load_themes

assert "site-packages" in worksheet.__file__, worksheet.__file__
loaded = load_themes()
assert loaded.problems == (), loaded.problems
print(sorted(t.name for t in loaded.themes))
print(resources.files("worksheet.themes").joinpath("worksheet.tcss").is_file())
app = WorksheetApp(sys.argv[1], theme="light")

async def main():
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause(0.2)
        print(app.theme, app.problems)

asyncio.run(main())
app.close_service()
"""


@pytest.mark.slow
def test_a_wheel_carries_the_themes(tmp_path: Path) -> None:
    source = tmp_path / "source"
    shutil.copytree(
        ROOT,
        source,
        ignore=shutil.ignore_patterns(
            ".git", ".venv", "build", "dist", "*.egg-info", "__pycache__", ".*_cache", "tests"
        ),
    )
    wheels = tmp_path / "wheels"
    subprocess.run(
        [sys.executable, "-m", "pip", "wheel", "-q", "--no-deps", "-w", str(wheels), str(source)],
        check=True,
        capture_output=True,
        timeout=300,
    )
    wheel = next(wheels.glob("worksheet-*.whl"))
    venv = tmp_path / "venv"
    subprocess.run([sys.executable, "-m", "venv", str(venv)], check=True, timeout=120)
    python = venv / "bin" / "python"
    purelib = Path(
        subprocess.run(
            [str(python), "-c", "import sysconfig; print(sysconfig.get_paths()['purelib'])"],
            check=True,
            capture_output=True,
            text=True,
        ).stdout.strip()
    )
    # The dependencies come from this interpreter's site-packages (no downloads); the
    # package itself only from the wheel.
    (purelib / "dependencies.pth").write_text(
        sysconfig.get_paths()["purelib"] + "\n", encoding="utf-8"
    )
    subprocess.run(
        [str(python), "-m", "pip", "install", "-q", "--no-deps", "--no-index", str(wheel)],
        check=True,
        capture_output=True,
        timeout=300,
    )
    sheet = tmp_path / "s.sheet.md"
    sheet.write_text(
        "---\ntitle: s\nconstants: CODATA2018\n---\n\n```calc\nx = 1 [m]\n```\n", encoding="utf-8"
    )
    done = subprocess.run(
        [str(python), "-c", CHECK, str(sheet)],
        capture_output=True,
        text=True,
        cwd=tmp_path,
        timeout=120,
    )
    assert done.returncode == 0, done.stderr
    lines = done.stdout.splitlines()
    assert lines[0] == "['contrast', 'dark', 'light']"
    assert lines[1] == "True"
    assert lines[2] == "light []"
