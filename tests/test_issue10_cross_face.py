"""Issue 10's cross-face test: for every demo sheet, each quantity's value, uncertainty and
unit are the same in the result block, ``--json``, the Python API and each export (LaTeX,
HTML, Markdown). A sampled quantity (one read from ranged inputs) has no uncertainty but a
median and its 68% and 95% intervals; every face must show those too, the same.

The reference is the engine's structured result of each statement (``StatementResult``),
shown in the sheet's notation: the value and the interval ends to the sheet's digits, the
uncertainty to two figures. Each face is read back from the text it shows (here, in the
test only: the package itself never reads a face back). Units are compared by what they
mean (SI factor and dimension, through the sheet's unit registry), since each face spells
them its own way.
The app's panel face is tested with the app (tests/app).
"""

from __future__ import annotations

import json
import math
import re
from dataclasses import dataclass, replace
from decimal import Decimal
from html import unescape
from pathlib import Path
from typing import Any

import pytest

import worksheet
from worksheet.cli import main
from worksheet.constants import load_dataset
from worksheet.engine import StatementResult
from worksheet.engine.distributions import SampledSummary
from worksheet.engine.formatting import format_number, format_uncertainty
from worksheet.export import export_run
from worksheet.runner import SheetRun, run_text
from worksheet.units.registry import UnitRegistry

ROOT = Path(__file__).resolve().parents[1]
SHEETS = sorted((ROOT / "sheets").glob("*.sheet.md"))
QUANTITY_KINDS = ("definition", "display", "estimate", "scaling")


Spread = tuple[tuple[str, str, str], ...]
"""A sampled quantity's intervals as shown: (content in percent, low end, high end)."""


@dataclass(frozen=True)
class Shown:
    """A quantity as one face shows it: value and uncertainty as decimal text, a unit.

    ``intervals`` are a sampled quantity's, in the value's unit (None: the face shows none).
    ``median`` is for faces that state the median apart from the value (``--json``, the
    API); a face that shows one number for both leaves it None."""

    value: str
    uncertainty: str | None
    unit: str
    intervals: Spread | None = None
    median: str | None = None


def _decimal(text: str) -> Decimal:
    return Decimal(text.replace("\u2212", "-"))


def _same_number(a: str, b: str) -> bool:
    """The same decimal number with the same significant digits (1.000e12 is not 1e12)."""
    da, db = _decimal(a), _decimal(b)
    return da == db and len(da.as_tuple().digits) == len(db.as_tuple().digits)


class Units:
    """Unit spellings compared by meaning, in the sheet's own registry."""

    def __init__(self, dataset: str) -> None:
        self.registry = UnitRegistry(load_dataset(dataset))

    def same(self, a: str, b: str) -> bool:
        if a in ("", "1") or b in ("", "1"):
            return a in ("", "1") and b in ("", "1")
        first, second = self.registry.resolve_text(a), self.registry.resolve_text(b)
        return first.dimension == second.dimension and math.isclose(
            first.factor, second.factor, rel_tol=1e-12
        )


def reference(result: StatementResult, digits: int) -> Shown:
    """The structured result in the sheet's notation: what every face must show."""
    assert result.value is not None
    u = format_uncertainty(result.uncertainty) if result.uncertainty is not None else None
    value = format_number(result.value, digits)
    if not isinstance(result.sampled, SampledSummary):
        return Shown(value, u, result.unit or "")
    summary = result.sampled
    assert u is None and summary.median == result.value, result
    assert [i.content for i in summary.intervals] == [0.68, 0.95], result
    return Shown(value, None, result.unit or "", spread_of(summary.intervals, digits))


def spread_of(intervals: Any, digits: int) -> Spread:
    """Structured intervals (``Interval`` objects or their ``--json`` dicts) as shown."""
    rows = [i if isinstance(i, dict) else vars(i) for i in intervals]
    return tuple(
        (
            f"{i['content'] * 100:.0f}",
            format_number(i["low"], digits),
            format_number(i["high"], digits),
        )
        for i in rows
    )


