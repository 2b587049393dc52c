"""'Did you mean ...?' for a mistyped command, name, unit or library subject."""

from __future__ import annotations

import difflib
from collections.abc import Iterable


def close_matches(word: str, candidates: Iterable[str], count: int = 3) -> list[str]:
    """The candidates closest to ``word`` (case-insensitive first, then as written).

    >>> close_matches("chek", ["open", "run", "check", "calc"])
    ['check']
    """
    pool = sorted(set(candidates))
    same_letters = [c for c in pool if c.lower() == word.lower() and c != word]
    if same_letters:
        return same_letters[:count]
    return difflib.get_close_matches(word, pool, n=count, cutoff=0.7)


def did_you_mean(word: str, candidates: Iterable[str]) -> str:
    """``"; did you mean 'check'?"`` or an empty string when nothing is close.

    >>> did_you_mean("hbarr", ["hbar", "h", "c"])
    "; did you mean 'hbar'?"
    >>> did_you_mean("zzz", ["hbar"])
    ''
    """
    found = close_matches(word, candidates)
    if not found:
        return ""
    return "; did you mean " + " or ".join(f"'{item}'" for item in found) + "?"
