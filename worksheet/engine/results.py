"""What evaluating a statement records: one frozen result per statement."""

from __future__ import annotations

import math
from dataclasses import dataclass, field, fields
from functools import cached_property
from typing import Any


class LazyForm:
    """A symbolic form built only when it is printed (the float fast path has none)."""

    __slots__ = ("_build", "_expr")

    def __init__(self, build: Any):
        self._build = build
        self._expr: Any = None

    def expr(self) -> Any:
        if self._expr is None:
            self._expr = self._build()
        return self._expr


def built(form: Any) -> Any:
    """``form`` itself, or the expression of a ``LazyForm`` (built now if it is not yet)."""
    return form.expr() if isinstance(form, LazyForm) else form


@dataclass(frozen=True)
class StatementResult:
    """The outcome of one statement, as recorded in the sheet and printed by ``--json``.

    ``record`` is the line written into the result block (None: nothing is recorded).
    """

    line: int
    kind: str
    text: str
    status: str  # ok | failed | error | skipped | stale
    name: str | None = None
    message: str | None = None
    value: float | None = None
    unit: str | None = None
    si_value: float | None = None
    si_unit: str | None = None
    dimension: str | None = None
    symbolic_text: str | None = None
    uncertainty: float | None = None
    record: str | None = None
    precision: str | None = None  # set when the precision guard found a loss: why
    plot: Any = None  # PlotData for 'plot' statements
    sampled: Any = None  # SampledSummary / VarianceBudget for quantities with ranged inputs
    imported: Any = None  # 'use' statements: {"file", "library", "sha256", "names"}
    form: Any = field(default=None, compare=False, repr=False)
    """The sympy expression behind ``symbolic``, printed only when someone asks."""
    detail: Any = field(default=None, compare=False, repr=False)
    """Structured data behind a record the exports typeset (a table's columns, a scaling
    form's exponents, the high-precision value as recorded where the precision guard found
    a loss), so no face reads the record text back; not part of ``--json``."""

    def __init__(
        self,
        line: int,
        kind: str,
        text: str,
        status: str,
        name: str | None = None,
        message: str | None = None,
        value: float | None = None,
        unit: str | None = None,
        si_value: float | None = None,
        si_unit: str | None = None,
        dimension: str | None = None,
        symbolic_text: str | None = None,
        uncertainty: float | None = None,
        record: str | None = None,
        precision: str | None = None,
        plot: Any = None,
        sampled: Any = None,
        imported: Any = None,
        form: Any = None,
        detail: Any = None,
    ) -> None:
        # Written out rather than generated: a frozen dataclass's own __init__ sets each of
        # the twenty fields through object.__setattr__ (3.7 us a result, 1.3 us this way),
        # and every statement makes one. tests/engine/test_issue12_frozen_init.py keeps the
        # parameters in step with the fields. The instance stays frozen.
        fill = self.__dict__
        fill["line"] = line
        fill["kind"] = kind
        fill["text"] = text
        fill["status"] = status
        fill["name"] = name
        fill["message"] = message
        fill["value"] = value
        fill["unit"] = unit
        fill["si_value"] = si_value
        fill["si_unit"] = si_unit
        fill["dimension"] = dimension
        fill["symbolic_text"] = symbolic_text
        fill["uncertainty"] = uncertainty
        fill["record"] = record
        fill["precision"] = precision
        fill["plot"] = plot
        fill["sampled"] = sampled
        fill["imported"] = imported
        fill["form"] = form
        fill["detail"] = detail

    @cached_property
    def symbolic(self) -> str | None:
        """The symbolic form as sheet text (printed lazily: printing is a hot-path cost)."""
        if self.symbolic_text is not None or self.form is None:
            return self.symbolic_text
        from worksheet.engine.formatting import format_expr

        return format_expr(built(self.form))

    def to_json(self) -> dict[str, Any]:
        data: dict[str, Any] = {}
        for item in fields(self):
            if item.name in ("record", "form", "detail"):
                continue
            if item.name == "symbolic_text":
                data["symbolic"] = self.symbolic
            else:
                data[item.name] = getattr(self, item.name)
        if data["plot"] is None:
            data.pop("plot")
        else:
            data["plot"] = data["plot"].to_json()
        if data["sampled"] is None:
            data.pop("sampled")
        else:
            data["sampled"] = data["sampled"].to_json()
        if data["uncertainty"] is None:
            data.pop("uncertainty")
        if data["imported"] is None:
            data.pop("imported")
        precision = data.pop("precision")
        if precision is not None:
            data["precision_loss"] = precision
        for key in ("value", "si_value", "uncertainty"):
            number = data.get(key)
            if isinstance(number, float) and not math.isfinite(number):
                data[key] = None  # JSON has no infinity; the record keeps the exact text
        return data

    @property
    def holds(self) -> bool:
        return self.status == "ok"
