"""The Python API: load a sheet, run it in memory, read its quantities as pint and sympy objects.

Every run goes through ``worksheet.runner`` (the same code path as ``worksheet run`` and the
app); this module only shapes the outcome for scripts and notebooks.

>>> import worksheet
>>> sheet = worksheet.loads(
...     "---\\nconstants: CODATA2022\\n---\\n\\n```calc\\n"
...     "d = 3 [km]\\nt = 2 [s]\\nv = d/t\\ncheck v > 1 [km/s]\\n```\\n"
... )
>>> result = sheet.run()
>>> result["v"].value, result["v"].unit
(1500.0, 'm/s')
>>> print(result["d"].quantity)
3.0 kilometer
>>> result["v"].symbolic
d/t
>>> [claim.holds for claim in result.claims], result.ok, result.current
([True], True, False)
"""

from __future__ import annotations

import functools
import math
from collections.abc import Iterator, Mapping
from dataclasses import dataclass, field
from fractions import Fraction
from pathlib import Path
from types import TracebackType
from typing import TYPE_CHECKING, Any

from worksheet.document import (
    SheetDocument,
    atomic_write_text,
    parse_document,
    read_document,
    render_document,
)
from worksheet.engine import StatementResult
from worksheet.errors import DocumentError, EvaluationError
from worksheet.runner import SheetRun, SheetRunner, SheetSettings, StaleLine
from worksheet.syntax.units import parse_unit
from worksheet.units.dimension import PINT_BASES

if TYPE_CHECKING:
    import os

    import sympy

    from worksheet.engine.bindings import Binding
    from worksheet.units.registry import UnitRegistry

CLAIM_KINDS = frozenset({"check"})
"""Statement kinds reported as claims; every other kind except blanks and parse errors
is a quantity."""

_NOT_QUANTITIES = frozenset({"check", "blank", "error"})

# Relative agreement needed between pint's definition of a unit name and the pinned
# dataset's before a quantity is given in that unit (pint's parsec is 7.8e-12 off).
_UNIT_AGREEMENT = 1e-13


@functools.cache
def quantity_registry() -> Any:
    """The process's pint registry for API quantities, built on first use, never cached on disk.

    Quantities from every run share it, so they can be added and compared with each other.
    Pass your own registry to :func:`load` to combine them with quantities of your own.
    """
    import pint

    return pint.UnitRegistry(cache_folder=None)


class _UnitBridge:
    """Turns a recorded (SI value, recorded unit) into a pint Quantity for one run."""

    def __init__(self, sheet_units: UnitRegistry, ureg: Any | None):
        self._sheet_units = sheet_units
        self._ureg = ureg

    @property
    def ureg(self) -> Any:
        if self._ureg is None:
            self._ureg = quantity_registry()
        return self._ureg

    def quantity(self, value: float, unit: str | None, si_value: float, si_unit: str) -> Any:
        """In the recorded unit when pint agrees with the sheet on it, else in SI base units.

        The recorded number is kept as it is (pint's definition of the unit has been checked
        to agree with the sheet's), so ``quantity.magnitude == value`` exactly.
        """
        target = self._pint_unit(unit or "", check=True)
        if target is not None:
            return self.ureg.Quantity(value, target)
        si = self._pint_unit(si_unit, check=False)
        assert si is not None  # SI base-unit names are always pint's
        return self.ureg.Quantity(si_value, si)

    def _pint_unit(self, text: str, check: bool) -> Any | None:
        """The unit text (our bracket grammar) as a pint Unit, or None when it cannot be exact.

        Only single names reach pint, never the whole text (as in ``units.registry``).
        """
        import pint

        ureg = self.ureg
        unit = ureg.dimensionless
        if text.strip() in ("", "1"):
            return unit
        parsed = parse_unit(text)
        if parsed.scale != 1:
            return None
        for name, power in parsed.factors:
            try:
                part = ureg.Unit(name)
            except (pint.errors.UndefinedUnitError, AttributeError, ValueError, TypeError):
                if check:
                    return None
                raise
            if check and not self._agrees(name, part):
                return None
            unit = unit * part ** _pint_power(power)
        return unit

    def _agrees(self, name: str, part: Any) -> bool:
        """Whether pint's definition of ``name`` is the sheet's (factor, offset, dimension)."""
        ours = self._sheet_units.named(name)
        ureg = self.ureg
        zero = float(ureg.Quantity(0.0, part).to_base_units().magnitude)
        one = float(ureg.Quantity(1.0, part).to_base_units().magnitude)
        offset = zero if not ureg.Quantity(1.0, part)._ok_for_muldiv() else 0.0
        factor = one - offset
        dims = dict(part.dimensionality)
        if set(dims) - set(PINT_BASES):
            return False
        exponents = tuple(Fraction(dims.get(b, 0)).limit_denominator(1000) for b in PINT_BASES)
        return (
            exponents == ours.dimension.exponents
            and math.isclose(factor, ours.factor, rel_tol=_UNIT_AGREEMENT)
            and math.isclose(offset, ours.offset, rel_tol=_UNIT_AGREEMENT, abs_tol=1e-12)
        )


