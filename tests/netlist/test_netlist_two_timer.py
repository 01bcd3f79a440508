"""Netlists of the two-timer PWM and the heater load; the clear error for what cannot be built.

Sources: ngspice (version 39) simulating the two-timer netlists (outside oracle for the whole
circuit: clock, monostable, control pin, MOSFET, heater); the 555-type timer data-sheet formulas
(astable t_high = ln 2·(Ra+Rb)·C, t_low = ln 2·Rb·C; monostable pulse from its RC charge toward
the supply up to the control-pin voltage — common practice, 555-type timer data sheets) built
from the inputs; the netlist text is checked against the design's input values (the wiring as
built), never against computed results.
"""

from __future__ import annotations

import dataclasses
import json
import math
from pathlib import Path

import pytest

from pwmkit import DesignError
from pwmkit.cli import main
from pwmkit.design import Design, HeaterLoad, MotorLoad, Timing
from pwmkit.netlist import find_ngspice, netlist, verify
from pwmkit.record.designfile import load_design

ROOT = Path(__file__).resolve().parents[2]
HEAT_MAT = ROOT / "examples" / "greenhouse-heat-mat.toml"
needs_ngspice = pytest.mark.skipif(find_ngspice() is None, reason="ngspice not installed (Debian package ngspice)")


def _lines(text: str) -> set[str]:
    return {ln.strip() for ln in text.splitlines()}


def _stiff(**changes: object) -> Design:
    kw: dict[str, object] = dict(topology="two-timer", ra=56e3, rb=2.2e3, c=100e-9, r_mono=22e3, c_mono=100e-9,
                                 vctl_min=3.5, vctl_max=7.5, vctl=6.0)
    kw.update(changes)
    return Design(name="pwm-demo", timing=Timing(**kw))  # type: ignore[arg-type]


def test_unsupported_design_is_a_design_error_naming_the_field() -> None:
    astable_heater = Design(name="plain-heater", timing=Timing(topology="classic", ra=4.7e3, rb=22e3, c=47e-9),
                            load=HeaterLoad())
    with pytest.raises(DesignError, match=r"load.kind: 'heater' has no driver netlist with the 'classic' .*'motor'"):
        netlist(astable_heater, what="driver")
    assert "Ra vcc dis 4700" in _lines(netlist(astable_heater))  # the timer alone still builds
    motor = _stiff().replace(load=MotorLoad())
    with pytest.raises(DesignError, match=r"load.kind: 'motor' has no driver netlist with the 'two-timer' .*'heater'"):
        netlist(motor, what="driver")
    with pytest.raises(DesignError, match="needs a load"):
        netlist(_stiff(), what="driver")


def test_heat_mat_netlist_is_the_wiring_of_the_inputs() -> None:
    mat = load_design(HEAT_MAT)
    text = netlist(mat, what="driver")
    lines = _lines(text)
    assert text.splitlines()[0] == "* pwmkit netlist of design 'heat-mat' (driver) - pwmkit 0.1.0"
    # clock astable ra 56k, rb 2.2k, 100 nF; monostable 22k, 100 nF; thermistor divider r_set 22k, NTC 4.7k β 3950
    for ln in ("Ra vcc dis 56000", "Rb dis cap 2200", "Ct cap 0 1e-07", "Ccv cv 0 1e-08", "Rmono vcc mcap 22000",
               "Cmono mcap 0 1e-07", "Rmdv1 vcc mcv 5000", "Rset vcc mcv 22000", "Vload vload 0 DC 12",
               "Rqg out qgate 101.5"):
        assert ln in lines, ln
    assert any(ln.startswith("Rntc mcv 0 {4700*exp(3950*(1/(") for ln in lines)
    assert any(ln.startswith("Rheat h1 drain {8*(1+0.0004*(") and ln.endswith("-25))}") for ln in lines)
    # the two computed temperatures are stated in the header
    assert "closed-loop steady temperature pwmkit solves for" in text and "element temperature T =" in text
    other = netlist(mat.with_timing(r_mono=27e3, ra=47e3), what="timing")
    assert "Rmono vcc mcap 27000" in _lines(other) and "Ra vcc dis 47000" in _lines(other)
    assert not any(ln.startswith(("Rheat", "Sqfet")) for ln in _lines(other))


