"""Page tabs that keep working after the browser page is reloaded, and plots that re-sync on reconnect.

Why not :class:`ipywidgets.Tab`
-------------------------------
ipywidgets' Tab is a Lumino ``TabPanel``; its tab bar adds its pointer listeners only when Lumino
sends it the *before-attach* message. When JupyterLab reopens a notebook (page reload, or the
notebook closed and opened again) with the kernel still running, it restores widget outputs of
cells that are not yet attached to the page; the views are built into a detached output area and
Lumino never delivers *before-attach* to the nested TabPanel. The tab bar is then drawn but never
listens: clicks change nothing and no tab change reaches the kernel. (Seen in a browser: after the
reload, the dashboard's tab bar had no ``pointerdown`` listener; a plain ``ipywidgets.Tab`` in the
same notebook had none either.) ipywidgets buttons bind their events when they render, whatever
Lumino thinks, so :class:`PageTabs` builds the tab strip from :class:`ipywidgets.ToggleButtons`
and shows one page of a box at a time; the kernel owns which page is shown, so a reconnecting
front end gets the current choice with the rest of the state.

Why :class:`LivePlot`
---------------------
:class:`jupyter_bokeh.BokehModel` serialises its plot once, when it is made; later changes travel
as patches to the views that exist. A view made later (after a reload) started from that first
state and showed an old design until the next edit. :class:`LivePlot` serialises the plot afresh
whenever a front end asks for the full widget state, so every new view starts from the current
design — only when the plot changed since it was last serialised (serialising takes tens of
milliseconds per plot; a widget that opens right after it was made sends the state it has).
"""

from __future__ import annotations

from typing import Any

import ipywidgets as w
import traitlets

from ._base import log

__all__ = ["PageTabs", "LazyPage", "live_plot"]  # LivePlot: module attribute made on first use (see __getattr__)

TABS_CSS = """<style>
.pwmkit-tabbar .widget-toggle-button {width:auto; min-width:0; padding:0 12px; margin:0 2px 0 0;
  border-radius:4px 4px 0 0; border:1px solid #d0d4da; border-bottom:none; background:#f3f4f6; color:#3d4652}
.pwmkit-tabbar .widget-toggle-button.mod-active {background:#ffffff; color:#1f2328; font-weight:600;
  box-shadow: inset 0 3px 0 #0072B2}
.pwmkit-tabbar {border-bottom:1px solid #d0d4da; flex-wrap:wrap}
.pwmkit-tabpage {padding:6px 8px; border:1px solid #d0d4da; border-top:none}
</style>"""


class PageTabs(w.VBox):
    """Tabs: a strip of toggle buttons above the pages; one page is shown at a time.

    Parameters
    ----------
    pages : list of (title, widget)

    Attributes
    ----------
    selected_index : int
        The page shown (kernel side; observe it like ``ipywidgets.Tab.selected_index``).
    titles : tuple of str
    pages : tuple of widgets
    bar : ipywidgets.ToggleButtons (CSS class ``pwmkit-tabbar``)
    """

    selected_index = traitlets.Int(0)

    def __init__(self, pages: list[tuple[str, w.Widget]]) -> None:
        titles = tuple(t for t, _p in pages)
        self.bar = w.ToggleButtons(options=[(t, i) for i, t in enumerate(titles)], value=0,
                                   style={"button_width": "auto"})
        self.bar.add_class("pwmkit-tabbar")
        self._pages = tuple(p for _t, p in pages)
        for page in self._pages:
            page.add_class("pwmkit-tabpage")
        self.body = w.VBox(list(self._pages))
        self.body.add_class("pwmkit-tabpages")
        super().__init__([w.HTML(TABS_CSS), self.bar, self.body])
        self.add_class("pwmkit-tabs")
        self._show(0)
        self.bar.observe(self._on_bar, names="value")
        self.observe(self._on_selected, names="selected_index")

    @property
    def titles(self) -> tuple[str, ...]:
        return tuple(label for label, _i in self.bar.options)

    def add_page(self, title: str, page: w.Widget) -> int:
        """Append a page (hidden; the selected page stays); returns its index."""
        page.add_class("pwmkit-tabpage")
        page.layout.display = "none"
        selected = self.selected_index
        titles = (*self.titles, title)
        self._pages = (*self._pages, page)
        with self.hold_sync():
            self.body.children = self._pages
            self.bar.options = [(t, i) for i, t in enumerate(titles)]
            self.bar.value = selected
        return len(self._pages) - 1

    @property
    def pages(self) -> tuple[w.Widget, ...]:
        return self._pages

    def _show(self, index: int) -> None:
        with self.hold_sync():
            for i, page in enumerate(self._pages):
                page.layout.display = None if i == index else "none"

    def _on_bar(self, change: dict[str, Any]) -> None:
        try:
            if change["new"] is not None:
                self.selected_index = int(change["new"])
        except Exception:  # never raise into the widget machinery
            log.exception("pwmkit: selecting a tab failed")

    def _on_selected(self, change: dict[str, Any]) -> None:
        try:
            index = int(change["new"])
            if not 0 <= index < len(self._pages):
                raise IndexError(f"tab {index} out of range 0 … {len(self._pages) - 1}")
            self._show(index)
            if self.bar.value != index:
                self.bar.value = index
        except Exception:
            log.exception("pwmkit: showing a tab failed")


