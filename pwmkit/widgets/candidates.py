"""Candidates panel: search ranked part sets for the requirements without freezing the page.

"Find part sets" runs :func:`pwmkit.shortlist.shortlist` on the session's design in a worker
thread; the kernel stays free for the other panels (a slider moved during the search still
updates its readout). A progress bar follows the search and "Cancel" stops it. The result is a
sortable ranked table and a trade-off plot — worst-case frequency spread against yield, marker
size by part count, the current design marked — and "Use this set" makes the chosen set the
session's design, after which every panel follows.

Threads: the worker only computes; the results are handed to the kernel's event loop
(``call_soon_threadsafe``) and shown there. Without a running event loop (plain Python, tests)
the search runs in the calling thread, so the behaviour stays deterministic.
"""

from __future__ import annotations

import asyncio
import threading
import time
from typing import Any

import ipywidgets as w

from ._base import Panel, esc, fmt, fmt_pct, log, safe_callback
from .session import DesignSession

__all__ = ["CandidatesPanel", "SORT_KEYS", "candidates_table_html"]

#: Sort choices of the table: label → (key of RankedSet.row(), descending).
SORT_KEYS = {
    "rank": ("rank", False),
    "yield": ("yield", True),
    "frequency spread": ("spread", False),
    "part count": ("part_count", False),
    "discharge-pin current": ("discharge_current", False),
}


def _spread_of(r: Any) -> float:
    """Largest relative distance of a worst-case frequency corner from the target [1]."""
    f = r.design.requirements.frequency
    return max(abs(r.spread.frequency_low / f - 1.0), abs(r.spread.frequency_high / f - 1.0))


def candidates_table_html(sets: Any, sort: str = "rank") -> str:
    """The ranked sets as an HTML table sorted by ``sort`` (a key of :data:`SORT_KEYS`)."""
    key, desc = SORT_KEYS[sort]

    def value(r: Any) -> float:
        return _spread_of(r) if key == "spread" else float(r.row()[key])

    rows = sorted(sets, key=value, reverse=desc)
    body = []
    for r in rows:
        s = r.spread
        duty = (f"reach {fmt_pct(s.duty_low, 3)} … {fmt_pct(s.duty_high, 3)}" if s.duty_kind == "reach"
                else f"{fmt_pct(s.duty_low, 4)} … {fmt_pct(s.duty_high, 4)}")
        mark = "✓" if r.meets else "✗"
        body.append(f"<tr class='pwmkit-cand' data-rank='{r.rank}'><td>{r.rank}</td><td>{mark}</td>"
                    f"<td>{esc(r.design.timing.topology)}</td><td>{esc(r.values_text())}</td>"
                    f"<td>{esc(fmt(s.frequency_low, 'Hz', 3))} … {esc(fmt(s.frequency_high, 'Hz', 3))}</td>"
                    f"<td>{esc(duty)}</td><td>{fmt_pct(r.yield_, 4)}</td><td>{r.part_count}</td>"
                    f"<td>{esc(fmt(r.discharge_current, 'A', 3))}</td>"
                    f"<td style='font-size:11px'>{esc(r.why) if r.why else 'meets the criterion'}</td></tr>")
    head = ("<tr><th>#</th><th>ok</th><th>topology</th><th>parts</th><th>frequency over the corners</th><th>duty</th>"
            "<th>yield</th><th>parts n</th><th>discharge pin</th><th>verdict</th></tr>")
    return (f"<table class='pwmkit-candidates' style='font-size:12px;border-collapse:collapse'>{head}{''.join(body)}"
            "</table>")


