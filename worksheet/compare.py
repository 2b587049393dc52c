"""Which recorded quantities differ between two runs: two sheets, or one sheet's datasets.

Everything is read from the structured results (SI values, statuses), never from the
recorded text, and quantities are matched by name (a display by its text).
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from fractions import Fraction

from worksheet.engine import StatementResult
from worksheet.engine.formatting import format_number

DEFAULT_TOLERANCE = Fraction(1, 10**9)
_QUANTITY_KINDS = ("definition", "display", "check", "estimate")


@dataclass(frozen=True)
class Difference:
    """One quantity on both sides; ``relative`` is None where no ratio makes sense."""

    key: str
    old: str
    new: str
    relative: float | None
    differs: bool
    old_line: int | None
    new_line: int | None

    def to_json(self) -> dict[str, object]:
        relative = self.relative if self.relative is None or math.isfinite(self.relative) else None
        return {
            "quantity": self.key,
            "old": self.old,
            "new": self.new,
            "relative_change": relative,
            "differs": self.differs,
            "old_line": self.old_line,
            "new_line": self.new_line,
        }


def quantity_key(result: StatementResult) -> str | None:
    """How a result is matched across runs: its name, or the text of a display or claim."""
    if result.kind not in _QUANTITY_KINDS:
        return None
    if result.kind in ("display", "check") or result.name is None:
        return result.text
    return result.name


def shown(result: StatementResult | None, digits: int) -> str:
    """A side of the table: value and unit, a claim's verdict, or the status in words."""
    if result is None:
        return "(absent)"
    if result.kind == "check":
        return {"ok": "holds", "failed": "fails"}.get(result.status, result.status)
    if result.status != "ok":
        return result.status
    if result.value is not None:
        unit = f" {result.unit}" if result.unit else ""
        return format_number(result.value, digits) + unit
    return result.symbolic or "(no value)"


def relative_change(old: float, new: float) -> float:
    """(new - old) / |old|; infinite when only old is zero.

    >>> relative_change(2.0, 2.5)
    0.25
    """
    if old == new:
        return 0.0
    if old == 0:
        return math.inf
    return (new - old) / abs(old)


def compare_results(
    old: tuple[StatementResult, ...] | list[StatementResult],
    new: tuple[StatementResult, ...] | list[StatementResult],
    tolerance: Fraction = DEFAULT_TOLERANCE,
    digits: int = 4,
) -> list[Difference]:
    """Every quantity of either run, in the old run's order, then the new-only ones."""
    old_by = {k: r for r in old if (k := quantity_key(r)) is not None}
    new_by = {k: r for r in new if (k := quantity_key(r)) is not None}
    keys = list(old_by) + [k for k in new_by if k not in old_by]
    rows: list[Difference] = []
    for key in keys:
        a, b = old_by.get(key), new_by.get(key)
        relative, differs = _judge(a, b, float(tolerance))
        rows.append(
            Difference(
                key,
                shown(a, digits),
                shown(b, digits),
                relative,
                differs,
                a.line if a else None,
                b.line if b else None,
            )
        )
    return rows


def _judge(
    a: StatementResult | None, b: StatementResult | None, tolerance: float
) -> tuple[float | None, bool]:
    if a is None or b is None:
        return None, True
    if a.kind == "check" or b.kind == "check":
        return None, a.status != b.status
    if a.status != "ok" or b.status != "ok":
        return None, a.status != b.status or a.message != b.message
    if a.si_value is None or b.si_value is None:
        return None, a.symbolic != b.symbolic or (a.si_value is None) != (b.si_value is None)
    if a.dimension != b.dimension:
        return None, True
    change = relative_change(a.si_value, b.si_value)
    return change, not abs(change) <= tolerance


def format_relative(change: float | None) -> str:
    """``+2.5e-5``, ``0``, ``inf`` or a dash where no ratio applies.

    >>> format_relative(-2.51e-5), format_relative(0.0), format_relative(None)
    ('-2.510e-5', '0', '-')
    """
    if change is None:
        return "-"
    if change == 0:
        return "0"
    if not math.isfinite(change):
        return "inf"
    sign = "+" if change > 0 else "-"
    return sign + format_number(abs(change), 4)


def format_table(rows: list[Difference], everything: bool = False) -> str:
    """A fixed-width table of the differing rows (or of all rows, with a verdict column)."""
    chosen = [row for row in rows if everything or row.differs]
    if not chosen:
        return ""
    header = ["quantity", "old", "new", "relative change"]
    body = [[row.key, row.old, row.new, format_relative(row.relative)] for row in chosen]
    if everything:
        header.append("verdict")
        for line, row in zip(body, chosen, strict=True):
            line.append("differs" if row.differs else "agrees")
    widths = [max(len(line[i]) for line in [header, *body]) for i in range(len(header))]
    out = [
        "  ".join(cell.ljust(width) for cell, width in zip(line, widths, strict=True)).rstrip()
        for line in [header, *body]
    ]
    out.insert(1, "  ".join("-" * width for width in widths))
    return "\n".join(out) + "\n"
