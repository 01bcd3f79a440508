"""Spread panel: Monte Carlo histograms of frequency and duty, worst-case band, yield.

The Monte Carlo run is slower than the rest of the dashboard, so it runs on demand: the button
runs it for the current design; with "follow changes" ticked it re-runs after the edits have
settled (debounced on the kernel's event loop). Figures of an older design are marked stale.
"""

from __future__ import annotations

import time
from typing import Any

import ipywidgets as w

from ..design import Design
from ._base import Debouncer, Panel, esc, safe_callback
from .session import DesignSession, as_session

__all__ = ["SpreadPanel", "spread_summary_html"]


def spread_summary_html(spread: Any, worst: Any) -> str:
    """Key figures of a spread run and the worst case as a small table."""
    from ..glossary import plural
    from ..numstyle import screen, screen_range

    rows = [
        ("samples", screen(spread.n, "count") + (f" ({plural(spread.n_failed, 'sample')} do not oscillate)"
                                                 if spread.n_failed else "")),
        ("frequency mean ± σ", f"{screen(spread.frequency_mean, 'Hz')} ± {screen(spread.frequency_std, 'Hz', 3)}"),
        ("duty mean ± σ", f"{screen(spread.duty_mean, 'duty')} ± {screen(spread.duty_std, 'points').lstrip('+')}"),
    ]
    if worst is not None:
        rows += [
            ("worst-case frequency", screen_range(worst.frequency_min, worst.frequency_max, "Hz")),
            ("worst-case duty", screen_range(worst.duty_min, worst.duty_max, "duty")),
        ]
    if spread.frequency_window is not None:
        rows.append(("required frequency", screen_range(*spread.frequency_window, "Hz")))
    if spread.duty_window is not None:
        rows.append(("required duty", screen_range(*spread.duty_window, "duty")))
    if spread.yield_ is not None:
        rows.append(("yield (inside the requirement window)", screen(spread.yield_, "duty")))
    body = "".join(f"<tr><th style='text-align:left;font-weight:normal;color:#5a6270;padding-right:12px'>"
                   f"{esc(k)}</th><td class='pwmkit-q'>{esc(v)}</td></tr>" for k, v in rows)
    sources = "; ".join(getattr(spread, "sources", ()) or ())
    note = f"<div style='font-size:11px;color:#5a6270'>spread sources: {esc(sources)}</div>" if sources else ""
    return f"<table class='pwmkit-spread-summary' style='font-size:13px'>{body}</table>{note}"


class SpreadPanel(Panel):
    """Monte Carlo spread of frequency and duty (on demand) with worst case and yield.

    Attributes
    ----------
    run : ipywidgets.Button
    follow : ipywidgets.Checkbox — re-run after changes (debounced)
    samples : ipywidgets.Dropdown — number of Monte Carlo samples
    plot : pwmkit.plots.SpreadPlot
    """

    title = "Spread over tolerances"
    css_name = "spread"

    def __init__(self, design: Design | DesignSession, *, debounce: float = 0.8) -> None:
        super().__init__()
        from ..plots.spread import SpreadPlot
        from .tabs import live_plot

        self.session = as_session(design)
        self.run = w.Button(description="Run Monte Carlo", icon="play", button_style="",
                            tooltip="sample every tolerance, the supply range and the ambient range",
                            layout=w.Layout(width="auto", min_width="150px"))
        self.run.add_class("pwmkit-run-spread")
        self.samples = w.Dropdown(options=(("2 000 samples", 2000), ("20 000 samples", 20_000),
                                           ("100 000 samples", 100_000)),
                                  value=self.session.n_mc if self.session.n_mc in (2000, 20_000, 100_000) else 20_000,
                                  layout=w.Layout(width="160px"))
        self.follow = w.Checkbox(value=False, description="follow changes", indent=False,
                                 layout=w.Layout(width="150px"))
        self.status = w.HTML()
        self.status.add_class("pwmkit-spread-status")
        self.summary = w.HTML()
        self.plot = SpreadPlot()
        if self.session.spread_is_current:  # first data before the widget is made (see views._bokeh)
            self.show(self.session.spread_evaluation)
        else:
            self.plot.clear("press “Run Monte Carlo”")
            self.status.value = "<i>not run yet</i>"
        self.bokeh = live_plot(self.plot.layout, "pwmkit-plot", "pwmkit-plot-spread")
        self._debounced = Debouncer(self._run_safely, debounce)
        self.set_body([w.HBox([self.run, self.samples, self.follow, self.status],
                              layout=w.Layout(align_items="center", flex_flow="row wrap")), self.summary, self.bokeh])
        self.run.on_click(lambda _b: self._run_safely())
        self.samples.observe(self._on_samples, names="value")
        self.follow.observe(self._on_follow, names="value")
        self.session.subscribe(self._on_design)
        self.session.subscribe_spread(self.show)

    @safe_callback
    def _on_samples(self, change: dict[str, Any]) -> None:
        self.session.n_mc = int(change["new"])

    @safe_callback
    def _on_follow(self, change: dict[str, Any]) -> None:
        if change["new"] and not self.session.spread_is_current:
            self.status.value = "<i>running shortly…</i>"
            self._debounced()

    @safe_callback
    def _run_safely(self) -> None:
        self.status.value = "<i>running…</i>"
        t0 = time.perf_counter()
        verdict = self.session.run_spread()
        if verdict is not None:
            self.show_message(verdict)
            self.status.value = "<i>not run</i>"
            return
        self.clear_message()
        self.status.value = (f"<span class='pwmkit-fresh'>current design · {time.perf_counter() - t0:.2f} s"
                             "</span>")

    @safe_callback
    def _on_design(self, _evaluation: Any) -> None:
        if self.session.spread_evaluation is None:
            return
        if self.follow.value:
            self.status.value = "<i>design changed — re-running shortly…</i>"
            self._debounced()
        else:
            self.status.value = ("<span class='pwmkit-stale' style='color:#8a2d00'>▲ stale: the design changed "
                                 "since this run — press “Run Monte Carlo”</span>")

    @safe_callback
    def show(self, evaluation: Any) -> None:
        """Draw the spread and worst case of an evaluation made with ``spread=True``."""
        spread = getattr(evaluation, "spread", None)
        worst = getattr(evaluation, "worst_case", None)
        if spread is None:
            self.plot.clear("no spread in this evaluation")
            self.summary.value = ""
            return
        self.plot.update(spread, worst)
        self.summary.value = spread_summary_html(spread, worst)

    def flush(self) -> None:
        """Run a pending debounced re-run now."""
        self._debounced.flush()
