"""Capacitor and output waveforms of an astable, for plots (closed form per segment).

Each segment follows the first-order law
``v(t) = V∞ + (V0 − V∞)·exp(−t/RC)`` with the path resistance and asymptote
of :class:`~pwmkit.timing.astable.AstableResult`.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ..errors import DesignError
from .astable import AstableResult

__all__ = ["Waveform", "waveform"]


@dataclass(frozen=True)
class Waveform:
    """Sampled waveforms.

    Attributes
    ----------
    t : time [s]
    v_cap : capacitor (threshold/trigger pin) voltage [V]
    v_out : timer output voltage [V]
    output_high : bool array, True while the output is high
    v_upper, v_lower : thresholds [V]
    t_first_high : first high time after power-up (capacitor from 0 V) [s]
    """

    t: np.ndarray
    v_cap: np.ndarray
    v_out: np.ndarray
    output_high: np.ndarray
    v_upper: float
    v_lower: float
    t_first_high: float


def waveform(result: AstableResult, *, cycles: float = 2.0, points_per_cycle: int = 200,
             from_power_up: bool = False, v_out_high: float | None = None) -> Waveform:
    """Sample the capacitor and output voltages of a (scalar) astable result.

    Parameters
    ----------
    result : AstableResult
        A scalar result of :func:`pwmkit.timing.astable`.
    cycles : float
        Number of steady-state periods to show (> 0, ≤ 1000).
    points_per_cycle : int
        Samples per period (≥ 8, ≤ 100000).
    from_power_up : bool
        Start with the capacitor at 0 V (the first high time is longer).
    v_out_high : float, optional
        Output-high level [V]; default ``result.vcc``.

    Returns
    -------
    Waveform
    """
    if np.ndim(result.frequency) != 0:
        raise DesignError("result: waveform() needs a scalar astable result, not arrays")
    if not (0 < cycles <= 1000):
        raise DesignError(f"cycles: {cycles!r} is out of range; allowed 0 < cycles <= 1000")
    if not (8 <= int(points_per_cycle) <= 100_000):
        raise DesignError(f"points_per_cycle: {points_per_cycle!r} is out of range; allowed 8–100000")
    r = result
    tau_ch = r.r_charge * r.c
    tau_dis = r.r_discharge * r.c
    # bypass: the diode across rb may stop conducting at v_x; the charge then heads for vcc via ra + rb
    v_x = float(r.v_upper) if r.v_charge_change is None else float(r.v_charge_change)
    tau_2 = tau_ch if r.r_charge_after is None else float(r.r_charge_after) * r.c

    def charge(v0: float, tt: np.ndarray) -> np.ndarray:
        """Capacitor voltage t after the charge started at v0 (two segments when the path changes)."""
        if v0 >= v_x:  # already past the change: the second path only
            return r.vcc + (v0 - r.vcc) * np.exp(-tt / tau_2)
        t1 = tau_ch * float(np.log((r.v_charge - v0) / (r.v_charge - v_x))) if v_x < r.v_upper else np.inf
        first_seg = r.v_charge + (v0 - r.v_charge) * np.exp(-np.minimum(tt, t1) / tau_ch)
        if not np.isfinite(t1):
            return first_seg
        return np.where(tt < t1, first_seg, r.vcc + (v_x - r.vcc) * np.exp(-np.maximum(tt - t1, 0.0) / tau_2))

    if v_x < r.v_upper:
        t1 = tau_ch * float(np.log(r.v_charge / (r.v_charge - v_x))) if v_x > 0 else 0.0
        t_first = t1 + tau_2 * float(np.log((r.vcc - max(v_x, 0.0)) / (r.vcc - r.v_upper)))
    else:
        t_first = tau_ch * float(np.log(r.v_charge / (r.v_charge - r.v_upper)))
    start = t_first if from_power_up else 0.0
    t_end = start + cycles * r.period
    t = np.linspace(0.0, t_end, int(np.ceil(points_per_cycle * (t_end / r.period))) + 1)
    v = np.empty_like(t)
    high = np.empty(t.shape, dtype=bool)
    if from_power_up:
        first = t < t_first
        v[first] = charge(0.0, t[first])
        high[first] = True
    else:
        first = np.zeros(t.shape, dtype=bool)
    tt = np.mod(t[~first] - start, r.period)
    charging = tt < r.t_high
    vc = np.where(
        charging,
        charge(float(r.v_lower), tt),
        r.v_discharge + (r.v_upper - r.v_discharge) * np.exp(-np.maximum(tt - r.t_high, 0.0) / max(tau_dis, 1e-300)),
    )
    v[~first] = vc
    high[~first] = charging
    level = r.vcc if v_out_high is None else float(v_out_high)
    return Waveform(t=t, v_cap=v, v_out=np.where(high, level, 0.0), output_high=high, v_upper=float(r.v_upper),
                    v_lower=float(r.v_lower), t_first_high=float(t_first))
