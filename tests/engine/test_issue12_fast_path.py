"""The lazy path (no sympy form until printed) records exactly what the eager path records.

Both take a product's numbers from the walk over the parsed tree; ``ENABLED = False``
builds every form at once and sends every error through the translator, so these tests
check that leaving the form for later changes no record, message or JSON byte."""

from __future__ import annotations

import importlib.util
import json
import random
from fractions import Fraction
from pathlib import Path

import pytest
import sympy
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from worksheet import cli
from worksheet.engine import SheetEvaluator, fast_numeric, make_context, split_statements
from worksheet.engine.numeric import FLOAT
from worksheet.syntax import tree as t

SHEETS = sorted((Path(__file__).parents[2] / "sheets").glob("*.sheet.md"))
UNITS = ["m", "km", "s", "kg", "K", "eV", "m/s", "erg/s", "pc", "cm^2", "J", "W"]


def generated_sheet(seed: int = 12) -> str:
    """Plain givens and claims of many shapes, with failures and errors among them."""
    pick = random.Random(seed)
    lines = [
        "x0 = 1.5 [m]",
        "y0 = x0*2/(3 [s])",
        "check y0 > 0 [m/s]",
        "check y0 < 0 [m/s]",
        "check x0 > 3 [s]",  # dimension error, line and column
        "check 1.5 [m] == 150 [cm]",
        "check 1.5 [m] == 151 [cm]",
        "z = -2 [km]",
        "w = 0 [m]",
        "check -x0 < 0 [m]",
        "check -x0 > -0 [m]",
        "check nowhere > 0 [m]",
        "check 25 [degC] > 20 [degC]",
        "T0 = 25 [degC]",
        "q = 3 [M_sun]",
        "check q > 1 [M_sun]",
        "check x0 ~ 20 [m]",
        "check x0 == 1.6 [m] within 1%",
        "check x0 == 1.6 [m] within 0.2 [m]",
        "check x0 == 1.6 [m] within 1 [s]",
        "u = 7 [kg] +- 5%",
        "check u > 6 [kg]",
        "v = [kg] in [g]",
        "p = 3",
        "check p >= 3",
        "big = 1e400 [m]",
        "tiny = 1e-320 [m]",
        "check 2 [m/s] > 0",
        "check 3 [m] + 1 [s] > 0 [m]",
    ]
    for k in range(60):
        unit = pick.choice(UNITS)
        number = f"{pick.uniform(-9, 9):.4f}e{pick.randint(-30, 30)}"
        lines.append(f"g{k} = {number} [{unit}]")
        other = pick.choice(UNITS)
        op = pick.choice(["<", ">", "<=", ">=", "==", "~"])
        lines.append(f"check g{k} {op} {pick.uniform(0, 9):.3f}e{pick.randint(-30, 30)} [{other}]")
        lines.append(f"show{k} = g{k} in [{unit}]")
    body = "\n".join(lines)
    return (
        "---\ntitle: Fast path comparison\nconstants: CODATA2018\ndigits: 4\n---\n\n"
        f"```calc\n{body}\n```\n"
    )


def outcome(path: Path, capsys: pytest.CaptureFixture[str]) -> tuple:
    run = cli._run_document(str(path))
    records = [(r.line, r.status, r.record, r.message, r.to_json()) for r in run.results]
    code = cli.main(["check", "--json", str(path)])
    printed = json.loads(capsys.readouterr().out)
    return records, code, printed


def both_paths(path: Path, capsys, monkeypatch) -> tuple[tuple, tuple]:
    fast = outcome(path, capsys)
    monkeypatch.setattr(fast_numeric, "ENABLED", False)
    slow = outcome(path, capsys)
    monkeypatch.setattr(fast_numeric, "ENABLED", True)
    return fast, slow


@pytest.mark.parametrize("sheet", SHEETS, ids=lambda p: p.name)
def test_issue12_fast_path_records_demo_sheets_as_the_sympy_path(sheet, capsys, monkeypatch):
    fast, slow = both_paths(sheet, capsys, monkeypatch)
    assert fast == slow
    assert fast[1] == 0  # every demo sheet checks clean


def test_issue12_fast_path_records_generated_sheet_as_the_sympy_path(tmp_path, capsys, monkeypatch):
    path = tmp_path / "generated.sheet.md"
    path.write_text(generated_sheet(), encoding="utf-8")
    fast, slow = both_paths(path, capsys, monkeypatch)
    assert fast == slow
    messages = [message for _, _, _, message, _ in fast[0] if message]
    assert any("line 12, col 7: cannot compare length" in m for m in messages), messages
    assert any(r[1] == "failed" for r in fast[0])


def test_issue12_fast_path_is_taken_and_symbolic_is_lazy(tmp_path, capsys, monkeypatch):
    calls = []
    real = fast_numeric.fast_quantity

    def counting(*args, **kwargs):
        quantity = real(*args, **kwargs)
        calls.append(quantity is not None)
        return quantity

    monkeypatch.setattr(fast_numeric, "fast_quantity", counting)
    path = tmp_path / "plain.sheet.md"
    path.write_text("```calc\nx = 1.5 [m]\ncheck x > 1 [m]\n```\n", encoding="utf-8")
    run = cli._run_document(str(path))
    assert calls == [True, True, True]
    given = run.results[0]
    assert isinstance(given.form, fast_numeric.LazyForm)
    assert given.symbolic == "3*[m]/2"  # as the sympy path prints it


@given(
    st.fractions(max_denominator=10**40)
    | st.builds(Fraction, st.integers(-(10**400), 10**400), st.integers(1, 10**30))
)
def test_issue12_walk_numbers_are_the_doubles_of_sympy_rationals(value) -> None:
    node = t.Number(line=1, column=1, value=value, literal=str(value))
    try:
        walked = fast_numeric._double(node.value)
    except OverflowError:
        walked = None  # the walk gives up; the sympy path says what it gives
    if walked is not None:
        assert walked == FLOAT.number(sympy.Rational(value.numerator, value.denominator))


_grammar_spec = importlib.util.spec_from_file_location(
    "statement_grammar", Path(__file__).with_name("statement_grammar.py")
)
assert _grammar_spec is not None and _grammar_spec.loader is not None
grammar = importlib.util.module_from_spec(_grammar_spec)
_grammar_spec.loader.exec_module(grammar)


def _records(body: str) -> list[tuple]:
    context = make_context("CODATA2022", digits=4, seconds=1.0)
    try:
        results = SheetEvaluator(context).run(split_statements(body, 1))
        return [(r.line, r.status, r.record, r.message, r.to_json()) for r in results]
    finally:
        context.worker.close()


@settings(max_examples=120, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(grammar.STATEMENTS)
def test_issue12_lazy_and_eager_paths_agree_on_hostile_statements(statement: str) -> None:
    """A line the walk takes must record what the translator-first path records, errors
    included (the walk gives up wherever the translator would refuse)."""
    body = grammar.sheet_body(statement)
    lazy = _records(body)
    fast_numeric.ENABLED = False
    try:
        eager = _records(body)
    finally:
        fast_numeric.ENABLED = True
    assert lazy == eager
