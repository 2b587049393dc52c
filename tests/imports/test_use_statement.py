"""Issue 14: sheets that bring in other sheets (`use`), pinned by the sha256 of their bytes."""

from __future__ import annotations

import hashlib
import json
import os
import sys
from pathlib import Path

import pytest
from hypothesis import HealthCheck, example, given, settings
from hypothesis import strategies as st

from worksheet import load
from worksheet.cli import main
from worksheet.document import read_document
from worksheet.engine import make_context, split_statements
from worksheet.errors import ParseError
from worksheet.imports import SheetImports
from worksheet.runner import SheetRunner
from worksheet.syntax import parse_statement
from worksheet.syntax import tree as t

pytest_plugins = ["pytester"]

RELATIONS = """---
title: group relations
constants: CODATA2022
---

```calc
M = 5e11 [kg]
r_s = 2*G*M/c^2
T_H(m) = hbar*c^3/(8*pi*G*m*k_B)
```
"""


def sheet(body: str, dataset: str = "CODATA2022") -> str:
    return f"---\ntitle: t\nconstants: {dataset}\n---\n\n```calc\n{body}\n```\n"


def run_file(path: Path):
    runner = SheetRunner(path)
    try:
        return runner.run(read_document(path))
    finally:
        runner.close()


def by_line(run) -> dict[int, object]:
    return {r.line: r for r in run.results}


@pytest.fixture
def group(tmp_path: Path) -> Path:
    (tmp_path / "relations").mkdir()
    (tmp_path / "relations" / "bh.sheet.md").write_text(RELATIONS)
    return tmp_path


# --- parsing --------------------------------------------------------------------------


def test_issue14_use_forms_parse():
    every = parse_statement('use "relations/bh.sheet.md"  # the group file')
    assert every == t.Use(1, 1, 'use "relations/bh.sheet.md"', (), "relations/bh.sheet.md", False)
    named = parse_statement('use r_s, T_H from library "blackhole"')
    assert (named.names, named.path, named.library) == (("r_s", "T_H"), "blackhole", True)
    assert parse_statement("use = 3 [m]").name == "use"  # still an ordinary name


@pytest.mark.parametrize(
    "text", ["use x", 'use "unclosed', 'use ""', 'use a, a from "x.sheet.md"', 'use _a from "x"']
)
def test_issue14_bad_use_is_a_parse_error(text):
    with pytest.raises(ParseError):
        parse_statement(text)


# --- evaluation -----------------------------------------------------------------------


def test_issue14_use_brings_values_and_relations_with_digest(group: Path):
    main_sheet = group / "main.sheet.md"
    main_sheet.write_text(
        sheet(
            'use "relations/bh.sheet.md"\nx = r_s in [fm]\ny = T_H(M) in [K]\nm : [kg]\n'
            "d = diff(T_H(m), m)"
        )
    )
    run = run_file(main_sheet)
    results = by_line(run)
    digest = hashlib.sha256((group / "relations" / "bh.sheet.md").read_bytes()).hexdigest()
    assert results[7].kind == "use" and results[7].status == "ok"
    assert results[7].record == f'use "relations/bh.sheet.md": sha256 {digest}'
    assert results[7].imported["sha256"] == digest
    # r_s of 5e11 kg: 2 G M / c^2 = 7.426e-16 m (REFERENCE.md: 1.48523e-15 m at 1e12 kg)
    assert results[8].si_value == pytest.approx(1.48523e-15 / 2, rel=1e-5)
    assert results[9].si_value == pytest.approx(1.22690e11 * 2, rel=1e-5)
    assert results[11].symbolic == "-c^3*hbar/(8*pi*G*k_B*m^2)"
    assert run.all_hold


def test_issue14_check_reports_a_changed_dependency_as_stale_naming_the_file(group, capsys):
    main_sheet = group / "main.sheet.md"
    main_sheet.write_text(sheet('use r_s from "relations/bh.sheet.md"\nx = r_s in [fm]'))
    assert main(["run", str(main_sheet)]) == 0
    assert main(["check", str(main_sheet)]) == 0
    bh = group / "relations" / "bh.sheet.md"
    bh.write_text(RELATIONS.replace("5e11", "6e11"))
    capsys.readouterr()
    assert main(["check", str(main_sheet)]) == 1
    out = capsys.readouterr().out
    assert "main.sheet.md:7: stale" in out
    assert "relations/bh.sheet.md changed since the results were recorded" in out
    assert hashlib.sha256(bh.read_bytes()).hexdigest() in out


