"""The Python API: load, run, quantities as pint and sympy objects, claims, save.

Expected numbers come from scipy.constants (CODATA 2022, as the sheets pin) and from the
IAU definitions cited beside them, never from the code under test.
"""

from __future__ import annotations

import math
import multiprocessing
from pathlib import Path

import pint
import pytest
import scipy.constants as sc
import sympy

import worksheet
from worksheet.api import ClaimResult, QuantityResult, Sheet, SheetResult, quantity_registry
from worksheet.cli import main as cli_main
from worksheet.errors import DocumentError, EvaluationError

M_PBH = 1e12  # kg, the demo hole of the tests below
# Hawking temperature T = hbar c^3 / (8 pi G M k_B) (Hawking 1975).
T_HAWKING = sc.hbar * sc.c**3 / (8 * math.pi * sc.G * M_PBH * sc.k)
R_SCHWARZSCHILD = 2 * sc.G * M_PBH / sc.c**2
# IAU 2012 Resolution B2: au exactly; IAU 2015 Resolution B2: pc = (648000/pi) au.
AU = 149597870700.0
PARSEC = 648000 / math.pi * AU
# IAU 2015 Resolution B3 (Prsa et al. 2016, AJ 152, 41): nominal GM_sun; M_sun = GM_sun / G.
M_SUN = 1.3271244e20 / sc.G
JULIAN_YEAR = 365.25 * 86400  # s, IAU definition of the Julian year

HOLE = """---
title: A light hole
constants: CODATA2022
digits: 4
---

Notes stay as they are.

```calc
M = 1e12 [kg]                            # the hole
T_H = hbar*c^3/(8*pi*G*M*k_B) in [K]
r_s = 2*G*M/c^2 in [km]
E_T = k_B*T_H in [MeV]
T_half = T_H/2
T_H*2 in [K]
check T_H > 1e11 [K]
check T_H < 1e11 [K]
```
"""


def close(actual: float, expected: float, rel: float = 1e-9) -> bool:
    return math.isclose(actual, expected, rel_tol=rel, abs_tol=0.0)


def sheet_text(*lines: str) -> str:
    return "---\nconstants: CODATA2022\n---\n\n```calc\n" + "\n".join(lines) + "\n```\n"


@pytest.fixture(scope="module")
def hole() -> SheetResult:
    return worksheet.loads(HOLE).run()


def test_quantity_in_recorded_unit_matches_scipy(hole: SheetResult) -> None:
    temperature = hole["T_H"]
    assert isinstance(temperature, QuantityResult)
    assert isinstance(temperature.quantity, pint.Quantity)
    assert temperature.quantity.units == quantity_registry().kelvin
    assert close(temperature.quantity.magnitude, T_HAWKING)
    assert temperature.value == temperature.quantity.magnitude
    assert (temperature.unit, temperature.line, temperature.status) == ("K", 11, "ok")
    # Recorded in km, and pint converts it back to metres correctly.
    radius = hole["r_s"].quantity
    assert radius.units == quantity_registry().kilometer
    assert close(radius.to("m").magnitude, R_SCHWARZSCHILD)
    # k_B T in MeV: 1 eV = e J (SI 2019, exact).
    energy = hole["E_T"].quantity
    assert str(energy.units) == "megaelectron_volt"
    assert close(energy.magnitude, sc.k * T_HAWKING / sc.e / 1e6)


def test_symbolic_is_the_form_in_givens_and_constants(hole: SheetResult) -> None:
    form = hole["T_H"].symbolic
    assert isinstance(form, sympy.Expr)
    symbols = hole["T_H"].symbols
    assert set(symbols) == {"hbar", "c", "G", "M", "k_B"}
    values = {"hbar": sc.hbar, "c": sc.c, "G": sc.G, "M": M_PBH, "k_B": sc.k}
    number = float(form.subs({symbols[name]: value for name, value in values.items()}))
    assert close(number, T_HAWKING, 1e-12)
    # A quantity derived from a derived one is still written in the givens.
    half = hole["T_half"]
    assert "T_H" not in half.symbols
    assert sympy.simplify(half.symbolic - form / 2) == 0
    assert close(half.si_value, T_HAWKING / 2)
    # A given's form is its own symbol.
    assert hole["M"].symbolic == hole["M"].symbols["M"]


def test_claims_hold_or_fail(hole: SheetResult) -> None:
    assert [type(c) for c in hole.claims] == [ClaimResult, ClaimResult]
    # T_H = 1.2269e11 K for 1e12 kg (scipy above), so "> 1e11 K" holds and "< 1e11 K" fails.
    assert T_HAWKING > 1e11
    above, below = hole.claims
    assert (above.holds, above.failed, above.line) == (True, False, 16)
    assert (below.holds, below.failed, below.line) == (False, True, 17)
    assert below.text == "check T_H < 1e11 [K]"
    assert "left" in (below.message or "") and "right" in (below.message or "")
    assert not hole.ok
    assert hole.errors == ()


