"""Edits give exactly the expected text, keep the file readable and renumber the lines."""

from __future__ import annotations

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from worksheet.document import (
    CalcCell,
    NoteBlock,
    SheetDocument,
    insert_block,
    move_block,
    new_calc_cell,
    new_note_block,
    new_sheet_text,
    parse_document,
    remove_block,
    render_document,
    replace_cell_body,
    replace_note_text,
    with_results,
)
from worksheet.errors import DocumentError

TWO_CELLS = "Intro\n\n```calc\nx = 1\n```\n\nMiddle\n\n```calc\ny = 2\n```\n"


def first_lines(doc: SheetDocument) -> list[int]:
    return [block.first_line for block in doc.blocks]


def editor_lines(text: str) -> list[str]:
    """Lines as an editor numbers them, computed without the reader's own splitter."""
    return text.replace("\r\n", "\n").replace("\r", "\n").split("\n")


def assert_consistent(doc: SheetDocument) -> None:
    """The document reads back as itself, line numbers included."""
    text = render_document(doc)
    again = parse_document(text)
    assert again.blocks == doc.blocks
    assert again.front_matter == doc.front_matter
    lines = editor_lines(text.removeprefix("\ufeff"))
    for cell in doc.calc_cells():
        for k, body_line in enumerate(cell.body_lines()):
            assert lines[cell.first_line - 1 + k] == body_line
        assert lines[cell.first_line - 2] == cell.fence_open.rstrip("\r\n")


# --- with_results ------------------------------------------------------------------------


def test_results_are_created_after_each_cell() -> None:
    doc = with_results(parse_document(TWO_CELLS), [["x = 1"], ["y = 2", "ok"]])
    assert render_document(doc) == (
        "Intro\n\n```calc\nx = 1\n```\n\n```result\nx = 1\n```\n"
        "\nMiddle\n\n```calc\ny = 2\n```\n\n```result\ny = 2\nok\n```\n"
    )
    # Lines: 1 Intro, 4 x = 1, 7-9 first result, 10 blank, 11 Middle, 13 y = 2.
    assert first_lines(doc) == [1, 4, 10, 14]
    assert_consistent(doc)


def test_existing_result_keeps_its_fences_and_gap() -> None:
    text = "```calc\nx = 1\n```\n\n \n~~~~ result  \nold line\n~~~~~\nAfter\n"
    doc = with_results(parse_document(text), [["new line", "second"]])
    assert render_document(doc) == (
        "```calc\nx = 1\n```\n\n \n~~~~ result  \nnew line\nsecond\n~~~~~\nAfter\n"
    )
    assert first_lines(doc) == [2, 10]
    assert_consistent(doc)


def test_none_removes_the_result_and_its_gap() -> None:
    text = "```calc\nx = 1\n```\n\n```result\nx = 1\n```\n\nAfter\n"
    doc = with_results(parse_document(text), [None])
    assert render_document(doc) == "```calc\nx = 1\n```\n\nAfter\n"
    assert first_lines(doc) == [2, 4]
    assert_consistent(doc)


def test_empty_list_records_an_empty_result() -> None:
    doc = with_results(parse_document("```calc\n```\n"), [[]])
    assert render_document(doc) == "```calc\n```\n\n```result\n```\n"


def test_result_after_cell_at_end_without_newline() -> None:
    doc = with_results(parse_document("Intro\n```calc\nx = 1\n```"), [["x = 1"]])
    assert render_document(doc) == "Intro\n```calc\nx = 1\n```\n\n```result\nx = 1\n```\n"


def test_result_uses_the_sheet_line_end() -> None:
    text = "```calc\r\nx = 1\r\n```\r\nAfter\r\n"
    doc = with_results(parse_document(text), [["x = 1", "two\nlines"]])
    assert render_document(doc) == (
        "```calc\r\nx = 1\r\n```\r\n\r\n```result\r\nx = 1\r\ntwo\r\nlines\r\n```\r\nAfter\r\n"
    )


