""""As designed vs as built": bench readings on the pot-travel plot and on the spread histograms.

:class:`AsBuiltPlot` draws, for a :class:`pwmkit.bench.Reconciliation`:

- pot designs: duty and frequency over the wiper travel as designed (solid blue) and with the
  most likely as-built part values (dashed purple), each reading as a marker at its wiper
  (circle = inside the predicted spread, cross = outside) with the predicted 0.135 … 99.865 %
  band as a vertical whisker;
- for up to :data:`MAX_READINGS` readings: the Monte Carlo histograms of frequency and duty at the
  reading's conditions, the reading as a solid vertical line and the band as a shaded box.

Figures are built once; :meth:`AsBuiltPlot.update` replaces the data sources as whole dicts.
"""

from __future__ import annotations

from typing import Any

import numpy as np

from .spread import histogram_data
from .style import OKABE_ITO, TRACE, new_figure, style_legend

__all__ = ["AsBuiltPlot", "MAX_READINGS", "AS_BUILT"]

#: Readings that get their own histograms.
MAX_READINGS = 4
#: Colours of the as-built view.
AS_BUILT = {"built": OKABE_ITO["purple"], "inside": OKABE_ITO["green"], "outside": OKABE_ITO["vermillion"]}


class AsBuiltPlot:
    """Readings against the design: pot travel (pot designs) and per-reading spread histograms.

    Attributes
    ----------
    layout : bokeh column layout
    travel : ColumnDataSource "pwmkit-asbuilt-travel" (wiper, duty, frequency, duty_built, frequency_built)
    readings : ColumnDataSource "pwmkit-asbuilt-readings" (wiper, duty, frequency, lo/hi bands, colour, marker)
    hist : list of (frequency source, duty source) per reading row
    """

    def __init__(self, *, width: int = 430, height: int = 230, pot: bool = True) -> None:
        from bokeh.layouts import column, row
        from bokeh.models import BoxAnnotation, ColumnDataSource, Span, Whisker

        self.pot = pot
        rows: list[Any] = []
        self.travel = ColumnDataSource(data={k: [] for k in ("wiper", "duty", "frequency", "duty_built",
                                                             "frequency_built")}, name="pwmkit-asbuilt-travel")
        self.readings = ColumnDataSource(data={k: [] for k in ("wiper", "duty", "frequency", "duty_lo", "duty_hi",
                                                               "frequency_lo", "frequency_hi", "colour", "marker")},
                                         name="pwmkit-asbuilt-readings")
        self.figures: dict[str, Any] = {}
        if pot:
            duty = new_figure(title="duty over the pot travel: designed and as built", width=width, height=height,
                              x_label="wiper position", y_label="duty [%]", x_range=(0, 1))
            freq = new_figure(title="frequency over the pot travel", width=width, height=height,
                              x_label="wiper position", y_label="frequency [Hz]", x_range=duty.x_range)
            for fig, key in ((duty, "duty"), (freq, "frequency")):
                fig.line("wiper", key, source=self.travel, color=TRACE["exact"], line_width=2.2, legend_label="as designed")
                fig.line("wiper", f"{key}_built", source=self.travel, color=AS_BUILT["built"], line_width=2.0,
                         line_dash="dashed", legend_label="as built (most likely)")
                fig.add_layout(Whisker(base="wiper", lower=f"{key}_lo", upper=f"{key}_hi", source=self.readings,
                                       line_color=OKABE_ITO["black"], line_alpha=0.7))
                fig.scatter("wiper", key, source=self.readings, marker="marker", size=11, fill_color="colour",
                            line_color="colour", line_width=2, legend_label="bench reading (band: predicted)")
                style_legend(fig, "top_left" if key == "duty" else "center_right")
            self.figures["duty"], self.figures["frequency"] = duty, freq
            rows.append(row(duty, freq))
        self.hist: list[tuple[Any, Any]] = []
        self._marks: list[dict[str, Any]] = []
        self._hist_figs: list[tuple[Any, Any]] = []
        self._hist_rows: list[Any] = []
        for i in range(MAX_READINGS):
            pair, marks, figs = [], {}, []
            for key, label in (("frequency", "frequency [Hz]"), ("duty", "duty [%]")):
                src = ColumnDataSource(data={"left": [], "right": [], "top": []}, name=f"pwmkit-asbuilt-{key}-{i}")
                fig = new_figure(title=f"{key} spread at reading {i}", width=width, height=int(0.85 * height),
                                 x_label=label, y_label="samples")
                fig.quad(left="left", right="right", top="top", bottom=0, source=src, fill_color=TRACE["spread"],
                         line_color="white", fill_alpha=0.85, legend_label="predicted (Monte Carlo)")
                at = ColumnDataSource(data={"x": [], "y": [], "colour": []}, name=f"pwmkit-asbuilt-{key}-{i}-reading")
                fig.scatter("x", "y", source=at, marker="inverted_triangle", size=14, fill_color="colour",
                            line_color="white", legend_label="bench reading")
                marks[f"{key}_at"] = at
                band = BoxAnnotation(fill_color=OKABE_ITO["black"], fill_alpha=0.06, line_color=None)
                line = Span(dimension="height", line_color=AS_BUILT["inside"], line_width=3)
                fig.add_layout(band)
                fig.add_layout(line)
                style_legend(fig, "top_left")
                pair.append(src)
                marks[key] = (band, line)
                figs.append(fig)
            self.hist.append((pair[0], pair[1]))
            self._marks.append(marks)
            self._hist_figs.append((figs[0], figs[1]))
            r = row(*figs)
            r.visible = False
            self._hist_rows.append(r)
            rows.append(r)
        self.layout = column(*rows)

    def update(self, rec: Any, travel: Any = None) -> None:
        """Show a :class:`pwmkit.bench.Reconciliation`; ``travel`` is the design's
        :class:`pwmkit.evaluate.PotTravel` (pot designs)."""
        verdicts = rec.readings
        if self.pot and travel is not None:
            w = np.asarray(travel.wiper, dtype=float)
            f_built, d_built = rec.as_built_timing(wiper=w)
            self.travel.data = {"wiper": w, "duty": 100.0 * np.asarray(travel.duty, dtype=float),
                                "frequency": np.asarray(travel.frequency, dtype=float),
                                "duty_built": 100.0 * np.asarray(d_built, dtype=float),
                                "frequency_built": np.asarray(f_built, dtype=float)}
            design_wiper = float(rec.design.timing.wiper)
            cols: dict[str, list[Any]] = {k: [] for k in self.readings.data}
            for r in verdicts:
                cols["wiper"].append(design_wiper if r.wiper is None else r.wiper)
                for key, scale, x in (("duty", 100.0, r.duty), ("frequency", 1.0, r.frequency)):
                    lo, hi = r.band.get(key, (np.nan, np.nan))
                    cols[key].append(np.nan if x is None else scale * x)
                    cols[f"{key}_lo"].append(scale * lo)
                    cols[f"{key}_hi"].append(scale * hi)
                cols["colour"].append(AS_BUILT["inside" if r.inside else "outside"])
                cols["marker"].append("circle" if r.inside else "x")
            self.readings.data = cols
        for i in range(MAX_READINGS):
            row = self._hist_rows[i]
            if i >= len(verdicts):
                row.visible = False
                continue
            r = verdicts[i]
            row.visible = True
            for j, (key, scale) in enumerate((("frequency", 1.0), ("duty", 100.0))):
                src, fig = self.hist[i][j], self._hist_figs[i][j]
                band, line = self._marks[i][key]
                src.data = histogram_data(getattr(r.spread, f"{key}_histogram"), scale)
                x = getattr(r, key)
                lo, hi = r.band.get(key, (None, None))
                band.visible = lo is not None
                if lo is not None:
                    band.left, band.right = lo * scale, hi * scale
                line.visible = x is not None
                colour = AS_BUILT["inside" if r.inside else "outside"]
                if x is not None:  # the marker also puts the reading inside the plot's range
                    line.location = x * scale
                    line.line_color = colour
                self._marks[i][f"{key}_at"].data = ({"x": [x * scale], "y": [0.0], "colour": [colour]} if x is not None
                                                    else {"x": [], "y": [], "colour": []})
                pct = f" — reading at {r.percentile[key]:.3g} %" if key in r.percentile else " — not measured"
                fig.title.text = f"{key} at {r.label}{pct}"
