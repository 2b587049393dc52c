"""Evaluating one statement against the names defined above it."""

from __future__ import annotations

import math
from collections.abc import Callable, Mapping
from dataclasses import dataclass
from fractions import Fraction

import sympy

from worksheet.engine import fast_numeric
from worksheet.engine import symbolic_ops as ops
from worksheet.engine.bindings import Binding, Origin, symbol_for, unit_symbol
from worksheet.engine.context import Context
from worksheet.engine.estimate import Outcome, solve_exponents
from worksheet.engine.figures import (
    Figures,
    compute_figures,
    in_unit_uncertainty,
    relative_uncertainty_note,
    unit_g_power,
)
from worksheet.engine.formatting import (
    format_expr,
    format_number,
    format_precise,
    format_uncertainty,
)
from worksheet.engine.results import StatementResult
from worksheet.engine.sampling import (
    evaluate_histogram,
    evaluate_variance,
    expression_ranged,
    expression_samples,
    is_ranged,
    ranged_definition,
    sampled_check,
    sampled_result,
    samples_of,
)
from worksheet.engine.sweeps import evaluate_scaling, evaluate_table
from worksheet.engine.translate import (
    INFINITY,
    Translator,
    Typed,
    describe,
    temperature_energy_hint,
)
from worksheet.engine.views import (
    ENERGY,
    natural_factor,
    planck_exponents,
    planck_g_power,
    power_text,
)
from worksheet.errors import (
    DimensionError,
    EvaluationError,
    NameResolutionError,
    WorksheetError,
)
from worksheet.syntax import tree as t
from worksheet.syntax.unparse import to_text
from worksheet.units.dimension import Dimension
from worksheet.units.registry import ResolvedUnit

KINDS = {
    t.Definition: "definition",
    t.Relation: "relation",
    t.Declaration: "declaration",
    t.Display: "display",
    t.Check: "check",
    t.Scaling: "scaling",
    t.Table: "table",
    t.Plot: "plot",
    t.Estimate: "estimate",
    t.Variance: "variance",
    t.Histogram: "histogram",
    t.Use: "use",
    t.Blank: "blank",
}
DEFAULT_NUMERIC_TOLERANCE = Fraction(1, 10**9)
RESERVED_NAMES = frozenset({"pi", INFINITY})
"""Built-in numbers a sheet cannot define."""


@dataclass(frozen=True)
class Quantity:
    """A translated expression with its numbers (``si`` is None when symbolic)."""

    typed: Typed
    figures: Figures
    lone_unit: ResolvedUnit | None = None  # set for '25 [degC]' or '3 [km]' written alone

    @property
    def si(self) -> float | None:
        return self.figures.trusted


def _view_factor(compute: Callable[[], float], conversion: t.Conversion) -> float:
    """The factor of a natural or Planck view; an error where no double can hold it.

    ``1 [m^-60] in planck`` needs l_P^60 (about 1e-2096): it would become 0 and the value
    a division by zero.
    """
    try:
        factor = compute()
    except (OverflowError, ZeroDivisionError):
        factor = math.inf
    if factor == 0 or not math.isfinite(factor):
        view = "Planck units" if conversion.planck else "natural units"
        raise EvaluationError(
            f"the conversion to {view} needs a factor outside what a double can hold "
            "(about 1e-308 to 1e308); the dimension's powers are too high",
            conversion.line,
            conversion.column,
        )
    return factor


