"""Design netlists, the verify() cross-check and the `pwmkit verify` / `export --netlist` commands.

Sources: ngspice (version 39) simulating the demo designs' netlists (outside oracle for the
whole driver: timer, MOSFET, load); the netlist text is checked against the design's input
values (the wiring as built), never against computed results.
"""

from __future__ import annotations

import dataclasses
import json
from pathlib import Path

import pytest

from pwmkit import DesignError
from pwmkit.cli import main
from pwmkit.design import Design, Timing, demo_designs
from pwmkit.netlist import find_ngspice, netlist, verify

ROOT = Path(__file__).resolve().parents[2]
FAN = ROOT / "examples" / "greenhouse-fan.toml"
needs_ngspice = pytest.mark.skipif(find_ngspice() is None, reason="ngspice not installed (Debian package ngspice)")


def _lines(text: str) -> set[str]:
    return {ln.strip() for ln in text.splitlines()}


def test_timing_netlist_is_the_wiring_of_the_inputs() -> None:
    fan = demo_designs()["fan"]
    text = netlist(fan)
    lines = _lines(text)
    assert text.splitlines()[0] == "* pwmkit netlist of design 'fan' (timing) - pwmkit 0.1.0"
    # pot topology as wired: ra into DIS, wiper at DIS, pot halves 0.6·50k and 0.4·50k, D1/D2, end resistor rb
    for ln in ("Ra vcc dis 1000", "Ct cap 0 8.2e-10", "Rpa dis pota 30000", "D1 pota cap DSTEER", "D2 cap k2 DSTEER",
               "Rb k2 potb 1000", "Rpb potb dis 20000", "Rdv1 vcc cv 5000", "Ccv cv 0 1e-08"):
        assert ln in lines, ln
    assert ".model DSTEER D(IS=4.352e-09 N=1.906 RS=0.6458 EG=1.11 XTI=3)" in lines
    assert "steering diodes: Shockley model" in text and "Run: ngspice -b FILE.cir" in text
    # a different input changes the wiring line, nothing else is needed
    other = netlist(fan.with_timing(ra=2.2e3, wiper=0.25))
    assert "Ra vcc dis 2200" in _lines(other) and "Rpa dis pota 12500" in _lines(other)


def test_netlist_variants_and_errors() -> None:
    d = Design(name="plain", timing=Timing(topology="classic", ra=4.7e3, rb=22e3, c=47e-9, vctl=7.0))
    lines = _lines(netlist(d))
    assert "Rb dis cap 22000" in lines and "Vctl cv 0 DC 7" in lines and not any(ln.startswith("D") for ln in lines)
    fixed = Design(name="fixed-vd", timing=Timing(topology="steered", vd=0.6, timer="cmos"))
    text = netlist(fixed)
    assert "constant-drop equivalents of 0.6 V" in text and "Vk2_2" not in text
    assert any(ln.startswith("B1 dis") for ln in _lines(text))
    with pytest.raises(DesignError, match="what: 'bogus' is not allowed"):
        netlist(d, what="bogus")  # type: ignore[arg-type]
    with pytest.raises(DesignError, match="needs a load"):
        netlist(d, what="driver")
    with pytest.raises(DesignError, match="expected a pwmkit.design.Design"):
        netlist("fan.toml")  # type: ignore[arg-type]


def test_driver_netlists_carry_the_load() -> None:
    designs = demo_designs()
    fan = _lines(netlist(designs["fan"], what="driver"))
    assert "Rm m1 m2 6" in fan and any(ln.startswith("Lm m2 m3 0.0015 IC=") for ln in fan)
    assert any(ln.startswith("Dfw drain vload DFW") for ln in fan)
    grow = netlist(designs["grow-bar"], what="driver")
    # three strings of three LEDs with 270 Ω each
    assert sum(ln.startswith("Rs") and ln.endswith(" 270") for ln in grow.splitlines()) == 3
    assert sum(ln.startswith("Vled") for ln in grow.splitlines()) == 9
    zener = designs["fan"].replace(freewheel=dataclasses.replace(designs["fan"].freewheel, clamp="zener", v_zener=15.0))
    assert "Vz vload_z vload DC 15" in _lines(netlist(zener, what="driver"))


