"""Monte Carlo histograms of frequency and duty with the worst-case band and the requirement window."""

from __future__ import annotations

from typing import Any

import numpy as np

from .style import INK, TRACE, engineering_scale, legend_outside, new_figure

__all__ = ["SpreadPlot", "histogram_data"]


def histogram_data(histogram: Any, scale: float = 1.0) -> dict[str, np.ndarray]:
    """Quad columns (left, right, top) of a :class:`pwmkit.tolerance.Histogram`.

    Parameters
    ----------
    histogram : Histogram
        ``counts`` and ``edges``.
    scale : float
        Factor applied to the edges (100 turns duty fractions into %; 1e-3 turns Hz into kHz).
    """
    edges = np.asarray(histogram.edges, dtype=float) * scale
    counts = np.asarray(histogram.counts, dtype=float)
    return {"left": edges[:-1], "right": edges[1:], "top": counts}


_EMPTY_BAND: dict[str, list[float]] = {"x0": [], "x1": []}
_EMPTY_LINE: dict[str, list[float]] = {"x": []}


class SpreadPlot:
    """Two histograms (frequency above duty) of a Monte Carlo run.

    Drawn on each histogram and named in its legend (right of the data area): the worst-case band
    (hatched, orange), the requirement window edges (green solid lines) and the nominal value
    (black dashed line). The frequency axis uses the engineering prefix of the nominal frequency
    (the unit the texts use); each title quotes the share of samples inside *its own* window.

    Attributes
    ----------
    layout : bokeh layout (put it in a :class:`pwmkit.widgets.tabs.LivePlot`)
    sources : dict of ColumnDataSource, keys "frequency" and "duty"
    bands, windows, nominals : dict of ColumnDataSource per key (worst case x0/x1, window x, nominal x)
    """

    def __init__(self, *, width: int = 640, height: int = 210) -> None:
        from bokeh.layouts import column
        from bokeh.models import ColumnDataSource

        self.sources: dict[str, Any] = {}
        self.figures: dict[str, Any] = {}
        self.bands: dict[str, Any] = {}
        self.windows: dict[str, Any] = {}
        self.nominals: dict[str, Any] = {}
        self._units: dict[str, str] = {"frequency": "Hz", "duty": "%"}
        for key, label in (("frequency", "frequency [Hz]"), ("duty", "duty [%]")):
            src = ColumnDataSource(data={"left": [], "right": [], "top": []}, name=f"pwmkit-spread-{key}")
            band = ColumnDataSource(data=dict(_EMPTY_BAND), name=f"pwmkit-spread-{key}-worst")
            window = ColumnDataSource(data=dict(_EMPTY_LINE), name=f"pwmkit-spread-{key}-window")
            nominal = ColumnDataSource(data=dict(_EMPTY_LINE), name=f"pwmkit-spread-{key}-nominal")
            fig = new_figure(title=f"{key} spread", width=width, height=height, x_label=label, y_label="samples")
            bars = fig.quad(left="left", right="right", top="top", bottom=0, source=src, fill_color=TRACE["spread"],
                            line_color="white", fill_alpha=0.85)
            worst = fig.vstrip(x0="x0", x1="x1", source=band, fill_color=TRACE["worst"], fill_alpha=0.12,
                               hatch_pattern="/", hatch_color=TRACE["worst"], hatch_alpha=0.5,
                               line_color=TRACE["worst"])
            edges = fig.vspan(x="x", source=window, line_color=TRACE["window"], line_width=2)
            nom = fig.vspan(x="x", source=nominal, line_color=INK["text"], line_dash="dashed", line_width=1.5)
            legend_outside(fig, [("Monte Carlo samples", [bars]), ("worst case", [worst]),
                                 ("requirement window", [edges]), ("nominal", [nom])])
            self.sources[key], self.figures[key] = src, fig
            self.bands[key], self.windows[key], self.nominals[key] = band, window, nominal
        self.layout = column(self.figures["frequency"], self.figures["duty"])  # stacked: fits a 1280 px window

    def update(self, spread: Any, worst_case: Any = None) -> None:
        """Show a :class:`pwmkit.tolerance.SpreadResult` and optionally a ``WorstCaseResult``."""
        from ..numstyle import screen

        f_factor, f_unit = engineering_scale(float(spread.nominal_frequency), "Hz")
        for key, scale, unit in (("frequency", 1.0 / f_factor, f_unit), ("duty", 100.0, "%")):
            if unit != self._units[key]:
                self._units[key] = unit
                self.figures[key].xaxis.axis_label = f"{key} [{unit}]"
            hist = getattr(spread, f"{key}_histogram")
            self.sources[key].data = histogram_data(hist, scale)
            window = getattr(spread, f"{key}_window")
            self.windows[key].data = {"x": [] if window is None else [window[0] * scale, window[1] * scale]}
            self.nominals[key].data = {"x": [float(getattr(spread, f"nominal_{key}")) * scale]}
            if worst_case is not None:
                self.bands[key].data = {"x0": [float(getattr(worst_case, f"{key}_min")) * scale],
                                        "x1": [float(getattr(worst_case, f"{key}_max")) * scale]}
            else:
                self.bands[key].data = dict(_EMPTY_BAND)
            share = ""
            if window is not None:
                inside = spread.yield_for(**{f"{key}_window": window})
                share = f" — {screen(inside, 'duty')} inside the {key} window"
            self.figures[key].title.text = f"{key} spread, n = {screen(spread.n, 'count')}{share}"

    def clear(self, note: str = "") -> None:
        """Empty the histograms (e.g. when the design changed and the spread is stale)."""
        for key in self.sources:
            self.sources[key].data = {"left": [], "right": [], "top": []}
            self.bands[key].data = dict(_EMPTY_BAND)
            self.windows[key].data = dict(_EMPTY_LINE)
            self.nominals[key].data = dict(_EMPTY_LINE)
            self.figures[key].title.text = f"{key} spread — {note}" if note else f"{key} spread"
