"""The Markdown report: notes as written, each step and its record, claims and constants."""

from __future__ import annotations

import pytest
import scipy.constants as sc
from markdown_it import MarkdownIt

from worksheet.export import export_run
from worksheet.export.markdown import code_span, escape_markdown
from worksheet.runner import run_text


def _md(run) -> str:
    text, suffix = export_run(run, "md", source_name="burst.sheet.md")
    assert suffix == ".report.md"
    return text


def test_two_exports_are_byte_identical(burst_text):
    assert _md(run_text(burst_text)).encode() == _md(run_text(burst_text)).encode()


def test_notes_steps_and_records(burst_run, burst_text):
    report = _md(burst_run)
    assert "A hole of *half a trillion* kilograms" in report  # the note, as written
    assert "- line 12: `M = 5e11 [kg] +- 20%` → `M = 5.000e11 +- 1.0e11 kg`" in report
    assert "**error**: line 30, col 13: cannot add length (1 \\[m\\], m)" in report
    assert "verify them independently before any use where safety" in report


def _table_rows(report: str, heading: str) -> list[list[str]]:
    """The body rows of the first table after ``heading``, as rendered by markdown-it."""
    section = report.split(heading, 1)[1]
    tokens = MarkdownIt("commonmark").enable("table").parse(section)
    rows: list[list[str]] = []
    in_body = False
    for token in tokens:
        if token.type == "tbody_open":
            in_body = True
        elif token.type == "tbody_close":
            break
        elif in_body and token.type == "tr_open":
            rows.append([])
        elif in_body and token.type == "inline":
            rows[-1].append("".join(child.content for child in token.children or []))
    return rows


def test_claims_table_parses_and_lists_every_claim(burst_run):
    rows = _table_rows(_md(burst_run), "## Claims")
    claims = [r for r in burst_run.results if r.kind == "check"]
    assert [row[0] for row in rows] == [str(c.line) for c in claims]
    assert [row[2] for row in rows] == ["holds", "holds", "fails"]
    for row, claim in zip(rows, claims, strict=True):
        assert row[1].startswith(claim.text)


def test_constants_table_parses_with_published_values(burst_run):
    rows = _table_rows(_md(burst_run), "## Constants used")
    found = {row[0]: float(row[2]) for row in rows}
    # Expected values from scipy.constants (equal in CODATA 2018 and 2022 for these).
    assert found == pytest.approx(
        {
            "G": sc.G,
            "c": sc.c,
            "hbar": sc.hbar,
            "k_B": sc.k,
            "sigma_SB": sc.Stefan_Boltzmann,
            "au (unit)": sc.astronomical_unit,
        },
        rel=1e-12,
    )


def test_title_is_escaped(hostile_run):
    report = _md(hostile_run)
    assert report.startswith("# Odd \\<b\\>title\\</b\\> \\& 100% No.\\#1\n")
    # Rendered, the heading shows the title as text, not as markup.
    rendered = MarkdownIt("commonmark").render(report.splitlines()[0])
    assert rendered == "<h1>Odd &lt;b&gt;title&lt;/b&gt; &amp; 100% No.#1</h1>\n"


@pytest.mark.parametrize(
    ("text", "expected"),
    [
        ("x = 1", "`x = 1`"),
        ("a `b` c", "``a `b` c``"),  # a longer fence than the backticks inside
        ("`x`", "`` `x` ``"),  # padded when starting with a backtick
    ],
)
def test_code_spans(text, expected):
    assert code_span(text) == expected
    # CommonMark reads the span back as the original text.
    html = MarkdownIt("commonmark").renderInline(expected)
    assert html == "<code>" + text.replace("<", "&lt;") + "</code>"


def test_escape_markdown_round_trips_through_a_renderer():
    text = "T_H * 2 < [x](y) & #1 |pipe|"
    assert MarkdownIt("commonmark").renderInline(escape_markdown(text)) == (
        "T_H * 2 &lt; [x](y) &amp; #1 |pipe|"
    )
