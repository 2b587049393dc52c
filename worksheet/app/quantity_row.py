"""One row of the quantity ledger, as plain data: the screen needs it before the engine loads."""

from __future__ import annotations

from dataclasses import dataclass


@dataclass(frozen=True)
class QuantityRow:
    """One line of the quantity ledger; ``line`` is None for a constant of the dataset."""

    name: str
    value: str
    unit: str
    dimension: str
    origin: str
    line: int | None
    reads: tuple[tuple[str, int], ...]  # (name, line of its definition)
    read_by: tuple[int, ...]  # lines of statements that use it
    uncertainty: str = ""  # standard uncertainty in the row's unit; "" when none, "exact"
    source: str = ""  # where a constant's value is published

    @property
    def shown_value(self) -> str:
        """``value +- uncertainty unit`` as the ledger shows it (the sheet's own ``+-``)."""
        spread = f" +- {self.uncertainty}" if self.uncertainty not in ("", "exact") else ""
        return f"{self.value}{spread} {self.unit}".strip()
