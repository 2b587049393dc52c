"""Standard relations shipped with the package, one sheet per subject, each with its source.

A sheet reaches them with ``use library "blackhole"`` (all) or
``use r_s, T_H from library "blackhole"`` (named ones).
"""

from __future__ import annotations

from importlib import resources
from pathlib import Path

SUFFIX = ".sheet.md"


def library_folder() -> Path:
    """The folder holding the library sheets (inside the installed package)."""
    return Path(str(resources.files(__name__)))


def library_names() -> tuple[str, ...]:
    """The subjects, as written after ``use library``.

    >>> "blackhole" in library_names()
    True
    """
    return tuple(sorted(p.name.removesuffix(SUFFIX) for p in library_folder().glob(f"*{SUFFIX}")))


def library_sheet(name: str) -> Path | None:
    """The sheet of one subject, or None when there is no such subject."""
    if name not in library_names():
        return None
    return library_folder() / f"{name}{SUFFIX}"
