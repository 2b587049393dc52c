"""The listing of ``worksheet constants``: JSON records and the text table."""

from __future__ import annotations

import json

import pytest
import scipy.constants

from worksheet.constants import (
    DATASET_NAMES,
    Constant,
    constant_record,
    format_constants_table,
    load_dataset,
)

# SPEC section 5: `constants ... --json` prints a list of these keys, in this order.
SPEC_KEYS = ["symbol", "name", "value", "uncertainty", "unit", "si_value", "exact", "source"]
# The table's columns, as the task asks for them.
HEADERS = ["symbol", "value", "uncertainty", "unit", "name", "source"]


@pytest.mark.parametrize("name", DATASET_NAMES)
def test_record_keys_exactly_as_spec(name: str) -> None:
    for constant in load_dataset(name).constants.values():
        record = constant_record(constant)
        assert list(record) == SPEC_KEYS
        assert isinstance(record["value"], float)
        assert isinstance(record["uncertainty"], float)
        assert isinstance(record["si_value"], float)
        assert isinstance(record["exact"], bool)
        json.dumps(record)  # plain JSON types only


@pytest.mark.parametrize(
    ("symbol", "scipy_key"),
    [
        # a measured constant: value and uncertainty as floats
        ("G", "Newtonian constant of gravitation"),
        # an exact constant: uncertainty 0.0
        ("k_B", "Boltzmann constant"),
    ],
)
def test_record_values_against_scipy(symbol: str, scipy_key: str) -> None:
    # scipy.constants.physical_constants is CODATA 2022, the default dataset's year.
    value, _unit, uncertainty = scipy.constants.physical_constants[scipy_key]
    record = constant_record(load_dataset("CODATA2022").constants[symbol])
    assert record["value"] == record["si_value"] == value
    assert record["uncertainty"] == uncertainty
    assert record["exact"] == (uncertainty == 0)
    assert record["name"] == scipy_key
    assert str(record["source"]).startswith("CODATA 2022")


def _rows(table: str) -> list[str]:
    """The table's constant rows: after the header and its rule, up to the blank line."""
    lines = table.splitlines()
    end = lines.index("") if "" in lines else len(lines)
    return lines[2:end]


@pytest.mark.parametrize("name", DATASET_NAMES)
def test_table_has_every_symbol_once_in_order(name: str) -> None:
    constants = list(load_dataset(name).constants.values())
    table = format_constants_table(constants)
    assert [row.split()[0] for row in _rows(table)] == [c.symbol for c in constants]


def test_table_is_deterministic_and_ends_with_newline() -> None:
    constants = load_dataset("CODATA2022").find("")
    first = format_constants_table(constants)
    assert first == format_constants_table(list(constants))
    assert first.endswith("\n") and not first.endswith("\n\n")


def test_table_header_and_columns_line_up() -> None:
    constants = load_dataset("CODATA2022").find("")
    lines = format_constants_table(constants).splitlines()
    assert lines[0].split() == HEADERS
    # Every row's value starts in the header's value column.
    start = lines[0].index("value")
    for row, constant in zip(_rows("\n".join(lines)), constants, strict=True):
        assert row[start:].startswith(constant.value + " ")
    # No trailing blanks anywhere.
    assert all(line == line.rstrip() for line in lines)


@pytest.mark.parametrize(
    ("symbol", "shown"),
    [
        # exact constants say so instead of a zero uncertainty
        ("c", "exact"),
        # a published uncertainty is shown as published (two significant figures)
        ("G", "1.5e-15"),
        # a computed uncertainty (GM_sun / G) is rounded to two significant figures:
        # 1.98841e30 kg x 1.5e-15 / 6.67430e-11 = 4.47e25 kg
        ("M_sun", "4.5e25"),
    ],
)
def test_table_uncertainty_column(symbol: str, shown: str) -> None:
    constant = load_dataset("CODATA2022").constants[symbol]
    row = _rows(format_constants_table([constant]))[0]
    assert row.split()[:4] == [symbol, constant.value, shown, constant.unit]


def test_table_lists_full_sources_once() -> None:
    dataset = load_dataset("CODATA2018")
    table = format_constants_table([dataset.constants["G"], dataset.constants["m_e"]])
    assert table.count("CODATA 2018 (NIST, web version 8.1, 2020)") == 1
    assert "sources:" in table


def test_empty_table_is_just_the_header() -> None:
    table = format_constants_table([])
    assert table.splitlines()[0].split() == HEADERS
    assert len(table.splitlines()) == 2 and table.endswith("\n")


def test_table_accepts_any_constant() -> None:
    # A constant made here, not from a data file: the table does not depend on the loader.
    made = Constant("x_0", "a made-up length", "1.25", "0.5", "m", False, "this test", "")
    row = _rows(format_constants_table([made]))[0]
    assert row.split()[:4] == ["x_0", "1.25", "5.0e-1", "m"]
