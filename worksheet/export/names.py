"""How a sheet name is typeset: a base letter or word, Greek where spelled out, subscripts.

Shared by the LaTeX and HTML writers so that both read ``T_H`` as T with subscript H.
"""

from __future__ import annotations

from dataclasses import dataclass

GREEK: dict[str, str] = {
    "alpha": "α",
    "beta": "β",
    "gamma": "γ",
    "delta": "δ",
    "epsilon": "ε",
    "varepsilon": "ε",
    "eps": "ε",
    "zeta": "ζ",
    "eta": "η",
    "theta": "θ",
    "vartheta": "ϑ",
    "iota": "ι",
    "kappa": "κ",
    "lambda": "λ",
    "mu": "μ",
    "nu": "ν",
    "xi": "ξ",
    "pi": "π",
    "rho": "ρ",
    "sigma": "σ",
    "tau": "τ",
    "upsilon": "υ",
    "phi": "φ",
    "varphi": "φ",
    "chi": "χ",
    "psi": "ψ",
    "omega": "ω",
    "Gamma": "Γ",
    "Delta": "Δ",
    "Theta": "Θ",
    "Lambda": "Λ",
    "Xi": "Ξ",
    "Pi": "Π",
    "Sigma": "Σ",
    "Upsilon": "Υ",
    "Phi": "Φ",
    "Psi": "Ψ",
    "Omega": "Ω",
}
"""Spelled-out Greek names (and the trade's ``eps``) with their letters."""

GREEK_MACRO: dict[str, str] = {
    **{word: "\\" + word for word in GREEK},
    "eps": "\\varepsilon",
    "epsilon": "\\epsilon",
}
"""The LaTeX macro of each spelled-out Greek name."""

LETTER_MACRO: dict[str, str] = {
    letter: GREEK_MACRO[word] for word, letter in reversed(list(GREEK.items()))
}
"""Greek letters written directly in a sheet, to their LaTeX macro."""

SPECIAL: dict[str, tuple[str, str]] = {
    "hbar": ("ħ", "\\hbar"),
}
"""Bases that are one symbol of their own: (HTML text, LaTeX)."""

SOLAR_SUBSCRIPT = "sun"
"""``M_sun`` is typeset with the astronomers' solar sign as subscript."""


@dataclass(frozen=True)
class NameParts:
    """A name split for typesetting: ``k_B`` is base ``k`` with subscripts ``("B",)``."""

    base: str
    subscripts: tuple[str, ...]


def split_name(name: str) -> NameParts:
    """The base and subscripts of a name; a leading or doubled ``_`` stays in the base.

    >>> split_name("sigma_SB")
    NameParts(base='sigma', subscripts=('SB',))
    >>> split_name("t_ev")
    NameParts(base='t', subscripts=('ev',))
    """
    parts = name.split("_")
    if len(parts) == 1 or not parts[0] or any(not part for part in parts[1:]):
        return NameParts(name, ())
    return NameParts(parts[0], tuple(parts[1:]))


def is_upright_subscript(text: str) -> bool:
    """Whether a subscript is a label (upright) rather than an index (digits stay as is)."""
    return not text.isdigit() and text not in GREEK
