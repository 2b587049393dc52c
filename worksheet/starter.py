"""The starter sheet that ``worksheet new`` writes: pinned, one note, one calc cell."""

from __future__ import annotations

from worksheet.document import new_sheet_text

STARTER_NOTE = (
    "Notes in Markdown go between the calc cells. Units always go in square brackets;\n"
    "`worksheet check` re-runs the sheet and compares it with the recorded results."
)
STARTER_CELL = (
    "M = 1e12 [kg]                      # a mass to start from (edit it)\n"
    "r_s = 2*G*M/c^2 in [fm]            # Schwarzschild radius\n"
    "check r_s > 0 [m]"
)


def starter_sheet_text(title: str, dataset: str) -> str:
    """A fresh sheet's text, before its results are recorded.

    >>> "constants: CODATA2018" in starter_sheet_text("Trial", "CODATA2018")
    True
    """
    text = new_sheet_text(title, dataset, 4)
    text = text.replace("Notes in Markdown go between the calc cells.", STARTER_NOTE, 1)
    head, sep, tail = text.rpartition("```calc\n")
    return head + sep + STARTER_CELL + "\n" + tail
