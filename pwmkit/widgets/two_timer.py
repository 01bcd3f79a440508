"""Panels of the two-timer PWM and of heater loads: edit the clock, the monostable and the control
range; read the modulator, the duty over the control range, the element temperature and the loop.

:class:`TwoTimerPanel` takes the timing panel's place in the dashboard for a "two-timer" design;
:class:`ControlHeaterPanel` is its tab with the plots. Both hold no physics: they read the
session's evaluation (:func:`pwmkit.evaluate.evaluate`).
"""

from __future__ import annotations

from typing import Any

import ipywidgets as w

from ..design import Design
from ._base import DASH, GENERIC_MESSAGE, PLOT_DELAY, Panel, esc, fmt, fmt_pct, log, num, safe_callback
from .entry import ValueEntry
from .session import DesignSession, as_session

__all__ = ["TwoTimerPanel", "ControlHeaterPanel", "TwoTimerCandidatesPanel", "two_timer_html", "heater_html"]


def _table(title: str, rows: list[tuple[str, str]], css: str) -> str:
    body = "".join(f"<tr><th style='text-align:left;font-weight:normal;color:#5a6270;padding:1px 12px 1px 0'>"
                   f"{esc(k)}</th><td class='pwmkit-q' style='text-align:right'>{esc(v)}</td></tr>" for k, v in rows)
    return (f"<table class='{css}' style='font-size:13px;border-collapse:collapse;margin:2px 0 8px 0'>"
            f"<caption style='text-align:left;font-weight:600;color:#1f2328'>{esc(title)}</caption>{body}</table>")


def two_timer_html(evaluation: Any) -> str:
    """Readout of the clock, the modulator at the operating point and the control range."""
    tt = evaluation.two_timer
    if tt is None:
        return "<i>not a two-timer design</i>"
    p, t = tt.pwm, evaluation.timing
    rows = [("PWM frequency (clock)", fmt(t.frequency, "Hz", 5)), ("pulse / duty", f"{fmt(t.t_high, 's', 4)} / "
            f"{fmt_pct(t.duty, 4)}"), ("control pin now", fmt(tt.v_pin, "V", 4)),
            ("minimum pulse (trigger)", fmt(p.t_trigger, "s", 3)),
            ("reachable duty", f"{fmt_pct(p.duty_min, 3)} … {fmt_pct(p.duty_max, 4)}")]
    c = tt.control
    if c is not None:
        rows += [("duty over the control range", f"{fmt_pct(c.duty_low, 3)} … {fmt_pct(c.duty_high, 4)}"),
                 ("linearity", f"±{num(100 * c.linearity_error, '.2g', ' pt')}"),
                 ("supply sensitivity (fixed / ratiometric)",
                  f"{num(100 * c.supply_sensitivity, '+.2g')} / {num(100 * c.supply_sensitivity_ratiometric, '+.2g')} pt/V")]
    html = _table("Two-timer PWM", rows, "pwmkit-two-timer")
    if tt.control_error:
        html += f"<div class='pwmkit-note' style='color:#8a2d00'>✖ {esc(tt.control_error)}</div>"
    return html


def heater_html(evaluation: Any) -> str:
    """Readout of the heater element and the thermistor loop."""
    from ..evaluate_heater import heater_rows

    if evaluation.heater is None:
        return ""
    return _table("Heater", heater_rows(evaluation), "pwmkit-heater")


