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
    windows : dict "duty", "frequency" of BoxAnnotation — the requirement (:meth:`show_requirements`), in the
        units of the axes (duty in %, frequency in the axis' prefixed unit), named in the legend when shown
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
        self._f_factor = 1.0
        self._requirements: tuple[Any, Any] = (None, None)
        from bokeh.models import BoxAnnotation, LegendItem

        self.windows = {}
        self._legends = {}
        self._window_items = {}
        for fig, key in ((duty, "duty"), (freq, "frequency")):  # the requirement, hidden until set
            box = BoxAnnotation(fill_color=TRACE["window"], fill_alpha=0.08, line_color=TRACE["window"],
                                line_width=1.5, visible=False)
            fig.add_layout(box)
            self.windows[key] = box
            # an annotation has no legend entry of its own: an empty box glyph in its style stands for it
            proxy = fig.quad(left=[np.nan], right=[np.nan], bottom=[np.nan], top=[np.nan], fill_color=TRACE["window"], fill_alpha=0.3, line_color=TRACE["window"],
                               line_width=1.5)
            self._legends[key] = fig.legend[0]
            self._window_items[key] = LegendItem(label="requirement window", renderers=[proxy])
        self.layout = row(duty, freq)

    def show_requirements(self, frequency_window: Any = None, duty_range: Any = None) -> None:
        """Draw the required frequency window and the duty range to reach (green boxes); None hides one.

        The boxes are in the axes' units (duty in %, frequency in the prefixed unit of its axis) and
        are named in the legend while shown.
        """
        self._requirements = (frequency_window, duty_range)
        for key, window, scale in (("frequency", frequency_window, 1.0 / self._f_factor), ("duty", duty_range, 100.0)):
            box = self.windows[key]
            legend = self._legends[key]
            entry = self._window_items[key]
            shown = any(item is entry for item in legend.items)
            if window is None:
                if box.visible:
                    box.visible = False
                if shown:
                    legend.items = [item for item in legend.items if item is not entry]
            else:
                bottom, top = float(window[0]) * scale, float(window[1]) * scale
                if (box.bottom, box.top) != (bottom, top):  # a bokeh property set is a message to the page
                    box.bottom, box.top = bottom, top
                if not box.visible:
                    box.visible = True
                if not shown:
                    legend.items = [*legend.items, entry]

    def update(self, travel: Any, timing: Any, wiper: float) -> None:
        """Show a :class:`pwmkit.evaluate.PotTravel` and mark the design's wiper and timing."""
        from .style import engineering_scale

        f_all = np.concatenate([np.asarray(travel.frequency, dtype=float), np.asarray(travel.frequency_ideal, dtype=float)])
        f_factor, f_unit = engineering_scale(float(np.nanmax(np.abs(f_all))) if f_all.size else 1.0, "Hz")
        if f_unit != self._f_unit:
            self._f_unit, self._f_factor = f_unit, f_factor
            self.frequency_figure.yaxis.axis_label = f"frequency [{f_unit}]"
            if self._requirements != (None, None):
                self.show_requirements(*self._requirements)
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
