"""Loads panel: LED drive and brightness steps, motor current, MOSFET gate drive and losses,
freewheel diode — every figure from the evaluation, with the cautions."""

from __future__ import annotations

from typing import Any

import ipywidgets as w

from ..design import Design
from ._base import DASH, PLOT_DELAY, Panel, esc, fmt, num, safe_callback
from .checks import CautionsBox
from .session import DesignSession, as_session

__all__ = ["LoadsPanel", "led_html", "steps_html", "motor_html", "mosfet_html", "freewheel_html"]


def _table(title: str, rows: list[tuple[str, str]], css: str) -> str:
    body = "".join(
        f"<tr><th style='text-align:left;font-weight:normal;color:#5a6270;padding:1px 12px 1px 0'>{esc(k)}</th>"
        f"<td class='pwmkit-q' style='text-align:right'>{esc(v)}</td></tr>" for k, v in rows
    )
    return (f"<table class='{css}' style='font-size:13px;border-collapse:collapse;margin:2px 0 8px 0'>"
            f"<caption style='text-align:left;font-weight:600;color:#1f2328'>{esc(title)}</caption>{body}</table>")


def _pair(a: Any, b: Any, unit: str) -> str:
    return f"{fmt(a, unit)} / {fmt(b, unit)}"


def led_html(led: Any, corners: Any, lightness: Any, *, t_max_c: float | None = None,
             supply_range: tuple[float, float] | None = None) -> str:
    """LED currents, resistor power and rating (part rating and derated limit), brightness."""
    from ..glossary import condition, plural, rating_text
    from ..loads.led import resistor_derating

    t_rating = led.t_ambient_c if t_max_c is None else t_max_c
    derated = None
    if led.resistor_rating is not None:
        # usable share of the part's rating at that ambient (2× margin, common practice; IEC 60115-1 shape)
        derated = 0.5 * float(resistor_derating(t_rating)) * float(led.resistor_rating)
    rows = [
        ("strings × LEDs", f"{plural(led.n_parallel, 'string')} × {plural(led.n_series, 'LED')} at "
                           f"{fmt(led.vf, 'V')} each"),
        ("headroom for the resistor", fmt(led.headroom, "V")),
        ("peak current per string / all strings", _pair(led.i_peak, led.i_peak_total, "A")),
        ("average current per string / all strings", _pair(led.i_avg, led.i_avg_total, "A")),
        ("resistor power while on / average", _pair(led.p_resistor_on, led.p_resistor_avg, "W")),
        (f"resistor rating ({led.rating_basis} power)", rating_text(led.resistor_rating, derated, t_rating)),
        ("power per LED while on / average", _pair(led.p_led_on, led.p_led_avg, "W")),
        (f"peak current with V_F ∓ {led.dvf:g} V per LED", _pair(led.i_peak_at_vf_min, led.i_peak_at_vf_max, "A")),
    ]
    if corners is not None:
        low = DASH if corners.low is None else fmt(corners.low.i_peak, "A")
        high = DASH if corners.high is None else fmt(corners.high.i_peak, "A")
        where = "" if supply_range is None else f" ({condition(vcc=supply_range[0])} / {fmt(supply_range[1], 'V')})"
        rows.append((f"peak current per string at lowest / highest supply{where}", f"{low} / {high}"))
    if lightness is not None:
        rows.append(("perceived brightness (CIE L*) at this duty", num(lightness, ".3g", " of 100")))
    html = _table("LED string", rows, "pwmkit-led")
    if corners is not None and corners.error:
        html += f"<div class='pwmkit-note' style='color:#8a2d00'>▲ {esc(corners.error)}</div>"
    return html


def steps_html(steps: Any, duty_range: tuple[float, float]) -> str:
    """Perceptually even brightness steps and whether the control reaches each duty."""
    from ..numstyle import screen, screen_range

    lo, hi = duty_range
    rows = []
    for k, lstar, duty in zip(steps.step, steps.lstar, steps.duty):
        ok = lo - 1e-12 <= duty <= hi + 1e-12
        mark = "✔ reachable" if ok else "✖ outside the control range"
        rows.append(f"<tr><td>{int(k)}</td><td>{num(lstar, '.1f')}</td><td>{esc(screen(duty, 'duty'))}</td>"
                    f"<td>{mark}</td></tr>")
    cell = "padding:1px 10px;text-align:right;font-variant-numeric:tabular-nums"
    return ("<style>.pwmkit-steps td, .pwmkit-steps th {" + cell + "} .pwmkit-steps td:last-child {text-align:left}"
            "</style><table class='pwmkit-steps' style='font-size:12px;border-collapse:collapse'>"
            "<caption style='text-align:left;font-weight:600'>Even brightness steps (CIE 1976 L*)</caption>"
            "<tr><th>step</th><th>L*</th><th>duty</th><th></th></tr>" + "".join(rows) +
            f"</table><div style='font-size:11px;color:#5a6270'>The control reaches {esc(screen_range(lo, hi, 'duty'))} "
            f"duty; smallest step needed: {esc(screen(steps.min_duty_increment, 'duty'))}.</div>")


