"""The SI table answers exactly what pint answers, and spares building pint's registry."""

from __future__ import annotations

import subprocess
import sys

import pytest

from worksheet.constants import load_dataset
from worksheet.units.registry import UnitRegistry
from worksheet.units.si_names import SI_NAMES


@pytest.fixture(scope="module")
def both() -> tuple[UnitRegistry, UnitRegistry]:
    dataset = load_dataset("CODATA2022")
    return UnitRegistry(dataset), UnitRegistry(dataset)


@pytest.mark.parametrize("name", sorted(SI_NAMES))
def test_issue12_si_table_agrees_with_pint(name: str, both) -> None:
    table, through_pint = both
    if name in table.dataset.units:
        pytest.skip(f"{name} is a dataset unit; the dataset wins over both")
    ours = table.named(name)
    theirs = through_pint._resolve_with_pint(name)
    assert ours.factor == theirs.factor, (name, ours.factor, theirs.factor)
    assert ours.dimension == theirs.dimension
    assert not theirs.is_offset


def test_issue12_calc_of_si_units_builds_no_pint_registry() -> None:
    # The constants of both datasets and a sheet's SI units resolve without pint at all.
    code = (
        "import sys\n"
        "from worksheet.engine import calculate, make_context\n"
        "for name in ('CODATA2018', 'CODATA2022'):\n"
        "    context = make_context(name)\n"
        "    result = calculate(context, 'hbar*c^3/(8*pi*G*(5e11 [kg])*k_B)', 'K')\n"
        "    assert result.status == 'ok', result.message\n"
        "    calculate(context, '3 [MeV] + 2 [erg] + 1 [kJ]', 'J')\n"
        "    context.worker.close()\n"
        "print('pint' in sys.modules)\n"
    )
    done = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    assert done.stdout.strip() == "False"


def test_issue12_other_names_still_go_to_pint(both) -> None:
    table, _ = both
    assert table.named("lbf").factor == pytest.approx(4.4482216152605)  # NIST SP 811, B.8
    assert table.named("degC").is_offset