def sampled_lines(run: SheetRun) -> list[int]:
    return [r.line for r in quantities(run) if isinstance(r.sampled, SampledSummary)]


def quantities(run: SheetRun) -> list[StatementResult]:
    return [
        r
        for r in run.results
        if r.kind in QUANTITY_KINDS and r.status == "ok" and r.value is not None
    ]


# --- the result block and the Markdown report: the recorded line --------------------------

_NUMBER = r"-?[0-9.]+(?:e-?[0-9]+)?"
_INTERVAL = rf"(\d+)%: ({_NUMBER}) \.\. ({_NUMBER})"
_SPREAD = re.compile(rf"^{_INTERVAL}(?:, {_INTERVAL})*(?=;|$)")
_RECORD_VALUE = re.compile(
    rf"(?P<value>{_NUMBER})(?: \+- (?P<u>{_NUMBER}))?"
    r"(?: (?P<unit>(?!\()[^\s,]+))?(?:, (?P<spread>.*)|(?: \* .*)?)$"
)


def read_record(line: str) -> Shown:
    """``T_H = 2.454e11 +- 5.4e6 K (note)``: the number after the last `` = `` (of the line
    without its closing note, which may hold ``=`` too); a sampled quantity's intervals
    follow its unit: ``d = 0.0444 pc, 68%: 0.0379 .. 0.0529, 95%: 0.0325 .. 0.0606``."""
    tail = _without_note(line).rsplit(" = ", 1)[1]
    match = _RECORD_VALUE.match(tail)
    assert match is not None, line
    spread = None
    if match["spread"] is not None:
        spread = read_spread(match["spread"])
        assert spread is not None and _spread_text(spread) == match["spread"], line
    return Shown(match["value"], match["u"], match["unit"] or "", spread)


def read_spread(text: str) -> Spread | None:
    """``68%: a .. b, 95%: c .. d`` at the start of a text (up to ``;`` or its end)."""
    match = _SPREAD.match(text)
    if match is None:
        return None
    return tuple((m[1], m[2], m[3]) for m in re.finditer(_INTERVAL, match[0]))


def _spread_text(spread: Spread) -> str:
    return ", ".join(f"{content}%: {low} .. {high}" for content, low, high in spread)


def _without_note(line: str) -> str:
    """The line without a closing `` (...)`` note (parentheses balanced from the end)."""
    if not line.endswith(")"):
        return line
    depth = 0
    for index in range(len(line) - 1, -1, -1):
        depth += {")": 1, "(": -1}.get(line[index], 0)
        if depth == 0:
            return line[:index].rstrip() if line[index - 1 : index] == " " else line
    return line


def result_block_lines(run: SheetRun) -> dict[int, str]:
    """Each result's first recorded line, read from the sheet text the run writes."""
    blocks = re.findall(r"^```result\n(.*?)^```$", run.text, re.MULTILINE | re.DOTALL)
    lines = [line for block in blocks for line in block.splitlines()]
    found: dict[int, str] = {}
    position = 0
    for result in run.results:
        if not result.record:
            continue
        found[result.line] = lines[position]
        position += len(result.record.split("\n"))
    assert position == len(lines)
    return found


def markdown_lines(report: str) -> dict[int, str]:
    """``- line N: `statement` → `record` ``: the record of each step."""
    found = {}
    for match in re.finditer(r"^- line (\d+): (`+).*?\2 → (`+)(.*?)\3$", report, re.MULTILINE):
        found[int(match[1])] = match[4].strip()
    return found


# --- LaTeX ---------------------------------------------------------------------------------

