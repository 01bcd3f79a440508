"""Outside oracle: the load models against ngspice simulations of the load circuits.

Source: ngspice (version 39). Each netlist is built from the component values only:

* motor: supply → current sense (0 V source) → R → L → back-EMF source E → drain; a low-side
  switch whose conductance follows a gate PULSE linearly (10 µΩ closed, 100 MΩ open; edges of
  1e-5 of the period, midpoints at the exact duty, edges are simulator breakpoints) and a
  100 kΩ + 1 pF snubber across it, so that the inductive current always has a path at an edge
  and the winding's ringing with it is damped (≈ 1e-7 of the charge per period); the freewheel diode from drain to
  supply is a constant-drop equivalent (ideal diode + source vf). The inductor starts at (D·V − E)/R and
  the circuit runs 12 L/R before the measured period. ``meas AVG/MAX/MIN`` over one period.
* LED strings: operating point (``op``) of n_parallel strings (series resistor + n_series
  constant-drop LEDs) sharing a switch resistance.
* clamp decay: inductor at I0 in series with R, E and the clamp (ideal diode + source v_clamp,
  1 pF across it);
  ``meas WHEN`` the current falls to 1e-9·I0 (interpolated) and ``INTEG`` of the current.

Options ``reltol=1e-6 abstol=1e-12 vntol=1e-6``; step limit period/1000 (motor) and t_zero/2000
(clamp). Tolerance 1e-3 relative.
"""

from __future__ import annotations

import math

import pytest

from pwmkit.loads.diode import clamp_decay
from pwmkit.loads.led import led_current
from pwmkit.loads.motor import motor_current
from pwmkit.netlist import find_ngspice
from pwmkit.netlist.elements import _diode, fmt, resistor
from pwmkit.netlist.ngspice import run_ngspice

pytestmark = pytest.mark.skipif(find_ngspice() is None, reason="ngspice not installed (Debian package ngspice)")

OPTS = ".options reltol=1e-6 abstol=1e-12 vntol=1e-6"
EDGE = 1e-5  # gate-pulse edge as a fraction of the period


def _motor_deck(v, e, r, l, d, f, vf):  # noqa: E741
    period = 1.0 / f
    tau = l / r
    n_skip = math.ceil(12 * tau / period)
    t0, t1 = n_skip * period, (n_skip + 1) * period
    i0 = max((d * v - (1 - d) * vf - e) / r, 0.0)
    lines = ["* motor chopper", OPTS, f"Vsup vs 0 DC {fmt(v)}", "Vsense vs m1 DC 0", resistor("m", "m1", "m2", r),
             f"Lm m2 m3 {fmt(l)} IC={fmt(i0)}", f"Vemf m3 drain DC {fmt(e)}",
             # on from 0 to D·T (the switch is closed at the start, consistent with uic), off until T;
             # edges of EDGE·T, midpoints at D·T and T
             f"Vg g 0 PULSE(1 0 {fmt((d - EDGE / 2) * period)} {fmt(EDGE * period)} {fmt(EDGE * period)} "
             f"{fmt((1 - d - EDGE) * period)} {fmt(period)})",
             "Bx drain 0 I = v(drain)*(1e5*v(g) + 1e-8)", "Rsn drain sn 1e5", "Csn sn 0 1e-12"]
    lines += _diode("fw", "drain", "vs", "IDEAL", vf)
    lines += [f".tran {fmt(period / 1000)} {fmt(t1)} 0 {fmt(period / 1000)} uic", ".control", "run",
              f"meas tran iavg AVG i(Vsense) FROM={fmt(t0)} TO={fmt(t1)}",
              f"meas tran imax MAX i(Vsense) FROM={fmt(t0)} TO={fmt(t1)}",
              f"meas tran imin MIN i(Vsense) FROM={fmt(t0)} TO={fmt(t1)}", "quit", ".endc", ".end", ""]
    return "\n".join(lines)


MOTOR = [  # (v, e, r, l, d, f, vf, mode)
    (12.0, 6.0, 1.5, 1e-3, 0.7, 20e3, 0.0, "continuous"),     # the classic chopper example
    (12.0, 6.0, 1.5, 1e-3, 0.7, 20e3, 0.5, "continuous"),
    (24.0, 0.0, 2.0, 5e-3, 0.35, 2e3, 0.45, "continuous"),    # stalled motor
    (12.0, 6.0, 1.5, 1e-3, 0.6, 500.0, 0.0, "discontinuous"),
    (12.0, 6.35, 6.0, 1.5e-3, 0.3, 5e3, 0.3, "discontinuous"),
]


