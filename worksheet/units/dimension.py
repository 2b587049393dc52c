"""Physical dimensions as exact rational exponent vectors over the seven SI base dimensions."""

from __future__ import annotations

from dataclasses import dataclass
from fractions import Fraction

BASE_NAMES = ("length", "mass", "time", "current", "temperature", "amount", "luminous intensity")
BASE_UNITS = ("m", "kg", "s", "A", "K", "mol", "cd")
PINT_BASES = (
    "[length]",
    "[mass]",
    "[time]",
    "[current]",
    "[temperature]",
    "[substance]",
    "[luminosity]",
)

_ZERO = (Fraction(0),) * 7


# Products, quotients and powers already worked out: a sheet combines the same few
# dimensions over and over, and Fraction arithmetic is slow next to a dict look-up.
_DONE: dict[tuple[object, ...], Dimension] = {}
_DONE_LIMIT = 8192


@dataclass(frozen=True)
class Dimension:
    """A product of base dimensions to exact powers; arithmetic mirrors the quantities'."""

    exponents: tuple[Fraction, ...] = _ZERO

    def __hash__(self) -> int:
        # Kept on the instance: hashing seven Fractions each time costs microseconds.
        cached = self.__dict__.get("_hash")
        if cached is None:
            cached = hash(self.exponents)
            object.__setattr__(self, "_hash", cached)
        return cached

    def __eq__(self, other: object) -> bool:
        # Results of arithmetic are one object per exponent vector (``_canonical``), so
        # the usual comparison is by identity; comparing seven Fractions costs microseconds.
        if self is other:
            return True
        if not isinstance(other, Dimension):
            return NotImplemented
        return hash(self) == hash(other) and self.exponents == other.exponents

    @classmethod
    def of(cls, **powers: int | Fraction) -> Dimension:
        """``Dimension.of(length=1, time=-1)`` is a velocity."""
        keys = [name.replace(" ", "_") for name in BASE_NAMES]
        unknown = set(powers) - set(keys)
        if unknown:
            raise ValueError(f"unknown base dimension {sorted(unknown)}")
        return cls(tuple(Fraction(powers.get(key, 0)) for key in keys))

    def __mul__(self, other: Dimension) -> Dimension:
        key = ("*", self, other)
        found = _DONE.get(key)
        if found is None:
            pairs = zip(self.exponents, other.exponents, strict=True)
            found = _remember(key, tuple(a + b for a, b in pairs))
        return found

    def __truediv__(self, other: Dimension) -> Dimension:
        key = ("/", self, other)
        found = _DONE.get(key)
        if found is None:
            pairs = zip(self.exponents, other.exponents, strict=True)
            found = _remember(key, tuple(a - b for a, b in pairs))
        return found

    def __pow__(self, power: Fraction | int) -> Dimension:
        key = ("^", self, power)
        found = _DONE.get(key)
        if found is None:
            found = _remember(key, tuple(a * Fraction(power) for a in self.exponents))
        return found

    @property
    def dimensionless(self) -> bool:
        return not any(self.exponents)

    def si_unit(self) -> str:
        """The coherent SI unit, by its own name where it has a common one.

        >>> Dimension.of(mass=1, length=2, time=-2).si_unit()
        'J'
        """
        return self._words()[1]

    def name(self) -> str:
        """A physicist's word for the dimension, or its base-unit form when it has none.

        >>> Dimension.of(length=1).name()
        'length'
        """
        return self._words()[0]

    def _words(self) -> tuple[str, str]:
        """(name, SI unit), worked out once per instance."""
        cached = self.__dict__.get("_words_cache")
        if cached is None:
            named = _NAMED.get(self.exponents)
            if named:
                cached = named
            else:
                units = self.base_units()
                cached = (f"dimension {units}", units)
            object.__setattr__(self, "_words_cache", cached)
        return cached

    def base_units(self) -> str:
        """``compose_base_units`` of the exponents, worked out once per instance."""
        cached = self.__dict__.get("_base_units")
        if cached is None:
            cached = compose_base_units(self.exponents)
            object.__setattr__(self, "_base_units", cached)
        return cached

    def __str__(self) -> str:
        return self.name()