_NUM = r"\\num(?:\[[^\]]*\])?\{([^}]*)\}"
_LATEX_FORMS = (
    re.compile(rf"^\({_NUM} \\pm {_NUM}\) \\times 10\^\{{(-?\d+)\}}(?:\\,(?P<unit>.*))?$"),
    re.compile(rf"^{_NUM} \\pm {_NUM}(?:\\,(?P<unit>.*))?$"),
    re.compile(r"^\\qty\{([^}]*)\}\{(?P<unit>.*)\}$"),
    re.compile(rf"^{_NUM}(?:\\,(?P<unit>.*))?$"),
)
_PREFIX = {"kilo": "k", "mega": "M", "tera": "T", "femto": "f", "milli": "m", "giga": "G"}
_UNIT = {
    "gram": "g",
    "kelvin": "K",
    "electronvolt": "eV",
    "metre": "m",
    "second": "s",
    "hour": "hour",
    "radian": "rad",
    "steradian": "sr",
    "joule": "J",
    "watt": "W",
}
_LITERAL_UNIT = {
    r"\mathrm{M}_{\odot}": "M_sun",
    r"\mathrm{M}_{\oplus}": "M_earth",
}


def latex_unit(text: str) -> str:
    """siunitx v3 input (``\\kilo\\gram``, ``\\mathrm{pc}^{3}``) back to sheet unit text."""
    body = text.strip()
    if body.startswith("\\unit{") and body.endswith("}"):
        body = body[len("\\unit{") : -1]
    for literal, name in _LITERAL_UNIT.items():
        body = body.replace(literal, f"\\mathrm{{{name}}}")
    factors: list[str] = []
    pattern = (
        r"(\\per)?(?:\\(?P<prefix>kilo|mega|tera|femto|milli|giga))?"
        r"(?:\\mathrm\{(?P<literal>[A-Za-z_]+)\}|\\(?P<macro>[a-z]+))"
        r"(?P<power>\\squared|\\cubed|\^\{(-?\d+)\})?(?:\\,)?"
    )
    position = 0
    for match in re.finditer(pattern, body):
        assert match.start() == position, (text, body[position:])
        position = match.end()
        if match["macro"] in ("per", "squared", "cubed"):
            raise AssertionError(text)
        name = match["literal"] or (_PREFIX.get(match["prefix"] or "", "") + _UNIT[match["macro"]])
        power = {"\\squared": 2, "\\cubed": 3}.get(match["power"] or "")
        if power is None:
            power = int(match[6]) if match[6] else 1
        factors.append(f"{name}^{-power if match[1] else power}")
    assert position == len(body), (text, body[position:])
    return "*".join(factors)


def latex_value(math: str) -> Shown:
    """The value at the end of a step's formula (after its last top-level `` = ``)."""
    tail = math.rsplit(" = ", 1)[1].split("\\,\\left(", 1)[0]  # a scaling form's factors
    for number, form in enumerate(_LATEX_FORMS):
        match = form.match(tail)
        if match is None:
            continue
        unit = latex_unit(match["unit"] or "")
        if number == 0:
            exponent = int(match[3])
            value = f"{match[1]}e{exponent}"
            u = _decimal(match[2]).scaleb(exponent)
            return Shown(value, format(u, "f"), unit)
        if number == 1:
            return Shown(match[1], match[2], unit)
        value = match[1].replace(" e", "e")
        return Shown(value, None, unit)
    raise AssertionError(f"no value in {tail!r}")


def latex_items(text: str) -> dict[int, str]:
    """The typeset formula of each step, by the line number that labels it."""
    found = {}
    for match in re.finditer(
        r"^\\item\[\{\\footnotesize (\d+)\}\] \\\(\\displaystyle (.*?)\\\)", text, re.MULTILINE
    ):
        found[int(match[1])] = match[2]
    return found


def latex_spreads(text: str) -> dict[int, Spread]:
    """The intervals a step's note (``\\emph{68\\%: a .. b, ...}`` under it) shows, by line."""
    found = {}
    for match in re.finditer(
        r"^\\item\[\{\\footnotesize (\d+)\}\] [^\n]*\\newline\n\\emph\{(.*)\}$", text, re.MULTILINE
    ):
        if (spread := read_spread(match[2].replace("\\%", "%"))) is not None:
            found[int(match[1])] = spread
    return found


# --- HTML ----------------------------------------------------------------------------------

