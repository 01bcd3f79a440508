"""The design dashboard: every panel on one shared design session, built by :func:`dashboard`.

Layout: the design-file bar (Open, Save, Save as, Revert, unsaved mark), a header line (design,
verdict of the checks — the same checks the record shows, spread checks "not run" until the Monte
Carlo runs), the cautions, the timing panel with the requirement band beside the waveforms, then
tabs — pot travel, spread, load and output stage, flicker map, checks, formulas, schematic, and for
your own design requirements, parts, candidates (the part search) and supply & ambient
(:mod:`pwmkit.widgets.workbench`).

Live-update policy
------------------
- Text fields apply on Enter or when they lose focus (``continuous_update=False``).
- Sliders apply while dragged. The ipywidgets front end keeps one update in flight and sends the
  latest slider position once the kernel is free, so a fast drag coalesces by itself and never
  queues stale positions. Each accepted change runs one ``evaluate(design, spread=False)``; every
  plot gets one whole-dict ``ColumnDataSource.data`` assignment (one patch message); readouts are
  HTML widgets updated inside ``hold_sync``. Figures are built once and never rebuilt.
- Only the visible tab follows every change; a hidden tab catches up when it is selected.
- Slower work — the schematic SVG, the formula sheet and (when "follow changes" is ticked) the
  Monte Carlo spread — is debounced on the kernel's event loop: it runs once the edits have been
  quiet for a short time. :meth:`Dashboard.flush` runs pending work at once (useful in a cell).
"""

from __future__ import annotations

import os
from typing import Any

import ipywidgets as w

from ..design import Design
from ..two_timer_design import circuit_words as _circuit_words
from ._base import _running_loop, esc, log
from .checks import CautionsBox, FindingsPanel
from .formulas import FormulasPanel
from .loads import LoadsPanel
from .session import DesignSession
from .spread import SpreadPanel
from .tabs import LazyPage, PageTabs
from .timing import TimingPanel
from .views import FlickerPanel, PotTravelPanel, WaveformPanel

__all__ = ["Dashboard", "dashboard", "load_bokehjs"]


def load_bokehjs() -> bool:
    """Put BokehJS on the notebook page from the installed bokeh (no network).

    Calls ``bokeh.io.output_notebook(resources=INLINE, hide_banner=True)`` when running in an
    IPython kernel; elsewhere (plain Python, tests) it does nothing.

    Returns
    -------
    bool
        True when BokehJS was sent to a front end.
    """
    try:
        from IPython import get_ipython
    except ImportError:  # pragma: no cover - IPython comes with ipywidgets
        return False
    shell = get_ipython()
    if shell is None or not hasattr(shell, "kernel"):
        return False
    from bokeh.io import output_notebook
    from bokeh.resources import INLINE

    output_notebook(resources=INLINE, hide_banner=True)
    return True


def _header_html(design: Design, evaluation: Any, findings: Any = None) -> str:
    from .. import glossary as g
    from ..checks.findings import severity_style
    from ..numstyle import screen

    f = evaluation.findings if findings is None else findings
    parts = []
    for sev, n in (("fail", f.fail_count), ("warn", f.warn_count), ("ok", f.ok_count), ("not-run", f.not_run_count)):
        if sev == "not-run" and not n:
            continue
        colour, symbol, _word = severity_style(sev)
        parts.append(f"<span style='border-left:5px solid {colour};padding:0 6px;margin-right:6px;white-space:nowrap'>"
                     f"{symbol} {esc(g.severity_count(sev, n))}</span>")
    load = g.load_label(None if design.load is None else design.load.kind)
    load = load if design.load is None else f"{load} load"
    return (f"<div class='pwmkit-header' style='display:flex;gap:4px 16px;align-items:baseline;flex-wrap:wrap'>"
            f"<span style='font-size:16px;font-weight:700'>{esc(design.name)}</span>"
            f"<span style='color:#5a6270'>{esc(_circuit_words(design.timing.topology))} · "
            f"{esc(g.timer_label(design.timing.timer))} timer · {esc(screen(design.vcc, 'V'))} · {esc(load)}</span>"
            f"<span class='pwmkit-verdict'>checks: {''.join(parts)}</span></div>")


