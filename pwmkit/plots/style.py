"""Colours, sizes and the figure factory shared by every pwmkit plot (presentation layer).

Colours come from the Okabe–Ito set, chosen because it stays distinguishable under the common
colour-vision deficiencies; every plot also separates its lines by dash pattern or marker and
names them in a legend, so no meaning rests on colour alone.

References
----------
M. Okabe, K. Ito, *Color Universal Design (CUD) — How to make figures and presentations that are
friendly to colorblind people*, J*FLY, 2002/2008 (the eight-colour set).
"""

from __future__ import annotations

from types import MappingProxyType
from typing import Any

__all__ = ["OKABE_ITO", "INK", "TRACE", "REGION", "new_figure", "style_legend", "time_scale", "engineering_scale",
           "FONT", "legend_outside"]

#: The Okabe–Ito colours under plain names.
OKABE_ITO = MappingProxyType({
    "black": "#000000",
    "orange": "#E69F00",
    "sky": "#56B4E9",
    "green": "#009E73",
    "yellow": "#F0E442",
    "blue": "#0072B2",
    "vermillion": "#D55E00",
    "purple": "#CC79A7",
})

#: Neutral inks for axes, grids and text.
INK = MappingProxyType({"text": "#1f2328", "muted": "#5a6270", "grid": "#e6e8eb", "panel": "#fbfbfa"})

#: What each trace means → colour (dash patterns are set where the trace is drawn).
TRACE = MappingProxyType({
    "capacitor": OKABE_ITO["blue"],
    "upper": OKABE_ITO["vermillion"],
    "lower": OKABE_ITO["green"],
    "output": "#6b6b6b",
    "load": OKABE_ITO["purple"],
    "exact": OKABE_ITO["blue"],
    "ideal": OKABE_ITO["orange"],
    "marker": OKABE_ITO["black"],
    "spread": OKABE_ITO["sky"],
    "worst": OKABE_ITO["orange"],
    "window": OKABE_ITO["green"],
})

#: IEEE 1789 region fills on the flicker map.
REGION = MappingProxyType({
    "no-effect": OKABE_ITO["green"],
    "low-risk": OKABE_ITO["yellow"],
    "elevated": OKABE_ITO["vermillion"],
})

FONT = "'Source Sans 3', 'Segoe UI', Helvetica, Arial, sans-serif"

_TIME_UNITS = ((1e-9, "ns"), (1e-6, "µs"), (1e-3, "ms"), (1.0, "s"))


def time_scale(span: float) -> tuple[float, str]:
    """Factor and unit name that show a time span of ``span`` seconds with 1–1000 units.

    Parameters
    ----------
    span : float
        Largest time to show [s].

    Returns
    -------
    (factor, unit) : tuple
        Multiply seconds by ``1 / factor`` to get ``unit``.

    Examples
    --------
    >>> time_scale(3e-4)
    (1e-06, 'µs')
    """
    for factor, unit in _TIME_UNITS:
        if span < 1000 * factor:
            return factor, unit
    return 1.0, "s"


_PREFIXES = ((1e-12, "p"), (1e-9, "n"), (1e-6, "µ"), (1e-3, "m"), (1.0, ""), (1e3, "k"), (1e6, "M"), (1e9, "G"))


def engineering_scale(largest: float, unit: str) -> tuple[float, str]:
    """Factor and prefixed unit that show values up to ``largest`` with 1–1000 units on an axis.

    The same prefix rule as :func:`pwmkit.values.format_value`, so an axis in kHz sits beside a
    text in kHz.

    Parameters
    ----------
    largest : float
        Largest magnitude to show [unit].
    unit : str
        Unit symbol ("Hz", "W", "A" …).

    Returns
    -------
    (factor, prefixed_unit) : tuple
        Divide values by ``factor`` to get ``prefixed_unit``.

    Examples
    --------
    >>> engineering_scale(5624.0, "Hz"), engineering_scale(2.9e-4, "W"), engineering_scale(0.0, "A")
    ((1000.0, 'kHz'), (1e-06, 'µW'), (1.0, 'A'))
    """
    big = abs(float(largest))
    if not big > 0 or big != big:
        return 1.0, unit
    for factor, prefix in _PREFIXES:
        if big < 1000 * factor * (1 - 5e-4):
            return factor, prefix + unit
    return _PREFIXES[-1][0], _PREFIXES[-1][1] + unit


def new_figure(*, title: str = "", width: int = 560, height: int = 220, x_label: str = "",
               y_label: str = "", **kwargs: Any) -> Any:
    """A bokeh figure in pwmkit's look: quiet grid, no logo, wheel zoom off until clicked.

    Parameters
    ----------
    title, x_label, y_label : str
        Texts.
    width, height : int
        Size in screen pixels (fixed sizing, so figures inside hidden tabs lay out correctly).
    **kwargs
        Passed to :func:`bokeh.plotting.figure` (``x_axis_type``, ``x_range`` …).

    Returns
    -------
    bokeh.plotting.figure
    """
    from bokeh.plotting import figure

    fig = figure(width=width, height=height, title=title, tools="pan,box_zoom,wheel_zoom,reset,save",
                 toolbar_location="right", background_fill_color=INK["panel"], border_fill_color="white",
                 **kwargs)
    fig.toolbar.logo = None
    fig.toolbar.active_scroll = None
    fig.xaxis.axis_label = x_label
    fig.yaxis.axis_label = y_label
    for axis in (fig.xaxis, fig.yaxis):
        axis.axis_label_text_font_style = "normal"
        axis.axis_label_text_color = INK["muted"]
        axis.major_label_text_color = INK["muted"]
        axis.axis_line_color = INK["muted"]
    fig.grid.grid_line_color = INK["grid"]
    fig.outline_line_color = None
    fig.title.text_color = INK["text"]
    fig.title.text_font_style = "bold"
    fig.title.text_font_size = "12px"
    return fig


def style_legend(fig: Any, location: str | None = None) -> None:
    """Small legend that can hide lines on click, placed clear of the traces.

    A legend that bokeh put inside the data area (``legend_label=…``) is moved below it, in one
    row, so it never covers a trace; ``location`` is kept for callers that name a corner but no
    longer puts the legend over the data.
    """
    from bokeh.models import Legend

    for legend in [r for r in fig.center if isinstance(r, Legend)]:
        fig.center = [r for r in fig.center if r is not legend]
        legend.orientation = "horizontal"
        fig.add_layout(legend, "below")
    fig.legend.click_policy = "hide"
    fig.legend.background_fill_alpha = 0.9
    fig.legend.label_text_font_size = "10px"
    fig.legend.spacing = 6
    fig.legend.padding = 2
    fig.legend.margin = 2
    fig.legend.border_line_color = None


def legend_outside(fig: Any, items: list[tuple[str, list[Any]]], place: str = "right") -> Any:
    """Put a legend of ``items`` (label, renderers) beside the data area, never on the traces.

    ``place`` is "right" (one column) or "below" (one row).
    """
    from bokeh.models import Legend

    legend = Legend(items=items, orientation="vertical" if place == "right" else "horizontal")
    fig.add_layout(legend, place)
    style_legend(fig)
    return legend
