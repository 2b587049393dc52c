"""The pinned constants datasets: their data classes, the data-file parser and the loader.

A dataset is one CODATA file plus the shared astronomical file ``iau.txt``, shipped as package
data. Values stay the decimal strings of the publication; floats are derived on demand, so
nothing is rounded on the way in.
"""

from __future__ import annotations

import re
from collections.abc import Mapping, Sequence
from dataclasses import dataclass, field
from decimal import Decimal, localcontext
from functools import cache
from importlib import resources
from pathlib import Path
from types import MappingProxyType

from worksheet.errors import ConstantsError

DATASET_NAMES: tuple[str, ...] = ("CODATA2018", "CODATA2022")
DEFAULT_DATASET = "CODATA2022"

_PACKAGE = "worksheet.constants"
_ASTRONOMY_FILE = "iau.txt"
_ASTRONOMY_TITLE = "IAU 2015 Resolution B3 and IAU 2012 Resolution B2 astronomical values"
_CODATA_FILES: Mapping[str, tuple[str, str]] = MappingProxyType(
    {
        "CODATA2018": ("codata2018.txt", "CODATA 2018 (NIST, web version 8.1, 2020)"),
        "CODATA2022": ("codata2022.txt", "CODATA 2022 (NIST, web version 9.0, 2024)"),
    }
)

# Digits kept for values computed at load time (GM / G): enough to round-trip a float.
_COMPUTED_DIGITS = 17
# A column holding "-" is filled in by the loader (see the header of iau.txt).
_FILLED_IN = "-"
_CONSTANT_COLUMNS = ("symbol", "name", "value", "uncertainty", "unit", "exact", "source", "note")
_UNIT_COLUMNS = ("symbol", "name", "value", "unit", "exact", "source", "note")
_SECTIONS = ("constants", "units")

_SYMBOL = re.compile(r"[A-Za-z][A-Za-z0-9_]*\Z")
_DECIMAL = re.compile(r"[+-]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?\Z")
_RATIO = re.compile(r"([A-Za-z][A-Za-z0-9_]*)\s*/\s*([A-Za-z][A-Za-z0-9_]*)\Z")
_SECTION = re.compile(r"\[\s*([A-Za-z]+)\s*\]\Z")
_SI_SYMBOLS = frozenset(
    ("m", "kg", "s", "A", "K", "mol", "cd", "J", "W", "N", "C", "V", "F", "T", "Pa", "Hz", "ohm")
)
_UNIT_TOKEN = re.compile(r"\s*(?:([A-Za-z]+)|(\d+)|([*/^()\-]))")


@dataclass(frozen=True)
class Constant:
    """One constant of a dataset, with the published digits and where they come from.

    ``value`` and ``uncertainty`` are decimal strings in the SI unit ``unit``, so the SI
    value is simply their float.
    """

    symbol: str
    name: str
    value: str
    uncertainty: str
    unit: str
    exact: bool
    source: str
    note: str

    @property
    def si_value(self) -> float:
        """The value as a float in SI units (the unit column is always SI)."""
        return float(self.value)

    @property
    def si_uncertainty(self) -> float:
        """The standard uncertainty as a float in SI units; 0.0 when exact."""
        return float(self.uncertainty)

    @property
    def relative_uncertainty(self) -> float:
        """Standard uncertainty over magnitude, what propagation to first order needs."""
        if self.exact:
            return 0.0
        return float(Decimal(self.uncertainty) / abs(Decimal(self.value)))


@dataclass(frozen=True)
class UnitDefinition:
    """An astronomical unit a sheet may write inside brackets, defined in SI units."""

    symbol: str
    name: str
    value: str
    unit: str
    exact: bool
    source: str
    note: str

    @property
    def si_value(self) -> float:
        """Size of one of this unit in the SI unit ``unit``."""
        return float(self.value)


