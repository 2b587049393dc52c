"""Every demo sheet in ``sheets/`` exported three ways: stable bytes, every claim and every
constant it uses present, the LaTeX compiles and the HTML renders in a headless browser."""

from __future__ import annotations

import html
import re
import shutil
import subprocess
from pathlib import Path

import pytest

from worksheet.constants import load_dataset
from worksheet.export import export_run
from worksheet.export.latex_text import escape_code
from worksheet.runner import SheetRun, run_text

ROOT = Path(__file__).resolve().parents[2]
SHEETS = sorted((ROOT / "sheets").glob("*.sheet.md"))
FORMATS = ("latex", "html", "md")
_NAME = re.compile(r"[A-Za-z_][A-Za-z0-9_]*")


def test_there_are_demo_sheets():
    assert len(SHEETS) >= 3


@pytest.fixture(scope="module")
def runs() -> dict[str, SheetRun]:
    return {path.name: run_text(path.read_text(encoding="utf-8")) for path in SHEETS}


def _exports(run: SheetRun, name: str) -> dict[str, str]:
    return {to: export_run(run, to, source_name=name)[0] for to in FORMATS}


def _calc_lines(text: str) -> list[str]:
    """The statements of a sheet's calc fences, comments cut off (read here, not by the
    package, so the constants the export lists are checked against an independent reading)."""
    lines, inside = [], False
    for line in text.splitlines():
        if line.startswith("```"):
            inside = line.strip() == "```calc" if not inside else False
            continue
        if inside:
            lines.append(line.split("#", 1)[0])
    return lines


def _used_constants(text: str, dataset_name: str) -> set[str]:
    dataset = load_dataset(dataset_name)
    declared, params, used = set(), set(), set()
    lines = _calc_lines(text)
    for line in lines:
        if m := re.match(r"\s*([A-Za-z_]\w*)\s*:\s*\[", line):
            declared.add(m.group(1))
        if m := re.match(r"\s*[A-Za-z_]\w*\(([^)]*)\)\s*=", line):
            params.update(p.strip() for p in m.group(1).split(","))
    for line in lines:
        outside = re.sub(r"\[[^\]]*\]", " ", line)
        used.update(n for n in _NAME.findall(outside) if n in dataset.constants)
        for unit in re.findall(r"\[([^\]]*)\]", line):
            used.update(n for n in _NAME.findall(unit) if n in dataset.units)
    return used - declared - params


@pytest.mark.parametrize("path", SHEETS, ids=lambda p: p.name)
def test_exports_are_byte_stable(path):
    text = path.read_text(encoding="utf-8")
    first = _exports(run_text(text), path.name)
    second = _exports(run_text(text), path.name)
    for to in FORMATS:
        assert first[to].encode() == second[to].encode(), to


@pytest.mark.parametrize("path", SHEETS, ids=lambda p: p.name)
def test_every_claim_and_used_constant_is_present(path, runs):
    run = runs[path.name]
    exports = _exports(run, path.name)
    claims = [r for r in run.results if r.kind == "check"]
    assert claims, "every demo sheet makes claims"
    for claim in claims:
        # The claims table shows the statement as written (a trailing comment included).
        assert "\\texttt{" + escape_code(claim.text, keep_spaces=False) in exports["latex"]
        assert f"<code>{html.escape(claim.text)}" in exports["html"]
        word = "holds" if claim.holds else "fails"
        assert f"\\item[{{\\footnotesize {claim.line}}}] " in exports["latex"]
        assert f"claim: \\textbf{{{word}}}" in exports["latex"]
        assert f"| {claim.line} |" in exports["md"]
    held = sum(1 for c in claims if c.status == "ok")
    for to in FORMATS:
        assert f"{held} of {len(claims)} claims hold." in exports[to]
    dataset = load_dataset(run.settings.dataset)
    used = _used_constants(path.read_text(encoding="utf-8"), run.settings.dataset)
    assert used, "every demo sheet uses constants"
    for symbol in used:
        entry = dataset.constants.get(symbol) or dataset.units[symbol]
        for to in FORMATS:
            table = exports[to].rsplit("Constants used", 1)[1]
            assert entry.value in table, (symbol, to)


