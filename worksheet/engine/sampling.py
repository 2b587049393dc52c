"""Ranged inputs carried by sampling: samples of each quantity, claims over them, shares.

A quantity is *sampled* when a ranged input (``a .. b log``, ``a .. b lin``,
``x within factor F``) lies among its inputs; givens with a stated ``+-`` that it also
reads are then drawn as normals. Each binding's samples are computed once, from its own
expression (names as symbols) on the samples of what it reads, by the same numpy tree walk
the sweeps use, so a chain costs about one array operation per node. A quantity with no
ranged input is recorded exactly as without this module. Constants are held at their
values: their standard uncertainties are orders of magnitude below any ranged input, and
first-order propagation still reports them where no range is involved.
"""

from __future__ import annotations

import collections
import dataclasses
import math
import weakref
from collections.abc import Mapping
from dataclasses import dataclass
from typing import TYPE_CHECKING, Any

import sympy

from worksheet.engine.bindings import Binding, Origin, symbol_for
from worksheet.engine.distributions import SampledSummary, Spread, summarize, text_histogram
from worksheet.engine.figures import SymbolValues
from worksheet.engine.formatting import format_number
from worksheet.engine.numeric import MissingValue, evaluate, numpy_backend
from worksheet.engine.results import StatementResult
from worksheet.engine.translate import describe
from worksheet.errors import DimensionError, EvaluationError, NameResolutionError
from worksheet.syntax import tree as t

if TYPE_CHECKING:
    from worksheet.engine.context import Context
    from worksheet.engine.statements import Quantity, StatementEvaluator

_SAMPLES: weakref.WeakKeyDictionary[Binding, Any] = weakref.WeakKeyDictionary()
_STATED: weakref.WeakKeyDictionary[Binding, str] = weakref.WeakKeyDictionary()
"""A ranged given's distribution in the words and unit of its own record."""

FIRST_ORDER_TOLERANCE = 0.1
"""First order is used for the variance shares when its total is within 10% of the
samples' variance; otherwise the shares come from the samples."""

MAX_SAMPLE_BYTES = 2 * 1024**3
"""Samples held at once (every sampled quantity keeps its own array) are capped here, so a
long sheet with a large ``samples`` stops with a message instead of exhausting memory."""

SHARE_BINS = 50
"""Rank bins for the correlation ratio Var(E[Y | X_i]) / Var(Y) estimated from samples."""


# --- which bindings are sampled -------------------------------------------------------------


def _deps(binding: Binding) -> list[Binding]:
    resolve = binding._resolver
    if resolve is None or binding.origin not in (Origin.DERIVED, Origin.ESTIMATE):
        return []
    found = (resolve(name) for name in binding.deps)
    return [dep for dep in found if dep is not None and dep.origin is not Origin.CONSTANT]


def _is_independent(binding: Binding) -> bool:
    """A value whose own statement says how uncertain it is (a range, a factor, a ``+-``)."""
    return binding.spread is not None or bool(binding.input_uncertainty)


def is_ranged(binding: Binding) -> bool:
    """Whether a ranged input is among the binding's inputs (then it is recorded sampled)."""
    if binding.spread is not None:
        return True
    if binding.input_uncertainty:
        return False  # a stated '+-' makes it an independent normal input
    memo = binding._memo
    cached = memo.get("ranged")
    if cached is None:
        cached = memo["ranged"] = any(is_ranged(dep) for dep in _deps(binding))
    return cached


def is_random(binding: Binding) -> bool:
    """Whether the binding varies from sample to sample (ranged, or a ``+-`` among its inputs)."""
    if _is_independent(binding):
        return True
    memo = binding._memo
    cached = memo.get("random")
    if cached is None:
        cached = memo["random"] = any(is_random(dep) for dep in _deps(binding))
    return cached


def expression_ranged(expr: sympy.Expr, values: Mapping[sympy.Symbol, Binding]) -> bool:
    return any(
        is_ranged(binding)
        for symbol in expr.free_symbols
        if (binding := values.get(symbol)) is not None
    )


def independent_inputs(bindings: list[Binding]) -> list[Binding]:
    """The ranged and ``+-`` inputs behind some bindings, in reading order."""
    seen: dict[int, Binding] = {}
    stack = list(bindings)
    while stack:
        binding = stack.pop()
        if id(binding) in seen:
            continue
        if _is_independent(binding):
            seen[id(binding)] = binding
            continue
        seen[id(binding)] = binding
        stack.extend(_deps(binding))
    found = [b for b in seen.values() if _is_independent(b)]
    return sorted(found, key=lambda b: (b.line or 0, b.name))


