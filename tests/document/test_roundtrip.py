"""Reading then writing a sheet gives back the same bytes; the reader finds the right blocks."""

from __future__ import annotations

import ast
import re
import subprocess
import sys
from pathlib import Path

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from worksheet.document import (
    CalcCell,
    NoteBlock,
    SheetDocument,
    parse_document,
    read_document,
    render_document,
    render_result_body,
)
from worksheet.errors import DocumentError

CORPUS = Path(__file__).parent / "corpus"
PACKAGE = Path(__file__).parents[2] / "worksheet" / "document"


def corpus_files() -> list[Path]:
    return sorted(CORPUS.glob("*.sheet.md"))


def editor_lines(text: str) -> list[str]:
    """Lines as an editor numbers them, computed without the reader's own splitter."""
    return text.replace("\r\n", "\n").replace("\r", "\n").split("\n")


def test_corpus_holds_every_awkward_case() -> None:
    # The files the brief asks for; a missing one would silently shrink the corpus.
    names = {p.name for p in corpus_files()}
    assert names == {
        "bom.sheet.md",
        "cell_at_end_without_newline.sheet.md",
        "cells_with_and_without_result.sheet.md",
        "crlf.sheet.md",
        "empty.sheet.md",
        "longer_fences.sheet.md",
        "mixed_line_ends.sheet.md",
        "no_final_newline.sheet.md",
        "no_front_matter.sheet.md",
        "non_ascii.sheet.md",
        "notes_with_fences.sheet.md",
        "only_front_matter.sheet.md",
        "tabs_and_trailing_spaces.sheet.md",
        "unknown_front_matter_keys.sheet.md",
    }


@pytest.mark.parametrize("path", corpus_files(), ids=lambda p: p.name)
def test_corpus_round_trip_is_byte_exact(path: Path) -> None:
    data = path.read_bytes()
    doc = parse_document(data.decode("utf-8"))
    assert render_document(doc).encode("utf-8") == data
    assert render_document(read_document(path)).encode("utf-8") == data


# Expected blocks per corpus file, counted by hand from the files:
# ("note", first_line) or ("calc", first_line, recorded result lines or None).
EXPECTED_BLOCKS: dict[str, list[tuple]] = {
    # Result fence closes the file with no line end.
    "no_final_newline.sheet.md": [
        ("note", 6),
        ("calc", 10, ("M = 1e11 kg", "t_ev = 2.665e9 yr")),
    ],
    "crlf.sheet.md": [("note", 5), ("calc", 9, ("r_s = 2*G*M/c^2",))],
    # Line 5 ends with a lone CR, which still counts as a line end.
    "mixed_line_ends.sheet.md": [
        ("note", 5),
        ("calc", 9, ("x = 2 m", "y = 3 m")),
        ("note", 17),
    ],
    # Fences indented by up to three spaces count; a tab-indented one does not.
    "tabs_and_trailing_spaces.sheet.md": [
        ("note", 5),
        ("calc", 8, ("M = 2 M_sun",)),
        ("note", 16),
    ],
    "non_ascii.sheet.md": [
        ("note", 5),
        ("calc", 9, ("M = 1e11 kg", "T_H = 1.227e12 K · ok ✓")),
        ("note", 17),
    ],
    "unknown_front_matter_keys.sheet.md": [("note", 15), ("calc", 17, None)],
    "no_front_matter.sheet.md": [("note", 1), ("calc", 6, None)],
    "bom.sheet.md": [("note", 4), ("calc", 6, None)],
    # Only one real calc cell among many look-alikes; the result fence after it is
    # separated by text, so it stays in the note.
    "notes_with_fences.sheet.md": [("note", 4), ("calc", 48, None), ("note", 50)],
    # Results with one blank line, none, several whitespace lines; an empty cell body.
    "cells_with_and_without_result.sheet.md": [
        ("note", 5),
        ("calc", 7, ("a = 1 m",)),
        ("calc", 14, None),
        ("calc", 17, ("c = 3 m",)),
        ("calc", 23, ()),
        ("note", 29),
        ("calc", 32, None),
        ("note", 34),
    ],
    # A shorter or other-character fence line inside a body does not close it.
    "longer_fences.sheet.md": [
        ("note", 4),
        ("calc", 6, ("```", "recorded lines may hold backticks")),
        ("calc", 16, ("t = 1 s", "`````")),
    ],
    "empty.sheet.md": [],
    "only_front_matter.sheet.md": [],
    "cell_at_end_without_newline.sheet.md": [("calc", 2, None)],
}