def test_issue14_only_named_ones_are_brought_in(group: Path):
    main_sheet = group / "main.sheet.md"
    main_sheet.write_text(sheet('use r_s from "relations/bh.sheet.md"\na = T_H(1 [kg])\nb = M'))
    results = by_line(run_file(main_sheet))
    assert results[8].status == "error" and "unknown function 'T_H'" in results[8].message
    # M is what r_s is computed from: lent for r_s, but not readable by this sheet.
    assert results[9].status == "error"
    assert "does not bring it in" in results[9].message


def test_issue14_redefining_a_brought_in_name_is_an_error_naming_the_use(group: Path):
    main_sheet = group / "main.sheet.md"
    main_sheet.write_text(sheet('use "relations/bh.sheet.md"\nr_s = 3 [m]'))
    result = by_line(run_file(main_sheet))[8]
    assert result.status == "error"
    assert "brought in from relations/bh.sheet.md by line 7" in result.message


def test_issue14_a_name_used_above_its_use_line_is_an_error(group: Path):
    main_sheet = group / "main.sheet.md"
    main_sheet.write_text(sheet('x = r_s\nuse "relations/bh.sheet.md"'))
    result = by_line(run_file(main_sheet))[7]
    assert result.status == "error" and "move the use statement up" in result.message


def test_issue14_an_unknown_imported_name_gets_a_hint(group: Path):
    main_sheet = group / "main.sheet.md"
    main_sheet.write_text(sheet('use r_ss from "relations/bh.sheet.md"\nx = r_ss'))
    results = by_line(run_file(main_sheet))
    assert "'r_ss' is not defined in relations/bh.sheet.md; did you mean 'r_s'?" in (
        results[7].message
    )
    assert results[8].status == "skipped" and "depends on line 7" in results[8].message


def test_issue14_imported_statements_run_under_the_importers_dataset(tmp_path: Path):
    # An unpinned sheet takes the dataset of the sheet that uses it: m_e differs between
    # CODATA 2018 and 2022 (REFERENCE.md: 9.1093837015e-31 -> 9.1093837139e-31 kg).
    (tmp_path / "free.sheet.md").write_text("```calc\nme = m_e\n```\n")
    for dataset, expected in (("CODATA2018", 9.1093837015e-31), ("CODATA2022", 9.1093837139e-31)):
        path = tmp_path / f"{dataset}.sheet.md"
        path.write_text(sheet('use "free.sheet.md"\nx = me', dataset))
        assert by_line(run_file(path))[8].si_value == pytest.approx(expected, rel=1e-12)


def test_issue14_datasets_must_agree(group: Path):
    main_sheet = group / "main.sheet.md"
    main_sheet.write_text(sheet('use "relations/bh.sheet.md"', "CODATA2018"))
    result = by_line(run_file(main_sheet))[7]
    assert result.status == "error"
    assert "relations/bh.sheet.md pins CODATA2022" in result.message
    assert "CODATA2018" in result.message


def test_issue14_a_failing_imported_sheet_fails_the_use(tmp_path: Path):
    (tmp_path / "bad.sheet.md").write_text(sheet("x = 1 [m]\ncheck x > 2 [m]"))
    main_sheet = tmp_path / "main.sheet.md"
    main_sheet.write_text(sheet('use "bad.sheet.md"'))
    result = by_line(run_file(main_sheet))[7]
    assert result.status == "error" and "bad.sheet.md does not hold: line 8" in result.message


def test_issue14_two_files_defining_one_name_differently_is_an_error(tmp_path: Path):
    (tmp_path / "a.sheet.md").write_text(sheet("x = 1 [m]"))
    (tmp_path / "b.sheet.md").write_text(sheet("x = 2 [m]"))
    main_sheet = tmp_path / "main.sheet.md"
    main_sheet.write_text(sheet('use "a.sheet.md"\nuse "b.sheet.md"'))
    results = by_line(run_file(main_sheet))
    assert results[7].status == "ok"
    assert results[8].status == "error" and "'x' comes from a.sheet.md" in results[8].message