def test_result_fence_is_long_enough_for_its_body() -> None:
    doc = with_results(parse_document("```calc\nx\n```\n"), [["```", "`````  "]])
    assert render_document(doc) == ("```calc\nx\n```\n\n``````result\n```\n`````  \n``````\n")
    assert doc.calc_cells()[0].result is not None
    assert doc.calc_cells()[0].result.lines() == ("```", "`````  ")


def test_existing_short_result_fence_is_lengthened() -> None:
    text = "```calc\nx\n```\n  ```result\nold\n```  \n"
    doc = with_results(parse_document(text), [["````"]])
    assert render_document(doc) == "```calc\nx\n```\n  `````result\n````\n`````  \n"


def test_tilde_result_fence_ignores_backtick_lines() -> None:
    text = "```calc\nx\n```\n~~~result\nold\n~~~\n"
    doc = with_results(parse_document(text), [["```", "~~~~"]])
    assert render_document(doc) == "```calc\nx\n```\n~~~~~result\n```\n~~~~\n~~~~~\n"


def test_results_need_one_entry_per_cell() -> None:
    with pytest.raises(DocumentError) as caught:
        with_results(parse_document(TWO_CELLS), [["x = 1"]])
    assert caught.value.message == ("one result entry per calc cell is needed: 2 cells, 1 entries")


def test_a_bare_string_is_not_a_list_of_lines() -> None:
    # A str is a Sequence[str]; taken as one, each character would become a result line.
    with pytest.raises(DocumentError) as caught:
        with_results(parse_document("```calc\nx\n```\n"), "x = 1")  # type: ignore[arg-type]
    assert caught.value.message == ("one result entry per calc cell is needed: 1 cells, 5 entries")
    with pytest.raises(DocumentError) as caught:
        with_results(parse_document("```calc\nx\n```\n"), ["x"])  # type: ignore[list-item]
    assert caught.value.message == (
        "each result entry must be a list of lines, not a single string"
    )


def test_removing_a_result_that_would_capture_a_stray_result_note_is_refused() -> None:
    # The note after the cell's result starts with another result fence; without the real
    # result in between it would read back as the cell's result.
    text = "```calc\nx\n```\n```result\nx\n```\n\n```result\nstray\n```\n"
    doc = parse_document(text)
    assert len(doc.blocks) == 2
    with pytest.raises(DocumentError) as caught:
        with_results(doc, [None])
    assert "would read back as that cell's result" in caught.value.message


# --- replacing text ----------------------------------------------------------------------


def test_replace_cell_body_renumbers_later_cells() -> None:
    doc = replace_cell_body(parse_document(TWO_CELLS), 1, "x = 1\nz = x + 1\n")
    assert render_document(doc) == (
        "Intro\n\n```calc\nx = 1\nz = x + 1\n```\n\nMiddle\n\n```calc\ny = 2\n```\n"
    )
    assert first_lines(doc) == [1, 4, 7, 11]
    assert_consistent(doc)


def test_replace_cell_body_keeps_result_and_line_ends() -> None:
    text = "```calc\r\nx = 1\r\n```\r\n\r\n```result\r\nx = 1\r\n```\r\n"
    doc = replace_cell_body(parse_document(text), 0, "x = 2\ny = 3")
    assert render_document(doc) == (
        "```calc\r\nx = 2\r\ny = 3\r\n```\r\n\r\n```result\r\nx = 1\r\n```\r\n"
    )


def test_replace_cell_body_lengthens_the_fence() -> None:
    text = "  ```calc\nx\n  ```  \nAfter\n"
    doc = replace_cell_body(parse_document(text), 0, "a\n```\nb\n")
    assert render_document(doc) == "  ````calc\na\n```\nb\n  ````  \nAfter\n"
    assert doc.calc_cells()[0].body_lines() == ("a", "```", "b")
    assert_consistent(doc)


