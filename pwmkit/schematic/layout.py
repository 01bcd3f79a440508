"""Placement of the parts (internal): timing network, timer, control pin, supply and load.

Drawing units, x to the right and y up; the ground rail is y = 0 and the supply rail y = ``top``.
The timing network is laid out around its main column at x = 0 (RA from the supply down to the
discharge node). Each half of the drawing reports how far it reaches so the next half can be
placed beside it without overlap; text widths are estimated from the font size.
"""

from __future__ import annotations

from dataclasses import dataclass

import schemdraw.elements as elm

from ..values import format_value
from ._sheet import PotBody, Sheet, SourceIEC
from .parts import PartLabel
from .spec import Spec

__all__ = ["build"]

Point = tuple[float, float]

Y_C = 3.0  # timing-capacitor node (THR/TRIG), also the TRIG pin height
PIN_DIS, PIN_THR, PIN_TRIG = 6.0, 4.2, 3.0
PIN_OUT, PIN_CV = 6.0, 3.6
BOX_Y0, BOX_Y1, BOX_W = 2.0, 7.4, 4.6
LEAD = 1.0  # timer pin lead length
Y_GATE = 1.75  # MOSFET gate height
NMOS_SCALE = 1.4  # schemdraw's NMos is small next to the two-terminal symbols
NMOS_DRAIN_DY = NMOS_SCALE * 14 / 12  # drain above the gate anchor of schemdraw's NMos
Y_DRAIN_NODE = Y_GATE + NMOS_DRAIN_DY + 0.6
PAD = 0.45  # gap between a symbol's axis and its label
LED_STEP = 1.35  # length given to each LED symbol
LED_SHOWN = 4  # most LED symbols drawn in a string


@dataclass
class _Timing:
    x_right: float  # rightmost ink of the network
    x_left: float  # leftmost ink
    dis: Point  # discharge node where the wire to pin 7 leaves
    c_left: Point  # left end of the wire along the capacitor node towards pin 2
    charge: list[Point]
    discharge: list[Point]


