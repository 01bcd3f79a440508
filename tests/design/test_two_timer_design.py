"""Two-timer designs and heater loads through the design layer: validation, evaluation, spread,
synthesis, checks, cautions, schematic and report.

Sources: the models' own oracles are in tests/timing and tests/loads; here evaluate() is checked to
call them with the design's values (cross-checks), the spread against its own worst case, the
synthesis against the textbook clock period ln 2·(RA + 2RB)·C and the log law (common practice),
and the loop's steady temperature against an energy balance of the element (first-order thermal
network).
"""

from __future__ import annotations

import dataclasses
import math

import numpy as np
import pytest

from pwmkit import DesignError
from pwmkit.design import Design, HeaterLoad, LedLoad, Timing, demo_designs
from pwmkit.evaluate import evaluate
from pwmkit.timing import two_timer_pwm

MAT = demo_designs()["heat-mat"]
FULL = evaluate(MAT, n_mc=4000)
QUICK = evaluate(MAT, spread=False)


def test_two_timer_fields_validated():
    with pytest.raises(DesignError, match="timing.r_mono: only the 'two-timer' topology"):
        Timing(topology="classic", r_mono=10e3)
    with pytest.raises(DesignError, match="timing.r_mono: a value is required"):
        Timing(topology="two-timer", vctl_min=1.0, vctl_max=2.0, c_mono=1e-7)
    with pytest.raises(DesignError, match="vctl_min"):
        Timing(topology="two-timer", r_mono="10k", c_mono="100n", vctl_min=5.0, vctl_max=4.0)
    with pytest.raises(DesignError, match="timing.vctl: 9"):
        Timing(topology="two-timer", r_mono="10k", c_mono="100n", vctl_min=1.0, vctl_max=4.0, vctl=9.0)
    with pytest.raises(DesignError, match="heater.ntc_r25"):
        HeaterLoad(ntc_r25=10e3)
    with pytest.raises(DesignError, match="thermistor loop drives the control pin"):
        Design(load=HeaterLoad(ntc_r25=10e3, r_set=10e3))
    t = Timing(topology="two-timer", r_mono="22k", c_mono="100n", vctl_min="2", vctl_max="6")
    assert t.r_mono == 22e3 and t.vctl_nominal == 4.0


def test_evaluation_calls_the_models_with_the_design_values():
    tt = QUICK.two_timer
    ref = two_timer_pwm(vctl=tt.v_pin, **MAT.timing.two_timer_kwargs(MAT.vcc))
    assert QUICK.timing.duty == ref.duty and QUICK.timing.frequency == ref.frequency
    assert QUICK.timing.t_high == ref.t_high
    assert MAT.astable().duty == QUICK.timing.duty
    # the closed loop sits where the element's energy balance closes: rise = Rθ·P(T)
    h, lp = MAT.load, QUICK.heater.loop
    el = QUICK.heater.element
    assert el.t_element_c == pytest.approx(lp.t_element_c, abs=1e-6)
    r_hot = h.r_cold * (1 + h.alpha * (el.t_element_c - h.t_ref_c))
    assert el.r_hot == pytest.approx(r_hot, rel=1e-9)
    assert el.t_element_c - MAT.t_ambient_c == pytest.approx(h.r_th * el.p_avg, rel=1e-6)
    assert el.p_avg == pytest.approx(lp.duty * el.p_on, rel=1e-12)
    keys = QUICK.key_results()
    for k in ("heater.t_element_c", "heater.warm_up", "heater.t_fault_c", "two_timer.linearity_error",
              "two_timer.supply_sensitivity", "heater.loop_gain"):
        assert math.isfinite(keys[k])
    assert QUICK.mosfet is not None and QUICK.mosfet.p_total > 0


def test_open_loop_two_timer_with_led_load_and_source_resistance():
    d = MAT.replace(load=LedLoad(n_series=3, n_parallel=1, vf=2.1, vf_spread=0.1, r_series=270.0, colour="red"),
                    requirements=dataclasses.replace(MAT.requirements, duty_min=None, duty_max=None))
    d = d.with_timing(vctl_min=2.0, vctl_max=8.0, r_ctl_source=2e3)
    ev = evaluate(d, spread=False)
    from pwmkit.timing import control_pin_drive

    v_pin = control_pin_drive(5.0, 2e3, 12.0).vctl
    assert ev.two_timer.v_pin == pytest.approx(v_pin)
    assert ev.led is not None and ev.heater is None
    assert ev.two_timer.control.vctl_low == pytest.approx(control_pin_drive(2.0, 2e3, 12.0).vctl)