def test_iteration_lookup_and_missing_names(hole: SheetResult) -> None:
    assert [q.key for q in hole] == ["M", "T_H", "r_s", "E_T", "T_half", "T_H*2 in [K]"]
    assert len(hole) == 6 and "T_H" in hole and "nothing" not in hole
    assert hole.names() == tuple(q.key for q in hole)
    display = hole["T_H*2 in [K]"]
    assert display.kind == "display" and display.symbolic is None
    assert close(display.quantity.magnitude, 2 * T_HAWKING)
    assert hole.get("nothing") is None
    with pytest.raises(KeyError, match="no quantity 'T_h'"):
        hole["T_h"]


def test_units_pint_lacks_or_defines_otherwise_come_out_in_si() -> None:
    result = worksheet.loads(
        sheet_text(
            "m = 2 [M_sun]",  # pint has no solar mass
            "d = 10 [pc]",  # pint's parsec is au/tan(1 arcsec), not the IAU (648000/pi) au
            "F = 3 [Jy]",  # pint has no jansky; 1 Jy = 1e-26 W m^-2 Hz^-1 (IAU 1973)
            "t = 2 [yr]",  # pint's year is the Julian year: kept as recorded
            "x = 5 [1e3 m]",  # a scaled unit pint cannot carry
            "T_0 = 25 [degC]",  # an offset unit, kept as recorded
        )
    ).run()
    ureg = quantity_registry()
    mass = result["m"]
    assert (mass.value, mass.unit) == (2.0, "M_sun")
    assert mass.quantity.units == ureg.kilogram
    assert close(mass.quantity.magnitude, 2 * M_SUN)
    distance = result["d"].quantity
    assert distance.units == ureg.meter
    assert close(distance.magnitude, 10 * PARSEC, 1e-14)
    flux = result["F"].quantity
    assert flux.units == ureg.kilogram / ureg.second**2  # W/(m^2 Hz) in base units
    assert close(flux.magnitude, 3e-26)
    year = result["t"].quantity
    assert year.units == ureg.year
    assert close(year.to("s").magnitude, 2 * JULIAN_YEAR, 1e-15)
    scaled = result["x"].quantity
    assert scaled.units == ureg.meter and close(scaled.magnitude, 5000.0)
    # SI Brochure: T/K = t/degC + 273.15.
    celsius = result["T_0"].quantity
    assert celsius.units == ureg.degree_Celsius
    assert close(celsius.to("K").magnitude, 298.15)


def test_quantities_of_separate_runs_combine_and_own_registry_is_used() -> None:
    text = sheet_text("r = 2*G*1e12 [kg]/c^2 in [km]")
    first = worksheet.loads(text).run()["r"].quantity
    second = worksheet.loads(text).run()["r"].quantity
    assert close((first + second).to("m").magnitude, 2 * R_SCHWARZSCHILD)
    mine = pint.UnitRegistry(cache_folder=None)
    own = worksheet.loads(text, ureg=mine).run()["r"].quantity
    total = own + mine.Quantity(1.0, "m")
    assert close(total.to("m").magnitude, R_SCHWARZSCHILD + 1.0)


def test_symbolic_and_failed_statements_have_no_quantity() -> None:
    result = worksheet.loads(
        sheet_text("M : [kg]", "T = hbar*c^3/(8*pi*G*M*k_B)", "x = 1 [m] + 1 [s]", "y = 2*x")
    ).run()
    left_symbolic = result["T"]
    assert left_symbolic.value is None and left_symbolic.status == "ok"
    assert left_symbolic.symbolic is not None
    with pytest.raises(EvaluationError, match="symbolic"):
        _ = left_symbolic.quantity
    erred = result["x"]
    assert erred.status == "error" and erred.symbolic is None
    with pytest.raises(EvaluationError, match="cannot add length"):
        _ = erred.quantity
    assert [(r.line, r.status) for r in result.errors] == [(8, "error"), (9, "skipped")]
    assert not result.ok


def test_run_writes_nothing(tmp_path: Path) -> None:
    path = tmp_path / "hole.sheet.md"
    path.write_text(HOLE, encoding="utf-8")
    result = worksheet.load(path).run()
    assert result["T_H"].value is not None
    assert path.read_text(encoding="utf-8") == HOLE
    assert sorted(p.name for p in tmp_path.iterdir()) == ["hole.sheet.md"]
    assert not result.current  # nothing recorded yet
    mantissa, exponent = f"{T_HAWKING:.3e}".split("e")  # 4 digits, the sheet's notation
    assert f"T_H = {mantissa}e{int(exponent)}" in result.text  # what save() would write