class LazyPage(w.VBox):
    """A tab page whose panel is built the first time the page is shown, asked for, or prefetched.

    A dashboard has a dozen pages with about fifteen plots; building them all before the first
    display took seconds. A lazy page holds a factory instead; :meth:`build` makes the panel (it
    reads the session's current design, so it starts up to date) and puts it in the page.

    Parameters
    ----------
    factory : callable
        Returns the panel (a widget with ``set_active(bool)``).
    """

    def __init__(self, factory: Any) -> None:
        super().__init__([w.HTML("<i style='color:#5a6270'>drawing this page…</i>")])
        self._factory = factory
        self.panel: Any = None

    @property
    def built(self) -> bool:
        return self.panel is not None

    def build(self) -> Any:
        """The panel, built now if it was not yet."""
        if self.panel is None:
            panel = self._factory()
            self._factory = None
            self.panel = panel
            self.children = (panel,)
            if self.layout.display == "none" and hasattr(panel, "set_active"):
                panel.set_active(False)  # built while hidden (asked for, prefetched): follow lazily
        return self.panel

    def set_active(self, active: bool) -> None:
        """Shown: build the panel if needed and let it catch up; hidden: tell a built panel."""
        if active:
            self.build().set_active(True)
        elif self.panel is not None:
            self.panel.set_active(False)


def _bokeh_model_class() -> type:
    from jupyter_bokeh import BokehModel

    return BokehModel


_LIVE: type | None = None


def _live_class() -> type:
    """:class:`LivePlot` is made on first use (jupyter_bokeh and bokeh load only when a plot is built)."""
    global _LIVE
    if _LIVE is None:
        from bokeh.core.json_encoder import serialize_json

        base = _bokeh_model_class()

        class LivePlot(base):  # type: ignore[misc, valid-type]
            """A :class:`jupyter_bokeh.BokehModel` whose full state is always the plot as it is now."""

            #: True once the plot changed after its state was last serialised
            _plot_changed = False

            def _document_patched(self, event: Any) -> None:
                self._plot_changed = True  # any change, also one a view made (zoom): the next full state has it
                super()._document_patched(event)

            def update_from_model(self, model: Any) -> None:
                super().update_from_model(model)
                self._plot_changed = False

            def get_state(self, key: Any = None, drop_defaults: bool = False) -> dict[str, Any]:
                state = super().get_state(key=key, drop_defaults=drop_defaults)
                if key is None and self._plot_changed and getattr(self, "_model", None) is not None:
                    # a front end asks for everything (it (re)connects, or the widget opens):
                    # serialise the plot as it is now, not as it was when the widget was made
                    try:
                        bundle = self._model_to_traits(self._model)
                        with self._lock_property(render_bundle=bundle):
                            self.render_bundle = bundle
                        state["render_bundle"] = serialize_json(bundle)
                        self._plot_changed = False
                    except Exception:  # the older state is still a valid plot
                        log.exception("pwmkit: re-serialising a plot failed")
                return state

        _LIVE = LivePlot
    return _LIVE


def live_plot(layout: Any, *classes: str) -> Any:
    """A live plot widget for a bokeh layout (see :class:`LivePlot`), with CSS classes."""
    model = _live_class()(layout)
    for css in classes:
        model.add_class(css)
    return model


def __getattr__(name: str) -> Any:
    if name == "LivePlot":
        return _live_class()
    raise AttributeError(name)
