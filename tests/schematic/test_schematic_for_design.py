"""for_design(): a Design's schematic carries the design's own values."""

from __future__ import annotations

import xml.etree.ElementTree as ET

from pwmkit.design import Freewheel, demo_designs
from pwmkit.schematic import for_design


def test_demo_designs_render_with_their_values() -> None:
    for design in demo_designs().values():
        s = for_design(design)
        ET.fromstring(s.svg)  # valid XML
        labels = " ".join(p.label for p in s.parts)
        # the pot-steered demos draw their pot; the two-timer demo its monostable (R3, C4)
        assert ("P1" if design.timing.topology == "pot" else "R3") in labels and "C1" in labels
        assert s.part("C1").value is not None


def test_changing_a_value_changes_the_label() -> None:
    d = demo_designs()["grow-bar"]
    before = for_design(d).part("C1").label
    after = for_design(d.with_timing(c=4.7e-9)).part("C1").label
    assert before != after and "4.7 nF" in after


def test_motor_with_zener_clamp_draws_the_zener() -> None:
    d = demo_designs()["fan"]
    d = d.replace(freewheel=Freewheel(diode="schottky-1a", clamp="zener", v_zener=24.0))
    s = for_design(d)
    assert s.of_kind("zener")


def test_rich_display_of_a_design_shows_its_schematic() -> None:
    d = demo_designs()["fan"]
    page = d._repr_html_()
    assert "<svg" in page and "820 pF" in page
    evil = d.replace(name="<script>alert(1)</script>")
    assert "<script>" not in evil._repr_html_()