#: Layout rules of the dashboard (fit at 1280 px: the readout and the waveform stay together).
DASHBOARD_CSS = """<style>
.pwmkit-dashboard {max-width:100%; overflow:hidden}
.pwmkit-dashboard .pwmkit-main {gap:8px 20px}
.pwmkit-dashboard .pwmkit-views {min-width:0}
.pwmkit-downloads .widget-hbox {gap:4px 12px}
.pwmkit-dashboard .widget-toggle-buttons {flex-wrap:wrap; max-width:100%; height:auto}
.pwmkit-dashboard button.jupyter-button {width:auto; max-width:100%}
.pwmkit-dashboard .widget-toggle-buttons .widget-toggle-button {margin-bottom:2px}
.pwmkit-dashboard .widget-html-content, .pwmkit-dashboard .widget-htmlmath-content {white-space:normal}
</style>"""


class Dashboard(w.VBox):
    """All panels of one design on a shared :class:`~pwmkit.widgets.session.DesignSession`.

    It is an :class:`ipywidgets.VBox`: display it, or put it in another layout.

    Attributes
    ----------
    session : DesignSession
    timing : TimingPanel; waveforms : WaveformPanel; pot_travel : PotTravelPanel;
    spread : SpreadPanel; loads : LoadsPanel; flicker : FlickerPanel; findings : FindingsPanel;
    formulas : FormulasPanel; schematic : SchematicPanel or None (None without pwmkit.schematic/schemdraw)
    control_heater : ControlHeaterPanel or None — two-timer designs and heater loads (first tab)
    crosscheck : CrossCheckBox or None (None where ngspice is not installed)
    as_built : AsBuiltPanel or None (no "As built" tab until the design has bench readings: the tab
        is added when a design with readings is opened or made, and stays)
    tabs : PageTabs — each page a :class:`~pwmkit.widgets.tabs.LazyPage`

    The panels of the tab pages are built when their page is first shown, when the attribute is
    first read (``dash.spread`` builds the Spread page), or ahead of time once the kernel has been
    idle for a second after the dashboard was made; ``PWMKIT_BUILD_ALL_PAGES=1`` (set by headless
    runs, which record every page) or :meth:`build_pages` builds them all at once.
    """

    def __init__(self, design: Design | DesignSession | str | os.PathLike[str], *, debounce: float = 0.3) -> None:
        from .workbench import attach_pages, open_source

        self.session, file_state = open_source(design)
        s = self.session
        self.header = w.HTML()
        self.cautions = CautionsBox(s, collapsed=False)  # once per view, open on first display
        two_timer = s.design.timing.topology == "two-timer"
        if two_timer:  # the two-timer PWM has its own editor (clock, monostable, control range)
            from .two_timer import TwoTimerPanel

            self.timing = TwoTimerPanel(s)  # type: ignore[assignment]
        else:
            self.timing = TimingPanel(s, show_readout=False)
        self.waveforms = WaveformPanel(s, show_cautions=False)
        # Tab pages are built when first shown (or asked for, or prefetched once the kernel is idle):
        # see LazyPage. Each factory reads the session's current design when it runs.
        self._lazy: dict[str, LazyPage] = {}

        def page(title: str, attr: str, factory: Any) -> tuple[str, LazyPage]:
            self._lazy[attr] = LazyPage(factory)
            return title, self._lazy[attr]

        pages: list[tuple[str, LazyPage]] = []
        if two_timer or (s.design.load is not None and s.design.load.kind == "heater"):
            from .two_timer import ControlHeaterPanel

            pages.append(page("Control & heater", "control_heater", lambda: ControlHeaterPanel(s)))
        if not two_timer:  # no potentiometer in the two-timer PWM
            pages.append(page("Pot travel", "pot_travel", lambda: PotTravelPanel(s)))
        pages += [
            page("Spread", "spread", lambda: SpreadPanel(s, debounce=max(debounce, 0.6))),
            page("Load & switch", "loads", lambda: LoadsPanel(s, show_cautions=False)),
            page("Flicker", "flicker", lambda: FlickerPanel(s, show_cautions=False)),
            page("Checks", "findings", lambda: FindingsPanel(s)),
            page("Formulas", "formulas", lambda: FormulasPanel(s, debounce=debounce)),
        ]
        if _schematic_available():
            pages.append(page("Schematic", "schematic", lambda: self._schematic_panel(s, debounce) or _no_schematic()))
        self.file, self.requirement_band, own = attach_pages(s, file_state)  # your own design: file, search …
        if two_timer:  # the part search knows the astable networks; the two-timer has its own
            from .two_timer import TwoTimerCandidatesPanel

            own = [(t, (lambda: TwoTimerCandidatesPanel(s)) if t == "Candidates" else f) for t, f in own]
        for (title, factory), attr in zip(own, ("requirements", "parts", "candidates", "conditions")):
            pages.append(page(title, attr, factory))
        self._debounce = debounce
        if s.design.bench:  # bench readings: the "as designed vs as built" tab (pwmkit.widgets.bench)
            pages.append(page("As built", "as_built", self._as_built_factory()))
        self.tabs = PageTabs(pages)  # not ipywidgets.Tab: see pwmkit.widgets.tabs (reload-proof)
        self.timing.layout.width = "440px" if not two_timer else "560px"
        self.timing.layout.min_width = self.timing.layout.width
        # the main readout sits with the waveforms; controls beside them when the width allows,
        # else the readout and the waveforms come first (wrap-reverse) so both stay in view
        readout = [] if two_timer else [self.timing.readout]
        views = w.VBox([*readout, self.requirement_band, self.waveforms])
        views.add_class("pwmkit-views")
        top = w.HBox([self.timing, views],
                     layout=w.Layout(flex_flow="row wrap-reverse", justify_content="flex-start",
                                     align_items="flex-end"))
        top.add_class("pwmkit-main")
        from .crosscheck import crosscheck_box
        from .downloads import DownloadsBar

        self.crosscheck = crosscheck_box(s)  # only where ngspice is installed
        extra = [self.crosscheck] if self.crosscheck is not None else []
        self.downloads = DownloadsBar(s)
        super().__init__([w.HTML(DASHBOARD_CSS), self.file, self.header, self.cautions, top, self.tabs,
                          *extra, self.downloads])
        self.add_class("pwmkit-dashboard")
        self._pages = [p for _t, p in pages]
        self.tabs.observe(self._on_tab, names="selected_index")
        s.subscribe(self._refresh_header)
        s.subscribe(self._add_as_built)  # a design opened later may bring bench readings
        s.subscribe_spread(lambda _ev: self._refresh_header(s.evaluation))
        self._refresh_header(s.evaluation)
        loop = _running_loop()
        if os.environ.get("PWMKIT_BUILD_ALL_PAGES"):  # a headless run records every page
            self.build_pages()
        elif loop is None:  # plain Python, tests: the selected page now, the others when asked for
            self._on_tab({"new": self.tabs.selected_index})
        else:
            # in a kernel: the dashboard shows first (controls, readout, waveforms), the selected
            # page is drawn right after, the hidden pages once the kernel has been idle a moment
            loop.call_soon(self._first_page, loop)

    def _first_page(self, loop: Any) -> None:
        self._on_tab({"new": self.tabs.selected_index})
        self._schedule_prefetch(loop)

    def _as_built_factory(self) -> Any:
        from .bench import AsBuiltPanel

        s, debounce = self.session, self._debounce
        return lambda: AsBuiltPanel(s, debounce=max(debounce, 0.6))

    def _add_as_built(self, _evaluation: Any) -> None:
        """Add the "As built" tab when the design now has bench readings (Open, Revert) and had none."""
        try:
            if self.session.design.bench and "as_built" not in self._lazy:
                self._lazy["as_built"] = LazyPage(self._as_built_factory())
                self.tabs.add_page("As built", self._lazy["as_built"])
                self._pages.append(self._lazy["as_built"])
        except Exception:  # never raise into a session listener
            log.exception("pwmkit: adding the As built tab failed")

    # -- pages built on demand --------------------------------------------------------------------
    def _panel(self, attr: str) -> Any:
        page = self._lazy.get(attr)
        return None if page is None else page.build()

    pot_travel = property(lambda self: self._panel("pot_travel"), doc="PotTravelPanel (None for the two-timer)")
    spread = property(lambda self: self._panel("spread"), doc="SpreadPanel")
    loads = property(lambda self: self._panel("loads"), doc="LoadsPanel")
    flicker = property(lambda self: self._panel("flicker"), doc="FlickerPanel")
    findings = property(lambda self: self._panel("findings"), doc="FindingsPanel")
    formulas = property(lambda self: self._panel("formulas"), doc="FormulasPanel")
    schematic = property(lambda self: self._panel("schematic"), doc="SchematicPanel or None")
    control_heater = property(lambda self: self._panel("control_heater"), doc="ControlHeaterPanel or None")
    requirements = property(lambda self: self._panel("requirements"), doc="RequirementsPanel")
    parts = property(lambda self: self._panel("parts"), doc="PartsPanel")
    candidates = property(lambda self: self._panel("candidates"), doc="CandidatesPanel")
    conditions = property(lambda self: self._panel("conditions"), doc="ConditionsPanel")
    as_built = property(lambda self: self._panel("as_built"), doc="AsBuiltPanel or None")

    def build_pages(self) -> int:
        """Build every tab page now (a headless run does this to record them all); returns how many were new."""
        new = [p for p in self._pages if not p.built]
        for page in new:
            page.build()
        self._on_tab({"new": self.tabs.selected_index})  # hidden pages: follow lazily again
        return len(new)

    def _schedule_prefetch(self, loop: Any, delay: float = 1.0) -> None:
        """Build the hidden pages one by one on the kernel's event loop, starting after ``delay`` [s]."""

        def step() -> None:
            try:
                for index, page in enumerate(self._pages):
                    if not page.built:
                        page.build()
                        page.set_active(index == self.tabs.selected_index)
                        loop.call_later(0.05, step)  # one page at a time: a slider move is served between
                        return
            except Exception:  # prefetching is an optimisation: the page builds again when shown
                log.exception("pwmkit: building a tab page ahead of time failed")

        loop.call_later(delay, step)

    @staticmethod
    def _schematic_panel(session: DesignSession, debounce: float) -> Any:
        try:
            from .schematic import SchematicPanel

            return SchematicPanel(session, debounce=debounce)
        except ImportError:  # pwmkit.schematic or schemdraw not installed: leave the tab out
            log.info("pwmkit: schematic panel left out (pwmkit.schematic or schemdraw not available)")
            return None

    def _on_tab(self, change: dict[str, Any]) -> None:
        """Only the visible tab follows every change; hidden ones catch up when shown."""
        try:
            selected = change["new"]
            for i, page in enumerate(self._pages):
                page.set_active(i == selected)
        except Exception:  # never raise into the widget machinery
            log.exception("pwmkit: switching tabs failed")

    def _refresh_header(self, evaluation: Any) -> None:
        try:
            self.header.value = _header_html(self.session.design, evaluation, self.session.findings)
        except Exception:  # display helper; never raise into a callback
            log.exception("pwmkit: dashboard header failed")

    # -- display ------------------------------------------------------------------------------
    def __repr__(self) -> str:
        t = self.session.evaluation.timing
        return (f"Dashboard({self.session.design.name!r}: {t.frequency:.5g} Hz, duty {100 * t.duty:.4g} %; "
                "interactive in Jupyter)")

    def _repr_mimebundle_(self, **kwargs: Any) -> Any:
        """The live widget, plus a static HTML summary for exports and viewers without a kernel.

        Jupyter front ends prefer the widget; an exported notebook (or a viewer without widget
        support) shows the summary instead of a bare repr.
        """
        data = super()._repr_mimebundle_(**kwargs)
        if isinstance(data, dict):
            try:
                data["text/html"] = self.static_html()
            except Exception:  # a summary must never break the display of the widget
                log.exception("pwmkit: static dashboard summary failed")
        return data

    def static_html(self) -> str:
        """Header, timing readout, check counts and cautions of the current design as plain HTML."""
        from .checks import cautions_html
        from .timing import timing_readout_html

        ev = self.session.evaluation
        return (f"<div class='pwmkit-dashboard-static'>{_header_html(self.session.design, ev)}"
                f"{timing_readout_html(ev.timing, ev.ideal)}{cautions_html(ev.cautions, collapsed=True)}"
                "<p style='font-size:11px;color:#5a6270'>Static summary of the interactive pwmkit dashboard; "
                "run the notebook in Jupyter to use the controls and live plots.</p></div>")

    # -- conveniences ---------------------------------------------------------------------------
    @property
    def design(self) -> Design:
        """The current (last good) design."""
        return self.session.design

    @property
    def evaluation(self) -> Any:
        """The evaluation of the current design (no spread)."""
        return self.session.evaluation

    def flush(self) -> None:
        """Run delayed and debounced work (plot redraws, schematic, formulas, spread re-run) now."""
        self.flush_redraws()
        panels = [page.panel for attr, page in self._lazy.items()
                  if attr in ("schematic", "formulas", "spread", "as_built") and page.built]
        for panel in [*panels, self.downloads]:
            if panel is not None:
                panel.flush()

    def flush_redraws(self) -> int:
        """Draw the plots whose redraw after the last edit is still pending (see
        :data:`pwmkit.widgets._base.PLOT_DELAY`) now; returns how many were pending."""
        from ._base import Panel

        pending = [p for p in self._descendants() if isinstance(p, Panel) and p._redraw is not None and p._redraw.pending]
        for panel in pending:
            panel.flush_redraw()
        return len(pending)

    def _descendants(self) -> list[Any]:
        """Every widget in the dashboard's tree of children (built pages only), this one included."""
        found: list[Any] = []
        stack: list[Any] = [self]
        while stack:
            widget = stack.pop()
            found.append(widget)
            stack.extend(getattr(widget, "children", ()) or ())
        return found

    def resync(self) -> int:
        """Re-serialise every plot from its current state and redraw its views; returns the number of plots.

        Not needed after a page reload: every plot is a :class:`~pwmkit.widgets.tabs.LivePlot`,
        which sends its current state to a front end that (re)connects. This redraws the views
        that are open now (for instance after a plot was zoomed in the browser).
        """
        from jupyter_bokeh import BokehModel

        plots = [widget for widget in self._descendants() if isinstance(widget, BokehModel)]
        for plot in plots:
            plot.update_from_model(plot._model)
        return len(plots)

    def show_tab(self, title: str) -> None:
        """Select a tab by its title ("Pot travel", "Spread", "Load & switch", "Flicker", "Checks",
        "Formulas", "Schematic")."""
        self.tabs.selected_index = list(self.tabs.titles).index(title)


