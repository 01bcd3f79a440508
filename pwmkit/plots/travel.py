"""Pot travel: duty and frequency against the wiper position, exact and textbook, current wiper marked."""

from __future__ import annotations

from typing import Any

import numpy as np

from .style import TRACE, new_figure, style_legend

__all__ = ["PotTravelPlot"]


class PotTravelPlot:
    """Two plots over the wiper travel 0 … 1: duty [%] (left) and frequency [Hz] (right).

    Exact model: solid blue; textbook ln 2 form: dashed orange; the current wiper: a black
    diamond on each exact curve. The curves are re-sent only when they change (a wiper move
    changes only the marker).

    Attributes
    ----------
    layout : bokeh row layout
    source : ColumnDataSource "pwmkit-pot-travel" (wiper, duty, duty_ideal, frequency, frequency_ideal)
    marker : ColumnDataSource "pwmkit-pot-marker" (wiper, duty, frequency)
    windows : dict "duty", "frequency" of BoxAnnotation — the requirement (:meth:`show_requirements`)
    """

    def __init__(self, *, width: int = 430, height: int = 240) -> None:
        from bokeh.layouts import row
        from bokeh.models import ColumnDataSource

        cols = ("wiper", "duty", "duty_ideal", "frequency", "frequency_ideal")
        self.source = ColumnDataSource(data={k: [] for k in cols}, name="pwmkit-pot-travel")
        self.marker = ColumnDataSource(data={"wiper": [], "duty": [], "frequency": []}, name="pwmkit-pot-marker")
        duty = new_figure(title="duty over the pot travel", width=width, height=height, x_label="wiper position",
                          y_label="duty [%]", x_range=(0, 1))
        freq = new_figure(title="frequency over the pot travel", width=width, height=height,
                          x_label="wiper position", y_label="frequency [Hz]", x_range=duty.x_range)
        for fig, key in ((duty, "duty"), (freq, "frequency")):
            fig.line("wiper", key, source=self.source, color=TRACE["exact"], line_width=2.2, legend_label="exact model")
            fig.line("wiper", f"{key}_ideal", source=self.source, color=TRACE["ideal"], line_width=1.8,
                     line_dash="dashed", legend_label="textbook ln 2")
            fig.scatter("wiper", key, source=self.marker, marker="diamond", size=13, fill_color=TRACE["marker"],
                        line_color="white", legend_label="wiper now")
            style_legend(fig, "top_left" if key == "duty" else "top_center")
        self.duty_figure, self.frequency_figure = duty, freq
        from bokeh.models import BoxAnnotation

        self.windows = {}
        for fig, key in ((duty, "duty"), (freq, "frequency")):  # the requirement, hidden until set
            box = BoxAnnotation(fill_color=TRACE["window"], fill_alpha=0.08, line_color=TRACE["window"],
                                line_width=1.5, visible=False)
            fig.add_layout(box)
            self.windows[key] = box
        self.layout = row(duty, freq)

    def show_requirements(self, frequency_window: Any = None, duty_range: Any = None) -> None:
        """Draw the required frequency window and the duty range to reach (green boxes); None hides one."""
        for key, window, scale in (("frequency", frequency_window, 1.0), ("duty", duty_range, 100.0)):
            box = self.windows[key]
            if window is None:
                box.visible = False
            else:
                box.bottom, box.top = float(window[0]) * scale, float(window[1]) * scale
                box.visible = True

    def update(self, travel: Any, timing: Any, wiper: float) -> None:
        """Show a :class:`pwmkit.evaluate.PotTravel` and mark the design's wiper and timing."""
        data = {
            "wiper": np.asarray(travel.wiper, dtype=float),
            "duty": 100.0 * np.asarray(travel.duty, dtype=float),
            "duty_ideal": 100.0 * np.asarray(travel.duty_ideal, dtype=float),
            "frequency": np.asarray(travel.frequency, dtype=float),
            "frequency_ideal": np.asarray(travel.frequency_ideal, dtype=float),
        }
        old = self.source.data
        if not all(k in old and np.array_equal(np.asarray(old[k]), v) for k, v in data.items()):
            self.source.data = data
        self.marker.data = {"wiper": [float(wiper)], "duty": [100.0 * float(timing.duty)],
                            "frequency": [float(timing.frequency)]}
        d0, d1 = travel.duty_range
        self.duty_figure.title.text = f"duty over the pot travel — reaches {100 * d0:.3g} … {100 * d1:.4g} %"
