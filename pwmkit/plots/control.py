"""Two-timer PWM and heater plots: duty against the control voltage, element temperature against duty."""

from __future__ import annotations

from typing import Any

import numpy as np

from .style import TRACE, new_figure, style_legend

__all__ = ["ControlPlot", "HeaterPlot", "StepPlot"]


class ControlPlot:
    """Duty [%] against the control-pin voltage over the design's control range: the exact model
    (solid), the endpoint straight line (dashed) and the operating point (diamond).

    Attributes
    ----------
    layout : bokeh figure
    source : ColumnDataSource "pwmkit-control" (vctl, duty, line)
    marker : ColumnDataSource "pwmkit-control-marker" (vctl, duty)
    """

    def __init__(self, *, width: int = 430, height: int = 240) -> None:
        from bokeh.models import ColumnDataSource

        self.source = ColumnDataSource(data={"vctl": [], "duty": [], "line": []}, name="pwmkit-control")
        self.marker = ColumnDataSource(data={"vctl": [], "duty": []}, name="pwmkit-control-marker")
        fig = new_figure(title="duty over the control range", width=width, height=height,
                         x_label="control pin [V]", y_label="duty [%]")
        fig.line("vctl", "duty", source=self.source, color=TRACE["exact"], line_width=2.2, legend_label="exact model")
        fig.line("vctl", "line", source=self.source, color=TRACE["ideal"], line_width=1.8, line_dash="dashed",
                 legend_label="straight line")
        fig.scatter("vctl", "duty", source=self.marker, marker="diamond", size=13, fill_color=TRACE["marker"],
                    line_color="white", legend_label="operating point")
        style_legend(fig, "top_left")
        self.figure = fig
        self.layout = fig

    def update(self, control: Any, v_pin: float, duty: float) -> None:
        """Show a :class:`pwmkit.timing.ControlRange` and mark the operating point."""
        v = np.asarray(control.vctl, dtype=float)
        line = control.duty_low + control.slope * (v - control.vctl_low)
        self.source.data = {"vctl": v, "duty": 100.0 * np.asarray(control.duty, dtype=float), "line": 100.0 * line}
        self.marker.data = {"vctl": [float(v_pin)], "duty": [100.0 * float(duty)]}
        self.figure.title.text = (f"duty over the control range — {100 * control.duty_low:.3g} … "
                                  f"{100 * control.duty_high:.4g} %, ±{100 * control.linearity_error:.2g} pt from a line")


class HeaterPlot:
    """Steady element temperature [°C] against duty (nominal ambient), with the operating point and
    the surface limit.

    Attributes
    ----------
    layout : bokeh figure
    source : ColumnDataSource "pwmkit-heater" (duty, t_element_c, limit)
    marker : ColumnDataSource "pwmkit-heater-marker" (duty, t_element_c)
    """

    def __init__(self, *, width: int = 430, height: int = 240) -> None:
        from bokeh.models import ColumnDataSource

        self.source = ColumnDataSource(data={"duty": [], "t_element_c": [], "limit": []}, name="pwmkit-heater")
        self.marker = ColumnDataSource(data={"duty": [], "t_element_c": []}, name="pwmkit-heater-marker")
        fig = new_figure(title="element temperature over duty", width=width, height=height, x_label="duty [%]",
                         y_label="element [°C]", x_range=(0, 100))
        fig.line("duty", "t_element_c", source=self.source, color=TRACE["exact"], line_width=2.2,
                 legend_label="steady temperature")
        fig.line("duty", "limit", source=self.source, color=TRACE["ideal"], line_width=1.8, line_dash="dashed",
                 legend_label="surface limit")
        fig.scatter("duty", "t_element_c", source=self.marker, marker="diamond", size=13, fill_color=TRACE["marker"],
                    line_color="white", legend_label="operating point")
        style_legend(fig, "bottom_right")
        self.figure = fig
        self.layout = fig

    def update(self, heater_part: Any, limit_c: float) -> None:
        """Show a :class:`pwmkit.evaluate_heater.HeaterPart`."""
        sw, el = heater_part.sweep, heater_part.element
        d = 100.0 * np.asarray(sw.duty, dtype=float)
        self.source.data = {"duty": d, "t_element_c": np.asarray(sw.t_element_c, dtype=float),
                            "limit": np.full(d.shape, float(limit_c))}
        self.marker.data = {"duty": [100.0 * float(el.duty)], "t_element_c": [float(el.t_element_c)]}


class StepPlot:
    """Warm-up of the thermistor loop from ambient: element and thermistor temperature over time.

    Attributes
    ----------
    layout : bokeh figure
    source : ColumnDataSource "pwmkit-heater-step" (t in minutes, t_element_c, t_sensor_c)
    """

    def __init__(self, *, width: int = 430, height: int = 240) -> None:
        from bokeh.models import ColumnDataSource

        self.source = ColumnDataSource(data={"t": [], "t_element_c": [], "t_sensor_c": []}, name="pwmkit-heater-step")
        fig = new_figure(title="warm-up with the thermostat", width=width, height=height, x_label="time [min]",
                         y_label="temperature [°C]")
        fig.line("t", "t_element_c", source=self.source, color=TRACE["exact"], line_width=2.2, legend_label="element")
        fig.line("t", "t_sensor_c", source=self.source, color=TRACE["ideal"], line_width=1.8, line_dash="dashed",
                 legend_label="thermistor")
        style_legend(fig, "bottom_right")
        self.figure = fig
        self.layout = fig

    def update(self, step: Any) -> None:
        """Show a :class:`pwmkit.loads.heater.StepResponse`."""
        self.source.data = {"t": np.asarray(step.t, dtype=float) / 60.0,
                            "t_element_c": np.asarray(step.t_element_c, dtype=float),
                            "t_sensor_c": np.asarray(step.t_sensor_c, dtype=float)}
        self.figure.title.text = (f"warm-up with the thermostat — settles at {step.t_final_c:.3g} °C in "
                                  f"{step.settling_time / 60:.3g} min, overshoot {step.overshoot:.2g} K")