_HTML_VALUE = re.compile(
    r"^\(?(?P<value>−?[0-9.]+)(?: ± (?P<u>[0-9.]+))?\)?"
    r"(?:\u2009×\u200910<sup>(?P<exp>−?\d+)</sup>)?"
    r"(?:\u2009<span class=\"unit\">(?P<unit>.*)</span>)?$"
)


def html_unit(text: str) -> str:
    """``m<sup>3</sup>\u2009kg<sup>−1</sup>`` back to ``m^3*kg^-1``."""
    signs = {"M<sub>⊙</sub>": "M_sun", "M<sub>⊕</sub>": "M_earth"}
    for sign, name in signs.items():
        text = text.replace(sign, name)
    text = re.sub(r"<sup>(.*?)</sup>", r"^\1", text).replace("\u2212", "-")
    return "*".join(text.split("\u2009"))


def html_rows(page: str) -> dict[int, str]:
    """The right-hand side (or the record) of each step row, by line."""
    found = {}
    for match in re.finditer(
        r'<tr class="step status-ok"><td class="line">line (\d+)</td>(.*?)</tr>', page
    ):
        cells = re.findall(r'<td class="math">(.*?)</td>', match[2])
        if len(cells) == 2:
            found[int(match[1])] = cells[1]
        elif record := re.search(r'<pre class="record">(.*?)</pre>', match[2]):
            found[int(match[1])] = "record:" + unescape(record[1]).split("\n")[0]
    return found


def html_spreads(page: str) -> dict[int, Spread]:
    """The intervals of each step row's note (``<span class="note">68%: a .. b, ...``)."""
    found = {}
    for match in re.finditer(
        r'<tr class="step status-ok"><td class="line">line (\d+)</td>.*?'
        r'<td class="status">(?:[^<]*<br>)?<span class="note">(.*?)</span></td></tr>',
        page,
    ):
        if (spread := read_spread(unescape(match[2]))) is not None:
            found[int(match[1])] = spread
    return found


def html_value(right: str) -> Shown:
    if right.startswith("record:"):
        return read_record(right[len("record:") :])
    tail = right.split(' <span class="factors">', 1)[0].rsplit(" = ", 1)[-1]
    tail = tail.removeprefix("= ")
    match = _HTML_VALUE.match(tail)
    assert match is not None, tail
    value = match["value"].replace("−", "-")
    u = match["u"]
    if match["exp"] is not None:
        exponent = int(match["exp"].replace("−", "-"))
        value = f"{value}e{exponent}"
        if u is not None:
            scaled = _decimal(u).scaleb(exponent)
            u = format(scaled, "f")
    return Shown(value, u, html_unit(match["unit"] or ""))


# --- the comparison --------------------------------------------------------------------------


def assert_same(face: str, line: int, shown: Shown, expected: Shown, units: Units) -> None:
    where = f"{face}, line {line}"
    assert _same_number(shown.value, expected.value), (where, shown, expected)
    if shown.median is not None:
        assert _same_number(shown.median, expected.value), (where, shown, expected)
    if expected.intervals is None:
        assert shown.intervals is None, (where, shown, expected)
    else:
        assert shown.intervals is not None, (where, shown, expected)
        assert len(shown.intervals) == len(expected.intervals), (where, shown, expected)
        for ends, want in zip(shown.intervals, expected.intervals, strict=True):
            assert ends[0] == want[0], (where, shown, expected)
            assert _same_number(ends[1], want[1]), (where, shown, expected)
            assert _same_number(ends[2], want[2]), (where, shown, expected)
    if expected.uncertainty is None:
        assert shown.uncertainty is None, (where, shown, expected)
    else:
        assert shown.uncertainty is not None, (where, shown, expected)
        assert _decimal(shown.uncertainty) == _decimal(expected.uncertainty), (where, shown)
    assert units.same(shown.unit, expected.unit), (where, shown, expected)


@pytest.fixture(scope="module")
def runs() -> dict[str, SheetRun]:
    return {path.name: run_text(path.read_text(encoding="utf-8")) for path in SHEETS}