# --- samples --------------------------------------------------------------------------------


def samples_of(binding: Binding, ctx: Context, values: Mapping[sympy.Symbol, Binding]) -> Any:
    """The binding's samples in SI (an array of ``ctx.samples``), or None when it is fixed."""
    cached = _SAMPLES.get(binding)
    if cached is not None:
        return cached
    if (len(_SAMPLES) + 1) * ctx.samples * 8 > MAX_SAMPLE_BYTES:
        raise EvaluationError(
            f"sampling {binding.name} would hold more than {MAX_SAMPLE_BYTES // 1024**3} GiB "
            f"of samples; lower 'samples' in the front matter (now {ctx.samples})"
        )
    if binding.spread is not None:
        drawn = binding.spread.draw(ctx.samples, ctx.seed, binding.name)
    elif binding.input_uncertainty and binding.value is not None:
        spread = Spread("normal", center=binding.value, width=binding.input_uncertainty)
        drawn = spread.draw(ctx.samples, ctx.seed, binding.name)
    elif is_random(binding) and binding.local is not None:
        drawn = expression_samples(binding.local_expr(), ctx, values)
    else:
        return None
    drawn.setflags(write=False)
    _SAMPLES[binding] = drawn
    return drawn


def expression_samples(
    expr: sympy.Expr, ctx: Context, values: Mapping[sympy.Symbol, Binding]
) -> Any:
    """``expr`` on the samples of every random name it reads (other names at their values)."""
    np = numpy_backend().np
    arrays: dict[sympy.Symbol, Any] = {}
    for symbol in expr.free_symbols:
        binding = values.get(symbol)
        if binding is not None and is_random(binding):
            drawn = samples_of(binding, ctx, values)
            if drawn is not None:
                arrays[symbol] = drawn
    mapping = collections.ChainMap(arrays, SymbolValues(values, ctx, "float"))
    try:
        with np.errstate(all="ignore"):
            result = evaluate(expr, mapping, numpy_backend())  # type: ignore[arg-type]
    except MissingValue as err:
        raise EvaluationError(f"'{err.symbol.name}' has no value, so it cannot be sampled") from err
    if isinstance(result, np.ndarray) and result.shape == (ctx.samples,):
        return result if result.dtype == float else result.astype(float)
    return np.array(np.broadcast_to(np.asarray(result, dtype=float), (ctx.samples,)))


# --- records ------------------------------------------------------------------------------


def _shown(samples: Any, factor: float, offset: float) -> Any:
    if factor == 1.0 and offset == 0.0:
        return samples
    return (samples - offset) / factor


def _not_finite_note(summary: SampledSummary) -> str:
    if not summary.not_finite:
        return ""
    return f"; {summary.not_finite} of {summary.count} samples not finite, left out"


def sampled_record(
    head: str, summary: SampledSummary, unit: str, digits: int, note: str
) -> tuple[str, str]:
    """The recorded line and the message of a sampled quantity."""
    if not math.isfinite(summary.median):
        raise EvaluationError(
            f"{head}: none of the {summary.count} samples is a finite number "
            "(overflow, or outside a function's domain, in every sample)"
        )
    median = format_number(summary.median, digits) + (f" {unit}" if unit else "")
    note += _not_finite_note(summary)
    tail = summary.record_tail(digits)
    return f"{head} = {median}{tail} ({note})", f"{tail.removeprefix(', ')}; {note}"


def sampled_result(
    ev: StatementEvaluator,
    base: StatementResult,
    head: str,
    samples: Any,
    unit_info: tuple[str, float, float],
    stated: str | None = None,
) -> StatementResult:
    """A definition's or display's result recorded from its samples instead of one value.

    ``stated`` is a ranged given's distribution in words (its record names it)."""
    unit, factor, offset = unit_info
    summary = summarize(head, unit, _shown(samples, factor, offset))
    note = stated or f"median of {ev.ctx.samples} samples"
    record, message = sampled_record(head, summary, unit, ev.ctx.digits, note)
    median_si = summary.median * factor + offset
    return dataclasses.replace(
        base,
        value=summary.median,
        si_value=median_si,
        uncertainty=None,
        record=record,
        message=message,
        sampled=dataclasses.replace(summary, input=stated),
    )


