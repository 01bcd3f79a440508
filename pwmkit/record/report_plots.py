"""Bokeh figures of the HTML report (presentation layer; bokeh is imported inside the functions).

The report shows the same figures as the notebooks, made by :mod:`pwmkit.plots`: timer
waveforms with the load current, the pot travel, the Monte Carlo histograms and the MOSFET loss
breakdown.
"""

from __future__ import annotations

from typing import Any

from ..errors import DesignError

__all__ = ["report_figures", "as_built_reconciliation"]


def as_built_reconciliation(evaluation: Any) -> Any:
    """:func:`pwmkit.bench.reconcile_design` of the evaluated design at its Monte Carlo size and seed.

    None without bench readings with a frequency or duty.
    """
    from ..bench import reconcile_design

    design = evaluation.design
    if not design.bench:
        return None
    sp = evaluation.spread
    n, seed = (max(int(sp.n), 1000), int(sp.seed or 0)) if sp is not None else (20_000, 1)
    return reconcile_design(design, n=n, seed=seed)


def report_figures(evaluation: Any) -> dict[str, Any]:
    """The report's bokeh layouts, keyed ``"waveform"``, ``"pot"``, ``"spread"``, ``"losses"``, ``"as-built"``.

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
    try:
        rec = as_built_reconciliation(evaluation)
    except DesignError:  # the report's as-built section says why
        rec = None
    if rec is not None:  # bench readings on the pot travel and the spread at their conditions
        from ..plots.bench import AsBuiltPlot

        built = AsBuiltPlot(width=380, height=230, pot=design.timing.topology == "pot")
        built.update(rec, evaluation.pot_travel)
        out["as-built"] = built.layout
    return out