def test_there_are_demo_sheets_with_quantities(runs):
    assert len(runs) >= 3
    assert all(len(quantities(run)) >= 5 for run in runs.values())
    # Sampled quantities (ranged inputs and what is derived from them) are among them.
    assert len(sampled_lines(runs["detection-rate.sheet.md"])) >= 5


@pytest.mark.parametrize("path", SHEETS, ids=lambda p: p.name)
def test_issue10_every_face_shows_the_same_quantities(path, runs, capsys):
    run = runs[path.name]
    digits = run.settings.digits
    units = Units(run.settings.dataset)
    expected = {r.line: reference(r, digits) for r in quantities(run)}

    faces: dict[str, dict[int, Shown]] = {}
    block = result_block_lines(run)
    faces["result block"] = {line: read_record(block[line]) for line in expected}

    assert main(["check", str(path), "--json"]) == 0
    (document,) = [json.loads(line) for line in capsys.readouterr().out.splitlines() if line]
    by_line = {s["line"]: s for s in document["statements"]}
    faces["--json"] = {}
    for line in expected:
        statement = by_line[line]
        u = statement.get("uncertainty")
        shown = Shown(
            format_number(statement["value"], digits),
            format_uncertainty(u) if u is not None else None,
            statement["unit"] or "",
        )
        if (sampled := statement.get("sampled")) is not None:
            median = format_number(sampled["median"], digits)
            shown = replace(shown, intervals=spread_of(sampled["intervals"], digits), median=median)
        faces["--json"][line] = shown

    api = {q.line: q for q in worksheet.load(path).run()}
    faces["Python API"] = {}
    for line in expected:
        item = api[line]
        assert item.value is not None
        u = format_uncertainty(item.uncertainty) if item.uncertainty is not None else None
        shown = Shown(format_number(item.value, digits), u, item.unit or "")
        if item.sampled is not None:
            median = format_number(item.sampled.median, digits)
            shown = replace(
                shown, intervals=spread_of(item.sampled.intervals, digits), median=median
            )
        faces["Python API"][line] = shown
        # The pint Quantity means the value and unit of the structured result (in SI).
        result = next(r for r in run.results if r.line == line)
        assert result.value is not None
        factor = units.registry.resolve_text(result.unit).factor if result.unit else 1.0
        si = item.quantity.to_base_units().magnitude
        assert math.isclose(si, result.value * factor, rel_tol=1e-9), line

    tex = export_run(run, "latex", path.name)[0]
    latex, latex_spread = latex_items(tex), latex_spreads(tex)
    faces["LaTeX"] = {
        line: replace(latex_value(latex[line]), intervals=latex_spread.get(line))
        for line in expected
    }
    html = export_run(run, "html", path.name)[0]
    page, html_spread = html_rows(html), html_spreads(html)
    faces["HTML"] = {
        line: _with_spread(html_value(page[line]), html_spread.get(line)) for line in expected
    }
    report = markdown_lines(export_run(run, "md", path.name)[0])
    faces["Markdown"] = {line: read_record(report[line]) for line in expected}

    for face, shown in faces.items():
        assert set(shown) == set(expected), face
        for line, value in shown.items():
            assert_same(face, line, value, expected[line], units)


def _with_spread(shown: Shown, spread: Spread | None) -> Shown:
    """A row's value with its note's intervals (a row shown as its record has them already)."""
    if spread is None:
        return shown
    assert shown.intervals is None, shown
    return replace(shown, intervals=spread)


def _caught(shown: Shown, expected: Shown) -> bool:
    try:
        assert_same("face", 30, shown, expected, Units("CODATA2022"))
    except AssertionError:
        return True
    return False