def _pint_power(power: Fraction) -> int | float:
    return power.numerator if power.denominator == 1 else float(power)


@dataclass(frozen=True)
class QuantityResult:
    """One definition, display, declaration or relation of a run.

    ``value`` and ``unit`` are as recorded in the sheet; ``si_value`` and ``si_unit`` in SI
    base units. ``symbolic`` is the sympy form in givens, declared symbols and constants
    (definitions and declarations only); ``symbolic_text`` is its recorded text.
    """

    line: int
    kind: str
    name: str | None
    text: str
    status: str
    message: str | None
    value: float | None
    unit: str | None
    si_value: float | None
    si_unit: str | None
    dimension: str | None
    uncertainty: float | None
    record: str | None
    symbolic: sympy.Expr | None
    symbolic_text: str | None
    sampled: Any  # median, 68%/95% intervals, histogram: where a ranged input is read
    _bridge: _UnitBridge = field(repr=False, compare=False)

    @property
    def key(self) -> str:
        """What ``result[...]`` finds it by: the name, or the statement text of a display."""
        return self.name if self.name is not None else self.text

    @property
    def ok(self) -> bool:
        return self.status == "ok"

    @functools.cached_property
    def quantity(self) -> Any:
        """The value as a pint Quantity.

        In the recorded unit when pint knows that unit with the sheet's own definition;
        otherwise (``M_sun``, ``Jy``, the IAU parsec ``pc``, a scaled unit like ``[1e3 m]``)
        the same value in SI base units. Raises EvaluationError when there is no number
        (a failed statement, or a result left symbolic).
        """
        if self.status != "ok":
            raise EvaluationError(
                f"'{self.key}' has no value: {self.message or self.status}", self.line
            )
        if self.value is None or self.si_value is None or self.si_unit is None:
            raise EvaluationError(
                f"'{self.key}' has no number: it is symbolic ({self.symbolic_text})", self.line
            )
        return self._bridge.quantity(self.value, self.unit, self.si_value, self.si_unit)

    @property
    def symbols(self) -> dict[str, sympy.Symbol]:
        """The symbols of ``symbolic`` by name (with the sign assumptions the sheet gave them)."""
        if self.symbolic is None:
            return {}
        return {s.name: s for s in sorted(self.symbolic.free_symbols, key=str)}


@dataclass(frozen=True)
class ClaimResult:
    """One ``check`` of a run: it holds, fails, or could not be decided (error, skipped)."""

    line: int
    text: str
    status: str
    message: str | None
    record: str | None

    @property
    def holds(self) -> bool:
        return self.status == "ok"

    @property
    def failed(self) -> bool:
        """The claim was evaluated and does not hold (an error is not a failure)."""
        return self.status == "failed"