def block_summary(doc: SheetDocument) -> list[tuple]:
    summary: list[tuple] = []
    for block in doc.blocks:
        if isinstance(block, NoteBlock):
            summary.append(("note", block.first_line))
        else:
            result = None if block.result is None else block.result.lines()
            summary.append(("calc", block.first_line, result))
    return summary


@pytest.mark.parametrize("name", sorted(EXPECTED_BLOCKS))
def test_corpus_blocks_are_found(name: str) -> None:
    doc = read_document(CORPUS / name)
    assert block_summary(doc) == EXPECTED_BLOCKS[name]


@pytest.mark.parametrize("path", corpus_files(), ids=lambda p: p.name)
def test_first_line_points_at_the_body_in_the_file(path: Path) -> None:
    text = path.read_bytes().decode("utf-8")
    lines = editor_lines(text.removeprefix("\ufeff"))
    for cell in read_document(path).calc_cells():
        for k, body_line in enumerate(cell.body_lines()):
            assert lines[cell.first_line - 1 + k] == body_line
        # The line just above the body is the opening fence.
        assert lines[cell.first_line - 2] + "\n" == cell.fence_open.rstrip("\r\n") + "\n"


def test_front_matter_entries_are_unquoted_and_kept_in_order() -> None:
    doc = read_document(CORPUS / "unknown_front_matter_keys.sheet.md")
    assert doc.front_matter is not None
    assert doc.front_matter.entries == (
        ("title", "It's a sheet: with a colon"),  # single quotes, '' is one quote
        ("constants", "CODATA2018"),  # double quotes, trailing comment dropped
        ("digits", "5"),
        ("reviewer", "A. Referee"),  # an unknown key, kept
        ("tags", ""),  # a nested list: only its key is a simple entry
        ("nested", ""),
        ("empty_value", ""),
        ("url", "https://example.org/a#b"),  # '#' without a space before is not a comment
    )
    assert doc.get("digits") == "5"
    assert doc.get("missing") is None
    assert doc.get("missing", "4") == "4"
    # Lines that are not simple entries survive in the raw text.
    assert "  - evaporation\n" in doc.front_matter.raw
    assert "# a YAML comment line\n" in doc.front_matter.raw


def test_front_matter_with_tabs_and_trailing_spaces() -> None:
    doc = read_document(CORPUS / "tabs_and_trailing_spaces.sheet.md")
    assert doc.get("title") == "Tabs and trailing spaces"
    assert doc.get("constants") == "CODATA2018"


def test_non_ascii_front_matter_value() -> None:
    doc = read_document(CORPUS / "non_ascii.sheet.md")
    assert doc.get("title") == "Hawking temperature — ħ, π and friends 🕳️"
    assert doc.get("author") == "Ελένη Παπαδοπούλου"


def test_bom_is_kept_outside_the_front_matter() -> None:
    doc = read_document(CORPUS / "bom.sheet.md")
    assert doc.bom is True
    assert doc.front_matter is not None
    assert doc.front_matter.raw == "---\ntitle: Starts with a byte order mark\n---\n"
    assert render_document(doc).startswith("\ufeff---\n")


def test_dominant_newline() -> None:
    # Six CR LF against eight bare LF line ends in the mixed file.
    assert read_document(CORPUS / "mixed_line_ends.sheet.md").newline == "\n"
    assert read_document(CORPUS / "crlf.sheet.md").newline == "\r\n"
    assert read_document(CORPUS / "empty.sheet.md").newline == "\n"


def test_empty_file_is_an_empty_sheet() -> None:
    doc = parse_document("")
    assert doc == SheetDocument(None, (), "\n", False)
    assert render_document(doc) == ""


def test_calc_cell_pieces_are_exact() -> None:
    doc = parse_document("```calc\nx = 1\n```\n \t\n\n~~~ result\ny\n~~~~\n")
    (cell,) = doc.blocks
    assert isinstance(cell, CalcCell)
    assert (cell.fence_open, cell.body, cell.fence_close) == ("```calc\n", "x = 1\n", "```\n")
    assert cell.result is not None
    assert cell.result.gap == " \t\n\n"
    assert cell.result.fence_open == "~~~ result\n"
    assert cell.result.body == "y\n"
    assert cell.result.fence_close == "~~~~\n"
    assert doc.calc_cell_indices() == (0,)


