"""Issue 11: a failed save is a clear message and exit 2, the original intact; no stray files."""

from __future__ import annotations

import errno
import os
import shutil
import signal
import subprocess
import sys
import textwrap
import time
from collections.abc import Iterator
from pathlib import Path

import pytest

from worksheet import cli
from worksheet.document import atomic_write_text, storage
from worksheet.errors import DocumentError

SHEET = (
    "---\ntitle: Save test\nconstants: CODATA2022\n---\n\nA note.\n\n"
    "```calc\nM = 5e11 [kg]\nr_s = 2*G*M/c^2\n```\n"
)


@pytest.fixture()
def sheet(tmp_path: Path) -> Path:
    path = tmp_path / "save.sheet.md"
    path.write_text(SHEET, encoding="utf-8")
    return path


def _mount_tmpfs(folder: Path, options: str) -> bool:
    """Mount a small tmpfs at ``folder`` (root only); whether it worked."""
    if os.geteuid() != 0 or shutil.which("mount") is None:
        return False
    done = subprocess.run(
        ["mount", "-t", "tmpfs", "-o", options, "tmpfs", str(folder)], capture_output=True
    )
    return done.returncode == 0


def _unmount(folder: Path) -> None:
    subprocess.run(["umount", str(folder)], capture_output=True)
    if os.path.ismount(folder):
        subprocess.run(["umount", "-l", str(folder)], capture_output=True)


@pytest.fixture()
def full_disk(tmp_path: Path, monkeypatch) -> Iterator[Path]:
    """A folder whose file system is full: a 64 KiB tmpfs filled up, or (where mounting
    is not allowed) writes that fail with ENOSPC as a full disk's do."""
    folder = tmp_path / "full"
    folder.mkdir()
    mounted = _mount_tmpfs(folder, "size=64k")
    try:
        (folder / "save.sheet.md").write_text(SHEET, encoding="utf-8")
        if mounted:
            fd = os.open(folder / "filler", os.O_WRONLY | os.O_CREAT)
            try:
                while True:
                    os.write(fd, b"\0" * 1024)
            except OSError as err:
                assert err.errno == errno.ENOSPC
            finally:
                os.close(fd)
        else:

            def no_space(fd: int) -> None:
                raise OSError(errno.ENOSPC, os.strerror(errno.ENOSPC))

            monkeypatch.setattr(storage.os, "fsync", no_space)
        yield folder
    finally:
        if mounted:
            _unmount(folder)


@pytest.fixture()
def read_only(tmp_path: Path, monkeypatch) -> Iterator[Path]:
    """A folder on a read-only file system (a tmpfs remounted read-only; root ignores
    permission bits, so chmod would prove nothing), or writes failing with EROFS."""
    folder = tmp_path / "ro"
    folder.mkdir()
    mounted = _mount_tmpfs(folder, "size=256k")
    try:
        (folder / "save.sheet.md").write_text(SHEET, encoding="utf-8")
        if mounted:
            done = subprocess.run(["mount", "-o", "remount,ro", str(folder)], capture_output=True)
            assert done.returncode == 0, done.stderr
        else:

            def refuse(*args, **kwargs):
                raise OSError(errno.EROFS, os.strerror(errno.EROFS))

            monkeypatch.setattr(storage.tempfile, "mkstemp", refuse)
        yield folder
    finally:
        if mounted:
            _unmount(folder)


@pytest.mark.parametrize("place", ["full_disk", "read_only"])
def test_issue11_a_failed_save_is_exit_2_with_the_original_intact(
    place: str, request, capsys
) -> None:
    folder: Path = request.getfixturevalue(place)
    path = folder / "save.sheet.md"
    before = path.read_bytes()
    assert cli.main(["run", str(path)]) == 2  # before the fix: a traceback and exit 1
    err = capsys.readouterr().err
    reason = "No space left on device" if place == "full_disk" else "Read-only file system"
    assert err.startswith(f"worksheet: cannot save {path}: {reason}; the file on disk is unchanged")
    assert "Traceback" not in err
    assert path.read_bytes() == before
    assert not [p for p in os.listdir(folder) if p.endswith(".tmp")]


