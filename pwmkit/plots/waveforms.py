"""Waveforms on one time axis: capacitor voltage with both thresholds, timer output, load current."""

from __future__ import annotations

from typing import Any

import numpy as np

from .style import TRACE, engineering_scale, legend_outside, new_figure, time_scale

__all__ = ["WaveformPlot", "waveform_data", "output_high_level"]


def output_high_level(design: Any, evaluation: Any) -> float:
    """The timer's output-high level: the gate-drive model's level when it ran, else the family's [V].

    The waveform draws the output at this level so that it agrees with the gate drive shown
    beside it (a bipolar timer's output sits about 1.35 V below the supply — typical value, check
    your part's data sheet).
    """
    gate = getattr(evaluation, "gate", None)
    if gate is not None:
        return float(gate.v_gate_on)
    from ..parts.timers import get_timer

    return float(get_timer(design.timing.timer).output_high(design.vcc))


def waveform_data(timing: Any, *, cycles: float = 3.0, points_per_cycle: int = 240,
                  v_out_high: float | None = None) -> tuple[dict[str, np.ndarray], Any]:
    """Columns for the voltage plot from a scalar :class:`pwmkit.timing.AstableResult`.

    ``v_out_high`` is the timer's output-high level [V] (default: the supply); the dashboard gives
    the level the gate-drive model uses, so the drawn output and the gate drive agree.

    Returns
    -------
    (data, wave)
        ``data``: t [s], v_cap, v_out, v_upper, v_lower [V]; ``wave``: the
        :class:`pwmkit.timing.waveform.Waveform` it came from (for aligning a load current).
    """
    from ..timing.waveform import waveform  # the function (the package attribute can be the submodule)

    wave = waveform(timing, cycles=cycles, points_per_cycle=points_per_cycle, v_out_high=v_out_high)
    n = wave.t.shape[0]
    data = {
        "t": wave.t,
        "v_cap": wave.v_cap,
        "v_out": wave.v_out,
        "v_upper": np.full(n, wave.v_upper),
        "v_lower": np.full(n, wave.v_lower),
    }
    return data, wave


class WaveformPlot:
    """Two stacked plots sharing the time axis: voltages (top) and load current (bottom).

    Top: capacitor voltage (blue, solid), upper threshold (vermillion, dashed), lower threshold
    (green, dash-dot), timer output (grey, thin). Bottom: load current (purple), hidden when the
    design has no load.

    Attributes
    ----------
    layout : bokeh column layout
    source : ColumnDataSource "pwmkit-waveform" (t in display units, voltages)
    current : ColumnDataSource "pwmkit-load-current" (t, i in display units)
    """

    def __init__(self, *, width: int = 600, height: int = 200) -> None:
        from bokeh.layouts import column
        from bokeh.models import ColumnDataSource, HoverTool

        self.source = ColumnDataSource(data={k: [] for k in ("t", "v_cap", "v_out", "v_upper", "v_lower")},
                                       name="pwmkit-waveform")
        self.current = ColumnDataSource(data={"t": [], "i": []}, name="pwmkit-load-current")
        top = new_figure(title="timer waveforms", width=width, height=height, y_label="voltage [V]")
        out = top.line("t", "v_out", source=self.source, color=TRACE["output"], line_width=1.2, alpha=0.8)
        upper = top.line("t", "v_upper", source=self.source, color=TRACE["upper"], line_dash="dashed", line_width=1.5)
        lower = top.line("t", "v_lower", source=self.source, color=TRACE["lower"], line_dash="dashdot",
                         line_width=1.5)
        cap = top.line("t", "v_cap", source=self.source, color=TRACE["capacitor"], line_width=2.2)
        top.add_tools(HoverTool(renderers=[cap], tooltips=[("t", "@t{0.000}"), ("capacitor", "@v_cap{0.000} V")],
                                mode="vline"))
        self.legend = legend_outside(top, [("timer output", [out]), ("upper threshold", [upper]),
                                           ("lower threshold", [lower]), ("capacitor", [cap])])
        bottom = new_figure(title="load current", width=width, height=int(height * 0.78), x_range=top.x_range,
                            y_label="current [A]")
        load = bottom.line("t", "i", source=self.current, color=TRACE["load"], line_width=2.0)
        bottom.add_tools(HoverTool(renderers=[load], tooltips=[("t", "@t{0.000}"), ("i", "@i{0.000}")],
                                   mode="vline"))
        self.current_legend = legend_outside(bottom, [("load current", [load])])
        self.top, self.bottom = top, bottom
        self._time_unit = ""
        self._current_unit = ""
        self._out_label = ""
        self.layout = column(top, bottom)

    def update(self, timing: Any, *, led: Any = None, motor: Any = None, cycles: float = 3.0,
               v_out_high: float | None = None) -> None:
        """Show a timing result and, when given, the load current on the same time axis.

        Parameters
        ----------
        timing : AstableResult
            Scalar timing result.
        led : LedDrive, optional
            LED drive: the total current flows while the output is high.
        motor : MotorCurrent, optional
            Steady-state motor current (sampled by :func:`pwmkit.plots.loads.motor_current_trace`).
        cycles : float
            Periods shown.
        v_out_high : float, optional
            Output-high level of the timer [V] (default: the supply).
        """
        from ..glossary import plural
        from .loads import led_current_trace, motor_current_trace

        data, wave = waveform_data(timing, cycles=cycles, v_out_high=v_out_high)
        level = float(np.max(data["v_out"])) if data["v_out"].size else 0.0
        out_label = f"timer output ({level:.3g} V high)"
        if out_label != self._out_label:
            self._out_label = out_label
            from bokeh.core.properties import value

            self.legend.items[0].label = value(out_label)
        factor, unit = time_scale(float(data["t"][-1]))
        data["t"] = data["t"] / factor
        self.source.data = data
        if unit != self._time_unit:
            self._time_unit = unit
            self.bottom.xaxis.axis_label = f"time [{unit}]"
            self.top.xaxis.axis_label = f"time [{unit}]"
        if led is not None:
            t, i = led_current_trace(wave, led.i_peak_total)
            label = f"LED current, all {plural(led.n_parallel, 'string')}"
        elif motor is not None:
            t, i = motor_current_trace(timing, motor, cycles=cycles)
            label = f"motor current ({motor.mode} conduction, exact steady state)"
        else:
            self.current.data = {"t": [], "i": []}
            self.bottom.visible = False
            return
        peak = float(np.max(np.abs(i))) if i.size else 0.0
        i_factor, i_unit = engineering_scale(peak, "A")
        self.current.data = {"t": np.asarray(t, dtype=float) / factor, "i": np.asarray(i, dtype=float) / i_factor}
        if i_unit != self._current_unit:
            self._current_unit = i_unit
            self.bottom.yaxis.axis_label = f"current [{i_unit}]"
        self.bottom.title.text = label
        self.bottom.visible = True
