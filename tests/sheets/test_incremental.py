"""The incremental API: after one edit only the statements that depend on it re-run."""

from __future__ import annotations

import pytest

from worksheet.engine import SheetEvaluator, make_context, split_statements
from worksheet.engine.statements import StatementEvaluator

BODY = """M = 5e11 [kg]
a = 3 [m]
r_s = 2*G*M/c^2
b = a*2
T_H = hbar*c^3/(8*pi*G*M*k_B)
check T_H > 1 [K]
c2 = b + 1 [m]
"""


@pytest.fixture
def counted(monkeypatch):
    seen: list[int] = []
    original = StatementEvaluator.evaluate

    def counting(self, stmt):
        seen.append(stmt.line)
        return original(self, stmt)

    monkeypatch.setattr(StatementEvaluator, "evaluate", counting)
    return seen


def test_issue3_only_dependents_recompute(counted) -> None:
    context = make_context()
    try:
        evaluator = SheetEvaluator(context)
        first = evaluator.run(split_statements(BODY, 1))
        assert len(counted) == 7
        counted.clear()
        edited = BODY.replace("M = 5e11 [kg]", "M = 1e12 [kg]")
        second = evaluator.run(split_statements(edited, 1))
        # M (line 1) and its dependents r_s (3), T_H (5) and the check on T_H (6).
        assert sorted(counted) == [1, 3, 5, 6]
        # Untouched statements keep the very same result objects.
        assert second[1] is first[1] and second[3] is first[3] and second[6] is first[6]
        assert second[4].record.startswith("T_H = 1.227e11 +- ")  # G's uncertainty rides along
        counted.clear()
        # An edit that breaks a given makes its dependents skipped, and fixing it restores them.
        broken_text = edited.replace("a = 3 [m]", "a = 3 [m] + 1 [s]")
        broken = evaluator.run(split_statements(broken_text, 1))
        assert broken[1].status == "error"
        assert broken[3].status == "skipped" and "depends on line 2" in broken[3].message
        assert broken[6].status == "skipped"
        assert sorted(counted) == [2]  # the dependents were not evaluated, only marked
        restored = evaluator.run(split_statements(BODY, 1))
        assert [r.status for r in restored] == ["ok"] * 7
    finally:
        context.worker.close()