@dataclass(frozen=True)
class Dataset:
    """A pinned set of constants and astronomical units, each with its provenance."""

    name: str
    title: str
    constants: Mapping[str, Constant] = field(hash=False)
    units: Mapping[str, UnitDefinition] = field(hash=False)

    def find(self, word: str) -> list[Constant]:
        """Constants whose symbol or name contains ``word`` (any case), in file order.

        >>> [c.symbol for c in load_dataset("CODATA2022").find("gravitation")]
        ['G']
        """
        needle = word.strip().casefold()
        return [
            constant
            for constant in self.constants.values()
            if needle in constant.symbol.casefold() or needle in constant.name.casefold()
        ]


def load_dataset(name: str) -> Dataset:
    """The dataset called ``name`` (any letter case), read from package data on first use.

    Raises:
        ConstantsError: ``name`` is not one of ``DATASET_NAMES``, or a data file is broken.

    >>> load_dataset("CODATA2018").constants["G"].value
    '6.67430e-11'
    """
    wanted = name.strip().upper()
    for known in DATASET_NAMES:
        if known.upper() == wanted:
            return _load_packaged(known)
    raise ConstantsError(
        f"unknown constants dataset {name!r}; choose one of {', '.join(DATASET_NAMES)}"
    )


@cache
def _load_packaged(name: str) -> Dataset:
    """Read and parse one packaged dataset; cached because the result is immutable."""
    codata_file, codata_title = _CODATA_FILES[name]
    files = [(label, _package_text(label)) for label in (codata_file, _ASTRONOMY_FILE)]
    return parse_dataset_text(name, f"{codata_title}, with {_ASTRONOMY_TITLE}", files)


def _package_text(filename: str) -> str:
    try:
        return resources.files(_PACKAGE).joinpath(filename).read_text(encoding="utf-8")
    except (OSError, UnicodeDecodeError) as err:
        raise ConstantsError(f"cannot read the packaged data file {filename}: {err}") from err


def read_dataset_files(name: str, title: str, paths: Sequence[Path | str]) -> Dataset:
    """Parse data files from disk, in order (a later file may use an earlier one's symbols).

    Raises:
        ConstantsError: a file cannot be read as UTF-8 text, or a line is malformed.
    """
    files = []
    for path in map(Path, paths):
        try:
            files.append((path.name, path.read_text(encoding="utf-8")))
        except (OSError, UnicodeDecodeError) as err:
            raise ConstantsError(f"cannot read the data file {path.name}: {err}") from err
    return parse_dataset_text(name, title, files)


def parse_dataset_text(name: str, title: str, files: Sequence[tuple[str, str]]) -> Dataset:
    """Build a dataset from ``(label, text)`` pairs in the data-file format.

    ``label`` names the file in error messages. Files are read in order, so a later file
    may compute values from constants of an earlier one (``GM_sun / G``).

    Raises:
        ConstantsError: a line is malformed; ``line`` is its 1-based number in its file.

    >>> text = "c | speed of light in vacuum | 299792458 | 0 | m/s | exact | CODATA 2022"
    >>> parse_dataset_text("demo", "a demo", [("demo.txt", text)]).constants["c"].si_value
    299792458.0
    """
    constants: dict[str, Constant] = {}
    units: dict[str, UnitDefinition] = {}
    for label, text in files:
        section = "constants"
        for number, raw in enumerate(text.splitlines(), start=1):
            line = raw.strip()
            if not line or line.startswith("#"):
                continue
            try:
                if line.startswith("["):
                    section = _section_name(line)
                elif section == "constants":
                    constant = _parse_constant(_cells(line, _CONSTANT_COLUMNS), constants)
                    _refuse_twice(constant.symbol, constants, "constant")
                    constants[constant.symbol] = constant
                else:
                    unit = _parse_unit(_cells(line, _UNIT_COLUMNS), constants)
                    _refuse_twice(unit.symbol, units, "unit")
                    units[unit.symbol] = unit
            except ConstantsError as err:
                raise ConstantsError(f"{label}: {err.message}", line=number) from err
    return Dataset(name, title, MappingProxyType(constants), MappingProxyType(units))


def _refuse_twice(symbol: str, table: Mapping[str, object], kind: str) -> None:
    if symbol in table:
        raise ConstantsError(f"{kind} {symbol} is defined twice")


