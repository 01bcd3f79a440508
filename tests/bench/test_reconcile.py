"""Reconcile: readings of a simulated build against the design's spread and the MAP part fit.

The built circuits are simulated independently of the code under test: the capacitor's node
equation of the wired two-diode (steered) astable — charge through R_A and D1 from the supply,
discharge through D2 and R_B into the discharge pin at its saturation voltage, comparators at
1/3 and 2/3 of the supply from the internal divider — integrated with scipy's ``solve_ivp``
(DOP853) with the threshold crossings as terminal events. The diodes are constant drops of the
design's ``vd`` (the circuit assumption of the design, so the test isolates the built capacitor).
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from scipy.integrate import solve_ivp

from pwmkit import DesignError
from pwmkit.bench import BenchConditions, BenchReading, Measured, reconcile, reconcile_design
from pwmkit.design import Design, Timing

VSAT = 0.1   # bipolar 555-type discharge saturation at ~10 mA (typical published datasheet value, generic)
VD = 0.65


def _design(**kw) -> Design:
    t = dict(topology="steered", ra=10e3, rb=4.7e3, c=47e-9, vd=VD, vsat=VSAT, r_on=0.0, r_tolerance=0.01,
             c_tolerance=0.10, c_dielectric="film")
    t.update(kw)
    return Design(name="bench-test", vcc=12.0, vcc_min=11.0, vcc_max=13.0, timing=Timing(**t))


def simulate_steered(ra: float, rb: float, c: float, vcc: float, vd: float, vsat: float) -> tuple[float, float]:
    """(frequency, duty) of the wired steered astable from its node equation (steady cycle)."""
    v_hi, v_lo = 2.0 * vcc / 3.0, vcc / 3.0

    def charge(_t, v):
        return [max(vcc - vd - v[0], 0.0) / (ra * c)]

    def discharge(_t, v):
        return [-max(v[0] - vd - vsat, 0.0) / (rb * c)]

    def up(_t, v):
        return v[0] - v_hi

    def down(_t, v):
        return v[0] - v_lo

    up.terminal = down.terminal = True
    v0, times = v_lo, []
    for _cycle in range(3):
        for rhs, event in ((charge, up), (discharge, down)):
            sol = solve_ivp(rhs, (0.0, 1.0), [v0], method="DOP853", events=event, rtol=1e-11, atol=1e-12)
            times.append(float(sol.t_events[0][0]))
            v0 = float(sol.y_events[0][0][0])
    t_high, t_low = times[-2], times[-1]
    return 1.0 / (t_high + t_low), t_high / (t_high + t_low)


def test_oracle_matches_the_textbook_form_for_the_steered_astable():
    # Hand check of the oracle itself: t_H = RA·C·ln((Vcc−Vd−Vcc/3)/(Vcc−Vd−2Vcc/3)) (REFERENCES-style RC
    # step law, any circuits text, e.g. Alexander & Sadiku, Fundamentals of Electric Circuits, 6th ed., ch. 7)
    f, d = simulate_steered(10e3, 4.7e3, 47e-9, 12.0, VD, VSAT)
    t_h = 10e3 * 47e-9 * math.log((12 - VD - 4) / (12 - VD - 8))
    t_l = 4.7e3 * 47e-9 * math.log((8 - VD - VSAT) / (4 - VD - VSAT))
    assert 1 / f == pytest.approx(t_h + t_l, rel=1e-8)
    assert d == pytest.approx(t_h / (t_h + t_l), rel=1e-8)


def test_capacitor_off_by_8_percent_is_inside_and_named_within_2_percent():
    d = _design()
    f, duty = simulate_steered(10e3, 4.7e3, 1.08 * 47e-9, 12.0, VD, VSAT)
    r = reconcile(d, frequency=f, duty=duty, vcc=12.0, t_ambient_c=25.0)
    assert r.inside                                   # +8 % lies within a ±10 % capacitor's spread
    assert 0.0 < r.percentile["frequency"] < 50.0     # low side: a larger C gives a lower frequency
    assert r.culprit == "c"
    assert r.estimates["c"] == pytest.approx(1.08 * 47e-9, rel=0.02)
    assert r.resolved("c")
    assert abs(r.deviations["ra"]) < 0.01 and abs(r.deviations["rb"]) < 0.01
    assert r.closest.within_tolerance and r.closest.explains


def test_several_readings_fit_together_and_narrow_the_estimate():
    d = _design()
    supplies = (11.0, 12.0, 13.0)
    sims = [simulate_steered(10e3, 4.7e3, 1.08 * 47e-9, v, VD, VSAT) for v in supplies]
    one = reconcile(d, frequency=sims[1][0], duty=sims[1][1], vcc=12.0, t_ambient_c=25.0)
    three = reconcile(d, frequency=[s[0] for s in sims], duty=[s[1] for s in sims], vcc=supplies, t_ambient_c=25.0)
    assert three.inside and len(three.readings) == 3
    assert three.estimates["c"] == pytest.approx(1.08 * 47e-9, rel=0.02)
    assert three.uncertainty["c"] <= one.uncertainty["c"] * 1.0001
    assert set(k for k in three.estimates if k.startswith("vcc[")) == {"vcc[0]", "vcc[1]", "vcc[2]"}
    assert three.estimates["vcc[2]"] == pytest.approx(13.0, rel=0.006)


def test_reading_beyond_every_tolerance_is_outside_with_the_closest_explanation():
    d = _design()
    f, duty = simulate_steered(10e3, 4.7e3, 2.2 * 47e-9, 12.0, VD, VSAT)   # a 100 nF part in place of 47 nF
    r = reconcile(d, frequency=f, duty=duty, vcc=12.0, t_ambient_c=25.0)
    assert not r.inside
    assert r.readings[0].percentile["frequency"] == 0.0
    assert r.culprit == "c"
    e = r.closest
    assert not e.within_tolerance and e.explains
    assert e.value == pytest.approx(2.2 * 47e-9, rel=0.03)
    assert "100 nF" in e.suggestion
    others = [x for x in r.explanations if x.part in ("ra", "rb")]
    assert all(x.tolerance_multiple > e.tolerance_multiple for x in others)


def test_resistor_swap_on_discharge_side_is_blamed_on_rb():
    d = _design()
    f, duty = simulate_steered(10e3, 6.8e3, 47e-9, 12.0, VD, VSAT)   # 6.8 k fitted for 4.7 k: duty moves
    r = reconcile(d, frequency=f, duty=duty, vcc=12.0, t_ambient_c=25.0)
    assert not r.inside
    assert r.culprit == "rb"
    assert r.closest.value == pytest.approx(6.8e3, rel=0.03)


def test_design_readings_use_their_stated_accuracy():
    f, duty = simulate_steered(10e3, 4.7e3, 1.08 * 47e-9, 12.0, VD, VSAT)
    reading = BenchReading(measured=(Measured("frequency", f, accuracy=1e-4), Measured("duty", duty, resolution=1e-3)),
                           conditions=BenchConditions(vcc=12.0, t_ambient_c=25.0))
    r = reconcile_design(_design().with_reading(reading))
    assert r is not None and r.inside and r.culprit == "c"
    assert reconcile_design(_design()) is None


def test_bad_input_is_refused_with_the_field():
    d = _design()
    with pytest.raises(DesignError, match=r"frequency, duty: give at least one measured value"):
        reconcile(d)
    with pytest.raises(DesignError, match=r"duty: 1\.5 is out of range"):
        reconcile(d, frequency=1e3, duty=1.5)
    with pytest.raises(DesignError, match=r"wiper: the 'steered' topology has no potentiometer"):
        reconcile(d, frequency=1e3, wiper=0.5)
    with pytest.raises(DesignError, match=r"vcc: 2 values given for 3 readings"):
        reconcile(d, frequency=[1e3, 1e3, 1e3], vcc=[12, 12])
    with pytest.raises(DesignError, match=r"design: expected a pwmkit.design.Design"):
        reconcile("fan.toml", frequency=1e3)


def test_pot_design_reading_at_its_wiper_is_inside():
    from pwmkit.design import demo_designs

    fan = demo_designs()["fan"]
    nominal = fan.astable()
    r = reconcile(fan, frequency=float(nominal.frequency), duty=float(nominal.duty), wiper=0.6, vcc=12.0,
                  t_ambient_c=30.0)
    assert r.inside
    assert 20.0 < r.percentile["frequency"] < 80.0
    assert not r.resolved("c") or not r.resolved("pot")   # frequency and duty cannot tell C from the track
    assert np.isfinite(list(r.estimates.values())).all()