class SheetResult:
    """The outcome of one in-memory run: quantities by name, claims, errors and staleness.

    ``result["T_H"]`` finds a quantity by name, or a display by its statement text; iterating
    gives the quantities in reading order.
    """

    def __init__(self, run: SheetRun, bindings: Mapping[str, Binding], bridge: _UnitBridge):
        self.sheet_run = run
        quantities: list[QuantityResult] = []
        claims: list[ClaimResult] = []
        for result in run.results:
            if result.kind in CLAIM_KINDS:
                claims.append(
                    ClaimResult(
                        result.line, result.text, result.status, result.message, result.record
                    )
                )
            elif result.kind not in _NOT_QUANTITIES:
                quantities.append(_quantity_result(result, bindings, bridge))
        self.quantities: tuple[QuantityResult, ...] = tuple(quantities)
        self.claims: tuple[ClaimResult, ...] = tuple(claims)
        self._by_key: dict[str, QuantityResult] = {}
        for quantity in self.quantities:
            self._by_key.setdefault(quantity.key, quantity)

    @property
    def settings(self) -> SheetSettings:
        return self.sheet_run.settings

    @property
    def warnings(self) -> tuple[str, ...]:
        """Warnings about the sheet as a whole (e.g. constants not pinned)."""
        return self.sheet_run.settings.warnings

    @property
    def statements(self) -> tuple[StatementResult, ...]:
        """Every statement's engine result (comment-only lines left out)."""
        return tuple(r for r in self.sheet_run.results if r.kind != "blank")

    @property
    def errors(self) -> tuple[StatementResult, ...]:
        """Statements that erred, or were skipped because a line they depend on erred."""
        return tuple(r for r in self.statements if r.status in ("error", "skipped"))

    @property
    def ok(self) -> bool:
        """Every claim holds and no statement erred; recorded results are not compared."""
        return self.sheet_run.all_hold

    @property
    def stale(self) -> tuple[StaleLine, ...]:
        """Recorded result lines that differ from what this run records."""
        return self.sheet_run.stale

    @property
    def current(self) -> bool:
        """The sheet's recorded results are what this run records (nothing to save)."""
        return not self.sheet_run.stale

    @property
    def text(self) -> str:
        """The sheet with this run's results recorded: what :meth:`Sheet.save` writes."""
        return self.sheet_run.text

    def names(self) -> tuple[str, ...]:
        return tuple(self._by_key)

    def get(self, key: str, default: QuantityResult | None = None) -> QuantityResult | None:
        return self._by_key.get(key, default)

    def __getitem__(self, key: str) -> QuantityResult:
        found = self._by_key.get(key)
        if found is None:
            known = ", ".join(self._by_key) or "none"
            raise KeyError(f"no quantity '{key}' in this sheet (known: {known})")
        return found

    def __contains__(self, key: object) -> bool:
        return key in self._by_key

    def __iter__(self) -> Iterator[QuantityResult]:
        return iter(self.quantities)

    def __len__(self) -> int:
        return len(self.quantities)

    def __repr__(self) -> str:
        verdict = "ok" if self.ok else "not ok"
        recorded = "current" if self.current else f"{len(self.stale)} stale"
        return (
            f"<SheetResult {len(self.quantities)} quantities, {len(self.claims)} claims, "
            f"{verdict}, {recorded}>"
        )


def _quantity_result(
    result: StatementResult, bindings: Mapping[str, Binding], bridge: _UnitBridge
) -> QuantityResult:
    symbolic = None
    if result.status == "ok" and result.name is not None and result.kind != "relation":
        binding = bindings.get(result.name)
        if binding is not None and binding.line == result.line:
            symbolic = binding.form()
    return QuantityResult(
        line=result.line,
        kind=result.kind,
        name=result.name,
        text=result.text,
        status=result.status,
        message=result.message,
        value=result.value,
        unit=result.unit,
        si_value=result.si_value,
        si_unit=result.si_unit,
        dimension=result.dimension,
        uncertainty=result.uncertainty,
        record=result.record,
        symbolic=symbolic,
        symbolic_text=result.symbolic,
        sampled=result.sampled,
        _bridge=bridge,
    )


