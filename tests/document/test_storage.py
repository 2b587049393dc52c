"""Saving writes exact bytes, keeps permissions and never leaves a broken or stray file."""

from __future__ import annotations

import os
import stat
from pathlib import Path

import pytest

from worksheet.document import atomic_write_text, parse_document, read_document, render_document
from worksheet.errors import DocumentError

AWKWARD = "\ufeff---\r\ntitle: ħ and π 🙂\r\n---\r\nmixed\nends\r\nno final newline"


def mode_of(path: Path) -> int:
    return stat.S_IMODE(path.stat().st_mode)


def test_content_is_exactly_the_utf8_bytes(tmp_path: Path) -> None:
    path = tmp_path / "a.sheet.md"
    atomic_write_text(path, AWKWARD)
    # No newline translation, BOM character written as its three bytes.
    assert path.read_bytes() == AWKWARD.encode("utf-8")
    assert path.read_bytes().startswith(b"\xef\xbb\xbf---\r\n")
    assert os.listdir(tmp_path) == ["a.sheet.md"]


def test_overwrite_replaces_all_old_content(tmp_path: Path) -> None:
    path = tmp_path / "a.sheet.md"
    path.write_bytes(b"a much longer old content\n" * 50)
    atomic_write_text(path, "short\n")
    assert path.read_bytes() == b"short\n"
    assert os.listdir(tmp_path) == ["a.sheet.md"]


def test_str_path_works(tmp_path: Path) -> None:
    path = tmp_path / "s.sheet.md"
    atomic_write_text(str(path), "x\n")
    assert path.read_bytes() == b"x\n"


@pytest.mark.parametrize("mode", [0o600, 0o640, 0o664, 0o755])
def test_permission_bits_are_kept(tmp_path: Path, mode: int) -> None:
    path = tmp_path / "a.sheet.md"
    path.write_bytes(b"old\n")
    path.chmod(mode)
    atomic_write_text(path, "new\n")
    assert mode_of(path) == mode
    assert path.read_bytes() == b"new\n"


def test_new_file_gets_the_umask_default(tmp_path: Path) -> None:
    old_umask = os.umask(0o027)
    try:
        atomic_write_text(tmp_path / "new.sheet.md", "x\n")
    finally:
        os.umask(old_umask)
    # 0o666 with group-write and all "other" bits masked off.
    assert mode_of(tmp_path / "new.sheet.md") == 0o640
    assert os.umask(old_umask) == old_umask  # the umask was put back


def test_symlink_is_followed_and_kept(tmp_path: Path) -> None:
    real = tmp_path / "real.sheet.md"
    real.write_bytes(b"old\n")
    link = tmp_path / "link.sheet.md"
    link.symlink_to(real)
    atomic_write_text(link, "new\n")
    assert link.is_symlink()
    assert real.read_bytes() == b"new\n"
    assert sorted(os.listdir(tmp_path)) == ["link.sheet.md", "real.sheet.md"]


@pytest.mark.parametrize("failing", ["replace", "fsync", "chmod"])
def test_failure_leaves_old_file_and_no_temp_file(
    tmp_path: Path, monkeypatch: pytest.MonkeyPatch, failing: str
) -> None:
    path = tmp_path / "a.sheet.md"
    path.write_bytes(b"old content\n")
    path.chmod(0o640)

    def broken(*args: object, **kwargs: object) -> None:
        raise OSError(28, "No space left on device")

    monkeypatch.setattr(os, failing, broken)
    with pytest.raises(DocumentError) as caught:
        atomic_write_text(path, "new content\n")
    monkeypatch.undo()
    assert caught.value.message == (
        f"cannot save {path}: No space left on device; the file on disk is unchanged"
    )
    assert isinstance(caught.value.__cause__, OSError)
    assert path.read_bytes() == b"old content\n"
    assert mode_of(path) == 0o640
    assert os.listdir(tmp_path) == ["a.sheet.md"]


def test_interrupt_cleans_up_and_propagates(
    tmp_path: Path, monkeypatch: pytest.MonkeyPatch
) -> None:
    path = tmp_path / "a.sheet.md"
    path.write_bytes(b"old\n")

    def interrupted(fd: int) -> None:
        raise KeyboardInterrupt

    monkeypatch.setattr(os, "fsync", interrupted)
    with pytest.raises(KeyboardInterrupt):
        atomic_write_text(path, "new\n")
    monkeypatch.undo()
    assert path.read_bytes() == b"old\n"
    assert os.listdir(tmp_path) == ["a.sheet.md"]


def test_missing_folder_is_a_document_error(tmp_path: Path) -> None:
    with pytest.raises(DocumentError) as caught:
        atomic_write_text(tmp_path / "absent" / "a.sheet.md", "x\n")
    # Refused before any file is made (issue 11), saying which folder is missing.
    assert f"the folder {tmp_path / 'absent'} does not exist" in caught.value.message
    assert os.listdir(tmp_path) == []


def test_folder_sync_refusal_is_not_a_failed_save(
    tmp_path: Path, monkeypatch: pytest.MonkeyPatch
) -> None:
    # Some file systems refuse to open a folder; the file is already in place by then.
    real_open = os.open

    def open_no_folders(path: str, flags: int, *args: int) -> int:
        if os.path.isdir(path):
            raise OSError(22, "Invalid argument")
        return real_open(path, flags, *args)

    monkeypatch.setattr(os, "open", open_no_folders)
    atomic_write_text(tmp_path / "a.sheet.md", "x\n")
    monkeypatch.undo()
    assert (tmp_path / "a.sheet.md").read_bytes() == b"x\n"


@pytest.mark.parametrize(
    "name", sorted(p.name for p in (Path(__file__).parent / "corpus").glob("*.md"))
)
def test_saved_corpus_sheet_reads_back_to_the_same_bytes(tmp_path: Path, name: str) -> None:
    data = (Path(__file__).parent / "corpus" / name).read_bytes()
    path = tmp_path / name
    atomic_write_text(path, render_document(parse_document(data.decode("utf-8"))))
    assert path.read_bytes() == data
    assert render_document(read_document(path)).encode("utf-8") == data
