"""Issue 13: ranged inputs, seeded sampling, intervals, claims over samples, variance shares.

Analytic references:
- log-normal quantiles x_p = m * exp(sigma * z_p) (Johnson, Kotz and Balakrishnan,
  Continuous Univariate Distributions, vol. 1, 2nd ed., Wiley 1994, ch. 14), z_p from
  scipy.stats.norm;
- the product of two log-uniforms on equal log widths w: its log is the sum of two
  independent uniforms, a triangular distribution on [L, L + 2w] with mode L + w (ibid.,
  vol. 2, 2nd ed., 1995, ch. 26, sums of uniform variables), quantiles
  L + w sqrt(2p) below the median and L + 2w - w sqrt(2(1 - p)) above it; checked against
  scipy.stats.triang too;
- the standard error of a sample p-quantile, sqrt(p (1 - p) / N) / f(x_p) (the asymptotic
  normality of sample quantiles: Cramer, Mathematical Methods of Statistics, 1946, 28.5).
"""

from __future__ import annotations

import math

import numpy as np
import pytest
import scipy.stats as st
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st_h

from worksheet.engine import make_context
from worksheet.engine.distributions import Spread, summarize
from worksheet.errors import ParseError
from worksheet.runner import run_text
from worksheet.syntax import parse_statement
from worksheet.syntax import tree as t

HEAD = """---
title: sampling test
constants: CODATA2022
digits: 4
seed: 20261202
samples: {samples}
---

```calc
{body}
```
"""


def run_body(body: str, samples: int = 100_000):
    return run_text(HEAD.format(samples=samples, body=body))


def by_name(run):
    return {r.name: r for r in run.results if r.name is not None}


# --- syntax ---------------------------------------------------------------------------------


def test_issue13_range_forms_parse():
    stmt = parse_statement("rho = 1e-3 .. 1e-1 [1/(pc^3*yr)] log")
    assert isinstance(stmt, t.Definition) and stmt.ranged is not None
    assert stmt.ranged.shape == "log"
    # The bare low end takes the high end's unit.
    assert isinstance(stmt.expr, t.BinOp) and isinstance(stmt.expr.right, t.Unit)
    assert parse_statement("f = 0.2 .. 0.8 lin").ranged.shape == "lin"
    factor = parse_statement("eff = 0.3 within factor 3").ranged
    assert factor.shape == "factor" and factor.factor == 3
    check = parse_statement("check N > 1 in 95%")
    assert isinstance(check, t.Check) and check.fraction == pytest.approx(0.95)
    assert isinstance(parse_statement("variance N"), t.Variance)
    hist = parse_statement("histogram N in [yr^-1]")
    assert isinstance(hist, t.Histogram) and hist.unit is not None


@pytest.mark.parametrize(
    ("text", "fragment"),
    [
        ("x = 1 .. 2", "'log' (log-uniform) or 'lin'"),
        ("x = 1 .. 2 log +- 10%", "takes no '+-'"),
        ("x = 2 within factor 1", "must be above 1"),
        ("x = 2 within 3", "within factor F"),
        ("check x > 1 in 150%", "at most 100%"),
        ("check x > 1 in 95", "share of samples"),
    ],
)
def test_issue13_bad_ranges_are_parse_errors(text, fragment):
    with pytest.raises(ParseError) as err:
        parse_statement(text)
    assert fragment in err.value.message


@pytest.mark.parametrize(
    ("body", "fragment"),
    [
        ("x = 3 .. 1 log", "must be below the high end"),
        ("x = -1 .. 1 log", "two positive ends"),
        ("x = 1 [m] .. 2 [s] log", "the ends of the range differ"),
        ("x = -2 within factor 3", "positive value"),
        ("x = 2 [m]\ncheck x > 1 [m] in 95%", "neither side depends on a ranged input"),
        ("x = 2 [m]\nvariance x", "has no ranged input"),
    ],
)
def test_issue13_bad_ranged_statements_are_recorded_errors(body, fragment):
    run = run_body(body, samples=1000)
    errors = [r for r in run.results if r.status == "error"]
    assert errors and fragment in errors[0].record
    assert errors[0].record.startswith("line ")


# --- distributions against analytic results --------------------------------------------------


def _quantile_error(p: float, density: float, n: int) -> float:
    return math.sqrt(p * (1 - p) / n) / density


