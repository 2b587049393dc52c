"""Issue 11: a sheet with bare CR line ends is run and kept byte for byte outside its results."""

from __future__ import annotations

from pathlib import Path

import pytest

from worksheet import cli
from worksheet.document import parse_document, read_document
from worksheet.engine import SheetEvaluator, make_context, split_statements
from worksheet.errors import DocumentError
from worksheet.runner import SheetRunner

CR_SHEET = (
    "---\rtitle: Old editor\rconstants: CODATA2022\r---\r\rA note written\ron a classic editor.\r\r"
    "```calc\rM = 5e11 [kg]\rr_s = (2*G*M /\r  c^2)\r```\r\rAfter.\r"
)


def test_issue11_bare_cr_sheet_is_run_and_kept(tmp_path: Path, capsys) -> None:
    path = tmp_path / "cr.sheet.md"
    path.write_bytes(CR_SHEET.encode("utf-8"))
    # Before the fix: "the edit would change the sheet's meaning", exit 2, nothing written.
    assert cli.main(["run", str(path)]) == 0, capsys.readouterr()
    written = path.read_bytes().decode("utf-8")
    assert "\n" not in written  # one kind of line end throughout
    head, _, rest = written.partition("```\r\r```result\r")
    assert head + "```\r" == CR_SHEET[: CR_SHEET.index("```\r\rAfter")] + "```\r"
    results, _, tail = rest.partition("```\r")
    # r_s = 2GM/c^2 with CODATA 2022 G = 6.67430(15)e-11: 7.426e-16 m, u = 2.2e-5 relative.
    assert results.split("\r") == ["M = 5.000e11 kg", "r_s = 7.426e-16 +- 1.7e-20 m", ""]
    assert tail == "\rAfter.\r"
    # Reading back: the same cells and lines; running again changes nothing.
    doc = read_document(path)
    assert doc.newline == "\r"
    assert cli.main(["check", str(path)]) == 0
    again = path.read_bytes()
    assert cli.main(["run", str(path)]) == 0
    assert path.read_bytes() == again


def test_issue11_line_numbers_of_a_bare_cr_sheet(tmp_path: Path) -> None:
    doc = parse_document(CR_SHEET)
    (cell,) = doc.calc_cells()
    assert cell.first_line == 10  # the line after "```calc", counted at bare CRs as editors do


def test_issue11_only_real_line_ends_split_statements() -> None:
    # A form feed or U+2028 inside a cell is an error on its own line, not an extra line
    # that moves the numbers of every statement after it.
    ctx = make_context("CODATA2022")
    try:
        body = "a = 1\x0c\nb = 2\u2028\nd = 3\rq = 4\r\n"
        results = SheetEvaluator(ctx).run(split_statements(body, 1))
    finally:
        ctx.worker.close()
    assert [(r.line, r.status) for r in results] == [
        (1, "error"),
        (2, "error"),
        (3, "ok"),
        (4, "ok"),
    ]
    assert results[0].message == "line 1, col 6: unexpected character '\\x0c'"


@pytest.mark.parametrize("entry", ["digits: ٣", "budget: ٣", "budget: ¹"])
def test_issue11_front_matter_numbers_take_ascii_digits_only(tmp_path: Path, entry: str) -> None:
    path = tmp_path / "digits.sheet.md"
    path.write_text(f"---\n{entry}\n---\n\n```calc\nx = 1 [m]\n```\n", encoding="utf-8")
    with pytest.raises(DocumentError, match="is not a"):
        SheetRunner().run(read_document(path))