def test_info_string_must_be_exactly_calc() -> None:
    # Table: info string -> is it a calc cell?
    cases = {
        "calc": True,
        "  calc\t": True,  # surrounding spaces and tabs are stripped
        "Calc": False,  # case matters
        "calc x": False,
        "calculator": False,
        "": False,
    }
    for info, is_calc in cases.items():
        doc = parse_document(f"```{info}\nx\n```\n")
        assert (len(doc.calc_cells()) == 1) is is_calc, info


def test_backtick_fence_with_backtick_in_info_is_not_a_fence() -> None:
    # CommonMark: "``` a`b" is inline code, not a fence, so nothing is left unclosed.
    doc = parse_document("``` a`b\n```calc\nx\n```\n")
    assert [type(b) for b in doc.blocks] == [NoteBlock, CalcCell]
    assert doc.calc_cells()[0].first_line == 3


def test_render_result_body() -> None:
    assert render_result_body([], "\n") == ""
    assert render_result_body(["a", "", "b"], "\n") == "a\n\nb\n"
    # A line holding line breaks is split so the body has one kind of line end.
    assert render_result_body(["a\nb", "c\r\nd"], "\r\n") == "a\r\nb\r\nc\r\nd\r\n"


# --- generated sheets --------------------------------------------------------------------

_NOTE_CHARS = st.sampled_from(list("abz XY#*>_=|-+:ħπ🙂\t."))
_note_line = st.builds(
    lambda first, rest: first + rest,
    st.sampled_from(list("aZ#*>ħ")),
    st.text(_NOTE_CHARS, max_size=12),
).filter(lambda line: line.strip(" \t") != "---")
_NOTE_FENCED = [
    ["```python", "print(1)", "```"],
    ["```result", "not a cell's result", "```"],
    ["~~~~", "```calc", "x = 1", "```", "~~~~"],
    ["```calc extra", "y", "```"],
]
_body_line = st.one_of(
    st.text(st.sampled_from(list("xyz =*/^()[]#ħ\t `~-")), max_size=14),
    st.sampled_from(["```", "~~~", "````", "```result", "---", "", "   "]),
)
_blank_line = st.text(st.sampled_from([" ", "\t"]), max_size=3)


def _fence_run(char: str, lines: list[str]) -> str:
    longest = max(
        (len(run) for line in lines for run in re.findall(f"{re.escape(char)}+", line)), default=0
    )
    return char * max(3, longest + 1)


@st.composite
def generated_sheets(draw: st.DrawFn) -> tuple[str, list[tuple]]:
    """A sheet text and the blocks it is built from, as ``summary_of`` describes them."""
    end = draw(st.sampled_from(["\n", "\r\n", "mixed"]))

    def joined(lines: list[str]) -> str:
        ends = [draw(st.sampled_from(["\n", "\r\n"])) if end == "mixed" else end for _ in lines]
        return "".join(line + e for line, e in zip(lines, ends, strict=True))

    head = "\ufeff" if draw(st.booleans()) else ""
    if draw(st.booleans()):
        keys = draw(st.lists(st.sampled_from(["title", "constants", "extra"]), max_size=3))
        entries = [
            f"{key}: {draw(st.text(st.sampled_from(list('abc 12.')), max_size=8))}" for key in keys
        ]
        head += joined(["---", *entries, "---"])
    # Each block is a list of text pieces: [note text] or [open, body, close, *result].
    blocks: list[list[str]] = []
    kinds: list[str] = []
    for _ in range(draw(st.integers(0, 6))):
        if draw(st.booleans()):
            lines = draw(st.lists(_note_line, min_size=1, max_size=3))
            for _ in range(draw(st.integers(0, 2))):
                lines += draw(st.sampled_from(_NOTE_FENCED))
                lines += draw(st.lists(st.sampled_from(["", "  "]), max_size=2))
            if kinds and kinds[-1] == "note":  # neighbouring notes read as one
                blocks[-1][0] += joined(lines)
            else:
                blocks.append([joined(lines)])
                kinds.append("note")
            continue
        body = draw(st.lists(_body_line, max_size=4))
        run = _fence_run(draw(st.sampled_from(["`", "~"])), body)
        info = draw(st.sampled_from(["calc", " calc ", "calc\t"]))
        pieces = [joined([run + info]), joined(body), joined([run])]
        if draw(st.booleans()):
            recorded = draw(st.lists(_body_line, max_size=3))
            rrun = _fence_run(draw(st.sampled_from(["`", "~"])), recorded)
            gap = joined(draw(st.lists(_blank_line, max_size=2)))
            pieces += [gap, joined([rrun + "result"]), joined(recorded), joined([rrun])]
        blocks.append(pieces)
        kinds.append("calc")
    if blocks and draw(st.booleans()):  # no line end after the last line
        last = blocks[-1][-1]
        blocks[-1][-1] = last[:-2] if last.endswith("\r\n") else last[:-1]
    text = head + "".join("".join(pieces) for pieces in blocks)
    expected = [
        ("note", pieces[0])
        if kind == "note"
        else ("calc", *pieces[:3], tuple(pieces[3:]) if len(pieces) > 3 else None)
        for kind, pieces in zip(kinds, blocks, strict=True)
    ]
    return text, expected