def test_issue13_log_normal_intervals_match_the_analytic_quantiles():
    n = 100_000
    run = run_body("eff = 0.3 within factor 3", samples=n)
    summary = by_name(run)["eff"].sampled
    sigma = math.log(3.0)
    reference = st.lognorm(s=sigma, scale=0.3)
    checks = [(0.5, summary.median)]
    for interval, (lo, hi) in zip(summary.intervals, ((0.16, 0.84), (0.025, 0.975)), strict=True):
        checks += [(lo, interval.low), (hi, interval.high)]
    for p, sampled in checks:
        z = st.norm.ppf(p)
        analytic = 0.3 * math.exp(sigma * z)  # JKB vol. 1 ch. 14
        assert analytic == pytest.approx(reference.ppf(p), rel=1e-12)
        tolerance = 4 * _quantile_error(p, reference.pdf(analytic), n)
        assert abs(sampled - analytic) < tolerance, (p, sampled, analytic, tolerance)


def test_issue13_product_of_log_uniforms_is_triangular_in_log():
    n = 100_000
    run = run_body("a = 1e-3 .. 1e-1 log\nb = 10 .. 1000 log\nab = a*b", samples=n)
    summary = by_name(run)["ab"].sampled
    low, width = math.log(1e-3) + math.log(10), math.log(100)
    triangle = st.triang(c=0.5, loc=low, scale=2 * width)

    def analytic(p: float) -> float:
        if p <= 0.5:
            return low + width * math.sqrt(2 * p)
        return low + 2 * width - width * math.sqrt(2 * (1 - p))

    checks = [(0.5, summary.median)]
    for interval, (lo, hi) in zip(summary.intervals, ((0.16, 0.84), (0.025, 0.975)), strict=True):
        checks += [(lo, interval.low), (hi, interval.high)]
    for p, sampled in checks:
        assert analytic(p) == pytest.approx(triangle.ppf(p), rel=1e-12)
        tolerance = 4 * _quantile_error(p, triangle.pdf(analytic(p)), n)
        assert abs(math.log(sampled) - analytic(p)) < tolerance, (p, sampled)


def test_issue13_sampling_error_shrinks_as_one_over_sqrt_n():
    spread = Spread("log-uniform", low=1e-3, high=1e-1)
    truth = math.log(1e-2)
    rms = {}
    for n in (1_000, 100_000):
        errors = []
        for seed in range(24):
            median = summarize("x", "", spread.draw(n, seed, "x")).median
            errors.append(math.log(median) - truth)
        rms[n] = math.sqrt(sum(e * e for e in errors) / len(errors))
    # 100 times the samples: the error falls by sqrt(100) = 10 (24 seeds: within a factor 2).
    assert 5 < rms[1_000] / rms[100_000] < 20
    # And its size is the asymptotic one: sd of the median of ln x, uniform of width w.
    width = math.log(100)
    expected = _quantile_error(0.5, 1 / width, 100_000)
    assert 0.5 * expected < rms[100_000] < 2 * expected


def test_issue13_each_input_keeps_its_own_stream():
    one = by_name(run_body("a = 1 .. 10 log\nb = a*2", samples=2000))
    two = by_name(run_body("z = 5 .. 6 lin\na = 1 .. 10 log\nb = a*2", samples=2000))
    assert one["a"].record == two["a"].record
    assert one["b"].record == two["b"].record


def test_issue13_uniform_normal_and_factor_moments():
    n = 200_000
    for spread, mean, sd in [
        (Spread("uniform", low=2.0, high=5.0), 3.5, 3.0 / math.sqrt(12)),
        (Spread("normal", center=7.0, width=0.5), 7.0, 0.5),
    ]:
        x = spread.draw(n, 1, "x")
        assert abs(float(np.mean(x)) - mean) < 5 * sd / math.sqrt(n)
        assert float(np.std(x)) == pytest.approx(sd, rel=0.02)
    logs = np.log(Spread("log-normal", center=2.0, width=3.0).draw(n, 1, "x"))
    assert float(np.std(logs)) == pytest.approx(math.log(3.0), rel=0.02)


# --- records --------------------------------------------------------------------------------


