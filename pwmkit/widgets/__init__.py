"""Interactive design panels for Jupyter (presentation layer: ipywidgets + bokeh).

One call builds everything::

    from pwmkit.design import demo_designs
    from pwmkit.widgets import dashboard
    dash = dashboard(demo_designs()["grow-bar"])
    dash

Each panel also works alone (give it a design) or together with others (give them one
:class:`DesignSession`):

- :class:`TimingPanel` — topology, values with E-series snapping, supply, timer, diodes; readouts;
- :class:`WaveformPanel` — capacitor voltage, thresholds, output, load current;
- :class:`PotTravelPanel` — duty and frequency over the wiper travel;
- :class:`SpreadPanel` — Monte Carlo histograms, worst case, yield (on demand);
- :class:`LoadsPanel` — LED or motor, MOSFET, freewheel diode;
- :class:`FlickerPanel` — the design point on the IEEE 1789 regions;
- :class:`FindingsPanel` — design-rule checks with remedies;
- :class:`FormulasPanel` — rendered formulas and copyable text;
- :class:`SchematicPanel` — the circuit as SVG;
- :class:`TwoTimerPanel`, :class:`ControlHeaterPanel` — the two-timer PWM (clock, monostable,
  control range) and heater loads (element temperature, thermistor loop);
- :class:`RequirementsPanel`, :class:`PartsPanel` — requirements and criterion; dielectric, tolerances, series;
- :class:`CandidatesPanel` — ranked part sets for the requirements (non-blocking search), "use this set";
- :class:`ConditionsPanel` — frequency and duty against supply and ambient;
- :class:`FileBar` — Open, Save, Save as, Revert of the design file, "unsaved changes";
- :class:`AsBuiltPanel` — bench readings against the design ("As built" tab for designs with readings).

``dashboard("my-driver.toml")`` opens a design file; Save writes the edits back to it.

Plot panels need BokehJS on the notebook page: :func:`dashboard` loads it from the installed
bokeh (no network); when you use plot panels without a dashboard, call :func:`load_bokehjs` once.

Panels hold no physics: they call :func:`pwmkit.evaluate.evaluate` and the model functions.
Bad input shows an inline message (CSS class ``pwmkit-msg``) in the panel where it was typed and
the last good design stays. See :mod:`pwmkit.widgets.board` for the live-update policy.
Importing this package imports ipywidgets; bokeh is imported when a plot panel is built.
"""

from __future__ import annotations

from .. import schematic as _schematic  # noqa: F401 - registers the schematic in a Design's rich display
from .._lazy import lazy_exports

_EXPORTS = {
    "dashboard": "board",
    "Dashboard": "board",
    "load_bokehjs": "board",
    "DesignSession": "session",
    "TimingPanel": "timing",
    "WaveformPanel": "views",
    "PotTravelPanel": "views",
    "FlickerPanel": "views",
    "SpreadPanel": "spread",
    "LoadsPanel": "loads",
    "FindingsPanel": "checks",
    "CautionsBox": "checks",
    "FormulasPanel": "formulas",
    "SchematicPanel": "schematic",
    "ValueEntry": "entry",
    "TwoTimerPanel": "two_timer",
    "ControlHeaterPanel": "two_timer",
    "TwoTimerCandidatesPanel": "two_timer",
    "AsBuiltPanel": "bench",
    "RequirementsPanel": "requirements",
    "PartsPanel": "requirements",
    "CandidatesPanel": "candidates",
    "ConditionsPanel": "conditions",
    "FileBar": "designfile_bar",
}

__all__ = sorted(_EXPORTS)


__getattr__, __dir__ = lazy_exports(__name__, _EXPORTS, namespace=globals())
