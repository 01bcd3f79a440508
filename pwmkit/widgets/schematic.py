"""Schematic panel: the annotated SVG of the current design, redrawn (debounced) after changes."""

from __future__ import annotations

from typing import Any

import ipywidgets as w

from ..design import Design
from ._base import Debouncer, Panel, safe_callback
from .session import DesignSession, as_session

__all__ = ["SchematicPanel", "schematic_svg"]


def schematic_svg(design: Design, timing: Any = None) -> str:
    """SVG text of the design's schematic (:func:`pwmkit.schematic.for_design`)."""
    from ..schematic import for_design

    return for_design(design, timing=timing).svg


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
        self.svg = w.HTML(layout=w.Layout(width="calc(100% - 6px)"))  # 2 px margins; the SVG scales to fit
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