def test_save_writes_what_the_command_line_writes(tmp_path: Path) -> None:
    path = tmp_path / "hole.sheet.md"
    path.write_text(HOLE, encoding="utf-8")
    by_cli = tmp_path / "cli.sheet.md"
    assert cli_main(["run", str(path), "-o", str(by_cli)]) == 1  # one claim fails
    sheet = worksheet.load(path)
    assert sheet.save() == path
    assert path.read_bytes() == by_cli.read_bytes()
    assert sorted(p.name for p in tmp_path.iterdir()) == ["cli.sheet.md", "hole.sheet.md"]
    # The saved sheet is current; a fresh load agrees.
    assert sheet.run().current
    assert worksheet.load(path).run().current


def test_save_to_another_path_and_text_sheets_need_one(tmp_path: Path) -> None:
    sheet = worksheet.loads(HOLE)
    with pytest.raises(DocumentError, match="give save"):
        sheet.save()
    target = tmp_path / "copy.sheet.md"
    assert sheet.save(target) == target
    assert sheet.path == target
    assert "check T_H < 1e11 [K]: fails" in target.read_text(encoding="utf-8")


def test_module_level_run_and_check(tmp_path: Path) -> None:
    path = tmp_path / "holds.sheet.md"
    path.write_text(
        sheet_text("M = 1e12 [kg]", "T = hbar*c^3/(8*pi*G*M*k_B)", "check T ~ 1e11 [K]"),
        encoding="utf-8",
    )
    assert isinstance(worksheet.run(path), SheetResult)
    assert worksheet.run(path).ok
    assert not worksheet.check(path)  # all holds, but nothing is recorded yet
    worksheet.load(path).save()
    assert worksheet.check(path)
    path.write_text(
        path.read_text(encoding="utf-8").replace("1e12 [kg]", "2e12 [kg]"), encoding="utf-8"
    )
    assert not worksheet.check(path)  # the recorded T is stale now


def test_reload_sees_edits(tmp_path: Path) -> None:
    path = tmp_path / "edit.sheet.md"
    path.write_text(sheet_text("M = 1e12 [kg]", "r = 2*G*M/c^2"), encoding="utf-8")
    with worksheet.load(path) as sheet:
        assert close(sheet.run()["r"].si_value, R_SCHWARZSCHILD)
        path.write_text(sheet_text("M = 3e12 [kg]", "r = 2*G*M/c^2"), encoding="utf-8")
        sheet.reload()
        assert close(sheet.run()["r"].si_value, 3 * R_SCHWARZSCHILD)


VERB_SHEET = sheet_text("y : [m]", "z = solve(y^2 == 4 [m^2], y)")


def test_worker_stops_after_a_plain_run() -> None:
    before = set(multiprocessing.active_children())
    result = worksheet.loads(VERB_SHEET).run()
    assert result["z"].value == 2.0  # the positive root of y^2 = 4 m^2
    assert set(multiprocessing.active_children()) == before


def test_context_manager_keeps_the_worker_until_exit() -> None:
    before = set(multiprocessing.active_children())
    with worksheet.loads(VERB_SHEET) as sheet:
        first = sheet.run()
        assert set(multiprocessing.active_children()) - before  # the solve's worker lives
        second = sheet.run()
        assert second["z"].value == first["z"].value == 2.0
    assert set(multiprocessing.active_children()) == before
    # Closed sheets still run (the worker restarts) and stop it again.
    assert sheet.run()["z"].value == 2.0
    assert set(multiprocessing.active_children()) == before


def test_repeated_load_and_run_agree() -> None:
    values = [worksheet.loads(HOLE).run()["T_H"].value for _ in range(3)]
    assert values[0] is not None and close(values[0], T_HAWKING)
    assert values == [values[0]] * 3


def test_bad_front_matter_and_missing_files_raise_document_errors(tmp_path: Path) -> None:
    with pytest.raises(DocumentError, match="not a known dataset"):
        worksheet.loads("---\nconstants: CODATA1999\n---\n").run()
    with pytest.raises(DocumentError, match="cannot read"):
        worksheet.load(tmp_path / "missing.sheet.md")


def test_unpinned_sheet_warns() -> None:
    result = worksheet.loads("```calc\nx = 1 [m]\n```\n").run()
    assert any("does not pin its constants" in w for w in result.warnings)
    assert isinstance(worksheet.loads("x"), Sheet)
