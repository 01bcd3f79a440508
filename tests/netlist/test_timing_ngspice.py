"""Outside oracle: the timing models against ngspice simulations of the wired circuit.

Source: ngspice (version 39, a general-purpose SPICE engine), simulating netlists built by
:mod:`pwmkit.netlist.elements` from the component values only (the timing network as wired, a
hysteretic switch for the comparators and flip-flop, diodes as constant-drop equivalents or
Shockley models). No field of the result under test enters the circuit; the model's period only
sizes the simulated time window and the step limit.

Simulator setup (stated here as the issue asks): ``.options reltol=1e-6 abstol=1e-12
vntol=1e-6 temp=25 tnom=25``; step limit ``min(period/5000, t_fast/2000)`` with ``t_fast`` the
shorter half-period (a switching edge is late by at most one step; the period error is about
``step/t_fast`` ≤ 5e-4); measurement: the timer state node's 0.5 V crossings, linearly
interpolated (``meas tran … WHEN v(st)=0.5 FALL=1, RISE=1, FALL=2``), starting from the
capacitor at the lower threshold (the periodic state). Duties are kept within 3 … 97 %: beyond
that the step limit (and the run time) would have to shrink in proportion. Constant-drop diodes are a near-ideal diode (N = 1e-4, its own drop ≈ 0.05 mV) in series
with a source. Tolerance 1e-3 relative in frequency, 1e-3 absolute in duty.
"""

from __future__ import annotations

import itertools

import pytest

from pwmkit import DesignError
from pwmkit.netlist import find_ngspice
from pwmkit.netlist.simulate import network, simulate_timing
from pwmkit.timing import astable, diode_law_timing

pytestmark = pytest.mark.skipif(find_ngspice() is None, reason="ngspice not installed (Debian package ngspice)")

T_PERIOD = 1e-3

# Supplies over each family's range (the API itself accepts any positive supply that oscillates).
SUPPLIES = {"bipolar": (4.5, 9.0, 16.0), "cmos": (3.0, 5.0, 15.0)}
# Resistor sets spanning the decades the API accepts: (ra, rb, pot, wiper)
VALUES = [(470.0, 1e3, 10e3, 0.0), (4.7e3, 22e3, 100e3, 0.35), (1e6, 10e6, 1e6, 1.0), (1e3, 0.0, 50e3, 0.7),
          (33e3, 330.0, 2.2e3, 0.5), (680.0, 100e3, 1e6, 0.05)]


def _candidate(topology, timer, vcc, control, k):
    ra, rb, pot, wiper = VALUES[k % len(VALUES)]
    if topology != "pot" and rb == 0:
        rb = 10e3
    kw = dict(ra=ra, rb=rb, vcc=vcc, timer=timer, vd=0.45 + 0.05 * (k % 5))
    if topology == "pot":
        kw.update(pot=pot, wiper=wiper)
    if control == "external":
        # low and high control voltages in turn
        kw["vctl"] = vcc * (0.42 if k % 2 else 0.72)
    return kw


def _usable(topology, kw) -> bool:
    """The model accepts the point and its duty lies within 3 … 97 % (see the module notes)."""
    try:
        r = astable(topology, c=1e-9, **kw)
    except DesignError:
        return False
    return 0.03 <= r.duty <= 0.97


def _cases():
    k = 0
    for topology, timer in itertools.product(("classic", "bypass", "steered", "pot"), ("bipolar", "cmos")):
        for vcc, control in itertools.product(SUPPLIES[timer], ("internal", "external")):
            # the next value set (in turn) that the model accepts at this supply and control
            for _ in range(len(VALUES)):
                kw = _candidate(topology, timer, vcc, control, k)
                k += 1
                if _usable(topology, kw):
                    break
            else:  # pragma: no cover - the grid is chosen so that this does not happen
                raise AssertionError(f"no usable value set for {topology}, {timer}, {vcc} V, {control}")
            yield f"{topology}-{timer}-{vcc:g}V-{control}-{k}", topology, kw


def _scaled(topology: str, kw: dict) -> tuple[dict, object]:
    """Choose c so that the model period is T_PERIOD (c is an input of both model and circuit)."""
    r0 = astable(topology, c=1e-9, **kw)
    kw = dict(kw, c=1e-9 * T_PERIOD / r0.period)
    return kw, astable(topology, **kw)


def _fast(model) -> float:
    return min(model.t_high, model.t_low)


CASES = list(_cases())


@pytest.mark.slow
@pytest.mark.parametrize("name, topology, kw", CASES, ids=[c[0] for c in CASES])
def test_closed_form_matches_circuit_with_constant_drop_diodes(name, topology, kw) -> None:
    kw, model = _scaled(topology, kw)
    (sim,) = simulate_timing([network(topology, **kw)], t_period=T_PERIOD, t_fast=_fast(model))
    # ngspice transient of the wired circuit (outside oracle): <= 1e-3
    assert sim.frequency == pytest.approx(model.frequency, rel=1e-3)
    assert sim.duty == pytest.approx(model.duty, abs=1e-3)
    # the capacitor swings between the thresholds (overshoot at most one step)
    assert sim.v_cap_max == pytest.approx(model.v_upper, rel=2e-3)
    assert sim.v_cap_min == pytest.approx(model.v_lower, rel=2e-3)