def summary_of(doc: SheetDocument) -> list[tuple]:
    out: list[tuple] = []
    for block in doc.blocks:
        if isinstance(block, NoteBlock):
            out.append(("note", block.text))
        else:
            result = block.result
            pieces = (
                None
                if result is None
                else (result.gap, result.fence_open, result.body, result.fence_close)
            )
            out.append(("calc", block.fence_open, block.body, block.fence_close, pieces))
    return out


@settings(max_examples=300, deadline=None)
@given(generated_sheets())
def test_generated_sheets_read_as_built_and_round_trip(sheet: tuple[str, list[tuple]]) -> None:
    text, expected = sheet
    doc = parse_document(text)
    assert summary_of(doc) == expected
    assert render_document(doc) == text
    lines = editor_lines(text.removeprefix("\ufeff"))
    for cell in doc.calc_cells():
        for k, body_line in enumerate(cell.body_lines()):
            assert lines[cell.first_line - 1 + k] == body_line


_FRAGMENTS = st.sampled_from(
    [
        "```calc",
        "```result",
        "```",
        "````",
        "~~~",
        "~~~calc",
        "---",
        "",
        " \t",
        "x = 1",
        "title: t",
        "   ```calc",
        "    ```",
        "a`b",
        "\ufeff",
        "ħ 🙂",
    ]
)


@settings(max_examples=500, deadline=None)
@given(st.lists(st.tuples(_FRAGMENTS, st.sampled_from(["\n", "\r\n", "\r", ""])), max_size=14))
def test_any_readable_text_round_trips(pieces: list[tuple[str, str]]) -> None:
    text = "".join(line + end for line, end in pieces)
    try:
        doc = parse_document(text)
    except DocumentError as err:
        # Refusals are for unclosed fences or front matter only, always with a place.
        assert "never closed" in err.message
        assert err.line is not None and err.column is not None
        return
    assert render_document(doc) == text
    lines = editor_lines(text.removeprefix("\ufeff"))
    for cell in doc.calc_cells():
        for k, body_line in enumerate(cell.body_lines()):
            assert lines[cell.first_line - 1 + k] == body_line


# --- layering ----------------------------------------------------------------------------


def test_document_layer_imports_only_the_standard_library_and_errors() -> None:
    for source in sorted(PACKAGE.glob("*.py")):
        tree = ast.parse(source.read_text(encoding="utf-8"))
        for node in ast.walk(tree):
            if isinstance(node, ast.Import):
                names = [alias.name for alias in node.names]
            elif isinstance(node, ast.ImportFrom):
                names = [node.module or ""]
            else:
                continue
            for name in names:
                top = name.split(".")[0]
                if top == "worksheet":
                    assert name == "worksheet.errors" or name.startswith("worksheet.document"), (
                        source.name,
                        name,
                    )
                else:
                    assert top in sys.stdlib_module_names or top == "__future__", (
                        source.name,
                        name,
                    )


def test_importing_the_document_layer_loads_no_ui() -> None:
    code = (
        "import sys, worksheet.document; "
        "print(sorted(m for m in sys.modules if m.split('.')[0] in ('textual', 'rich')))"
    )
    root = str(Path(__file__).parents[2])
    done = subprocess.run(
        [sys.executable, "-c", code], capture_output=True, text=True, check=True, cwd=root
    )
    assert done.stdout.strip() == "[]"
