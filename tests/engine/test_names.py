"""Name rules: only the sheet and the pinned dataset define names; lines are named in errors."""

from __future__ import annotations

import pytest
from scipy import constants as sc

from worksheet.engine import calculate
from worksheet.errors import ParseError, WorksheetError
from worksheet.syntax import parse_statement


@pytest.mark.parametrize(
    "name",
    [
        "E",  # sympy's Euler number must not leak in
        "N",  # sympy's numeric evaluation function; pint's newton
        "S",  # sympy's singleton registry; pint's siemens
        "gamma",  # sympy's gamma function
        "beta",  # sympy's beta function
        "I",  # sympy's imaginary unit
        "oo",  # sympy's infinity
        "h_",  # a name nobody defined
    ],
)
def test_library_names_do_not_leak_in(ctx, name: str) -> None:
    result = calculate(ctx, f"2*{name}")
    assert result.status == "error"
    assert f"unknown name '{name}'" in result.message


@pytest.mark.parametrize("name", ["E", "N", "S", "gamma", "beta"])
def test_library_names_are_usable_once_the_sheet_defines_them(results_by_name, name) -> None:
    named = results_by_name(f"{name} = 3 [J]\ny_ = 2*{name}\n")
    assert named[name].status == "ok"
    assert named["y_"].status == "ok"
    assert named["y_"].si_value == pytest.approx(6.0)
    assert named["y_"].dimension == "energy"


@pytest.mark.parametrize("text", ["_x", "_x = 1", "a = _b + 1", "__class__", "x__ = 1"])
def test_leading_underscore_is_refused(ctx, text: str) -> None:
    if text == "x__ = 1":
        # Underscores inside a name are fine: only a leading one is refused.
        assert calculate(ctx, "x__ + 1").status == "error"  # unknown, not refused
        assert "unknown name" in calculate(ctx, "x__ + 1").message
        return
    with pytest.raises(ParseError) as caught:
        parse_statement(text, 7)
    assert caught.value.line == 7
    assert caught.value.column is not None
    assert "_" in caught.value.message
    result = calculate(ctx, text)
    assert result.status == "error"
    assert "refused" in result.message


@pytest.mark.parametrize(
    "sheet",
    [
        "G = 1",  # redefining Newton's constant
        "c = 3e8 [m/s]",  # redefining the speed of light, even with the right dimension
        "k_B = 1",
        "pi = 3",  # pi is not a dataset constant, but it is just as reserved
        "hbar(x) = x",  # a relation may not take a constant's name either
    ],
)
def test_redefining_a_constant_is_an_error(run_sheet, sheet: str) -> None:
    (result,) = run_sheet(sheet)
    assert result.status == "error"
    assert result.message.startswith("line 1")
    assert "constant" in result.message


def test_declaring_a_constant_keeps_it_symbolic(results_by_name) -> None:
    named = results_by_name("G : [m^3/(kg*s^2)]\nM = 1e12 [kg]\nr_s = 2*G*M/c^2\n")
    assert named["G"].status == "ok"
    assert named["G"].kind == "declaration"
    r_s = named["r_s"]
    assert r_s.status == "ok"
    # A declaration is "a symbol with the dimension of UNIT and no value" (SPEC 2), so r_s
    # stays a formula in G: no number may come from the dataset's G.
    assert r_s.si_value is None, r_s.record
    assert r_s.record == f"r_s = {r_s.symbolic}"
    assert "G" in r_s.symbolic
    assert r_s.dimension == "length"


def test_declaring_a_constant_with_another_dimension_is_an_error(run_sheet) -> None:
    (result,) = run_sheet("G : [kg]")
    assert result.status == "error"
    assert "G" in result.message


def test_constant_value_without_a_declaration(ctx) -> None:
    # Without a declaration G is the dataset's number (CODATA 2022, as in scipy 1.17).
    assert calculate(ctx, "G").si_value == sc.G


def test_redefinition_names_both_lines(run_sheet) -> None:
    results = run_sheet("x = 2 [m]\ny = 1\nx = 3 [m]\n")
    assert [r.status for r in results] == ["ok", "ok", "error"]
    message = results[2].message
    assert message.startswith("line 3")
    assert "line 1" in message and "line 3" in message
    assert "'x'" in message


def test_relation_redefinition_names_both_lines(run_sheet) -> None:
    results = run_sheet("f(a) = a^2\n\nf(b) = b^3\n")
    error = next(r for r in results if r.status == "error")
    assert error.line == 3
    assert "line 1" in error.message and "line 3" in error.message


def test_use_above_the_definition_names_the_defining_line(run_sheet) -> None:
    results = run_sheet("y = z + 1\nw = 2\nz = 4\n")
    assert results[0].status == "error"
    assert results[0].message.startswith("line 1")
    assert "'z'" in results[0].message
    assert "line 3" in results[0].message
    assert results[2].status == "ok"


def test_dependents_of_a_failed_line_are_skipped(run_sheet) -> None:
    results = run_sheet(
        "w = 1 [m] + 1 [s]\n"  # line 1 fails
        "v = w * 2\n"  # depends on line 1
        "u = v + 1\n"  # depends on line 2, which was skipped
        "check w > 0 [m]\n"  # a claim on the failed name
        "q = 5\n"  # independent
    )
    assert [r.status for r in results] == ["error", "skipped", "skipped", "skipped", "ok"]
    assert "depends on line 1" in results[1].message
    assert "depends on line 2" in results[2].message
    assert "depends on line 1" in results[3].message


def test_display_kind_and_records(run_sheet) -> None:
    results = run_sheet("n_ = 5\nn_ * 2\n")
    assert [r.kind for r in results] == ["definition", "display"]
    assert results[1].si_value == pytest.approx(10.0)


def test_unicode_aliases(ctx) -> None:
    # ħ is hbar and π is pi.
    assert calculate(ctx, "ħ*π").si_value == pytest.approx(sc.hbar * 3.141592653589793, rel=1e-15)


def test_errors_share_the_root_type() -> None:
    with pytest.raises(WorksheetError):
        parse_statement("1 +", 1)