def _remember(key: tuple[object, ...], exponents: tuple[Fraction, ...]) -> Dimension:
    """Keep the result of one product, quotient or power (as its canonical instance)."""
    if len(_DONE) >= _DONE_LIMIT:
        _DONE.clear()
    found = _DONE[key] = _canonical(exponents)
    return found


_CANONICAL: dict[tuple[Fraction, ...], Dimension] = {}


def _canonical(exponents: tuple[Fraction, ...]) -> Dimension:
    """The one instance of a dimension that arithmetic hands out."""
    found = _CANONICAL.get(exponents)
    if found is None:
        if len(_CANONICAL) >= _DONE_LIMIT:
            _CANONICAL.clear()
        found = _CANONICAL[exponents] = Dimension(exponents)
    return found


def _power_text(symbol: str, power: Fraction) -> str:
    if power == 1:
        return symbol
    if power.denominator == 1:
        return f"{symbol}^{power.numerator}"
    return f"{symbol}^({power.numerator}/{power.denominator})"


def compose_base_units(exponents: tuple[Fraction, ...]) -> str:
    """``m^3/(kg*s^2)`` style text for an exponent vector (``1`` when dimensionless)."""
    top = [_power_text(u, p) for u, p in zip(BASE_UNITS, exponents, strict=True) if p > 0]
    bottom = [_power_text(u, -p) for u, p in zip(BASE_UNITS, exponents, strict=True) if p < 0]
    numerator = "*".join(top) if top else "1"
    if not bottom:
        return numerator
    denominator = bottom[0] if len(bottom) == 1 else "(" + "*".join(bottom) + ")"
    return f"{numerator}/{denominator}"


def _d(**powers: int) -> tuple[Fraction, ...]:
    return Dimension.of(**powers).exponents


_NAMED: dict[tuple[Fraction, ...], tuple[str, str]] = {
    _d(): ("dimensionless", ""),
    _d(length=1): ("length", "m"),
    _d(mass=1): ("mass", "kg"),
    _d(time=1): ("time", "s"),
    _d(current=1): ("current", "A"),
    _d(temperature=1): ("temperature", "K"),
    _d(amount=1): ("amount of substance", "mol"),
    _d(luminous_intensity=1): ("luminous intensity", "cd"),
    _d(length=2): ("area", "m^2"),
    _d(length=3): ("volume", "m^3"),
    _d(time=-1): ("frequency", "1/s"),
    _d(length=1, time=-1): ("velocity", "m/s"),
    _d(length=1, time=-2): ("acceleration", "m/s^2"),
    _d(mass=1, length=1, time=-1): ("momentum", "kg*m/s"),
    _d(mass=1, length=1, time=-2): ("force", "N"),
    _d(mass=1, length=2, time=-2): ("energy", "J"),
    _d(mass=1, length=2, time=-3): ("power", "W"),
    _d(mass=1, length=-1, time=-2): ("pressure", "Pa"),
    _d(mass=1, length=2, time=-1): ("action", "J*s"),
    _d(mass=1, length=2, time=-2, temperature=-1): ("entropy", "J/K"),
    _d(mass=1, length=-3): ("density", "kg/m^3"),
    _d(mass=1, time=-1): ("mass rate", "kg/s"),
    _d(mass=1, time=-3): ("energy flux", "W/m^2"),
    _d(current=1, time=1): ("charge", "C"),
    _d(mass=1, length=2, time=-3, current=-1): ("voltage", "V"),
    _d(mass=-1, length=-2, time=4, current=2): ("capacitance", "F"),
    _d(mass=1, length=2, time=-3, current=-2): ("resistance", "ohm"),
    _d(mass=1, time=-2, current=-1): ("magnetic flux density", "T"),
    _d(mass=1, length=2, time=-2, current=-1): ("magnetic flux", "Wb"),
    _d(mass=1, length=2, time=-2, current=-2): ("inductance", "H"),
    _d(mass=1, length=1, time=-3, current=-1): ("electric field", "V/m"),
}
