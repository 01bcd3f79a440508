"""The bypass diode that stops conducting inside the charge: timing and waveform against the wired circuit.

Sources: scipy.integrate.solve_ivp on the node equations of the wired circuit with constant-drop ideal
diodes (tests/timing/wired_circuit.py: every on/off state of the diode solved exactly, the consistent one
kept); the RC law (Alexander & Sadiku, Fundamentals of Electric Circuits, 6th ed., ch. 7).
"""

from __future__ import annotations

import numpy as np
import pytest
from wired_circuit import Circuit, half_periods

from pwmkit.parts.timers import get_timer
from pwmkit.timing import astable, waveform

CASES = [  # (rb, vcc, vd, timer): the diode conducts throughout, stops inside the swing, never conducts
    (10e3, 12.0, 0.65, "bipolar"), (1e3, 12.0, 0.65, "bipolar"), (300.0, 12.0, 0.65, "bipolar"),
    (0.0, 12.0, 0.65, "cmos"), (2e3, 3.0, 1.2, "cmos"),
]


@pytest.mark.parametrize("rb, vcc, vd, timer", CASES)
def test_bypass_charge_time_matches_the_wired_circuit(rb, vcc, vd, timer) -> None:
    fam = get_timer(timer)
    r = astable("bypass", ra=10e3, rb=rb, c=10e-9, vcc=vcc, vd=vd, timer=timer)
    t_high, t_low = half_periods(Circuit("bypass", ra=10e3, rb=rb, c=10e-9, vcc=vcc, vd=vd, vsat=fam.vsat,
                                         r_on=fam.r_discharge_on))
    # scipy oracle on the wired circuit: <= 1e-6 relative
    assert r.t_high == pytest.approx(t_high, rel=1e-6)
    assert r.t_low == pytest.approx(t_low, rel=1e-6)


@pytest.mark.parametrize("rb, vcc, vd, timer", CASES)
def test_bypass_waveform_turns_at_the_thresholds(rb, vcc, vd, timer) -> None:
    r = astable("bypass", ra=10e3, rb=rb, c=10e-9, vcc=vcc, vd=vd, timer=timer)
    w = waveform(r, cycles=3, points_per_cycle=4000, from_power_up=True)
    assert np.isfinite(w.v_cap).all()
    falls = np.flatnonzero(np.diff(w.output_high.astype(int)) < 0)
    # each charge ends at the upper threshold (sampling resolution: 1/4000 of a period)
    assert np.allclose(w.v_cap[falls], r.v_upper, rtol=2e-3)
    assert w.v_cap.max() <= r.v_upper * (1 + 1e-9)