def test_issue13_records_median_and_intervals_in_the_sheets_digits():
    run = run_body("rho = 1e-3 .. 1e-1 [1/(pc^3*yr)] log\nd = 10 [pc]\nn = rho*d^3 in [1/yr]")
    rho, n = by_name(run)["rho"], by_name(run)["n"]
    assert rho.record.startswith("rho = 0.0")
    assert "68%: " in rho.record and "95%: " in rho.record
    assert rho.record.endswith("(log-uniform 0.001000 .. 0.1000 1/(pc^3*yr))")
    assert n.record.startswith("n = ") and n.record.endswith("(median of 100000 samples)")
    assert " 1/yr, 68%: " in n.record
    assert n.sampled.intervals[0].low < n.sampled.median < n.sampled.intervals[0].high
    data = n.to_json()
    assert data["sampled"]["samples"] == 100000 and "uncertainty" not in data


def test_issue13_a_sheet_without_ranges_records_what_it_did(tmp_path):
    from pathlib import Path

    root = Path(__file__).resolve().parents[2]
    for name in ("burst-budget", "mass-ladder", "eddington-source"):
        text = (root / "sheets" / f"{name}.sheet.md").read_text(encoding="utf-8")
        run = run_text(text)
        assert run.text == text, name
        assert all(r.sampled is None for r in run.results)


def test_issue13_plus_minus_inputs_are_drawn_as_normals_next_to_ranges():
    run = by_name(run_body("A = 100 +- 10%\nk = 1 .. 1.000001 lin\nB = A*k"))
    assert run["A"].record == "A = 100.0 +- 10"  # its own record is unchanged
    summary = run["B"].sampled
    # B is about A: median 100, 68% within about one sigma (10).
    assert summary.median == pytest.approx(100, abs=0.2)
    assert summary.intervals[0].low == pytest.approx(100 - 9.945, abs=0.3)
    assert summary.intervals[1].high == pytest.approx(100 + 19.6, abs=0.5)


def test_issue13_non_finite_samples_are_counted_and_left_out():
    run = by_name(run_body("x = -1 .. 1 lin\ny = sqrt(x)", samples=10_000))
    assert "samples not finite, left out" in run["y"].record
    assert run["y"].sampled.not_finite > 4000


# --- claims ---------------------------------------------------------------------------------


def test_issue13_claims_over_samples_hold_or_fail_with_the_share():
    body = "x = 1 .. 100 log\ncheck x > 1.3 in 90%\ncheck x > 10 in 60%\ncheck x ~ 10 in 100%"
    run = run_body(body)
    checks = [r for r in run.results if r.kind == "check"]
    # P(x > 1.3) = 1 - log(1.3)/log(100) = 0.943; P(x > 10) = 0.5; '~': 10^[0.5, 1.5] = 0.5
    share_1 = 1 - math.log10(1.3) / 2
    assert checks[0].status == "ok" and checks[0].value == pytest.approx(share_1, abs=0.005)
    assert "holds (in 94." in checks[0].record
    assert checks[1].status == "failed" and checks[1].value == pytest.approx(0.5, abs=0.005)
    assert "at least 60% claimed" in checks[1].record
    assert checks[2].status == "failed" and checks[2].value == pytest.approx(0.5, abs=0.005)
    assert not run.all_hold


# --- the variance budget --------------------------------------------------------------------


def test_issue13_first_order_shares_of_a_product_are_the_log_variances():
    run = run_body("a = 1 .. 100 log\nb = 2 within factor 3\nq = a*b^2\nvariance q")
    budget = next(r for r in run.results if r.kind == "variance").sampled
    assert budget.space == "log10" and budget.method == "first order"
    var_a = (2.0) ** 2 / 12  # log10 of a log-uniform over two decades: width^2 / 12
    var_b = 4 * math.log10(3.0) ** 2  # b^2: twice the log10 sigma
    shares = {row.name: row.share for row in budget.rows}
    assert shares["a"] == pytest.approx(var_a / (var_a + var_b), abs=0.01)
    assert shares["b"] == pytest.approx(var_b / (var_a + var_b), abs=0.01)
    assert budget.variance == pytest.approx(var_a + var_b, rel=0.02)


