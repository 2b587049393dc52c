"""quick_init keeps a frozen dataclass's constructor as it was, only quicker."""

from __future__ import annotations

import dataclasses
import inspect

import pytest

from worksheet.engine.figures import Figures
from worksheet.engine.results import StatementResult
from worksheet.engine.statements import Quantity
from worksheet.engine.translate import Typed
from worksheet.frozen_init import quick_init


@dataclasses.dataclass(frozen=True)
class _Generated:
    a: int
    b: str = "b"
    c: object = None
    d: int = dataclasses.field(default=4, kw_only=True)
    e: list = dataclasses.field(default_factory=list)


@quick_init
@dataclasses.dataclass(frozen=True)
class _Quick:
    a: int
    b: str = "b"
    c: object = None
    d: int = dataclasses.field(default=4, kw_only=True)
    e: list = dataclasses.field(default_factory=list)


def test_issue12_quick_init_takes_the_same_arguments_and_builds_the_same_instance() -> None:
    quick = inspect.signature(_Quick).parameters.values()
    generated = inspect.signature(_Generated).parameters.values()
    assert [(p.name, p.kind) for p in quick] == [(p.name, p.kind) for p in generated]
    plain_defaults = [p.default for p in generated if p.name != "e"]
    assert [p.default for p in quick if p.name != "e"] == plain_defaults
    for args, kwargs in [((1,), {}), ((1, "x"), {"d": 9}), ((1,), {"c": [2], "b": "y"})]:
        quick, generated = _Quick(*args, **kwargs), _Generated(*args, **kwargs)
        assert vars(quick) == vars(generated)
    assert _Quick(1).e == [] and _Quick(1).e is not _Quick(1).e  # a fresh list each time
    assert _Quick(1, e=[3]).e == [3]
    with pytest.raises(TypeError):
        _Quick(1, "x", None, [], 5)  # type: ignore[misc]  # d is keyword-only
    with pytest.raises(TypeError):
        _Quick()  # type: ignore[call-arg]
    with pytest.raises(dataclasses.FrozenInstanceError):
        _Quick(1).a = 2  # type: ignore[misc]


@pytest.mark.parametrize("cls", [StatementResult, Quantity, Figures, Typed])
def test_issue12_the_engine_classes_keep_their_fields(cls) -> None:
    params = inspect.signature(cls).parameters
    assert list(params) == [item.name for item in dataclasses.fields(cls)]


def test_issue12_quick_init_refuses_what_it_cannot_copy() -> None:
    @dataclasses.dataclass(frozen=True)
    class NotInInit:
        a: int = dataclasses.field(default=0, init=False)

    @dataclasses.dataclass(frozen=True)
    class WithPostInit:
        a: int

        def __post_init__(self) -> None:
            pass

    @dataclasses.dataclass(frozen=True, slots=True)
    class WithSlots:
        a: int

    @dataclasses.dataclass
    class NotFrozen:
        a: int

    for cls in (NotInInit, WithPostInit, WithSlots, NotFrozen):
        with pytest.raises(TypeError):
            quick_init(cls)
