"""Benchmark: closed-form steady-state motor current vs a per-point ODE solution.

Computes the steady-state chopper current of the greenhouse ventilation fan
(12 V, back-EMF 6 V, 1.5 Ω, 1 mH, 0.5 V freewheel diode) on a 100 000-point
(duty, PWM frequency) grid with :func:`pwmkit.loads.motor_current` in one
vectorised call, then times the same steady state found with
``scipy.integrate.solve_ivp`` (shooting on the periodic orbit with
``scipy.optimize.brentq``) for a small random sample of grid points and
extrapolates that cost to the whole grid. Prints both times, the ratio and
the largest relative difference on the sample.

Run: ``python benchmarks/bench_motor.py`` (needs scipy, a test dependency).
"""

from __future__ import annotations

import math
import time

import numpy as np
from scipy.integrate import solve_ivp
from scipy.optimize import brentq

from pwmkit.loads import motor_current

V, E, R, L, VF = 12.0, 6.0, 1.5, 1e-3, 0.5
N_DUTY, N_FREQ = 400, 250  # 100 000 points
SAMPLE = 12


def _segment(v_seg: float, i0: float, t1: float) -> tuple[float, float]:
    """One switching segment by solve_ivp; returns (end current, ∫i dt); stops at i = 0."""
    if t1 <= 0.0 or (i0 <= 0.0 and v_seg - E <= 0.0):
        return max(i0, 0.0), 0.0

    def rhs(_t, y):
        return [(v_seg - R * y[0] - E) / L, y[0]]

    def zero(_t, y):
        return y[0]

    zero.terminal = True
    zero.direction = -1
    sol = solve_ivp(rhs, (0.0, t1), [i0, 0.0], method="DOP853", rtol=1e-10, atol=1e-13,
                    events=zero if v_seg < E else None)
    i_end = 0.0 if sol.status == 1 else float(sol.y[0, -1])
    return max(i_end, 0.0), float(sol.y[1, -1])


def _period(d: float, f: float, i0: float) -> tuple[float, float]:
    i1, q1 = _segment(V, i0, d / f)
    i2, q2 = _segment(-VF, i1, (1.0 - d) / f)
    return i2, q1 + q2


def ode_mean_current(d: float, f: float) -> float:
    """Steady-state mean current by solve_ivp + brentq shooting on the start-of-period current."""
    if _period(d, f, 0.0)[0] <= 0.0:
        i_start = 0.0
    else:
        i_start = brentq(lambda x: _period(d, f, x)[0] - x, 0.0, V / R, xtol=1e-13)
    return _period(d, f, i_start)[1] * f


def main() -> None:
    duty = np.linspace(0.01, 0.99, N_DUTY)
    freq = np.logspace(2, 5, N_FREQ)  # 100 Hz … 100 kHz
    dd, ff = np.meshgrid(duty, freq, indexing="ij")
    n_points = dd.size

    motor_current(V, E, R, L, dd[:10], ff[:10], VF)  # warm-up
    best = math.inf
    for _ in range(5):
        t0 = time.perf_counter()
        grid = motor_current(V, E, R, L, dd, ff, VF)
        best = min(best, time.perf_counter() - t0)

    rng = np.random.default_rng(2024)
    idx = rng.choice(n_points, size=SAMPLE, replace=False)
    t0 = time.perf_counter()
    ref = np.array([ode_mean_current(float(dd.flat[k]), float(ff.flat[k])) for k in idx])
    per_point = (time.perf_counter() - t0) / SAMPLE
    closed = grid.i_mean.flat[idx]
    err = np.max(np.abs(closed - ref) / np.maximum(np.abs(ref), 1e-12))

    ode_total = per_point * n_points
    print(f"grid: {N_DUTY} duties x {N_FREQ} frequencies = {n_points} points "
          f"({np.count_nonzero(~grid.continuous)} in discontinuous conduction)")
    print(f"closed form, vectorised : {best * 1e3:10.2f} ms total, {best / n_points * 1e9:8.1f} ns/point")
    print(f"solve_ivp per point     : {per_point * 1e3:10.2f} ms/point (sample of {SAMPLE}), "
          f"extrapolated {ode_total:10.1f} s total")
    print(f"speed-up                : {ode_total / best:10.0f} x")
    print(f"largest relative difference of the mean current on the sample: {err:.2e}")


if __name__ == "__main__":
    main()