class StatementEvaluator:
    """Evaluates statements for one sheet (or one ``calc``) with a shared context.

    Args:
        context: dataset, registry, digits and budget.
        lookup: the binding visible for a name at the statement being evaluated.
        values: SI numbers of every sheet symbol that has one (kept up to date by the caller).
    """

    def __init__(
        self,
        context: Context,
        lookup: Callable[[str], Binding | None],
        values: Mapping[sympy.Symbol, Binding],
    ):
        self.ctx = context
        self.lookup = lookup
        self.values = values

    # --- public ---
    def evaluate(self, stmt: t.AnyStatement) -> tuple[StatementResult, Binding | None]:
        kind = KINDS[type(stmt)]
        try:
            if isinstance(stmt, t.Definition):
                return self._definition(stmt)
            if isinstance(stmt, t.Relation):
                return self._relation(stmt)
            if isinstance(stmt, t.Declaration):
                return self._declaration(stmt)
            if isinstance(stmt, t.Display):
                return self._display(stmt), None
            if isinstance(stmt, t.Check):
                return self._check(stmt), None
            if isinstance(stmt, t.Estimate):
                return self._estimate(stmt)
            if isinstance(stmt, t.Scaling):
                return evaluate_scaling(self, stmt), None
            if isinstance(stmt, t.Table):
                return evaluate_table(self, stmt), None
            if isinstance(stmt, t.Plot):
                from worksheet.engine.plots import evaluate_plot

                return evaluate_plot(self, stmt), None
            if isinstance(stmt, t.Variance):
                return evaluate_variance(self, stmt), None
            if isinstance(stmt, t.Histogram):
                return evaluate_histogram(self, stmt), None
            if isinstance(stmt, t.Blank):
                return StatementResult(stmt.line, kind, "", "ok"), None
            raise EvaluationError(
                f"'{kind}' statements are not available yet", stmt.line, stmt.column
            )
        except WorksheetError as err:
            return self.error_result(stmt, err), None
        except RecursionError:
            err = EvaluationError("the expression is too deeply nested to process", stmt.line)
            return self.error_result(stmt, err), None

    def error_result(self, stmt: t.AnyStatement, err: WorksheetError) -> StatementResult:
        line = err.line if err.line is not None else stmt.line
        located = WorksheetError(err.message, line, err.column).located()
        name = getattr(stmt, "name", None)
        return StatementResult(
            stmt.line,
            KINDS[type(stmt)],
            stmt.source,
            "error",
            name=name,
            message=located,
            record=located,
        )

    # --- pieces ---
    def translator(self) -> Translator:
        return Translator(
            self.lookup,
            self.ctx.registry,
            self.ctx.unit_values,
            self.ctx.worker,
            self.ctx.seconds,
            sheet_names=lambda: (binding.name for binding in self.values.values()),
        )

    def figures(self, expr: sympy.Expr) -> Figures:
        return compute_figures(expr, self.values, self.ctx, self._input_uncertainty)

    def _input_uncertainty(self, key: str) -> float:
        """The standard uncertainty of one independent input: a constant or a given."""
        binding = self.lookup(key)
        if binding is None:
            return 0.0
        if binding.origin is Origin.CONSTANT:
            return binding.uncertainty or 0.0
        return binding.input_uncertainty or 0.0

    def _own_input_uncertainty(self, binding: Binding | None) -> Callable[[str], float]:
        """Input uncertainties, including the one a definition states for itself (its
        binding is not visible to ``lookup`` until the statement is done)."""
        if binding is None or binding.input_uncertainty is None:
            return self._input_uncertainty
        own, stated = binding.name, binding.input_uncertainty
        return lambda key: stated if key == own else self._input_uncertainty(key)

    def quantity(self, tr: Translator, node: t.Expr, fast: bool = False) -> Quantity:
        """Translate and, where every name has a value, compute the SI number.

        A product-and-power expression takes its numbers from the parsed tree
        (``fast_numeric``) on either path; ``fast`` also leaves its sympy form to be built
        when it is printed.
        """
        walked = fast_numeric.walk_quantity(self, node)  # once: both paths use its numbers
        if fast and walked is not None:
            quick = fast_numeric.fast_quantity(self, tr, node, walked)
            if quick is not None:
                return quick
        lone = t.lone_unit_value(node)
        resolved = None
        if lone is not None:
            number, unit_node = lone
            resolved = self.ctx.registry.resolve(unit_node.unit, unit_node.line, unit_node.column)
            if resolved.is_offset:
                si = resolved.factor * float(number) + resolved.offset
                kelvin = Fraction(si).limit_denominator(10**12)
                expr = sympy.Rational(kelvin.numerator, kelvin.denominator) * unit_symbol("K")
                self.ctx.unit_values[unit_symbol("K")] = 1.0
                typed = Typed(expr, resolved.dimension)
                return Quantity(typed, self.figures(expr), resolved)
        typed = tr.translate(node)
        if walked is not None:
            return Quantity(typed, walked.figures, resolved)
        return Quantity(typed, self.figures(typed.expr), resolved)

    def output_unit(
        self, quantity: Quantity, conversion: t.Conversion | None, at: t.Statement
    ) -> tuple[str, float, float]:
        """(unit text, SI factor, offset) for recording a quantity."""
        dim = quantity.typed.dim
        if conversion is not None:
            if conversion.natural:
                return self._natural_unit(dim, conversion)
            if conversion.planck:
                return self._planck_unit(dim, conversion)
            target = self.ctx.registry.resolve(
                conversion.unit, conversion.line, conversion.column + 3
            )
            if target.dimension != dim:
                raise DimensionError(
                    f"cannot express {dim.name()} ({dim.si_unit() or '1'}) in "
                    f"[{conversion.unit.source}], which is {target.dimension.name()} "
                    f"({target.dimension.si_unit() or '1'})",
                    conversion.line,
                    conversion.column,
                )
            return conversion.unit.source, target.factor, target.offset
        if quantity.lone_unit is not None:
            unit = quantity.lone_unit
            return unit.source, unit.factor, unit.offset
        return dim.si_unit(), 1.0, 0.0

    def _natural_unit(self, dim: Dimension, conversion: t.Conversion) -> tuple[str, float, float]:
        """``in natural [GeV]``: the value in powers of GeV with hbar = c = k_B = 1."""
        energy = self.ctx.registry.resolve(conversion.unit, conversion.line, conversion.column)
        if energy.dimension != ENERGY or energy.is_offset:
            raise DimensionError(
                f"'in natural' takes an energy unit such as [GeV], not [{conversion.unit.source}]",
                conversion.line,
                conversion.column,
            )
        try:
            factor = natural_factor(dim)
        except DimensionError as err:
            raise DimensionError(err.message, conversion.line, conversion.column) from err
        constants = self.ctx.constants

        def divisor() -> float:
            scale = 1.0
            for symbol, power in (("hbar", factor.p), ("c", factor.q), ("k_B", factor.r)):
                value = constants[symbol].value
                assert value is not None
                scale *= value ** float(power)
            # shown = si * scale / E^n  ==  si / (E^n / scale)
            return energy.factor ** float(factor.n) / scale

        return power_text(conversion.unit.source, factor.n), _view_factor(divisor, conversion), 0.0

    def _planck_unit(self, dim: Dimension, conversion: t.Conversion) -> tuple[str, float, float]:
        """``in planck``: a pure number of Planck units (G = hbar = c = k_B = 1)."""
        try:
            exponents = planck_exponents(dim)
        except DimensionError as err:
            raise DimensionError(err.message, conversion.line, conversion.column) from err
        constants = self.ctx.constants

        def product() -> float:
            scale = 1.0
            for symbol, power in zip(("l_P", "m_P", "t_P", "T_P"), exponents, strict=True):
                if power:
                    value = constants[symbol].value
                    assert value is not None
                    scale *= value ** float(power)
            return scale

        return "", _view_factor(product, conversion), 0.0

    def _view_note(self, stmt: t.Statement, dim: Dimension) -> str | None:
        conversion = getattr(stmt, "conversion", None)
        if conversion is None:
            return None
        if conversion.natural:
            return f"natural units, hbar = c = k_B = 1: {natural_factor(dim).describe()}"
        if conversion.planck:
            from worksheet.engine.estimate import format_monomial

            unit = format_monomial(("l_P", "m_P", "t_P", "T_P"), planck_exponents(dim))
            return f"Planck units, G = hbar = c = k_B = 1: in units of {unit}"
        return None

    def _loss_note(self, figures: Figures, factor: float, offset: float) -> str:
        if figures.value is None or math.isnan(figures.value):  # the reason says what it gave
            return f"precision loss: {figures.loss}"
        double = format_number((figures.value - offset) / factor, self.ctx.digits)
        return f"precision loss: {figures.loss}; double precision gave {double}"

    def _value_text(
        self, quantity: Quantity, unit: str, factor: float, offset: float
    ) -> tuple[str, float]:
        figures = quantity.figures
        if figures.loss is not None and figures.precise is not None:
            exact = (figures.precise - offset) / factor
            text = format_precise(exact, self.ctx.digits)
            shown = float(exact)
        else:
            assert quantity.si is not None
            shown = (quantity.si - offset) / factor
            text = format_number(shown, self.ctx.digits)
        return (f"{text} {unit}" if unit else text), shown

    # --- statements ---
    def _definition(self, stmt: t.Definition) -> tuple[StatementResult, Binding | None]:
        if stmt.ranged is not None:
            return ranged_definition(self, stmt)
        self._refuse_constant_name(stmt.name, stmt)
        tr = self.translator()
        quantity = self.quantity(tr, stmt.expr, fast=True)
        typed = quantity.typed
        deps = tuple(dict.fromkeys(tr.used))
        origin = Origin.DERIVED if deps else Origin.GIVEN
        unit, factor, offset = self.output_unit(quantity, stmt.conversion, stmt)
        stated = self._uncertainty(stmt, quantity, tr)
        figures = quantity.figures
        if stated is not None:
            gradient, uncertainty = _stated_gradient(stmt.name, stated, figures, origin)
        else:
            gradient, uncertainty = dict(figures.gradient), figures.uncertainty
        symbol = symbol_for(
            stmt.name,
            quantity.si,
            positive_hint=None if quantity.si is not None else _plainly_positive(typed.expr),
        )
        binding = Binding(
            name=stmt.name,
            origin=origin,
            symbol=symbol,
            dimension=typed.dim,
            line=stmt.line,
            local=typed.expr,
            deps=deps,
            value=quantity.si,
            uncertainty=uncertainty,
            input_uncertainty=stated,
            gradient=gradient,
            precise=figures.precise,
            _resolver=self.lookup,
        )
        if origin is Origin.GIVEN:
            binding.local = None
        result = self._quantity_result(
            stmt,
            "definition",
            stmt.name,
            binding,
            quantity,
            (unit, factor, offset),
            tr.used_verb,
            tuple(tr.numeric_notes),
        )
        if quantity.si is not None and is_ranged(binding):
            samples = samples_of(binding, self.ctx, self.values)
            result = sampled_result(self, result, stmt.name, samples, (unit, factor, offset))
        return result, binding

    def _quantity_result(
        self,
        stmt: t.Statement,
        kind: str,
        name: str | None,
        binding: Binding | None,
        quantity: Quantity,
        unit_info: tuple[str, float, float],
        verb: bool,
        numeric_notes: tuple[str, ...] = (),
    ) -> StatementResult:
        unit, factor, offset = unit_info
        typed = quantity.typed
        head = name if name is not None else to_text(stmt.expr)  # type: ignore[attr-defined]
        # A number needs only the statement's own expression shown; a symbolic result is
        # shown in givens and declared symbols (its form), which is what a reader wants.
        form = typed.expr if binding is None or quantity.si is not None else binding.form()
        dim = typed.dim
        if quantity.si is None:
            symbolic = format_expr(form)
            record = f"{head} = {symbolic}"
            return StatementResult(
                stmt.line,
                kind,
                stmt.source,
                "ok",
                name=name,
                dimension=dim.name(),
                symbolic_text=symbolic,
                si_unit=dim.base_units(),
                record=record,
                unit=unit or None,
            )
        figures = quantity.figures
        value_text, shown = self._value_text(quantity, unit, factor, offset)
        uncertainty = binding.uncertainty if binding is not None else figures.uncertainty
        gradient = binding.gradient if binding is not None else figures.gradient
        shown_u = None
        notes = []
        # A unit such as [M_sun], or a Planck unit, shares G's uncertainty with the value.
        conversion = getattr(stmt, "conversion", None)
        if conversion is not None and conversion.planck:
            g_power = planck_g_power(dim)
        else:
            g_power = unit_g_power(unit, self.ctx) if unit else Fraction(0)
        if g_power:
            uncertainty = in_unit_uncertainty(
                quantity.si,
                gradient,
                uncertainty or 0.0,
                g_power,
                self.ctx,
                self._own_input_uncertainty(binding),
            )
        if uncertainty:
            shown_u = uncertainty / factor
            value_text = _with_uncertainty(value_text, shown_u)
            poor = relative_uncertainty_note(quantity.si, uncertainty)
            if poor:
                notes.append(poor)
        view = self._view_note(stmt, dim)
        if view:
            notes.insert(0, view)
        notes[:0] = numeric_notes
        verb = verb and not numeric_notes  # a numeric fallback has no symbolic form to show
        if figures.loss is not None:
            notes.append(self._loss_note(figures, factor, offset))
        record = (
            f"{head} = {format_expr(form)} = {value_text}" if verb else f"{head} = {value_text}"
        )
        if notes:
            record += " (" + "; ".join(notes) + ")"
        return StatementResult(
            stmt.line,
            kind,
            stmt.source,
            "ok",
            name=name,
            value=shown,
            unit=unit or "",
            si_value=quantity.si,
            si_unit=dim.base_units(),
            dimension=dim.name(),
            form=form,
            uncertainty=shown_u,
            record=record,
            precision=figures.loss,
            message="; ".join(notes) or None,
            detail=_precise_number(figures, offset, factor, self.ctx.digits),
        )

    def _uncertainty(self, stmt: t.Definition, quantity: Quantity, tr: Translator) -> float | None:
        if stmt.uncertainty is None:
            return None
        if quantity.si is None:
            raise EvaluationError("an uncertainty needs a value to attach to", stmt.line)
        if stmt.uncertainty.relative is not None:
            return abs(quantity.si) * float(stmt.uncertainty.relative)
        assert stmt.uncertainty.absolute is not None
        spread = self.quantity(tr, stmt.uncertainty.absolute)
        if spread.typed.dim != quantity.typed.dim:
            raise DimensionError(
                f"the uncertainty {describe(stmt.uncertainty.absolute, spread.typed)} does not "
                f"match the value ({quantity.typed.dim.name()})",
                stmt.uncertainty.absolute.line,
                stmt.uncertainty.absolute.column,
            )
        if spread.si is None:
            raise EvaluationError("an uncertainty must be a number", stmt.line)
        return abs(spread.si)

    def _refuse_constant_name(self, name: str, stmt: t.Statement) -> None:
        if name in RESERVED_NAMES:
            meaning = "pi" if name == "pi" else "infinity"
            raise NameResolutionError(
                f"'{name}' is a built-in constant ({meaning}); choose another name, "
                f"such as {name}_2",
                stmt.line,
                stmt.column,
            )
        existing = self.lookup(name)
        if existing is not None and existing.origin is Origin.CONSTANT:
            unit = existing.dimension.si_unit() or "1"
            raise NameResolutionError(
                f"'{name}' is a constant of the pinned dataset, and other lines keep using it; "
                f"choose another name for this value (such as {name}_2), or declare the "
                f"constant ({name} : [{unit}]) above its first use to keep it symbolic",
                stmt.line,
                stmt.column,
            )

    def _relation(self, stmt: t.Relation) -> tuple[StatementResult, Binding | None]:
        self._refuse_constant_name(stmt.name, stmt)
        names = {node.id for node in t.walk(stmt.expr) if isinstance(node, t.Name)}
        deps = tuple(sorted(n for n in names - set(stmt.params) if self.lookup(n) is not None))
        # Show the body with parameters as plain symbols; check it where it is dimension-free
        # of the parameters (their dimensions come from each call).
        shown_locals = {p: Typed(sympy.Symbol(p), Dimension()) for p in stmt.params}
        tr = self.translator()
        try:
            body = tr.translate(stmt.expr, shown_locals)
            symbolic = format_expr(body.expr)
        except DimensionError:
            symbolic = to_text(stmt.expr)
        binding = Binding(
            name=stmt.name,
            origin=Origin.RELATION,
            symbol=sympy.Symbol(stmt.name),
            dimension=Dimension(),
            line=stmt.line,
            deps=deps,
            params=stmt.params,
            body=stmt.expr,
        )
        head = f"{stmt.name}({', '.join(stmt.params)})"
        return StatementResult(
            stmt.line,
            "relation",
            stmt.source,
            "ok",
            name=stmt.name,
            symbolic_text=symbolic,
            record=f"{head} = {symbolic}",
        ), binding

    def _declaration(self, stmt: t.Declaration) -> tuple[StatementResult, Binding | None]:
        existing = self.lookup(stmt.name)
        unit = self.ctx.registry.resolve(stmt.unit, stmt.line, stmt.column)
        if unit.is_offset:
            raise DimensionError("declare temperatures in [K]", stmt.line, stmt.column)
        if (
            existing is not None
            and existing.origin is Origin.CONSTANT
            and existing.dimension != unit.dimension
        ):
            raise DimensionError(
                f"'{stmt.name}' is a constant of {existing.dimension.name()} "
                f"({existing.dimension.si_unit()}); it cannot be declared as "
                f"{unit.dimension.name()}",
                stmt.line,
                stmt.column,
            )
        binding = Binding(
            name=stmt.name,
            origin=Origin.DECLARED,
            symbol=sympy.Symbol(stmt.name, positive=True),
            dimension=unit.dimension,
            line=stmt.line,
        )
        return StatementResult(
            stmt.line,
            "declaration",
            stmt.source,
            "ok",
            name=stmt.name,
            dimension=unit.dimension.name(),
            unit=stmt.unit.source,
            si_unit=unit.dimension.base_units(),
            symbolic_text=stmt.name,
        ), binding

    def _estimate(self, stmt: t.Estimate) -> tuple[StatementResult, Binding | None]:
        """Dimensional analysis: the product of powers of the inputs with the target unit."""
        self._refuse_constant_name(stmt.name, stmt)
        target = self.ctx.registry.resolve(stmt.unit, stmt.line, stmt.column)
        inputs: list[tuple[str, Dimension]] = []
        bindings: list[Binding] = []
        for name in stmt.inputs:
            binding = self.lookup(name)
            if binding is None or binding.origin is Origin.RELATION:
                raise NameResolutionError(
                    f"estimate: '{name}' is not a quantity defined above or a constant",
                    stmt.line,
                    stmt.column,
                )
            inputs.append((name, binding.dimension))
            bindings.append(binding)
        solution = solve_exponents(target.dimension, inputs)
        if solution.outcome is Outcome.UNREACHABLE:
            raise DimensionError(
                f"estimate: no product of powers of {', '.join(stmt.inputs)} is "
                f"{target.dimension.name()}; {solution.reason}",
                stmt.line,
                stmt.column,
            )
        if not solution.unique:
            groups = "; ".join(solution.group_texts())
            record = (
                f"{stmt.name}: not unique; the free dimensionless groups are {groups} "
                "(add or remove inputs to fix them)"
            )
            return StatementResult(
                stmt.line,
                "estimate",
                stmt.source,
                "ok",
                name=stmt.name,
                dimension=target.dimension.name(),
                message=record,
                record=record,
            ), None
        assert solution.exponents is not None
        expr = sympy.Integer(1)
        for binding, power in zip(bindings, solution.exponents, strict=True):
            if power:
                expr *= binding.symbol ** sympy.Rational(power.numerator, power.denominator)
        monomial = solution.monomial() or "1"
        typed = Typed(expr, target.dimension)
        quantity = Quantity(typed, self.figures(expr))
        deps = tuple(b.name for b in bindings if b.origin is not Origin.CONSTANT)
        binding = Binding(
            name=stmt.name,
            origin=Origin.ESTIMATE,
            symbol=symbol_for(stmt.name, quantity.si),
            dimension=target.dimension,
            line=stmt.line,
            local=expr,
            deps=deps,
            value=quantity.si,
            uncertainty=quantity.figures.uncertainty,
            gradient=dict(quantity.figures.gradient),
            precise=quantity.figures.precise,
            _resolver=self.lookup,
        )
        head = f"{stmt.name} ~ {monomial}"
        note = "up to a dimensionless factor that dimensional analysis cannot give"
        if quantity.si is None:
            record = f"{head} ({note})"
            return StatementResult(
                stmt.line,
                "estimate",
                stmt.source,
                "ok",
                name=stmt.name,
                dimension=target.dimension.name(),
                symbolic_text=monomial,
                message=note,
                record=record,
            ), binding
        unit_text = stmt.unit.source
        value_text, shown = self._value_text(quantity, unit_text, target.factor, target.offset)
        shown_u = None
        if binding.uncertainty:
            shown_u = binding.uncertainty / target.factor
            value_text = _with_uncertainty(value_text, shown_u)
        record = f"{head} = {value_text} ({note})"
        return StatementResult(
            stmt.line,
            "estimate",
            stmt.source,
            "ok",
            name=stmt.name,
            value=shown,
            unit=unit_text,
            si_value=quantity.si,
            si_unit=target.dimension.base_units(),
            dimension=target.dimension.name(),
            symbolic_text=monomial,
            message=note,
            uncertainty=shown_u,
            record=record,
        ), binding

    def _display(self, stmt: t.Display) -> StatementResult:
        tr = self.translator()
        quantity = self.quantity(tr, stmt.expr)
        unit_info = self.output_unit(quantity, stmt.conversion, stmt)
        result = self._quantity_result(
            stmt,
            "display",
            None,
            None,
            quantity,
            unit_info,
            tr.used_verb,
            tuple(tr.numeric_notes),
        )
        if quantity.si is not None and expression_ranged(quantity.typed.expr, self.values):
            samples = expression_samples(quantity.typed.expr, self.ctx, self.values)
            result = sampled_result(self, result, to_text(stmt.expr), samples, unit_info)
        return result

    def _check(self, stmt: t.Check) -> StatementResult:
        if stmt.fraction is not None:
            return sampled_check(self, stmt)
        tr = self.translator()
        left = self.quantity(tr, stmt.left, fast=True)
        right = self.quantity(tr, stmt.right, fast=True)
        if left.typed.dim != right.typed.dim and not (left.si == 0 or right.si == 0):
            hint = temperature_energy_hint(stmt.left, left.typed, stmt.right, right.typed)
            raise DimensionError(
                f"cannot compare {describe(stmt.left, left.typed)} with "
                f"{describe(stmt.right, right.typed)}{hint}",
                stmt.left.line,
                stmt.left.column,
            )
        if left.si is not None and right.si is not None:
            holds, detail = self._numeric_claim(stmt, left.si, right.si, tr, left, right)
        else:
            holds, detail = self._symbolic_claim(stmt, left, right, tr)
        status = "ok" if holds else "failed"
        word = "holds" if holds else "fails"
        record = f"{stmt.source}: {word}" + (f" ({detail})" if detail and not holds else "")
        return StatementResult(
            stmt.line,
            "check",
            stmt.source,
            status,
            dimension=left.typed.dim.name(),
            message=None if holds else detail,
            record=record,
        )

    def _numeric_claim(
        self, stmt: t.Check, a: float, b: float, tr: Translator, left: Quantity, right: Quantity
    ) -> tuple[bool, str]:
        unit, factor, offset = _claim_unit(left, right, left.typed.dim)
        digits = self.ctx.digits

        def show(x: float) -> str:
            shown = (x - offset) / factor
            return format_number(shown, max(digits, 6)) + (f" {unit}" if unit else "")

        for side, value in (("left", a), ("right", b)):
            if not math.isfinite(value):
                raise EvaluationError(
                    f"the {side} side of the claim is {value} in double precision (beyond "
                    "about 1e308); compare quantities within that range, e.g. in a larger unit",
                    stmt.line,
                )
        detail = f"left {show(a)}, right {show(b)}"
        op = stmt.op
        if op == "==":
            if stmt.absolute_tolerance is not None:
                bound = self.quantity(tr, stmt.absolute_tolerance)
                if bound.typed.dim != left.typed.dim or bound.si is None:
                    raise DimensionError(
                        f"the tolerance {describe(stmt.absolute_tolerance, bound.typed)} must "
                        f"have the dimension of the sides ({left.typed.dim.name()})",
                        stmt.absolute_tolerance.line,
                        stmt.absolute_tolerance.column,
                    )
                return abs(a - b) <= abs(bound.si), detail
            tolerance = float(
                stmt.tolerance if stmt.tolerance is not None else DEFAULT_NUMERIC_TOLERANCE
            )
            scale = max(abs(a), abs(b))
            difference = abs(a - b)
            relative = difference / scale if scale else 0.0
            return (
                difference <= tolerance * scale,
                f"{detail}, relative difference {format_number(relative, 2)}",
            )
        if op == "~":
            if a <= 0 or b <= 0:
                if a == b:
                    return True, detail
                raise EvaluationError(
                    "'~' compares orders of magnitude of positive values", stmt.line
                )
            spread = abs(math.log10(a) - math.log10(b))  # a / b may leave the double range
            return spread <= 0.5, f"{detail}, {spread:.2f} decades apart"
        compare = {"<": a < b, "<=": a <= b, ">": a > b, ">=": a >= b}
        return compare[op], detail

    def _symbolic_claim(
        self, stmt: t.Check, left: Quantity, right: Quantity, tr: Translator
    ) -> tuple[bool, str]:
        # Compare forms in givens, so derived names are seen through.
        expanded = self.translator()
        lhs = expanded.translate(stmt.left, expand=True).expr
        rhs = expanded.translate(stmt.right, expand=True).expr
        if stmt.op == "==":
            if stmt.tolerance is not None or stmt.absolute_tolerance is not None:
                raise EvaluationError("'within' needs numbers on both sides", stmt.line)
            zero = lhs == rhs or tr.run(ops.is_zero, (lhs - rhs,), "check", stmt.left)
            return bool(zero), f"{format_expr(lhs)} differs from {format_expr(rhs)}"
        if stmt.op == "~":
            raise EvaluationError("'~' needs numbers on both sides", stmt.line)
        # The sign question can be as costly as any verb: ask it in the budgeted worker.
        sign = tr.run(ops.decide_order, (lhs, rhs, stmt.op), "check", stmt.left)
        if sign is None:
            raise EvaluationError(
                f"cannot decide {format_expr(lhs)} {stmt.op} {format_expr(rhs)} symbolically; "
                "give the names values",
                stmt.line,
            )
        return bool(sign), f"{format_expr(lhs)} {stmt.op} {format_expr(rhs)} is false"