@pytest.mark.slow
@pytest.mark.parametrize("v, e, r, l, d, f, vf, mode", MOTOR)
def test_motor_current_matches_circuit(v, e, r, l, d, f, vf, mode) -> None:  # noqa: E741
    sim = run_ngspice(_motor_deck(v, e, r, l, d, f, vf))
    m = motor_current(v, e, r, l, d, f, vf)
    assert m.mode == mode
    # ngspice transient of the chopper circuit (outside oracle): <= 1e-3
    assert sim.get("iavg") == pytest.approx(m.i_mean, rel=1e-3)
    assert sim.get("imax") - sim.get("imin") == pytest.approx(m.i_ripple_pp, rel=1e-3)
    assert sim.get("imax") == pytest.approx(m.i_max, rel=1e-3)


def _led_deck(vs, vf, n_series, n_parallel, r_series, rds):
    lines = ["* LED strings", OPTS, f"Vsup vs 0 DC {fmt(vs)}", resistor("sw", "drain", "0", rds)]
    for k in range(n_parallel):
        lines += [f"Vs{k} vs s{k}_r DC 0", resistor(f"s{k}", f"s{k}_r", f"s{k}_0", r_series)]
        node = f"s{k}_0"
        for j in range(n_series):
            nxt = "drain" if j == n_series - 1 else f"s{k}_{j + 1}"
            lines += _diode(f"led{k}_{j}", node, nxt, "IDEAL", vf)
            node = nxt
    lines += [".control", "op"] + [f"let iled{k} = i(Vs{k})" for k in range(n_parallel)]
    lines += [f"print iled{k}" for k in range(n_parallel)] + ["quit", ".endc", ".end", ""]
    return "\n".join(lines)


@pytest.mark.parametrize("vs, vf, n_series, n_parallel, r_series, rds", [
    (12.0, 3.1, 3, 1, 130.0, 0.05),   # three white LEDs on 12 V
    (12.0, 2.1, 3, 3, 270.0, 0.018),  # the grow-bar strings (demo values)
    (24.0, 2.9, 7, 4, 33.0, 0.5),     # a long string with a poor switch
])
def test_led_string_currents_match_circuit(vs, vf, n_series, n_parallel, r_series, rds) -> None:
    sim = run_ngspice(_led_deck(vs, vf, n_series, n_parallel, r_series, rds))
    i = led_current(vs, vf, n_series, r_series, rds_on=rds, n_parallel=n_parallel)
    for k in range(n_parallel):
        assert sim.get(f"iled{k}") == pytest.approx(i, rel=1e-3)  # ngspice operating point (outside oracle)


def _clamp_deck(l, r, i0, v_clamp, e, t_est):  # noqa: E741
    lines = ["* clamp decay", OPTS, f"Lc 0 a {fmt(l)} IC={fmt(i0)}", "Vsense a b DC 0", resistor("c", "b", "c", r),
             f"Vemf c d DC {fmt(e)}", "Cx d 0 1e-12"]
    lines += _diode("cl", "d", "0", "IDEAL", v_clamp)
    # the inductor pushes its current out of node a, round the loop and back into ground
    lines += [f".tran {fmt(t_est / 2000)} {fmt(1.5 * t_est)} 0 {fmt(t_est / 2000)} uic", ".control", "run",
              f"meas tran tzero WHEN i(Vsense)={fmt(1e-9 * i0)} FALL=1",
              "meas tran charge INTEG i(Vsense) FROM=0 TO=$&tzero", "quit", ".endc", ".end", ""]
    return "\n".join(lines)


@pytest.mark.parametrize("l, r, i0, v_clamp, e", [
    (0.1, 100.0, 0.12, 0.7, 0.0),    # relay coil, plain diode
    (0.1, 100.0, 0.12, 24.7, 0.0),   # relay coil, diode + 24 V Zener
    (1e-3, 1.5, 1.6, 0.7, 6.0),      # running motor
])
def test_clamp_decay_matches_circuit(l, r, i0, v_clamp, e) -> None:  # noqa: E741
    t_est = l / r * math.log(1 + r * i0 / (e + v_clamp))  # only sizes the simulated time
    sim = run_ngspice(_clamp_deck(l, r, i0, v_clamp, e, t_est))
    c = clamp_decay(l, r, i0, v_clamp, e)
    # ngspice transient of the decay loop (outside oracle): <= 1e-3
    assert sim.get("tzero") == pytest.approx(c.t_zero, rel=1e-3)
    assert sim.get("charge") == pytest.approx(c.charge, rel=1e-3)
    assert v_clamp * sim.get("charge") == pytest.approx(c.clamp_energy, rel=1e-3)
