"""Schematic panel: the annotated SVG of the current design, redrawn (debounced) after changes."""

from __future__ import annotations

from typing import Any

import ipywidgets as w

from ..design import Design, LedLoad, MotorLoad
from ._base import Debouncer, Panel, safe_callback
from .session import DesignSession, as_session

__all__ = ["SchematicPanel", "draw_arguments"]


def draw_arguments(design: Design, timing: Any = None) -> dict[str, Any]:
    """Keyword arguments of :func:`pwmkit.schematic.draw` for a design (and its timing result).

    Only fields are copied; the computed timing (when given) is written beside the paths.
    """
    t = design.timing
    kw: dict[str, Any] = dict(ra=t.ra, rb=t.rb, c=t.c, vcc=design.vcc, c_cv=t.cv_bypass)
    if t.topology == "pot":
        kw.update(pot=t.pot, wiper=t.wiper)
    if t.vctl is not None:
        kw["vctl"] = t.vctl
    elif t.r_cv is not None:
        kw["r_cv"] = t.r_cv
    load = design.load
    if isinstance(load, LedLoad):
        kw.update(load="led", n_series=load.n_series, n_parallel=load.n_parallel, r_led=load.r_series,
                  r_gate=design.switch.r_gate)
    elif isinstance(load, MotorLoad):
        kw.update(load="motor", r_gate=design.switch.r_gate, clamp=design.freewheel.clamp)
        if design.freewheel.clamp == "zener":
            kw["v_zener"] = design.freewheel.v_zener
    if design.v_load is not None and (load is not None):
        kw["v_load"] = design.v_load
    if timing is not None:
        kw["annotations"] = {k: getattr(timing, k) for k in ("t_high", "t_low", "frequency", "duty")}
    return kw


def schematic_svg(design: Design, timing: Any = None) -> str:
    """SVG text of the design's schematic (uses ``pwmkit.schematic.for_design`` when it exists)."""
    from .. import schematic

    for_design = getattr(schematic, "for_design", None)
    if for_design is not None:
        try:
            return for_design(design).svg
        except TypeError:  # an adapter with another signature: fall back to the plain drawing call
            pass
    kw = draw_arguments(design, timing)
    return schematic.draw(design.timing.topology, **kw).svg


def _fit(svg: str) -> str:
    """Let an SVG with a viewBox scale to its container's width."""
    import re

    head_end = svg.find(">")
    head = svg[:head_end]
    if "viewBox" not in head:
        return svg
    head = re.sub(r'\s(width|height)="[^"]*"', "", head)
    return head + ' width="100%" preserveAspectRatio="xMinYMin meet"' + svg[head_end:]


class SchematicPanel(Panel):
    """The circuit of the current design as SVG; redrawn after edits have settled.

    Parameters
    ----------
    design : Design or DesignSession
    debounce : float
        Quiet time before a redraw [s] (0 = redraw at once).
    """

    title = "Schematic"
    css_name = "schematic"

    def __init__(self, design: Design | DesignSession, *, debounce: float = 0.3) -> None:
        super().__init__()
        self.session = as_session(design)
        self.svg = w.HTML(layout=w.Layout(width="100%", overflow="auto"))
        self.svg.add_class("pwmkit-schematic-svg")
        self.redraws = 0
        self._debounced = Debouncer(self._draw, debounce)
        self.set_body([self.svg])
        self.session.subscribe(self.follow)
        self._draw()

    def refresh(self, evaluation: Any) -> None:
        """Schedule a redraw (debounced)."""
        self._debounced()

    @safe_callback
    def _draw(self) -> None:
        evaluation = self.session.evaluation
        svg = schematic_svg(self.session.design, getattr(evaluation, "timing", None))
        # scale to the panel width (the drawing carries a viewBox)
        self.svg.value = f"<div class='pwmkit-schematic' style='max-width:1000px'>{_fit(svg)}</div>"
        self.redraws += 1
        self.clear_message()

    def flush(self) -> None:
        """Redraw now if a redraw is pending."""
        self._debounced.flush()