def _claim_unit(left: Quantity, right: Quantity, dim: Dimension) -> tuple[str, float, float]:
    """The unit a claim's sides are reported in: the unit written with a lone value on
    either side (right first: ``check r_s < 3 [km]`` reports both in km), else SI."""
    for side in (right, left):
        if side.lone_unit is not None and side.lone_unit.dimension == dim:
            unit = side.lone_unit
            return unit.source, unit.factor, unit.offset
    return dim.si_unit(), 1.0, 0.0


def _stated_gradient(
    name: str, stated: float, figures: Figures, origin: Origin
) -> tuple[dict[str, float], float]:
    """The gradient and SI uncertainty of a definition with a stated ``+- u``.

    The stated u is that of the number as written, an independent input keyed by the
    name. A given keeps the correlated shares of the units and constants it is written
    in: ``4.1e6 [M_sun] +- 5%`` is 4.1e6 +- 5% times M_sun = GM_sun/G, so it keeps the
    derivative in G of M_sun (shown in [M_sun] that share cancels, leaving the 5%; in kg
    both add in quadrature). A derived value with a stated u is a new independent input.
    """
    gradient = {name: 1.0}
    if origin is not Origin.GIVEN or not figures.gradient:
        return gradient, stated
    gradient.update(figures.gradient)
    return gradient, math.hypot(stated, figures.uncertainty or 0.0)