def ranged_definition(
    ev: StatementEvaluator, stmt: t.Definition
) -> tuple[StatementResult, Binding | None]:
    """``rate = 1e-3 .. 1e-1 [1/(pc^3*yr)] log`` or ``eff = 0.3 within factor 3``."""
    ranged = stmt.ranged
    assert ranged is not None
    ev._refuse_constant_name(stmt.name, stmt)
    tr = ev.translator()
    low = ev.quantity(tr, stmt.expr)
    if low.si is None:
        raise EvaluationError("a ranged input needs numbers, not symbols", stmt.line)
    dim = low.typed.dim
    shown_from: Quantity = low
    if ranged.shape in ("log", "lin"):
        assert ranged.high is not None
        high = ev.quantity(tr, ranged.high)
        if high.typed.dim != dim:
            raise DimensionError(
                f"the ends of the range differ: {describe(stmt.expr, low.typed)} and "
                f"{describe(ranged.high, high.typed)}",
                ranged.line,
                ranged.column,
            )
        if high.si is None:
            raise EvaluationError("a ranged input needs numbers, not symbols", stmt.line)
        if not low.si < high.si:
            raise EvaluationError(
                "the low end of a range comes first and must be below the high end",
                ranged.line,
                ranged.column,
            )
        if ranged.shape == "log" and low.si <= 0:
            raise EvaluationError(
                "a log range needs two positive ends (use 'lin' for a range through zero)",
                ranged.line,
                ranged.column,
            )
        shape = "log-uniform" if ranged.shape == "log" else "uniform"
        spread = Spread(shape, low=low.si, high=high.si)
        shown_from = high if high.lone_unit is not None else low
    else:
        assert ranged.factor is not None
        if low.si <= 0:
            raise EvaluationError(
                "'within factor F' needs a positive value (a log-normal is positive)", stmt.line
            )
        spread = Spread("log-normal", center=low.si, width=float(ranged.factor))
    unit, factor, offset = ev.output_unit(shown_from, stmt.conversion, stmt)
    value = spread.median
    binding = Binding(
        name=stmt.name,
        origin=Origin.GIVEN,
        symbol=symbol_for(stmt.name, value),
        dimension=dim,
        line=stmt.line,
        deps=tuple(dict.fromkeys(tr.used)),
        value=value,
        gradient={stmt.name: 1.0},
        spread=spread,
        _resolver=ev.lookup,
    )
    samples = samples_of(binding, ev.ctx, ev.values)
    digits = ev.ctx.digits

    def show(si: float) -> str:
        return format_number((si - offset) / factor, digits)

    stated = spread.describe(show, unit)
    _STATED[binding] = stated

    base = StatementResult(
        stmt.line,
        "definition",
        stmt.source,
        "ok",
        name=stmt.name,
        unit=unit,
        si_unit=dim.base_units(),
        dimension=dim.name(),
    )
    result = sampled_result(ev, base, stmt.name, samples, (unit, factor, offset), stated)
    return result, binding


# --- claims over samples --------------------------------------------------------------------


def sampled_check(ev: StatementEvaluator, stmt: t.Check) -> StatementResult:
    """``check X > 1e3 [..] in 95%``: the claim holds in at least that share of the samples."""
    assert stmt.fraction is not None
    np = numpy_backend().np
    tr = ev.translator()
    left = ev.quantity(tr, stmt.left)
    right = ev.quantity(tr, stmt.right)
    if left.typed.dim != right.typed.dim:
        raise DimensionError(
            f"cannot compare {describe(stmt.left, left.typed)} with "
            f"{describe(stmt.right, right.typed)}",
            stmt.left.line,
            stmt.left.column,
        )
    if not (
        expression_ranged(left.typed.expr, ev.values)
        or expression_ranged(right.typed.expr, ev.values)
    ):
        raise EvaluationError(
            f"'in {_percent(float(stmt.fraction))}' claims a share of the samples, but neither "
            "side depends on a ranged input",
            stmt.line,
            stmt.column,
        )
    a = expression_samples(left.typed.expr, ev.ctx, ev.values)
    b = expression_samples(right.typed.expr, ev.ctx, ev.values)
    with np.errstate(all="ignore"):
        if stmt.op == "~":
            hits = np.abs(np.log10(a / b)) <= 0.5
        elif stmt.op == "==":
            if stmt.absolute_tolerance is not None:
                raise EvaluationError(
                    "a claim over samples takes a relative 'within' only", stmt.line
                )
            if stmt.tolerance is None:
                raise EvaluationError(
                    "'==' over samples needs a tolerance, as in 'within 10%'", stmt.line
                )
            hits = np.abs(a - b) <= float(stmt.tolerance) * np.maximum(np.abs(a), np.abs(b))
        else:
            compare = {"<": np.less, "<=": np.less_equal, ">": np.greater, ">=": np.greater_equal}
            hits = compare[stmt.op](a, b)
    count = int(np.count_nonzero(hits & np.isfinite(a) & np.isfinite(b)))
    share = count / ev.ctx.samples
    holds = count >= float(stmt.fraction) * ev.ctx.samples
    detail = f"in {_percent(share)} of {ev.ctx.samples} samples"
    if not holds:
        detail += f"; at least {_percent(float(stmt.fraction))} claimed"
    word = "holds" if holds else "fails"
    return StatementResult(
        stmt.line,
        "check",
        stmt.source,
        "ok" if holds else "failed",
        dimension=left.typed.dim.name(),
        value=share,
        message=detail,
        record=f"{stmt.source}: {word} ({detail})",
    )