def test_issue14_chains_bring_in_what_the_middle_sheet_brought_in(group: Path):
    (group / "relations" / "middle.sheet.md").write_text(
        sheet('use T_H from "bh.sheet.md"\nT_one = T_H(1 [M_sun]) in [K]')
    )
    main_sheet = group / "main.sheet.md"
    main_sheet.write_text(sheet('use "relations/middle.sheet.md"\nx = T_one\ny = T_H(1 [M_sun])'))
    results = by_line(run_file(main_sheet))
    # REFERENCE.md: the Hawking temperature of 1 M_sun is 6.17026e-8 K
    assert results[8].si_value == pytest.approx(6.17026e-8, rel=1e-5)
    assert results[9].si_value == pytest.approx(6.17026e-8, rel=1e-5)


# --- refusals: the folder tree of the starting sheet ------------------------------------


def test_issue14_absolute_paths_are_refused(tmp_path: Path):
    other = tmp_path / "bh.sheet.md"
    other.write_text(RELATIONS)
    main_sheet = tmp_path / "main.sheet.md"
    main_sheet.write_text(sheet(f'use "{other}"'))
    result = by_line(run_file(main_sheet))[7]
    assert result.status == "error" and "absolute path" in result.message


def test_issue14_dotdot_out_of_the_tree_is_refused(tmp_path: Path):
    (tmp_path / "bh.sheet.md").write_text(RELATIONS)
    (tmp_path / "project").mkdir()
    main_sheet = tmp_path / "project" / "main.sheet.md"
    main_sheet.write_text(sheet('use "../bh.sheet.md"\nuse "sub/../../bh.sheet.md"'))
    results = by_line(run_file(main_sheet))
    for line in (7, 8):
        assert results[line].status == "error"
        assert "leaves the folder of the sheet that started the run" in results[line].message


def test_issue14_dotdot_inside_the_tree_is_fine(group: Path):
    (group / "notes").mkdir()
    main_sheet = group / "main.sheet.md"
    main_sheet.write_text(sheet('use "notes/../relations/bh.sheet.md"'))
    assert by_line(run_file(main_sheet))[7].status == "ok"


def test_issue14_a_nested_sheet_cannot_leave_the_starting_tree_either(tmp_path: Path):
    (tmp_path / "outside.sheet.md").write_text(RELATIONS)
    project = tmp_path / "project"
    project.mkdir()
    (project / "middle.sheet.md").write_text(sheet('use "../outside.sheet.md"'))
    main_sheet = project / "main.sheet.md"
    main_sheet.write_text(sheet('use "middle.sheet.md"'))
    result = by_line(run_file(main_sheet))[7]
    assert result.status == "error" and "leaves the folder" in result.message


@pytest.mark.skipif(sys.platform == "win32", reason="symbolic links need privileges there")
def test_issue14_symlink_escapes_are_refused(tmp_path: Path):
    outside = tmp_path / "outside"
    outside.mkdir()
    (outside / "bh.sheet.md").write_text(RELATIONS)
    project = tmp_path / "project"
    project.mkdir()
    os.symlink(outside / "bh.sheet.md", project / "file-link.sheet.md")
    os.symlink(outside, project / "folder-link")
    main_sheet = project / "main.sheet.md"
    main_sheet.write_text(sheet('use "file-link.sheet.md"\nuse "folder-link/bh.sheet.md"'))
    results = by_line(run_file(main_sheet))
    for line in (7, 8):
        assert results[line].status == "error"
        assert "symbolic link to a place outside" in results[line].message


@pytest.mark.skipif(sys.platform == "win32", reason="symbolic links need privileges there")
def test_issue14_a_symlink_inside_the_tree_is_followed(group: Path):
    os.symlink(group / "relations" / "bh.sheet.md", group / "link.sheet.md")
    main_sheet = group / "main.sheet.md"
    main_sheet.write_text(sheet('use "link.sheet.md"'))
    assert by_line(run_file(main_sheet))[7].status == "ok"


