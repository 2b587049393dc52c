"""Prefixed dataset units and the small angles astronomers write (issue 10)."""

from __future__ import annotations

import math

import astropy.units as apu
import pint
import pytest

from worksheet.syntax.units import parse_unit

UREG = pint.UnitRegistry()


def _factor(ctx, text: str) -> float:
    return ctx.registry.resolve(parse_unit(text)).factor


@pytest.mark.parametrize(("ours", "prefix"), [("kpc", 1e3), ("Mpc", 1e6), ("Gpc", 1e9)])
def test_issue10_prefixed_parsec_is_the_dataset_parsec(ctx, ours: str, prefix: float) -> None:
    # IAU 2015 Resolution B2: 1 pc = (648000/pi) au exactly, au = 149597870700 m (IAU 2012
    # B2). astropy.units' parsec follows the same definition.
    iau = 648000 / math.pi * 149597870700
    assert _factor(ctx, ours) == pytest.approx(prefix * iau, rel=1e-15)
    assert _factor(ctx, ours) == pytest.approx(apu.Unit(ours).to(apu.m), rel=1e-15)
    assert _factor(ctx, ours) / _factor(ctx, "pc") == pytest.approx(prefix, rel=1e-15)
    # pint's own parsec (au / tan(1 arcsec)) is 7.8e-12 off: ours must not be it.
    assert abs(UREG.Quantity(1, ours).to("m").magnitude / _factor(ctx, ours) - 1) > 1e-12


def test_issue10_kpc_over_pc_is_exactly_a_thousand_in_a_sheet(results_by_name) -> None:
    named = results_by_name("r = 1 [kpc] / (1000 [pc])\nd = 2.5 [Mpc] in [pc]\n")
    assert named["r"].si_value == pytest.approx(1.0, rel=1e-15)
    assert named["d"].value == pytest.approx(2.5e6, rel=1e-15)


@pytest.mark.parametrize(("ours", "theirs"), [("mJy", "mJy"), ("uJy", "uJy"), ("kau", "kau")])
def test_issue10_prefixed_flux_and_distance_units(ctx, ours: str, theirs: str) -> None:
    # astropy.units: 1 Jy = 1e-26 W m^-2 Hz^-1 (IAU 1973); the au as IAU 2012 B2.
    unit = apu.Unit(theirs)
    si = unit.si.scale
    assert _factor(ctx, ours) == pytest.approx(si, rel=1e-15)


@pytest.mark.parametrize(("ours", "theirs"), [("mas", "mas"), ("uas", "uarcsec")])
def test_issue10_milli_and_micro_arcseconds(ctx, ours: str, theirs: str) -> None:
    # SI Brochure (9th ed., Table 8): 1 arcsecond = pi/648000 rad; astropy agrees.
    assert _factor(ctx, ours) == pytest.approx(apu.Unit(theirs).to(apu.rad), rel=1e-15)
    assert ctx.registry.resolve(parse_unit(ours)).dimension.dimensionless


def test_issue10_angular_size_in_microarcseconds(results_by_name) -> None:
    # The shadow of a 4.1e6 M_sun hole at 8.2 kpc is a few tens of uas: a sheet can say so.
    named = results_by_name(
        "M = 4.1e6 [M_sun]\nD = 8.2 [kpc]\ntheta = 2*sqrt(27)*G*M/(c^2*D) in [uas]\n"
    )
    theta = named["theta"]
    assert theta.status == "ok", theta.record
    expected = (
        2 * math.sqrt(27) * (4.1e6 * apu.M_sun).si.value * 6.67430e-11
        / (299792458.0**2 * (8.2 * apu.kpc).si.value)
    )  # fmt: skip
    assert theta.value * 4.8481368110953599e-12 == pytest.approx(expected, rel=1e-9)
