"""Saving a sheet so that a crash or a full disk never leaves a truncated file."""

from __future__ import annotations

import contextlib
import os
import stat
import tempfile

from worksheet.errors import DocumentError


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


def atomic_write_text(path: str | os.PathLike[str], text: str) -> None:
    """Replace the file at ``path`` with exactly ``text.encode("utf-8")``.

    The bytes go to a temporary file in the same folder, which is flushed, fsynced, given
    the old file's permission bits (or the umask default for a new file) and then renamed
    over the target, so readers see either the old file or the new one, never a part. A
    symbolic link is followed: the file it points to is replaced, the link stays.

    Raises:
        DocumentError: the file could not be written; the old file is left as it was and
            the temporary file is removed.
    """
    target = os.path.realpath(os.fspath(path))
    folder = os.path.dirname(target)
    data = text.encode("utf-8")
    try:
        mode = stat.S_IMODE(os.stat(target).st_mode)
    except FileNotFoundError:
        mode = _default_mode()
    except OSError as err:
        raise DocumentError(f"cannot save {os.fspath(path)}: {err.strerror or err}") from err
    temp_path: str | None = None
    try:
        fd, temp_path = tempfile.mkstemp(
            prefix=f".{os.path.basename(target)}.", suffix=".tmp", dir=folder
        )
        with os.fdopen(fd, "wb") as handle:
            handle.write(data)
            handle.flush()
            os.fsync(handle.fileno())
        os.chmod(temp_path, mode)
        os.replace(temp_path, target)
        temp_path = None
    except OSError as err:
        raise DocumentError(f"cannot save {os.fspath(path)}: {err.strerror or err}") from err
    finally:
        if temp_path is not None:
            with contextlib.suppress(FileNotFoundError):
                os.unlink(temp_path)
    _sync_folder(folder)
