"""Drawing style of pwmkit schematics: palette, type and scale.

The palette is our own and deliberately small: one dark slate ink for symbols, wires and labels,
a muted slate for pin numbers and secondary text, a blue for the charge path and a burnt orange
for the discharge path, each with a pale tint used to highlight the path behind the wires.

Blue against orange is the usual pairing that stays apart for the common colour-vision
deficiencies (common practice); the two path colours also differ clearly in CIE 1976 lightness
and every path label *says* "charge" or "discharge", so colour is never the only cue. All text
colours keep at least the 4.5 : 1 contrast against the background that WCAG 2.1 asks for normal
text (the tests check both with the published formulas).
"""

from __future__ import annotations

import math
import re
from collections.abc import Mapping
from dataclasses import dataclass, fields, replace
from typing import Any

from ..errors import DesignError

__all__ = ["SchematicStyle", "DEFAULT_STYLE", "resolve_style"]

_HEX = re.compile(r"#[0-9a-fA-F]{6}")
_FONT = re.compile(r"[A-Za-z0-9 ,\-]{1,120}")


@dataclass(frozen=True)
class SchematicStyle:
    """Colours, type and scale of a drawing.

    Attributes
    ----------
    ink : symbols, wires, references and values (``#rrggbb``)
    muted : pin numbers, pin names and other secondary text (``#rrggbb``)
    charge, discharge : text colour of the path annotations (``#rrggbb``)
    charge_tint, discharge_tint : highlight drawn behind the two timing paths (``#rrggbb``)
    box_fill : fill of the timer body (``#rrggbb``)
    background : page colour (``#rrggbb``)
    font_family : CSS font list for the SVG text
    font_size : label size [pt]
    line_width : stroke width of symbols and wires [pt]
    scale : drawing scale [inch per drawing unit]; one resistor body is one unit long
    highlight_paths : draw the path highlights; ``None`` draws them when a path annotation
        (``t_high``, ``t_low``, ``r_charge``, ``r_discharge``) is given
    """

    ink: str = "#1f2a36"
    muted: str = "#4f5d6b"
    charge: str = "#14457d"
    discharge: str = "#ad5600"
    charge_tint: str = "#c7dcf2"
    discharge_tint: str = "#fbe0c6"
    box_fill: str = "#f3f5f7"
    background: str = "#ffffff"
    font_family: str = "DejaVu Sans, Arial, Helvetica, sans-serif"
    font_size: float = 10.0
    line_width: float = 1.3
    scale: float = 0.36
    highlight_paths: bool | None = None

    def __post_init__(self) -> None:
        for f in fields(self):
            value = getattr(self, f.name)
            if f.type == "str" and f.name != "font_family":
                if not isinstance(value, str) or not _HEX.fullmatch(value):
                    raise DesignError(f"style.{f.name}: {value!r} is not a colour; give '#rrggbb' (six hex digits)")
        if not isinstance(self.font_family, str) or not _FONT.fullmatch(self.font_family):
            raise DesignError(
                f"style.font_family: {self.font_family!r} is not allowed; give font names made of letters, "
                "digits, blanks, hyphens and commas (at most 120 characters)"
            )
        limits = {"font_size": (4.0, 40.0), "line_width": (0.2, 6.0), "scale": (0.1, 2.0)}
        for name, (low, high) in limits.items():
            value = getattr(self, name)
            if isinstance(value, bool) or not isinstance(value, (int, float)) or not math.isfinite(value) or not (
                low <= value <= high
            ):
                raise DesignError(f"style.{name}: {value!r} is out of range; allowed {low:g} to {high:g}")
        if self.highlight_paths not in (None, True, False):
            raise DesignError(f"style.highlight_paths: {self.highlight_paths!r} is not allowed; give True, False or None")


DEFAULT_STYLE = SchematicStyle()


def resolve_style(style: Any) -> SchematicStyle:
    """Turn ``None``, a :class:`SchematicStyle` or a mapping of overrides into a style."""
    if style is None:
        return DEFAULT_STYLE
    if isinstance(style, SchematicStyle):
        return style
    if isinstance(style, Mapping):
        known = {f.name for f in fields(SchematicStyle)}
        unknown = sorted(str(k) for k in style if k not in known)
        if unknown:
            raise DesignError(f"style: unknown field(s) {', '.join(unknown)}; allowed: {', '.join(sorted(known))}")
        return replace(DEFAULT_STYLE, **dict(style))
    raise DesignError(f"style: {type(style).__name__} is not allowed; give None, a SchematicStyle or a dict of fields")