@needs_ngspice
@pytest.mark.slow
@pytest.mark.parametrize("name", ["fan", "grow-bar"])
def test_demo_designs_pass_the_circuit_cross_check(name: str) -> None:
    res = verify(demo_designs()[name])
    # ngspice simulation of the whole driver (outside oracle), tolerances stated in TOLERANCES
    assert res.passed, res.table()
    keys = {r.key for r in res.rows}
    assert {"frequency", "duty", "v_cap_max", "v_cap_min"} <= keys
    assert ({"motor_mean", "motor_ripple", "drain_peak"} if name == "fan" else {"led_peak", "led_mean"}) <= keys
    freq = next(r for r in res.rows if r.key == "frequency")
    assert abs(freq.difference) < 1e-3  # the diode-law model and the circuit: same physics
    assert "model vs circuit" in res._repr_html_() and "pass" in res.table()
    # duty is shown in percent (the row and --json keep the fraction)
    duty = next(r for r in res.rows if r.key == "duty")
    assert 0 < duty.model < 1
    line = next(ln for ln in res.table().splitlines() if ln.startswith(duty.label))
    assert f"{100 * duty.model:.4f}"[:5] in line and " %" in line


@needs_ngspice
def test_verify_timing_only_with_a_constant_drop() -> None:
    d = Design(name="fixed-vd", timing=Timing(topology="steered", ra=10e3, rb=22e3, c=10e-9, vd=0.6))
    res = verify(d)
    assert res.what == "timing" and res.passed, res.table()
    assert [r.key for r in res.rows] == ["frequency", "duty", "v_cap_max", "v_cap_min"]
    assert res.rows[0].label == "frequency (closed form)"
    assert abs(res.rows[0].difference) < 1e-3  # ngspice, constant-drop diodes: same physics as the closed form


@needs_ngspice
@pytest.mark.slow
def test_cli_verify_table_and_json(capsys: pytest.CaptureFixture[str]) -> None:
    assert main(["verify", str(FAN)]) == 0
    out = capsys.readouterr().out
    assert "motor current, mean" in out and "fan passes the circuit cross-check" in out
    assert main(["verify", str(FAN), "--json", "--what", "timing"]) == 0
    doc = json.loads(capsys.readouterr().out)
    assert doc["format"] == "pwmkit-verify" and doc["designs"][0]["passed"] is True
    assert {r["key"] for r in doc["designs"][0]["rows"]} >= {"frequency", "duty"}


def test_cli_verify_without_ngspice_says_how_to_install(monkeypatch: pytest.MonkeyPatch,
                                                       capsys: pytest.CaptureFixture[str]) -> None:
    monkeypatch.setenv("PWMKIT_NGSPICE", "/nonexistent/ngspice")
    assert main(["verify", str(FAN)]) == 2
    err = capsys.readouterr()
    assert err.out == ""
    assert len(err.err.strip().splitlines()) == 1 and "apt-get install ngspice" in err.err


def test_cli_export_netlist(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    assert main(["export", str(FAN), "--netlist", "--out-dir", str(tmp_path)]) == 0
    target = tmp_path / "fan-netlist.cir"
    text = target.read_text()
    assert text.startswith("* pwmkit netlist of design 'fan' (driver)") and text.rstrip().endswith(".end")
    assert main(["export", str(FAN), "--netlist", "fan.txt", "--out-dir", str(tmp_path)]) == 2
    assert "give a .cir" in capsys.readouterr().err
    assert main(["export", str(FAN), "--netlist", "--out-dir", str(tmp_path)]) == 2  # exists, no --force


@needs_ngspice
def test_report_has_a_crosscheck_section_where_ngspice_is_present(monkeypatch: pytest.MonkeyPatch) -> None:
    from pwmkit.evaluate import evaluate
    from pwmkit.record.report import report_html

    fan = demo_designs()["fan"]
    ev = evaluate(fan, spread=False)
    page = report_html(fan, ev)
    assert "<section id='crosscheck'>" in page and "model vs circuit (ngspice)" in page
    monkeypatch.setenv("PWMKIT_NGSPICE", "/nonexistent/ngspice")
    assert "<section id='crosscheck'>" not in report_html(fan, ev)


@needs_ngspice
def test_dashboard_crosscheck_button(monkeypatch: pytest.MonkeyPatch) -> None:
    pytest.importorskip("ipywidgets")
    from pwmkit.widgets.crosscheck import crosscheck_box
    from pwmkit.widgets.session import DesignSession

    session = DesignSession(demo_designs()["grow-bar"])
    box = crosscheck_box(session)
    assert box is not None
    box.button.click()
    assert "passes the cross-check" in box.result.value and "LED string current, peak" in box.result.value
    monkeypatch.setenv("PWMKIT_NGSPICE", "/nonexistent/ngspice")
    assert crosscheck_box(session) is None
