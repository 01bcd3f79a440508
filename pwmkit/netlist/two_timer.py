"""SPICE netlist of the two-timer fixed-frequency PWM and its heater load (design layer).

The circuit as built from the design's input values: the clock is a classic astable (``ra``,
``rb``, ``c``, the same blocks as the astable netlists); its output state pulls the monostable's
trigger low once per period. The monostable charges ``c_mono`` through ``r_mono`` from the
supply; a set/reset latch (a behavioural source into 1 pF, settling in 1 ns) sets the PWM output
while the trigger is low and resets it when the capacitor reaches the control-pin voltage (the
trigger overrides, common practice for 555-type timers); while the output is low the discharge
switch holds the capacitor at its rest level. The control pin is the design's: a stiff source at
the nominal control voltage, a source behind ``r_ctl_source`` against the internal divider, or
the thermistor divider (``vcc — r_set — NTC — 0 V``, β model) of a heater loop.

Computed values in the netlist (stated in its header, as the motor's back-EMF is): the
thermistor's temperature and the heater element's temperature — both the closed-loop steady
state pwmkit solves for (the thermal time constants are minutes, far beyond a switching-period
simulation). The β law and the element's temperature coefficient are written into the netlist
as expressions of the design's own values.

References
----------
.. [1] ngspice manual (version 39): ch. 3 (R with ``{expression}``, B sources with ``? :``),
   ch. 11 (``.tran``, ``.ic``), ch. 15 (``meas``).
.. [2] Data sheets of the bipolar and CMOS 555-type timer families, monostable operation and the
   pulse-width-modulation application (typical published datasheet values, generic).
"""

from __future__ import annotations

import math
from typing import Any

from ..errors import DesignError
from .elements import (
    IDEAL_SWITCH_R,
    OFF_R,
    TimingNetwork,
    fmt,
    mosfet_block,
    resistor,
    timer_block,
    timing_block,
)

__all__ = ["two_timer_deck", "clock_network", "monostable_block", "output_block", "LATCH_C", "LATCH_G"]

#: Latch node capacitance [F] and the conductance driving it [S]: a 1 ns settling time.
LATCH_C = 1e-12
LATCH_G = 1e-3
#: Kelvin offset of the β law [K].
KELVIN = 273.15


def clock_network(design: Any) -> TimingNetwork:
    """The clock astable of a two-timer design as a classic timing network (its own values)."""
    from ..parts.timers import get_timer

    t = design.timing
    fam = get_timer(t.timer)
    return TimingNetwork(topology="classic", ra=t.ra, rb=t.rb, c=t.c, vcc=design.vcc,
                         vsat=fam.vsat if t.vsat is None else t.vsat,
                         r_on=fam.r_discharge_on if t.r_on is None else t.r_on,
                         r_divider=fam.r_cv_divider, c_cv=t.cv_bypass, vd=None, diode=None)


def _discharge(design: Any) -> tuple[float, float]:
    """(rest level source [V], switch resistance [Ω]) of the monostable's discharge switch."""
    from ..parts.timers import get_timer
    from ..timing.monostable import discharge_resistance

    t = design.timing
    fam = get_timer(t.timer)
    if t.vsat is not None:
        return float(t.vsat), max(float(discharge_resistance(fam)), IDEAL_SWITCH_R)
    if fam.r_discharge_on > 0:  # CMOS: the switch to ground, R_M and r_on divide the supply
        return 0.0, float(fam.r_discharge_on)
    return float(fam.vsat), float(discharge_resistance(fam))  # bipolar: vsat behind vsat/I_test


