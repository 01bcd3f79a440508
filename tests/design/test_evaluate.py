"""evaluate(): one results object per design — cross-checked against the model functions it calls,
against textbook worked values, and over random designs (hypothesis)."""

from __future__ import annotations

import dataclasses as dc
import json
import math

import numpy as np
import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st
from reach import reached, reaching

from pwmkit.design import Design, Freewheel, LedLoad, MotorLoad, Requirements, Switch, Timing, demo_designs
from pwmkit.errors import DesignError
from pwmkit.evaluate import SPEED_ITERATIONS, Evaluation, evaluate, timing_kwargs, tolerance_kwargs
from pwmkit.loads.diode import clamp_decay, freewheel_diode
from pwmkit.loads.flicker import pwm_flicker
from pwmkit.loads.led import led_drive
from pwmkit.loads.lightness import lightness
from pwmkit.loads.mosfet import gate_drive, mosfet_losses
from pwmkit.loads.motor import MotorParams, stall_current, steady_speed
from pwmkit.parts.diodes import get_diode
from pwmkit.parts.timers import get_timer
from pwmkit.sensitivity import sensitivities
from pwmkit.timing import astable, astable_ideal, default_vd, diode_law_timing
from pwmkit.tolerance import monte_carlo, worst_case

DEMOS = demo_designs()
FAN, GROW = DEMOS["fan"], DEMOS["grow-bar"]
FULL = {name: evaluate(d, n_mc=4000) for name, d in DEMOS.items()}
QUICK = {name: evaluate(d, spread=False) for name, d in DEMOS.items()}


def _walk(obj, path="root"):
    """Yield (path, leaf) of a nested JSON-like structure."""
    if isinstance(obj, dict):
        for k, v in obj.items():
            assert isinstance(k, str), path
            yield from _walk(v, f"{path}.{k}")
    elif isinstance(obj, list):
        for i, v in enumerate(obj):
            yield from _walk(v, f"{path}[{i}]")
    else:
        yield path, obj


# ------------------------------------------------------------------------------------------------
# results are finite and JSON-ready
# ------------------------------------------------------------------------------------------------
@pytest.mark.parametrize("name", sorted(DEMOS))
@pytest.mark.parametrize("mode", ["full", "quick"])
def test_demo_key_results_finite_and_json(name: str, mode: str) -> None:
    ev = (FULL if mode == "full" else QUICK)[name]
    kr = ev.key_results()
    for key, val in kr.items():
        assert isinstance(val, (float, str)), key
        if isinstance(val, float):
            assert math.isfinite(val), key
    json.dumps(kr, allow_nan=False)
    text = json.dumps(ev.to_dict(), allow_nan=False)
    for path, leaf in _walk(json.loads(text)):
        assert leaf is None or isinstance(leaf, (bool, int, float, str)), path
    for key in ("timing.frequency", "timing.duty", "timing.t_high", "mosfet.t_junction_c", "findings.fail_count"):
        assert key in kr
    assert ("led.i_peak" in kr) == (name == "grow-bar")
    assert ("motor.i_mean" in kr) == (name == "fan")
    assert ("spread.frequency_p01" in kr) == (mode == "full")


def test_to_dict_has_no_numpy_types() -> None:
    d = FULL["fan"].to_dict()
    for path, leaf in _walk(d):
        assert not isinstance(leaf, (np.generic, np.ndarray)), path
    assert d["key_results"] == FULL["fan"].key_results()
    assert d["spread"]["frequency"]["samples"] == 4000  # long sample arrays are summarised
    assert [r["id"] for r in d["findings"]] == [f.id for f in FULL["fan"].findings]


# ------------------------------------------------------------------------------------------------
# cross-checks: evaluate only calls the models
# ------------------------------------------------------------------------------------------------
@pytest.mark.parametrize("name", sorted(n for n, d in DEMOS.items() if d.timing.topology != "two-timer"))
def test_timing_equals_astable_with_same_args(name: str) -> None:
    d, ev = DEMOS[name], FULL[name]
    ref = astable(d.timing.topology, **timing_kwargs(d))
    for f in dc.fields(ref):
        assert getattr(ev.timing, f.name) == getattr(ref, f.name), f.name
    # the default steering diode gives astable()'s own default drop, so this is Design.astable() too
    assert timing_kwargs(d)["vd"] == default_vd()
    assert ev.timing.frequency == d.astable().frequency
    ideal = astable_ideal(d.timing.topology, ra=d.timing.ra, rb=d.timing.rb, c=d.timing.c, vcc=d.vcc,
                          pot=d.timing.pot, wiper=d.timing.wiper)
    assert ev.ideal.frequency == ideal.frequency and ev.ideal.duty == ideal.duty