def test_spread_inside_worst_case_and_nominal():
    from pwmkit.two_timer_design import monte_carlo_two_timer

    wc = FULL.worst_case
    assert FULL.spread.topology == "two-timer" and FULL.spread.n_failed == 0
    # the parts-and-supply box alone stays inside its corners
    sp = monte_carlo_two_timer(MAT, n=4000, seed=2, v_pin=FULL.two_timer.v_pin, timer_errors=False)
    assert wc.duty_min <= sp.duty.min() and sp.duty.max() <= wc.duty_max
    assert wc.frequency_min <= sp.frequency.min() and sp.frequency.max() <= wc.frequency_max
    # the timer family's own errors widen the spread
    assert FULL.spread.frequency_std > sp.frequency_std and FULL.spread.duty_std > sp.duty_std
    assert any("timer errors" in src for src in FULL.spread.sources)
    assert sp.nominal_duty == pytest.approx(float(FULL.timing.duty))
    assert wc.duty_min < FULL.timing.duty < wc.duty_max
    # independent corner: every timing part at its low tolerance end shortens the clock period
    # (frequency up); the log law's duty depends on R_M·C_M/T only
    lo = {k: getattr(MAT.timing, k) * (1 - MAT.timing.r_tolerance) for k in ("ra", "rb")}
    p = two_timer_pwm(ra=lo["ra"], rb=lo["rb"], c=MAT.timing.c * (1 - MAT.timing.c_tolerance), r_mono=MAT.timing.r_mono,
                      c_mono=MAT.timing.c_mono, vcc=MAT.vcc, vctl=FULL.two_timer.v_pin)
    assert p.frequency <= wc.frequency_max * (1 + 1e-12)


def test_checks_and_cautions_for_heater():
    ids = {f.id for f in FULL.findings}
    assert {"two_timer.control_range", "two_timer.min_pulse", "heater.surface", "heater.fault", "heater.loop"} <= ids
    cautions = {c.id: c for c in FULL.cautions}
    text = cautions["heater"].text
    for phrase in ("burn", "unattended", "thermal cut-out", "mains", "local electrical codes"):
        assert phrase in text
    hot = dataclasses.replace(MAT.load, t_cutout_c=None, t_surface_max_c=35.0)
    ev = evaluate(MAT.replace(load=hot), spread=False)
    assert ev.findings.by_id("heater.surface").severity == "fail"
    assert ev.findings.by_id("heater.fault").severity == "warn"


def test_control_range_fails_when_it_reaches_the_supply():
    d = MAT.with_timing(vctl_max=11.9)
    ev = evaluate(d, spread=False)
    assert ev.findings.by_id("two_timer.control_range").severity == "fail"


def test_min_pulse_rule_with_a_slow_gate():
    d = MAT.with_timing(rb=1e3, c=1e-9, ra=5.6e6).replace(switch=dataclasses.replace(MAT.switch, r_gate=10e3))
    ev = evaluate(d, spread=False)
    assert ev.findings.by_id("two_timer.min_pulse").severity in ("warn", "fail")


def test_synthesis_meets_targets_against_textbook_forms():
    from pwmkit.synthesis_two_timer import synthesize_two_timer

    s = synthesize_two_timer(frequency=240.0, duty_low=0.2, duty_high=0.45, vctl_low=4.0, vctl_high=7.0, vcc=12.0)
    b = s.best
    # common practice: T = ln 2·(RA + 2RB)·C for the clock (within the bipolar switch drop, ~1 %)
    assert 1.0 / (math.log(2) * (b.ra + 2 * b.rb) * b.c) == pytest.approx(240.0, rel=0.06)
    # the log law at both ends with the textbook clock period (start level 0.1 V)
    t = math.log(2) * (b.ra + 2 * b.rb) * b.c
    assert b.r_mono * b.c_mono * math.log(11.9 / 8.0) / t == pytest.approx(0.2, rel=0.08)
    assert b.r_mono * b.c_mono * math.log(11.9 / 5.0) / t == pytest.approx(0.45, rel=0.08)
    assert b.error < 0.05
    d = MAT.with_timing(**b.timing_fields(4.0, 7.0))
    assert evaluate(d, spread=False).two_timer.control.duty_low == pytest.approx(b.duty_low)
    with pytest.raises(DesignError, match="vctl_high"):
        synthesize_two_timer(frequency=240.0, duty_low=0.2, duty_high=0.45, vctl_low=4.0, vctl_high=12.5, vcc=12.0)


def test_schematic_labels_follow_the_design():
    from pwmkit.schematic import for_design

    s = for_design(MAT)
    assert s.part("R3").value == "22 kΩ" and s.part("TH1").value == "4.7 kΩ" and s.part("RH1").value == "8 Ω"
    assert "45 °C" in s.part("F1").label
    d = MAT.with_timing(r_mono=47e3)
    assert for_design(d).part("R3").value == "47 kΩ"


