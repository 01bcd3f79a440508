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
        self.layout = row(duty, freq)

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
