"""Monte Carlo histograms of frequency and duty with the worst-case band and the requirement window."""

from __future__ import annotations

from typing import Any

import numpy as np

from .style import INK, TRACE, new_figure, style_legend

__all__ = ["SpreadPlot", "histogram_data"]


def histogram_data(histogram: Any, scale: float = 1.0) -> dict[str, np.ndarray]:
    """Quad columns (left, right, top) of a :class:`pwmkit.tolerance.Histogram`.

    Parameters
    ----------
    histogram : Histogram
        ``counts`` and ``edges``.
    scale : float
        Factor applied to the edges (100 turns duty fractions into %).
    """
    edges = np.asarray(histogram.edges, dtype=float) * scale
    counts = np.asarray(histogram.counts, dtype=float)
    return {"left": edges[:-1], "right": edges[1:], "top": counts}


class SpreadPlot:
    """Two histograms (frequency, duty) of a Monte Carlo run.

    Drawn on top of each histogram: the worst-case band (hatched box, orange), the requirement
    window (green solid edges) and the nominal value (black dashed). The title carries the yield.

    Attributes
    ----------
    layout : bokeh layout (put it in a :class:`jupyter_bokeh.BokehModel`)
    sources : dict of ColumnDataSource, keys "frequency" and "duty"
    """

    def __init__(self, *, width: int = 430, height: int = 230) -> None:
        from bokeh.layouts import row
        from bokeh.models import BoxAnnotation, ColumnDataSource, Span

        self.sources: dict[str, Any] = {}
        self.figures: dict[str, Any] = {}
        self._band: dict[str, Any] = {}
        self._window: dict[str, tuple[Any, Any]] = {}
        self._nominal: dict[str, Any] = {}
        for key, label in (("frequency", "frequency [Hz]"), ("duty", "duty [%]")):
            src = ColumnDataSource(data={"left": [], "right": [], "top": []}, name=f"pwmkit-spread-{key}")
            fig = new_figure(title=f"{key} spread", width=width, height=height, x_label=label,
                             y_label="samples")
            fig.quad(left="left", right="right", top="top", bottom=0, source=src, fill_color=TRACE["spread"],
                     line_color="white", fill_alpha=0.85, legend_label="Monte Carlo")
            band = BoxAnnotation(fill_color=TRACE["worst"], fill_alpha=0.12, hatch_pattern="/",
                                 hatch_color=TRACE["worst"], hatch_alpha=0.5, line_color=TRACE["worst"],
                                 visible=False)
            lo = Span(dimension="height", line_color=TRACE["window"], line_width=2, visible=False)
            hi = Span(dimension="height", line_color=TRACE["window"], line_width=2, visible=False)
            nominal = Span(dimension="height", line_color=INK["text"], line_dash="dashed", line_width=1.5,
                           visible=False)
            fig.add_layout(band)
            fig.add_layout(lo)
            fig.add_layout(hi)
            fig.add_layout(nominal)
            style_legend(fig, "top_left")
            self.sources[key] = src
            self.figures[key] = fig
            self._band[key] = band
            self._window[key] = (lo, hi)
            self._nominal[key] = nominal
        self.layout = row(self.figures["frequency"], self.figures["duty"])

    def update(self, spread: Any, worst_case: Any = None) -> None:
        """Show a :class:`pwmkit.tolerance.SpreadResult` and optionally a ``WorstCaseResult``."""
        for key, scale in (("frequency", 1.0), ("duty", 100.0)):
            hist = getattr(spread, f"{key}_histogram")
            self.sources[key].data = histogram_data(hist, scale)
            window = getattr(spread, f"{key}_window")
            lo, hi = self._window[key]
            if window is not None:
                lo.location, hi.location = window[0] * scale, window[1] * scale
            lo.visible = hi.visible = window is not None
            nominal = getattr(spread, f"nominal_{key}")
            self._nominal[key].location = nominal * scale
            self._nominal[key].visible = True
            band = self._band[key]
            if worst_case is not None:
                band.left = getattr(worst_case, f"{key}_min") * scale
                band.right = getattr(worst_case, f"{key}_max") * scale
                band.visible = True
            else:
                band.visible = False
            ylabel = "" if spread.yield_ is None else f" — yield {100 * spread.yield_:.4g} % in window"
            self.figures[key].title.text = f"{key} spread, n = {spread.n}{ylabel}"

    def clear(self, note: str = "") -> None:
        """Empty the histograms (e.g. when the design changed and the spread is stale)."""
        for key in self.sources:
            self.sources[key].data = {"left": [], "right": [], "top": []}
            self._band[key].visible = False
            for span in self._window[key]:
                span.visible = False
            self._nominal[key].visible = False
            self.figures[key].title.text = f"{key} spread — {note}" if note else f"{key} spread"
