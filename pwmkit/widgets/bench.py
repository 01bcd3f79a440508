"""As-built panel: bench readings against the design, in the dashboard (presentation layer).

Shows "as designed vs as built" for a design that holds bench readings (``design.bench``): the
verdict and the closest explanation, a table of readings against their predicted spread and of
the most likely part values (:mod:`pwmkit.record.asbuilt`), and the plots of
:class:`pwmkit.plots.bench.AsBuiltPlot` — readings on the pot travel, as-built curves, and the
spread histograms at each reading's conditions.

The comparison (:func:`pwmkit.bench.reconcile_design`: one Monte Carlo run per reading and a
least-squares fit) takes about a second, so after an edit it is redone once the edits have been
quiet for a while (debounced), and only while the panel is visible.
"""

from __future__ import annotations

from typing import Any

import ipywidgets as w

from ..design import Design
from ._base import Debouncer, Panel, esc, safe_callback
from .session import DesignSession, as_session

__all__ = ["AsBuiltPanel"]


class AsBuiltPanel(Panel):
    """Bench readings of the built driver compared with the design.

    Attributes
    ----------
    summary : ipywidgets.HTML — verdict, readings and fitted parts
    plot : pwmkit.plots.bench.AsBuiltPlot
    reconciliation : the last :class:`pwmkit.bench.Reconciliation` shown (None without readings)
    """

    title = "As designed vs as built"
    css_name = "as-built"

    def __init__(self, design: Design | DesignSession, *, debounce: float = 0.8, n_mc: int = 20_000) -> None:
        super().__init__()
        from ..plots.bench import AsBuiltPlot

        self.session = as_session(design)
        self.n_mc = int(n_mc)
        self.summary = w.HTML()
        self.summary.add_class("pwmkit-asbuilt-summary")
        self.status = w.HTML()
        self.reconciliation: Any = None
        self.plot = AsBuiltPlot(pot=self.session.design.timing.topology == "pot")
        self.plot_box = w.VBox()
        self._shown_design: Any = None
        self._recompute()  # first data before the widget is made (see views._bokeh)
        from .views import _bokeh

        self.bokeh = _bokeh(self.plot.layout, "pwmkit-plot-asbuilt")
        self.plot_box.children = (self.bokeh,)
        self._debounced = Debouncer(self._recompute, debounce)
        self.set_body([self.status, self.summary, self.plot_box])
        self.session.subscribe(self.follow)

    def refresh(self, evaluation: Any) -> None:
        """Design changed: mark the comparison stale and redo it after the edits settle."""
        if self.session.design is self._shown_design:
            return
        self.status.value = "<i>design changed — comparing again shortly…</i>"
        self._debounced()

    @safe_callback
    def _recompute(self) -> None:
        from ..bench import reconcile_design
        from ..record.asbuilt import as_built_html

        design = self.session.design
        self._shown_design = design
        rec = reconcile_design(design, n=self.n_mc) if design.bench else None
        self.reconciliation = rec
        html = as_built_html(design, rec, self.session.evaluation)
        self.summary.value = f"<div style='font-size:13px'>{html}</div>"
        if rec is None:
            self.plot_box.layout.display = "none"
            self.status.value = ""
            return
        same_kind = (design.timing.topology == "pot") == self.plot.pot
        if same_kind:
            self.plot.update(rec, self.session.evaluation.pot_travel)
            self.plot_box.layout.display = None
        else:  # the topology changed kind: the figures were built for the other kind
            self.plot_box.layout.display = "none"
        self.status.value = (f"<span class='pwmkit-fresh' style='color:#5a6270;font-size:11px'>{len(rec.readings)} "
                             f"reading(s), {rec.n} Monte Carlo samples each — {esc(design.name)}</span>")
        self.clear_message()

    def flush(self) -> None:
        """Run a pending comparison now."""
        self._debounced.flush()