def monostable_block(design: Any, *, t_sensor_c: float | None, trigger_state: str = "st") -> tuple[list[str], list[str]]:
    """Monostable lines (nodes ``mcap``, ``mcv``, PWM state ``pwm``) and header notes.

    ``t_sensor_c``: the thermistor's temperature for a heater loop (None: the design's control
    source at its nominal voltage). ``trigger_state``: the clock's state node (1 V while its
    output is high; the trigger is low while it is 0).
    """
    from ..parts.timers import get_timer

    t = design.timing
    fam = get_timer(t.timer)
    v_rest, r_dis = _discharge(design)
    lines = [resistor("mono", "vcc", "mcap", t.r_mono), f"Cmono mcap 0 {fmt(t.c_mono)}"]
    notes: list[str] = []
    rs = 0.0 if t.r_ctl_source is None else float(t.r_ctl_source)
    loop = t_sensor_c is not None
    if loop or rs > 0:
        if fam.r_cv_divider <= 0:
            raise DesignError(f"timing.timer: the {fam.description} has no known internal divider value, so a "
                              "control source with a resistance (or a thermistor divider) cannot be simulated; use "
                              "the bipolar family or a stiff control source")
        r = fam.r_cv_divider
        lines += [f"Rmdv1 vcc mcv {fmt(r)}", f"Rmdv2 mcv mcvl {fmt(r)}", f"Rmdv3 mcvl 0 {fmt(r)}"]
        notes.append(f"monostable control pin: internal divider 3 x {fmt(r)} ohm")
    src = "mcv" if rs == 0 else "msrc"
    if loop:
        h = design.load
        lines += [f"Rset vcc {src} {fmt(h.r_set)}",
                  f"Rntc {src} 0 {{{fmt(h.ntc_r25)}*exp({fmt(h.ntc_beta)}*(1/({fmt(t_sensor_c)}+{KELVIN:g})"
                  f"-1/({25.0 + KELVIN:g})))}}"]
        notes.append(f"thermistor divider: vcc - r_set {fmt(h.r_set)} ohm - NTC (beta model, R25 {fmt(h.ntc_r25)} "
                     f"ohm, beta {fmt(h.ntc_beta)} K) - 0 V; NTC at {fmt(t_sensor_c)} C, the closed-loop steady "
                     "temperature pwmkit solves for (held constant over the simulated time)")
    else:
        lines.append(f"Vmctl {src} 0 DC {fmt(t.vctl_nominal)}")
        notes.append(f"control source: {fmt(t.vctl_nominal)} V (the design's nominal control voltage)"
                     + (" behind r_ctl_source" if rs > 0 else ", stiff"))
    if rs > 0:
        lines.append(f"Rmsrc msrc mcv {fmt(rs)}")
    trig = f"v({trigger_state}) < 0.5"
    lines += [f"Bpwm pwm 0 I = -((({trig}) ? 1 : ((v(mcap) > v(mcv)) ? 0 : ((v(pwm) > 0.5) ? 1 : 0))) - v(pwm))"
              f"*{fmt(LATCH_G)}",
              f"Cpwm pwm 0 {fmt(LATCH_C)}",
              f"Bmdis mcap 0 I = ((v(pwm) < 0.5) ? 1 : 0)*(v(mcap) - {fmt(v_rest)})/{fmt(r_dis)}"]
    notes.append("monostable: set/reset latch (behavioural source into 1 pF, 1 ns): set while the clock output is "
                 "low (trigger overrides), reset when v(mcap) reaches v(mcv); discharge switch "
                 f"{fmt(r_dis)} ohm to {fmt(v_rest)} V while the output is low")
    return lines, notes


def output_block(state: str, *, v_high: float, r_src: float, r_sink: float) -> list[str]:
    """Timer output stage driving node ``out`` from a 0/1 V state node (as :func:`timer_block`'s)."""
    return [f"Boh oh 0 V = {fmt(v_high)}*v({state})",
            f"Bol olc 0 V = 1 - v({state})",
            f".model SWO sw(vt=0.5 vh=0 ron={fmt(max(r_src, IDEAL_SWITCH_R))} roff={fmt(OFF_R)})",
            f".model SWK sw(vt=0.5 vh=0 ron={fmt(max(r_sink, IDEAL_SWITCH_R))} roff={fmt(OFF_R)})",
            f"Soh oh out {state} 0 SWO", "Sol out 0 olc 0 SWK"]


