"""``$...$`` in a note: TeX math the writer may pass to LaTeX, checked against a short list.

A sheet is data, so a note's math is never handed to TeX as it stands: only letters,
digits, ordinary math punctuation and a known list of math macros are let through, with
balanced braces (and ``\\left`` with ``\\right``). Anything else (``\\input``, ``\\def``,
a lone ``{``) makes the writer show the math as escaped text instead, so a note can neither
break the document nor read files.
"""

from __future__ import annotations

import re

from worksheet.export.names import GREEK_MACRO

_ALLOWED_CHARS = frozenset(
    "abcdefghijklmnopqrstuvwxyzABCDEFGHIJKLMNOPQRSTUVWXYZ0123456789 +-*/=()[]^_{},.;:<>|'!"
)
_MACRO_WORDS = """
alpha beta gamma delta epsilon varepsilon zeta eta theta vartheta iota kappa lambda mu nu
xi pi varpi rho varrho sigma varsigma tau upsilon phi varphi chi psi omega Gamma Delta
Theta Lambda Xi Pi Sigma Upsilon Phi Psi Omega frac dfrac tfrac sqrt cdot times pm mp div
sim simeq approx propto equiv neq ne leq le geq ge ll gg to rightarrow leftarrow infty
partial nabla hbar ell odot oplus circ prime dots ldots cdots sum prod int oint lim log ln
exp sin cos tan sinh cosh tanh arcsin arccos arctan min max det mathrm mathit mathbf
mathcal left right big Big bigl bigr quad qquad langle rangle vert Vert mid in notin
subset cup cap
"""
_MACROS = frozenset(_MACRO_WORDS.split()) | {m.lstrip("\\") for m in GREEK_MACRO.values()}
_SPACING = frozenset(",;:! ")
_MACRO = re.compile(r"\\([A-Za-z]+|.)")


def safe_tex_math(source: str) -> str | None:
    """The math as given when every part is on the list and braces balance, else None.

    >>> safe_tex_math(r"T_\\mathrm{H} \\propto M^{-1}")
    'T_\\\\mathrm{H} \\\\propto M^{-1}'
    >>> safe_tex_math(r"\\input{secret}") is None, safe_tex_math("x}{") is None
    (True, True)
    """
    if "^^" in source or source.count("\\left") != source.count("\\right"):
        return None  # ^^5c is TeX's spelling of a backslash; \left needs its \right
    depth = 0
    index = 0
    while index < len(source):
        char = source[index]
        if char == "\\":
            match = _MACRO.match(source, index)
            if match is None:
                return None
            name = match.group(1)
            if name not in _MACROS and not (len(name) == 1 and name in _SPACING | set("{}|")):
                return None
            index = match.end()
            continue
        if char not in _ALLOWED_CHARS:
            return None
        if char == "{":
            depth += 1
        elif char == "}":
            depth -= 1
            if depth < 0:
                return None
        index += 1
    if depth != 0 or not source.strip() or source.rstrip().endswith(("^", "_")):
        return None
    return source
