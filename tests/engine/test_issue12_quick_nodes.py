"""The parser's quick node constructors build the same frozen nodes as the dataclasses."""

from __future__ import annotations

import dataclasses
from fractions import Fraction

import pytest

from worksheet.syntax import tree as t
from worksheet.syntax.units import parse_unit

X = t.Name("x", line=1, column=1)
CASES = [
    (t.BinOp, t.binop, ("*", X, X)),
    (t.Name, t.name, ("M_b",)),
    (t.Number, t.number, (Fraction(3, 2), "1.5")),
    (t.Power, t.power, (X, X)),
    (t.Unit, t.unit, (parse_unit("kg/s"),)),
]


@pytest.mark.parametrize(("cls", "quick", "args"), CASES, ids=lambda c: getattr(c, "__name__", ""))
def test_issue12_quick_nodes_equal_the_dataclass_nodes(cls, quick, args) -> None:
    slow, fast = cls(*args, line=3, column=7), quick(*args, 3, 7)
    assert type(fast) is cls
    assert fast == slow and hash(fast) == hash(slow) and repr(fast) == repr(slow)
    assert vars(fast) == vars(slow)  # every field, the defaulted text included
    assert (fast.line, fast.column, fast.text) == (3, 7, "")
    with pytest.raises(dataclasses.FrozenInstanceError):
        fast.line = 4  # type: ignore[misc]
