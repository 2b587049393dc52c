"""Sheets the reader refuses, each with a message that says where and what to do."""

from __future__ import annotations

from pathlib import Path

import pytest

from worksheet.document import decode_sheet_bytes, parse_document, read_document
from worksheet.errors import DocumentError


def read_bytes(tmp_path: Path, data: bytes) -> DocumentError:
    path = tmp_path / "bad.sheet.md"
    path.write_bytes(data)
    with pytest.raises(DocumentError) as caught:
        read_document(path)
    return caught.value


def parse_error(text: str) -> DocumentError:
    with pytest.raises(DocumentError) as caught:
        parse_document(text)
    return caught.value


# --- bytes that are not UTF-8 text -------------------------------------------------------


def test_invalid_byte_names_offset_and_line(tmp_path: Path) -> None:
    data = b"---\ntitle: x\n---\nab\xffcd\n"
    err = read_bytes(tmp_path, data)
    assert err.message == (
        "not UTF-8: byte 0xff at byte offset 19 (line 4) is not valid UTF-8; "
        "save the sheet as UTF-8"
    )
    assert data.index(b"\xff") == 19  # the offset in the message, counted independently
    assert (err.line, err.column) == (4, 3)
    assert str(err).startswith("line 4, col 3: not UTF-8")


def test_invalid_byte_column_counts_characters(tmp_path: Path) -> None:
    # Two Greek letters (two bytes each) before the bad byte: column 3, byte offset 4.
    err = read_bytes(tmp_path, "αβ".encode() + b"\xc0\n")
    assert "byte 0xc0 at byte offset 4 (line 1)" in err.message
    assert (err.line, err.column) == (1, 3)


def test_latin1_file_is_refused(tmp_path: Path) -> None:
    # A sheet saved as Latin-1: 'é' is the single byte 0xe9, which starts no valid sequence.
    err = read_bytes(tmp_path, "Intro\r\nCaf\u00e9\r\n".encode("latin-1"))
    assert "byte 0xe9 at byte offset 10 (line 2)" in err.message
    assert (err.line, err.column) == (2, 4)


def test_truncated_sequence_at_end(tmp_path: Path) -> None:
    # The first two bytes of the three-byte euro sign, then end of file.
    err = read_bytes(tmp_path, b"x = 1\n\xe2\x82")
    assert "byte 0xe2 at byte offset 6 (line 2)" in err.message
    assert (err.line, err.column) == (2, 1)


def test_lone_cr_counts_as_a_line_end_in_byte_positions(tmp_path: Path) -> None:
    err = read_bytes(tmp_path, b"a\rb\r\nc\xff")
    assert (err.line, err.column) == (3, 2)


def test_bom_takes_no_column(tmp_path: Path) -> None:
    err = read_bytes(tmp_path, b"\xef\xbb\xbfab\xff")
    assert (err.line, err.column) == (1, 3)


def test_encoded_surrogate_is_refused() -> None:
    # CESU-style encoding of U+D800 is not valid UTF-8.
    with pytest.raises(DocumentError) as caught:
        decode_sheet_bytes(b"ok\n\xed\xa0\x80\n")
    assert (caught.value.line, caught.value.column) == (2, 1)


# --- binary content ----------------------------------------------------------------------


def test_nul_byte_is_binary_content(tmp_path: Path) -> None:
    err = read_bytes(tmp_path, b"line one\nab\x00cd\n")
    assert err.message == (
        "binary content (a NUL byte at byte offset 11, line 2): a sheet is a UTF-8 text file"
    )
    assert (err.line, err.column) == (2, 3)


def test_binary_is_reported_before_bad_utf8(tmp_path: Path) -> None:
    # A typical binary file: invalid UTF-8 early, NUL bytes later; "binary" is the better word.
    err = read_bytes(tmp_path, b"\x89PNG\r\n\x1a\n\x00\x00")
    assert err.message.startswith("binary content")
    assert (err.line, err.column) == (3, 1)


