"""SPICE elements of the driver circuit, built from component values (model layer).

Each function returns netlist lines for one block of the circuit, with every node and element
name prefixed by ``p`` so that several independent circuits can share one netlist (the tests
batch many cases into one simulator run). Values come in SI units; nothing here reads a
computed result of pwmkit — the blocks are the wiring:

* :func:`timing_block` — the astable timing network as built (``ra`` into the discharge node,
  steering diodes, the two halves of the potentiometer, the end resistor), the timing
  capacitor and the control pin (internal divider, a source, or a resistor to ground);
* :func:`timer_block` — a behavioural timer: one hysteretic voltage-controlled switch at the
  discharge node that closes when the capacitor reaches the control-pin voltage and opens at
  half of it, a saturation voltage behind an on-resistance, and the output as a source that
  follows the switch state with the family's output levels and source/sink resistances;
* :func:`diode_model` — a Shockley diode (``IS``, ``N``, ``RS``, ``EG``, ``XTI``) from a diode
  family, or the ideal diode of a constant-drop equivalent (a smooth behavioural current
  source, 1 mΩ forward, in series with a source of the drop);
* :func:`mosfet_block` — the low-side MOSFET as a gate-voltage-controlled switch with its
  on-resistance, the gate charge as an RC (gate resistance into ``C_iss = Q_gs/V_plateau``);
* :func:`motor_block`, :func:`led_block`, :func:`freewheel_block` — a brushed motor (R, L, a
  back-EMF source), LED strings (one diode per LED plus the series resistor), the freewheel
  diode with an optional Zener clamp.

References
----------
.. [1] ngspice manual (version 39), ch. 3 (circuit elements: R, C, L, V, B, S, D), §3.2.14
   voltage-controlled switch (thresholds ``VT``, hysteresis ``VH``), ch. 7 (diode model),
   ch. 15 (``.meas``).
.. [2] L. W. Nagel, *SPICE2: A Computer Program to Simulate Semiconductor Circuits*,
   UCB/ERL M520, 1975 — the netlist syntax (SPICE3-compatible subset used here).
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Any

__all__ = ["fmt", "resistor", "diode_model", "timing_block", "timer_block", "mosfet_block", "motor_block",
           "led_block", "freewheel_block", "TimingNetwork", "IDEAL_DIODE_R", "IDEAL_DIODE_KNEE", "IDEAL_SWITCH_R",
           "OFF_R"]

#: The ideal diode of a constant-drop equivalent is a behavioural current source
#: ``i = (v + sqrt(v² + ε²))/(2·R)``: forward, a resistance ``R`` (this value [Ω]); reverse, a
#: leakage ``ε²/(4·R·|v|)`` (2.5 pA at 1 V). Smooth, so Newton's method converges where an
#: exponential diode with a tiny emission coefficient or a self-controlled switch stall the
#: time step at the switching edges.
IDEAL_DIODE_R = 1e-3
#: Knee width ε of that ideal diode [V].
IDEAL_DIODE_KNEE = 1e-7
#: On-resistance standing in for an ideal (0 Ω) switch [Ω].
IDEAL_SWITCH_R = 1e-3
#: Off-state resistance of the switches [Ω].
OFF_R = 1e12


def fmt(x: float) -> str:
    """A number in SPICE syntax, 12 significant digits (no unit suffixes: ``m`` would be milli)."""
    x = float(x)
    if not math.isfinite(x):
        raise ValueError(f"netlist: non-finite value {x!r}")
    return f"{x:.12g}"


def resistor(name: str, a: str, b: str, r: float) -> str:
    """A resistor, or a 0 V source (a short) when ``r`` is 0 (SPICE rejects 0 Ω)."""
    if r == 0:
        return f"V{name} {a} {b} DC 0"
    return f"R{name} {a} {b} {fmt(r)}"


def diode_model(name: str, family: Any = None) -> str:
    """``.model`` line of a Shockley diode from a family (a comment for the ideal diode, ``family=None``)."""
    if family is None:
        return f"* {name}: ideal diodes (behavioural, {fmt(IDEAL_DIODE_R)} ohm forward)"
    return (f".model {name} D(IS={fmt(family.i_s)} N={fmt(family.n)} RS={fmt(family.r_s)} "
            f"EG={fmt(family.eg)} XTI={fmt(family.xti)})")


def _diode(name: str, anode: str, cathode: str, model: str, vd: float | None) -> list[str]:
    """A Shockley diode (``vd`` None) or the constant-drop equivalent: ideal diode switch + source ``vd``."""
    if vd is None:
        return [f"D{name} {anode} {cathode} {model}"]
    mid = cathode if vd == 0 else f"{cathode}_{name}"
    v = f"v({anode},{mid})"
    ideal = f"B{name} {anode} {mid} I = ({v} + sqrt({v}*{v} + {fmt(IDEAL_DIODE_KNEE ** 2)}))/{fmt(2 * IDEAL_DIODE_R)}"
    return [ideal] if vd == 0 else [ideal, f"V{name} {mid} {cathode} DC {fmt(vd)}"]


@dataclass(frozen=True)
class TimingNetwork:
    """Component values of the timing network and the timer's discharge switch (inputs only).

    Attributes
    ----------
    topology : "classic", "bypass", "steered" or "pot"
    ra, rb, c, vcc : [Ω], [Ω], [F], [V]
    pot, wiper : potentiometer [Ω] and wiper position [1] ("pot" only)
    vsat, r_on : discharge switch saturation voltage [V] and on-resistance [Ω]
    vctl : control-pin source [V] (None: internal divider or ``r_cv``)
    r_cv : resistor from the control pin to ground [Ω] (None: none)
    r_divider : each of the three internal divider resistors [Ω] (0: ideal 2/3 reference)
    c_cv : control-pin bypass capacitor [F] (None: none)
    vd : constant steering-diode drop [V]; None with ``diode`` given (Shockley diodes)
    diode : steering-diode family (Shockley model) or None
    """

    topology: str
    ra: float
    rb: float
    c: float
    vcc: float
    pot: float = 0.0
    wiper: float = 0.0
    vsat: float = 0.0
    r_on: float = 0.0
    vctl: float | None = None
    r_cv: float | None = None
    r_divider: float = 0.0
    c_cv: float | None = None
    vd: float | None = 0.65
    diode: Any = None


def timing_block(t: TimingNetwork, p: str = "") -> list[str]:
    """Timing network, supply, capacitor and control pin; nodes ``{p}vcc {p}dis {p}cap {p}cv``."""
    vcc, dis, cap, cv = f"{p}vcc", f"{p}dis", f"{p}cap", f"{p}cv"
    dm = f"{p}DSTEER"
    vd = None if t.diode is not None else t.vd
    out = [f"V{p}cc {vcc} 0 DC {fmt(t.vcc)}", resistor(f"{p}a", vcc, dis, t.ra), f"C{p}t {cap} 0 {fmt(t.c)}"]
    if t.topology == "classic":
        out.append(resistor(f"{p}b", dis, cap, t.rb))
    elif t.topology == "bypass":
        out.append(resistor(f"{p}b", dis, cap, t.rb))
        out += _diode(f"{p}1", dis, cap, dm, vd)
    elif t.topology == "steered":
        k2 = dis if t.rb == 0 else f"{p}k2"  # a 0 Ω resistor is a wire
        out += _diode(f"{p}1", dis, cap, dm, vd)
        out += _diode(f"{p}2", cap, k2, dm, vd)
        if t.rb > 0:
            out.append(resistor(f"{p}b", k2, dis, t.rb))
    elif t.topology == "pot":
        # wiper at DIS; end A (wiper·pot from the wiper) feeds D1 to the capacitor; the capacitor
        # discharges through D2, the end resistor rb and end B ((1 − wiper)·pot) into the wiper.
        # A 0 Ω part (wiper at an end, rb = 0) is a wire: its two nodes are one.
        pa, pb = t.wiper * t.pot, (1.0 - t.wiper) * t.pot
        pota = f"{p}pota" if pa > 0 else dis
        potb = f"{p}potb" if pb > 0 else dis
        k2 = f"{p}k2" if t.rb > 0 else potb
        if pa > 0:
            out.append(resistor(f"{p}pa", dis, pota, pa))
        out += _diode(f"{p}1", pota, cap, dm, vd)
        out += _diode(f"{p}2", cap, k2, dm, vd)
        if t.rb > 0:
            out.append(resistor(f"{p}b", k2, potb, t.rb))
        if pb > 0:
            out.append(resistor(f"{p}pb", potb, dis, pb))
    else:
        raise ValueError(f"netlist: unknown topology {t.topology!r}")
    if t.topology != "classic":
        out.append(diode_model(dm, t.diode))
    # control pin
    if t.vctl is not None:
        out.append(f"V{p}ctl {cv} 0 DC {fmt(t.vctl)}")
    elif t.r_divider > 0:
        out += [f"R{p}dv1 {vcc} {cv} {fmt(t.r_divider)}", f"R{p}dv2 {cv} {p}cvl {fmt(t.r_divider)}",
                f"R{p}dv3 {p}cvl 0 {fmt(t.r_divider)}"]
        if t.r_cv is not None:
            out.append(f"R{p}cv {cv} 0 {fmt(t.r_cv)}")
    else:
        if t.r_cv is not None:
            raise ValueError("netlist: a control-pin resistor needs the timer's internal divider value")
        out.append(f"E{p}ref {cv} 0 {vcc} 0 {fmt(2.0 / 3.0)}")
    if t.c_cv is not None and t.vctl is None:
        out.append(f"C{p}cv {cv} 0 {fmt(t.c_cv)}")
    return out


def timer_block(t: TimingNetwork, p: str = "", *, output: tuple[float, float, float] | None = None) -> list[str]:
    """Behavioural timer: comparators + flip-flop as one hysteretic switch, discharge switch, output.

    The control voltage of both switches is ``v(cap)/v(cv)``: the switches close above 1 (upper
    threshold = control-pin voltage) and open below 1/2 (lower threshold = half of it). Node
    ``{p}st`` is 1 V while the output is high (capacitor charging) and 0 V while it is low.

    Parameters
    ----------
    t : the timing network (for vsat, r_on)
    p : name prefix
    output : (high level [V], source resistance [Ω], sink resistance [Ω]) of the output stage
        driving node ``{p}out``; None for no output stage
    """
    ron = t.r_on if t.r_on > 0 else IDEAL_SWITCH_R
    lines = [f"B{p}ratio {p}ratio 0 V = v({p}cap)/v({p}cv)",
             f".model {p}SWDIS sw(vt=0.75 vh=0.25 ron={fmt(ron)} roff={fmt(OFF_R)})",
             f".model {p}SWST sw(vt=0.75 vh=0.25 ron={fmt(IDEAL_SWITCH_R)} roff={fmt(OFF_R)})"]
    if t.vsat > 0:
        lines += [f"S{p}dis {p}dis {p}sat {p}ratio 0 {p}SWDIS OFF", f"V{p}sat {p}sat 0 DC {fmt(t.vsat)}"]
    else:
        lines.append(f"S{p}dis {p}dis 0 {p}ratio 0 {p}SWDIS OFF")
    lines += [f"V{p}one {p}one 0 DC 1", f"R{p}st {p}one {p}st 1e6", f"S{p}st {p}st 0 {p}ratio 0 {p}SWST OFF"]
    if output is not None:
        v_high, r_src, r_sink = output
        lines += [f"B{p}oh {p}oh 0 V = {fmt(v_high)}*v({p}st)",
                  f"B{p}ol {p}olc 0 V = 1 - v({p}st)",
                  f".model {p}SWO sw(vt=0.5 vh=0 ron={fmt(max(r_src, IDEAL_SWITCH_R))} roff={fmt(OFF_R)})",
                  f".model {p}SWK sw(vt=0.5 vh=0 ron={fmt(max(r_sink, IDEAL_SWITCH_R))} roff={fmt(OFF_R)})",
                  f"S{p}oh {p}oh {p}out {p}st 0 {p}SWO", f"S{p}ol {p}out 0 {p}olc 0 {p}SWK"]
    return lines


#: Half-width of the MOSFET switch's smooth transition around the plateau voltage [V].
FET_TRANSITION = 0.25


def mosfet_block(p: str, *, gate_in: str, drain: str, r_gate: float, c_iss: float, v_on: float,
                 rds_on: float, c_oss: float = 0.0) -> list[str]:
    """Low-side MOSFET: gate RC (``r_gate`` into ``c_iss``) and a switch with ``rds_on``.

    The channel goes from open (1 GΩ) to ``rds_on`` smoothly while the gate passes ``v_on ±``
    :data:`FET_TRANSITION` (ngspice switch with negative hysteresis); ``c_oss`` from drain to
    source. The Miller plateau itself is not modelled.
    """
    lines = [resistor(f"{p}g", gate_in, f"{p}gate", r_gate), f"C{p}iss {p}gate 0 {fmt(c_iss)}",
             f".model {p}SWFET sw(vt={fmt(v_on)} vh={fmt(-FET_TRANSITION)} ron={fmt(max(rds_on, IDEAL_SWITCH_R))} "
             "roff=1e9)",
             f"S{p}fet {drain} 0 {p}gate 0 {p}SWFET"]
    if c_oss > 0:
        lines.append(f"C{p}oss {drain} 0 {fmt(c_oss)}")
    return lines


def motor_block(p: str, *, supply: str, drain: str, r: float, l: float, e: float,  # noqa: E741
                i0: float = 0.0) -> list[str]:
    """Brushed motor from ``supply`` to ``drain``: R, L (initial current ``i0``) and back-EMF ``e``.

    The current is measured by the 0 V source ``V{p}sense`` (positive from supply to drain).
    """
    return [f"V{p}sense {supply} {p}m1 DC 0", resistor(f"{p}m", f"{p}m1", f"{p}m2", r),
            f"L{p}m {p}m2 {p}m3 {fmt(l)} IC={fmt(i0)}", f"V{p}emf {p}m3 {drain} DC {fmt(e)}"]


def led_block(p: str, *, supply: str, drain: str, n_series: int, n_parallel: int, vf: float,
              r_series: float) -> list[str]:
    """LED strings from ``supply`` to ``drain``: series resistor and ``n_series`` LEDs per string.

    Each LED is a constant-drop equivalent (ideal diode in series with ``vf``); string ``k``'s
    current is measured by ``V{p}s{k}``.
    """
    lines = [diode_model(f"{p}DLED")]
    for k in range(n_parallel):
        node = f"{p}s{k}_0"
        lines += [f"V{p}s{k} {supply} {p}s{k}_r DC 0", resistor(f"{p}s{k}", f"{p}s{k}_r", node, r_series)]
        for j in range(n_series):
            nxt = drain if j == n_series - 1 else f"{p}s{k}_{j + 1}"
            lines += _diode(f"{p}led{k}_{j}", node, nxt, f"{p}DLED", vf)
            node = nxt
    return lines


def freewheel_block(p: str, *, drain: str, supply: str, family: Any = None, vf: float | None = None,
                    v_zener: float | None = None) -> list[str]:
    """Freewheel diode from ``drain`` (anode) to ``supply``, optionally in series with a Zener clamp.

    ``family`` gives a Shockley diode; ``vf`` instead gives its constant-drop equivalent. The
    Zener is an ideal breakdown at ``v_zener`` (an ideal diode in series with a source).
    """
    lines = [diode_model(f"{p}DFW", family)]
    top = supply if v_zener is None else f"{p}fwz"
    lines += _diode(f"{p}fw", drain, top, f"{p}DFW", None if family is not None else vf)
    if v_zener is not None:
        lines += [diode_model(f"{p}DZ")]
        lines += _diode(f"{p}z", top, supply, f"{p}DZ", v_zener)
    return lines