class _Builder:
    def __init__(self, spec: Spec, sheet: Sheet) -> None:
        self.s = spec
        self.sh = sheet
        self.st = sheet.style
        self.parts: list[PartLabel] = []
        self.ties: list[tuple[str, str]] = []  # nodes joined by a plain wire where a part is left out
        has_path_notes = bool(spec.notes.get("charge") or spec.notes.get("discharge"))
        self.highlight = has_path_notes if self.st.highlight_paths is None else self.st.highlight_paths
        self.vload_node = "VCC" if spec.shared_supply else "VLOAD"

    # -- helpers -----------------------------------------------------------------------------
    def w(self, text: str) -> float:
        return self.sh.text_width(text)

    def record(self, ref: str, kind: str, value: str, role: str, nodes: tuple[str, ...], *,
               anode: str | None = None, cathode: str | None = None, count: int = 1, label: str | None = None) -> None:
        self.parts.append(PartLabel(ref, kind, value, label or f"{ref} {value}", role, nodes,  # type: ignore[arg-type]
                                    anode, cathode, count))

    def side_label(self, x: float, y: float, text: str, side: str, pad: float = PAD) -> float:
        """Label beside a vertical symbol at x; returns the far edge of the text."""
        width = self.w(text)
        if side == "right":
            self.sh.text((x + pad, y), text, halign="left")
            return x + pad + width
        self.sh.text((x - pad, y), text, halign="right")
        return x - pad - width

    def vpart(self, element: object, a: Point, b: Point) -> None:
        self.sh.two(element, a, b)

    def notes(self, which: str) -> str:
        lines = self.s.notes.get(which, ())
        return "\n".join((f"{which} path", *lines)) if lines else ""

    # -- heights -----------------------------------------------------------------------------
    def timing_top(self) -> float:
        s = self.s
        if s.topology == "steered" and s.rb > 0:
            return 11.5
        if s.topology == "pot":
            return (8.0 if s.rb > 0 else 7.0) + 1.8 + 3.0
        return 9.5 if s.topology in ("bypass", "steered") else 9.0

    def load_top(self) -> float:
        s = self.s
        if s.load == "motor":
            return Y_DRAIN_NODE + (5.4 if s.clamp == "zener" else 3.4)
        if s.load == "led":
            shown = min(s.n_series, LED_SHOWN)
            gap = 1.0 if s.n_series > LED_SHOWN else 0.0
            return Y_DRAIN_NODE + (2.6 if s.r_led else 0.4) + shown * LED_STEP + gap + 0.5
        return 0.0

    # -- timing networks ---------------------------------------------------------------------
    def r_value(self, r: float) -> str:
        return format_value(r, "Ω")

    def timing(self, top: float) -> _Timing:
        return {"classic": self._classic, "bypass": self._bypass, "steered": self._steered,
                "pot": self._pot}[self.s.topology](top)

    def _ra(self, top: float, bottom: float) -> float:
        s = self.s
        self.vpart(elm.ResistorIEC(), (0.0, top), (0.0, bottom))
        text = f"R1\n{self.r_value(s.ra)}"
        self.record("R1", "resistor", self.r_value(s.ra), "ra", ("VCC", "DIS"))
        self.sh.dot((0.0, top))
        return self.side_label(0.0, (top + bottom) / 2, text, "right")

    def _c1(self) -> float:
        value = format_value(self.s.c, "F")
        self.vpart(elm.Capacitor(), (0.0, Y_C), (0.0, 0.0))
        self.record("C1", "capacitor", value, "c", ("THR", "GND"))
        self.sh.dot((0.0, 0.0))
        return self.side_label(0.0, Y_C / 2, f"C1\n{value}", "right")

    def _path_note(self, which: str, x: float, y: float, halign: str) -> float:
        text = self.notes(which)
        if not text:
            return x
        color = self.st.charge if which == "charge" else self.st.discharge
        self.sh.text((x, y), text, halign=halign, color=color)
        return x - self.w(text) if halign == "right" else x + self.w(text)

    def _classic(self, top: float) -> _Timing:
        s = self.s
        y_dis = 6.0
        right = [self._ra(top, y_dis)]
        if s.rb > 0:
            self.vpart(elm.ResistorIEC(), (0.0, y_dis), (0.0, Y_C))
            self.record("R2", "resistor", self.r_value(s.rb), "rb", ("DIS", "THR"))
            right.append(self.side_label(0.0, (y_dis + Y_C) / 2, f"R2\n{self.r_value(s.rb)}", "right"))
        else:
            self.sh.wire((0.0, y_dis), (0.0, Y_C))
            self.ties.append(("DIS", "THR"))
        right.append(self._c1())
        self.sh.dot((0.0, y_dis))
        self.sh.dot((0.0, Y_C))
        left = min(-0.6, self._path_note("charge", -PAD, (top + y_dis) / 2, "right"),
                   self._path_note("discharge", -PAD, (y_dis + Y_C) / 2, "right"))
        return _Timing(max(right), left, (0.0, y_dis), (0.0, Y_C),
                       [(0.0, top), (0.0, Y_C)], [(0.0, Y_C), (0.0, y_dis)])

    def _bypass(self, top: float) -> _Timing:
        s = self.s
        y_dis, y_db, y_cb = 6.0, 6.6, Y_C + 0.6
        right = [self._ra(top, y_db)]
        self.sh.wire((0.0, y_db), (0.0, y_dis))
        if s.rb > 0:
            self.vpart(elm.ResistorIEC(), (0.0, y_dis), (0.0, y_cb))
            self.record("R2", "resistor", self.r_value(s.rb), "rb", ("DIS", "THR"))
            right.append(self.side_label(0.0, (y_dis + y_cb) / 2, f"R2\n{self.r_value(s.rb)}", "right"))
        else:
            self.sh.wire((0.0, y_dis), (0.0, y_cb))
            self.ties.append(("DIS", "THR"))
        self.sh.wire((0.0, y_cb), (0.0, Y_C))
        right.append(self._c1())
        w_note = self.w(self.notes("discharge")) if self.notes("discharge") else 0.0
        x_l = -max(2.2, PAD + w_note + 0.6)
        self.sh.wire((0.0, y_db), (x_l, y_db))
        self.vpart(elm.Diode().fill(True), (x_l, y_db), (x_l, y_cb))
        self.sh.wire((x_l, y_cb), (0.0, y_cb))
        self.record("D1", "diode", s.diode_part, "d_charge", ("DIS", "THR"), anode="DIS", cathode="THR")
        for y in (y_dis, y_db, y_cb, Y_C):
            self.sh.dot((0.0, y))
        left = [self.side_label(x_l, (y_db + y_cb) / 2, f"D1\n{s.diode_part}", "left")]
        left.append(self._path_note("charge", -PAD, (top + y_db) / 2, "right"))
        left.append(self._path_note("discharge", -PAD, (y_dis + y_cb) / 2, "right"))
        charge = [(0.0, top), (0.0, y_db), (x_l, y_db), (x_l, y_cb), (0.0, y_cb), (0.0, Y_C)]
        return _Timing(max(right), min(left), (0.0, y_dis), (0.0, Y_C), charge, [(0.0, Y_C), (0.0, y_dis)])

    def _steered(self, top: float) -> _Timing:
        s = self.s
        y_dis = 8.0 if s.rb > 0 else 6.0
        y_db, y_cb = y_dis + 0.6, Y_C + 0.6
        y_mid = (y_db + y_cb) / 2
        right = [self._ra(top, y_db)]
        self.sh.wire((0.0, y_db), (0.0, y_dis))
        self.vpart(elm.Diode().fill(True), (0.0, y_dis), (0.0, y_cb))
        self.sh.wire((0.0, y_cb), (0.0, Y_C))
        self.record("D1", "diode", s.diode_part, "d_charge", ("DIS", "THR"), anode="DIS", cathode="THR")
        right.append(self.side_label(0.0, (y_dis + y_cb) / 2, f"D1\n{s.diode_part}", "right"))
        right.append(self._c1())
        w_note = self.w(self.notes("discharge")) if self.notes("discharge") else 0.0
        x_l = -max(2.4, 2 * PAD + w_note + 0.2)
        self.sh.wire((0.0, y_db), (x_l, y_db))
        self.sh.wire((x_l, y_cb), (0.0, y_cb))
        left = []
        if s.rb > 0:
            self.vpart(elm.ResistorIEC(), (x_l, y_db), (x_l, y_mid))
            self.vpart(elm.Diode().fill(True), (x_l, y_cb), (x_l, y_mid))
            self.record("R2", "resistor", self.r_value(s.rb), "rb", ("D2_K", "DIS"))
            self.record("D2", "diode", s.diode_part, "d_discharge", ("THR", "D2_K"), anode="THR", cathode="D2_K")
            left.append(self.side_label(x_l, (y_db + y_mid) / 2, f"R2\n{self.r_value(s.rb)}", "left"))
            left.append(self.side_label(x_l, (y_cb + y_mid) / 2, f"D2\n{s.diode_part}", "left"))
        else:
            self.vpart(elm.Diode().fill(True), (x_l, y_cb), (x_l, y_db))
            self.record("D2", "diode", s.diode_part, "d_discharge", ("THR", "DIS"), anode="THR", cathode="DIS")
            left.append(self.side_label(x_l, y_mid, f"D2\n{s.diode_part}", "left"))
        for y in (y_dis, y_db, y_cb, Y_C):
            self.sh.dot((0.0, y))
        left.append(self._path_note("charge", -PAD, (top + y_db) / 2, "right"))
        self._path_note("discharge", x_l + PAD, y_mid, "left")
        discharge = [(0.0, Y_C), (0.0, y_cb), (x_l, y_cb), (x_l, y_db), (0.0, y_db), (0.0, y_dis)]
        return _Timing(max(right), min(left), (0.0, y_dis), (0.0, Y_C), [(0.0, top), (0.0, Y_C)], discharge)

    def _pot(self, top: float) -> _Timing:
        s = self.s
        assert s.pot is not None and s.wiper is not None
        y_pot = 8.0 if s.rb > 0 else 7.0
        y_wip, y_dis = y_pot + 1.0, y_pot + 1.8
        y_mid = Y_C + 2.5
        body = 2.0
        pot_text = f"P1 {format_value(s.pot, 'Ω')}\nwiper {100.0 * s.wiper:.3g} %"
        w_note = self.w(self.notes("discharge")) if self.notes("discharge") else 0.0
        half = max(2.0, (w_note + 2 * PAD + 0.3) / 2, self.w(pot_text) / 2 + 0.5)
        x_a, x_b = half, -half
        x_w = (body / 2 - 0.1) - s.wiper * (body - 0.2)  # wiper = 0 at end A (right), 1 at end B (left)
        right = [self._ra(top, y_dis)]
        self.sh.wire((0.0, y_dis), (0.0, y_wip), (x_w, y_wip))
        self.sh.add(elm.Arrow(arrowwidth=0.2, arrowlength=0.25).at((x_w, y_wip)).to((x_w, y_pot + 0.25)))
        self.sh.two(PotBody(body), (x_b, y_pot), (x_a, y_pot))
        self.sh.text((body / 2 + 0.3, y_pot + 0.12), "A", halign="left", valign="bottom", color=self.st.muted,
                     size=self.st.font_size * 0.85)
        self.sh.text((-body / 2 - 0.3, y_pot + 0.12), "B", halign="right", valign="bottom", color=self.st.muted,
                     size=self.st.font_size * 0.85)
        self.sh.text((0.0, y_pot - 0.4), pot_text, halign="center", valign="top")
        self.record("P1", "pot", format_value(s.pot, "Ω"), "pot", ("POT_A", "POT_B", "DIS"),
                    label=f"P1 {format_value(s.pot, 'Ω')}, wiper {100.0 * s.wiper:.3g} %")
        self.sh.dot((0.0, y_dis))
        # charge side: end A -> D1 -> capacitor node
        self.vpart(elm.Diode().fill(True), (x_a, y_pot), (x_a, Y_C))
        self.record("D1", "diode", s.diode_part, "d_charge", ("POT_A", "THR"), anode="POT_A", cathode="THR")
        right.append(self.side_label(x_a, (y_pot + Y_C) / 2, f"D1\n{s.diode_part}", "right"))
        # discharge side: capacitor node -> D2 -> RB -> end B
        left = []
        if s.rb > 0:
            self.vpart(elm.ResistorIEC(), (x_b, y_pot), (x_b, y_mid))
            self.vpart(elm.Diode().fill(True), (x_b, Y_C), (x_b, y_mid))
            self.record("R2", "resistor", self.r_value(s.rb), "rb", ("D2_K", "POT_B"))
            self.record("D2", "diode", s.diode_part, "d_discharge", ("THR", "D2_K"), anode="THR", cathode="D2_K")
            left.append(self.side_label(x_b, (y_pot + y_mid) / 2, f"R2\n{self.r_value(s.rb)}", "left"))
            left.append(self.side_label(x_b, (Y_C + y_mid) / 2, f"D2\n{s.diode_part}", "left"))
        else:
            self.vpart(elm.Diode().fill(True), (x_b, Y_C), (x_b, y_pot))
            self.record("D2", "diode", s.diode_part, "d_discharge", ("THR", "POT_B"), anode="THR", cathode="POT_B")
            left.append(self.side_label(x_b, (Y_C + y_pot) / 2, f"D2\n{s.diode_part}", "left"))
        self.sh.wire((x_b, Y_C), (x_a, Y_C))
        self.sh.dot((x_a, Y_C))
        right.append(self._c1())
        self.sh.dot((0.0, Y_C))
        left.append(self._path_note("charge", -PAD, (top + y_dis) / 2, "right"))
        self._path_note("discharge", x_b + PAD, (Y_C + y_mid) / 2 - 0.2, "left")
        charge = [(0.0, top), (0.0, y_wip), (x_w, y_wip), (x_w, y_pot), (x_a, y_pot), (x_a, Y_C), (0.0, Y_C)]
        discharge = [(0.0, Y_C), (x_b, Y_C), (x_b, y_pot), (x_w, y_pot), (x_w, y_wip), (0.0, y_wip), (0.0, y_dis)]
        return _Timing(max(right), min(left), (0.0, y_dis), (x_a, Y_C), charge, discharge)

    # -- timer -------------------------------------------------------------------------------
    def timer(self, t: _Timing, top: float) -> tuple[float, float]:
        """Draw U1 and its connections; returns (x of the right pin ends, x of pin 1)."""
        x_pin = t.x_right + 0.9
        x0 = x_pin + LEAD
        x1 = x0 + BOX_W + LEAD
        sh, st = self.sh, self.st
        small = st.font_size * 0.85
        sh.add(elm.Rect(corner1=(x0, BOX_Y0), corner2=(x0 + BOX_W, BOX_Y1), fill=st.box_fill).theta(0).at((0, 0)))
        sh.text((x0 + BOX_W / 2, (BOX_Y0 + BOX_Y1) / 2 + 0.5), f"U1\n{self.s.timer_part}", halign="center")
        self.record("U1", "timer", self.s.timer_part, "timer", ("VCC", "GND", "DIS", "THR", "CV", "OUT"),
                    label=f"U1 {self.s.timer_part} timer")
        left_pins = (("DIS", "7", PIN_DIS), ("THR", "6", PIN_THR), ("TRIG", "2", PIN_TRIG))
        for name, num, y in left_pins:
            sh.wire((x_pin, y), (x0, y))
            sh.text((x0 + 0.15, y), name, halign="left", color=st.muted, size=small)
            sh.text((x0 - 0.12, y + 0.08), num, halign="right", valign="bottom", color=st.muted, size=small)
        for name, num, y in (("OUT", "3", PIN_OUT), ("CV", "5", PIN_CV)):
            sh.wire((x0 + BOX_W, y), (x1, y))
            sh.text((x0 + BOX_W - 0.15, y), name, halign="right", color=st.muted, size=small)
            sh.text((x0 + BOX_W + 0.12, y + 0.08), num, halign="left", valign="bottom", color=st.muted, size=small)
        x_reset, x_vcc, x_gnd = x0 + 1.1, x0 + BOX_W - 1.1, x0 + BOX_W / 2
        for name, num, x in (("RESET", "4", x_reset), ("VCC", "8", x_vcc)):
            sh.wire((x, BOX_Y1), (x, top))
            sh.text((x, BOX_Y1 - 0.15), name, halign="center", valign="top", color=st.muted, size=small)
            sh.text((x + 0.12, BOX_Y1 + 0.12), num, halign="left", valign="bottom", color=st.muted, size=small)
        sh.dot((x_reset, top))
        sh.wire((x_gnd, BOX_Y0), (x_gnd, 0.0))
        sh.text((x_gnd, BOX_Y0 + 0.15), "GND", halign="center", valign="bottom", color=st.muted, size=small)
        sh.text((x_gnd + 0.12, BOX_Y0 - 0.12), "1", halign="left", valign="top", color=st.muted, size=small)
        # discharge wire and the THR/TRIG tie
        xd, yd = t.dis
        route = [(xd, yd), (x_pin, yd)] if abs(yd - PIN_DIS) < 1e-9 else [(xd, yd), (x_pin - 0.5, yd),
                                                                           (x_pin - 0.5, PIN_DIS), (x_pin, PIN_DIS)]
        sh.wire(*route)
        sh.wire(t.c_left, (x_pin, PIN_TRIG), (x_pin, PIN_THR))
        sh.dot((x_pin, PIN_TRIG))
        t.discharge.extend(route[1:])
        self.x_vcc_pin = x_vcc
        return x1, x_gnd

    # -- control-voltage pin -----------------------------------------------------------------
    def control(self, x1: float) -> tuple[float, list[float]]:
        """Parts on pin 5; returns (rightmost ink, x of each column reaching ground)."""
        s, sh = self.s, self.sh
        cols: list[tuple[str, str, object, str, str, tuple[str, ...]]] = []
        if s.c_cv is not None:
            v = format_value(s.c_cv, "F")
            cols.append(("C2", v, elm.Capacitor(), "capacitor", "c_cv", ("CV", "GND")))
        if s.r_cv is not None:
            v = format_value(s.r_cv, "Ω")
            cols.append(("R3", v, elm.ResistorIEC(), "resistor", "r_cv", ("CV", "GND")))
        elif s.vctl is not None:
            v = format_value(s.vctl, "V")
            cols.append(("V1", v, SourceIEC(), "source", "vctl", ("CV", "GND")))
        x = x1 + 0.8
        xs: list[float] = []
        right = x1
        for ref, value, element, kind, role, nodes in cols:
            if kind == "source":  # drawn from ground up so '+' sits at the pin
                sh.two(element, (x, 0.0), (x, PIN_CV))
                text, pad = f"{ref} Vctl\n{value}", 0.75
                self.record(ref, kind, value, role, nodes, label=f"{ref} Vctl {value}")  # type: ignore[arg-type]
            else:
                sh.two(element, (x, PIN_CV), (x, 0.0))
                text, pad = f"{ref}\n{value}", PAD
                self.record(ref, kind, value, role, nodes)  # type: ignore[arg-type]
            right = self.side_label(x, PIN_CV / 2, text, "right", pad)
            xs.append(x)
            x = right + 0.9
        if xs:
            sh.wire((x1, PIN_CV), (xs[-1], PIN_CV))
            for xc in xs[:-1]:
                sh.dot((xc, PIN_CV))
        if s.vctl is not None and s.r_cv is not None:
            text = f"Vctl {format_value(s.vctl, 'V')}"
            sh.text((x1 + 0.1, PIN_CV + 0.15), text, halign="left", valign="bottom", color=self.st.muted)
            right = max(right, x1 + 0.1 + self.w(text))
        return right, xs

    # -- output stage and load ---------------------------------------------------------------
    def output(self, x1: float, x_free: float, top: float) -> tuple[float, float, list[float]]:
        """Gate resistor, MOSFET and load; returns (x of the source, rightmost rail x, top-rail T's)."""
        s, sh = self.s, self.sh
        x = x1 + 0.5
        if s.r_gate:
            value = format_value(s.r_gate, "Ω")
            sh.wire((x1, PIN_OUT), (x, PIN_OUT))
            sh.two(elm.ResistorIEC(), (x, PIN_OUT), (x + 2.5, PIN_OUT))
            sh.text((x + 1.25, PIN_OUT + 0.45), f"R4 {value}", halign="center", valign="bottom")
            self.record("R4", "resistor", value, "r_gate", ("OUT", "GATE"))
            x += 2.5
        else:
            self.ties.append(("OUT", "GATE"))
        x_jog = max(x, x_free) + 0.6
        x_g = x_jog + 0.9
        sh.wire((x1 if not s.r_gate else x, PIN_OUT), (x_jog, PIN_OUT), (x_jog, Y_GATE), (x_g, Y_GATE))
        q = sh.add(elm.NMos(diode=True).theta(0).scale(NMOS_SCALE).anchor("gate").at((x_g, Y_GATE)))
        x_d, y_drain = q.absanchors["drain"]
        y_src = q.absanchors["source"][1]
        sh.wire((x_d, y_src), (x_d, 0.0))
        sh.wire((x_d, y_drain), (x_d, Y_DRAIN_NODE))
        ref = s.mosfet_label
        self.record(ref, "mosfet", s.mosfet_part, "switch", ("DRAIN", "GATE", "GND"))
        q_right = self.side_label(x_d, Y_GATE - 0.1, f"{ref}\n{s.mosfet_part}", "right", 0.7)
        tees = [x_d]
        if s.load == "motor":
            right = self._motor(x_d, top, q_right, tees)
        else:
            right = self._leds(x_d, top)
        return x_d, right, tees

    def _motor(self, x_d: float, top: float, q_right: float, tees: list[float]) -> float:
        s, sh = self.s, self.sh
        yn = Y_DRAIN_NODE
        y_m = (yn + top) / 2
        sh.two(elm.Motor(), (x_d, top), (x_d, yn))
        self.record("M1", "motor", "DC motor", "load", (self.vload_node, "DRAIN"))
        m_right = self.side_label(x_d, y_m, "M1\nDC motor", "right", 0.8)
        x_f = max(m_right, q_right) + 0.8
        sh.wire((x_d, yn), (x_f, yn))
        sh.dot((x_d, yn))
        tees.append(x_f)
        if s.clamp == "zener":
            y_k = (yn + top) / 2
            sh.two(elm.Diode().fill(True), (x_f, yn), (x_f, y_k))
            sh.two(elm.Zener().fill(True), (x_f, top), (x_f, y_k))
            self.record("D3", "diode", self.s.freewheel_part, "freewheel", ("DRAIN", "CLAMP"), anode="DRAIN",
                        cathode="CLAMP")
            z_value = "Zener" if s.v_zener is None else f"Zener {format_value(s.v_zener, 'V')}"
            self.record("DZ1", "zener", z_value, "clamp", ("CLAMP", self.vload_node), anode=self.vload_node,
                        cathode="CLAMP")
            r1 = self.side_label(x_f, (yn + y_k) / 2, f"D3\n{s.freewheel_part}", "right")
            r2 = self.side_label(x_f, (y_k + top) / 2, f"DZ1\n{z_value}", "right")
            return max(r1, r2)
        sh.two(elm.Diode().fill(True), (x_f, yn), (x_f, top))
        self.record("D3", "diode", self.s.freewheel_part, "freewheel", ("DRAIN", self.vload_node), anode="DRAIN",
                    cathode=self.vload_node)
        return self.side_label(x_f, y_m, f"D3\n{s.freewheel_part}", "right")

    def _leds(self, x_d: float, top: float) -> float:
        s, sh = self.s, self.sh
        right = x_d
        y = top
        anode = self.vload_node
        if s.r_led:
            value = format_value(s.r_led, "Ω")
            sh.two(elm.ResistorIEC(), (x_d, y), (x_d, y - 2.4))
            each = "\neach string" if s.n_parallel > 1 else ""
            self.record("R5", "resistor", value, "r_led", (self.vload_node, "LED_A"))
            right = self.side_label(x_d, y - 1.2, f"R5\n{value}{each}", "right")
            y -= 2.4
            anode = "LED_A"
        y_first = y
        n = s.n_series
        if n <= LED_SHOWN:
            for _ in range(n):
                sh.two(elm.LED().fill(True), (x_d, y), (x_d, y - LED_STEP))
                y -= LED_STEP
        else:
            for _ in range(2):
                sh.two(elm.LED().fill(True), (x_d, y), (x_d, y - LED_STEP))
                y -= LED_STEP
            sh.add(elm.Line().at((x_d, y)).to((x_d, y - 1.0)).linestyle(":"))
            y -= 1.0
            sh.two(elm.LED().fill(True), (x_d, y), (x_d, y - LED_STEP))
            y -= LED_STEP
        sh.wire((x_d, y), (x_d, Y_DRAIN_NODE))
        ref = "LED1" if n == 1 else f"LED1–LED{n}"
        value = "LED" if n == 1 else f"{n} in series"
        if s.n_parallel > 1:
            value += f" × {s.n_parallel} strings"
        text = ref + ("" if n == 1 else f"\n{n} in series") + (f"\n× {s.n_parallel} strings" if s.n_parallel > 1 else "")
        self.record(ref, "led", value, "load", (anode, "DRAIN"), anode=anode, cathode="DRAIN",
                    count=n * s.n_parallel)
        return max(right, self.side_label(x_d, (y_first + y) / 2, text, "right", 1.0))

    # -- supply, ground, notes ---------------------------------------------------------------
    def supply(self, t: _Timing, top: float) -> float:
        """Decoupling capacitor, supply terminal and ground symbol; returns the rails' left end."""
        s, sh = self.s, self.sh
        x = t.x_left - 0.9
        if s.c_decouple is not None:
            value = format_value(s.c_decouple, "F")
            sh.two(elm.Capacitor(), (x, top), (x, 0.0))
            self.record("C3", "capacitor", value, "c_decouple", ("VCC", "GND"))
            left = self.side_label(x, top / 2, f"C3\n{value}", "left")
            sh.dot((x, top))
            sh.dot((x, 0.0))
            x = left - 0.6
        sh.dot((x, top), open_=True)
        label = "VCC" if s.vcc is None else f"VCC {format_value(s.vcc, 'V')}"
        sh.text((x - 0.2, top + 0.3), label, halign="left", valign="bottom")
        sh.add(elm.Ground().theta(0).at((x, 0.0)))
        return x

    def footer(self, x: float) -> None:
        lines = self.s.notes.get("general", ())
        if lines:
            self.sh.text((x, -1.3), "  ·  ".join(lines), halign="left", valign="top")


