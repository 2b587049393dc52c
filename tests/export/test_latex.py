"""The LaTeX export: typesetting, escaping, constants with provenance, and a real compile."""

from __future__ import annotations

import re
import shutil
import subprocess

import pytest
import scipy.constants as sc

from worksheet.export import export_run
from worksheet.export.latex_math import name_latex
from worksheet.export.latex_text import escape_text
from worksheet.runner import run_text


def _latex(run, standalone: bool = True) -> str:
    text, suffix = export_run(run, "latex", source_name="burst.sheet.md", standalone=standalone)
    assert suffix == ".tex"
    return text


def test_two_exports_are_byte_identical(burst_text):
    # Two separate runs (two workers) must give the same bytes.
    first = _latex(run_text(burst_text)).encode()
    second = _latex(run_text(burst_text)).encode()
    assert first == second


@pytest.mark.parametrize(
    ("name", "expected"),
    [
        ("T_H", "T_{\\mathrm{H}}"),  # a one-letter label subscript, upright
        ("k_B", "k_{\\mathrm{B}}"),
        ("t_ev", "t_{\\mathrm{ev}}"),  # a word subscript
        ("sigma_SB", "\\sigma_{\\mathrm{SB}}"),  # Greek base
        ("hbar", "\\hbar"),
        ("pi", "\\pi"),
        ("Omega", "\\Omega"),
        ("x_0", "x_{0}"),  # a numeric index stays a digit
        ("M_sun", "M_{\\odot}"),
        ("M", "M"),
        ("bad", "\\mathit{bad}"),  # a multi-letter name is one italic word, not b*a*d
    ],
)
def test_names_are_typeset_with_subscripts_and_greek(name, expected):
    assert name_latex(name) == expected


def test_steps_are_typeset_as_written_then_valued(burst_run):
    text = _latex(burst_run)
    # The definition as written, then its value (siunitx mantissa, uncertainty, exponent).
    assert "M = \\qty{5e11}{\\kilo\\gram} \\pm \\qty{20}{\\percent}" in text
    # Value and uncertainty as separate numbers: siunitx does not pad the recorded digits.
    assert "(\\num{5.000} \\pm \\num{1.0}) \\times 10^{11}\\,\\unit{\\kilo\\gram}" in text
    assert "\\frac{\\hbar\\,c^{3}}{8\\,\\pi\\,G\\,M\\,k_{\\mathrm{B}}}" in text
    # T_H for M = 5e11 kg from scipy's constants, to the sheet's 4 significant figures, with
    # its first-order uncertainty: T_H ~ 1/(G M), so the relative u is M's 20% and G's
    # CODATA relative u added in quadrature.
    t_hawking = sc.hbar * sc.c**3 / (8 * sc.pi * sc.G * 5e11 * sc.k)
    g_relative = sc.physical_constants["Newtonian constant of gravitation"][2] / sc.G
    spread = t_hawking * (0.2**2 + g_relative**2) ** 0.5
    mantissa, exponent = f"{t_hawking:.3e}".split("e")
    shown_u = f"{spread / 10 ** int(exponent):.2g}"
    assert (
        f"(\\num{{{mantissa}}} \\pm \\num{{{shown_u}}}) \\times 10^{{{int(exponent)}}}"
        "\\,\\unit{\\kelvin}"
    ) in text
    # A derivation verb shows the form it produced.
    assert "\\frac{\\mathrm{d}}{\\mathrm{d}x}\\left(x^{3}\\right) = 3\\,x^{2}" in text
    # A unit without a siunitx macro is written literally; au has one.
    assert "\\unit{\\astronomicalunit}" in text


def test_every_claim_appears_with_its_status(burst_run):
    text = _latex(burst_run)
    claims = [r for r in burst_run.results if r.kind == "check"]
    assert len(claims) == 3
    for claim in claims:
        word = {"ok": "holds", "failed": "fails"}[claim.status]
        item = text.split(f"\\item[{{\\footnotesize {claim.line}}}] ", 1)[1].split("\n")[0]
        assert f"claim: \\textbf{{{word}}}" in item
        # ... and again in the closing table, as written (escaped).
        assert f"{claim.line} & \\texttt{{{escape_text(claim.text)}}}" in text
    assert "2 of 3 claims hold." in text
    assert "T_{\\mathrm{H}} \\sim \\qty{1e11}{\\kelvin}" in text


def test_errors_are_shown_with_their_message(burst_run):
    text = _latex(burst_run)
    assert "\\textbf{error}: line 30, col 13: cannot add length" in text


def _constant_rows(text: str) -> dict[str, str]:
    """Symbol cell -> value of the constants table rows."""
    table = text.split("\\section*{Constants used}", 1)[1]
    rows = {}
    for match in re.finditer(
        r"^\\\((.+?)\\\)(?: \(unit\))? & .*? & \\num(?:\[[^\]]*\])?\{([^}]*)\}",
        table,
        re.MULTILINE,
    ):
        rows[match.group(1)] = match.group(2)
    return rows