BYPASS_TURN_OFF = [  # diode across rb stops conducting inside the swing, or never conducts
    dict(ra=10e3, rb=1e3, vcc=12.0, vd=0.65), dict(ra=10e3, rb=300.0, vcc=12.0, vd=0.65),
    dict(ra=470.0, rb=0.0, vcc=12.0, vd=0.65, timer="cmos"), dict(ra=2.2e3, rb=1e3, vcc=5.0, vd=0.6, timer="cmos"),
    dict(ra=10e3, rb=2e3, vcc=3.0, vd=1.2, timer="cmos"),  # vcc − vd below the upper threshold: still runs
]


@pytest.mark.slow
@pytest.mark.parametrize("kw", BYPASS_TURN_OFF)
def test_bypass_diode_that_stops_conducting(kw) -> None:
    kw, model = _scaled("bypass", kw)
    (sim,) = simulate_timing([network("bypass", **kw)], t_period=T_PERIOD, t_fast=_fast(model))
    # ngspice transient (outside oracle): the path change inside the charge is in the model
    assert sim.frequency == pytest.approx(model.frequency, rel=1e-3)
    assert sim.duty == pytest.approx(model.duty, abs=1e-3)


SHOCKLEY = [("bypass", "bipolar", 12.0, dict(ra=10e3, rb=10e3)), ("bypass", "cmos", 5.0, dict(ra=4.7e3, rb=15e3)),
            ("steered", "bipolar", 9.0, dict(ra=2.2e3, rb=47e3)), ("steered", "cmos", 12.0, dict(ra=68e3, rb=6.8e3)),
            ("pot", "bipolar", 12.0, dict(ra=1e3, rb=1e3, pot=50e3, wiper=0.6)),
            ("pot", "cmos", 5.0, dict(ra=1e3, rb=0.0, pot=100e3, wiper=0.2)),
            ("steered", "bipolar", 15.0, dict(ra=1e3, rb=1e3, vctl=12.5)),
            ("pot", "cmos", 15.0, dict(ra=10e3, rb=1e3, pot=20e3, wiper=0.9, vctl=4.0))]


@pytest.mark.slow
@pytest.mark.parametrize("topology, timer, vcc, kw", SHOCKLEY)
@pytest.mark.parametrize("diode", ["small-signal-silicon", "small-schottky"])
def test_diode_law_model_matches_circuit_with_shockley_diodes(topology, timer, vcc, kw, diode) -> None:
    kw = dict(kw, vcc=vcc, timer=timer)
    kw, _ = _scaled(topology, kw)
    model = diode_law_timing(topology, diode=diode, t_c=25.0, **kw)
    (sim,) = simulate_timing([network(topology, diode=diode, **kw)], t_period=model.period,
                             t_fast=min(model.t_high, model.t_low), temp_c=25.0)
    # ngspice with the Shockley diode model (IS, N, RS of the family) (outside oracle): <= 1e-3
    assert sim.frequency == pytest.approx(model.frequency, rel=1e-3)
    assert sim.duty == pytest.approx(model.duty, abs=1e-3)


def test_circuit_that_does_not_oscillate_is_refused_by_the_model() -> None:
    # supply 2 V, CMOS, two 0.65 V steering drops: the discharge asymptote lies above vcc/3
    with pytest.raises(DesignError, match="cannot fall to the lower threshold"):
        astable("steered", ra=10e3, rb=10e3, c=1e-8, vcc=2.0, vd=0.65, timer="cmos", r_on=500.0)


@pytest.mark.slow
@pytest.mark.parametrize("topology, r_cv", [("classic", 10e3), ("steered", 47e3), ("pot", 22e3)])
def test_control_pin_divider_matches_circuit(topology, r_cv) -> None:
    # the circuit has the bipolar family's internal divider (3 × 5 kΩ) with r_cv to ground; the model takes
    # the control voltage from control_voltage_from_divider (Thevenin of the same divider)
    from pwmkit.timing import control_voltage_from_divider

    kw = dict(ra=4.7e3, rb=22e3, vcc=12.0, vd=0.6, timer="bipolar")
    if topology == "pot":
        kw.update(pot=50e3, wiper=0.4)
    vctl = control_voltage_from_divider(12.0, r_cv, "bipolar")
    kw_model, model = _scaled(topology, dict(kw, vctl=vctl))
    (sim,) = simulate_timing([network(topology, r_cv=r_cv, **{**kw, "c": kw_model["c"]})], t_period=T_PERIOD,
                             t_fast=_fast(model))
    # ngspice transient with the divider wired at the control pin (outside oracle): <= 1e-3
    assert sim.frequency == pytest.approx(model.frequency, rel=1e-3)
    assert sim.duty == pytest.approx(model.duty, abs=1e-3)
    assert sim.v_cap_max == pytest.approx(vctl, rel=2e-3)