def test_pot_travel_equals_astable_sweep() -> None:
    d, ev = GROW, FULL["grow-bar"]
    tr = ev.pot_travel
    assert len(tr.wiper) == 101 and tr.wiper[0] == 0.0 and tr.wiper[-1] == 1.0
    ref = astable("pot", **dict(timing_kwargs(d), wiper=tr.wiper))
    np.testing.assert_array_equal(tr.frequency, ref.frequency)
    np.testing.assert_array_equal(tr.duty, ref.duty)
    ideal = astable_ideal("pot", ra=1e3, rb=1e3, c=2.2e-9, vcc=12.0, pot=100e3, wiper=tr.wiper)
    np.testing.assert_array_equal(tr.frequency_ideal, ideal.frequency)


def test_pot_travel_ideal_is_fixed_frequency_textbook() -> None:
    # RC step response: Alexander & Sadiku, Fundamentals of Electric Circuits, 6th ed., ch. 7: ideal T = ln2·(R1 + P)·C for every wiper position, D = (R1 + Pa)/(R1 + P)
    # (with the end resistor rb in the discharge path: T = ln2·(ra + pot + rb)·C)
    tr = FULL["grow-bar"].pot_travel
    f_ideal = 1.0 / (math.log(2) * (1e3 + 100e3 + 1e3) * 2.2e-9)
    np.testing.assert_allclose(tr.frequency_ideal, f_ideal, rtol=1e-12)
    np.testing.assert_allclose(tr.duty_ideal, (1e3 + tr.wiper * 100e3) / 102e3, rtol=1e-12)


def test_classic_worked_example_references_1_3() -> None:
    # RC step response: Alexander & Sadiku, Fundamentals of Electric Circuits, 6th ed., ch. 7 worked example (regression pin): 12 V, RA = RB = 10 kΩ, 100 nF, Vsat = 0.1 V:
    # t_H = (RA+RB)·C·ln 2, t_L = RB·C·ln((8 − 0.1)/(4 − 0.1)) → f = 477.970 Hz, D = 66.261 %
    d = Design(name="classic", vcc=12.0, timing=Timing(topology="classic", ra=10e3, rb=10e3, c=100e-9,
                                                         vsat=0.1, c_dielectric="film"))
    ev = evaluate(d, spread=False)
    t_h = 20e3 * 100e-9 * math.log(2)
    t_l = 10e3 * 100e-9 * math.log(7.9 / 3.9)
    assert ev.timing.frequency == pytest.approx(1 / (t_h + t_l), rel=1e-12)
    assert ev.timing.frequency == pytest.approx(477.970, abs=5e-4)
    assert ev.timing.duty == pytest.approx(0.66261, abs=5e-6)
    assert ev.diode_law is None and ev.pot_travel is None and ev.led is None and ev.mosfet is None
    assert ev.conditions.vd is None


def test_gate_is_driven_by_the_timer_output() -> None:
    for name, ev in QUICK.items():
        d = DEMOS[name]
        fam = get_timer(d.timing.timer)
        ref = gate_drive(fam.output_high(d.vcc), fam.output_source_resistance(d.vcc), d.switch.r_gate,
                         d.switch.mosfet, r_sink=fam.r_out_low)
        assert ev.gate == ref
    # bipolar output high sits 1.35–1.7 V below the supply (555-type timer data sheets, typical published datasheet value, generic: 13.3 V at 15 V, 100 mA)
    to = QUICK["fan"].timer_output
    assert 12.0 - to.v_high == pytest.approx(1.35)
    # and the model reproduces the data-sheet point 13.3 V typ. at 15 V, 100 mA within 0.1 V
    assert get_timer("bipolar").output_high(15.0, 0.1) == pytest.approx(13.3, abs=0.1)
    # while charging the gate through the plateau it droops further along the family's output model
    assert to.i_gate_plateau == QUICK["fan"].gate.i_g_on
    assert to.v_high_plateau == get_timer("bipolar").output_high(12.0, to.i_gate_plateau)
    # CMOS output swings to the rail (555-type timer data sheets, typical published datasheet value, generic: 14.9 V at 15 V, 1 mA)
    assert QUICK["grow-bar"].timer_output.v_high == pytest.approx(12.0)