class TwoTimerPanel(Panel):
    """Edit a two-timer design: clock ``ra``, ``rb``, ``c``; monostable ``r_mono``, ``c_mono``;
    control range ``vctl_min`` … ``vctl_max``; supply ``vcc``. Readouts below.

    Attributes
    ----------
    entries : dict[str, ValueEntry]
    readout : ipywidgets.HTML (CSS class ``pwmkit-two-timer-box``)
    """

    title = "Two-timer PWM"
    css_name = "two-timer"
    message_lead = "Not applied"

    def __init__(self, design: Design | DesignSession) -> None:
        super().__init__()
        self.session = as_session(design)
        d = self.session.design
        t = d.timing

        def entry(name: str, label: str, unit: str, value: float, **kw: Any) -> ValueEntry:
            return ValueEntry(name, label, unit, value, handler=self._on_entry, report=self.show_message, **kw)

        self.entries: dict[str, ValueEntry] = {
            "ra": entry("ra", "clock R<sub>A</sub>", "Ω", t.ra, log_range=(1e3, 10e6), snappable=True),
            "rb": entry("rb", "clock R<sub>B</sub> (trigger)", "Ω", t.rb, log_range=(100.0, 1e6), snappable=True),
            "c": entry("c", "clock C", "F", t.c, log_range=(100e-12, 100e-6), snappable=True),
            "r_mono": entry("r_mono", "monostable R", "Ω", t.r_mono, log_range=(1e3, 10e6), snappable=True),
            "c_mono": entry("c_mono", "monostable C", "F", t.c_mono, log_range=(100e-12, 100e-6), snappable=True),
            "vctl_min": entry("vctl_min", "control from", "V", t.vctl_min, linear=(0.1, 17.0, 0.05)),
            "vctl_max": entry("vctl_max", "control to", "V", t.vctl_max, linear=(0.1, 17.0, 0.05)),
            "vcc": entry("vcc", "supply V<sub>CC</sub>", "V", d.vcc, linear=(1.0, 18.0, 0.1)),
        }
        self.readout = w.HTML()
        self.readout.add_class("pwmkit-two-timer-box")
        self.set_body([*self.entries.values(), self.readout])
        self.session.subscribe(self.refresh)
        self.refresh(self.session.evaluation)

    def _on_entry(self, name: str, value: float) -> str | None:
        try:
            if name == "vcc":
                verdict = self.session.edit(lambda d: _with_supply(d, value))
            else:
                verdict = self.session.edit(lambda d: d.with_timing(**{name: value}))
        except Exception:  # never raise into the widget machinery
            log.exception("pwmkit: two-timer entry %s failed", name)
            self.show_message(GENERIC_MESSAGE)
            return GENERIC_MESSAGE
        if verdict is None:
            self.clear_message()
            return None
        self.show_message(verdict)
        return verdict

    def set_value(self, name: str, value: Any) -> str | None:
        """Programmatic edit, as if typed. Returns the rejection reason or None."""
        from ..values import parse_value

        if name not in self.entries:
            raise KeyError(f"unknown field {name!r}; known: {', '.join(self.entries)}")
        self.entries[name].text.value = value if isinstance(value, str) else format(float(parse_value(value)), "g")
        return self.message_text or None

    @safe_callback
    def refresh(self, evaluation: Any) -> None:
        d = self.session.design
        for name, entry in self.entries.items():
            value = d.vcc if name == "vcc" else getattr(d.timing, name)
            if entry.value != value:
                entry.set_value(value)
        self.readout.value = two_timer_html(evaluation) + heater_html(evaluation)


def _with_supply(design: Design, vcc: float) -> Design:
    lo, hi = design.supply_range
    scale = vcc / design.vcc
    changes: dict[str, Any] = {"vcc": vcc}
    if design.vcc_min is not None:
        changes["vcc_min"] = lo * scale
    if design.vcc_max is not None:
        changes["vcc_max"] = hi * scale
    return design.replace(**changes)


