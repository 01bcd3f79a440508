"""SPICE netlist of a design (design layer): the timing network, the timer, the output stage, the load.

:func:`netlist` writes a SPICE3-compatible netlist that ngspice runs as it stands
(``ngspice -b FILE.cir``): a header comment (design name, pwmkit version, model assumptions),
the circuit built from the design's input values and wiring, a transient analysis and a
``.control`` block whose ``meas`` commands print the figures :func:`pwmkit.netlist.verify`
compares. Only the simulated time and the step limit are sized from pwmkit's period estimate
and the load's time constant; no computed figure enters the circuit — except the motor's
back-EMF, a source at the steady speed pwmkit solves for (the mechanical time constant is
seconds, far beyond a switching-period simulation), stated in the header.

References
----------
.. [1] ngspice manual (version 39): ch. 3 circuit elements, ch. 11 ``.tran``/``.options``,
   ch. 13 ``.control`` scripts, ch. 15 ``meas``.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Any, Literal

from ..errors import DesignError
from .elements import (
    TimingNetwork,
    fmt,
    freewheel_block,
    led_block,
    mosfet_block,
    motor_block,
    timer_block,
    timing_block,
)
from .simulate import DRIVER_OPTIONS, OPTIONS, control_estimate, step_limit

__all__ = ["netlist", "timing_network", "Deck", "deck"]

What = Literal["timing", "driver"]

#: Electrical time constants of an inductive load simulated before the measured cycle.
SETTLE_TAUS = 8.0


def timing_network(design: Any) -> TimingNetwork:
    """The design's timing network as built: its own values, the timer family's switch data.

    Steering diodes are Shockley diodes of the design's diode family; a fixed ``vd`` in the design
    makes them constant-drop equivalents of that drop instead.
    """
    from ..parts.diodes import get_diode
    from ..parts.timers import get_timer

    t = design.timing
    fam = get_timer(t.timer)
    if t.r_cv is not None and fam.r_cv_divider <= 0:
        raise DesignError(f"timing.r_cv: the {fam.description} has no known internal divider value, so the "
                          "control pin with a resistor cannot be simulated; give vctl instead")
    return TimingNetwork(
        topology=t.topology, ra=t.ra, rb=t.rb, c=t.c, vcc=design.vcc,
        pot=t.pot if t.topology == "pot" else 0.0, wiper=t.wiper if t.topology == "pot" else 0.0,
        vsat=fam.vsat if t.vsat is None else t.vsat, r_on=fam.r_discharge_on if t.r_on is None else t.r_on,
        vctl=t.vctl, r_cv=t.r_cv, r_divider=fam.r_cv_divider, c_cv=t.cv_bypass,
        vd=t.vd if t.vd is not None else None, diode=None if t.vd is not None else get_diode(t.diode),
    )


@dataclass(frozen=True)
class Deck:
    """A runnable netlist and what it measures.

    Attributes
    ----------
    text : the netlist
    what : "timing" or "driver"
    measures : names of the ``meas`` results it prints
    t_stop, t_step : simulated time and step limit [s]
    load : "led", "motor" or None
    """

    text: str
    what: str
    measures: tuple[str, ...]
    t_stop: float
    t_step: float
    load: str | None


def _header(design: Any, what: str, net: TimingNetwork, extra: list[str]) -> list[str]:
    from .. import __version__

    lines = [f"* pwmkit netlist of design {design.name!r} ({what}) - pwmkit {__version__}",
             "* Circuit built from the design's input values and wiring; model assumptions:",
             "*  - timer: behavioural; one hysteretic switch (closes at v(cap) = v(cv), opens at v(cv)/2)",
             "*    drives the discharge pin (saturation voltage behind on-resistance) and the state node st;",
             "*    comparator delays, bias currents and supply current are not modelled",
             f"*  - discharge switch: vsat {fmt(net.vsat)} V, on-resistance {fmt(net.r_on)} ohm",
             "*  - control pin: " + ("source" if net.vctl is not None else
                                      "internal divider" + (" with a resistor to ground" if net.r_cv is not None
                                                            else "") if net.r_divider > 0 else
                                      "ideal 2/3 reference (divider value not published)"),
             "*  - steering diodes: " + (f"constant-drop equivalents of {fmt(net.vd)} V (ideal diode + source)"
                                         if net.diode is None else
                                         f"Shockley model of the {net.diode.name} family (IS, N, RS, EG, XTI)")]
    lines += [f"*  - {x}" for x in extra]
    lines.append("* SI units throughout (no SPICE scale suffixes). Run: ngspice -b FILE.cir")
    return lines


def deck(design: Any, *, what: What = "timing", steps: int = 2000, fast_steps: int = 1000) -> Deck:
    """Build the netlist of a design and the list of its measurements (see :func:`netlist`)."""
    from ..design import Design

    if not isinstance(design, Design):
        raise DesignError(f"design: expected a pwmkit.design.Design, got {type(design).__name__}")
    if what not in ("timing", "driver"):
        raise DesignError(f"what: {what!r} is not allowed; allowed: 'timing', 'driver'")
    net = timing_network(design)
    timing = design.astable()  # sizes the simulated time and the step limit only
    period, t_fast = float(timing.period), float(min(timing.t_high, timing.t_low))
    lines = timing_block(net)
    extra: list[str] = []
    load = design.load if what == "driver" else None
    if what == "driver" and load is None:
        raise DesignError("what: 'driver' needs a load (LED strings or a motor); this design has none")
    settle = 0.0
    temp_c = float(design.t_ambient_c)
    if what == "driver":
        from ..parts.mosfets import get_mosfet
        from ..parts.timers import get_timer

        fam = get_timer(design.timing.timer)
        fet = get_mosfet(design.switch.mosfet)
        v_high = float(fam.output_high(design.vcc))
        lines += timer_block(net, output=(v_high, float(fam.output_source_resistance(design.vcc)), fam.r_out_low))
        rds = float(fet.rds_on_at(max(v_high, fet.v_plateau + 1e-3), 25.0)) if v_high > fet.v_plateau else fet.rds_on
        lines += [f"Vload vload 0 DC {fmt(design.load_supply)}"]
        lines += mosfet_block("q", gate_in="out", drain="drain", r_gate=design.switch.r_gate + fet.r_g_int,
                              c_iss=fet.c_iss, v_on=fet.v_plateau, rds_on=rds, c_oss=fet.c_oss)
        extra += [f"MOSFET {fet.name}: switch closing smoothly around the plateau {fmt(fet.v_plateau)} V to R_DS(on) "
                  f"{fmt(rds)} ohm (25 C, at the gate drive); gate charge as r_gate + R_G,int into "
                  f"C_iss = Q_gs/V_plateau = {fmt(fet.c_iss)} F; C_oss {fmt(fet.c_oss)} F drain to source",
                  f"timer output: high {fmt(v_high)} V behind {fmt(float(fam.output_source_resistance(design.vcc)))}"
                  f" ohm, low behind {fmt(fam.r_out_low)} ohm"]
        if load.kind == "led":
            lines += led_block("", supply="vload", drain="drain", n_series=load.n_series, n_parallel=load.n_parallel,
                               vf=load.vf, r_series=load.r_series)
            extra.append(f"LEDs: constant-drop equivalents of vf {fmt(load.vf)} V each (nominal forward voltage)")
        else:
            from ..parts.diodes import get_diode

            e = _back_emf(design)
            r, l = load.r, load.l  # noqa: E741
            duty = float(timing.duty)
            i0 = max((duty * design.load_supply - e) / r, 0.0)  # plain average-voltage starting guess
            lines += motor_block("", supply="vload", drain="drain", r=r, l=l, e=e, i0=i0)
            fw = design.freewheel
            lines += freewheel_block("", drain="drain", supply="vload", family=get_diode(fw.diode),
                                     v_zener=fw.v_zener if fw.clamp == "zener" else None)
            settle = SETTLE_TAUS * l / r
            extra += [f"motor: R {fmt(r)} ohm, L {fmt(l)} H, back-EMF source {fmt(e)} V (ke x the steady speed "
                      "pwmkit solves for; the speed is held constant over the simulated time)",
                      f"freewheel diode: Shockley model of the {fw.diode} family"
                      + (f" in series with an ideal {fmt(fw.v_zener)} V Zener" if fw.clamp == "zener" else ""),
                      f"inductor starts at (D*V - E)/R = {fmt(i0)} A and settles for {SETTLE_TAUS:g} L/R"]
    else:
        lines += timer_block(net)
    tmax = step_limit(period, t_fast, steps, fast_steps)
    n_skip = math.ceil(settle / period) if settle > 0 else 0
    t_from = n_skip * period
    t_stop = t_from + 2.3 * period
    head = _header(design, what, net, extra)
    head.append(f"* simulated time {fmt(t_stop)} s, step limit {fmt(tmax)} s (from pwmkit's period "
                f"{fmt(period)} s); measured on the first full cycle after {fmt(t_from)} s")
    options = DRIVER_OPTIONS if what == "driver" else OPTIONS
    if load is not None and load.kind == "led":  # trapezoidal ringing at the resistive switch edges
        options += " method=gear"
    body = [f".options {options} temp={fmt(temp_c)} tnom=25",
            f".ic v(cap)={fmt(0.5 * control_estimate(net))}",
            f".tran {fmt(tmax)} {fmt(t_stop)} 0 {fmt(tmax)}"]
    td = f" TD={fmt(t_from)}" if t_from > 0 else ""
    meas = [f"meas tran f1 WHEN v(st)=0.5 FALL=1{td}",
            "meas tran r1 WHEN v(st)=0.5 RISE=1 TD=$&f1",
            "meas tran f2 WHEN v(st)=0.5 FALL=1 TD=$&r1",
            "meas tran vcap_max MAX v(cap) FROM=$&f1 TO=$&f2",
            "meas tran vcap_min MIN v(cap) FROM=$&f1 TO=$&f2"]
    names = ["f1", "r1", "f2", "vcap_max", "vcap_min"]
    if load is not None:
        if load.kind == "led":
            for k in range(load.n_parallel):
                meas += [f"meas tran iled{k}_avg AVG i(Vs{k}) FROM=$&f1 TO=$&f2",
                         f"meas tran iled{k}_max MAX i(Vs{k}) FROM=$&f1 TO=$&f2"]
                names += [f"iled{k}_avg", f"iled{k}_max"]
        else:
            meas += ["meas tran vdrain_max MAX v(drain) FROM=$&f1 TO=$&f2",
                     "meas tran imot_avg AVG i(Vsense) FROM=$&f1 TO=$&f2",
                     "meas tran imot_max MAX i(Vsense) FROM=$&f1 TO=$&f2",
                     "meas tran imot_min MIN i(Vsense) FROM=$&f1 TO=$&f2"]
            names += ["vdrain_max", "imot_avg", "imot_max", "imot_min"]
    text = "\n".join(head + lines + body + [".control", "run"] + meas + ["quit", ".endc", ".end", ""])
    return Deck(text=text, what=what, measures=tuple(names), t_stop=t_stop, t_step=tmax,
                load=None if load is None else load.kind)


def _back_emf(design: Any) -> float:
    """Back-EMF at the steady speed pwmkit solves for (the one computed value in a driver netlist) [V]."""
    from ..evaluate import evaluate

    ev = evaluate(design, spread=False, diode_law=False)
    if ev.motor_speed is None:
        raise DesignError(f"design: no motor operating point ({ev.conditions.gate_error or 'gate drive missing'})")
    return float(ev.motor_speed.e)


def netlist(design: Any, *, what: What = "timing") -> str:
    """SPICE3-compatible netlist of a design, built from its input values and wiring.

    Parameters
    ----------
    design : pwmkit.design.Design
    what : {"timing", "driver"}
        ``"timing"``: the timing network, the control pin and the behavioural timer;
        ``"driver"``: also the timer output, gate resistor and MOSFET, and the load (LED strings,
        or the motor with its freewheel diode and optional Zener clamp).

    Returns
    -------
    str
        The netlist, runnable with ``ngspice -b``; its ``meas`` commands print the edge times
        (``f1``, ``r1``, ``f2``), the capacitor extremes and, for a driver, the load currents and
        the peak drain voltage.

    Raises
    ------
    DesignError
        Not a design, an unknown ``what``, a driver netlist without a load, or a design that does
        not oscillate (the period sizes the simulated time).

    Examples
    --------
    >>> from pwmkit.design import demo_designs
    >>> text = netlist(demo_designs()["fan"])
    >>> text.splitlines()[0]
    "* pwmkit netlist of design 'fan' (timing) - pwmkit 0.1.0"
    >>> "Ra vcc dis 1000" in text
    True
    """
    return deck(design, what=what).text
