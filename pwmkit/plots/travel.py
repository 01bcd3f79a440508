"""Pot travel: duty and frequency against the wiper position, exact and textbook, current wiper marked."""

from __future__ import annotations

from typing import Any

import numpy as np

from .style import TRACE, new_figure, style_legend

__all__ = ["PotTravelPlot"]


class PotTravelPlot:
    """Two plots over the wiper travel 0 … 100 %: duty [%] (left) and frequency (right, engineering unit).

    Exact model: solid blue; the 0.693 estimate: dashed orange; the current wiper: a black
    diamond on each exact curve. The curves are re-sent only when they change (a wiper move
    changes only the marker).

    Attributes
    ----------
    layout : bokeh row layout
    source : ColumnDataSource "pwmkit-pot-travel" (wiper [%], duty [%], duty_ideal, frequency, frequency_ideal
        in the unit of the frequency axis)
    marker : ColumnDataSource "pwmkit-pot-marker" (wiper [%], duty [%], frequency)
    """

    def __init__(self, *, width: int = 390, height: int = 260) -> None:
        from bokeh.layouts import row
        from bokeh.models import ColumnDataSource, Legend

        cols = ("wiper", "duty", "duty_ideal", "frequency", "frequency_ideal")
        self.source = ColumnDataSource(data={k: [] for k in cols}, name="pwmkit-pot-travel")
        self.marker = ColumnDataSource(data={"wiper": [], "duty": [], "frequency": []}, name="pwmkit-pot-marker")
        from ..glossary import ESTIMATE, EXACT

        duty = new_figure(title="duty over the pot travel", width=width, height=height, x_label="wiper position [%]",
                          y_label="duty [%]", x_range=(0, 100))
        freq = new_figure(title="frequency over the pot travel", width=width, height=height,
                          x_label="wiper position [%]", y_label="frequency [Hz]", x_range=duty.x_range)
        for fig, key in ((duty, "duty"), (freq, "frequency")):
            exact = fig.line("wiper", key, source=self.source, color=TRACE["exact"], line_width=2.2)
            ideal = fig.line("wiper", f"{key}_ideal", source=self.source, color=TRACE["ideal"], line_width=1.8,
                             line_dash="dashed")
            now = fig.scatter("wiper", key, source=self.marker, marker="diamond", size=13,
                              fill_color=TRACE["marker"], line_color="white")
            legend = Legend(items=[(EXACT, [exact]), (ESTIMATE, [ideal]), ("wiper now", [now])],
                            orientation="horizontal")
            fig.add_layout(legend, "below")
            style_legend(fig)
        self.duty_figure, self.frequency_figure = duty, freq
        self._f_unit = ""
        self.layout = row(duty, freq)

    def update(self, travel: Any, timing: Any, wiper: float) -> None:
        """Show a :class:`pwmkit.evaluate.PotTravel` and mark the design's wiper and timing."""
        from .style import engineering_scale

        f_all = np.concatenate([np.asarray(travel.frequency, dtype=float), np.asarray(travel.frequency_ideal, dtype=float)])
        f_factor, f_unit = engineering_scale(float(np.nanmax(np.abs(f_all))) if f_all.size else 1.0, "Hz")
        if f_unit != self._f_unit:
            self._f_unit = f_unit
            self.frequency_figure.yaxis.axis_label = f"frequency [{f_unit}]"
        data = {
            "wiper": 100.0 * np.asarray(travel.wiper, dtype=float),
            "duty": 100.0 * np.asarray(travel.duty, dtype=float),
            "duty_ideal": 100.0 * np.asarray(travel.duty_ideal, dtype=float),
            "frequency": np.asarray(travel.frequency, dtype=float) / f_factor,
            "frequency_ideal": np.asarray(travel.frequency_ideal, dtype=float) / f_factor,
        }
        old = self.source.data
        if not all(k in old and np.array_equal(np.asarray(old[k]), v) for k, v in data.items()):
            self.source.data = data
        self.marker.data = {"wiper": [100.0 * float(wiper)], "duty": [100.0 * float(timing.duty)],
                            "frequency": [float(timing.frequency) / f_factor]}
        from ..numstyle import screen_range

        d0, d1 = travel.duty_range
        self.duty_figure.title.text = f"duty over the pot travel — reaches {screen_range(d0, d1, 'duty')}"