def test_led_results_equal_led_drive_and_flicker_models() -> None:
    d, ev = GROW, QUICK["grow-bar"]
    load = d.load
    ref = led_drive(d.load_supply, load.vf, load.n_series, load.n_parallel, r_series=load.r_series,
                    duty=ev.timing.duty, rds_on=ev.gate.rds_on_25, series="E24", dvf=load.vf_spread,
                    t_ambient_c=d.t_ambient_max_c)
    assert ev.led == ref
    # series-resistor law (common practice): 12 V, 3 × 2.1 V, 270 Ω, 3 strings on one
    # switch of ≈ 18 mΩ → I = (12 − 6.3)/(270 + 3 × 0.018) per string
    assert ev.led.i_peak == pytest.approx((12.0 - 6.3) / (270.0 + 3 * 0.018), rel=1e-12)
    assert ev.flicker == pwm_flicker(ev.timing.frequency, ev.timing.duty)
    assert ev.lightness == lightness(ev.timing.duty)
    # CIE 15 L* = 116·(Y/Yn)^(1/3) − 16 above (6/29)^3, with Y/Yn = duty at fixed peak current
    assert ev.lightness == pytest.approx(116 * ev.timing.duty ** (1 / 3) - 16, rel=1e-12)
    ref_mos = mosfet_losses(ev.gate, d.load_supply, ev.led.i_peak_total, ev.led.i_rms_total, ev.timing.frequency,
                            d.t_ambient_max_c)
    assert ev.mosfet.tj_c == ref_mos.tj_c and ev.mosfet.p_total == ref_mos.p_total
    assert ev.led_corners.high.vsupply == 12.6 and ev.led_corners.low.vsupply == 11.4


def test_motor_results_equal_steady_speed_and_loss_models() -> None:
    d, ev = FAN, QUICK["fan"]
    load = d.load
    params = MotorParams(r=load.r + ev.gate.rds_on_25, l=load.l, ke=load.ke, b=load.b, t_load=load.t_load, j=load.j)
    vc = ev.conditions.v_clamp
    ref = steady_speed(params, 12.0, ev.timing.duty, ev.timing.frequency, vc, iterations=SPEED_ITERATIONS)
    for name in ("omega", "e", "i_mean", "p_in"):
        assert getattr(ev.motor_speed, name) == pytest.approx(getattr(ref, name), rel=1e-12)
    assert ev.motor.i_max == pytest.approx(ref.current.i_max, rel=1e-12)
    # the freewheel drop is self-consistent: the diode's Shockley drop at its operating current
    # I_op = I_rms²/I_avg (diode loss V_F0·I_avg + r_d·I_rms², common practice) within the ladder spacing of a few mV
    i_op = ev.motor.i_diode_rms**2 / ev.motor.i_diode_avg
    assert vc == pytest.approx(get_diode("schottky-1a").vf(i_op, d.t_ambient_c), abs=5e-3)
    # torque balance kt·I_mean = b·ω + T_load (the steady state the solver is asked for)
    assert load.ke * ev.motor.i_mean == pytest.approx(load.b * ev.motor_speed.omega + load.t_load, rel=1e-6)
    stall = stall_current(params, 12.0, ev.pot_travel.duty_range[1], ev.timing.frequency, vc)
    assert ev.motor_stall.i_max == pytest.approx(stall.i_max, rel=1e-12)
    fw = freewheel_diode("schottky-1a", ev.motor.i_diode_avg, ev.motor.i_diode_rms, ev.motor_stall.i_max, 13.8,
                         ev.timing.frequency, d.t_ambient_max_c, duty=ev.timing.duty)
    assert ev.freewheel.tj_c == fw.tj_c and ev.freewheel.p_total == fw.p_total
    cl = clamp_decay(load.l, load.r, ev.motor.i_max, vc, e=ev.motor_speed.e, v_supply=12.0)
    assert ev.clamp == cl
    mos = mosfet_losses(ev.gate, 12.0 + vc, ev.motor.i_min, ev.motor.i_switch_rms, ev.timing.frequency,
                        d.t_ambient_max_c, i_off=ev.motor.i_max)
    assert ev.mosfet.tj_c == mos.tj_c


