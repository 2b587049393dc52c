"""The parsed-tree walk gives the numbers the sympy walk gives, to rounding.

The two multiply in different orders (written order vs sympy's canonical order, with exact
coefficients folded), so they may differ in the last bits; each operation is one correctly
rounded step, so an expression of n operations may differ by a few n units in the last
place. The uncertainties are first-order sums of the same partials.
"""

from __future__ import annotations

import math

import pytest
import sympy
from hypothesis import given, settings
from hypothesis import strategies as st

from worksheet.engine import SheetEvaluator, SourceStatement, fast_numeric, make_context
from worksheet.engine.results import built

GIVENS = [
    "a = 1.7e3 [m] +- 2%",
    "b = -3.2e-5 [s]",
    "M = 5e11 [kg]",
    "q = 2.5 [M_sun]",
    "n = 7 +- 0.5",
]
ATOMS = ["a", "b", "M", "q", "n", "G", "c", "hbar", "k_B", "pi", "2", "3.5", "1e-3", "7/3"]
ATOMS += ["[km]", "(1 [M_sun])", "(0.5 [pc])", "(2 [eV])", "(4 [s])"]


def expressions() -> st.SearchStrategy[str]:
    atoms = st.sampled_from(ATOMS)

    def extend(inner: st.SearchStrategy[str]) -> st.SearchStrategy[str]:
        return st.one_of(
            st.tuples(inner, st.sampled_from(["*", "/"]), inner).map(
                lambda p: f"({p[0]}{p[1]}{p[2]})"
            ),
            st.tuples(inner, st.sampled_from(["2", "3", "-1", "-2", "1/2", "(-3/2)"])).map(
                lambda p: f"({p[0]})^{p[1]}"
            ),
            inner.map(lambda e: f"sqrt({e})"),
            inner.map(lambda e: f"(-{e})"),
        )

    return st.recursive(atoms, extend, max_leaves=10)


def last_result(expression: str):
    """The result of ``r = expression`` after the givens, on one path."""
    lines = [*GIVENS, f"r = {expression}"]
    evaluator = SheetEvaluator(make_context())
    try:
        return evaluator.run([SourceStatement(k + 1, text) for k, text in enumerate(lines)])[-1]
    finally:
        evaluator.ctx.worker.close()


def sympy_order_result(expression: str, monkeypatch: pytest.MonkeyPatch):
    """The same statement with the walk switched off: numbers from the sympy walk."""
    with monkeypatch.context() as patch:
        patch.setattr(fast_numeric, "ENABLED", False)
        patch.setattr(fast_numeric, "walk_quantity", lambda evaluator, node: None)
        return last_result(expression)


def both_walks(expression: str):
    """(the tree walk's result, the sympy walk's), after checking they agree on the
    status, and on the record where either has no value; None for the pair then."""
    monkeypatch = pytest.MonkeyPatch()
    try:
        walked = last_result(expression)
        reference = sympy_order_result(expression, monkeypatch)
    finally:
        monkeypatch.undo()
    assert walked.status == reference.status, (expression, walked.record, reference.record)
    if reference.si_value is None or walked.si_value is None:
        assert walked.record == reference.record
        return None
    assert walked.unit == reference.unit and walked.dimension == reference.dimension
    return walked, reference


def close(x: float, y: float, ulps: int) -> bool:
    return abs(x - y) <= ulps * 2.0**-52 * max(abs(x), abs(y))


@settings(max_examples=150, deadline=None)
@given(expressions())
def test_issue12_tree_walk_matches_the_sympy_walk(expression: str) -> None:
    pair = both_walks(expression)
    if pair is None:
        return
    walked, reference = pair
    operations = expression.count("*") + expression.count("/") + expression.count("^") + 8
    assert close(walked.si_value, reference.si_value, 4 * operations), (
        expression,
        walked.si_value,
        reference.si_value,
    )
    assert (walked.uncertainty is None) == (reference.uncertainty is None), expression
    if walked.uncertainty is not None:
        assert math.isclose(walked.uncertainty, reference.uncertainty, rel_tol=1e-9), expression


LENGTHS = ["a", "(3 [km])", "(c*b)", "(hbar/(M*c))", "(G*M/c^2)", "(0.5 [pc])", "(-a)"]
FACTORS = ["n", "2", "7/3", "pi", "sqrt(n)", "(n - 1)", "(1/n + 2)"]


def sums() -> st.SearchStrategy[str]:
    """Sums and differences of lengths scaled by dimensionless factors (one dimension)."""
    term = st.tuples(st.sampled_from(FACTORS), st.sampled_from(LENGTHS)).map(
        lambda p: f"{p[0]}*{p[1]}"
    )
    return st.lists(st.tuples(st.sampled_from(["+", "-"]), term), min_size=1, max_size=6).map(
        lambda parts: "".join(f" {op} {text}" for op, text in parts).lstrip(" +")
    )


