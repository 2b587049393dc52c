"""Bracketed units as siunitx v3 input: unit macros where every factor is known, else literal."""

from __future__ import annotations

from fractions import Fraction

from worksheet.errors import ParseError
from worksheet.syntax.tree import UnitExpr
from worksheet.syntax.units import parse_unit

# Symbols siunitx knows that take an SI prefix.
_PREFIXABLE: dict[str, str] = {
    "m": "\\metre",
    "g": "\\gram",
    "s": "\\second",
    "A": "\\ampere",
    "K": "\\kelvin",
    "mol": "\\mole",
    "cd": "\\candela",
    "J": "\\joule",
    "W": "\\watt",
    "N": "\\newton",
    "Pa": "\\pascal",
    "Hz": "\\hertz",
    "C": "\\coulomb",
    "V": "\\volt",
    "F": "\\farad",
    "T": "\\tesla",
    "ohm": "\\ohm",
    "Ω": "\\ohm",
    "H": "\\henry",
    "Wb": "\\weber",
    "S": "\\siemens",
    "eV": "\\electronvolt",
    "L": "\\litre",
    "l": "\\litre",
    "Bq": "\\becquerel",
    "Gy": "\\gray",
    "Sv": "\\sievert",
    "lm": "\\lumen",
    "lx": "\\lux",
    "kat": "\\katal",
    "Da": "\\dalton",
    "bar": "\\bar",
}
# Whole names siunitx knows (no prefix taken off them).
_WHOLE: dict[str, str] = {
    "min": "\\minute",
    "h": "\\hour",
    "hour": "\\hour",
    "day": "\\day",
    "d": "\\day",
    "degC": "\\degreeCelsius",
    "au": "\\astronomicalunit",
    "percent": "\\percent",
    "rad": "\\radian",
    "sr": "\\steradian",
    "deg": "\\degree",
    "degree": "\\degree",
    "angstrom": "\\angstrom",
    "t": "\\tonne",
    "tonne": "\\tonne",
    "metre": "\\metre",
    "meter": "\\metre",
    "second": "\\second",
    "gram": "\\gram",
    "kilogram": "\\kilo\\gram",
    "kelvin": "\\kelvin",
    "joule": "\\joule",
    "watt": "\\watt",
    "newton": "\\newton",
    "pascal": "\\pascal",
    "hertz": "\\hertz",
    "ampere": "\\ampere",
    "coulomb": "\\coulomb",
    "volt": "\\volt",
    "mole": "\\mole",
    "kilometre": "\\kilo\\metre",
    "kilometer": "\\kilo\\metre",
    "electronvolt": "\\electronvolt",
}
_PREFIXES: dict[str, str] = {
    "Y": "\\yotta",
    "Z": "\\zetta",
    "E": "\\exa",
    "P": "\\peta",
    "T": "\\tera",
    "G": "\\giga",
    "M": "\\mega",
    "k": "\\kilo",
    "h": "\\hecto",
    "da": "\\deca",
    "d": "\\deci",
    "c": "\\centi",
    "m": "\\milli",
    "u": "\\micro",
    "µ": "\\micro",
    "μ": "\\micro",
    "n": "\\nano",
    "p": "\\pico",
    "f": "\\femto",
    "a": "\\atto",
    "z": "\\zepto",
    "y": "\\yocto",
}
# Literal spellings for units siunitx has no macro for; astronomers' signs for solar ones.
_LITERAL: dict[str, str] = {
    "M_sun": "\\mathrm{M}_{\\odot}",
    "R_sun": "\\mathrm{R}_{\\odot}",
    "L_sun": "\\mathrm{L}_{\\odot}",
    "M_earth": "\\mathrm{M}_{\\oplus}",
    "R_earth": "\\mathrm{R}_{\\oplus}",
    "M_jup": "\\mathrm{M}_{\\mathrm{J}}",
    "R_jup": "\\mathrm{R}_{\\mathrm{J}}",
}
# Units without a macro that commonly carry a prefix (kpc, Myr, keV is a macro already).
_PREFIXABLE_LITERAL = ("pc", "yr", "ly", "erg", "Jy", "barn", "b")
_LITERAL_PREFIX: dict[str, str] = {
    "M": "M",
    "k": "k",
    "G": "G",
    "m": "m",
    "u": "\\mu{}",
    "µ": "\\mu{}",
    "μ": "\\mu{}",
    "n": "n",
    "T": "T",
    "P": "P",
    "E": "E",
    "c": "c",
}