def test_replace_cell_body_with_empty_text() -> None:
    doc = replace_cell_body(parse_document("```calc\nx\n```\n"), 0, "")
    assert render_document(doc) == "```calc\n```\n"
    assert doc.calc_cells()[0].first_line == 2


def test_replace_cell_body_on_a_note_is_refused() -> None:
    with pytest.raises(DocumentError) as caught:
        replace_cell_body(parse_document(TWO_CELLS), 0, "x")
    assert caught.value.message == "block 0 is a note, not a calc cell"


def test_replace_note_text_adds_the_missing_line_end() -> None:
    doc = replace_note_text(parse_document(TWO_CELLS), 2, "\nA new middle")
    assert render_document(doc) == (
        "Intro\n\n```calc\nx = 1\n```\n\nA new middle\n```calc\ny = 2\n```\n"
    )
    assert first_lines(doc) == [1, 4, 6, 9]
    assert_consistent(doc)


def test_last_note_may_end_without_newline() -> None:
    doc = replace_note_text(parse_document("```calc\nx\n```\nEnd\n"), 1, "The end")
    assert render_document(doc) == "```calc\nx\n```\nThe end"


def test_emptied_note_disappears_and_cells_renumber() -> None:
    doc = replace_note_text(parse_document(TWO_CELLS), 0, "")
    assert render_document(doc) == "```calc\nx = 1\n```\n\nMiddle\n\n```calc\ny = 2\n```\n"
    assert [type(b) for b in doc.blocks] == [CalcCell, NoteBlock, CalcCell]
    assert first_lines(doc) == [2, 4, 8]


def test_note_holding_a_calc_fence_is_refused() -> None:
    with pytest.raises(DocumentError) as caught:
        replace_note_text(parse_document(TWO_CELLS), 0, "Intro\n```calc\nz = 3\n```\n")
    assert caught.value.message == (
        "the edit would change the sheet's meaning: "
        "note 0 holds a calc fence; insert a calc cell instead"
    )


def test_note_with_an_unclosed_fence_at_the_end_is_refused() -> None:
    with pytest.raises(DocumentError) as caught:
        replace_note_text(parse_document("```calc\nx\n```\nEnd\n"), 1, "End\n```python\n")
    err = caught.value
    assert err.message == (
        "the edit would make the sheet unreadable: the ``` fence opened on line 5 "
        "is never closed: add a line ``` after its last line"
    )
    assert (err.line, err.column) == (5, 1)


def test_note_fence_closed_by_a_later_cell_is_refused() -> None:
    # The open python fence would be closed by the next cell's closing fence.
    with pytest.raises(DocumentError) as caught:
        replace_note_text(parse_document(TWO_CELLS), 2, "Middle\n```python\n")
    assert caught.value.message == (
        "the edit would change the sheet's meaning: note 2 opens a fence that it never closes"
    )


def test_top_note_starting_with_dashes_is_refused() -> None:
    with pytest.raises(DocumentError) as caught:
        replace_note_text(parse_document(TWO_CELLS), 0, "---\nlooks: like front matter\n---\n")
    assert caught.value.message.endswith(
        "a note at the top of a sheet cannot start with a '---' line"
    )


def test_note_may_hold_other_fenced_blocks() -> None:
    doc = replace_note_text(parse_document(TWO_CELLS), 0, "See:\n~~~~\n```calc\n```\n~~~~\n")
    assert len(doc.calc_cells()) == 2
    assert_consistent(doc)


def test_replace_note_text_on_a_cell_is_refused() -> None:
    with pytest.raises(DocumentError) as caught:
        replace_note_text(parse_document(TWO_CELLS), 1, "x")
    assert caught.value.message == "block 1 is a calc cell, not a note"


# --- inserting, removing, moving ---------------------------------------------------------