def test_motor_ripple_against_closed_form_references_6_2() -> None:
    # ΔI_pp = ((V + Vf)/R)·(1 − e^(−Dz))(1 − e^(−(1−D)z))/(1 − e^(−z)), z = R/(L·f) (Mohan, Undeland & Robbins, Power Electronics, 3rd ed., ch. 7, from memory),
    # independent of the back-EMF
    ev = QUICK["fan"]
    r = FAN.load.r + ev.gate.rds_on_25
    z = r / (FAN.load.l * ev.timing.frequency)
    dd = ev.timing.duty
    ripple = (12.0 + ev.conditions.v_clamp) / r * (-math.expm1(-dd * z)) * (-math.expm1(-(1 - dd) * z)) / \
        (-math.expm1(-z))
    assert ev.motor.i_ripple_pp == pytest.approx(ripple, rel=1e-9)


def test_zener_clamp_raises_clamp_voltage_and_shortens_decay() -> None:
    # first-order RL decay: Alexander & Sadiku, Fundamentals of Electric Circuits, 6th ed., ch. 7: a higher clamp voltage ends the current sooner; the drain sees supply + clamp
    plain = QUICK["fan"]
    zen = evaluate(FAN.replace(freewheel=Freewheel(diode="schottky-1a", clamp="zener", v_zener=10.0)), spread=False)
    assert zen.conditions.v_clamp == pytest.approx(plain.conditions.v_clamp + 10.0, abs=0.05)
    assert zen.clamp.t_zero < plain.clamp.t_zero
    assert zen.clamp.v_switch_peak == pytest.approx(12.0 + zen.conditions.v_clamp)


def test_tolerance_results_equal_the_tolerance_models() -> None:
    d, ev = FAN, FULL["fan"]
    kw, tk = timing_kwargs(d), tolerance_kwargs(d)
    ref = monte_carlo("pot", n=4000, seed=1, allow_failures=True, frequency_window=(31e3 * 0.65, 31e3 * 1.35),
                      **tk, **kw)
    np.testing.assert_array_equal(ev.spread.frequency, ref.frequency)
    assert ev.spread.yield_ == ref.yield_
    wc = worst_case("pot", **tk, **kw)
    assert ev.worst_case.frequency_min == wc.frequency_min and ev.worst_case.frequency_max == wc.frequency_max
    s = sensitivities("pot", tolerances=tk["tolerances"], timer_accuracy=True, **kw)
    assert ev.sensitivity.frequency_rel_std == s.frequency_rel_std
    # the design's tolerances reach the model: resistors ±5 %, pot ±20 %, C ±5 %, supply range, ambient
    assert tk["tolerances"] == {"ra": 0.05, "rb": 0.05, "c": 0.05, "pot": 0.2}
    assert tk["vcc_range"] == (11.4, 13.8) and tk["t_ambient_c"] == (5.0, 45.0) and tk["timer_errors"]
    # the steering diode's drop coefficient from its Shockley model, ≈ −2 mV/K (Shockley law with series resistance: Sze & Ng, Physics of Semiconductor Devices, 3rd ed., ch. 2, from memory)
    assert -2.5e-3 < tk["vd_tempco"] < -1.5e-3
    # capacitance scales the frequency one to one (∂ln f/∂ln C = −1 exactly)
    assert ev.key_results()["sensitivity.frequency.c"] == pytest.approx(-1.0, abs=1e-12)


def test_diode_law_equals_model_and_is_off_in_quick_mode() -> None:
    d = GROW
    ref = diode_law_timing("pot", **timing_kwargs(d), diode=d.timing.diode, t_c=d.t_ambient_c)
    assert FULL["grow-bar"].diode_law.frequency == ref.frequency
    q = QUICK["grow-bar"]
    assert q.diode_law is None and q.spread is None and q.worst_case is None and q.sensitivity is None
    assert q.conditions.quick
    assert evaluate(d, spread=False, diode_law=True).diode_law.frequency == ref.frequency


def test_spread_is_reproducible_and_seeded() -> None:
    a = evaluate(GROW, n_mc=500, seed=7)
    b = evaluate(GROW, n_mc=500, seed=7)
    c = evaluate(GROW, n_mc=500, seed=8)
    np.testing.assert_array_equal(a.spread.frequency, b.spread.frequency)
    assert not np.array_equal(a.spread.frequency, c.spread.frequency)
    assert a.key_results() == b.key_results()


