"""Bokeh figure builders for pwmkit results (presentation layer; only here and in widgets is bokeh used).

Each builder makes its figures once; ``update(result…)`` assigns new ``ColumnDataSource.data`` as a
whole dict, so a live view costs one patch message per plot and no figure is ever rebuilt.

- :class:`WaveformPlot` — capacitor voltage, thresholds, output and load current (one time axis);
- :class:`PotTravelPlot` — duty and frequency over the wiper travel, exact and textbook;
- :class:`SpreadPlot` — Monte Carlo histograms with worst-case band and requirement window;
- :class:`FlickerMapPlot` — the design point on the IEEE Std 1789-2015 regions;
- :class:`MotorCurrentPlot`, :class:`LossBarsPlot` — motor current, MOSFET loss breakdown.

Put a builder's ``layout`` in :class:`jupyter_bokeh.BokehModel` to get a live ipywidget. Nothing
here calls ``output_notebook``; :func:`pwmkit.widgets.dashboard` does, once per dashboard.
"""

from __future__ import annotations

from .._lazy import lazy_exports

_EXPORTS = {
    "WaveformPlot": "waveforms",
    "waveform_data": "waveforms",
    "PotTravelPlot": "travel",
    "ConditionsPlot": "conditions",
    "SpreadPlot": "spread",
    "histogram_data": "spread",
    "FlickerMapPlot": "flicker",
    "region_polygons": "flicker",
    "MotorCurrentPlot": "loads",
    "LossBarsPlot": "loads",
    "motor_current_trace": "loads",
    "led_current_trace": "loads",
}

__all__ = sorted(_EXPORTS)


__getattr__, __dir__ = lazy_exports(__name__, _EXPORTS, namespace=globals())
