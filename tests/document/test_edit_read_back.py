"""Edits that read back only the changed cells give what the full round trip gives."""

from __future__ import annotations

from pathlib import Path

import pytest

from worksheet.document import edit, parse_document, render_document, replace_cell_body
from worksheet.runner import SheetRunner, document_statements

SHEETS = sorted((Path(__file__).resolve().parents[2] / "sheets").glob("*.sheet.md"))


def _full_round_trip(doc, index: int, body: str):
    """The edit as it was before the short cut: the whole document read back."""
    blocks = list(doc.blocks)
    blocks[index] = edit.replace(blocks[index], body=edit.with_newlines(body, doc.newline))
    return edit._finish(edit.replace(doc, blocks=tuple(blocks)))


@pytest.mark.parametrize("path", SHEETS, ids=lambda p: p.name)
@pytest.mark.parametrize(
    "change",
    [
        lambda body: body.replace("=", " = ", 1),  # same lines
        lambda body: body + "extra = 1 [m]\nmore = 2*extra\n",  # lines added: later cells move
        lambda body: body.split("\n", 1)[-1],  # a line dropped
    ],
)
def test_issue12_cell_edit_matches_the_full_round_trip(path: Path, change) -> None:
    with _runner() as runner:
        doc = runner.run(parse_document(path.read_text(encoding="utf-8"))).document
        for index in doc.calc_cell_indices():
            body = change(doc.blocks[index].body)
            fast = replace_cell_body(doc, index, body)
            slow = _full_round_trip(doc, index, body)
            assert fast == slow
            assert render_document(fast) == render_document(slow)
            # A run on the edited sheet records what a run on the re-read text records.
            ran = runner.run(fast)
            assert ran.text == SheetRunner().run(parse_document(render_document(fast))).text


class _runner:
    def __enter__(self) -> SheetRunner:
        self.runner = SheetRunner()
        return self.runner

    def __exit__(self, *exc) -> None:
        self.runner.close()


def test_issue12_cell_edit_reads_back_only_the_cell(monkeypatch) -> None:
    text = "---\ntitle: t\nconstants: CODATA2018\n---\n" + "".join(
        f"Step {k}.\n\n```calc\nx{k} = {k} [m]\n```\n\n" for k in range(200)
    )
    doc = edit._finish(parse_document(text))
    index = doc.calc_cell_indices()[100]
    read: list[int] = []
    real = edit.parse_document
    monkeypatch.setattr(edit, "parse_document", lambda t: read.append(len(t)) or real(t))
    edited = replace_cell_body(doc, index, "x100 = 7 [m]\n")
    assert edited.blocks[index].body == "x100 = 7 [m]\n"
    assert read and max(read) < 100  # the one cell, not the whole sheet


def _outcome(function, *args):
    try:
        return render_document(function(*args))
    except edit.DocumentError as err:
        return f"refused: {err.message}"


@pytest.mark.parametrize(
    "body",
    ["a = 1\n```\nb = 2\n", "a = 1\n~~~~\n", "```result\n", "a = 1\r\nb = 2", ""],
)
def test_issue12_fences_in_a_cell_come_out_as_the_full_round_trip_says(body: str) -> None:
    doc = edit._finish(parse_document("```calc\na = 1\n```\n\n```result\na = 1\n```\n\nNote.\n"))
    assert _outcome(replace_cell_body, doc, 0, body) == _outcome(_full_round_trip, doc, 0, body)


def _long_sheet(cells: int) -> str:
    parts = ["---\ntitle: t\nconstants: CODATA2018\n---\n"]
    parts.append("```calc\nM = 5e11 [kg]\nr = 2*G*M/c^2\n```\n\n")
    for k in range(cells):
        parts.append(f"Step {k}.\n\n```calc\nx{k} = {k + 1} [m]\ny{k} = x{k}*r/(1 [m])\n```\n\n")
    return "".join(parts)


def test_issue12_runs_after_edits_match_a_fresh_run() -> None:
    # A stale cell stays stale, an edited cell and the cells that read it are redone, and
    # every face (text, results, staleness) is what a fresh runner gives for the same doc.
    with _runner() as runner:
        doc = runner.run(parse_document(_long_sheet(30))).document
        stale_cell = doc.calc_cell_indices()[5]
        doc = edit.replace(
            doc,
            blocks=tuple(
                edit.replace(b, result=edit.replace(b.result, body="x4 = 99 m\n"))
                if k == stale_cell
                else b
                for k, b in enumerate(doc.blocks)
            ),
        )
        runner.run(doc)
        first = doc.calc_cell_indices()[0]
        edits = [
            (first, "M = 6e11 [kg]\nr = 2*G*M/c^2\n"),
            (doc.calc_cell_indices()[9], "x8 = 7 [m]\ny8 = x8*r/(1 [m])\n"),
            (first, "M = 6e11 [kg]\nr = 3*G*M/c^2\n"),
            (doc.calc_cell_indices()[3], "x2 = 1 [m]\ny2 = x2*q/(1 [m])\n"),  # an error
        ]
        for index, body in edits:
            doc = replace_cell_body(doc, index, body)
            ours = runner.run(doc)
            with _runner() as fresh_runner:
                fresh = fresh_runner.run(doc)
            assert ours.text == fresh.text
            assert [r.record for r in ours.results] == [r.record for r in fresh.results]
            assert [(s.statement.line, s.recorded, s.recomputed) for s in ours.stale] == [
                (s.statement.line, s.recorded, s.recomputed) for s in fresh.stale
            ]
            assert ours.stale  # the hand-spoilt cell and every edit leave stale lines


