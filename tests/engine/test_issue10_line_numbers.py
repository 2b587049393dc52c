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


def test_issue10_first_run_cites_lines_of_the_written_file() -> None:
    run = run_text(SHEET)
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
    runner = SheetRunner()
    try:
        first = runner.run(parse_document(SHEET))
        second = runner.run(parse_document(first.text))
    finally:
        runner.close()
    assert second.text == first.text
    assert second.stale == ()