def test_two_timer_control_source_variants() -> None:
    stiff = _lines(netlist(_stiff()))
    assert "Vmctl mcv 0 DC 6" in stiff and not any(ln.startswith("Rmdv") for ln in stiff)
    behind = _lines(netlist(_stiff(r_ctl_source=2.2e3, vctl=None)))
    # nominal source voltage: the middle of 3.5 … 7.5 V, behind 2.2 kΩ against the internal divider
    assert {"Vmctl msrc 0 DC 5.5", "Rmsrc msrc mcv 2200", "Rmdv3 mcvl 0 5000"} <= behind


@needs_ngspice
def test_stiff_two_timer_circuit_against_the_data_sheet_formulas() -> None:
    res = verify(_stiff())
    assert res.passed, res.table()
    rows = {r.key: r for r in res.rows}
    assert list(rows) == ["pwm_frequency", "pwm_duty", "control_pin", "v_mono_peak"]
    # data-sheet formulas from the inputs (common practice): clock ln 2·(Ra + 2Rb)·C; the pulse charges
    # 100 nF through 22 kΩ from the bipolar saturation level (0.1 V, typical value) to the 6 V control pin
    period = math.log(2.0) * (56e3 + 2 * 2.2e3) * 100e-9
    pulse = 22e3 * 100e-9 * math.log((12.0 - 0.1) / (12.0 - 6.0))
    assert rows["pwm_frequency"].simulation == pytest.approx(1.0 / period, rel=3e-3)  # vsat shifts t_low by 0.07 %
    assert rows["pwm_duty"].simulation == pytest.approx(pulse / period, rel=3e-3)
    assert rows["control_pin"].simulation == pytest.approx(6.0, rel=1e-6)


@needs_ngspice
def test_cli_verify_heat_mat_passes(capsys: pytest.CaptureFixture[str]) -> None:
    assert main(["verify", str(HEAT_MAT)]) == 0
    out = capsys.readouterr().out
    assert "PWM duty (monostable model)" in out and "heater current, mean" in out
    assert "heat-mat passes the circuit cross-check (6 quantities, ngspice)" in out
    assert main(["verify", str(HEAT_MAT), "--json", "--what", "timing"]) == 0
    doc = json.loads(capsys.readouterr().out)
    assert doc["designs"][0]["passed"] is True
    assert [r["key"] for r in doc["designs"][0]["rows"]] == ["pwm_frequency", "pwm_duty", "control_pin",
                                                              "v_mono_peak"]


@needs_ngspice
def test_heat_mat_circuit_follows_a_changed_input() -> None:
    # a longer monostable (27 kΩ) gives a longer pulse in the circuit, and the model still agrees
    mat = load_design(HEAT_MAT)
    base = {r.key: r for r in verify(mat, what="timing").rows}
    longer = verify(mat.with_timing(r_mono=27e3), what="timing")
    assert longer.passed, longer.table()
    rows = {r.key: r for r in longer.rows}
    assert rows["pwm_duty"].simulation > base["pwm_duty"].simulation
    assert rows["pwm_frequency"].simulation == pytest.approx(base["pwm_frequency"].simulation, rel=1e-3)


def test_cli_export_netlist_heat_mat(tmp_path: Path) -> None:
    assert main(["export", str(HEAT_MAT), "--netlist", "--out-dir", str(tmp_path)]) == 0
    text = (tmp_path / "heat-mat-netlist.cir").read_text()
    assert text.startswith("* pwmkit netlist of design 'heat-mat' (driver)") and "Rheat h1 drain" in text


def test_heater_needs_a_design_error_not_a_crash_for_a_cmos_thermistor_loop() -> None:
    mat = load_design(HEAT_MAT)
    cmos = dataclasses.replace(mat, timing=dataclasses.replace(mat.timing, timer="cmos"))
    with pytest.raises(DesignError, match="internal divider"):
        netlist(cmos)
