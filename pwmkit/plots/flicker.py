"""Flicker map: the design point on the IEEE Std 1789-2015 regions (log–log axes)."""

from __future__ import annotations

from typing import Any

import numpy as np

from .style import INK, REGION, TRACE, legend_outside, new_figure

__all__ = ["FlickerMapPlot", "region_polygons"]

#: Modulation shown at the bottom of the log axis [%] (a region's floor on the plot).
FLOOR_PERCENT = 0.01
#: Level used for "no restriction" at the top of the regions [%].
TOP_PERCENT = 120.0
#: Top of the plot's frame, above every region and every design point [%].
FRAME_TOP_PERCENT = 300.0


def region_polygons(curves: Any, floor: float = FLOOR_PERCENT, top: float = TOP_PERCENT) -> dict[str, tuple[list, list]]:
    """Polygons (x [Hz], y [%]) of the three regions from :func:`pwmkit.loads.flicker.ieee1789_curves`.

    "no-effect" lies under the no-effect boundary, "low-risk" between the two boundaries,
    "elevated" above the low-risk boundary up to ``top``.
    """
    nf = np.asarray(curves.no_effect_frequency, dtype=float)
    npct = np.asarray(curves.no_effect_percent, dtype=float)
    lf = np.asarray(curves.low_risk_frequency, dtype=float)
    lp = np.asarray(curves.low_risk_percent, dtype=float)
    f0, f1 = float(min(nf[0], lf[0])), float(max(nf[-1], lf[-1]))
    no_effect = ([f0, *nf.tolist(), f1], [floor, *npct.tolist(), floor])
    low_risk = ([*lf.tolist(), *nf[::-1].tolist()], [*lp.tolist(), *npct[::-1].tolist()])
    elevated = ([*lf.tolist(), f1, f0], [*lp.tolist(), top, top])
    return {"no-effect": no_effect, "low-risk": low_risk, "elevated": elevated}


class FlickerMapPlot:
    """The IEEE 1789 regions with the design point (and its frequency spread when given).

    Parameters
    ----------
    f_min, f_max : float
        Frequency span of the map [Hz].

    Attributes
    ----------
    layout : bokeh figure
    point : ColumnDataSource "pwmkit-flicker-point" (frequency, modulation, label)
    """

    def __init__(self, *, f_min: float = 10.0, f_max: float = 1e5, width: int = 640, height: int = 300) -> None:
        from bokeh.models import ColumnDataSource, HoverTool

        from ..loads.flicker import ieee1789_curves

        curves = ieee1789_curves(f_min, f_max, TOP_PERCENT)
        self.source_note = curves.source
        fig = new_figure(title="flicker map (IEEE Std 1789-2015 regions)", width=width, height=height,
                         x_axis_type="log", y_axis_type="log", x_range=(f_min, f_max),
                         y_range=(FLOOR_PERCENT, FRAME_TOP_PERCENT), x_label="PWM frequency [Hz]",
                         y_label="percent modulation [%]")
        from ..glossary import flicker_label

        self._f_span = (f_min, f_max)
        hatch = {"no-effect": " ", "low-risk": ".", "elevated": "x"}
        items = []
        for name, (xs, ys) in region_polygons(curves).items():
            patch = fig.patch(xs, ys, fill_color=REGION[name], fill_alpha=0.28, line_color=REGION[name],
                              line_width=1.5, hatch_pattern=hatch[name], hatch_color=INK["muted"], hatch_alpha=0.25)
            items.append((flicker_label(name), [patch]))
        self.point = ColumnDataSource(data={"frequency": [], "modulation": [], "label": []},
                                      name="pwmkit-flicker-point")
        renderer = fig.scatter("frequency", "modulation", source=self.point, size=13, marker="diamond",
                               fill_color=TRACE["marker"], line_color="white", line_width=1.5)
        fig.add_tools(HoverTool(renderers=[renderer], tooltips=[("", "@label")]))
        legend_outside(fig, [*items, ("design point", [renderer])])
        fig.legend.click_policy = "none"
        self.layout = fig
        self.figure = fig

    def update(self, flicker: Any) -> None:
        """Show a :class:`pwmkit.loads.flicker.PwmFlicker` result."""
        from ..glossary import flicker_label
        from ..numstyle import screen

        # the marker is drawn whole inside the frame: clamp into the frame with a margin of a
        # marker's size on the log axes (the label keeps the true figures)
        mod = min(max(float(flicker.modulation_percent), 1.6 * FLOOR_PERCENT), FRAME_TOP_PERCENT / 1.6)
        f0, f1 = self._f_span
        freq = min(max(float(flicker.frequency), 1.3 * f0), f1 / 1.3)
        label = (f"{screen(flicker.frequency, 'Hz')}, {screen(flicker.modulation_percent, '%')} modulation: "
                 f"{flicker_label(flicker.classification)}")
        self.point.data = {"frequency": [freq], "modulation": [mod], "label": [label]}
        self.figure.title.text = f"flicker map — design point: {flicker_label(flicker.classification)}"
