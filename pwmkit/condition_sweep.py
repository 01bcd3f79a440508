"""Frequency and duty of a design across its supply range and its ambient range (design layer).

:func:`condition_sweep` moves one operating condition at a time, every part at its nominal value:

- **supply** ``vcc_min … vcc_max`` — the exact timing (:func:`pwmkit.timing.astable`: diode drop,
  discharge switch and thresholds follow the supply; a control-pin resistor's divider too), and as
  a band the timer family's supply sensitivity (± its published coefficient × the distance from
  the nominal supply);
- **ambient** ``t_ambient_min_c … t_ambient_max_c`` — the steering-diode drop drifting with its
  temperature coefficient, and as a band the capacitor dielectric's temperature envelope and the
  timer's drift (± coefficient × distance from 25 °C).

The middle line takes the centre of each band. It uses the spread model of
:mod:`pwmkit.tolerance` (the same dimensions the Monte Carlo samples) with explicit deviations, so
the curves are the Monte Carlo's conditions one at a time; it does no physics of its own.

References
----------
.. [1] :mod:`pwmkit.tolerance` — the spread model and its references (timer accuracy, drift and
   supply sensitivity; dielectric temperature envelopes).
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

import numpy as np

__all__ = ["ConditionCurve", "ConditionSweep", "condition_sweep"]


@dataclass(frozen=True)
class ConditionCurve:
    """Frequency and duty along one condition (arrays over ``x``).

    Attributes
    ----------
    name : "supply" or "ambient"; unit : "V" or "°C"
    x : the condition's values [V] or [°C]
    frequency, frequency_low, frequency_high : middle line and band [Hz]
    duty, duty_low, duty_high : middle line and band [1]
    """

    name: str
    unit: str
    x: np.ndarray
    frequency: np.ndarray
    frequency_low: np.ndarray
    frequency_high: np.ndarray
    duty: np.ndarray
    duty_low: np.ndarray
    duty_high: np.ndarray


@dataclass(frozen=True)
class ConditionSweep:
    """The two sweeps of :func:`condition_sweep`."""

    supply: ConditionCurve
    ambient: ConditionCurve


def _grid(lo: float, hi: float, n: int) -> np.ndarray:
    if hi > lo:
        return np.linspace(lo, hi, n)
    return np.array([lo, lo])


def condition_sweep(design: Any, *, n: int = 41) -> ConditionSweep:
    """Frequency and duty over the supply range and over the ambient range (see the module docstring).

    Parameters
    ----------
    design : pwmkit.design.Design
    n : int
        Points per sweep (2 … 1001).

    Returns
    -------
    ConditionSweep

    Raises
    ------
    DesignError
        The design does not oscillate somewhere in a range, or bad input.
    """
    from ._spread import T_REF_C, build_model, evaluate
    from .errors import DesignError
    from .evaluate import timing_kwargs, tolerance_kwargs

    if isinstance(n, bool) or not isinstance(n, int) or not 2 <= n <= 1001:
        raise DesignError(f"n: {n!r} is not allowed; give a whole number 2 … 1001")
    if design.timing.topology == "two-timer":  # clock + monostable: its own sweep
        from .two_timer_design import condition_sweep_two_timer

        return condition_sweep_two_timer(design, n=n)
    topo = design.timing.topology
    kw = timing_kwargs(design)
    common = tolerance_kwargs(design)
    lo, hi = design.supply_range
    t_lo, t_hi = design.t_ambient_min_c, design.t_ambient_max_c
    model = build_model(topo, None, "uniform", None, common["dielectric"], (min(t_lo, t_hi), max(t_lo, t_hi)),
                        (lo, hi) if hi > lo else None, True, common.get("vd_tempco", -2e-3), kw)
    _acc, drift, supply_k = model.timer_parts

    def run(dev: dict[str, Any], m: int) -> tuple[np.ndarray, np.ndarray]:
        f, d, ok, reasons = evaluate(model, dev, m)
        if not ok.all():
            from ._spread import reason_text

            raise DesignError(f"condition sweep: the timer stops inside the range ({reason_text(reasons)})")
        return f, d

    # supply
    v = _grid(lo, hi, n)
    m = v.size
    base = {"vcc": v} if model.vcc_range is not None else {}
    curves = []
    for e in (np.zeros(m), -supply_k * np.abs(v - design.vcc), supply_k * np.abs(v - design.vcc)):
        curves.append(run({**base, "timer": e}, m))
    (f0, d0), (fa, da), (fb, db) = curves
    supply = ConditionCurve("supply", "V", v, f0, np.minimum(fa, fb), np.maximum(fa, fb), d0, np.minimum(da, db),
                            np.maximum(da, db))
    # ambient
    t = _grid(t_lo, t_hi, n)
    m = t.size
    if model.dielectric is not None:
        env_lo, env_hi = model.dielectric.temperature_envelope(t)
    else:  # pragma: no cover - designs always name a dielectric
        env_lo = env_hi = np.zeros(m)
    env_lo, env_hi = np.asarray(env_lo, dtype=float) * np.ones(m), np.asarray(env_hi, dtype=float) * np.ones(m)
    span = drift * np.abs(t - T_REF_C)
    vnom = {"vcc": np.full(m, design.vcc)} if model.vcc_range is not None else {}
    runs = [run({**vnom, "t_ambient_c": t, "c_temperature": 0.5 * (env_lo + env_hi), "timer": np.zeros(m)}, m)]
    for env in (env_lo, env_hi):
        for sign in (-1.0, 1.0):
            runs.append(run({**vnom, "t_ambient_c": t, "c_temperature": env, "timer": sign * span}, m))
    fs = np.array([r[0] for r in runs[1:]])
    ds = np.array([r[1] for r in runs[1:]])
    ambient = ConditionCurve("ambient", "°C", t, runs[0][0], fs.min(axis=0), fs.max(axis=0), runs[0][1],
                             ds.min(axis=0), ds.max(axis=0))
    return ConditionSweep(supply, ambient)