def _macro(name: str) -> str | None:
    """The siunitx macro spelling of one unit name, or None if there is none."""
    if name in _WHOLE:
        return _WHOLE[name]
    if name in _PREFIXABLE:
        return _PREFIXABLE[name]
    for length in (2, 1):
        prefix, rest = name[:length], name[length:]
        if prefix in _PREFIXES and rest in _PREFIXABLE:
            return _PREFIXES[prefix] + _PREFIXABLE[rest]
    return None


def _literal(name: str) -> str:
    """A unit name typeset upright as text, for siunitx's literal mode."""
    if name in _LITERAL:
        return _LITERAL[name]
    if name in _PREFIXABLE_LITERAL:
        return "\\mathrm{" + name + "}"
    prefix, rest = name[:1], name[1:]
    if prefix in _LITERAL_PREFIX and rest in _PREFIXABLE_LITERAL:
        return "\\mathrm{" + _LITERAL_PREFIX[prefix] + rest + "}"
    return "\\mathrm{" + _escape_name(name) + "}"


def _escape_name(name: str) -> str:
    out = []
    for char in name:
        if char == "_":
            out.append("\\_")
        elif char.isascii() and char.isalnum():
            out.append(char)
        else:
            out.append(f"\\text{{{char}}}")
    return "".join(out)


def _power_text(power: Fraction) -> str:
    if power.denominator == 1:
        return str(power.numerator)
    return f"{power.numerator}/{power.denominator}"


def _macro_power(macro: str, power: Fraction) -> str:
    size = abs(power)
    per = "\\per" if power < 0 else ""
    if size == 1:
        return per + macro
    if size == 2:
        return per + macro + "\\squared"
    if size == 3:
        return per + macro + "\\cubed"
    return per + macro + "\\tothe{" + _power_text(size) + "}"


def unit_body(unit: UnitExpr) -> str:
    """The argument of ``\\unit``/``\\qty`` for a unit with scale 1 (``\\kilo\\gram``).

    >>> unit_body(parse_unit("m^3/(kg*s^2)"))
    '\\\\metre\\\\cubed\\\\per\\\\kilo\\\\gram\\\\per\\\\second\\\\squared'
    >>> unit_body(parse_unit("erg/s"))
    '\\\\mathrm{erg}\\\\,\\\\mathrm{s}^{-1}'
    """
    if not unit.factors:
        return ""
    macros = [_macro(name) for name, _ in unit.factors]
    if all(macro is not None for macro in macros):
        return "".join(
            _macro_power(macro or "", power)
            for macro, (_, power) in zip(macros, unit.factors, strict=True)
        )
    parts = []
    for name, power in unit.factors:
        text = _literal(name)
        if power != 1:
            text += "^{" + _power_text(power) + "}"
        parts.append(text)
    return "\\,".join(parts)


def scale_text(scale: Fraction) -> str:
    """The numeric factor of a unit like ``[1e3 m]`` as a siunitx number."""
    if scale.denominator == 1:
        return str(scale.numerator)
    return f"{float(scale):.15g}"


def unit_latex(unit: UnitExpr) -> str:
    """A whole unit in math mode: ``\\unit{...}``, with any numeric factor before it."""
    body = unit_body(unit)
    shown = "\\unit{" + body + "}" if body else ""
    if unit.scale != 1:
        factor = "\\num{" + scale_text(unit.scale) + "}"
        return factor + ("\\," + shown if shown else "")
    return shown or "1"


def unit_text_latex(text: str | None) -> str:
    """A recorded unit string (``km/s``, ``m^2``) as math-mode LaTeX; empty when none."""
    if not text or text == "1":
        return ""
    try:
        return unit_latex(parse_unit(text))
    except ParseError:
        return "\\mathrm{" + _escape_name(text) + "}"
