"""Thin drawing layer over schemdraw's SVG backend (internal).

Everything is placed at explicit coordinates in drawing units (x to the right, y up; one
resistor body is one unit long). schemdraw supplies the symbols and writes the SVG; no
matplotlib is involved (``Drawing(canvas="svg")``).

schemdraw keeps two pieces of module state that could leak into or out of our drawings: the
"current drawing" stack used by its ``with Drawing():`` blocks (an element created while a user's
block is open would be added to *their* drawing) and the SVG text mode (text becomes outlines when
the optional ziamath package is installed, which would hide the labels from search and tests).
:class:`Sheet` pauses the first and pins the second to ``<text>`` while it works, under a lock.
"""

from __future__ import annotations

import math
import re
import threading
from collections.abc import Sequence
from typing import Any

import schemdraw
import schemdraw.elements as elm
from schemdraw import drawing_stack
from schemdraw.backends import svg as svg_backend
from schemdraw.backends.svgtext import string_width
from schemdraw.elements.elements import Element, Element2Term
from schemdraw.segments import Segment, SegmentCircle, SegmentText

from .style import SchematicStyle

__all__ = ["Sheet", "LOCK"]

Point = tuple[float, float]

LOCK = threading.RLock()
_NAN = (math.nan, math.nan)  # pen-up marker inside a schemdraw Segment path
_DECL = re.compile(r"^<\?xml[^>]*\?>\s*")


class PotBody(Element2Term):
    """IEC 60617 resistor body, ``length`` units long (the potentiometer track)."""

    def __init__(self, length: float = 2.0, **kwargs: Any) -> None:
        super().__init__(**kwargs)
        h = 0.25
        self.segments.append(Segment([(0, 0), (0, h), (length, h), (length, -h), (0, -h), (0, 0), _NAN, (length, 0)]))


class _Bundle(Element):
    """Many wires, dots and texts in one element (one element per wire would cost ~1 ms each)."""

    def __init__(self, segments: list[Any], **kwargs: Any) -> None:
        super().__init__(**kwargs)
        self.segments.extend(segments)


class SourceIEC(Element2Term):
    """IEC 60617 ideal voltage source: a circle crossed by the conductor, ``+`` beside the end."""

    def __init__(self, **kwargs: Any) -> None:
        super().__init__(**kwargs)
        r = 0.5
        self.segments.append(Segment([(0, 0), (2 * r, 0)]))
        self.segments.append(SegmentCircle((r, 0), r))
        s = 0.11  # plus sign, outside the circle near the end terminal
        self.segments.append(Segment([(2 * r - 0.05, 0.42 - s), (2 * r - 0.05, 0.42 + s)]))
        self.segments.append(Segment([(2 * r - 0.05 - s, 0.42), (2 * r - 0.05 + s, 0.42)]))


def _clean(text: str) -> str:
    # schemdraw builds each text line as XML from the string and reads '$…$' as math: escape '&'
    # (it escapes '<' and '>' itself) and keep '$' literal with the full-width sign.
    return text.replace("&", "&amp;").replace("$", "\uff04")


class Sheet:
    """One drawing in progress."""

    def __init__(self, style: SchematicStyle) -> None:
        self.style = style
        d = schemdraw.Drawing(canvas="svg", show=False)
        d.config(unit=2.5, inches_per_unit=style.scale, fontsize=style.font_size, font=style.font_family,
                 color=style.ink, lw=style.line_width, margin=0.25, bgcolor=style.background)
        self.d = d
        self.pt_per_unit = 72.0 * style.scale
        # text extents measured at our scale; schemdraw's own estimate assumes 0.5 inch per unit
        self.extent = [math.inf, math.inf, -math.inf, -math.inf]
        self.segments: list[Any] = []  # wires, dots and texts, added as one element at the end

    # -- measuring ---------------------------------------------------------------------------
    def text_width(self, text: str, size: float | None = None) -> float:
        """Estimated width of (multi-line) text [drawing units]."""
        size = self.style.font_size if size is None else size
        lines = text.splitlines() or [""]
        # schemdraw's table follows Arial; DejaVu Sans (the usual Linux fallback) runs ~15 % wider
        widest = max(string_width(line, fontsize=size, font=self.style.font_family) for line in lines)
        return 1.15 * widest / self.pt_per_unit

    def text_height(self, text: str, size: float | None = None) -> float:
        """Height of (multi-line) text [drawing units]."""
        size = self.style.font_size if size is None else size
        return max(1, len(text.splitlines())) * size / self.pt_per_unit

    # -- primitives --------------------------------------------------------------------------
    def add(self, element: Any) -> Any:
        return self.d.add(element)

    def wire(self, *points: Point, color: str | None = None, lw: float | None = None, zorder: int | None = None) -> None:
        """Straight wire through ``points``."""
        path = [p for i, p in enumerate(points) if i == 0 or p != points[i - 1]]
        if len(path) > 1:
            self.segments.append(Segment(path, color=color, lw=lw, zorder=zorder))

    def dot(self, p: Point, open_: bool = False) -> None:
        """Junction dot (or an open terminal circle)."""
        fill = self.style.background if open_ else self.style.ink
        self.segments.append(SegmentCircle(p, 0.13 if open_ else 0.09, fill=fill, zorder=4))

    def text(self, p: Point, text: str, *, halign: str = "left", valign: str = "center",
             color: str | None = None, size: float | None = None) -> None:
        """Free text anchored at ``p``."""
        w, h = self.text_width(text, size), self.text_height(text, size)
        x0 = {"left": p[0], "center": p[0] - w / 2}.get(halign, p[0] - w)
        y0 = {"bottom": p[1], "center": p[1] - h / 2}.get(valign, p[1] - h)
        e = self.extent
        e[:] = [min(e[0], x0), min(e[1], y0), max(e[2], x0 + w), max(e[3], y0 + h)]
        self.segments.append(SegmentText(p, _clean(text), align=(halign, valign), color=color or self.style.ink,
                                         fontsize=size or self.style.font_size, font=self.style.font_family,
                                         zorder=3))

    def two(self, element: Any, a: Point, b: Point) -> Any:
        """Two-terminal symbol from ``a`` (start: anode for diodes) to ``b``."""
        return self.add(element.at(a).to(b))

    def highlight(self, points: Sequence[Point], color: str, offset: float) -> None:
        """Pale band behind a path, shifted by ``offset`` in x and y so two bands can share a wire."""
        shifted = [(x + offset, y + offset) for x, y in points]
        self.wire(*shifted, color=color, lw=7.0, zorder=0)

    # -- output ------------------------------------------------------------------------------
    def svg(self) -> str:
        """Render to SVG text (no XML declaration)."""
        if self.segments:
            self.add(_Bundle(self.segments).theta(0).at((0.0, 0.0)))
            self.segments = []
        x0, y0, x1, y1 = self.extent
        if math.isfinite(x0):  # an invisible diagonal makes the page cover all text
            self.add(elm.Gap().at((x0, y0)).to((x1, y1)))
        data = self.d.get_imagedata("svg").decode("utf-8")
        return _DECL.sub("", data)


class Paused:
    """Context: hold the lock, pause schemdraw's drawing stack and pin SVG text mode."""

    def __enter__(self) -> Paused:
        LOCK.acquire()
        self._pause = drawing_stack.pause
        self._text = getattr(svg_backend.config, "_text", None)
        drawing_stack.pause = True
        if self._text is not None:
            svg_backend.config._text = "text"
        return self

    def __exit__(self, *exc: object) -> None:
        drawing_stack.pause = self._pause
        if self._text is not None:
            svg_backend.config._text = self._text
        LOCK.release()
