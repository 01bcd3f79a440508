"""Generic 555-type timer families as data: one bipolar, one CMOS.

Values are typical figures published in data sheets of the generic part
families (several second sources agree), never one brand's part. Each number
carries an origin tag in :attr:`TimerFamily.origin`:

``"datasheet-generic"``
    typical value as published in data sheets of the generic family;
``"datasheet-fit"``
    a simple model fitted by us to such published points (the points are in
    the field's docstring);
``"common-practice"``
    a general fact of the trade with no single authoritative source;
``"from-memory"``
    recalled, not confirmed against a data sheet — treat with care.

References
----------
.. [1] Data sheets of the bipolar 555-type timer family (several second
   sources), electrical characteristics tables, 25 °C.
.. [2] Data sheets of two CMOS 555-type timer families, electrical
   characteristics tables, 25 °C.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Any, Literal

import numpy as np

from .._validate import quantity
from ..origins import origin_text
from ..ranges import checked

__all__ = ["TimerFamily", "BIPOLAR", "CMOS", "TIMERS", "get_timer"]

TimerName = Literal["bipolar", "cmos"]


@dataclass(frozen=True)
class TimerFamily:
    """Electrical data of a 555-type timer family (typical values at 25 °C).

    Attributes
    ----------
    name : str
        Registry key, ``"bipolar"`` or ``"cmos"``.
    description : str
        Plain-language description.
    vcc_min, vcc_max, vcc_abs_max : float
        Recommended supply range and absolute maximum [V].
    i_threshold, i_trigger : float
        Threshold and trigger input bias currents (typical) [A].
    i_threshold_max : float
        Threshold input current, maximum [A].
    vsat : float
        Discharge-transistor saturation voltage used as the timing default [V]
        (bipolar; 0 for CMOS, which is modelled as an on-resistance).
    vsat_test_current : float
        Discharge current at which ``vsat`` is specified [A].
    r_discharge_on : float
        Discharge switch on-resistance used as the timing default [Ω]
        (CMOS; 0 for bipolar, which is modelled as a saturation voltage).
    i_discharge_max : float
        Discharge current kept as the design limit [A].
    discharge_leakage : float
        Discharge pin off-state leakage (typical) [A].
    v_out_high_drop : float
        Output-high drop below Vcc at small source current [V].
    r_out_high_k : float
        Output-high source resistance model ``r = r_out_high_k / vcc`` [Ω·V]
        (CMOS) or a constant resistance if ``r_out_high_fixed`` [Ω].
    r_out_high_fixed : float
        Output-high source resistance when constant (bipolar) [Ω].
    r_out_low : float
        Output-low sink resistance [Ω].
    i_out_max : float
        Output source current held as the design limit [A].
    t_edge : float
        Output rise/fall time, typical [s].
    f_max_practical : float
        Practical maximum astable frequency [Hz].
    initial_accuracy : float
        Astable initial timing error, typical, fraction [1].
    drift_ppm_per_k : float
        Astable frequency temperature drift, typical [ppm/K].
    supply_sensitivity_per_v : float
        Astable frequency change per volt of supply, typical, fraction [1/V].
    threshold_spread : float
        Relative spread of the upper threshold voltage (the timing depends on
        the ratio of the thresholds, which is much tighter) [1].
    r_cv_divider : float
        Value of each of the three internal divider resistors [Ω]
        (0 when unknown).
    i_supply : float
        Quiescent supply current at 5 V, output low, typical [A].
    origin : dict
        Origin tag per field name.
    """

    name: str
    description: str
    vcc_min: float
    vcc_max: float
    vcc_abs_max: float
    i_threshold: float
    i_threshold_max: float
    i_trigger: float
    vsat: float
    vsat_test_current: float
    r_discharge_on: float
    i_discharge_max: float
    discharge_leakage: float
    v_out_high_drop: float
    r_out_high_k: float
    r_out_high_fixed: float
    r_out_low: float
    i_out_max: float
    t_edge: float
    f_max_practical: float
    initial_accuracy: float
    drift_ppm_per_k: float
    supply_sensitivity_per_v: float
    threshold_spread: float
    r_cv_divider: float
    i_supply: float
    origin: dict[str, str] = field(default_factory=dict, compare=False, repr=False)

    def output_source_resistance(self, vcc: Any) -> Any:
        """Output-high source resistance at supply ``vcc`` [Ω]."""
        vcc = quantity(vcc, "vcc", unit="V", minimum=0.0, min_inclusive=False)
        if self.r_out_high_fixed > 0:
            return self.r_out_high_fixed if np.ndim(vcc) == 0 else np.full_like(vcc, self.r_out_high_fixed)
        r = self.r_out_high_k / vcc
        return float(r) if np.ndim(r) == 0 else r

    def output_high(self, vcc: Any, i_source: Any = 0.0) -> Any:
        """Output-high level while sourcing ``i_source`` [V].

        ``v_oh = vcc − v_out_high_drop − i_source · r_source(vcc)``, floored
        at 0 V.

        Parameters
        ----------
        vcc : float or array_like
            Supply voltage [V].
        i_source : float or array_like
            Current drawn from the output [A].
        """
        vcc = quantity(vcc, "vcc", unit="V", minimum=0.0, min_inclusive=False)
        i_source = checked(i_source, "i_source", "current")
        v = np.maximum(vcc - self.v_out_high_drop - i_source * self.output_source_resistance(vcc), 0.0)
        return float(v) if np.ndim(v) == 0 else v

    def output_low(self, i_sink: Any = 0.0) -> Any:
        """Output-low level while sinking ``i_sink`` [V]."""
        i_sink = checked(i_sink, "i_sink", "current")
        v = i_sink * self.r_out_low
        return float(v) if np.ndim(v) == 0 else v

    def _repr_html_(self) -> str:
        rows = "".join(
            f"<tr><td>{k}</td><td>{getattr(self, k)!r}</td><td>{origin_text(self.origin.get(k, ''))}</td></tr>"
            for k in self.__dataclass_fields__
            if k not in ("origin",)
        )
        return f"<table><tr><th>field</th><th>value</th><th>origin</th></tr>{rows}</table>"


_DS = "datasheet-generic"

BIPOLAR = TimerFamily(
    name="bipolar",
    description="generic bipolar 555-type timer",
    vcc_min=4.5,
    vcc_max=16.0,
    vcc_abs_max=18.0,
    i_threshold=30e-9,
    i_threshold_max=250e-9,
    i_trigger=0.5e-6,
    vsat=0.1,
    vsat_test_current=10e-3,
    r_discharge_on=0.0,
    i_discharge_max=50e-3,
    discharge_leakage=20e-9,
    # 15 V: 13.3 V at 100 mA, 12.5 V at 200 mA; 5 V: 3.3 V at 100 mA  ->  1.35 V + 4 Ω
    v_out_high_drop=1.35,
    r_out_high_k=0.0,
    r_out_high_fixed=4.0,
    # 15 V: 0.1 V at 10 mA, 0.4 V at 50 mA  ->  about 8 Ω
    r_out_low=8.0,
    i_out_max=200e-3,
    t_edge=100e-9,
    f_max_practical=300e3,
    initial_accuracy=0.0225,
    drift_ppm_per_k=150.0,
    supply_sensitivity_per_v=0.003,
    threshold_spread=0.12,
    r_cv_divider=5e3,
    i_supply=3e-3,
    origin={
        "vcc_min": _DS, "vcc_max": _DS, "vcc_abs_max": _DS, "i_threshold": _DS, "i_threshold_max": _DS,
        "i_trigger": _DS, "vsat": _DS, "vsat_test_current": _DS, "r_discharge_on": "model choice",
        "i_discharge_max": "common-practice", "discharge_leakage": _DS, "v_out_high_drop": "datasheet-fit",
        "r_out_high_fixed": "datasheet-fit", "r_out_low": "datasheet-fit", "i_out_max": _DS, "t_edge": _DS,
        "f_max_practical": "from-memory", "initial_accuracy": _DS, "drift_ppm_per_k": _DS,
        "supply_sensitivity_per_v": _DS, "threshold_spread": _DS, "r_cv_divider": "from-memory",
        "i_supply": _DS,
    },
)

CMOS = TimerFamily(
    name="cmos",
    description="generic CMOS 555-type timer",
    vcc_min=2.0,
    vcc_max=15.0,
    vcc_abs_max=18.0,
    i_threshold=10e-12,
    i_threshold_max=150e-12,
    i_trigger=10e-12,
    vsat=0.0,
    vsat_test_current=10e-3,
    # 0.14 V at 10 mA (5 V)  ->  14 Ω
    r_discharge_on=14.0,
    i_discharge_max=100e-3,
    discharge_leakage=0.1e-9,
    # 15 V: 14.9 V at 1 mA, 14.2 V at 10 mA; 5 V: 4.8 V at 1 mA  ->  r ≈ 1000 V·Ω / vcc
    v_out_high_drop=0.0,
    r_out_high_k=1000.0,
    r_out_high_fixed=0.0,
    # 15 V: 0.12 V at 10 mA, 0.63 V at 50 mA  ->  about 12 Ω
    r_out_low=12.0,
    i_out_max=10e-3,
    t_edge=20e-9,
    f_max_practical=1.2e6,
    initial_accuracy=0.01,
    drift_ppm_per_k=75.0,
    supply_sensitivity_per_v=0.001,
    threshold_spread=0.055,
    r_cv_divider=0.0,
    i_supply=170e-6,
    origin={
        "vcc_min": _DS, "vcc_max": _DS, "vcc_abs_max": _DS, "i_threshold": _DS, "i_threshold_max": _DS,
        "i_trigger": _DS, "vsat": "model choice", "vsat_test_current": _DS, "r_discharge_on": "datasheet-fit",
        "i_discharge_max": _DS, "discharge_leakage": _DS, "v_out_high_drop": "datasheet-fit",
        "r_out_high_k": "datasheet-fit", "r_out_low": "datasheet-fit", "i_out_max": _DS, "t_edge": _DS,
        "f_max_practical": _DS, "initial_accuracy": _DS, "drift_ppm_per_k": _DS,
        "supply_sensitivity_per_v": _DS, "threshold_spread": _DS, "r_cv_divider": "unknown (not found)",
        "i_supply": _DS,
    },
)

TIMERS: dict[str, TimerFamily] = {"bipolar": BIPOLAR, "cmos": CMOS}


def get_timer(timer: str | TimerFamily) -> TimerFamily:
    """Return a timer family by name (``"bipolar"`` or ``"cmos"``) or pass one through."""
    from ._registry import lookup

    return lookup(timer, TIMERS, TimerFamily, "timer")