def test_insert_cell_after_note_without_newline() -> None:
    doc = insert_block(parse_document("Intro"), 1, new_calc_cell("y = 2", "\n"))
    assert render_document(doc) == "Intro\n```calc\ny = 2\n```\n"
    assert first_lines(doc) == [1, 3]
    assert_consistent(doc)


def test_insert_cell_at_the_top_renumbers_everything() -> None:
    doc = insert_block(parse_document(TWO_CELLS), 0, new_calc_cell("a = 0\nb = 1\n", "\n"))
    assert render_document(doc) == "```calc\na = 0\nb = 1\n```\n" + TWO_CELLS
    # Lines: 2-3 new body, 5 Intro, 8 x = 1, 10 blank before Middle, 14 y = 2.
    assert first_lines(doc) == [2, 5, 8, 10, 14]


def test_insert_into_empty_sheet_with_front_matter_without_newline() -> None:
    doc = insert_block(parse_document("---\ntitle: t\n---"), 0, new_note_block("Hi", "\n"))
    assert render_document(doc) == "---\ntitle: t\n---\nHi\n"
    assert first_lines(doc) == [4]


def test_inserted_note_merges_with_its_neighbour() -> None:
    doc = insert_block(parse_document(TWO_CELLS), 1, new_note_block("More.", "\n"))
    assert render_document(doc) == TWO_CELLS.replace("Intro\n\n", "Intro\n\nMore.\n")
    assert len(doc.blocks) == 4
    assert isinstance(doc.blocks[0], NoteBlock)
    assert doc.blocks[0].text == "Intro\n\nMore.\n"


def test_insert_out_of_range() -> None:
    with pytest.raises(DocumentError) as caught:
        insert_block(parse_document(TWO_CELLS), 5, new_note_block("x", "\n"))
    assert caught.value.message == "cannot insert at 5: the sheet has 4 blocks"


def test_remove_cell_merges_the_notes_around_it() -> None:
    doc = remove_block(parse_document(TWO_CELLS), 1)
    assert render_document(doc) == "Intro\n\n\nMiddle\n\n```calc\ny = 2\n```\n"
    assert [type(b) for b in doc.blocks] == [NoteBlock, CalcCell]
    assert first_lines(doc) == [1, 7]


def test_remove_last_block() -> None:
    doc = remove_block(parse_document(TWO_CELLS), 3)
    assert render_document(doc) == "Intro\n\n```calc\nx = 1\n```\n\nMiddle\n\n"


def test_remove_out_of_range() -> None:
    with pytest.raises(DocumentError) as caught:
        remove_block(parse_document(TWO_CELLS), -1)
    assert caught.value.message == "no block -1: the sheet has 4 blocks"


def test_move_cell_up_takes_its_result_along() -> None:
    text = "Intro\n```calc\na\n```\n```calc\nb\n```\n\n```result\nb\n```\n"
    doc = move_block(parse_document(text), 2, -1)
    assert render_document(doc) == "Intro\n```calc\nb\n```\n\n```result\nb\n```\n```calc\na\n```\n"
    assert first_lines(doc) == [1, 3, 10]
    assert_consistent(doc)


def test_move_last_block_without_newline() -> None:
    doc = move_block(parse_document("```calc\na\n```\nEnd"), 1, -1)
    assert render_document(doc) == "End\n```calc\na\n```\n"
    assert first_lines(doc) == [1, 3]


def test_move_out_of_range() -> None:
    with pytest.raises(DocumentError) as caught:
        move_block(parse_document(TWO_CELLS), 0, -1)
    assert caught.value.message == "cannot move block 0 by -1: the sheet has 4 blocks"


# --- new blocks and sheets ---------------------------------------------------------------


def test_new_blocks_use_the_given_line_end() -> None:
    cell = new_calc_cell("a\nb", "\r\n")
    assert (cell.fence_open, cell.body, cell.fence_close) == (
        "```calc\r\n",
        "a\r\nb\r\n",
        "```\r\n",
    )
    assert cell.result is None
    assert new_note_block("one\rtwo", "\r\n").text == "one\r\ntwo\r\n"
    # A bare CR is a line end of its own (issue 11: old Mac files are kept as they are).
    assert new_note_block("one\ntwo", "\r").text == "one\rtwo\r"
    with pytest.raises(DocumentError):
        new_note_block("x", "\n\r")