def motor_html(motor: Any, speed: Any, stall: Any) -> str:
    rows = [
        ("conduction mode", str(motor.mode)),
        ("mean / rms current", _pair(motor.i_mean, motor.i_rms, "A")),
        ("lowest / highest current", _pair(motor.i_min, motor.i_max, "A")),
        ("ripple (peak to peak)", fmt(motor.i_ripple_pp, "A")),
        ("electrical time constant L/R", fmt(motor.tau, "s")),
    ]
    if speed is not None:
        rows += [("speed", num(speed.rpm, ".4g", " rpm") + (" — stalled" if bool(speed.stalled) else "")),
                 ("back-EMF", fmt(speed.e, "V")),
                 ("PWM frequency audible?", "yes" if bool(speed.audible) else "no (above 20 kHz)")]
    if stall is not None:
        rows.append(("rotor held: mean / peak current", _pair(stall.i_mean, stall.i_max, "A")))
    return _table("Motor", rows, "pwmkit-motor")


def mosfet_html(gate: Any, losses: Any, t_thermal_c: float, gate_error: str | None) -> str:
    rows: list[tuple[str, str]] = []
    if gate is not None:
        margin = gate.gate_margin
        verdict = "✔ fully on" if gate.fully_enhanced else "✖ under-driven"
        rows += [("gate voltage / lowest rated drive", _pair(gate.v_gate_on, gate.v_gs_min_rated, "V")),
                 ("gate-drive margin", f"{num(margin, '+.3g', ' V')} — {verdict}"),
                 ("switching on / off", _pair(gate.t_on, gate.t_off, "s")),
                 ("R_DS(on) at 25 °C", fmt(gate.rds_on_25, "Ω"))]
    if losses is not None:
        if bool(losses.runaway):
            rows.append((f"junction at {t_thermal_c:g} °C ambient", "✖ thermal runaway — no stable temperature"))
        else:
            rows += [("total loss", fmt(losses.p_total, "W")),
                     (f"junction temperature at {t_thermal_c:g} °C ambient", num(losses.tj_c, ".3g", " °C")),
                     ("margin to the maximum junction temperature", num(losses.tj_margin, ".3g", " K"))]
        rows.append(("drain voltage margin", fmt(losses.v_ds_margin, "V")))
    html = _table("MOSFET", rows, "pwmkit-mosfet")
    if gate_error:
        html += f"<div class='pwmkit-note' style='color:#8a2d00'>✖ {esc(gate_error)}</div>"
    return html


def freewheel_html(diode: Any, clamp: Any, t_thermal_c: float, conditions: Any = None) -> str:
    """Freewheel diode figures; the drain peak at the nominal and at the highest load supply."""
    from ..glossary import condition

    rows: list[tuple[str, str]] = []
    if diode is not None:
        rows += [("diode", diode.diode.name),
                 ("loss", fmt(diode.p_total, "W") if diode.p_total is not None else DASH),
                 (f"junction at {t_thermal_c:g} °C ambient",
                  "✖ thermal runaway" if bool(diode.runaway) else num(diode.tj_c, ".3g", " °C")),
                 ("reverse-voltage rating / need", num(diode.voltage_ratio, ".3g", " ×")),
                 ("current rating / need", num(min(float(diode.current_ratio), 1e6), ".3g", " ×")),
                 ("all ratings", "✔ met" if bool(diode.ok) else "✖ not met")]
    if clamp is not None:
        peak = fmt(clamp.v_switch_peak, "V")
        if conditions is not None and conditions.v_clamp is not None:
            v_nom, v_max = conditions.load_supply, conditions.load_supply_max
            peak = (f"{peak} {condition(vcc=v_nom, what='nominal')}; {fmt(v_max + conditions.v_clamp, 'V')} "
                    f"{condition(vcc=v_max, what='highest supply')}")
        rows += [("drain peak at turn-off (supply plus clamp)", peak),
                 ("current decays in", fmt(clamp.t_zero, "s")),
                 ("energy into the clamp per turn-off", fmt(clamp.clamp_energy, "J"))]
    html = _table("Freewheel diode", rows, "pwmkit-freewheel")
    notes = "".join(f"<li>{esc(n)}</li>" for n in (getattr(diode, "notes", ()) or ()))
    return html + (f"<ul style='font-size:12px'>{notes}</ul>" if notes else "")