def test_issue14_cycles_are_an_error_naming_the_chain(tmp_path: Path):
    (tmp_path / "a.sheet.md").write_text(sheet('use "b.sheet.md"'))
    (tmp_path / "b.sheet.md").write_text(sheet('use "c.sheet.md"'))
    (tmp_path / "c.sheet.md").write_text(sheet('use "a.sheet.md"'))
    result = by_line(run_file(tmp_path / "a.sheet.md"))[7]
    assert result.status == "error"
    assert "use cycle: a.sheet.md -> b.sheet.md -> c.sheet.md -> a.sheet.md" in result.message


def test_issue14_a_sheet_using_itself_is_a_cycle(tmp_path: Path):
    (tmp_path / "a.sheet.md").write_text(sheet('use "a.sheet.md"'))
    result = by_line(run_file(tmp_path / "a.sheet.md"))[7]
    assert "use cycle: a.sheet.md -> a.sheet.md" in result.message


def test_issue14_missing_file_and_folder(tmp_path: Path):
    (tmp_path / "folder.sheet.md").mkdir()
    main_sheet = tmp_path / "main.sheet.md"
    main_sheet.write_text(sheet('use "nothing.sheet.md"\nuse "folder.sheet.md"'))
    results = by_line(run_file(main_sheet))
    assert "no such sheet file" in results[7].message
    assert "is a folder" in results[8].message


def test_issue14_unknown_library_subject_gets_a_hint(tmp_path: Path):
    main_sheet = tmp_path / "main.sheet.md"
    main_sheet.write_text(sheet('use library "blackhol"'))
    result = by_line(run_file(main_sheet))[7]
    assert "no subject 'blackhol'; did you mean 'blackhole'" in result.message


# --- every face ------------------------------------------------------------------------


def test_issue14_json_carries_the_use_kind_and_digest(group: Path, capsys):
    main_sheet = group / "main.sheet.md"
    main_sheet.write_text(sheet('use r_s from "relations/bh.sheet.md"'))
    main(["run", str(main_sheet)])
    capsys.readouterr()
    assert main(["check", "--json", str(main_sheet)]) == 0
    record = json.loads(capsys.readouterr().out)["statements"][0]
    assert record["kind"] == "use"
    assert record["imported"]["names"] == ["r_s"]
    digest = hashlib.sha256((group / "relations" / "bh.sheet.md").read_bytes()).hexdigest()
    assert record["imported"]["sha256"] == digest


def test_issue14_python_api_resolves_uses_from_the_sheet_folder(group: Path, monkeypatch):
    main_sheet = group / "main.sheet.md"
    main_sheet.write_text(sheet('use "relations/bh.sheet.md"\nx = r_s in [fm]'))
    monkeypatch.chdir(group / "relations")  # not the sheet's folder
    result = load(main_sheet).run()
    assert result.sheet_run.all_hold


def test_issue14_export_shows_the_use_line(group: Path, tmp_path: Path):
    main_sheet = group / "main.sheet.md"
    main_sheet.write_text(sheet('use r_s from "relations/bh.sheet.md"\nx = r_s in [fm]'))
    out = group / "main.md"
    assert main(["export", str(main_sheet), "--to", "md", "-o", str(out)]) == 0
    digest = hashlib.sha256((group / "relations" / "bh.sheet.md").read_bytes()).hexdigest()
    assert digest in out.read_text()


def test_issue14_pytest_plugin_runs_sheets_with_uses(pytester: pytest.Pytester):
    (pytester.path / "relations").mkdir()
    (pytester.path / "relations" / "bh.sheet.md").write_text(RELATIONS)
    main_sheet = pytester.path / "main.sheet.md"
    main_sheet.write_text(sheet('use "relations/bh.sheet.md"\ncheck r_s > 0 [m]'))
    assert main(["run", str(pytester.path / "relations" / "bh.sheet.md")]) == 0
    assert main(["run", str(main_sheet)]) == 0
    pytester.runpytest("--sheets", "-p", "no:cacheprovider").assert_outcomes(passed=3)
    (pytester.path / "relations" / "bh.sheet.md").write_text(RELATIONS.replace("5e11", "6e11"))
    result = pytester.runpytest("--sheets", "-p", "no:cacheprovider")
    assert result.ret == 1  # the recorded digest no longer matches: stale
    result.stdout.fnmatch_lines(["*relations/bh.sheet.md changed*"])