class Sheet:
    """A sheet document to run in memory and, if wanted, save with its results recorded.

    The helper process that does the symbolic work is stopped after each :meth:`run`; use
    the sheet as a context manager to keep it between runs (and close it at the end)::

        with worksheet.load("budget.sheet.md") as sheet:
            first = sheet.run()
            again = sheet.run()   # unchanged statements are not recomputed

    Args:
        document: the parsed sheet.
        path: where it was read from (the default target of :meth:`save`).
        ureg: a pint registry for ``QuantityResult.quantity`` (default
            :func:`quantity_registry`).
    """

    def __init__(
        self, document: SheetDocument, path: Path | None = None, *, ureg: Any | None = None
    ):
        self._document = document
        self._path = path
        self._ureg = ureg
        self._runner = SheetRunner(path)
        self._open = False
        self._last: SheetResult | None = None

    @property
    def path(self) -> Path | None:
        return self._path

    @property
    def document(self) -> SheetDocument:
        return self._document

    @property
    def text(self) -> str:
        """The sheet's text as loaded (or as last saved)."""
        return render_document(self._document)

    def run(self) -> SheetResult:
        """Run every statement in memory; nothing is written.

        Raises:
            DocumentError: the front matter is invalid (an unknown dataset, bad digits).
        """
        try:
            run = self._runner.run(self._document)
            evaluator = self._runner.evaluator(run.settings)
            bridge = _UnitBridge(evaluator.ctx.registry, self._ureg)
            result = SheetResult(run, evaluator.bindings, bridge)
        finally:
            if not self._open:
                self._runner.close()
        self._last = result
        return result

    def check(self) -> bool:
        """What ``worksheet check`` decides: claims hold, nothing errs, nothing is stale."""
        run = self.run().sheet_run
        return all(r.status == "ok" for r in run.with_staleness() if r.kind != "blank")

    def save(self, path: str | os.PathLike[str] | None = None) -> Path:
        """Write the sheet with its results recorded, atomically, as ``worksheet run`` does.

        Runs the sheet first unless it was just run. Saving to another path makes that the
        sheet's path. Returns the path written.

        Raises:
            DocumentError: no path was given for a sheet made from text, or writing failed.
        """
        target = Path(path) if path is not None else self._path
        if target is None:
            raise DocumentError("this sheet was not loaded from a file; give save() a path")
        result = self._last if self._last is not None else self.run()
        written = result.sheet_run
        if not written.cites_written_lines:  # result blocks move cells: cite the new lines
            try:
                written = self._runner.run(self._document, lines_as_written=True)
            finally:
                if not self._open:
                    self._runner.close()
        atomic_write_text(target, written.text)
        self._document = written.document
        self._path = target
        self._last = None  # the recorded results changed, so staleness must be recomputed
        return target

    def reload(self) -> None:
        """Read the file again (after someone edited it); the next run re-uses what it can."""
        if self._path is None:
            raise DocumentError("this sheet was not loaded from a file; there is none to reload")
        self._document = read_document(self._path)
        self._last = None

    def close(self) -> None:
        """Stop the helper processes (safe to call more than once; a later run restarts them)."""
        self._open = False
        self._runner.close()

    def __enter__(self) -> Sheet:
        self._open = True
        return self

    def __exit__(
        self,
        kind: type[BaseException] | None,
        value: BaseException | None,
        traceback: TracebackType | None,
    ) -> None:
        self.close()

    def __repr__(self) -> str:
        where = str(self._path) if self._path is not None else "text"
        return f"<Sheet {where}>"


def load(path: str | os.PathLike[str], *, ureg: Any | None = None) -> Sheet:
    """Read the sheet file at ``path`` (DocumentError when it cannot be read)."""
    return Sheet(read_document(path), Path(path), ureg=ureg)


def loads(text: str, *, ureg: Any | None = None) -> Sheet:
    """A sheet from its text; :meth:`Sheet.save` then needs a path."""
    return Sheet(parse_document(text), None, ureg=ureg)


__all__ = [
    "ClaimResult",
    "QuantityResult",
    "Sheet",
    "SheetResult",
    "load",
    "loads",
    "quantity_registry",
]