def test_issue13_shares_come_from_the_samples_where_first_order_fails():
    run = run_body("x = -1 .. 1 lin\ny = 0.1 .. 0.2 lin\nz = x^2 + y\nvariance z")
    budget = next(r for r in run.results if r.kind == "variance").sampled
    # At x = 0 the slope of x^2 vanishes: first order sees only y.
    assert budget.method == "samples"
    shares = {row.name: row.share for row in budget.rows}
    assert shares["x"] > 0.5
    assert math.fsum(shares.values()) + budget.remainder == pytest.approx(1.0)
    record = next(r for r in run.results if r.kind == "variance").record
    assert "(interactions)" in record and "from the samples" in record


def test_issue13_histogram_counts_every_finite_sample_in_range():
    run = run_body("x = 1 .. 100 log\nhistogram x", samples=20_000)
    result = next(r for r in run.results if r.kind == "histogram")
    hist = result.sampled.histogram
    assert hist.scale == "log" and len(hist.edges) == len(hist.counts) + 1
    # Bins span the central 99.8%: they hold 99.8% of the samples.
    assert sum(hist.counts) == pytest.approx(0.998 * 20_000, abs=3)
    # Log-uniform: equal counts per log bin, within Poisson noise.
    mean = sum(hist.counts) / len(hist.counts)
    assert all(abs(c - mean) < 5 * math.sqrt(mean) for c in hist.counts)
    assert result.record.count("\n") == len(hist.counts) + 2


def test_issue13_front_matter_bounds():
    bad = HEAD.format(samples="ten", body="x = 1 .. 2 lin")
    with pytest.raises(Exception) as err:
        run_text(bad)
    assert "samples: ten" in str(err.value)
    tiny = HEAD.format(samples=5, body="x = 1 .. 2 lin")
    with pytest.raises(Exception) as err:
        run_text(tiny)
    assert "'samples' must be from 100" in str(err.value)


def test_issue13_context_defaults_are_reproducible():
    ctx = make_context("CODATA2022")
    assert (ctx.seed, ctx.samples) == (0, 100_000)
    ctx.worker.close()


# --- incremental runs and hostile input ------------------------------------------------------


def test_issue13_an_edit_resamples_only_what_it_changes():
    from worksheet.engine import SheetEvaluator, split_statements

    ctx = make_context("CODATA2022", digits=4, seed=5, samples=5000)
    body = "a = 1 .. 10 log\nb = 2 .. 3 lin\nq = a*b\nr = b^2\n"
    evaluator = SheetEvaluator(ctx)
    first = evaluator.run(split_statements(body, 1))
    edited = body.replace("a = 1 .. 10 log", "a = 1 .. 100 log")
    second = evaluator.run(split_statements(edited, 1))
    fresh = SheetEvaluator(ctx).run(split_statements(edited, 1))
    assert [r.record for r in second] == [r.record for r in fresh]
    assert second[0].record != first[0].record and second[2].record != first[2].record
    assert second[3] is first[3]  # r reads only b: kept, not recomputed
    ctx.worker.close()


RANGE_PIECES = [
    "x",
    "=",
    "1",
    "1e-3",
    "[m]",
    "..",
    "log",
    "lin",
    "within",
    "factor",
    "3",
    "+-",
    "20%",
    "in",
    "[km]",
    "-",
    "0",
    "check",
    ">",
    "95%",
    "variance",
    "histogram",
    "(",
    ")",
    "*",
]


@settings(max_examples=150, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(st_h.lists(st_h.sampled_from(RANGE_PIECES), min_size=1, max_size=12))
def test_issue13_range_syntax_fuzz_gives_a_result_or_a_located_error(pieces):
    text = " ".join(pieces)
    try:
        parse_statement(text)
    except ParseError as err:
        assert err.line is not None and err.message


def test_issue13_hostile_sheets_end_as_recorded_errors():
    body = "\n".join(
        [
            "x = 1e300 .. 1e308 log",
            "y = x*x*x",  # overflows to inf in every sample
            "z = 0 .. 0 lin",
            "w = 1 [m] within factor 1e400",
            "v = 1 .. 2 lin in [m]",
            "u = 3 .. 4 lin\ncheck u > 1 [m] in 50%",
        ]
    )
    run = run_body(body, samples=1000)
    records = [r.record for r in run.results]
    assert all(r.startswith("line ") for r in records[1:5] + records[6:])
    assert "none of the 1000 samples is a finite number" in records[1]
    assert "below the high end" in records[2]
    assert "at most 1e6" in records[3]
    assert "cannot express" in records[4]
    assert "cannot compare" in records[6]