def test_new_sheet_text_exactly() -> None:
    text = new_sheet_text("Burst budget for a light black hole", "CODATA2018", 4)
    assert text == (
        "---\ntitle: Burst budget for a light black hole\nconstants: CODATA2018\ndigits: 4\n"
        "---\n\nNotes in Markdown go between the calc cells.\n\n```calc\n```\n"
    )
    doc = parse_document(text)
    assert (doc.get("title"), doc.get("constants"), doc.get("digits")) == (
        "Burst budget for a light black hole",
        "CODATA2018",
        "4",
    )
    assert [type(b) for b in doc.blocks] == [NoteBlock, CalcCell]
    assert doc.calc_cells()[0].first_line == 10


def test_new_sheet_title_that_needs_quotes() -> None:
    text = new_sheet_text("Run #3: it's hot", "CODATA2022", 6)
    assert "title: 'Run #3: it''s hot'\n" in text
    assert parse_document(text).get("title") == "Run #3: it's hot"


def test_new_sheet_digits_must_be_positive() -> None:
    with pytest.raises(DocumentError):
        new_sheet_text("t", "CODATA2018", 0)


@settings(max_examples=200, deadline=None)
@given(st.text(st.characters(exclude_categories=("Cs", "Cc", "Zl", "Zp")), max_size=30))
def test_new_sheet_title_reads_back(title: str) -> None:
    doc = parse_document(new_sheet_text(title, "CODATA2022", 4))
    assert doc.get("title") == title


# --- any sequence of edits ---------------------------------------------------------------

_texts = st.lists(
    st.sampled_from(["x = 1", "", "  ", "```", "~~~~", "````result", "---", "ħ 🙂", "a\tb"]),
    max_size=4,
).map("\n".join)
_edits = st.lists(
    st.tuples(
        st.sampled_from(
            ["results", "body", "note", "insert_cell", "insert_note", "remove", "move"]
        ),
        st.integers(0, 8),
        st.integers(-2, 2),
        _texts,
        st.lists(st.one_of(st.none(), st.lists(_texts, max_size=3)), max_size=8),
    ),
    max_size=8,
)
_start = st.sampled_from(
    [
        "",
        TWO_CELLS,
        "\ufeff---\r\ntitle: t\r\n---\r\n```calc\r\nx\r\n```\r\n\r\n```result\r\nx\r\n```",
        "Note\n```python\nprint(1)\n```\n````calc\n```\n````\n~~~result\n~~~\nEnd",
    ]
)


@settings(max_examples=300, deadline=None)
@given(_start, _edits)
def test_any_edit_sequence_keeps_the_sheet_readable(start: str, edits: list) -> None:
    doc = parse_document(start)
    for kind, choice, delta, text, results in edits:
        index = choice % (len(doc.blocks) + 1)  # mostly in range, sometimes one past the end
        try:
            if kind == "results":
                cells = len(doc.calc_cells())
                doc = with_results(doc, (results * 9)[:cells] if results else [None] * cells)
            elif kind == "body":
                doc = replace_cell_body(doc, index, text)
            elif kind == "note":
                doc = replace_note_text(doc, index, text)
            elif kind == "insert_cell":
                doc = insert_block(doc, index, new_calc_cell(text, doc.newline))
            elif kind == "insert_note":
                doc = insert_block(doc, index, new_note_block("Note " + text, doc.newline))
            elif kind == "remove":
                doc = remove_block(doc, index)
            else:
                doc = move_block(doc, index, delta)
        except DocumentError:
            continue  # a refused edit leaves the previous document, which stays valid
        assert_consistent(doc)