class ControlHeaterPanel(Panel):
    """Duty over the control range (two-timer designs) and element temperature over duty (heaters)."""

    title = "Control range and heater"
    css_name = "control-heater"
    redraw_delay = PLOT_DELAY

    def __init__(self, design: Design | DesignSession) -> None:
        super().__init__()
        from ..plots.control import ControlPlot, HeaterPlot, StepPlot
        from .views import _bokeh

        self.session = as_session(design)
        self.control_plot = ControlPlot()
        self.heater_plot = HeaterPlot()
        self.step_plot = StepPlot()
        self.step: Any = None
        self.note = w.HTML()
        self.refresh(self.session.evaluation)  # first data before the widgets are made
        self.control_box = w.VBox([_bokeh(self.control_plot.layout, "pwmkit-plot-control")])
        self.heater_box = w.VBox([_bokeh(self.heater_plot.layout, "pwmkit-plot-heater")])
        self.simulate = w.Button(description="Simulate warm-up", icon="play")
        self.simulate.add_class("pwmkit-simulate")
        self.simulate.on_click(lambda _b: self.run_step())
        self.step_box = w.VBox([self.simulate, _bokeh(self.step_plot.layout, "pwmkit-plot-step")])
        self.set_body([w.HBox([self.control_box, self.heater_box, self.step_box], layout=w.Layout(flex_flow="row wrap")),
                       self.note])
        self._show(self.session.evaluation)
        self.session.subscribe(self.follow)

    @safe_callback
    def run_step(self) -> None:
        """Simulate the thermistor loop's warm-up from ambient (:func:`pwmkit.loads.heater.closed_loop_step`)."""
        from ..evaluate_heater import heater_kwargs, loop_chain
        from ..loads.heater import closed_loop_step

        d, ev = self.session.design, self.session.evaluation
        d_of_v, v_of_t, d_range, v_range = loop_chain(d)
        rds = 0.0 if ev.gate is None else float(ev.gate.rds_on_25)
        self.step = closed_loop_step(d_of_v, v_of_t, duty_range=d_range, vctl_range=v_range,
                                     tau_sensor=d.load.tau_sensor, t_ambient_c=d.t_ambient_c, **heater_kwargs(d, rds))
        self.step_plot.update(self.step)
        self.clear_message()

    def _show(self, ev: Any) -> None:
        if hasattr(self, "step_box"):
            d = self.session.design
            loop = d.load is not None and d.load.kind == "heater" and d.load.has_loop and ev.two_timer is not None
            self.step_box.layout.display = None if loop else "none"
        if hasattr(self, "control_box"):
            ok_c = ev.two_timer is not None and ev.two_timer.control is not None
            self.control_box.layout.display = None if ok_c else "none"
            self.heater_box.layout.display = None if ev.heater is not None else "none"

    @safe_callback
    def refresh(self, evaluation: Any) -> None:
        ev = evaluation
        notes = []
        if ev.two_timer is not None and ev.two_timer.control is not None:
            self.control_plot.update(ev.two_timer.control, ev.two_timer.v_pin, float(ev.timing.duty))
        elif ev.two_timer is not None:
            notes.append(ev.two_timer.control_error or DASH)
        if ev.heater is not None:
            self.heater_plot.update(ev.heater, self.session.design.load.t_surface_max_c)
            lp = ev.heater.loop
            if lp is not None:
                notes.append(f"The thermistor loop holds {lp.t_element_c:.3g} °C ({100 * lp.duty:.3g} % duty); "
                             f"loop gain {lp.gain:.2g}, droop {lp.droop:.2g} K per K of ambient.")
        self.note.value = "".join(f"<div style='font-size:12px;color:#3d4652'>{esc(n)}</div>" for n in notes)
        self._show(ev)
        self.clear_message()


