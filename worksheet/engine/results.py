"""What evaluating a statement records: one frozen result per statement."""

from __future__ import annotations

import math
from dataclasses import asdict, dataclass
from typing import Any


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
    symbolic: str | None = None
    uncertainty: float | None = None
    record: str | None = None
    precision: str | None = None  # set when the precision guard found a loss: why
    plot: Any = None  # PlotData for 'plot' statements

    def to_json(self) -> dict[str, Any]:
        data = asdict(self)
        data.pop("record")
        if data["plot"] is None:
            data.pop("plot")
        if data["uncertainty"] is None:
            data.pop("uncertainty")
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