def test_steering_diode_family_sets_the_drop() -> None:
    # a small Schottky steering diode drops ≈ 0.25 V at 1 mA (Shockley law with series resistance: Sze & Ng, Physics of Semiconductor Devices, 3rd ed., ch. 2, from memory computed 0.2475 V),
    # not the silicon default
    d = GROW.with_timing(diode="small-schottky")
    ev = evaluate(d, spread=False)
    assert ev.conditions.vd == pytest.approx(0.2475, abs=5e-4)
    assert ev.timing.frequency == astable("pot", **dict(GROW.astable_kwargs(), vd=ev.conditions.vd)).frequency


def test_no_load_design() -> None:
    ev = evaluate(GROW.replace(load=None), spread=False)
    assert ev.led is None and ev.motor is None and ev.gate is None and ev.mosfet is None
    assert "led.i_peak" not in ev.key_results()
    assert ev.findings.by_id("gate.drive") is None


# ------------------------------------------------------------------------------------------------
# inputs, repr and HTML
# ------------------------------------------------------------------------------------------------
@pytest.mark.parametrize(("kwargs", "match"), [
    (dict(n_mc=10), "n_mc"), (dict(n_mc=True), "n_mc"), (dict(seed="x"), "seed"), (dict(n_mc=2.5), "n_mc"),
])
def test_bad_arguments(kwargs: dict, match: str) -> None:
    with pytest.raises(DesignError, match=match):
        evaluate(FAN, **kwargs)


def test_not_a_design() -> None:
    with pytest.raises(DesignError, match="design"):
        evaluate({"vcc": 12})


def test_impossible_nominal_design_raises_design_error() -> None:
    # 6 red LEDs (12.6 V) on a 12 V supply: nothing left for the resistor (series-resistor law, common practice)
    with pytest.raises(DesignError, match="leaves nothing for the resistor"):
        evaluate(GROW.replace(load=dc.replace(GROW.load, n_series=6)), spread=False)


def test_repr_and_html() -> None:
    ev = FULL["grow-bar"]
    assert "grow-bar" in repr(ev) and "Hz" in repr(ev)
    page = ev._repr_html_()
    for text in ("Timing", "0.693 estimate", "Output stage and load", "design-rule checks", "Cautions", "Eye safety",
                 "tolerance spread", "IEEE 1789"):
        assert text in page, text
    # a warning is shown with a word and symbol, not colour alone
    warned = evaluate(GROW.replace(load=dc.replace(GROW.load, r_power_rating=0.125)), spread=False)
    assert "✗ 1 fail" in warned._repr_html_()
    evil = GROW.replace(name="<script>x</script>")
    assert "<script>" not in evaluate(evil, spread=False)._repr_html_()
    assert isinstance(ev, Evaluation)
    with pytest.raises(dc.FrozenInstanceError):
        ev.timing = None  # type: ignore[misc]


def test_evaluation_cautions_and_findings_are_filled() -> None:
    from pwmkit.cautions import cautions_for
    from pwmkit.checks import run_checks

    ev = FULL["fan"]
    assert ev.cautions == cautions_for(FAN, ev)
    assert ev.findings == run_checks(FAN, ev)
    kr = ev.key_results()
    assert kr["findings.fail_count"] == ev.findings.fail_count
    assert kr["findings.worst"] == ev.findings.worst


# ------------------------------------------------------------------------------------------------
# random designs
# ------------------------------------------------------------------------------------------------
def _log(lo: float, hi: float):
    return st.floats(min_value=math.log10(lo), max_value=math.log10(hi)).map(lambda x: 10.0**x)


