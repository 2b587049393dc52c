"""Messages cite the line numbers of the file as written (issue 10)."""

from __future__ import annotations

import re

from worksheet.document import parse_document
from worksheet.runner import SheetRunner, run_text

SHEET = """---
title: lines
constants: CODATA2022
---

```calc
a = 1 [m]
b = 2 [s]
c2 = a + b
```

Some prose.

```calc
d = a*x
e = a +
f = c2*2
```
"""


def _cited_lines_point_at_their_statements(text: str) -> None:
    lines = text.splitlines()
    for record in lines:
        for cited in re.findall(r"line (\d+)", record):
            target = lines[int(cited) - 1]
            assert re.match(r"\s*\w+ = ", target), (record, cited, target)


def _written_run(text: str):
    runner = SheetRunner()
    try:
        return runner.run(parse_document(text), lines_as_written=True)
    finally:
        runner.close()


def test_issue10_first_run_cites_lines_of_the_written_file() -> None:
    run = _written_run(SHEET)
    assert run.cites_written_lines
    written = run.text
    # The first cell's result block (6 lines) pushes the second cell down: 'd = a*x' is
    # line 21 of the written file, not line 15 of the input.
    lines = written.splitlines()
    assert lines[20] == "d = a*x"
    assert "line 21, col 7: unknown name 'x'" in written
    assert "line 22, col 8:" in written
    assert "line 23: depends on line 9, which failed" in written
    _cited_lines_point_at_their_statements(written)
    assert [r.line for r in run.results] == [7, 8, 9, 21, 22, 23]


def test_issue10_second_run_is_byte_identical_and_current() -> None:
    first = _written_run(SHEET)
    second = run_text(first.text)
    assert second.text == first.text
    assert second.stale == ()


def test_issue10_in_memory_run_cites_the_lines_it_was_given() -> None:
    # check, exports and the app show the file they read: its own line numbers.
    run = run_text(SHEET)
    assert not run.cites_written_lines
    assert [r.line for r in run.results] == [7, 8, 9, 15, 16, 17]


def test_issue10_worksheet_run_and_api_save_write_cited_lines(tmp_path) -> None:
    import subprocess
    import sys

    import worksheet

    by_cli = tmp_path / "cli.sheet.md"
    by_cli.write_text(SHEET, encoding="utf-8")
    done = subprocess.run(
        [sys.executable, "-m", "worksheet", "run", str(by_cli)],
        capture_output=True,
        text=True,
        timeout=120,
    )
    assert done.returncode == 1, done.stderr
    assert f"{by_cli}:21: error: line 21, col 7: unknown name 'x'" in done.stdout
    _cited_lines_point_at_their_statements(by_cli.read_text(encoding="utf-8"))

    by_api = tmp_path / "api.sheet.md"
    by_api.write_text(SHEET, encoding="utf-8")
    sheet = worksheet.load(by_api)
    sheet.save()
    assert by_api.read_text(encoding="utf-8") == by_cli.read_text(encoding="utf-8")