def _with_uncertainty(value_text: str, uncertainty: float) -> str:
    """``2.454e11 K`` with its uncertainty: ``2.454e11 +- 5.5e6 K``."""
    number, _, unit = value_text.partition(" ")
    return f"{number} +- {format_uncertainty(uncertainty)}" + (f" {unit}" if unit else "")


def _plainly_positive(expr: sympy.Expr) -> bool:
    """Positive by its shape alone: products and rational powers of positive atoms.

    A cheap stand-in for sympy's ``is_positive``, whose assumption queries can take minutes
    on a large sum and would run outside the worker's budget.
    """
    if expr.is_Symbol or expr.is_Number or isinstance(expr, sympy.NumberSymbol):
        return bool(expr.is_positive)
    if expr.is_Mul:
        return all(_plainly_positive(arg) for arg in expr.args)
    if expr.is_Pow:
        return _plainly_positive(expr.args[0]) and bool(expr.args[1].is_Rational)
    return False


def _precise_number(figures: Figures, offset: float, factor: float, digits: int) -> str | None:
    """The high-precision value in the recorded notation where the guard found a loss
    (beyond the double range the exports cannot show it from ``value``)."""
    if figures.loss is None or figures.precise is None:
        return None
    return format_precise((figures.precise - offset) / factor, digits)
