"""Schematic of the two-timer fixed-frequency PWM (presentation layer).

U1 is a classic astable clock (R1 = ``ra``, R2 = ``rb``, C1 = ``c``, C2 on its control pin); its
output is the net ``CLK``, which drives the trigger of U2, a monostable (R3 = ``r_mono`` from the
supply to THR/DIS, C4 = ``c_mono``). U2's control pin takes the control voltage: an NTC thermistor
divider (R5 = set resistor on top, TH1 below) for a heater with a thermistor loop, else a source
V1 (with its source resistance R6 when given). U2's output drives the low-side MOSFET through R4
(``r_gate``); a heater element RH1 with an optional thermal cut-out F1 hangs from the supply.

Nets are joined by name where a wire would cross another (``CLK``, and ``VCC`` at the divider):
an open circle with the net name. Symbols as :mod:`pwmkit.schematic` (IEC 60617 style).
"""

from __future__ import annotations

from typing import Any

from ..errors import DesignError
from ..values import format_value
from .parts import PartLabel, Schematic
from .style import resolve_style

__all__ = ["for_two_timer"]

_TOP = 11.0
_PIN_DIS, _PIN_THR, _PIN_TRIG, _PIN_OUT, _PIN_CV = 6.0, 4.2, 3.0, 6.0, 3.6
_BOX_Y0, _BOX_Y1, _BOX_W = 2.0, 7.4, 4.6