def test_every_used_constant_is_listed_with_its_published_value(burst_run):
    text = _latex(burst_run)
    rows = _constant_rows(text)
    # Expected values from scipy.constants (CODATA 2022; these five are equal in 2018).
    expected = {
        "G": sc.G,
        "c": sc.c,
        "\\hbar": sc.hbar,
        "k_{\\mathrm{B}}": sc.k,
        "\\sigma_{\\mathrm{SB}}": sc.Stefan_Boltzmann,
        # IAU 2012 Resolution B2: the astronomical unit is 149597870700 m exactly.
        "\\unit{\\astronomicalunit}": sc.astronomical_unit,
    }
    assert set(rows) == set(expected)
    for symbol, value in expected.items():
        assert float(rows[symbol]) == pytest.approx(value, rel=1e-12)
    assert "Dataset: CODATA2018" in text
    assert "CODATA 2018 (NIST" in text  # the source column
    assert "\\num{1.5e-15}" in text  # G's published standard uncertainty (CODATA 2018)


def test_declared_names_are_not_listed_as_constants():
    run = run_text(
        "---\nconstants: CODATA2022\n---\n\n```calc\nG : [m^3/(kg*s^2)]\n"
        "g(c) = c^2\ny = 3 [m]\n```\n"
    )
    rows = _constant_rows(_latex(run))
    assert rows == {}
    assert "The sheet uses no constant of the dataset." in _latex(run)


def test_special_characters_in_notes_and_title_are_escaped(hostile_run):
    text = _latex(hostile_run)
    # $dollars$ is inline math (letters only, so it passes the check in note_math).
    assert "Costs 100\\% of T\\_H \\& \\#1 \\{braces\\} \\(dollars\\)" in text
    assert "\\textasciitilde{}tilde \\textasciicircum{}caret \\textbackslash{}backslash" in text
    assert (
        "Odd \\textless{}b\\textgreater{}title\\textless{}/b\\textgreater{} \\& 100\\% No.\\#1"
    ) in text
    assert (
        "\\item a list item with \\texttt{code\\_span \\& \\textless{}tag\\textgreater{}}"
    ) in text
    # No special character survives unescaped in the note's paragraph.
    paragraph = next(line for line in text.splitlines() if line.startswith("Costs"))
    assert (
        re.search(
            r"(?<!\\)[%#&$_{}]",
            paragraph.replace("{}", "").replace("\\{", "").replace("\\}", ""),
        )
        is None
    )


def test_standalone_document_and_fragment(burst_run):
    standalone = _latex(burst_run)
    assert standalone.startswith("\\documentclass{article}\n")
    for package in ("amsmath", "siunitx"):
        assert f"\\usepackage{{{package}}}" in standalone
    assert "verify them independently before any use where safety" in standalone
    assert standalone.endswith("\\end{document}\n")
    fragment = _latex(burst_run, standalone=False)
    assert "\\documentclass" not in fragment
    assert "\\begin{document}" not in fragment
    assert "\\section*{Claims}" in fragment


def fragment_packages(fragment: str) -> str:
    """The packages the fragment's first line says it needs, as a host would load them."""
    needed = re.search(r"needs (\\usepackage\{[^}]*\})", fragment.split("\n", 1)[0])
    assert needed is not None
    return needed.group(1) + "\n"


def _tex_engine() -> str | None:
    return shutil.which("pdflatex") or shutil.which("lualatex")


def _compile(tmp_path, name: str, source: str) -> subprocess.CompletedProcess:
    engine = _tex_engine()
    assert engine is not None
    (tmp_path / f"{name}.tex").write_text(source, encoding="utf-8")
    return subprocess.run(
        [engine, "-interaction=nonstopmode", "-halt-on-error", "-no-shell-escape", f"{name}.tex"],
        cwd=tmp_path,
        capture_output=True,
        text=True,
        timeout=300,
        check=False,
    )


@pytest.mark.slow
@pytest.mark.skipif(
    _tex_engine() is None, reason="no pdflatex or lualatex on PATH (install TeX Live to run this)"
)
@pytest.mark.parametrize("which", ["burst", "hostile"])
def test_standalone_document_compiles(tmp_path, burst_run, hostile_run, which):
    run = burst_run if which == "burst" else hostile_run
    done = _compile(tmp_path, which, _latex(run))
    assert done.returncode == 0, done.stdout[-3000:]
    assert (tmp_path / f"{which}.pdf").stat().st_size > 0


@pytest.mark.slow
@pytest.mark.skipif(
    _tex_engine() is None, reason="no pdflatex or lualatex on PATH (install TeX Live to run this)"
)
def test_fragment_compiles_inside_a_host_document(tmp_path, burst_run):
    (tmp_path / "part.tex").write_text(_latex(burst_run, standalone=False), encoding="utf-8")
    host = (
        "\\documentclass{article}\n\\usepackage[T1]{fontenc}\n"
        + fragment_packages(_latex(burst_run, standalone=False))
        + "\\begin{document}\n\\input{part}\n\\end{document}\n"
    )
    done = _compile(tmp_path, "host", host)
    assert done.returncode == 0, done.stdout[-3000:]