class LoadsPanel(Panel):
    """LED or motor load, MOSFET and freewheel diode of the current design.

    Parameters
    ----------
    design : Design or DesignSession
    show_cautions : bool
        Show the safety cautions (the dashboard shows them once for all panels).

    Attributes
    ----------
    steps : ipywidgets.IntSlider — number of even brightness steps (LED loads)
    losses : pwmkit.plots.LossBarsPlot; motor_plot : pwmkit.plots.MotorCurrentPlot
    """

    title = "Load and output stage"
    css_name = "loads"
    redraw_delay = PLOT_DELAY

    def __init__(self, design: Design | DesignSession, *, show_cautions: bool = True) -> None:
        super().__init__()
        from ..plots.loads import LossBarsPlot, MotorCurrentPlot
        from .tabs import live_plot

        self.session = as_session(design)
        self.load_html = w.HTML()
        self.steps = w.IntSlider(value=10, min=2, max=32, description="brightness steps", continuous_update=False,
                                 style={"description_width": "110px"}, layout=w.Layout(width="360px"))
        self.steps_html = w.HTML()
        self.led_box = w.VBox([self.steps, self.steps_html])
        self.motor_plot = MotorCurrentPlot()
        self.motor_box = w.VBox()
        self.stage_html = w.HTML()
        self.losses = LossBarsPlot()
        self.losses_box = w.VBox()
        self.freewheel = w.HTML()
        self.refresh(self.session.evaluation)  # first data before the widgets are made (see views._bokeh)
        self.motor_bokeh = live_plot(self.motor_plot.layout, "pwmkit-plot", "pwmkit-plot-motor")
        self.motor_box.children = (self.motor_bokeh,)
        self.losses_bokeh = live_plot(self.losses.layout, "pwmkit-plot", "pwmkit-plot-losses")
        self.losses_box.children = (self.losses_bokeh,)
        left = w.VBox([self.load_html, self.led_box, self.motor_box],
                      layout=w.Layout(min_width="420px", margin="0 16px 0 0"))
        right = w.VBox([self.stage_html, self.losses_box, self.freewheel])
        body: list[w.Widget] = [w.HBox([left, right], layout=w.Layout(flex_flow="row wrap", justify_content="flex-start"))]
        if show_cautions:
            body.append(CautionsBox(self.session))
        self.set_body(body)
        self.steps.observe(lambda _c: self.refresh(self.session.evaluation), names="value")
        self.session.subscribe(self.follow)

    @safe_callback
    def refresh(self, evaluation: Any) -> None:
        ev = evaluation
        cond = ev.conditions
        if ev.led is not None:
            from ..loads.lightness import even_duty_steps

            self.load_html.value = led_html(ev.led, ev.led_corners, ev.lightness,
                                            t_max_c=self.session.design.t_ambient_max_c,
                                            supply_range=(cond.load_supply_min, cond.load_supply_max))
            self.steps_html.value = steps_html(even_duty_steps(int(self.steps.value)), cond.duty_reachable)
            self.led_box.layout.display = None
        else:
            self.led_box.layout.display = "none"
        if ev.motor is not None:
            self.load_html.value = motor_html(ev.motor, ev.motor_speed, ev.motor_stall)
            self.motor_plot.update(ev.timing, ev.motor)
            self.motor_box.layout.display = None
        else:
            self.motor_box.layout.display = "none"
        if getattr(ev, "heater", None) is not None:
            from .two_timer import heater_html

            self.load_html.value = heater_html(ev)
        elif ev.led is None and ev.motor is None:
            why = "" if cond.gate_error is None else f" ({esc(cond.gate_error)})"
            self.load_html.value = ("<i>No load figures: the design has no load</i>" if self.session.design.load is None
                                    else f"<i>No load figures{why}</i>")
        self.stage_html.value = mosfet_html(ev.gate, ev.mosfet, cond.t_thermal_c, cond.gate_error)
        if ev.mosfet is not None:
            self.losses.update(ev.mosfet)
            self.losses_box.layout.display = None
        else:
            self.losses_box.layout.display = "none"
        self.freewheel.value = (freewheel_html(ev.freewheel, ev.clamp, cond.t_thermal_c, cond)
                                if ev.motor is not None else "")
        self.clear_message()
