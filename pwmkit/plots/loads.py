"""Load-side plots: motor current over a few periods, MOSFET loss breakdown, load-current traces."""

from __future__ import annotations

from typing import Any

import numpy as np

from .style import OKABE_ITO, TRACE, engineering_scale, legend_outside, new_figure, time_scale

__all__ = ["MotorCurrentPlot", "LossBarsPlot", "motor_current_trace", "led_current_trace", "LOSS_TERMS"]

#: MOSFET loss terms shown as bars: (attribute of MosfetLosses, label).
LOSS_TERMS = (
    ("p_cond", "conduction"),
    ("p_sw_on", "switching on"),
    ("p_sw_off", "switching off"),
    ("p_coss", "output capacitance"),
    ("p_rr", "diode recovery"),
    ("p_gate_internal", "gate (internal R)"),
)


def motor_current_trace(timing: Any, motor: Any, *, cycles: float = 3.0) -> tuple[np.ndarray, np.ndarray]:
    """Exact steady-state armature current over ``cycles`` periods, from switch turn-on.

    Samples :func:`pwmkit.loads.motor_waveform.current_waveform` (first-order segments between
    the computed turning points ``i_min``/``i_max`` and, in discontinuous conduction, the
    diode cut-off).

    Returns
    -------
    (t, i) : numpy arrays [s], [A]
    """
    from ..loads.motor_waveform import current_waveform

    wave = current_waveform(motor, float(timing.t_high), float(timing.period), cycles=cycles)
    return wave.t, wave.i


def led_current_trace(wave: Any, i_on: float) -> tuple[np.ndarray, np.ndarray]:
    """Total LED current over a sampled timer waveform: ``i_on`` while the output is high, else 0.

    Parameters
    ----------
    wave : pwmkit.timing.waveform.Waveform
    i_on : float
        On-state current of all strings (``LedDrive.i_peak_total``) [A].
    """
    return wave.t, np.where(wave.output_high, float(i_on), 0.0)


class MotorCurrentPlot:
    """Motor current over a few PWM periods with the mean as a dashed line.

    Attributes
    ----------
    layout : bokeh figure; source : ColumnDataSource "pwmkit-motor-current"
    """

    def __init__(self, *, width: int = 520, height: int = 220) -> None:
        from bokeh.models import ColumnDataSource

        self.source = ColumnDataSource(data={"t": [], "i": [], "mean": []}, name="pwmkit-motor-current")
        fig = new_figure(title="motor current", width=width, height=height, y_label="current [A]")
        arm = fig.line("t", "i", source=self.source, color=TRACE["load"], line_width=2.2)
        mean = fig.line("t", "mean", source=self.source, color=OKABE_ITO["black"], line_dash="dashed", line_width=1.2)
        legend_outside(fig, [("armature current", [arm]), ("mean", [mean])])
        self.figure = self.layout = fig
        self._unit = ""

    def update(self, timing: Any, motor: Any) -> None:
        t, i = motor_current_trace(timing, motor)
        factor, unit = time_scale(float(t[-1]))
        peak = float(np.max(i)) if i.size else 0.0
        i_factor, i_unit = engineering_scale(peak, "A")
        self.source.data = {"t": t / factor, "i": i / i_factor, "mean": np.full(t.shape, float(motor.i_mean) / i_factor)}
        label = f"time [{unit}] / current [{i_unit}]"
        if label != self._unit:
            self._unit = label
            self.figure.xaxis.axis_label = f"time [{unit}]"
            self.figure.yaxis.axis_label = f"current [{i_unit}]"
        from ..numstyle import screen

        self.figure.title.text = (f"motor current — {motor.mode} conduction, ripple "
                                  f"{screen(motor.i_ripple_pp, 'A')} peak to peak")


class LossBarsPlot:
    """Horizontal bars of the MOSFET loss terms.

    Attributes
    ----------
    layout : bokeh figure; source : ColumnDataSource "pwmkit-mosfet-losses" (term, power in the unit of the
    axis, which takes the engineering prefix of the largest term: µW, mW or W)
    """

    def __init__(self, *, width: int = 520, height: int = 220) -> None:
        from bokeh.models import ColumnDataSource, HoverTool

        labels = [label for _k, label in LOSS_TERMS]
        self.source = ColumnDataSource(data={"term": labels, "power": [0.0] * len(labels)},
                                       name="pwmkit-mosfet-losses")
        fig = new_figure(title="MOSFET losses", width=width, height=height, y_range=labels[::-1],
                         x_label="power [mW]")
        fig.hbar(y="term", right="power", height=0.65, source=self.source, fill_color=OKABE_ITO["blue"],
                 line_color=None)
        self._hover = HoverTool(tooltips=[("", "@term"), ("power", "@power{0.000} mW")])
        fig.add_tools(self._hover)
        fig.x_range.start = 0
        fig.xaxis.major_label_orientation = 0
        self.figure = self.layout = fig
        self._unit = "mW"

    def update(self, losses: Any) -> None:
        powers = []
        for key, _label in LOSS_TERMS:
            value = getattr(losses, key, None)
            try:
                v = float(value)
            except (TypeError, ValueError):
                v = 0.0
            powers.append(v if np.isfinite(v) else 0.0)
        factor, unit = engineering_scale(max(powers) if powers else 0.0, "W")
        if unit != self._unit:
            self._unit = unit
            self.figure.xaxis.axis_label = f"power [{unit}]"
            self._hover.tooltips = [("", "@term"), ("power", f"@power{{0.000}} {unit}")]
        self.source.data = {"term": [label for _k, label in LOSS_TERMS], "power": [p / factor for p in powers]}
        from ..numstyle import screen

        total = getattr(losses, "p_total", None)
        title = ("MOSFET losses — thermal runaway: no stable temperature" if total is None
                 else f"MOSFET losses — total {screen(total, 'W')}")
        if self.figure.title.text != title:
            self.figure.title.text = title
