"""The recovery copy kept beside a sheet while it has unsaved edits."""

from __future__ import annotations

import contextlib
from pathlib import Path

from worksheet.document import atomic_write_text

SUFFIX = ".recover"


def recovery_path(sheet: Path) -> Path:
    """``NAME.sheet.md`` -> ``NAME.sheet.md.recover`` in the same folder."""
    return sheet.with_name(sheet.name + SUFFIX)


def write_recovery(sheet: Path, text: str) -> None:
    """Write the copy atomically (raises DocumentError when it cannot be written)."""
    atomic_write_text(recovery_path(sheet), text)


def remove_recovery(sheet: Path) -> None:
    """Remove the copy if there is one (after a save or an explicit discard)."""
    with contextlib.suppress(FileNotFoundError):
        recovery_path(sheet).unlink()


def newer_recovery(sheet: Path) -> str | None:
    """The copy's text when it is newer than the sheet and differs from it, else None."""
    copy = recovery_path(sheet)
    try:
        copy_time = copy.stat().st_mtime
        text = copy.read_text(encoding="utf-8")
    except (FileNotFoundError, UnicodeDecodeError):
        return None
    try:
        if sheet.stat().st_mtime > copy_time:
            return None
        if sheet.read_text(encoding="utf-8") == text:
            return None
    except FileNotFoundError:
        return text
    except UnicodeDecodeError:
        return text
    return text
