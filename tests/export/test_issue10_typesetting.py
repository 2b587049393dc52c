"""Issue 10, LaTeX export: ``scaling``, ``estimate`` and view notes typeset rather than
printed as code, ``$...$`` in notes as math, values shown with exactly their recorded
digits, long numbers allowed to wrap (the overfull-box check is in test_demo_sheets)."""

from __future__ import annotations

from decimal import Decimal

import pytest
from hypothesis import given
from hypothesis import strategies as st

from worksheet.export import export_run
from worksheet.export.latex_notes import math_latex
from worksheet.export.note_math import safe_tex_math
from worksheet.runner import SheetRun, run_text

SHEET = """\
---
title: Views and forms
constants: CODATA2022
digits: 4
---

The temperature goes as $T_\\mathrm{H} \\propto M^{-1}$; $5 and $10 are prices, and
$\\input{secret}$ is not math we pass on.

```calc
M = 5e11 [kg]
T_H = hbar*c^3/(8*pi*G*M*k_B) in [K]
t_ev = 5120*pi*G^2*M^3/(hbar*c^4) in [yr]
r_s = 2*G*M/c^2
scaling T_H in [K] around M = 5e11 [kg]
scaling t_ev in [yr] around M = 5e11 [kg]
estimate T_g [K] from hbar, c, k_B, r_s
T_H in natural [MeV]
r_s in planck
```
"""


@pytest.fixture(scope="module")
def run() -> SheetRun:
    return run_text(SHEET)


@pytest.fixture(scope="module")
def latex(run) -> str:
    return export_run(run, "latex", "views.sheet.md")[0]


@pytest.fixture(scope="module")
def page(run) -> str:
    return export_run(run, "html", "views.sheet.md")[0]


def _item(text: str, line: int) -> str:
    return text.split(f"\\item[{{\\footnotesize {line}}}] ", 1)[1].split("\\item[", 1)[0]


def test_issue10_scaling_is_a_formula_with_its_exact_exponents(latex):
    # Hawking temperature ~ 1/M and photon-only lifetime ~ M^3 (Hawking 1974; Page 1976).
    temperature, lifetime = _item(latex, 15), _item(latex, 16)
    assert "\\left(\\frac{M}{\\qty{5e11}{\\kilo\\gram}}\\right)^{-1}" in temperature
    assert temperature.startswith("\\(\\displaystyle T_{\\mathrm{H}} = \\qty{2.454 e11}")
    assert "\\left(\\frac{M}{\\qty{5e11}{\\kilo\\gram}}\\right)^{3}" in lifetime
    assert "\\texttt" not in temperature + lifetime


def test_issue10_estimate_is_a_formula_with_its_caveat(latex):
    item = _item(latex, 17)
    assert "T_{\\mathrm{g}} \\sim \\frac{\\hbar\\,c}{k_{\\mathrm{B}}\\,r_{\\mathrm{s}}} = " in item
    assert "estimate from \\(\\hbar\\), \\(c\\)" in item
    assert "up to a dimensionless factor" in item
    assert "\\texttt" not in item


def test_issue10_view_notes_have_their_expressions_as_math(latex):
    natural, planck = _item(latex, 18), _item(latex, 19)
    assert "\\(\\hbar = c = k_{\\mathrm{B}} = 1\\)" in natural
    assert "times \\(k_{\\mathrm{B}}\\)" in natural
    assert "units, hbar" not in natural and "k\\_B" not in natural
    assert "\\(G = \\hbar = c = k_{\\mathrm{B}} = 1\\)" in planck
    assert "in units of \\(l_{\\mathrm{P}}\\)" in planck


def test_issue10_values_keep_exactly_their_recorded_digits(run, latex):
    # One \qty{m \pm u}{...} would make siunitx pad the value to the uncertainty's
    # decimals (10.57 +- 0.00024 printed as 10.57000(24)): more digits than recorded.
    record = next(r.record for r in run.results if r.line == 18)
    assert record is not None
    value, _, rest = record.split(" = ", 1)[1].partition(" +- ")
    uncertainty = format(Decimal(rest.split(" ", 1)[0]), "f")
    assert "." in value and "e" not in value  # a plain decimal with an uncertainty (MeV)
    shown = f"\\num{{{value}}} \\pm \\num{{{uncertainty}}}\\,\\unit{{\\mega\\electronvolt}}"
    assert shown in _item(latex, 18)
    assert f"{value}0" not in latex


def test_issue10_long_dataset_numbers_may_wrap_but_are_whole(latex):
    # hbar = h / (2 pi) with the exact SI h, as the dataset records it (17 digits).
    assert "\\num[group-separator={\\,\\allowbreak}]{1.0545718176461564e-34}" in latex


def test_issue10_note_math_is_inline_math_in_latex(latex):
    assert "\\(T_\\mathrm{H} \\propto M^{-1}\\)" in latex
    assert "\\$5 and \\$10 are prices" in latex
    assert "\\$\\textbackslash{}input\\{secret\\}\\$" in latex
    assert "\\input{secret}" not in latex


def test_issue10_note_math_in_html_is_typeset_or_left_as_source(page):
    assert (
        '<span class="math"><var>T</var><sub><span class="upright"><var>H</var></span></sub>'
        " ∝ <var>M</var><sup>−1</sup></span>"
    ) in page
    assert "$5 and $10 are prices" in page
    assert '<span class="tex"><code>$\\input{secret}$</code></span>' in page


def test_issue10_html_typesets_scaling_and_estimate(page):
    assert '<span class="factors">' in page
    assert "estimate from <var>ħ</var>" in page
    assert '<pre class="record">T_H = 2.454e11 K * (M' not in page


@given(st.text(alphabet=st.characters(codec="ascii"), max_size=40))
def test_issue10_note_math_passed_to_tex_has_no_command_outside_the_list(source):
    shown = math_latex(source)
    safe = safe_tex_math(source.strip())
    if safe is None:
        # Shown as text: every backslash, brace and dollar escaped.
        assert shown.startswith("\\$") and "\\input" not in shown.replace("\\textbackslash{}", "")
    else:
        for bad in ("\\input", "\\def", "\\write", "\\catcode", "^^", "#", "%", "&", "$"):
            assert bad not in safe
        assert safe.count("{") - safe.count("\\{") == safe.count("}") - safe.count("\\}")
