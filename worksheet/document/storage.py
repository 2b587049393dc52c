"""Saving a sheet so that a crash or a full disk never leaves a truncated file."""

from __future__ import annotations

import contextlib
import os
import re
import stat
import tempfile
import time

from worksheet.errors import DocumentError

STALE_SECONDS = 600.0
"""A temporary file this old is left over from a save that never finished, whoever wrote it."""

_TEMP_SUFFIX = ".tmp"
_OWNER = re.compile(r"(\d+)-[^.]+")  # the middle of .NAME.PID-RANDOM.tmp


def _default_mode() -> int:
    """The permission bits a newly created file gets under the process umask.

    Python 3.11 has no way to read the umask without setting it, so it is set and put back
    at once.
    """
    umask = os.umask(0o022)
    os.umask(umask)
    return 0o666 & ~umask


def _sync_folder(folder: str) -> None:
    """Make the rename itself durable where the platform allows it (best effort)."""
    if os.name == "nt":
        return  # Windows cannot open a folder for fsync.
    # The new file is already in place; a file system that refuses to open or fsync a
    # folder only loses the durability of the rename, so that is not a failed save.
    with contextlib.suppress(OSError):
        fd = os.open(folder, os.O_RDONLY)
        try:
            os.fsync(fd)
        finally:
            os.close(fd)


def _temp_prefix(name: str) -> str:
    return f".{name}.{os.getpid()}-"


def _writer_gone(pid: int) -> bool:
    """Whether the process that made a temporary file has ended."""
    if os.name == "nt" or pid == os.getpid():
        return False  # Windows' os.kill would end the process; our own may be saving now
    try:
        os.kill(pid, 0)
    except ProcessLookupError:
        return True
    except OSError:
        return False  # it exists under another user
    return False


def remove_stale_temporaries(target: str) -> list[str]:
    """Remove what saves of ``target`` that were killed left behind; the names removed.

    Only this file's own temporary names (``.NAME.PID-RANDOM.tmp``) are touched: those of
    a process that has ended, and any older than ``STALE_SECONDS`` (also the older
    ``.NAME.RANDOM.tmp`` names, which carry no process id).
    """
    folder, name = os.path.split(target)
    removed = []
    prefix = f".{name}."
    try:
        entries = os.listdir(folder or ".")
    except OSError:
        return removed
    now = time.time()
    for entry in entries:
        if not (entry.startswith(prefix) and entry.endswith(_TEMP_SUFFIX)):
            continue
        middle = entry[len(prefix) : -len(_TEMP_SUFFIX)]
        path = os.path.join(folder, entry)
        try:
            info = os.lstat(path)
        except OSError:
            continue
        if not stat.S_ISREG(info.st_mode):
            continue
        owner = _OWNER.fullmatch(middle)
        stale = now - info.st_mtime > STALE_SECONDS or (
            owner is not None and _writer_gone(int(owner.group(1)))
        )
        if stale:
            with contextlib.suppress(OSError):
                os.unlink(path)
                removed.append(entry)
    return removed


def _refuse_target(path: str | os.PathLike[str], target: str, folder: str) -> None:
    """A clear error for a target that can never be written, before any work."""
    shown = os.fspath(path)
    if not os.path.isdir(folder or "."):
        raise DocumentError(
            f"cannot save {shown}: the folder {folder} does not exist; nothing was written "
            "(create it first, or give another path)"
        )
    if os.path.isdir(target):
        raise DocumentError(f"cannot save {shown}: it is a folder; give a file name")


def atomic_write_text(path: str | os.PathLike[str], text: str) -> None:
    """Replace the file at ``path`` with exactly ``text.encode("utf-8")``.

    See ``atomic_write_bytes``, which does the work.
    """
    atomic_write_bytes(path, text.encode("utf-8"))


def atomic_write_bytes(path: str | os.PathLike[str], data: bytes) -> None:
    """Replace the file at ``path`` with exactly ``data``.

    The bytes go to a temporary file in the same folder, which is flushed, fsynced, given
    the old file's permission bits (or the umask default for a new file) and then renamed
    over the target, so readers see either the old file or the new one, never a part. A
    symbolic link is followed: the file it points to is replaced, the link stays.

    Temporary files left by earlier saves that were killed are removed first
    (``remove_stale_temporaries``).

    Raises:
        DocumentError: the folder is missing, the target is a folder, or the file could
            not be written (full disk, read-only file system, no permission); the old file
            is left as it was and the temporary file is removed.
    """
    target = os.path.realpath(os.fspath(path))
    folder = os.path.dirname(target)
    _refuse_target(path, target, folder)
    existed = True
    try:
        mode = stat.S_IMODE(os.stat(target).st_mode)
    except FileNotFoundError:
        mode, existed = _default_mode(), False
    except OSError as err:
        raise DocumentError(f"cannot save {os.fspath(path)}: {err.strerror or err}") from err
    remove_stale_temporaries(target)
    temp_path: str | None = None
    try:
        fd, temp_path = tempfile.mkstemp(
            prefix=_temp_prefix(os.path.basename(target)), suffix=_TEMP_SUFFIX, dir=folder
        )
        with os.fdopen(fd, "wb") as handle:
            handle.write(data)
            handle.flush()
            os.fsync(handle.fileno())
        os.chmod(temp_path, mode)
        os.replace(temp_path, target)
        temp_path = None
    except OSError as err:
        kept = "the file on disk is unchanged" if existed else "nothing was written"
        raise DocumentError(
            f"cannot save {os.fspath(path)}: {err.strerror or err}; {kept}"
        ) from err
    finally:
        if temp_path is not None:
            with contextlib.suppress(FileNotFoundError):
                os.unlink(temp_path)
    _sync_folder(folder)