def test_issue14_a_relation_reading_a_hidden_name_still_works(tmp_path: Path):
    (tmp_path / "k.sheet.md").write_text(sheet("k0 = 3 [1/m]\nf(x) = k0*x"))
    main_sheet = tmp_path / "main.sheet.md"
    main_sheet.write_text(sheet('use f from "k.sheet.md"\ny = f(2 [m])\nz = k0'))
    results = by_line(run_file(main_sheet))
    assert results[8].si_value == 6.0
    assert results[9].status == "error" and "does not bring it in" in results[9].message


def test_issue14_one_runner_sees_an_edited_dependency(group: Path):
    # the app keeps one runner: a changed used file must not be served from its cache
    main_sheet = group / "main.sheet.md"
    main_sheet.write_text(sheet('use r_s from "relations/bh.sheet.md"\nx = r_s'))
    runner = SheetRunner(main_sheet)
    try:
        doc = read_document(main_sheet)
        first = by_line(runner.run(doc))[8].si_value
        again = by_line(runner.run(doc))[8].si_value
        (group / "relations" / "bh.sheet.md").write_text(RELATIONS.replace("5e11", "1e12"))
        changed = by_line(runner.run(doc))[8].si_value
    finally:
        runner.close()
    assert first == again
    assert changed == pytest.approx(2 * first, rel=1e-12)


_CONTEXT = make_context("CODATA2022")
LINE_BREAKS = "\n\r\x0b\x0c\x1c\x1d\x1e\x85\u2028\u2029"  # what str.splitlines splits at


@settings(
    max_examples=200, deadline=None, suppress_health_check=[HealthCheck.function_scoped_fixture]
)
@given(path=st.text(st.characters(exclude_characters=LINE_BREAKS), max_size=40))
@example(path="\ud800")  # a lone surrogate: possible in Python text, not in a file
@example(path="a\x00b")
@example(path='"(')  # found by hypothesis: 'use "\\"("' once swallowed the next line
def test_issue14_any_use_path_ends_as_a_recorded_line(tmp_path: Path, path: str):
    main_sheet = tmp_path / "main.sheet.md"
    body = "use " + json.dumps(path, ensure_ascii=False) + "\nx = 1 [m]"
    statements = split_statements(body, 7)
    assert [s.line for s in statements] == [7, 8]  # a quoted '(' continues nothing
    scope = SheetImports().scope_for(statements, main_sheet, _CONTEXT, "CODATA2022")
    for result in scope.results.values():  # a path that does not parse: the evaluator's
        assert result.status in ("ok", "error") and result.record


def test_issue14_a_path_with_parentheses(tmp_path: Path):
    (tmp_path / "notes (old)").mkdir()
    (tmp_path / "notes (old)" / "bh.sheet.md").write_text(RELATIONS)
    main_sheet = tmp_path / "main.sheet.md"
    main_sheet.write_text(sheet('use r_s from "notes (old)/bh.sheet.md"\nx = r_s'))
    assert run_file(main_sheet).all_hold


def test_issue14_the_app_service_resolves_uses_from_the_sheet_folder(group: Path, monkeypatch):
    from worksheet.app.evaluation import RunService  # the app's runner, without a screen

    main_sheet = group / "main.sheet.md"
    main_sheet.write_text(sheet('use "relations/bh.sheet.md"\nx = r_s in [fm]'))
    monkeypatch.chdir(group / "relations")
    service = RunService(main_sheet)
    try:
        outcome = service.run(read_document(main_sheet))
    finally:
        service.close()
    assert outcome is not None and outcome.run is not None and outcome.run.all_hold


def test_issue14_hidden_names_travel_along_a_chain(group: Path):
    # main uses all of middle; middle brought in only r_s, computed from M in bh.sheet.md.
    # A verb in main sees r_s through to M, so M's value must travel with it.
    (group / "relations" / "middle.sheet.md").write_text(
        sheet('use r_s from "bh.sheet.md"\nr2 = 2*r_s')
    )
    main_sheet = group / "main.sheet.md"
    body = 'use "relations/middle.sheet.md"\nq = simplify(r2*c^2/(4*G))\nw = M'
    main_sheet.write_text(sheet(body))
    results = by_line(run_file(main_sheet))
    assert results[8].status == "ok" and results[8].symbolic == "M"
    assert results[8].si_value == pytest.approx(5e11, rel=1e-12)
    assert results[9].status == "error" and "does not bring it in" in results[9].message
