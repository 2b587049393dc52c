"""What ``worksheet constants`` prints: one JSON record per constant, or a plain text table."""

from __future__ import annotations

import re
from collections.abc import Sequence
from decimal import Decimal

from worksheet.constants.dataset import Constant

_HEADERS = ("symbol", "value", "uncertainty", "unit", "name", "source")
_GAP = "  "
# Publication details in parentheses move to the list of sources under the table.
_DETAILS = re.compile(r"\s*\([^()]*\)")


def constant_record(c: Constant) -> dict[str, str | float | bool]:
    """The JSON object of SPEC section 5 for one constant, keys in the documented order.

    ``value`` and ``si_value`` agree because the data files are written in SI units.

    >>> from worksheet.constants.dataset import load_dataset
    >>> constant_record(load_dataset("CODATA2022").constants["c"])["si_value"]
    299792458.0
    """
    return {
        "symbol": c.symbol,
        "name": c.name,
        "value": c.si_value,
        "uncertainty": c.si_uncertainty,
        "unit": c.unit,
        "si_value": c.si_value,
        "exact": c.exact,
        "source": c.source,
    }


def format_constants_table(constants: Sequence[Constant]) -> str:
    """A fixed-width table, one constant a row, then the full sources it cites.

    The source column shows each source without its parenthesised details so rows stay
    readable in a terminal; the details follow under the table, each source once.
    Values are the published digits; uncertainties are shown to two significant figures.
    """
    rows = [_HEADERS]
    rows.extend(
        (c.symbol, c.value, _uncertainty_text(c), c.unit, c.name, _short_source(c.source))
        for c in constants
    )
    widths = [max(len(row[column]) for row in rows) for column in range(len(_HEADERS))]
    lines = [_line(rows[0], widths), _line(tuple("-" * width for width in widths), widths)]
    lines.extend(_line(row, widths) for row in rows[1:])
    sources = list(dict.fromkeys(c.source for c in constants))
    if sources:
        lines.append("")
        lines.append("sources:")
        lines.extend(f"  {source}" for source in sources)
    return "\n".join(lines) + "\n"


def _line(cells: Sequence[str], widths: Sequence[int]) -> str:
    return _GAP.join(cell.ljust(width) for cell, width in zip(cells, widths, strict=True)).rstrip()


def _uncertainty_text(c: Constant) -> str:
    """``exact``, or the standard uncertainty to two significant figures (``1.5e-15``)."""
    if c.exact:
        return "exact"
    mantissa, _, exponent = f"{Decimal(c.uncertainty):.1e}".partition("e")
    return f"{mantissa}e{int(exponent)}"


def _short_source(source: str) -> str:
    return _DETAILS.sub("", source).strip()
