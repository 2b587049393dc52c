"""Natural-unit and Planck-unit views: which powers of hbar, c, k_B (and G) a conversion uses.

Pure exact arithmetic on dimension vectors; the statement evaluator applies the factors.
With hbar = c = k_B = 1 a mass and a temperature are energies, a length and a time are
inverse energies. With G = hbar = c = k_B = 1 as well, every quantity of length, mass, time
and temperature is a pure number of Planck units.
"""

from __future__ import annotations

from dataclasses import dataclass
from fractions import Fraction

from worksheet.errors import DimensionError
from worksheet.units.dimension import BASE_NAMES, Dimension

_L, _M, _T, _I, _K, _N, _J = range(7)
ENERGY = Dimension.of(mass=1, length=2, time=-2)


@dataclass(frozen=True)
class NaturalFactor:
    """``quantity * hbar^p * c^q * k_B^r`` has the dimension energy^n."""

    n: Fraction
    p: Fraction
    q: Fraction
    r: Fraction

    def describe(self) -> str:
        """The factor in words for the record, e.g. ``times k_B`` or ``times 1/(hbar*c)``.

        >>> natural_factor(Dimension.of(length=1)).describe()
        'times 1/(c*hbar)'
        """
        from worksheet.engine.estimate import format_monomial

        text = format_monomial(("c", "hbar", "k_B"), (self.q, self.p, self.r))
        return "no factor" if text == "1" else f"times {text}"


def _outside(dimension: Dimension, what: str) -> None:
    extra = [BASE_NAMES[i] for i in (_I, _N, _J) if dimension.exponents[i]]
    if extra:
        raise DimensionError(
            f"{what} cover length, mass, time and temperature only, not {', '.join(extra)}"
        )


def natural_factor(dimension: Dimension) -> NaturalFactor:
    """The factor that turns a quantity of ``dimension`` into a power of energy.

    >>> f = natural_factor(Dimension.of(temperature=1))
    >>> (f.n, f.p, f.q, f.r)
    (Fraction(1, 1), Fraction(0, 1), Fraction(0, 1), Fraction(1, 1))
    """
    _outside(dimension, "natural units")
    a, b, c, d = (dimension.exponents[i] for i in (_L, _M, _T, _K))
    n = b - a - c + d
    r = d
    p = n - b - r
    q = 2 * n - a - 2 * p - 2 * r
    return NaturalFactor(n, p, q, r)


def natural_back_factor(energy_power: Fraction, target: Dimension) -> NaturalFactor:
    """The factor that turns energy^n back into ``target`` (None-free: raises when none).

    Args:
        energy_power: n, the power of energy of the natural-unit value.
        target: the SI dimension wanted.
    """
    _outside(target, "natural units")
    big_a, big_b, big_c, big_d = (target.exponents[i] for i in (_L, _M, _T, _K))
    n = energy_power
    r = -big_d
    p = big_b - n - r
    q = big_a - 2 * n - 2 * p - 2 * r
    if -2 * n - p - q - 2 * r != big_c:
        raise DimensionError(f"no product of hbar, c and k_B turns energy^{n} into {target.name()}")
    return NaturalFactor(n, p, q, r)


def energy_power(dimension: Dimension) -> Fraction | None:
    """n when ``dimension`` is exactly energy^n, else None."""
    n = dimension.exponents[_M]
    return n if ENERGY**n == dimension else None


def planck_exponents(dimension: Dimension) -> tuple[Fraction, Fraction, Fraction, Fraction]:
    """Powers of (l_P, m_P, t_P, T_P) with the same dimension as ``dimension``."""
    _outside(dimension, "Planck units")
    return tuple(dimension.exponents[i] for i in (_L, _M, _T, _K))  # type: ignore[return-value]


def planck_g_power(dimension: Dimension) -> Fraction:
    """The power of G in the Planck unit of ``dimension`` (l_P, t_P go as G^1/2; m_P, T_P as
    G^-1/2), for propagating G's uncertainty through the view."""
    a, b, c, d = planck_exponents(dimension)
    return (a - b + c - d) / 2


def power_text(unit: str, n: Fraction) -> str:
    """``GeV``, ``1/GeV``, ``GeV^2``, ``GeV^(1/2)`` for a natural-unit result.

    >>> power_text("GeV", Fraction(-1)), power_text("MeV", Fraction(2))
    ('1/GeV', 'MeV^2')
    """
    if n == 0:
        return ""
    size = abs(n)
    body = (
        unit
        if size == 1
        else (
            f"{unit}^{size.numerator}"
            if size.denominator == 1
            else f"{unit}^({size.numerator}/{size.denominator})"
        )
    )
    return body if n > 0 else f"1/{body}"
