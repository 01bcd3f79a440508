"""Conditions panel: frequency and duty against supply voltage and against ambient temperature."""

from __future__ import annotations

from typing import Any

import ipywidgets as w

from ._base import Panel, safe_callback
from .session import DesignSession

__all__ = ["ConditionsPanel"]


class ConditionsPanel(Panel):
    """Frequency and duty across the stated supply range and ambient range, the requirement drawn.

    Curves from :func:`pwmkit.condition_sweep.condition_sweep` (every part nominal, one condition
    moved at a time; the band is the timer's and the capacitor's coefficients).
    """

    title = "Supply and ambient"
    css_name = "conditions"

    def __init__(self, session: DesignSession) -> None:
        super().__init__()
        from ..plots.conditions import ConditionsPlot
        from .tabs import live_plot

        self.session = session
        self.plot = ConditionsPlot()
        self.note = w.HTML()
        self.refresh(session.evaluation)  # first data before the widget is made
        self.bokeh = live_plot(self.plot.layout, "pwmkit-plot", "pwmkit-plot-conditions")  # reload-proof
        self.set_body([self.note, self.bokeh])
        session.subscribe(self.follow)

    @safe_callback
    def refresh(self, _evaluation: Any) -> None:
        from ..condition_sweep import condition_sweep
        from ..requirement_spread import duty_requirement

        d = self.session.design
        sweep = condition_sweep(d)
        spec = duty_requirement(d)
        duty_window = spec[1:] if spec is not None and spec[0] == "window" else None
        self.plot.update(sweep, d.requirements.frequency_window, duty_window)
        lo, hi = d.supply_range
        self.note.value = (f"<div style='font-size:12px;color:#5a6270'>Supply {lo:g} … {hi:g} V and ambient "
                           f"{d.t_ambient_min_c:g} … {d.t_ambient_max_c:g} °C as stated in the requirements; parts at "
                           "their nominal values (the Spread tab adds the part tolerances).</div>")
        self.clear_message()