def _section_name(line: str) -> str:
    match = _SECTION.match(line)
    if match is None or match.group(1) not in _SECTIONS:
        raise ConstantsError(f"unknown section {line}; expected [constants] or [units]")
    return match.group(1)


def _cells(line: str, columns: tuple[str, ...]) -> dict[str, str]:
    """Split a data line into named cells; the last column (the note) may be left off."""
    cells = [cell.strip() for cell in line.split("|")]
    if len(cells) not in (len(columns) - 1, len(columns)):
        raise ConstantsError(
            f"expected {len(columns)} columns separated by '|' "
            f"({' | '.join(columns)}), found {len(cells)}"
        )
    named = dict(zip(columns, [*cells, ""], strict=False))
    for column in ("symbol", "name", "value", "unit", "exact", "source"):
        if not named[column]:
            raise ConstantsError(f"the {column} column is empty")
    if not _SYMBOL.match(named["symbol"]):
        raise ConstantsError(
            f"symbol {named['symbol']!r} must be a letter followed by letters, digits or _"
        )
    return named


def _parse_constant(cells: dict[str, str], known: Mapping[str, Constant]) -> Constant:
    ratio = _RATIO.match(cells["value"])
    if ratio is not None:
        return _computed_ratio(cells, ratio.group(1), ratio.group(2), known)
    value = _decimal(cells["value"], "value")
    uncertainty = _decimal(cells["uncertainty"], "uncertainty")
    if uncertainty < 0:
        raise ConstantsError(f"uncertainty {cells['uncertainty']} is negative")
    exact = _exactness(cells["exact"])
    if exact != (uncertainty == 0):
        raise ConstantsError(
            "an exact constant has uncertainty 0 and a measured one a positive uncertainty; "
            f"found {cells['exact']} with uncertainty {cells['uncertainty']}"
        )
    if value == 0:
        raise ConstantsError("value is zero")
    return Constant(
        symbol=cells["symbol"],
        name=cells["name"],
        value=cells["value"],
        uncertainty=cells["uncertainty"],
        unit=_checked_unit(cells["unit"]),
        exact=exact,
        source=cells["source"],
        note=cells["note"],
    )


def _computed_ratio(
    cells: dict[str, str], top: str, bottom: str, known: Mapping[str, Constant]
) -> Constant:
    """A constant written ``A / B``: its value, uncertainty and exactness from A and B.

    The relative uncertainties of A and B (taken as independent) add in quadrature.
    """
    numerator, denominator = _defined(top, known, cells), _defined(bottom, known, cells)
    for column in ("uncertainty", "exact"):
        if cells[column] != _FILLED_IN:
            raise ConstantsError(
                f"a computed value ({cells['value']}) takes its {column} from its operands; "
                f"write {_FILLED_IN!r} in that column"
            )
    with localcontext() as context:
        context.prec = _COMPUTED_DIGITS
        value = Decimal(numerator.value) / Decimal(denominator.value)
        relative = (_relative(numerator) ** 2 + _relative(denominator) ** 2).sqrt()
        uncertainty = abs(value) * relative
    source = cells["source"]
    for operand in (numerator, denominator):
        if operand.source != cells["source"]:
            source += f"; {operand.symbol} from {operand.source}"
    return Constant(
        symbol=cells["symbol"],
        name=cells["name"],
        value=_e_notation(value),
        uncertainty=_e_notation(uncertainty) if uncertainty else "0",
        unit=_checked_unit(cells["unit"]),
        exact=uncertainty == 0,
        source=source,
        note=cells["note"],
    )


def _defined(symbol: str, known: Mapping[str, Constant], cells: dict[str, str]) -> Constant:
    if symbol not in known:
        raise ConstantsError(f"{cells['value']}: {symbol} is not defined above this line")
    return known[symbol]


def _relative(constant: Constant) -> Decimal:
    return Decimal(constant.uncertainty) / abs(Decimal(constant.value))


