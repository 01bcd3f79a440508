"""The schematic follows the design's part choices: steering diodes, timer, MOSFET and freewheel diode."""

from __future__ import annotations

import html

import pytest

pytest.importorskip("schemdraw")

from pwmkit.design import demo_designs  # noqa: E402
from pwmkit.glossary import DIODE_LABELS, MOSFET_LABELS, diode_label, mosfet_label, timer_part_label  # noqa: E402
from pwmkit.parts.diodes import DIODES  # noqa: E402
from pwmkit.parts.mosfets import MOSFETS  # noqa: E402
from pwmkit.schematic import for_design  # noqa: E402


def _parts(design):
    sch = for_design(design)
    return {p.reference: p for p in sch.parts}, html.unescape(sch.svg)


@pytest.mark.parametrize("family", sorted(DIODES))
def test_steering_diodes_carry_the_chosen_family(family):
    design = demo_designs()["grow-bar"].with_timing(diode=family)
    parts, svg = _parts(design)
    assert parts["D1"].value == parts["D2"].value == diode_label(family)
    assert diode_label(family) in svg
    assert "signal diode" not in svg or family == "small-signal-silicon"


@pytest.mark.parametrize("family", ["bipolar", "cmos"])
def test_timer_carries_its_family(family):
    design = demo_designs()["fan"].with_timing(timer=family)
    parts, svg = _parts(design)
    assert parts["U1"].value == timer_part_label(family)
    assert timer_part_label(family) in svg


@pytest.mark.parametrize("family", sorted(MOSFETS))
def test_mosfet_carries_its_family(family):
    fan = demo_designs()["fan"]
    design = fan.replace(switch=fan.switch.__class__(**{**fan.switch.__dict__, "mosfet": family}))
    parts, svg = _parts(design)
    assert parts["Q1"].value == mosfet_label(family)
    assert mosfet_label(family) in svg


@pytest.mark.parametrize("family", sorted(DIODES))
def test_freewheel_diode_carries_its_family(family):
    fan = demo_designs()["fan"]
    design = fan.replace(freewheel=fan.freewheel.__class__(**{**fan.freewheel.__dict__, "diode": family}))
    parts, _svg = _parts(design)
    assert parts["D3"].value == f"freewheel {diode_label(family)}"


def test_every_family_has_a_label():
    assert set(DIODE_LABELS) == set(DIODES) and set(MOSFET_LABELS) == set(MOSFETS)