@st.composite
def designs(draw) -> dict:
    """Keyword arguments of a random Design (built inside the test, where DesignError is allowed)."""
    topology = draw(st.sampled_from(["classic", "bypass", "steered", "pot"]))
    timer = draw(st.sampled_from(["bipolar", "cmos"]))
    # rb = 0 only where another resistance closes the discharge path (the pot, or a CMOS switch)
    rb_zero_ok = topology == "pot" or timer == "cmos"
    timing = dict(topology=topology, ra=draw(_log(100.0, 2e6)),
                  rb=draw(_log(100.0, 2e6)) if (draw(st.integers(0, 9)) or not rb_zero_ok) else 0.0,
                  c=draw(_log(1e-10, 1e-5)), timer=timer,
                  diode=draw(st.sampled_from(["small-signal-silicon", "small-schottky"])),
                  c_dielectric=draw(st.sampled_from(["c0g", "x7r", "film", "electrolytic"])),
                  cv_bypass=draw(st.sampled_from([None, 10e-9])),
                  r_tolerance=draw(st.sampled_from([0.01, 0.05])), pot_tolerance=draw(st.sampled_from([0.1, 0.2])))
    if topology == "pot":
        timing.update(pot=draw(_log(1e3, 1e6)), wiper=draw(st.floats(min_value=0.0, max_value=0.98)))
    if draw(st.booleans()) and topology != "pot":
        timing["vd"] = draw(st.floats(min_value=0.0, max_value=0.75))
    vcc = draw(st.floats(min_value=3.0, max_value=18.0))  # mostly designs that work (≥ 80 % must)
    lo = vcc * (1 - draw(st.floats(min_value=0.0, max_value=0.2)))
    hi = vcc * (1 + draw(st.floats(min_value=0.0, max_value=0.2)))
    kind = draw(st.sampled_from(["led", "motor", "none"]))
    v_load = draw(st.one_of(st.none(), st.floats(3.0, 40.0)))
    if kind == "led":
        # strings that fit the lowest load supply (mostly designs that work: ≥ 80 % must reach the checks)
        supply = lo if v_load is None else v_load
        vf = draw(st.floats(min_value=1.8, max_value=max(1.8, min(3.4, 0.8 * supply))))
        n_max = max(1, min(4, int(0.8 * supply / (vf + 0.3))))
        load = (LedLoad, dict(n_series=draw(st.integers(1, n_max)), n_parallel=draw(st.integers(1, 20)),
                              vf=vf, vf_spread=draw(st.floats(0.0, 0.3)), r_series=draw(_log(1.0, 10e3))))
    elif kind == "motor":
        load = (MotorLoad, dict(r=draw(_log(0.2, 100.0)), l=draw(_log(1e-5, 1e-2)), ke=draw(_log(1e-3, 0.1)),
                                b=draw(_log(1e-8, 1e-4)), t_load=draw(st.floats(0.0, 0.01)), j=1e-5))
    else:
        load = None
    clamp = draw(st.sampled_from(["diode", "zener"]))
    freewheel = dict(diode=draw(st.sampled_from(["schottky-1a", "small-schottky", "fast-recovery-1a"])),
                     clamp=clamp, v_zener=draw(st.floats(3.0, 30.0)) if clamp == "zener" else None)
    t_min = draw(st.floats(-40.0, 25.0))
    t_max = draw(st.floats(25.0, 120.0))
    req = Requirements(frequency=draw(st.one_of(st.none(), _log(10.0, 1e6))),
                       duty_min=draw(st.one_of(st.none(), st.floats(0.0, 0.5))),
                       flicker=draw(st.sampled_from([None, "low-risk", "no-effect"])))
    return dict(name="random", vcc=vcc, vcc_min=lo, vcc_max=hi, timing=timing, load=load,
                v_load=v_load,
                switch=Switch(mosfet=draw(st.sampled_from(["logic-level-30v", "standard-level-60v"])),
                              r_gate=draw(st.floats(0.0, 100.0))),
                freewheel=freewheel, t_ambient_c=25.0, t_ambient_min_c=t_min, t_ambient_max_c=t_max,
                requirements=req)


def _build(kw: dict) -> Design:
    """Build the Design; load objects are built here too so that their DesignError counts as allowed."""
    kw = dict(kw)
    kw["timing"] = Timing(**kw["timing"])
    if isinstance(kw["load"], tuple):
        cls, args = kw["load"]
        kw["load"] = cls(**args)
    if isinstance(kw["freewheel"], dict):
        kw["freewheel"] = Freewheel(**kw["freewheel"])
    return Design(**kw)


def _check(ev: Evaluation) -> None:
    kr = ev.key_results()
    for key, val in kr.items():
        assert isinstance(val, str) or math.isfinite(val), key
    json.dumps(ev.to_dict(), allow_nan=False)
    for f in ev.findings:
        assert f.severity in ("ok", "warn", "fail", "not-run")
    ev._repr_html_()


@reaching()
@settings(max_examples=40, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(design=designs())
def test_random_designs_quick_finite_or_design_error(design: dict) -> None:
    try:
        ev = evaluate(_build(design), spread=False)
    except DesignError:
        return
    reached()
    _check(ev)


@reaching()
@settings(max_examples=10, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(design=designs())
def test_random_designs_full_finite_or_design_error(design: dict) -> None:
    try:
        ev = evaluate(_build(design), n_mc=300)
    except DesignError:
        return
    reached()
    _check(ev)
