"""Bokeh figures of the HTML report (presentation layer; bokeh is imported inside the functions).

The report shows the same figures as the notebooks, made by :mod:`pwmkit.plots`: timer
waveforms with the load current, the pot travel, the Monte Carlo histograms and the MOSFET loss
breakdown.
"""

from __future__ import annotations

from typing import Any

__all__ = ["report_figures"]


def report_figures(evaluation: Any) -> dict[str, Any]:
    """The report's bokeh layouts, keyed ``"waveform"``, ``"pot"``, ``"spread"``, ``"losses"``.

    Keys are absent when they do not apply (no pot, quick mode without spread, no MOSFET losses).
    """
    from ..plots.loads import LossBarsPlot
    from ..plots.spread import SpreadPlot
    from ..plots.travel import PotTravelPlot
    from ..plots.waveforms import WaveformPlot, output_high_level

    design = evaluation.design
    out: dict[str, Any] = {}
    wave = WaveformPlot(width=760, height=230)
    wave.update(evaluation.timing, led=evaluation.led, motor=evaluation.motor,
                v_out_high=output_high_level(design, evaluation))
    # without a load the (hidden, empty) current plot is left out: bokeh cannot range an empty plot
    out["waveform"] = wave.layout if (evaluation.led is not None or evaluation.motor is not None) else wave.top
    if evaluation.pot_travel is not None:
        travel = PotTravelPlot(width=380, height=240)
        travel.update(evaluation.pot_travel, evaluation.timing, float(design.timing.wiper))
        out["pot"] = travel.layout
    if evaluation.spread is not None:
        spread = SpreadPlot(width=380, height=230)
        spread.update(evaluation.spread, evaluation.worst_case)
        out["spread"] = spread.layout
    if evaluation.mosfet is not None:
        losses = LossBarsPlot(width=520, height=220)
        losses.update(evaluation.mosfet)
        out["losses"] = losses.layout
    return out
