"""Unit names whose SI meaning is fixed by definition, resolved without pint.

Building pint's registry costs about as much as importing sympy, and most sheets (and every
constant of the datasets) use only the coherent SI units, their decimal multiples and a few
units with an exact SI definition. Those are answered from this table; every other name still
goes to pint. A test compares every entry with pint's own answer, so the two never disagree.
"""

from __future__ import annotations

from fractions import Fraction

from worksheet.units.dimension import Dimension

# Coherent SI units by their symbols (SI Brochure, 9th edition, tables 2 and 4).
_COHERENT: dict[str, Dimension] = {
    "m": Dimension.of(length=1),
    "s": Dimension.of(time=1),
    "A": Dimension.of(current=1),
    "K": Dimension.of(temperature=1),
    "mol": Dimension.of(amount=1),
    "cd": Dimension.of(luminous_intensity=1),
    "Hz": Dimension.of(time=-1),
    "N": Dimension.of(mass=1, length=1, time=-2),
    "Pa": Dimension.of(mass=1, length=-1, time=-2),
    "J": Dimension.of(mass=1, length=2, time=-2),
    "W": Dimension.of(mass=1, length=2, time=-3),
    "C": Dimension.of(current=1, time=1),
    "V": Dimension.of(mass=1, length=2, time=-3, current=-1),
    "F": Dimension.of(mass=-1, length=-2, time=4, current=2),
    "ohm": Dimension.of(mass=1, length=2, time=-3, current=-2),
    "S": Dimension.of(mass=-1, length=-2, time=3, current=2),
    "Wb": Dimension.of(mass=1, length=2, time=-2, current=-1),
    "T": Dimension.of(mass=1, time=-2, current=-1),
    "H": Dimension.of(mass=1, length=2, time=-2, current=-2),
}

# SI prefixes (SI Brochure, 9th edition, table 7), the ones pint also knows by these letters.
_PREFIXES: dict[str, Fraction] = {
    "Y": Fraction(10) ** 24,
    "Z": Fraction(10) ** 21,
    "E": Fraction(10) ** 18,
    "P": Fraction(10) ** 15,
    "T": Fraction(10) ** 12,
    "G": Fraction(10) ** 9,
    "M": Fraction(10) ** 6,
    "k": Fraction(10) ** 3,
    "c": Fraction(10) ** -2,
    "m": Fraction(10) ** -3,
    "u": Fraction(10) ** -6,
    "n": Fraction(10) ** -9,
    "p": Fraction(10) ** -12,
    "f": Fraction(10) ** -15,
    "a": Fraction(10) ** -18,
}

# Units with an exact SI definition (SI Brochure, 9th edition, table 8: eV from the exact
# elementary charge; the CGS erg is exactly 1e-7 J; the gram is 1e-3 kg).
_ELECTRONVOLT = Fraction(1602176634, 10**28)
_EXACT: dict[str, tuple[Fraction, Dimension, bool]] = {
    # name: (SI value, dimension, takes prefixes)
    "g": (Fraction(1, 1000), Dimension.of(mass=1), True),
    "eV": (_ELECTRONVOLT, Dimension.of(mass=1, length=2, time=-2), True),
    "erg": (Fraction(1, 10**7), Dimension.of(mass=1, length=2, time=-2), False),
    "sr": (Fraction(1), Dimension(), False),
    "rad": (Fraction(1), Dimension(), False),
    "hour": (Fraction(3600), Dimension.of(time=1), False),
    "minute": (Fraction(60), Dimension.of(time=1), False),
    "day": (Fraction(86400), Dimension.of(time=1), False),
}


def _table() -> dict[str, tuple[Fraction, Dimension]]:
    table: dict[str, tuple[Fraction, Dimension]] = {}
    for name, (value, dimension, prefixed) in _EXACT.items():
        table[name] = (value, dimension)
        if prefixed:
            for prefix, scale in _PREFIXES.items():
                table[prefix + name] = (scale * value, dimension)
    for name, dimension in _COHERENT.items():
        if name == "cd":
            continue  # pint reads "mcd" as a micro-day: prefixed candelas are left to it
        for prefix, scale in _PREFIXES.items():
            table.setdefault(prefix + name, (scale, dimension))
    for name, dimension in _COHERENT.items():
        table[name] = (Fraction(1), dimension)  # a bare symbol wins over prefix + symbol
    table["kg"] = (Fraction(1), Dimension.of(mass=1))
    return table


SI_NAMES: dict[str, tuple[Fraction, Dimension]] = _table()
"""Name -> (exact SI value of one unit, dimension)."""