def _tex() -> str | None:
    return shutil.which("pdflatex")


def _has_pgfplots() -> bool:
    kpsewhich = shutil.which("kpsewhich")
    if kpsewhich is None:
        return False
    done = subprocess.run(
        [kpsewhich, "pgfplots.sty"], capture_output=True, text=True, timeout=60, check=False
    )
    return bool(done.stdout.strip())


def _compile(folder: Path, name: str, source: str) -> subprocess.CompletedProcess:
    (folder / f"{name}.tex").write_text(source, encoding="utf-8")
    return subprocess.run(
        [_tex() or "", "-interaction=nonstopmode", "-halt-on-error", "-no-shell-escape", name],
        cwd=folder,
        capture_output=True,
        text=True,
        timeout=300,
        check=False,
    )


@pytest.mark.slow
@pytest.mark.skipif(_tex() is None, reason="no pdflatex on PATH (install TeX Live)")
@pytest.mark.parametrize("path", SHEETS, ids=lambda p: p.name)
def test_demo_latex_compiles(tmp_path, path, runs):
    source = export_run(runs[path.name], "latex", path.name)[0]
    if "pgfplots" in source and not _has_pgfplots():
        pytest.skip("the sheet plots and pgfplots is missing (apt-get install texlive-pictures)")
    done = _compile(tmp_path, "demo", source)
    assert done.returncode == 0, done.stdout[-3000:]
    assert (tmp_path / "demo.pdf").stat().st_size > 0


@pytest.mark.slow
@pytest.mark.skipif(_tex() is None, reason="no pdflatex on PATH (install TeX Live)")
@pytest.mark.skipif(not _has_pgfplots(), reason="no pgfplots (apt-get install texlive-pictures)")
def test_plots_and_tables_compile(tmp_path, plot_run):
    done = _compile(tmp_path, "plots", export_run(plot_run, "latex", "plots.sheet.md")[0])
    assert done.returncode == 0, done.stdout[-3000:]
    host = (
        "\\documentclass{article}\n\\usepackage[T1]{fontenc}\n"
        "\\usepackage{amsmath,amssymb,siunitx,array,longtable,pgfplots}\n"
        "\\pgfplotsset{compat=1.16}\n"
        "\\begin{document}\n\\input{part}\n\\end{document}\n"
    )
    fragment = export_run(plot_run, "latex", "plots.sheet.md", standalone=False)[0]
    assert "\\usepackage{pgfplots}" in fragment.split("\n", 2)[1]
    (tmp_path / "part.tex").write_text(fragment, encoding="utf-8")
    assert _compile(tmp_path, "host", host).returncode == 0


def _chromium() -> str | None:
    return shutil.which("chromium") or shutil.which("chromium-browser")


def _dump_dom(folder: Path, page: str) -> str:
    target = folder / "page.html"
    target.write_text(page, encoding="utf-8")
    done = subprocess.run(
        [
            _chromium() or "",
            "--headless",
            "--no-sandbox",
            "--disable-gpu",
            "--disable-background-networking",
            "--disable-component-update",
            "--disable-sync",
            "--no-first-run",
            f"--user-data-dir={folder / 'profile'}",
            "--dump-dom",
            target.as_uri(),
        ],
        capture_output=True,
        text=True,
        timeout=120,
        check=False,
    )
    assert done.returncode == 0, done.stderr[-2000:]
    return done.stdout


@pytest.mark.slow
@pytest.mark.skipif(_chromium() is None, reason="no chromium on PATH (apt-get install chromium)")
@pytest.mark.parametrize("path", SHEETS, ids=lambda p: p.name)
def test_demo_html_renders(tmp_path, path, runs):
    run = runs[path.name]
    dom = _dump_dom(tmp_path, export_run(run, "html", path.name)[0])
    assert "<h2>Constants used</h2>" in dom
    for claim in (r for r in run.results if r.kind == "check"):
        assert html.escape(claim.text, quote=False) in dom
    plots = sum(1 for r in run.results if r.kind == "plot" and r.plot is not None)
    plots += sum(1 for r in run.results if r.kind == "histogram" and r.sampled is not None)
    assert dom.count("<svg") == plots


