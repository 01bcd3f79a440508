"""Synthetic PWM captures for the tests: known edge times, seeded noise, offset, ringing, jitter.

The oracle is the generator's own edge list (built from the inputs), never the code under test.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np


@dataclass(frozen=True)
class Synthetic:
    t: np.ndarray
    v: np.ndarray
    rising: np.ndarray
    falling: np.ndarray

    def whole_periods(self) -> tuple[float, float, int]:
        """(frequency, duty, n) of the whole periods between the first and last rising edge inside the capture."""
        r = self.rising[(self.rising > self.t[0]) & (self.rising < self.t[-1])]
        f = self.falling
        n = r.size - 1
        span = r[-1] - r[0]
        highs = [f[(f > a) & (f < b)][0] - a for a, b in zip(r[:-1], r[1:])]
        return n / span, float(np.sum(highs) / span), n


def pwm(frequency: float, duty: float, *, periods: float = 40.0, samples_per_period: int = 500,
        v_low: float = 0.1, v_high: float = 10.6, offset: float = 0.0, noise: float = 0.0, ringing: float = 0.0,
        jitter: float = 0.0, edge: float = 0.004, phase: float = 0.37, seed: int = 0) -> Synthetic:
    """A PWM trace: tanh edges (50 % point exactly at the edge time), damped ringing after each edge,
    Gaussian noise (``noise`` V rms), a DC offset, and Gaussian jitter of every edge (``jitter`` of T rms)."""
    rng = np.random.default_rng(seed)
    period = 1.0 / frequency
    k = np.arange(-1, int(periods) + 2)
    rising = (k + phase) * period + jitter * period * rng.standard_normal(k.size)
    falling = rising + duty * period + jitter * period * rng.standard_normal(k.size)
    n = int(periods * samples_per_period)
    t = np.arange(n) * (period / samples_per_period)
    amp = v_high - v_low
    tau = edge * period
    level = np.zeros(n)
    ring_f = 40.0 / period
    for r, f in zip(rising, falling):
        level += 0.5 * (np.tanh((t - r) / tau) - np.tanh((t - f) / tau))
        for e, sign in ((r, 1.0), (f, -1.0)):
            x = t - e
            on = x > 0
            level[on] += sign * ringing * np.exp(-x[on] / (0.03 * period)) * np.sin(2 * np.pi * ring_f * x[on])
    v = v_low + amp * level + offset + noise * rng.standard_normal(n)
    return Synthetic(t=t, v=v, rising=rising, falling=falling)