def test_nul_character_in_text() -> None:
    err = parse_error("x\n```calc\na\x00\n```\n")
    assert err.message == "binary content (a NUL character): a sheet is a UTF-8 text file"
    assert (err.line, err.column) == (3, 2)


# --- fences never closed -----------------------------------------------------------------


def test_unclosed_calc_fence_names_its_line() -> None:
    err = parse_error("Intro\n\n```calc\nx = 1\ny = 2\n")
    assert err.message == (
        "the ``` fence opened on line 3 is never closed: add a line ``` after its last line"
    )
    assert (err.line, err.column) == (3, 1)


def test_unclosed_indented_fence_column() -> None:
    err = parse_error("Intro\n   ~~~~calc\nx\n~~~\n")  # the ~~~ is too short to close it
    assert err.message.startswith("the ~~~~ fence opened on line 2 is never closed")
    assert (err.line, err.column) == (2, 4)


def test_unclosed_fence_after_front_matter_counts_its_lines() -> None:
    err = parse_error("---\ntitle: t\n---\n\n```calc\n")
    assert (err.line, err.column) == (5, 1)


def test_shorter_closing_fence_does_not_close() -> None:
    err = parse_error("````calc\nx\n```\n")
    assert (err.line, err.column) == (1, 1)


def test_other_character_does_not_close() -> None:
    err = parse_error("```calc\nx\n~~~\n")
    assert (err.line, err.column) == (1, 1)


def test_closing_fence_with_info_does_not_close() -> None:
    err = parse_error("```calc\nx\n```calc\n")
    assert (err.line, err.column) == (1, 1)


def test_unclosed_fence_in_a_note() -> None:
    # A note's own fenced block left open would swallow every cell after it.
    err = parse_error("See:\n\n```python\nprint(1)\n\n```calc\nx = 1\n")
    assert err.message.startswith("the ``` fence opened on line 3 is never closed")
    assert (err.line, err.column) == (3, 1)


def test_unclosed_result_fence() -> None:
    err = parse_error("```calc\nx = 1\n```\n\n```result\nx = 1\n")
    assert (err.line, err.column) == (5, 1)


def test_unclosed_fence_with_crlf_and_bom() -> None:
    err = parse_error("\ufeffa\r\nb\r\n```calc\r\n")
    assert (err.line, err.column) == (3, 1)


# --- front matter never closed -----------------------------------------------------------


def test_front_matter_never_closed() -> None:
    err = parse_error("---\ntitle: t\ndigits: 4\n\n```calc\nx = 1\n```\n")
    assert err.message == (
        "the front matter opened on line 1 is never closed: add a line '---' after it"
    )
    assert (err.line, err.column) == (1, 1)
    assert str(err) == (
        "line 1, col 1: the front matter opened on line 1 is never closed: "
        "add a line '---' after it"
    )


def test_front_matter_never_closed_after_bom() -> None:
    err = parse_error("\ufeff---\ntitle: t\n")
    assert (err.line, err.column) == (1, 1)


def test_dashes_not_on_the_first_line_are_not_front_matter() -> None:
    # A thematic break later in the file is ordinary Markdown.
    doc = parse_document("Intro\n---\nmore\n")
    assert doc.front_matter is None


# --- files that cannot be read -----------------------------------------------------------


def test_missing_file(tmp_path: Path) -> None:
    path = tmp_path / "absent.sheet.md"
    with pytest.raises(DocumentError) as caught:
        read_document(path)
    assert caught.value.message.startswith(f"cannot read {path}: ")
    assert "No such file" in caught.value.message
    assert isinstance(caught.value.__cause__, FileNotFoundError)


def test_folder_instead_of_file(tmp_path: Path) -> None:
    with pytest.raises(DocumentError) as caught:
        read_document(tmp_path)
    assert isinstance(caught.value.__cause__, OSError)


def test_empty_file_is_valid(tmp_path: Path) -> None:
    path = tmp_path / "empty.sheet.md"
    path.write_bytes(b"")
    doc = read_document(path)
    assert doc.blocks == () and doc.front_matter is None