@pytest.mark.slow
@pytest.mark.skipif(_chromium() is None, reason="no chromium on PATH (apt-get install chromium)")
def test_plots_render_in_the_browser(tmp_path, plot_run):
    dom = _dump_dom(tmp_path, export_run(plot_run, "html", "plots.sheet.md")[0])
    assert dom.count("<svg") == 2 and dom.count("<polyline") == 3


_OVERFULL_H = re.compile(r"^Overfull \\hbox \(([0-9.]+)pt too wide\)", re.MULTILINE)
_OVERFULL_V = re.compile(r"^Overfull \\vbox \(([0-9.]+)pt too high\)", re.MULTILINE)


def overfull_boxes(log: str) -> list[str]:
    """Every overfull box in a pdflatex log that a reader would see: hboxes over 1 pt, and
    any vbox (the lines around each are kept, to say where it is)."""
    found = []
    for match in _OVERFULL_H.finditer(log):
        if float(match.group(1)) > 1.0:
            found.append(log[match.start() : match.start() + 300])
    found += [log[m.start() : m.start() + 300] for m in _OVERFULL_V.finditer(log)]
    return found


def test_overfull_boxes_are_read_from_a_log():
    log = (
        "Overfull \\hbox (193.6pt too wide) detected at line 40\n"
        "Overfull \\hbox (0.4pt too wide) in paragraph at lines 3--4\n"
        "Overfull \\vbox (2.0pt too high) has occurred while \\output is active\n"
    )
    assert len(overfull_boxes(log)) == 2


LONG_NUMBERS = """\
---
title: Long numbers and long lines
constants: CODATA2022
digits: 15
---

A note with $T_\\mathrm{H} \\propto M^{-1}$ and $$E = m c^2$$ in it.

```calc
M_long = 1.23456789012345e30 [kg] +- 1.1e20 [kg]
r_long = 2*G*M_long/c^2 in [km]
t_long = 5120*pi*G^2*M_long^3/(hbar*c^4) in [yr]
M_x : [kg]
M_solved = solve(5120*pi*G^2*M_x^3/(hbar*c^4) == 13.79e9 [yr], M_x) in [kg]
check M_solved < 5e11 [kg]
x = 1 [m]
scaling r_long in [km] around M_long = 1.23456789012345e30 [kg]
1 [M_earth] in [kg]
S_long = 4*pi*G*M_long^2/(hbar*c)
E_long = M_long*c^2
table M_long = 1e9 [kg] .. 1e15 [kg] log 90: r_long, t_long, S_long, E_long, M_long in [M_sun]
```
"""
"""The sheet's digits at 15, a long solve, a dataset unit with a 17-digit value, and a
sweep too wide for the line and too long for a page."""


@pytest.mark.slow
@pytest.mark.skipif(_tex() is None, reason="no pdflatex on PATH (install TeX Live)")
@pytest.mark.parametrize("path", [*SHEETS, None], ids=lambda p: p.name if p else "long-numbers")
def test_issue10_no_overfull_box_in_any_demo_export(tmp_path, path, runs):
    # Target of issue 10: no overfull box over 1 pt on every demo sheet, from pdflatex's log.
    if path is None:
        source = export_run(run_text(LONG_NUMBERS), "latex", "long.sheet.md")[0]
    else:
        source = export_run(runs[path.name], "latex", path.name)[0]
    if "pgfplots" in source and not _has_pgfplots():
        pytest.skip("the sheet plots and pgfplots is missing (apt-get install texlive-pictures)")
    done = _compile(tmp_path, "demo", source)
    assert done.returncode == 0, done.stdout[-3000:]
    log = (tmp_path / "demo.log").read_text(encoding="latin-1")
    assert overfull_boxes(log) == []
