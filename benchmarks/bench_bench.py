"""Speed of the as-built tools: capture measurement, capture reading, reconcile (prints figures; no asserts).

Scenario: the greenhouse fan's demo bench session (:mod:`pwmkit.bench.demo`, demo data).

Run: ``python benchmarks/bench_bench.py``

``capture_timing`` (vectorised hysteresis states, a Python loop over edges only) is compared side by
side with a plain Python loop over every sample that finds the same edges and interpolated
crossings, on the same trace; ``reconcile`` is timed for one and for three readings fitted together.
"""

from __future__ import annotations

import tempfile
import time
from pathlib import Path

import numpy as np

from pwmkit.bench import capture_timing, read_capture, reconcile
from pwmkit.bench.demo import VCC, built_fan, write_demo_capture


def best_of(fn, repeat: int = 3):
    best, out = float("inf"), None
    for _ in range(repeat):
        t0 = time.perf_counter()
        out = fn()
        best = min(best, time.perf_counter() - t0)
    return best, out


def loop_timing(t: np.ndarray, v: np.ndarray, lo: float, th: float, hi: float) -> tuple[float, float]:
    """Plain loop over every sample: hysteresis states, the threshold crossing interpolated at each
    flip, then frequency and duty over the whole periods (levels given, no refinements)."""
    tl, vl = t.tolist(), v.tolist()
    state = 1 if vl[0] > hi else 0
    last_near = 0
    rising, falling = [], []
    for i, x in enumerate(vl):
        if (state == 0 and x < lo) or (state == 1 and x > hi):
            last_near = i
        elif (state == 0 and x > hi) or (state == 1 and x < lo):
            for k in range(last_near, i):            # the crossing of th inside the band
                a, b = vl[k] - th, vl[k + 1] - th
                if (a < 0) != (b < 0):
                    edge = tl[k] + a / (a - b) * (tl[k + 1] - tl[k])
                    break
            (rising if state == 0 else falling).append(edge)
            state, last_near = 1 - state, i
    n = len(rising) - 1
    span = rising[-1] - rising[0]
    highs = sum(next(f for f in falling if f > r) - r for r in rising[:-1])
    return n / span, highs / span


def main() -> None:
    rng = np.random.default_rng(1)
    n = 1_000_000
    t = np.arange(n) * 20e-9
    period = 1 / 30e3
    v = 10.6 * (((t / period) % 1.0) < 0.6) + 0.03 * rng.standard_normal(n)
    s_vec, m = best_of(lambda: capture_timing(t, v))
    s_loop, (f_loop, d_loop) = best_of(lambda: loop_timing(t, v, 0.3 * 10.6, 0.5 * 10.6, 0.7 * 10.6), repeat=1)
    print(f"capture_timing, {n} samples, {m.n_periods} periods: {1e3 * s_vec:.1f} ms (f {m.frequency:.6g} Hz, duty "
          f"{m.duty:.5f}); plain per-sample loop: {1e3 * s_loop:.1f} ms (f {f_loop:.6g} Hz, duty {d_loop:.5f}); "
          f"ratio {s_loop / s_vec:.1f}×")
    with tempfile.TemporaryDirectory() as tmp:
        path = write_demo_capture(Path(tmp) / "demo.csv")
        rows = sum(1 for _ in open(path, encoding="utf-8"))
        s_read, cap = best_of(lambda: read_capture(path))
        print(f"read_capture, demo file of {rows} lines ({path.stat().st_size / 1024:.0f} KiB): {1e3 * s_read:.1f} ms "
              f"({1e9 * s_read / rows:.0f} ns per line)")
    from pwmkit.evaluate import timing_kwargs
    from pwmkit.timing import astable

    fan, built = built_fan()
    wipers = [0.6, 0.3, 0.85]
    r = astable("pot", **dict(timing_kwargs(built), vcc=VCC, wiper=np.array(wipers)))   # the demo's build
    f, d = [float(x) for x in r.frequency], [float(x) for x in r.duty]
    s_one, r1 = best_of(lambda: reconcile(fan, frequency=f[0], duty=d[0], wiper=0.6, vcc=VCC, t_ambient_c=21.0),
                        repeat=2)
    s_three, r3 = best_of(lambda: reconcile(fan, frequency=f, duty=d, wiper=wipers, vcc=VCC, t_ambient_c=21.0),
                          repeat=2)
    print(f"reconcile, 20000 Monte Carlo samples per reading: 1 reading {1e3 * s_one:.0f} ms, 3 readings "
          f"{1e3 * s_three:.0f} ms (ratio {s_three / s_one:.2f})")
    print(f"  1 reading: {r1!r}\n  3 readings: {r3!r}")


if __name__ == "__main__":
    main()
