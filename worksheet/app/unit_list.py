"""Common SI and physics units the constants finder offers, chosen by hand for this app.

Each entry is the bracket text and the words it is found by (its name and what it
measures). Every symbol is one the sheet's unit registry resolves; a test checks that,
and that the measured quantity's dimension matches the word given here.
"""

from __future__ import annotations

COMMON_UNITS: tuple[tuple[str, str, str], ...] = (
    # (symbol, name, dimension word as the engine names it)
    ("m", "metre", "length"),
    ("km", "kilometre", "length"),
    ("cm", "centimetre", "length"),
    ("nm", "nanometre", "length"),
    ("fm", "femtometre", "length"),
    ("kg", "kilogram", "mass"),
    ("g", "gram", "mass"),
    ("s", "second", "time"),
    ("ms", "millisecond", "time"),
    ("hour", "hour", "time"),
    ("day", "day", "time"),
    ("K", "kelvin", "temperature"),
    ("A", "ampere", "current"),
    ("mol", "mole", "amount of substance"),
    ("cd", "candela", "luminous intensity"),
    ("Hz", "hertz", "frequency"),
    ("N", "newton", "force"),
    ("Pa", "pascal", "pressure"),
    ("bar", "bar", "pressure"),
    ("J", "joule", "energy"),
    ("erg", "erg", "energy"),
    ("eV", "electronvolt", "energy"),
    ("keV", "kiloelectronvolt", "energy"),
    ("MeV", "megaelectronvolt", "energy"),
    ("GeV", "gigaelectronvolt", "energy"),
    ("TeV", "teraelectronvolt", "energy"),
    ("W", "watt", "power"),
    ("C", "coulomb", "charge"),
    ("V", "volt", "voltage"),
    ("ohm", "ohm", "resistance"),
    ("F", "farad", "capacitance"),
    ("T", "tesla", "magnetic flux density"),
    ("Wb", "weber", "magnetic flux"),
    ("H", "henry", "inductance"),
    ("rad", "radian", "dimensionless"),
    ("sr", "steradian", "dimensionless"),
    ("L", "litre", "volume"),
)
