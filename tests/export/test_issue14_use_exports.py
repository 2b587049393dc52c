"""Exports of a sheet that uses a library relation and a relation of a sheet beside it:
the constants behind those relations are in every constants table, every digest is there
whole, and the LaTeX wraps the digests instead of running past the line."""

from __future__ import annotations

import hashlib
import html
import importlib.util
from pathlib import Path

import pytest

from worksheet.constants import load_dataset
from worksheet.document import parse_document
from worksheet.export import export_run
from worksheet.export.latex_text import escape_text
from worksheet.library import library_sheet
from worksheet.runner import SheetRun, SheetRunner, document_statements
from worksheet.syntax import parse_statement
from worksheet.syntax import tree as t
from worksheet.syntax.names import referenced_names

_SPEC = importlib.util.spec_from_file_location(
    "demo_sheet_checks", Path(__file__).with_name("test_demo_sheets.py")
)
assert _SPEC is not None and _SPEC.loader is not None
_DEMO = importlib.util.module_from_spec(_SPEC)
_SPEC.loader.exec_module(_DEMO)
overfull_boxes = _DEMO.overfull_boxes  # the issue-10 log reader, shared, not copied

DATASET = "CODATA2018"
FORMATS = ("latex", "html", "md")

GYRO = f"""\
---
title: Gyro relations of the Kestrel Ridge receiver group
constants: {DATASET}
---

```calc
f_ce(B) = q_e*B/(2*pi*m_e)   # electron cyclotron frequency, NRL Plasma Formulary (2019) p. 28
```
"""

PROPOSAL = f"""\
---
title: Kestrel Ridge burst proposal
constants: {DATASET}
---

A light hole seen by a receiver in a fictional 0.3 T field.

```calc
use T_H from library "blackhole"
use f_ce from "relations/gyro.sheet.md"
T_burst = T_H(1e12 [kg]) in [K]
f_gyro = f_ce(0.3 [T]) in [GHz]
```
"""


@pytest.fixture(scope="module")
def sheet_folder(tmp_path_factory) -> Path:
    folder = tmp_path_factory.mktemp("proposal")
    (folder / "relations").mkdir()
    (folder / "relations" / "gyro.sheet.md").write_text(GYRO, encoding="utf-8")
    (folder / "burst.sheet.md").write_text(PROPOSAL, encoding="utf-8")
    return folder


@pytest.fixture(scope="module")
def run(sheet_folder) -> SheetRun:
    path = sheet_folder / "burst.sheet.md"
    done = SheetRunner(path).run(parse_document(path.read_text(encoding="utf-8")))
    assert done.all_hold, [r.message for r in done.results if r.status != "ok"]
    return done


@pytest.fixture(scope="module")
def exports(run) -> dict[str, str]:
    return {to: export_run(run, to, source_name="burst.sheet.md")[0] for to in FORMATS}


def _relation_constants(sheet_text: str, name: str) -> set[str]:
    """The dataset constants a sheet's relation reads, from its statements as the parser
    reads them (the test's own reading of the used sheet, not the export's)."""
    constants = load_dataset(DATASET).constants
    for source in document_statements(parse_document(sheet_text)):
        tree = parse_statement(source.text, source.line)
        if isinstance(tree, t.Relation) and tree.name == name:
            return (set(referenced_names(tree)) - set(tree.params)) & constants.keys()
    raise AssertionError(f"{name} is not a relation of the sheet")


def _constants_section(text: str) -> str:
    return text.rsplit("Constants used", 1)[1]


def test_issue14_the_expected_constants_are_read_from_the_used_sheets():
    library_text = Path(library_sheet("blackhole")).read_text(encoding="utf-8")
    # T_H(M) = hbar*c^3/(8*pi*G*M*k_B), Hawking 1975 (Commun. Math. Phys. 43, 199).
    assert _relation_constants(library_text, "T_H") == {"hbar", "c", "G", "k_B"}
    # f_ce(B) = e B / (2 pi m_e), NRL Plasma Formulary.
    assert _relation_constants(GYRO, "f_ce") == {"q_e", "m_e"}


def test_issue14_constants_reached_through_use_are_in_every_table(exports):
    library_text = Path(library_sheet("blackhole")).read_text(encoding="utf-8")
    expected = _relation_constants(library_text, "T_H") | _relation_constants(GYRO, "f_ce")
    dataset = load_dataset(DATASET)
    assert not expected & set(PROPOSAL.split("```calc", 1)[1].replace("(", " ").split())
    for symbol in sorted(expected):
        entry = dataset.constants[symbol]
        tables = {to: _constants_section(exports[to]) for to in FORMATS}
        assert escape_text(entry.name) in tables["latex"], symbol
        assert html.escape(entry.name) in tables["html"], symbol
        assert entry.name in tables["md"], symbol
        for to in FORMATS:
            assert entry.value in tables[to], (symbol, to)


def test_issue14_every_digest_is_in_every_export_whole(sheet_folder, exports):
    digests = [
        hashlib.sha256(Path(library_sheet("blackhole")).read_bytes()).hexdigest(),
        hashlib.sha256((sheet_folder / "relations" / "gyro.sheet.md").read_bytes()).hexdigest(),
    ]
    for digest in digests:
        assert digest in exports["html"]
        assert digest in exports["md"]
        # LaTeX may break the digest between groups; without the break points it is whole.
        assert digest in exports["latex"].replace("\\allowbreak{}", "")


@pytest.mark.slow
@pytest.mark.skipif(_DEMO._tex() is None, reason="no pdflatex on PATH (install TeX Live)")
def test_issue14_use_lines_wrap_in_latex(tmp_path, exports):
    done = _DEMO._compile(tmp_path, "burst", exports["latex"])
    assert done.returncode == 0, done.stdout[-3000:]
    log = (tmp_path / "burst.log").read_text(encoding="latin-1")
    assert overfull_boxes(log) == []


REST_ENERGY = f"""\
---
title: Electron rest energy
constants: {DATASET}
---

```calc
E_e = m_e*c^2 in [keV]   # rest energy: E = m c^2 (Einstein 1905, Ann. Phys. 18, 639)
```
"""

USES_A_VALUE = f"""\
---
title: Twice the rest energy
constants: {DATASET}
---

```calc
use E_e from "rest.sheet.md"
check_pair = 2*E_e in [keV]
```
"""


def test_issue14_constants_behind_an_imported_value_are_listed(tmp_path):
    """A value brought in by name (not a relation call) still lists the constants it is
    computed from: m_e and c, read in the used sheet's own statement."""
    (tmp_path / "rest.sheet.md").write_text(REST_ENERGY, encoding="utf-8")
    path = tmp_path / "pair.sheet.md"
    path.write_text(USES_A_VALUE, encoding="utf-8")
    done = SheetRunner(path).run(parse_document(USES_A_VALUE))
    assert done.all_hold, [r.message for r in done.results if r.status != "ok"]
    # 2 m_e c^2 = 1021.998 keV (CODATA 2018: m_e c^2 = 0.51099895000 MeV).
    value = next(r for r in done.results if r.name == "check_pair").value
    assert value == pytest.approx(1021.9979, rel=1e-7)
    for fmt in FORMATS:
        text = export_run(done, fmt, path.name)[0]
        tail = text[text.rfind("onstants") :]  # the closing constants section
        for symbol in ("m_e", "c"):
            value_text = load_dataset(DATASET).constants[symbol].value
            assert value_text in tail, (fmt, symbol)
