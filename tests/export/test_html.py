"""The HTML export: one self-contained, escaped page; claims and constants; a real browser."""

from __future__ import annotations

import html
import re
import shutil
import subprocess

import pytest
import scipy.constants as sc

from worksheet.export import export_run
from worksheet.export.html_math import name_html
from worksheet.runner import run_text


def _html(run) -> str:
    text, suffix = export_run(run, "html", source_name="burst.sheet.md")
    assert suffix == ".html"
    return text


def test_two_exports_are_byte_identical(burst_text):
    assert _html(run_text(burst_text)).encode() == _html(run_text(burst_text)).encode()


def test_page_is_self_contained(burst_run, hostile_run):
    for run in (burst_run, hostile_run):
        page = _html(run)
        assert page.startswith("<!DOCTYPE html>")
        assert "<style>" in page
        # Nothing fetched: no script, no stylesheet link, no image, no src attribute.
        for forbidden in ("<script", "<link", "<img", "src=", "@import", "url("):
            assert forbidden not in page.lower()


def test_notes_and_title_are_escaped(hostile_run):
    page = _html(hostile_run)
    assert "&lt;script&gt;alert(1)&lt;/script&gt;" in page
    assert "T_H &amp; #1 {braces}" in page
    assert "<title>Odd &lt;b&gt;title&lt;/b&gt; &amp; 100% No.#1</title>" in page
    assert "<code>code_span &amp; &lt;tag&gt;</code>" in page
    assert 'href="javascript:' not in page  # an unsafe link stays text


@pytest.mark.parametrize(
    ("name", "expected"),
    [
        ("T_H", "<var>T</var><sub>H</sub>"),
        ("k_B", "<var>k</var><sub>B</sub>"),
        ("sigma_SB", "<var>σ</var><sub>SB</sub>"),
        ("hbar", "<var>ħ</var>"),
        ("M_sun", "<var>M</var><sub>⊙</sub>"),
        ("x_0", "<var>x</var><sub>0</sub>"),
        ("a<b", "<var>a&lt;b</var>"),  # never reaches HTML unescaped (not a sheet name)
    ],
)
def test_names_are_typeset_with_subscripts(name, expected):
    assert name_html(name) == expected


def test_steps_values_and_claims(burst_run):
    page = _html(burst_run)
    assert '<span class="frac"><span class="num">2\u2009<var>G</var>' in page
    # T_H for M = 5e11 kg +- 20% (scipy's constants); T_H ~ 1/(G M), so its relative
    # uncertainty is M's 20% and G's CODATA relative uncertainty in quadrature.
    t_hawking = sc.hbar * sc.c**3 / (8 * sc.pi * sc.G * 5e11 * sc.k)
    g_relative = sc.physical_constants["Newtonian constant of gravitation"][2] / sc.G
    spread = t_hawking * (0.2**2 + g_relative**2) ** 0.5
    mantissa, exponent = f"{t_hawking:.3e}".split("e")
    shown_u = f"{spread / 10 ** int(exponent):.2g}"
    shown = f"({mantissa} ± {shown_u})\u2009×\u200910<sup>{int(exponent)}</sup>"
    assert shown + '\u2009<span class="unit">K' in page
    claims = [r for r in burst_run.results if r.kind == "check"]
    for claim in claims:
        word = {"ok": "holds", "failed": "fails"}[claim.status]
        row = (
            f'<tr class="step status-{claim.status}"><td class="line">{claim.line}</td>'
            f"<td><code>{html.escape(claim.text)}</code>"
        )
        assert row in page
        assert f"claim {word}" in page
    assert "2 of 3 claims hold." in page
    assert "cannot add length" in page


def test_every_used_constant_is_listed(burst_run):
    page = _html(burst_run)
    table = page.split("<h2>Constants used</h2>", 1)[1]
    values = re.findall(
        r'<tr><td>(.*?)</td><td>(.*?)</td><td class="number"><data value="(.*?)">', table
    )
    found = {name: float(value) for _, name, value in values}
    # Expected values from scipy.constants (equal in CODATA 2018 and 2022 for these).
    assert found == pytest.approx(
        {
            "Newtonian constant of gravitation": sc.G,
            "speed of light in vacuum": sc.c,
            "reduced Planck constant": sc.hbar,
            "Boltzmann constant": sc.k,
            "Stefan-Boltzmann constant": sc.Stefan_Boltzmann,
            "astronomical unit": sc.astronomical_unit,
        },
        rel=1e-12,
    )
    assert "Results are estimates for research planning" in page


def _chromium() -> str | None:
    return shutil.which("chromium") or shutil.which("chromium-browser")


@pytest.mark.slow
@pytest.mark.skipif(_chromium() is None, reason="no chromium on PATH (apt-get install chromium)")
def test_page_renders_in_a_headless_browser(tmp_path, burst_run):
    page = tmp_path / "burst.html"
    page.write_text(_html(burst_run), encoding="utf-8")
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
            f"--user-data-dir={tmp_path / 'profile'}",
            "--dump-dom",
            page.as_uri(),
        ],
        capture_output=True,
        text=True,
        timeout=120,
        check=False,
    )
    assert done.returncode == 0, done.stderr[-2000:]
    dom = done.stdout
    assert "<h2>Claims</h2>" in dom
    for claim in (r for r in burst_run.results if r.kind == "check"):
        assert html.escape(claim.text, quote=False) in dom
    assert "2 of 3 claims hold." in dom
