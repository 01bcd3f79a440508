"""Read-only plot panels that follow the session: waveforms, pot travel, flicker map."""

from __future__ import annotations

from typing import Any

import ipywidgets as w

from ..design import Design
from ._base import PLOT_DELAY, Panel, esc, fmt, num, safe_callback
from .checks import CautionsBox
from .session import DesignSession, as_session

__all__ = ["WaveformPanel", "PotTravelPanel", "FlickerPanel"]


def _bokeh(layout: Any, css: str) -> Any:
    """Wrap a bokeh layout in a live widget.

    The widget is a :class:`~pwmkit.widgets.tabs.LivePlot`: a front end that connects later (a
    reloaded page) is sent the plot as it is then, not as it was when the widget was made.
    """
    from .tabs import live_plot

    return live_plot(layout, "pwmkit-plot", css)


class WaveformPanel(Panel):
    """Capacitor voltage with both thresholds, the timer output and the load current, one time axis.

    Parameters
    ----------
    design : Design or DesignSession
    cycles : float
        Periods shown.
    show_cautions : bool
        Show the safety cautions under the plot (the dashboard shows them once for all panels).
    """

    title = "Waveforms"
    css_name = "waveforms"
    redraw_delay = PLOT_DELAY

    def __init__(self, design: Design | DesignSession, *, cycles: float = 3.0, show_cautions: bool = True) -> None:
        super().__init__()
        from ..plots.waveforms import WaveformPlot

        self.session = as_session(design)
        self.cycles = float(cycles)
        self.plot = WaveformPlot()
        self.refresh(self.session.evaluation)  # first data before the widget is made (see _bokeh)
        self.bokeh = _bokeh(self.plot.layout, "pwmkit-plot-waveforms")
        body: list[w.Widget] = [self.bokeh]
        if show_cautions and self.session.design.load is not None:
            body.append(CautionsBox(self.session))
        self.set_body(body)
        self.session.subscribe(self.follow)

    @safe_callback
    def refresh(self, evaluation: Any) -> None:
        self.plot.update(evaluation.timing, led=evaluation.led, motor=evaluation.motor, cycles=self.cycles,
                         v_out_high=output_high_level(self.session.design, evaluation))
        self.clear_message()


from ..plots.waveforms import output_high_level  # noqa: E402 - kept importable from here


class PotTravelPanel(Panel):
    """Duty and frequency over the wiper travel (pot topology), exact and textbook, wiper marked."""

    title = "Pot travel"
    css_name = "pot-travel"
    redraw_delay = PLOT_DELAY

    def __init__(self, design: Design | DesignSession) -> None:
        super().__init__()
        from ..plots.travel import PotTravelPlot

        self.session = as_session(design)
        self.plot = PotTravelPlot()
        self.note = w.HTML()
        self.plot_box = w.VBox()
        self.refresh(self.session.evaluation)  # first data before the widget is made (see _bokeh)
        self.bokeh = _bokeh(self.plot.layout, "pwmkit-plot-pot-travel")
        self.plot_box.children = (self.bokeh,)
        self.set_body([self.note, self.plot_box])
        self.session.subscribe(self.follow)

    @safe_callback
    def refresh(self, evaluation: Any) -> None:
        travel = evaluation.pot_travel
        if travel is None:
            self.note.value = ("<i>The pot travel applies to the pot-steered topology only; choose "
                               "“pot-steered” in the timing panel.</i>")
            self.plot_box.layout.display = "none"
            return
        wiper = self.session.design.timing.wiper
        self.plot.update(travel, evaluation.timing, wiper)
        from ..requirement_spread import duty_requirement

        spec = duty_requirement(self.session.design)
        self.plot.show_requirements(self.session.design.requirements.frequency_window,
                                    None if spec is None else spec[1:])
        (d0, d1), (f0, f1) = travel.duty_range, travel.frequency_range
        from ..numstyle import screen_range

        self.note.value = (f"<span class='pwmkit-q'>Duty reaches {esc(screen_range(d0, d1, 'duty'))} while the "
                           f"frequency moves {esc(screen_range(f0, f1, 'Hz'))}.</span>")
        self.plot_box.layout.display = None
        self.clear_message()


def flicker_html(flicker: Any, required: str | None) -> str:
    """Summary lines of a :class:`pwmkit.loads.flicker.PwmFlicker` and the requirement."""
    from ..glossary import flicker_label

    klass = flicker.classification
    req = ""
    if required is not None:
        order = ("no-effect", "low-risk", "elevated")
        met = order.index(klass) <= order.index(required)
        req = (f"<br>Requirement: <b>{esc(flicker_label(required))}</b> — "
               f"{'✔ met' if met else '✖ not met'}")
    return (f"<div class='pwmkit-flicker-summary' style='font-size:13px'>IEEE 1789 region of the design point: "
            f"<b class='pwmkit-flicker-class'>{esc(flicker_label(klass))}</b> "
            f"({num(flicker.modulation_percent, '.3g')} % modulation at {esc(fmt(flicker.frequency, 'Hz'))}, "
            f"flicker index {num(flicker.flicker_index, '.3g')}). Full on/off PWM has no observable effect above "
            f"{esc(fmt(flicker.frequency_for_no_effect, 'Hz'))}.{req}</div>")


class FlickerPanel(Panel):
    """The design point on the IEEE Std 1789-2015 flicker regions (LED loads)."""

    title = "Flicker map"
    css_name = "flicker"
    redraw_delay = PLOT_DELAY

    def __init__(self, design: Design | DesignSession, *, show_cautions: bool = True) -> None:
        super().__init__()
        from ..plots.flicker import FlickerMapPlot

        self.session = as_session(design)
        self.plot = FlickerMapPlot()
        self.summary = w.HTML()
        self.plot_box = w.VBox()
        self.refresh(self.session.evaluation)  # first data before the widget is made (see _bokeh)
        self.bokeh = _bokeh(self.plot.layout, "pwmkit-plot-flicker")
        self.plot_box.children = (self.bokeh,)
        source = w.HTML(f"<div style='font-size:11px;color:#5a6270'>Region limits: {esc(self.plot.source_note)}</div>")
        body: list[w.Widget] = [self.summary, self.plot_box, source]
        if show_cautions and self.session.design.load is not None:
            body.append(CautionsBox(self.session))
        self.set_body(body)
        self.session.subscribe(self.follow)

    @safe_callback
    def refresh(self, evaluation: Any) -> None:
        flicker = evaluation.flicker
        if flicker is None:
            self.summary.value = "<i>Flicker applies to LED loads; this design has none.</i>"
            self.plot_box.layout.display = "none"
            return
        self.plot.update(flicker)
        self.summary.value = flicker_html(flicker, self.session.design.requirements.flicker)
        self.plot_box.layout.display = None
        self.clear_message()