def two_timer_deck(design: Any, what: str) -> Any:
    """The two-timer design's netlist (see :func:`pwmkit.netlist.netlist`) as a :class:`~pwmkit.netlist.build.Deck`."""
    from .. import __version__
    from ..timing import astable
    from ..two_timer_design import operating_point, two_timer_at_pin
    from .build import Deck
    from .simulate import DRIVER_OPTIONS, OPTIONS, control_estimate

    load = design.load if what == "driver" else None
    if what == "driver" and load is None:
        raise DesignError("what: 'driver' needs a load (LED strings, a motor or a heater); this design has none")
    if load is not None and load.kind != "heater":
        raise DesignError(f"load.kind: {load.kind!r} has no two-timer driver netlist yet; the two-timer driver "
                          "netlist supports 'heater' (what='timing' simulates the timers only)")
    v_pin, _v_source, loop = operating_point(design)
    t_sensor = float(loop.t_element_c) if loop is not None else None
    net = clock_network(design)
    clock = astable("classic", **design.timing.astable_kwargs(design.vcc))  # sizes time and step only
    pwm = two_timer_at_pin(design, design.vcc, v_pin)
    period = float(clock.period)
    t_short = min(float(clock.t_low), float(pwm.t_high), period - float(pwm.t_high))
    lines = timing_block(net) + timer_block(net)
    mono, notes = monostable_block(design, t_sensor_c=t_sensor)
    lines += mono
    temp_c = float(design.t_ambient_c)
    if load is not None:
        from ..evaluate import evaluate
        from ..parts.mosfets import get_mosfet
        from ..parts.timers import get_timer

        fam = get_timer(design.timing.timer)
        fet = get_mosfet(design.switch.mosfet)
        v_high = float(fam.output_high(design.vcc))
        r_src = float(fam.output_source_resistance(design.vcc))
        lines += output_block("pwm", v_high=v_high, r_src=r_src, r_sink=fam.r_out_low)
        rds = float(fet.rds_on_at(max(v_high, fet.v_plateau + 1e-3), 25.0)) if v_high > fet.v_plateau else fet.rds_on
        lines += [f"Vload vload 0 DC {fmt(design.load_supply)}"]
        lines += mosfet_block("q", gate_in="out", drain="drain", r_gate=design.switch.r_gate + fet.r_g_int,
                              c_iss=fet.c_iss, v_on=fet.v_plateau, rds_on=rds, c_oss=fet.c_oss)
        ev = evaluate(design, spread=False, diode_law=False)
        if ev.heater is None:
            raise DesignError("design: the heater element could not be evaluated")
        t_el = float(ev.heater.element.t_element_c)
        lines += ["Vheat vload h1 DC 0",
                  f"Rheat h1 drain {{{fmt(load.r_cold)}*(1+{fmt(load.alpha)}*({fmt(t_el)}-{fmt(load.t_ref_c)}))}}"]
        notes += [f"MOSFET {fet.name}: switch closing smoothly around the plateau {fmt(fet.v_plateau)} V to R_DS(on) "
                  f"{fmt(rds)} ohm (25 C, at the gate drive); gate charge as r_gate + R_G,int into "
                  f"C_iss = Q_gs/V_plateau = {fmt(fet.c_iss)} F; C_oss {fmt(fet.c_oss)} F drain to source",
                  f"timer output (monostable): high {fmt(v_high)} V behind {fmt(r_src)} ohm, low behind "
                  f"{fmt(fam.r_out_low)} ohm",
                  f"heater: resistive, r_cold {fmt(load.r_cold)} ohm x (1 + alpha {fmt(load.alpha)}/K x (T - "
                  f"{fmt(load.t_ref_c)} C)) at the element temperature T = {fmt(t_el)} C pwmkit solves for (held "
                  "constant: the thermal time constant is minutes); lead inductance not modelled, no freewheel "
                  "diode needed"]
    tmax = min(period / 4000.0, t_short / 400.0)
    t_from = period
    t_stop = t_from + 2.3 * period
    head = [f"* pwmkit netlist of design {design.name!r} ({what}) - pwmkit {__version__}",
            "* Circuit built from the design's input values and wiring; model assumptions:",
            "*  - two-timer PWM: classic astable clock (ra, rb, c) triggering a monostable (r_mono, c_mono) whose "
            "threshold the control pin sets",
            "*  - clock timer: behavioural; one hysteretic switch (closes at v(cap) = v(cv), opens at v(cv)/2)",
            f"*    drives the discharge pin (vsat {fmt(net.vsat)} V, on-resistance {fmt(net.r_on)} ohm) and the clock "
            "state node st; internal divider" + ("" if net.r_divider > 0 else " as an ideal 2/3 reference"),
            "*    comparator delays, bias currents and supply current are not modelled"]
    head += [f"*  - {x}" for x in notes]
    head += ["* SI units throughout (no SPICE scale suffixes). Run: ngspice -b FILE.cir",
             f"* simulated time {fmt(t_stop)} s, step limit {fmt(tmax)} s (from pwmkit's clock period "
             f"{fmt(period)} s); measured on the first full PWM cycle after {fmt(t_from)} s"]
    v_rest, _r = _discharge(design)
    options = DRIVER_OPTIONS if what == "driver" else OPTIONS
    body = [f".options {options} temp={fmt(temp_c)} tnom=25",
            f".ic v(cap)={fmt(0.5 * control_estimate(net))} v(mcap)={fmt(v_rest)} v(pwm)=0",
            f".tran {fmt(tmax)} {fmt(t_stop)} 0 {fmt(tmax)}"]
    meas = [f"meas tran f1 WHEN v(pwm)=0.5 FALL=1 TD={fmt(t_from)}",
            "meas tran r1 WHEN v(pwm)=0.5 RISE=1 TD=$&f1",
            "meas tran f2 WHEN v(pwm)=0.5 FALL=1 TD=$&r1",
            "meas tran vmono_max MAX v(mcap) FROM=$&f1 TO=$&f2",
            "meas tran vcv_avg AVG v(mcv) FROM=$&f1 TO=$&f2"]
    names = ["f1", "r1", "f2", "vmono_max", "vcv_avg"]
    if load is not None:
        meas += ["meas tran iheat_avg AVG i(Vheat) FROM=$&f1 TO=$&f2",
                 "meas tran iheat_max MAX i(Vheat) FROM=$&f1 TO=$&f2"]
        names += ["iheat_avg", "iheat_max"]
    if not math.isfinite(t_stop):
        raise DesignError("design: the clock period is not finite")
    text = "\n".join(head + lines + body + [".control", "run"] + meas + ["quit", ".endc", ".end", ""])
    return Deck(text=text, what=what, measures=tuple(names), t_stop=t_stop, t_step=tmax,
                load=None if load is None else load.kind)