def build(spec: Spec, sheet: Sheet) -> tuple[tuple[PartLabel, ...], tuple[tuple[str, str], ...]]:
    """Lay out and draw the whole schematic on ``sheet``; returns the labelled parts and the ties."""
    b = _Builder(spec, sheet)
    top = max(b.timing_top(), b.load_top())
    t = b.timing(top)
    x1, x_gnd = b.timer(t, top)
    cv_right, cv_cols = b.control(x1)
    x_rail_left = b.supply(t, top)
    gnd_right = max([x_gnd, *cv_cols])
    top_right = b.x_vcc_pin
    if spec.load is not None:
        x_src, load_right, tees = b.output(x1, cv_right, top)
        gnd_right = max(gnd_right, x_src)
        for xc in cv_cols:
            sheet.dot((xc, 0.0))
        if spec.shared_supply:
            sheet.dot((b.x_vcc_pin, top))
            for xt in tees[:-1]:
                sheet.dot((xt, top))
            top_right = tees[-1]
        else:
            x_t = tees[0] - 1.2
            sheet.wire((x_t, top), (tees[-1], top))
            sheet.dot((x_t, top), open_=True)
            for xt in tees[:-1]:
                sheet.dot((xt, top))
            label = "VLOAD" if spec.v_load is None else f"VLOAD {format_value(spec.v_load, 'V')}"
            sheet.text((x_t - 0.2, top + 0.3), label, halign="left", valign="bottom")
    else:
        for xc in cv_cols[:-1]:
            sheet.dot((xc, 0.0))
        x_out_end = x1
        sheet.dot((x_out_end, PIN_OUT), open_=True)
        sheet.text((x_out_end + 0.25, PIN_OUT), "OUT", halign="left")
    if gnd_right > x_gnd:
        sheet.dot((x_gnd, 0.0))
    sheet.wire((x_rail_left, top), (top_right, top))
    sheet.wire((x_rail_left, 0.0), (gnd_right, 0.0))
    if b.highlight:
        sheet.highlight(t.charge, b.st.charge_tint, -0.12)
        sheet.highlight(t.discharge, b.st.discharge_tint, 0.12)
    b.footer(x_rail_left)
    return tuple(b.parts), tuple(b.ties)
