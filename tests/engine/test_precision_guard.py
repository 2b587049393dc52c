"""The precision guard: double precision checked against 50-digit evaluation (issue 7)."""

from __future__ import annotations

import math
from decimal import Decimal, getcontext
from pathlib import Path

from worksheet.document import read_document
from worksheet.runner import SheetRunner, run_text

ROOT = Path(__file__).resolve().parents[2]


def test_one_minus_cosine_of_a_tiny_angle(results_by_name) -> None:
    # 1 - cos(x) = x^2/2 - ... = 5.000e-19 at x = 1e-9 (Taylor series); doubles give 0.
    named = results_by_name("x = 1e-9 [rad]\ny = 1 - cos(x)\n")
    assert math.cos(1e-9) == 1.0  # the double really cannot see it
    result = named["y"]
    assert result.precision == "cancellation"
    # x^2/2 - x^4/24: the second term is 1e-36 relative, far below the 4 digits recorded.
    expected = Decimal("1e-9") ** 2 / 2
    mantissa, exponent = f"{expected:.3e}".split("e")
    assert result.record.startswith(f"y = {mantissa}e{int(exponent)}")
    assert "precision loss" in result.record and "double precision gave 0" in result.record


def test_difference_of_nearly_equal_large_numbers(results_by_name) -> None:
    named = results_by_name("a = 1e20 [m]\nb = a + 1 [m]\nd = b - a\n")
    assert 1e20 + 1 - 1e20 == 0.0
    assert named["d"].precision == "cancellation"
    assert named["d"].record.startswith("d = 1.000 m")


def test_overflow_of_exp(results_by_name) -> None:
    named = results_by_name("z = exp(1000)\n")
    getcontext().prec = 30
    exact = Decimal(1000).exp()  # Python's decimal module, independent of mpmath
    mantissa, exponent = f"{exact:.3e}".split("e")
    assert named["z"].precision == "overflow"
    assert named["z"].record.startswith(f"z = {mantissa}e{int(exponent)}")


def test_guard_off_by_front_matter() -> None:
    text = (
        "---\nconstants: CODATA2022\nprecision_guard: off\n---\n\n```calc\ny = 1 - cos(1e-9)\n```\n"
    )
    run = run_text(text)
    (result,) = run.results
    assert result.precision is None
    assert result.record == "y = 0"


def test_flags_nothing_on_the_demo_sheets() -> None:
    runner = SheetRunner()
    try:
        for path in sorted((ROOT / "sheets").glob("*.sheet.md")):
            run = runner.run(read_document(path))
            flagged = [r.record for r in run.results if r.precision is not None]
            assert flagged == [], path.name
    finally:
        runner.close()
