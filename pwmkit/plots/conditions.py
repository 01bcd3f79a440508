"""Frequency and duty against supply voltage and against ambient temperature, with the requirement window."""

from __future__ import annotations

from typing import Any

import numpy as np

from .style import TRACE, engineering_scale, new_figure, style_legend

__all__ = ["ConditionsPlot"]


class ConditionsPlot:
    """Four small plots: frequency and duty over the supply range and over the ambient range.

    Each shows the middle line (solid), the band of the timer's and capacitor's coefficients
    (shaded) and the required window (green box; duty only for fixed-duty topologies).

    Attributes
    ----------
    layout : bokeh grid layout
    sources : dict "supply", "ambient" of ColumnDataSource (x, frequency, frequency_low, frequency_high,
        duty, duty_low, duty_high; frequency in the axis unit named by ``frequency_unit``, duty in %)
    frequency_unit : prefixed unit of the frequency axes ("kHz" …), chosen like the text's numbers
    """

    def __init__(self, *, width: int = 330, height: int = 200) -> None:
        from bokeh.layouts import gridplot
        from bokeh.models import BoxAnnotation, ColumnDataSource

        cols = ("x", "frequency", "frequency_low", "frequency_high", "duty", "duty_low", "duty_high")
        self.sources: dict[str, Any] = {}
        self.figures: dict[tuple[str, str], Any] = {}
        self.windows: dict[tuple[str, str], Any] = {}
        self._window_legend: dict[tuple[str, str], Any] = {}
        self.frequency_unit = "Hz"
        for cond, label in (("supply", "supply [V]"), ("ambient", "ambient [°C]")):
            src = ColumnDataSource(data={k: [] for k in cols}, name=f"pwmkit-conditions-{cond}")
            self.sources[cond] = src
            for q, y_label in (("frequency", "frequency [Hz]"), ("duty", "duty [%]")):
                fig = new_figure(title=f"{q} vs {cond}", width=width, height=height, x_label=label, y_label=y_label)
                fig.varea("x", f"{q}_low", f"{q}_high", source=src, fill_color=TRACE["spread"], fill_alpha=0.4,
                          legend_label="coefficient band")
                fig.line("x", q, source=src, color=TRACE["exact"], line_width=2, legend_label="nominal parts")
                box = BoxAnnotation(fill_color=TRACE["window"], fill_alpha=0.08, line_color=TRACE["window"],
                                    line_width=1.5, visible=False)
                fig.add_layout(box)
                # an annotation has no legend entry: an empty box in its style names it (shown with it)
                proxy = fig.quad(left=[np.nan], right=[np.nan], bottom=[np.nan], top=[np.nan], fill_color=TRACE["window"], fill_alpha=0.3,
                                   line_color=TRACE["window"], line_width=1.5, legend_label="requirement window",
                                   visible=False)
                style_legend(fig, "top_left")
                self.figures[(cond, q)] = fig
                self.windows[(cond, q)] = box
                self._window_legend[(cond, q)] = proxy
        self.layout = gridplot([[self.figures[("supply", "frequency")], self.figures[("ambient", "frequency")]],
                                [self.figures[("supply", "duty")], self.figures[("ambient", "duty")]]],
                               toolbar_location=None)

    def update(self, sweep: Any, frequency_window: tuple[float, float] | None = None,
               duty_window: tuple[float, float] | None = None) -> None:
        """Show a :class:`pwmkit.condition_sweep.ConditionSweep` and the required windows."""
        highs = [np.max(np.abs(np.asarray(getattr(sweep, cond).frequency_high, dtype=float)))
                 for cond in ("supply", "ambient")]
        largest = max([h for h in highs if np.isfinite(h)] + ([frequency_window[1]] if frequency_window else []) + [0.0])
        f_scale, self.frequency_unit = engineering_scale(largest, "Hz")  # axis prefix as the text's numbers
        for cond in ("supply", "ambient"):
            self.figures[(cond, "frequency")].yaxis.axis_label = f"frequency [{self.frequency_unit}]"
            c = getattr(sweep, cond)
            self.sources[cond].data = {
                "x": np.asarray(c.x, dtype=float), "frequency": np.asarray(c.frequency, dtype=float) / f_scale,
                "frequency_low": np.asarray(c.frequency_low, dtype=float) / f_scale,
                "frequency_high": np.asarray(c.frequency_high, dtype=float) / f_scale,
                "duty": 100 * np.asarray(c.duty, dtype=float), "duty_low": 100 * np.asarray(c.duty_low, dtype=float),
                "duty_high": 100 * np.asarray(c.duty_high, dtype=float)}
            for q, window, scale in (("frequency", frequency_window, 1.0 / f_scale), ("duty", duty_window, 100.0)):
                box = self.windows[(cond, q)]
                if window is None:
                    box.visible = False
                else:
                    box.bottom, box.top = window[0] * scale, window[1] * scale
                    box.visible = True
                self._window_legend[(cond, q)].visible = box.visible