def _e_notation(number: Decimal) -> str:
    """``1.9884098706980504e30``: all computed digits, exponent without ``+`` or padding."""
    mantissa, _, exponent = f"{number:.{_COMPUTED_DIGITS - 1}e}".partition("e")
    return f"{mantissa}e{int(exponent)}"


def _parse_unit(cells: dict[str, str], known: Mapping[str, Constant]) -> UnitDefinition:
    if _SYMBOL.match(cells["value"]):
        return _unit_from_constant(cells, known.get(cells["value"]))
    value = _decimal(cells["value"], "value")
    if value <= 0:
        raise ConstantsError(f"a unit must have a positive size, found {cells['value']}")
    return UnitDefinition(
        symbol=cells["symbol"],
        name=cells["name"],
        value=cells["value"],
        unit=_checked_unit(cells["unit"]),
        exact=_exactness(cells["exact"]),
        source=cells["source"],
        note=cells["note"],
    )


def _unit_from_constant(cells: dict[str, str], constant: Constant | None) -> UnitDefinition:
    if constant is None:
        raise ConstantsError(f"value {cells['value']} names no constant defined above")
    for column in ("unit", "exact", "source"):
        if cells[column] != _FILLED_IN:
            raise ConstantsError(
                f"a unit equal to the constant {constant.symbol} takes its {column} from it; "
                f"write {_FILLED_IN!r} in that column"
            )
    return UnitDefinition(
        symbol=cells["symbol"],
        name=cells["name"],
        value=constant.value,
        unit=constant.unit,
        exact=constant.exact,
        source=constant.source,
        note=cells["note"],
    )


def _decimal(text: str, column: str) -> Decimal:
    if not _DECIMAL.match(text):
        raise ConstantsError(f"{column} {text!r} is not a decimal number like 6.67430e-11")
    return Decimal(text)


def _exactness(text: str) -> bool:
    if text not in ("exact", "measured"):
        raise ConstantsError(f"expected 'exact' or 'measured', found {text!r}")
    return text == "exact"


def _checked_unit(text: str) -> str:
    """Refuse unit text outside the small SI syntax the data files promise."""
    _UnitSyntax(text).check()
    return text


class _UnitSyntax:
    """Recursive descent over ``product := power (('*'|'/') power)*``.

    ``power := atom ('^' '-'? INTEGER)?`` and ``atom := SI_SYMBOL | '1' | '(' product ')'``.
    """

    def __init__(self, text: str) -> None:
        self.text = text
        self.tokens = self._tokenize(text)
        self.position = 0

    def _tokenize(self, text: str) -> list[str]:
        tokens: list[str] = []
        position = 0
        while position < len(text.rstrip()):
            match = _UNIT_TOKEN.match(text, position)
            if match is None:
                raise self._error(f"unexpected character {text[position:].lstrip()[0]!r}")
            tokens.append(match.group(match.lastindex or 0))
            position = match.end()
        return tokens

    def _error(self, reason: str) -> ConstantsError:
        return ConstantsError(f"unit {self.text!r}: {reason}")

    def _peek(self) -> str | None:
        return self.tokens[self.position] if self.position < len(self.tokens) else None

    def _take(self) -> str:
        token = self._peek()
        if token is None:
            raise self._error("ends too early")
        self.position += 1
        return token

    def check(self) -> None:
        self._product()
        if self._peek() is not None:
            raise self._error(f"unexpected {self._peek()!r}")

    def _product(self) -> None:
        self._power()
        while self._peek() in ("*", "/"):
            self._take()
            self._power()

    def _power(self) -> None:
        self._atom()
        if self._peek() == "^":
            self._take()
            exponent = self._take()
            if exponent == "-":
                exponent = self._take()
            if not exponent.isdigit():
                raise self._error(f"exponent {exponent!r} is not an integer")

    def _atom(self) -> None:
        token = self._take()
        if token == "(":
            self._product()
            if self._take() != ")":
                raise self._error("a parenthesis is not closed")
        elif token != "1" and token not in _SI_SYMBOLS:
            raise self._error(
                f"{token!r} is not one of the SI symbols {' '.join(sorted(_SI_SYMBOLS))} or 1"
            )