def _percent(share: float) -> str:
    text = f"{share * 100:.2f}".rstrip("0").rstrip(".")
    return f"{text}%"


# --- the variance budget --------------------------------------------------------------------


@dataclass(frozen=True)
class ShareRow:
    name: str
    share: float  # of the variance, 0..1
    input: str  # the input's distribution in words


@dataclass(frozen=True)
class VarianceBudget:
    """Each input's share of the variance of one sampled quantity (of its log10 when
    positive), to first order when first order reproduces the samples' variance, else
    estimated from the samples as correlation ratios."""

    name: str
    space: str  # 'log10' or 'linear'
    variance: float  # of the samples, in that space
    first_order: float  # the first-order total
    method: str  # 'first order' or 'samples'
    rows: tuple[ShareRow, ...]
    remainder: float | None  # interactions and higher order (samples method only)

    def to_json(self) -> dict[str, Any]:
        return {
            "name": self.name,
            "space": self.space,
            "variance": self.variance,
            "first_order": self.first_order,
            "method": self.method,
            "rows": [vars(row) for row in self.rows],
            "remainder": self.remainder,
        }


def _target(ev: StatementEvaluator, name: str, stmt: t.Statement, what: str) -> Binding:
    binding = ev.lookup(name)
    if binding is None or binding.origin in (Origin.RELATION, Origin.CONSTANT):
        raise NameResolutionError(
            f"{what}: '{name}' must be a quantity defined above", stmt.line, stmt.column
        )
    if not is_ranged(binding):
        raise EvaluationError(
            f"{what}: '{name}' has no ranged input, so it has no samples "
            "(give an input as 'a .. b log', 'a .. b lin' or 'x within factor F')",
            stmt.line,
            stmt.column,
        )
    return binding


def _input_words(binding: Binding, digits: int) -> str:
    stated = _STATED.get(binding)
    if stated is not None:
        return stated
    if binding.spread is not None:
        return binding.spread.describe(
            lambda si: format_number(si, digits), binding.dimension.si_unit()
        )
    unit = binding.dimension.si_unit()
    spread = format_number(binding.input_uncertainty or 0.0, 2)
    return f"normal, +- {spread}" + (f" {unit}" if unit else "")


def variance_budget(ev: StatementEvaluator, stmt: t.Variance) -> VarianceBudget:
    np = numpy_backend().np
    target = _target(ev, stmt.target, stmt, "variance")
    y = samples_of(target, ev.ctx, ev.values)
    inputs = independent_inputs([target])
    xs = [samples_of(b, ev.ctx, ev.values) for b in inputs]
    finite = np.isfinite(y)
    for x in xs:
        finite &= np.isfinite(x)
    y = y[finite]
    xs = [x[finite] for x in xs]
    if y.size < 2 or target.value is None:
        raise EvaluationError(f"variance: {stmt.target} has too few finite samples", stmt.line)
    log_space = bool(np.all(y > 0)) and target.value > 0
    transformed = np.log10(y) if log_space else y
    variance = float(np.var(transformed))
    if variance == 0:
        raise EvaluationError(f"variance: {stmt.target} does not vary", stmt.line)
    linear_parts = []
    for binding, x in zip(inputs, xs, strict=True):
        slope = target.gradient.get(binding.name, 0.0)
        input_log = bool(np.all(x > 0)) and (binding.value or 0) > 0
        if log_space:
            slope /= target.value * math.log(10)
        if input_log:
            assert binding.value is not None
            slope *= binding.value * math.log(10)
        spread = float(np.var(np.log10(x) if input_log else x))
        linear_parts.append(slope * slope * spread)
    first_order = math.fsum(linear_parts)
    if first_order > 0 and abs(first_order / variance - 1) <= FIRST_ORDER_TOLERANCE:
        shares = [part / first_order for part in linear_parts]
        method, remainder = "first order", None
    else:
        shares = [_correlation_ratio(x, transformed, variance) for x in xs]
        method, remainder = "samples", 1.0 - math.fsum(shares)
    digits = ev.ctx.digits
    rows = tuple(
        ShareRow(binding.name, share, _input_words(binding, digits))
        for binding, share in zip(inputs, shares, strict=True)
    )
    return VarianceBudget(
        stmt.target,
        "log10" if log_space else "linear",
        variance,
        first_order,
        method,
        rows,
        remainder,
    )