@settings(max_examples=150, deadline=None)
@given(sums())
def test_issue12_tree_walk_matches_the_sympy_walk_on_sums(expression: str) -> None:
    """Sums take the walk too, and agree with the sympy walk to rounding."""
    pair = both_walks(expression)
    if pair is None:
        return
    walked, reference = pair
    # Both add the same terms correctly rounded; the terms themselves (products) may
    # differ in their last bits, and a sum with cancellation is the guard's (both paths
    # then take the sympy walk).
    assert math.isclose(walked.si_value, reference.si_value, rel_tol=1e-12), (
        expression,
        walked.si_value,
        reference.si_value,
    )


def watch_walk(monkeypatch: pytest.MonkeyPatch) -> list[bool]:
    """Whether each call of the walk covered its expression, in order."""
    calls: list[bool] = []
    real = fast_numeric.walk_quantity

    def watching(evaluator, node):
        result = real(evaluator, node)
        calls.append(result is not None)
        return result

    monkeypatch.setattr(fast_numeric, "walk_quantity", watching)
    return calls


def test_issue12_tree_walk_covers_the_hawking_temperature(monkeypatch) -> None:
    """The plainest derivation line takes the walk and builds no sympy form until printed."""
    calls = watch_walk(monkeypatch)
    result = last_result("hbar*c^3/(8*pi*G*M*k_B)")
    assert calls[-1] is True
    assert isinstance(result.form, fast_numeric.LazyForm)
    assert result.symbolic == "c^3*hbar/(8*pi*G*M*k_B)"
    # T_H = hbar c^3 / (8 pi G M k_B) (Hawking 1975); scipy.constants' CODATA 2018 values,
    # the dataset this context pins, for M = 5e11 kg.
    from scipy import constants as sc

    expected = sc.hbar * sc.c**3 / (8 * math.pi * sc.G * 5e11 * sc.k)
    assert math.isclose(result.si_value, expected, rel_tol=1e-12)


def test_issue12_lazy_form_survives_an_edit_that_removes_its_name() -> None:
    """A result keeps its own form after an edit removes the name it read (the app prints
    forms of results it holds, after later runs)."""
    evaluator = SheetEvaluator(make_context())
    try:
        first = evaluator.run([SourceStatement(1, "x = 2 [m]"), SourceStatement(2, "y = x*3")])
        second = evaluator.run([SourceStatement(1, "w = 2 [m]"), SourceStatement(2, "y = x*3")])
    finally:
        evaluator.ctx.worker.close()
    assert second[1].status == "error"
    assert isinstance(first[1].form, fast_numeric.LazyForm)
    assert first[1].si_value == 6.0 and first[1].symbolic == "3*x"


def test_issue12_lazy_form_reads_the_bindings_the_line_saw() -> None:
    """An incremental run rebinds x in place (same name, new value); the earlier result's
    form, printed afterwards, still means the x it was computed from, whose sign made
    its symbol positive."""
    evaluator = SheetEvaluator(make_context())
    try:
        first = evaluator.run([SourceStatement(1, "x = 2 [m]"), SourceStatement(2, "y = x*3")])
        second = evaluator.run([SourceStatement(1, "x = -5 [m]"), SourceStatement(2, "y = x*3")])
    finally:
        evaluator.ctx.worker.close()
    assert second[1].si_value == -15.0
    assert isinstance(first[1].form, fast_numeric.LazyForm)
    symbols = built(first[1].form).free_symbols
    assert sympy.Symbol("x", positive=True) in symbols
    assert sympy.Symbol("x", negative=True) not in symbols


def test_issue12_many_edits_keep_the_parse_cache_bounded() -> None:
    """Each edit parses a new text; an app session of thousands of edits must not keep
    them all."""
    evaluator = SheetEvaluator(make_context())
    given_line = SourceStatement(1, "M = 5e11 [kg]")
    try:
        for k in range(3000):
            evaluator.run([given_line, SourceStatement(2, f"r = 2*G*M/c^2  # edit {k}")])
    finally:
        evaluator.ctx.worker.close()
    assert len(evaluator._parse_cache) <= 4 * 2 + 1000 + 1


def test_issue12_a_sum_that_cancels_is_left_to_the_guard_of_the_sympy_path(monkeypatch) -> None:
    """x + y - 0.3 with x = 0.1, y = 0.2 leaves 5.6e-17 in doubles, but about 2.8e-17 with
    the literal 0.3 exact: the walk's 50-digit check sees the disagreement and hands the
    line to the sympy path, which records the loss. A plain sum takes the walk."""
    lines = ["x = 0.1", "y = 0.2", "r = x + y - 0.3", "s = x + 2*x - y"]
    walked = watch_walk(monkeypatch)
    evaluator = SheetEvaluator(make_context())
    try:
        results = evaluator.run([SourceStatement(k + 1, text) for k, text in enumerate(lines)])
    finally:
        evaluator.ctx.worker.close()
    assert walked[2] is False
    assert results[2].precision is not None and "rounding error" in results[2].precision
    assert walked[3] is True
    assert results[3].si_value == math.fsum([0.1, 2 * 0.1, -0.2])