def test_issue11_missing_output_folder_is_exit_2_before_running(sheet: Path, capsys) -> None:
    target = sheet.parent / "missing" / "out.sheet.md"
    assert cli.main(["run", str(sheet), "-o", str(target)]) == 2
    err = capsys.readouterr().err
    assert "does not exist; nothing was written" in err and "Traceback" not in err
    assert cli.main(["export", str(sheet), "--to", "md", "-o", str(target)]) == 2
    err = capsys.readouterr().err
    assert "does not exist; nothing was written" in err and "Traceback" not in err
    assert sheet.read_text(encoding="utf-8") == SHEET
    assert not target.parent.exists()


def test_issue11_saving_into_a_missing_folder_says_so(tmp_path: Path) -> None:
    with pytest.raises(DocumentError, match=r"the folder .* does not exist"):
        atomic_write_text(tmp_path / "nope" / "a.sheet.md", "x\n")
    with pytest.raises(DocumentError, match="it is a folder"):
        atomic_write_text(tmp_path, "x\n")


def _dead_pid() -> int:
    done = subprocess.Popen([sys.executable, "-c", "pass"])
    done.wait()
    return done.pid


def test_issue11_stale_temporaries_are_removed_on_the_next_save(sheet: Path) -> None:
    folder = sheet.parent
    dead = folder / f".{sheet.name}.{_dead_pid()}-abc123.tmp"
    old = folder / f".{sheet.name}.k2j4h5g6.tmp"  # the earlier name, without a process id
    live_owner = subprocess.Popen([sys.executable, "-c", "import time; time.sleep(60)"])
    live = folder / f".{sheet.name}.{live_owner.pid}-def456.tmp"
    other = folder / ".other.sheet.md.1-xyz.tmp"  # another file's: never touched
    try:
        for path in (dead, old, live, other):
            path.write_bytes(b"half a save")
        an_hour_ago = time.time() - 3600
        os.utime(old, (an_hour_ago, an_hour_ago))
        atomic_write_text(sheet, SHEET)
        left = sorted(os.listdir(folder))
        assert left == sorted([sheet.name, live.name, other.name])
    finally:
        live_owner.kill()
        live_owner.wait()


@pytest.mark.slow
def test_issue11_kills_inside_the_save_window_leave_old_or_new_and_no_litter(
    tmp_path: Path,
) -> None:
    # A writer saving a large sheet over and over is killed at random moments; each time
    # the file is whole (old or new), and the next save leaves no temporary behind.
    path = tmp_path / "big.sheet.md"
    versions = [("A" * 79 + "\n") * 40000, ("B" * 79 + "\n") * 40000]
    path.write_text(versions[0], encoding="utf-8")
    script = textwrap.dedent(
        f"""
        import sys
        from worksheet.document import atomic_write_text
        texts = [("A" * 79 + "\\n") * 40000, ("B" * 79 + "\\n") * 40000]
        print("ready", flush=True)
        k = 0
        while True:
            k += 1
            atomic_write_text({str(path)!r}, texts[k % 2])
        """
    )
    litter_seen = 0
    for attempt in range(12):
        writer = subprocess.Popen([sys.executable, "-c", script], stdout=subprocess.PIPE, text=True)
        assert writer.stdout is not None and writer.stdout.readline() == "ready\n"
        time.sleep(0.05 + 0.037 * attempt)
        writer.send_signal(signal.SIGKILL)
        writer.wait()
        assert path.read_text(encoding="utf-8") in versions
        litter_seen += sum(1 for p in os.listdir(tmp_path) if p.endswith(".tmp"))
    print(f"kills that left a temporary file: {litter_seen} of 12")
    atomic_write_text(path, versions[1])
    assert os.listdir(tmp_path) == [path.name]
    assert path.read_text(encoding="utf-8") == versions[1]
