"""Sampled steady-state armature current of a brushed DC motor under PWM (for plots and checks).

The steady-state closed forms of :mod:`pwmkit.loads.motor` give the turning points; here the
exact first-order segments between them are sampled.

References
----------
.. [1] N. Mohan, T. M. Undeland, W. P. Robbins, *Power Electronics*, 3rd ed., Wiley 2003,
   ch. 7 and 13 (chopper-fed dc motor current) — from memory for chapter numbers.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from .._validate import quantity
from ..errors import DesignError
from .motor import MotorCurrent, motor_current  # noqa: F401  (motor_current: doctest)

__all__ = ["CurrentWaveform", "current_waveform"]


@dataclass(frozen=True)
class CurrentWaveform:
    """Sampled steady-state armature current.

    Attributes
    ----------
    t : time from a switch turn-on [s]
    i : armature current [A]
    """

    t: np.ndarray
    i: np.ndarray


def current_waveform(current: MotorCurrent, t_on: float, period: float, *, cycles: float = 3.0,
                     points_per_cycle: int = 240) -> CurrentWaveform:
    """Sample the exact steady-state current of a (scalar) :func:`motor_current` result.

    Each segment is the first-order response ``i(t) = A + (I0 − A)·e^(−t/τ)``. Its asymptote
    ``A`` follows from the segment's end points and duration, so no input beyond the result and
    the switch timing is needed: on-segment ``i_min → i_max`` over ``t_on``; off-segment
    ``i_max → i_min`` over ``period − t_on`` (continuous conduction) or ``i_max → 0`` over
    ``t_diode`` followed by zero current (discontinuous).

    Parameters
    ----------
    current : MotorCurrent
        Scalar steady-state result.
    t_on : float
        Switch on-time per period, ``duty·period`` [s].
    period : float
        PWM period [s].
    cycles : float
        Periods to sample (0 < cycles ≤ 100).
    points_per_cycle : int
        Samples per period (8 … 100000).

    Returns
    -------
    CurrentWaveform

    Examples
    --------
    >>> mc = motor_current(12.0, 6.0, 1.5, 1e-3, 0.7, 20e3)
    >>> w = current_waveform(mc, 0.7 / 20e3, 1 / 20e3, cycles=1, points_per_cycle=2000)
    >>> round(float(w.i.max()), 6), round(float(w.i.min()), 6)
    (1.662679, 1.536691)
    """
    if np.ndim(current.i_mean) != 0:
        raise DesignError("current: current_waveform() needs a scalar motor_current result, not arrays")
    period = float(quantity(period, "period", unit="s", minimum=0.0, min_inclusive=False))
    t_on = float(quantity(t_on, "t_on", unit="s", minimum=0.0, maximum=period))
    if not 0 < cycles <= 100:
        raise DesignError(f"cycles: {cycles!r} is out of range; allowed 0 < cycles <= 100")
    if not 8 <= int(points_per_cycle) <= 100_000:
        raise DesignError(f"points_per_cycle: {points_per_cycle!r} is out of range; allowed 8–100000")
    tau = float(current.tau)
    i_min, i_max = float(current.i_min), float(current.i_max)
    continuous = bool(current.continuous)
    t_off = period - t_on
    t_fall = t_off if continuous else min(float(current.t_diode), t_off)
    i_start = i_min if continuous else 0.0
    i_end = i_min if continuous else 0.0

    def segment(t: np.ndarray, duration: float, i0: float, i1: float) -> np.ndarray:
        # asymptote A from i1 = A + (i0 − A)·e^(−duration/τ); x = duration/τ
        x = duration / tau
        if duration <= 0:
            return np.full(t.shape, i0)
        if x < 1e-9:  # the exponential is a straight line at this resolution
            return i0 + (i1 - i0) * t / duration
        one_minus = -math.expm1(-x)
        a = (i1 - i0 * math.exp(-x)) / one_minus
        return a + (i0 - a) * np.exp(-t / tau)

    n = int(np.ceil(points_per_cycle * cycles)) + 1
    t_end = cycles * period
    starts = np.arange(int(np.ceil(cycles)) + 1) * period
    corners = np.concatenate([starts, starts + t_on, starts + t_on + t_fall])  # exact turning points
    t = np.union1d(np.linspace(0.0, t_end, n), corners[corners <= t_end])
    tt = np.mod(t, period)
    i = np.zeros_like(t)
    on = tt < t_on
    i[on] = segment(tt[on], t_on, i_start, i_max)
    falling = (~on) & (tt < t_on + t_fall)
    i[falling] = segment(tt[falling] - t_on, t_fall, i_max, i_end if continuous else 0.0)
    return CurrentWaveform(t=t, i=np.maximum(i, 0.0))
