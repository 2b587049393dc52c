"""StatementResult's written-out __init__ stays in step with its dataclass fields."""

from __future__ import annotations

import dataclasses
import inspect

import pytest

from worksheet.engine.results import StatementResult


def test_issue12_the_parameters_are_the_fields_with_their_defaults() -> None:
    params = list(inspect.signature(StatementResult).parameters.values())
    fields = dataclasses.fields(StatementResult)
    assert [p.name for p in params] == [f.name for f in fields]
    for param, item in zip(params, fields, strict=True):
        expected = inspect.Parameter.empty if item.default is dataclasses.MISSING else item.default
        assert param.default is expected, item.name
        assert item.default_factory is dataclasses.MISSING  # the written init has none


def test_issue12_every_field_is_set_and_the_result_stays_frozen() -> None:
    names = [f.name for f in dataclasses.fields(StatementResult)]
    values = {name: f"<{name}>" for name in names}
    result = StatementResult(**values)
    assert {name: getattr(result, name) for name in names} == values
    assert vars(result) == values  # nothing more, nothing less
    assert result == StatementResult(**values)
    with pytest.raises(dataclasses.FrozenInstanceError):
        result.line = 2  # type: ignore[misc]
    with pytest.raises(TypeError):
        StatementResult(1, "definition", "x")  # type: ignore[call-arg]  # status is required