def _correlation_ratio(x: Any, y: Any, variance: float) -> float:
    """Var(E[y | x]) / Var(y) from samples: y's mean in rank bins of x.

    The given-data estimator of the first-order sensitivity index (Saltelli et al., Global
    Sensitivity Analysis: The Primer, Wiley 2008, ch. 4; Plischke, Reliab. Eng. Syst.
    Saf. 95 (2010) 354).
    """
    np = numpy_backend().np
    # Distinct values have one sorted order, which the fast sort finds (several times
    # quicker than the stable one); only ties need the stable sort to order them the same
    # way on every machine.
    order = np.argsort(x)
    ordered = x[order]
    if np.any(ordered[1:] == ordered[:-1]):
        order = np.argsort(x, kind="stable")
    mean = float(np.mean(y))
    total = 0.0
    for group in np.array_split(y[order], SHARE_BINS):
        total += group.size * (float(np.mean(group)) - mean) ** 2
    return total / (y.size * variance)


def budget_lines(budget: VarianceBudget, source: str, digits: int) -> list[str]:
    quantity = f"log10 {budget.name}" if budget.space == "log10" else budget.name
    if budget.method == "first order":
        off = abs(budget.first_order / budget.variance - 1) * 100
        how = f"shares to first order, which is within {off:.1f}% of it"
    else:
        if budget.first_order > 0:
            off = abs(budget.first_order / budget.variance - 1) * 100
            why = f"first order is off by {off:.0f}%"
        else:
            why = "first order gives nothing"
        how = f"{why}, so the shares are from the samples ({SHARE_BINS} bins)"
    head = f"{source}: var({quantity}) = {format_number(budget.variance, digits)}; {how}"
    names = [row.name for row in budget.rows]
    if budget.remainder is not None:
        names.append("(interactions)")
    width = max(len("input"), *(len(n) for n in names))
    lines = [head, f"  {'input'.ljust(width)}  share   distribution"]
    for row in budget.rows:
        lines.append(f"  {row.name.ljust(width)}  {row.share * 100:5.1f}%  {row.input}")
    if budget.remainder is not None:
        lines.append(f"  {'(interactions)'.ljust(width)}  {budget.remainder * 100:5.1f}%")
    return lines


def evaluate_variance(ev: StatementEvaluator, stmt: t.Variance) -> StatementResult:
    budget = variance_budget(ev, stmt)
    return StatementResult(
        stmt.line,
        "variance",
        stmt.source,
        "ok",
        name=None,
        record="\n".join(budget_lines(budget, stmt.source, ev.ctx.digits)),
        sampled=budget,
    )


def evaluate_histogram(ev: StatementEvaluator, stmt: t.Histogram) -> StatementResult:
    target = _target(ev, stmt.target, stmt, "histogram")
    samples = samples_of(target, ev.ctx, ev.values)
    unit, factor, offset = target.dimension.si_unit(), 1.0, 0.0
    if stmt.unit is not None:
        resolved = ev.ctx.registry.resolve(stmt.unit, stmt.line, stmt.column)
        if resolved.dimension != target.dimension:
            raise DimensionError(
                f"cannot express {stmt.target}, {target.dimension.name()} "
                f"({target.dimension.si_unit() or '1'}), in [{stmt.unit.source}]",
                stmt.line,
                stmt.column,
            )
        unit, factor, offset = stmt.unit.source, resolved.factor, resolved.offset
    summary = summarize(stmt.target, unit, _shown(samples, factor, offset))
    if summary.histogram is None:
        raise EvaluationError(f"histogram: {stmt.target} has no finite samples", stmt.line)
    lines = [f"{stmt.source}:", *text_histogram(summary.histogram)]
    if summary.not_finite:
        lines.append(f"  ({summary.not_finite} of {summary.count} samples not finite, left out)")
    return StatementResult(
        stmt.line,
        "histogram",
        stmt.source,
        "ok",
        name=None,
        value=summary.median,
        unit=unit,
        record="\n".join(lines),
        sampled=summary,
    )