def test_report_has_heater_and_two_timer_sections():
    from pwmkit.record import report_html

    text = report_html(MAT, FULL)
    assert "Heater element and temperature" in text and "trigger pulse" in text
    assert "thermal cut-out" in text and "Schematic not drawn" not in text


def test_heater_on_an_astable_is_open_loop():
    grow = demo_designs()["grow-bar"]
    d = grow.replace(load=HeaterLoad(r_cold=8.0, r_th=2.5, c_th=800.0, t_surface_max_c=60.0))
    ev = evaluate(d, spread=False)
    assert ev.heater.loop is None
    assert ev.heater.element.duty == pytest.approx(float(ev.timing.duty))
    assert np.all(np.diff(ev.heater.sweep.t_element_c) > 0)


def test_bom_lists_the_two_timer_and_heater_parts():
    from pwmkit.record.bom import bom_rows
    from pwmkit.schematic import for_design

    rows = {r.ref: r for r in bom_rows(MAT)}
    for ref in ("U1", "U2", "R3", "C4", "RH1", "R5", "TH1", "F1", "Q1"):
        assert ref in rows
    assert rows["R3"].value == "22 kΩ" and rows["F1"].value == "45 °C"
    drawn = {p.reference for p in for_design(MAT).parts}
    assert {"R1", "R2", "C1", "R3", "C4", "R5", "TH1", "RH1", "F1", "Q1"} <= drawn  # same designators


def test_loop_chain_matches_the_public_models():
    from pwmkit.evaluate_heater import loop_chain
    from pwmkit.loads.heater import thermistor_source
    from pwmkit.timing import control_pin_drive

    d_of_v, v_of_t, d_range, v_range = loop_chain(MAT)
    h = MAT.load
    for temp in (5.0, 25.0, 40.0):
        vs, rs = thermistor_source(temp, MAT.vcc, h.ntc_r25, h.ntc_beta, h.r_set)
        assert v_of_t(temp) == pytest.approx(control_pin_drive(vs, rs, MAT.vcc).vctl, rel=1e-12)
    for v in (4.5, 6.0):
        ref = two_timer_pwm(vctl=v, **MAT.timing.two_timer_kwargs(MAT.vcc)).duty
        assert d_of_v(v) == pytest.approx(ref, rel=1e-12)
    assert d_range[0] < d_of_v(5.0) < d_range[1]


def test_cmos_timer_without_divider_data_is_a_clear_error():
    with pytest.raises(DesignError, match="heater.ntc_r25: .*internal divider"):
        evaluate(MAT.with_timing(timer="cmos"), spread=False)
    d = MAT.replace(load=None).with_timing(timer="cmos", r_ctl_source=1e3)
    with pytest.raises(DesignError, match="timing.r_ctl_source"):
        evaluate(d, spread=False)


def test_control_range_checked_at_the_lowest_supply():
    # 9.9 V at the pin fits at 12 V (limit about 10.2 V) but not at 10 V supply
    d = MAT.replace(load=None, vcc_min=10.0).with_timing(vctl_min=4.0, vctl_max=9.9)
    ev = evaluate(d, spread=False)
    f = ev.findings.by_id("two_timer.control_range")
    assert f.severity == "fail" and "lowest supply" in f.explanation


def test_set_point_spread_brackets_the_nominal_and_grows_with_tolerance():
    lo, hi = FULL.heater.loop_spread
    assert lo < FULL.heater.loop.t_element_c < hi
    assert QUICK.heater.loop_spread is None  # quick mode: no corners
    wide = MAT.replace(load=dataclasses.replace(MAT.load, ntc_tolerance=0.2))
    lo2, hi2 = evaluate(wide, n_mc=1000).heater.loop_spread
    assert lo2 < lo and hi2 > hi
    # an independent corner: a warmer-reading thermistor (lower R25 = reads warm) gives a lower set temperature
    from pwmkit.evaluate_heater import heater_kwargs, loop_chain
    from pwmkit.loads.heater import closed_loop

    cold = MAT.replace(load=dataclasses.replace(MAT.load, ntc_r25=MAT.load.ntc_r25 * 0.95))
    d_of_v, v_of_t, d_range, v_range = loop_chain(cold)
    lp = closed_loop(d_of_v, v_of_t, duty_range=d_range, vctl_range=v_range, tau_sensor=60.0,
                     frequency=float(FULL.timing.frequency), t_ambient_c=MAT.t_ambient_c,
                     **heater_kwargs(cold, float(FULL.gate.rds_on_25)))
    assert lo <= lp.t_element_c < FULL.heater.loop.t_element_c