class CandidatesPanel(Panel):
    """Ranked part sets for the session's requirements (see the module docstring).

    Attributes
    ----------
    find, cancel, use : ipywidgets.Button
    progress : ipywidgets.FloatProgress
    topology, top, sort, pick : ipywidgets selection widgets
    table : ipywidgets.HTML
    result : pwmkit.shortlist.Shortlist or None
    plot_source, current_source : bokeh ColumnDataSource of the trade-off plot
    """

    title = "Candidate part sets"
    css_name = "candidates"

    def __init__(self, session: DesignSession, *, n_yield: int = 2000) -> None:
        super().__init__()
        from ..shortlist import TOPOLOGY_CHOICES

        self.session = session
        self.n_yield = int(n_yield)
        self.result: Any = None
        self._thread: threading.Thread | None = None
        self._cancel = threading.Event()
        self._loop: asyncio.AbstractEventLoop | None = None
        self.topology = w.Dropdown(options=TOPOLOGY_CHOICES, value="any", description="topology",
                                   layout=w.Layout(width="190px"), style={"description_width": "64px"})
        self.top = w.Dropdown(options=(5, 10, 20), value=10, description="sets", layout=w.Layout(width="120px"),
                              style={"description_width": "36px"})
        self.find = w.Button(description="Find part sets", icon="search", button_style="primary")
        self.find.add_class("pwmkit-find")
        self.cancel = w.Button(description="Cancel", icon="stop", disabled=True)
        self.cancel.add_class("pwmkit-cancel")
        self.progress = w.FloatProgress(value=0.0, min=0.0, max=1.0, layout=w.Layout(width="200px"))
        self.progress.add_class("pwmkit-progress")
        self.status = w.HTML("<i>not searched yet</i>")
        self.status.add_class("pwmkit-cand-status")
        self.sort = w.Dropdown(options=tuple(SORT_KEYS), value="rank", description="sort by",
                               layout=w.Layout(width="260px"), style={"description_width": "56px"})
        self.pick = w.Dropdown(options=(), description="set", layout=w.Layout(width="140px"),
                               style={"description_width": "30px"})
        self.pick.add_class("pwmkit-pick")
        self.use = w.Button(description="Use this set", icon="check", disabled=True)
        self.use.add_class("pwmkit-use")
        self.table = w.HTML()
        self.table.add_class("pwmkit-cand-table")
        self._build_plot()
        self.find.on_click(lambda _b: self.start())
        self.cancel.on_click(lambda _b: self.stop())
        self.use.on_click(lambda _b: self.use_selected())
        self.sort.observe(lambda _c: self._show_table(), names="value")
        self.set_body([
            w.HTML("<div style='font-size:12px;color:#5a6270'>Searches preferred-value parts for the requirements "
                   "(Requirements tab) and judges each set over the tolerance corners and by Monte Carlo.</div>"),
            w.HBox([self.topology, self.top, self.find, self.cancel, self.progress, self.status],
                   layout=w.Layout(align_items="center", flex_flow="row wrap")),
            w.HBox([self.sort, self.pick, self.use], layout=w.Layout(align_items="center")),
            self.table, self.bokeh,
        ])

    # -- plot ----------------------------------------------------------------------------------
    def _build_plot(self) -> None:
        from bokeh.models import ColumnDataSource, HoverTool

        from ..plots.style import TRACE, new_figure, style_legend
        from .tabs import live_plot

        self.plot_source = ColumnDataSource(data={"yield": [], "spread": [], "size": [], "rank": [], "meets": []},
                                            name="pwmkit-candidates")
        self.current_source = ColumnDataSource(data={"yield": [], "spread": []}, name="pwmkit-candidates-current")
        fig = new_figure(title="trade-off: worst-case frequency spread vs yield (size: part count)", width=620,
                         height=260, x_label="yield [%]", y_label="worst corner from target [%]")
        fig.scatter("yield", "spread", size="size", source=self.plot_source, fill_color=TRACE["exact"],
                    fill_alpha=0.6, line_color="white", legend_label="part sets")
        fig.scatter("yield", "spread", size=18, marker="star", source=self.current_source, fill_color=TRACE["marker"],
                    line_color="white", legend_label="current design")
        fig.add_tools(HoverTool(tooltips=[("set", "@rank"), ("yield", "@yield{0.0} %"), ("spread", "@spread{0.0} %")]))
        style_legend(fig, "top_left")
        self.figure = fig
        self.bokeh = live_plot(fig, "pwmkit-plot", "pwmkit-plot-candidates")  # reload-proof

    # -- search ----------------------------------------------------------------------------------
    @property
    def running(self) -> bool:
        """True while a search runs."""
        return self._thread is not None and self._thread.is_alive()

    @safe_callback
    def start(self) -> None:
        """Start a search for the session's current design (in a worker thread when a loop runs)."""
        if self.running:
            return
        from ..shortlist import shortlist

        self.clear_message()
        design, topology, top = self.session.design, self.topology.value, int(self.top.value)
        self._cancel.clear()
        self.find.disabled, self.cancel.disabled, self.use.disabled = True, False, True
        self.progress.value = 0.0
        self.status.value = "<i>searching…</i>"
        try:
            self._loop = asyncio.get_running_loop()
        except RuntimeError:
            self._loop = None
        t0 = time.perf_counter()

        def report(fraction: float, _stage: str) -> None:
            self.progress.value = fraction  # a trait change: sent to the front end from this thread

        def work() -> None:
            try:
                result: Any = shortlist(design, topology=topology, top=top, n_yield=self.n_yield, progress=report,
                                        cancel=self._cancel.is_set)
            except Exception as exc:  # handed to the kernel's loop, shown there
                result = exc
            self._hand_over(result, time.perf_counter() - t0)

        if self._loop is None:
            work()
            return
        self._thread = threading.Thread(target=work, name="pwmkit-shortlist", daemon=True)
        self._thread.start()

    def _hand_over(self, result: Any, seconds: float) -> None:
        if self._loop is not None and self._loop.is_running():
            self._loop.call_soon_threadsafe(self._finish, result, seconds)
        else:
            self._finish(result, seconds)

    @safe_callback
    def stop(self) -> None:
        """Ask a running search to stop (it ends at its next progress point)."""
        self._cancel.set()
        self.status.value = "<i>cancelling…</i>"

    def wait(self, timeout: float = 120.0) -> None:
        """Block until a running search has finished (notebooks and tests)."""
        if self._thread is not None:
            self._thread.join(timeout)

    @safe_callback
    def _finish(self, result: Any, seconds: float) -> None:
        from ..errors import DesignError
        from ..shortlist import Cancelled

        self.find.disabled, self.cancel.disabled = False, True
        if isinstance(result, Cancelled):
            self.status.value = "<i>cancelled</i>"
            return
        if isinstance(result, DesignError):
            self.status.value = "<i>not searched</i>"
            self.show_message(str(result))
            return
        if isinstance(result, Exception):
            log.error("pwmkit: part search failed", exc_info=result)
            raise RuntimeError("part search failed") from result
        self.result = result
        self.progress.value = 1.0
        n_ok = sum(1 for r in result if r.meets)
        self.status.value = (f"<span class='pwmkit-cand-done'>{len(result)} sets, {n_ok} meet the criterion "
                             f"({esc(result.criterion)}) · {seconds:.2f} s</span>")
        if not result.found:
            self.show_message(f"no set meets the requirement: {result.nearest_miss()}", kind="note")
        self.pick.options = tuple((f"#{r.rank}", r.rank) for r in result)
        if result:
            self.pick.value = result[0].rank
        self.use.disabled = not result
        self._show_table()
        self._show_plot()

    def _show_table(self) -> None:
        if self.result is not None:
            self.table.value = candidates_table_html(self.result, self.sort.value)

    def _show_plot(self) -> None:
        from ..evaluate import timing_kwargs
        from ..requirement_spread import requirement_spread

        sets = list(self.result or ())
        self.plot_source.data = {"yield": [100 * r.yield_ for r in sets], "spread": [100 * _spread_of(r) for r in sets],
                                 "size": [6 + 3 * r.part_count for r in sets], "rank": [r.rank for r in sets],
                                 "meets": [bool(r.meets) for r in sets]}
        d = self.session.design
        try:
            rs = requirement_spread(d, timing_kwargs(d), n=self.n_yield, seed=1)
            f = d.requirements.frequency
            self.current_source.data = {"yield": [100 * rs.yield_], "spread": [100 * max(
                abs(rs.frequency_low / f - 1.0), abs(rs.frequency_high / f - 1.0))]}
        except Exception:  # the current design may not be judgeable (no frequency requirement …)
            self.current_source.data = {"yield": [], "spread": []}

    @safe_callback
    def use_selected(self, rank: int | None = None) -> None:
        """Make the selected set (or set ``rank``) the session's design; every panel follows."""
        if self.result is None:
            return
        want = self.pick.value if rank is None else rank
        chosen = next((r for r in self.result if r.rank == want), None)
        if chosen is None:
            self.show_message(f"no set #{want} in the last search")
            return
        d = self.session.design
        design = d.replace(timing=chosen.design.timing)  # keep what changed elsewhere since the search
        verdict = self.session.propose(design)
        if verdict is not None:
            self.show_message(verdict)
            return
        self.show_message(f"using set #{chosen.rank}: {chosen.values_text()}", kind="note")
        self._show_plot()