class TwoTimerCandidatesPanel(Panel):
    """Preferred-value part sets for a two-timer design (:func:`pwmkit.synthesis_two_timer.synthesize_two_timer`).

    Targets come from the design: the requirement's frequency (default: the present clock
    frequency) and duty range ``duty_min … duty_max`` (default: the present duty over the control
    range) over the control range ``vctl_min … vctl_max`` at the supply. "Use this set" puts the
    chosen parts into the design (validated like any edit).

    Attributes
    ----------
    find, use : ipywidgets.Button; pick : ipywidgets.Dropdown; table : ipywidgets.HTML
    result : TwoTimerSynthesis or None
    """

    title = "Two-timer part sets"
    css_name = "two-timer-candidates"

    def __init__(self, design: Design | DesignSession) -> None:
        super().__init__()
        self.session = as_session(design)
        self.result: Any = None
        self.find = w.Button(description="Find part sets", icon="search", button_style="primary")
        self.pick = w.Dropdown(options=(), description="set", layout=w.Layout(width="140px"),
                               style={"description_width": "30px"})
        self.use = w.Button(description="Use this set", icon="check", disabled=True)
        self.table = w.HTML("<i>not searched yet</i>")
        self.table.add_class("pwmkit-two-timer-table")
        self.find.on_click(lambda _b: self.search())
        self.use.on_click(lambda _b: self.use_selected())
        self.set_body([w.HBox([self.find, self.pick, self.use], layout=w.Layout(align_items="center")), self.table])

    def targets(self) -> dict[str, float]:
        """Synthesis targets taken from the design (see the class docstring)."""
        d, ev = self.session.design, self.session.evaluation
        req, t = d.requirements, d.timing
        control = ev.two_timer.control if ev.two_timer is not None else None
        lo = req.duty_min if req.duty_min is not None else (control.duty_low if control is not None else 0.2)
        hi = req.duty_max if req.duty_max is not None else (control.duty_high if control is not None else 0.8)
        return dict(frequency=float(req.frequency or ev.timing.frequency), duty_low=float(lo), duty_high=float(hi),
                    vctl_low=float(t.vctl_min), vctl_high=float(t.vctl_max), vcc=float(d.vcc))

    @safe_callback
    def search(self) -> None:
        from ..synthesis_two_timer import synthesize_two_timer

        d = self.session.design
        self.result = synthesize_two_timer(timer=d.timing.timer, r_series=d.timing.r_series,
                                           c_series=d.timing.c_series, **self.targets())
        rows = "".join(
            f"<tr><td>{i + 1}</td><td>{esc(fmt(c.ra, 'Ω', 3))}</td><td>{esc(fmt(c.rb, 'Ω', 3))}</td>"
            f"<td>{esc(fmt(c.c, 'F', 3))}</td><td>{esc(fmt(c.r_mono, 'Ω', 3))}</td><td>{esc(fmt(c.c_mono, 'F', 3))}</td>"
            f"<td class='pwmkit-q'>{esc(fmt(c.frequency, 'Hz', 4))}</td>"
            f"<td class='pwmkit-q'>{esc(fmt_pct(c.duty_low, 3))} … {esc(fmt_pct(c.duty_high, 3))}</td>"
            f"<td class='pwmkit-q'>{num(100 * c.error, '.2g', ' %')}</td></tr>"
            for i, c in enumerate(self.result.candidates))
        self.table.value = ("<table style='font-size:12px;border-collapse:collapse'><tr><th>#</th><th>R_A</th>"
                            "<th>R_B</th><th>C</th><th>R_M</th><th>C_M</th><th>frequency</th><th>duty range</th>"
                            f"<th>worst error</th></tr>{rows}</table>")
        self.pick.options = tuple(range(1, len(self.result.candidates) + 1))
        self.use.disabled = not self.result.candidates
        self.clear_message()

    @safe_callback
    def use_selected(self, rank: int | None = None) -> None:
        if self.result is None:
            self.show_message("search first (Find part sets)")
            return
        k = int(self.pick.value if rank is None else rank) - 1
        fields = self.result.candidates[k].timing_fields(self.result.vctl_low, self.result.vctl_high)
        verdict = self.session.edit(lambda d: d.with_timing(**fields))
        if verdict is not None:
            self.show_message(verdict)
        else:
            self.clear_message()

    def refresh(self, evaluation: Any) -> None:
        """Nothing follows the session live (the search runs on request)."""