def _no_schematic() -> Any:
    from ._base import Panel

    panel = Panel()
    panel.set_body([w.HTML("<i>The schematic needs pwmkit.schematic and schemdraw.</i>")])
    return panel


def _schematic_available() -> bool:
    """True when the schematic tab can be made (pwmkit.schematic and schemdraw installed)."""
    from importlib.util import find_spec

    try:
        return find_spec("schemdraw") is not None and find_spec("pwmkit.schematic") is not None
    except (ImportError, ValueError):
        return False


def dashboard(design: Design | DesignSession | str | os.PathLike[str], *, debounce: float = 0.3) -> Dashboard:
    """Build the interactive design dashboard for ``design``.

    Loads BokehJS into the notebook page from the installed bokeh (no network) and returns a
    :class:`Dashboard` — an :class:`ipywidgets.VBox` of all panels sharing one design session.

    Parameters
    ----------
    design : path, Design or DesignSession
        A design file (``"fan.toml"``: Save writes back to it), the starting design (it must
        evaluate), or a session to share with other panels.
    debounce : float
        Quiet time before slower work (schematic, formulas) is redone after edits [s].

    Returns
    -------
    Dashboard

    Raises
    ------
    DesignError
        When the starting design cannot be evaluated.

    Examples
    --------
    >>> from pwmkit.design import demo_designs
    >>> from pwmkit.widgets import dashboard
    >>> dash = dashboard(demo_designs()["grow-bar"])   # doctest: +SKIP
    >>> dash                                            # doctest: +SKIP
    """
    from .downloads import load_page_helpers

    load_bokehjs()
    load_page_helpers()
    return Dashboard(design, debounce=debounce)
