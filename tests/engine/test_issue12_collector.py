"""Retyping one line, as in the app, leaves no garbage for the cyclic collector."""

from __future__ import annotations

import gc

from worksheet.engine import SheetEvaluator, SourceStatement, make_context


def test_issue12_retyping_a_line_leaves_nothing_behind_for_the_collector() -> None:
    # Each keystroke in the app is a new text for one line. The parses of texts no longer
    # in the sheet must go with them: kept, they outlive collections and make every full
    # collection rescan them (seen as a tenth of each statement's time).
    evaluator = SheetEvaluator(make_context())
    given = SourceStatement(1, "M = 5e11 [kg]")
    formula = "T_H = hbar*c^3/(8*pi*G*M*k_B) in [K]"

    def retype(times: int, start: int) -> None:
        for k in range(start, start + times):
            (_, result) = evaluator.run([given, SourceStatement(2, f"{formula}  # {k}")])
            assert result.status == "ok"

    retype(200, 0)
    collections: list[int] = []

    def count(phase: str, info: dict) -> None:
        if phase == "start":
            collections.append(info["generation"])

    gc.callbacks.append(count)
    try:
        retype(3000, 200)
    finally:
        gc.callbacks.remove(count)
    # Kept parses made about 140 collections here (one full one); freed at once, none.
    assert len(collections) < 10, collections
    assert evaluator.rerun == [1]  # still the changed-only path