def for_two_timer(design: Any, *, annotate: bool = True, timing: Any = None, style: Any = None) -> Schematic:
    """Draw a two-timer design with its own part values (see the module docstring).

    Parameters
    ----------
    design : pwmkit.design.Design with ``timing.topology == "two-timer"``
    annotate : write the computed frequency, pulse and duty in a footer
    timing : the design's output timing (AstableResult) if already computed
    style : a :class:`~pwmkit.schematic.style.SchematicStyle` or a dict of its fields
    """
    t = design.timing
    if t.topology != "two-timer":
        raise DesignError(f"design: for_two_timer draws the 'two-timer' topology, not {t.topology!r}")
    st = resolve_style(style)
    import schemdraw.elements as elm

    from . import _sheet

    parts: list[PartLabel] = []

    def record(ref: str, kind: str, value: str, role: str, nodes: tuple[str, ...], label: str | None = None) -> None:
        parts.append(PartLabel(ref, kind, value, label or f"{ref} {value}", role, nodes))  # type: ignore[arg-type]

    fv = format_value
    with _sheet.Paused():
        sh = _sheet.Sheet(st)
        small = st.font_size * 0.85

        def label(x: float, y: float, text: str, side: str = "right") -> None:
            sh.text((x + 0.45, y) if side == "right" else (x - 0.45, y), text, halign="left" if side == "right" else "right")

        def net(p: tuple[float, float], name: str, side: str = "left") -> None:
            sh.dot(p, open_=True)
            sh.text((p[0] + (0.25 if side == "right" else -0.25), p[1] + 0.3), name,
                    halign="left" if side == "right" else "right", valign="bottom")

        def timer_box(x0: float, ref: str, role: str, pins_left: tuple[tuple[str, str, float], ...]) -> None:
            sh.add(elm.Rect(corner1=(x0, _BOX_Y0), corner2=(x0 + _BOX_W, _BOX_Y1), fill=st.box_fill).theta(0).at((0, 0)))
            sh.text((x0 + _BOX_W / 2, (_BOX_Y0 + _BOX_Y1) / 2 + 0.5), f"{ref}\n555-type\n{role}", halign="center")
            for name, num, y in pins_left:
                sh.wire((x0 - 1.0, y), (x0, y))
                sh.text((x0 + 0.15, y), name, halign="left", color=st.muted, size=small)
                sh.text((x0 - 0.12, y + 0.08), num, halign="right", valign="bottom", color=st.muted, size=small)
            for name, num, y in (("OUT", "3", _PIN_OUT), ("CV", "5", _PIN_CV)):
                sh.wire((x0 + _BOX_W, y), (x0 + _BOX_W + 1.0, y))
                sh.text((x0 + _BOX_W - 0.15, y), name, halign="right", color=st.muted, size=small)
                sh.text((x0 + _BOX_W + 0.12, y + 0.08), num, halign="left", valign="bottom", color=st.muted, size=small)
            for x in (x0 + 1.1, x0 + _BOX_W - 1.1):
                sh.wire((x, _BOX_Y1), (x, _TOP))
                sh.dot((x, _TOP))
            sh.wire((x0 + _BOX_W / 2, _BOX_Y0), (x0 + _BOX_W / 2, 0.0))
            sh.dot((x0 + _BOX_W / 2, 0.0))
            record(ref, "timer", "555-type", role, ("VCC", "GND", "DIS", "THR", "CV", "OUT"), label=f"{ref} 555-type {role}")

        pins = (("DIS", "7", _PIN_DIS), ("THR", "6", _PIN_THR), ("TRIG", "2", _PIN_TRIG))
        # -- clock U1 ----------------------------------------------------------------------
        sh.two(elm.ResistorIEC(), (0.0, _TOP), (0.0, _PIN_DIS))
        label(0.0, 8.5, f"R1\n{fv(t.ra, 'Ω')}")
        record("R1", "resistor", fv(t.ra, "Ω"), "ra", ("VCC", "DIS1"))
        sh.two(elm.ResistorIEC(), (0.0, _PIN_DIS), (0.0, _PIN_TRIG))
        label(0.0, 4.5, f"R2\n{fv(t.rb, 'Ω')}")
        record("R2", "resistor", fv(t.rb, "Ω"), "rb", ("DIS1", "THR1"))
        sh.two(elm.Capacitor(), (0.0, _PIN_TRIG), (0.0, 0.0))
        label(0.0, 1.5, f"C1\n{fv(t.c, 'F')}")
        record("C1", "capacitor", fv(t.c, "F"), "c", ("THR1", "GND"))
        for p in ((0.0, _TOP), (0.0, 0.0), (0.0, _PIN_DIS), (0.0, _PIN_TRIG)):
            sh.dot(p)
        x0 = 3.6
        sh.wire((0.0, _PIN_DIS), (x0 - 1.0, _PIN_DIS))
        sh.wire((0.0, _PIN_TRIG), (x0 - 1.0, _PIN_TRIG), (x0 - 1.0, _PIN_THR))
        timer_box(x0, "U1", "clock", pins)
        x_cv = x0 + _BOX_W + 1.0
        if t.cv_bypass is not None:
            sh.wire((x_cv, _PIN_CV), (x_cv + 0.6, _PIN_CV))
            sh.two(elm.Capacitor(), (x_cv + 0.6, _PIN_CV), (x_cv + 0.6, 0.0))
            sh.dot((x_cv + 0.6, 0.0))
            label(x_cv + 0.6, 1.6, f"C2\n{fv(t.cv_bypass, 'F')}")
            record("C2", "capacitor", fv(t.cv_bypass, "F"), "c_cv", ("CV1", "GND"))
        net((x_cv + 0.4, _PIN_OUT), "CLK", "right")
        # -- monostable U2 -----------------------------------------------------------------
        xm = x_cv + 4.2
        sh.two(elm.ResistorIEC(), (xm, _TOP), (xm, _PIN_DIS))
        label(xm, 8.5, f"R3\n{fv(t.r_mono, 'Ω')}", "left")
        record("R3", "resistor", fv(t.r_mono, "Ω"), "r_mono", ("VCC", "THR2"))
        sh.two(elm.Capacitor(), (xm, _PIN_THR), (xm, 0.0))
        label(xm, 1.6, f"C4\n{fv(t.c_mono, 'F')}", "left")
        record("C4", "capacitor", fv(t.c_mono, "F"), "c_mono", ("THR2", "GND"))
        x2 = xm + 2.4
        sh.wire((xm, _PIN_DIS), (xm, _PIN_THR))
        sh.wire((xm, _PIN_DIS), (x2 - 1.0, _PIN_DIS))
        sh.wire((xm, _PIN_THR), (x2 - 1.0, _PIN_THR))
        for p in ((xm, _TOP), (xm, 0.0), (xm, _PIN_DIS), (xm, _PIN_THR)):
            sh.dot(p)
        timer_box(x2, "U2", "monostable", pins)
        net((x2 - 1.0, _PIN_TRIG), "CLK")
        # -- control pin -------------------------------------------------------------------
        x_c = x2 + _BOX_W + 1.0
        xd = x_c + 1.6
        sh.wire((x_c, _PIN_CV), (xd, _PIN_CV))
        load = design.load
        if load is not None and load.kind == "heater" and load.has_loop:
            sh.two(elm.ResistorIEC(), (xd, _PIN_OUT - 1.0), (xd, _PIN_CV))
            sh.dot((xd, _PIN_OUT - 1.0), open_=True)
            sh.text((xd - 0.3, _PIN_OUT - 1.0), "VCC", halign="right", valign="center")
            label(xd, 4.4, f"R5\n{fv(load.r_set, 'Ω')}")
            record("R5", "resistor", fv(load.r_set, "Ω"), "r_set", ("VCC", "CV2"))
            sh.two(elm.Thermistor(), (xd, _PIN_CV), (xd, 0.0))
            label(xd, 1.6, f"TH1 NTC\n{fv(load.ntc_r25, 'Ω')} at 25 °C")
            record("TH1", "resistor", fv(load.ntc_r25, "Ω"), "ntc", ("CV2", "GND"), label=f"TH1 NTC {fv(load.ntc_r25, 'Ω')}")
        else:
            if t.r_ctl_source:
                sh.two(elm.ResistorIEC(), (xd, _PIN_CV), (xd, 1.9))
                label(xd, 2.8, f"R6\n{fv(t.r_ctl_source, 'Ω')}")
                record("R6", "resistor", fv(t.r_ctl_source, "Ω"), "r_ctl_source", ("CV2", "V1"))
                top_v = 1.9
            else:
                top_v = _PIN_CV
            sh.two(_sheet.SourceIEC(), (xd, 0.0), (xd, top_v))
            text = f"V1\n{fv(t.vctl_min, 'V')} … {fv(t.vctl_max, 'V')}"
            label(xd, 0.9, text)
            record("V1", "source", f"{fv(t.vctl_min, 'V')} … {fv(t.vctl_max, 'V')}", "vctl", ("V1", "GND"))
        sh.dot((xd, 0.0))
        right = xd + 4.0
        # -- output stage and heater -------------------------------------------------------
        x_out = x2 + _BOX_W + 1.0
        if load is not None and load.kind == "heater":
            y_out = _PIN_OUT
            xg = right
            sh.wire((x_out, y_out), (xg, y_out))
            r_gate = design.switch.r_gate
            if r_gate:
                sh.two(elm.ResistorIEC(), (xg, y_out), (xg + 2.5, y_out))
                sh.text((xg + 1.25, y_out + 0.45), f"R4 {fv(r_gate, 'Ω')}", halign="center", valign="bottom")
                record("R4", "resistor", fv(r_gate, "Ω"), "r_gate", ("OUT2", "GATE"))
                xg += 2.5
            sh.wire((xg, y_out), (xg + 0.6, y_out), (xg + 0.6, 1.75), (xg + 1.5, 1.75))
            q = sh.add(elm.NMos(diode=True).theta(0).scale(1.4).anchor("gate").at((xg + 1.5, 1.75)))
            x_d, y_drain = q.absanchors["drain"]
            sh.wire((x_d, q.absanchors["source"][1]), (x_d, 0.0))
            record("Q1", "mosfet", "N-MOSFET", "switch", ("DRAIN", "GATE", "GND"))
            label(x_d + 0.3, 1.6, "Q1\nN-MOSFET")
            y_h = y_drain + 0.6
            sh.wire((x_d, y_drain), (x_d, y_h))
            top_h = _TOP
            if load.t_cutout_c is not None:
                sh.two(elm.FuseIEC(), (x_d, _TOP), (x_d, 8.4))
                label(x_d, 9.7, f"F1 cut-out\nopens {load.t_cutout_c:g} °C")
                record("F1", "resistor", f"{load.t_cutout_c:g} °C", "cutout", ("VLOAD", "HTR"),
                       label=f"F1 thermal cut-out {load.t_cutout_c:g} °C")
                top_h = 8.4
            sh.two(elm.ResistorIEC(), (x_d, top_h), (x_d, y_h))
            label(x_d, (top_h + y_h) / 2, f"RH1 heater\n{fv(load.r_cold, 'Ω')}")
            record("RH1", "resistor", fv(load.r_cold, "Ω"), "heater", ("HTR", "DRAIN"), label=f"RH1 heater {fv(load.r_cold, 'Ω')}")
            sh.dot((x_d, 0.0))
            right = x_d
        else:
            net((x_out + 0.4, _PIN_OUT), "PWM OUT", "right")
        # rails, supply terminal, ground
        x_l = -1.4
        sh.wire((x_l, _TOP), (right, _TOP))
        sh.wire((x_l, 0.0), (right, 0.0))
        sh.dot((x_l, _TOP), open_=True)
        sh.text((x_l - 0.2, _TOP + 0.3), f"VCC {fv(design.vcc, 'V')}", halign="left", valign="bottom")
        sh.add(elm.Ground().theta(0).at((x_l, 0.0)))
        if annotate:
            r = timing if timing is not None else design.astable()
            sh.text((x_l, -1.3), f"f = {fv(float(r.frequency), 'Hz', 4)}  ·  pulse {fv(float(r.t_high), 's', 4)}  ·  "
                    f"duty {100 * float(r.duty):.3g} %  ·  control pin {float(r.v_upper):.3g} V", halign="left",
                    valign="top")
        svg = sh.svg()
    return Schematic(svg=svg, parts=tuple(parts), topology="two-timer",
                     load=None if design.load is None else design.load.kind)
