"""Transient simulations of timing networks and loads in ngspice, with their measurements.

Measurement method (stated once, used by :func:`pwmkit.netlist.verify` and the tests):

* the timer's state node ``st`` steps between 0 V and 1 V when the hysteretic switch toggles;
  edge times are its 0.5 V crossings, linearly interpolated between time points (``meas …
  WHEN v(st)=0.5 RISE=k / FALL=k``);
* the capacitor starts at the lower threshold ``V_ctl/2`` (computed from the control-pin
  source or divider) with the output high, which is the periodic state itself; the first
  upper crossing, the next lower crossing and the second upper crossing give the high time,
  the low time and the period;
* the time step is limited to ``period/steps`` (default 5000 steps per period) and to
  ``t_fast/fast_steps`` (default 2000 steps in the shorter half-period): the switch toggles at
  the first time point past a threshold, so an edge is late by at most one step, and a late
  edge after the fast half-cycle overshoots the capacitor by ``slope·step``, which the slow
  half-cycle then has to undo — the error in the period is about ``step/t_fast`` (≤ 5e-4);
* ``.options reltol=1e-6 abstol=1e-12 vntol=1e-6``, ``temp`` = the diode temperature,
  ``tnom`` = 25 °C (the diode families' reference temperature).

References
----------
.. [1] ngspice manual (version 39), ch. 11 (``.options`` RELTOL, ABSTOL, VNTOL, TEMP, TNOM),
   ch. 15 (``meas`` WHEN … RISE/FALL with interpolation; AVG, MAX, MIN over FROM … TO).
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass
from typing import Any

from .elements import TimingNetwork, fmt, timer_block, timing_block
from .ngspice import run_ngspice

__all__ = ["TimingSim", "timing_deck", "simulate_timing", "network", "control_estimate", "step_limit", "OPTIONS", "DRIVER_OPTIONS"]

#: Simulator options of the timing decks.
OPTIONS = "reltol=1e-6 abstol=1e-12 vntol=1e-6"
#: Simulator options of the driver decks (amperes commutating between switch and freewheel
#: diode: a tighter reltol stalls the time step at the edges).
DRIVER_OPTIONS = "reltol=1e-4 abstol=1e-12 vntol=1e-6"


@dataclass(frozen=True)
class TimingSim:
    """Timing measured in the circuit.

    Attributes
    ----------
    t_high, t_low, period : [s]; frequency : [Hz]; duty : [1]
    v_cap_max, v_cap_min : capacitor extremes over the measured cycle [V]
    """

    t_high: float
    t_low: float
    period: float
    frequency: float
    duty: float
    v_cap_max: float
    v_cap_min: float


def control_estimate(t: TimingNetwork) -> float:
    """Control-pin voltage of the network from its components (for the starting point only) [V]."""
    if t.vctl is not None:
        return t.vctl
    if t.r_divider > 0 and t.r_cv is not None:
        lower = 2 * t.r_divider * t.r_cv / (2 * t.r_divider + t.r_cv)
        return t.vcc * lower / (t.r_divider + lower)
    return 2.0 * t.vcc / 3.0


def network(topology: str, *, ra: float, rb: float, c: float, vcc: float, pot: float | None = None,
            wiper: float | None = None, vd: float | None = None, vsat: float | None = None,
            r_on: float | None = None, vctl: float | None = None, timer: Any = "bipolar", diode: Any = None,
            r_cv: float | None = None, c_cv: float | None = None) -> TimingNetwork:
    """A :class:`TimingNetwork` from the inputs :func:`pwmkit.timing.astable` takes (same defaults).

    ``diode`` (a family or its name) makes the steering diodes Shockley diodes; otherwise they are
    constant-drop equivalents of ``vd`` (default :func:`pwmkit.timing.default_vd`).
    """
    from ..parts.diodes import get_diode
    from ..parts.timers import get_timer
    from ..timing import default_vd

    fam = get_timer(timer)
    dio = None if diode is None else get_diode(diode)
    if dio is None and topology != "classic":
        vd = default_vd() if vd is None else float(vd)
    return TimingNetwork(
        topology=topology, ra=float(ra), rb=float(rb), c=float(c), vcc=float(vcc),
        pot=0.0 if pot is None else float(pot), wiper=0.0 if wiper is None else float(wiper),
        vsat=fam.vsat if vsat is None else float(vsat), r_on=fam.r_discharge_on if r_on is None else float(r_on),
        vctl=None if vctl is None else float(vctl), r_cv=None if r_cv is None else float(r_cv),
        r_divider=fam.r_cv_divider, c_cv=c_cv, vd=None if dio is not None else (vd if vd is not None else 0.0),
        diode=dio,
    )


def timing_measures(p: str) -> list[str]:
    """``meas`` commands for one network: edges, period, high/low times, capacitor extremes."""
    st, cap = f"v({p}st)", f"v({p}cap)"
    return [
        f"meas tran {p}f1 WHEN {st}=0.5 FALL=1",
        f"meas tran {p}r1 WHEN {st}=0.5 RISE=1",
        f"meas tran {p}f2 WHEN {st}=0.5 FALL=2",
        f"meas tran {p}vmax MAX {cap} FROM=$&{p}f1 TO=$&{p}f2",
        f"meas tran {p}vmin MIN {cap} FROM=$&{p}f1 TO=$&{p}f2",
    ]


def step_limit(t_period: float, t_fast: float | None = None, steps: int = 5000, fast_steps: int = 2000) -> float:
    """Time-step limit of a timing simulation [s] (see the module notes)."""
    tmax = t_period / steps
    return tmax if t_fast is None else min(tmax, t_fast / fast_steps)


def timing_deck(networks: Sequence[TimingNetwork], *, t_period: float, t_fast: float | None = None,
                steps: int = 5000, fast_steps: int = 2000, temp_c: float = 25.0,
                title: str = "pwmkit timing cross-check") -> str:
    """One netlist simulating timing networks side by side (prefixes ``n0_``, ``n1_`` …).

    ``t_period`` sizes the simulated time (2.3 periods) and, with ``t_fast`` (the shorter
    half-period), the step limit (:func:`step_limit`); every network's period should lie within
    about ±10 % of ``t_period``.
    """
    lines = [f"* {title}", f".options {OPTIONS} temp={fmt(temp_c)} tnom=25"]
    ics = []
    for k, t in enumerate(networks):
        p = f"n{k}_"
        lines += timing_block(t, p) + timer_block(t, p)
        ics.append(f"v({p}cap)={fmt(0.5 * control_estimate(t))}")
    lines.append(".ic " + " ".join(ics))
    tmax = step_limit(t_period, t_fast, steps, fast_steps)
    lines.append(f".tran {fmt(tmax)} {fmt(2.3 * t_period)} 0 {fmt(tmax)}")
    lines += [".control", "run"]
    for k in range(len(networks)):
        lines += timing_measures(f"n{k}_")
    lines += ["quit", ".endc", ".end", ""]
    return "\n".join(lines)


def read_timing(sim: Any, p: str) -> TimingSim:
    """The :class:`TimingSim` of network prefix ``p`` from a finished simulation."""
    f1, r1, f2 = (sim.get(f"{p}{k}") for k in ("f1", "r1", "f2"))
    period = f2 - f1
    t_low, t_high = r1 - f1, f2 - r1
    return TimingSim(t_high=t_high, t_low=t_low, period=period, frequency=1.0 / period, duty=t_high / period,
                     v_cap_max=sim.get(f"{p}vmax"), v_cap_min=sim.get(f"{p}vmin"))


def simulate_timing(networks: Sequence[TimingNetwork], *, t_period: float, t_fast: float | None = None,
                    steps: int = 5000, fast_steps: int = 2000, temp_c: float = 25.0,
                    timeout: float = 120.0) -> list[TimingSim]:
    """Simulate networks in one ngspice run; their measured timing, in order."""
    sim = run_ngspice(timing_deck(networks, t_period=t_period, t_fast=t_fast, steps=steps, fast_steps=fast_steps,
                                  temp_c=temp_c), timeout=timeout)
    return [read_timing(sim, f"n{k}_") for k in range(len(networks))]