def test_issue10_a_face_that_misstates_a_number_is_caught():
    """The readers above are strict: one digit or one unit off is a difference, in a
    single value and in a sampled quantity's median, interval ends, contents and unit."""
    units = Units("CODATA2022")
    right = Shown("1.227e11", "2.8e6", "K")
    assert _same_number("1.227e11", right.value)
    assert not _same_number("1.2270e11", right.value)  # padded digits are not the record's
    assert not _same_number("1.228e11", right.value)
    assert not units.same("km", "m") and units.same("1/(pc^3*yr)", "pc^-3*yr^-1")
    assert latex_value(r"T = (\num{1.227} \pm \num{0.000028}) \times 10^{11}\,\unit{\kelvin}") == (
        Shown("1.227e11", "2800000", "K^1")
    )
    assert read_record("t = 2.665e12 yr * (M / 1e12 kg)^3") == Shown("2.665e12", None, "yr")

    # A sampled quantity: each interval end, its content and the unit are compared.
    record = "d = 0.0444 pc, 68%: 0.0379 .. 0.0529, 95%: 0.0325 .. 0.0606 (median of 100 samples)"
    sampled = Shown("0.0444", None, "pc", (("68", "0.0379", "0.0529"), ("95", "0.0325", "0.0606")))
    assert read_record(record) == sampled and not _caught(sampled, sampled)
    assert _caught(read_record(record.replace("0.0529", "0.0528")), sampled)  # an end off
    assert _caught(read_record(record.replace("0.0379", "0.03790")), sampled)  # padded
    assert _caught(read_record(record.replace("95%", "90%")), sampled)  # another content
    assert _caught(read_record(record.replace(" pc,", " km,")), sampled)  # another unit
    assert _caught(read_record(record.replace(", 95%: 0.0325 .. 0.0606", "")), sampled)
    assert _caught(replace(sampled, intervals=None), sampled)  # the intervals left out
    assert _caught(sampled, replace(sampled, intervals=None))  # intervals on a single value
    assert _caught(replace(sampled, median="0.0445"), sampled)  # --json: median apart from value
    with pytest.raises(AssertionError):
        read_record(record.replace("0.0606", "0.0606 or so"))  # nothing after the intervals
    latex = (
        "\\item[{\\footnotesize 30}] \\(\\displaystyle d = \\qty{0.0444}{\\mathrm{pc}}\\)"
        "\\newline\n\\emph{68\\%: 0.0379 .. 0.0529, 95\\%: 0.0325 .. 0.0607; median}\n"
    )
    assert latex_spreads(latex) == {30: (("68", "0.0379", "0.0529"), ("95", "0.0325", "0.0607"))}
    assert _caught(replace(sampled, intervals=latex_spreads(latex)[30]), sampled)
    html = (
        '<tr class="step status-ok"><td class="line">line 30</td><td class="math">d</td>'
        '<td class="math">= 0.0444</td><td class="status"><span class="note">'
        "68%: 0.0378 .. 0.0529, 95%: 0.0325 .. 0.0606; median</span></td></tr>\n"
    )
    assert _caught(replace(sampled, intervals=html_spreads(html)[30]), sampled)


GUARDED = """\
```calc
x = exp(1000)
y = 1e-320*1e-10
w = 1 - cos(1e-9)
```
"""
"""Beyond the double range (overflow, underflow) and a cancellation: the precision guard's
high-precision value is the recorded one, and every document must show it, not inf or 0."""


def test_issue10_precision_guarded_values_are_shown_as_recorded():
    import mpmath

    run = run_text(GUARDED)
    units = Units(run.settings.dataset)
    # Independent values at 50 digits (mpmath): e^1000, 1e-330, 1 - cos(1e-9) = 5e-19.
    mpmath.mp.dps = 50
    exact = {
        2: f"{Decimal(mpmath.nstr(mpmath.e**1000, 20)):.3e}".replace("e+", "e"),
        3: "1.000e-330",
        4: "5.000e-19",
    }
    mpmath.mp.dps = 15
    block = result_block_lines(run)
    latex = latex_items(export_run(run, "latex")[0])
    page = html_rows(export_run(run, "html")[0])
    report = markdown_lines(export_run(run, "md")[0])
    for line, value in exact.items():
        expected = Shown(value, None, "")
        assert_same("result block", line, read_record(block[line]), expected, units)
        assert_same("LaTeX", line, latex_value(latex[line]), expected, units)
        assert_same("HTML", line, html_value(page[line]), expected, units)
        assert_same("Markdown", line, read_record(report[line]), expected, units)