def _walked_tables(doc) -> tuple[tuple, tuple[int, ...]]:
    """The cell tables as a walk over every block gives them."""
    indices = tuple(k for k, block in enumerate(doc.blocks) if isinstance(block, edit.CalcCell))
    return tuple(doc.blocks[k] for k in indices), indices


def test_issue12_an_edit_carries_the_cell_tables_it_does_not_change() -> None:
    # An edit that moves no line takes the cell tables over from the sheet it edits; they
    # must be the ones a walk over the new blocks gives, cell for cell (the same objects).
    with _runner() as runner:
        doc = runner.run(parse_document(_long_sheet(12))).document
        for position in (0, 5, 12):
            index = doc.calc_cell_indices()[position]
            body = doc.blocks[index].body.replace("=", " = ", 1)
            doc = replace_cell_body(doc, index, body)
            for current in (doc, runner.run(doc).document):
                cells, indices = _walked_tables(current)
                assert current.calc_cell_indices() == indices
                assert all(a is b for a, b in zip(current.calc_cells(), cells, strict=True))
        # A line added moves every later block: the tables are walked afresh, and agree.
        index = doc.calc_cell_indices()[3]
        doc = replace_cell_body(doc, index, doc.blocks[index].body + "z = 1 [m]\n")
        cells, indices = _walked_tables(doc)
        assert doc.calc_cell_indices() == indices
        assert all(a is b for a, b in zip(doc.calc_cells(), cells, strict=True))


def _same_as_fresh(ours, doc) -> None:
    with _runner() as fresh_runner:
        fresh = fresh_runner.run(doc)
    assert ours.text == fresh.text
    assert [r.record for r in ours.results] == [r.record for r in fresh.results]


def test_issue12_an_evaluator_run_by_another_caller_is_not_trusted_for_an_edit() -> None:
    # The runner names the statements an edit replaces only when its evaluator still holds
    # the runner's last statements. Here another caller runs it on a sheet whose cell 10
    # differs; the runner's next edit (of cell 0) must still give cell 10 back its own text.
    with _runner() as runner:
        doc = runner.run(parse_document(_long_sheet(20))).document
        runner.run(doc)  # now the runner's last cells are this sheet's: an edit is narrow
        other_index = doc.calc_cell_indices()[10]
        other = replace_cell_body(doc, other_index, "x9 = 42 [m]\ny9 = x9*r/(1 [m])\n")
        evaluator = runner.evaluator(runner.settings(doc))
        evaluator.run(document_statements(other))
        first = doc.calc_cell_indices()[0]
        doc = replace_cell_body(doc, first, "M = 7e11 [kg]\nr = 2*G*M/c^2\n")
        _same_as_fresh(runner.run(doc), doc)


def test_issue12_a_failure_while_recording_an_edit_leaves_later_runs_as_a_fresh_run(
    monkeypatch,
) -> None:
    # The edit path updates its tables in place. When recording fails part way, later runs
    # (the same cell edited again, the edit undone, another cell edited) must still read
    # as a fresh run of their text does: nothing may build on the half-updated tables.
    import worksheet.runner as runner_module

    with _runner() as runner:
        doc = runner.run(parse_document(_long_sheet(20))).document
        runner.run(doc)  # now the runner's last cells are this sheet's: an edit is narrow
        first, fifth = doc.calc_cell_indices()[0], doc.calc_cell_indices()[4]
        real = runner_module.with_results

        def failing(*args, **kwargs):
            raise RuntimeError("recording failed")

        monkeypatch.setattr(runner_module, "with_results", failing)
        edited = replace_cell_body(doc, first, "M = 8e11 [kg]\nr = 2*G*M/c^2\n")
        with pytest.raises(RuntimeError):
            runner.run(edited)
        monkeypatch.setattr(runner_module, "with_results", real)
        undone = runner.run(doc)  # the failed edit given up: the sheet as it was
        _same_as_fresh(undone, doc)
        other = replace_cell_body(doc, fifth, "x3 = 5 [m]\ny3 = x3*r/(1 [m])\n")
        _same_as_fresh(runner.run(other), other)
        again = replace_cell_body(other, first, "M = 9e11 [kg]\nr = 2*G*M/c^2\n")
        _same_as_fresh(runner.run(again), again)
