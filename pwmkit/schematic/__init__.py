"""Annotated circuit schematics of 555-type astable PWM drivers, as SVG (presentation layer).

:func:`draw` lays out the timing network of a topology (``classic``, ``bypass``, ``steered``,
``pot``), the timer with its control-voltage and decoupling parts, and optionally the low-side
MOSFET with an LED-string or motor load. Every part carries its reference and value in
engineering notation (:func:`pwmkit.values.format_value`); computed quantities can be written
beside the charge and discharge paths, which are then highlighted.

Symbols: IEC 60617 style — rectangular resistors and potentiometer track, plain capacitor
plates, filled-triangle diodes, circle-with-conductor voltage source — drawn with schemdraw's
SVG backend (no matplotlib). Colours: our own restrained palette (see
:class:`~pwmkit.schematic.style.SchematicStyle`), blue for the charge path and burnt orange for
the discharge path, chosen to stay distinct for colour-vision deficiencies and always named in
words as well.

``import pwmkit.schematic`` is cheap: schemdraw is imported on the first :func:`draw`.
"""

from __future__ import annotations

from .._display import register_html
from .adapter import for_design
from .draw import draw
from .parts import PartLabel, Schematic
from .style import DEFAULT_STYLE, SchematicStyle


def _design_schematic_html(design: object) -> str:
    """The design's annotated schematic for its rich display (a one-line note when it cannot be drawn)."""
    import html

    from ..errors import DesignError

    try:
        return for_design(design).svg
    except (DesignError, ImportError) as exc:
        return f"<p><em>schematic not drawn: {html.escape(str(exc))}</em></p>"


register_html("design", "schematic", _design_schematic_html)

__all__ = ["draw", "for_design", "Schematic", "PartLabel", "SchematicStyle", "DEFAULT_STYLE"]
