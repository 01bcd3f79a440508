"""Speed of the spread analysis and the preferred-value search (prints figures; no asserts).

Scenario: the 12 V greenhouse propagator — the LED grow-bar dimmer (pot-steered astable) and the
ventilation fan speed control (diode-steered astable).

Run: ``python benchmarks/bench_spread.py``

Each vectorised figure is compared with a plain Python loop that calls :func:`pwmkit.timing.astable`
once per point on a sample of points, extrapolated to the full count.
"""

from __future__ import annotations

import time

import numpy as np

from pwmkit._spread import build_model, generator, sample, values
from pwmkit.synthesis import find
from pwmkit.timing import astable
from pwmkit.tolerance import monte_carlo, worst_case

GROW_BAR = dict(ra=1e3, rb=1e3, pot=47e3, wiper=0.4, c=22e-9, vcc=12.0)
GROW_BAR_SPREAD = dict(tolerances={"ra": 0.05, "rb": 0.05, "pot": 0.2, "vd": 0.05}, dielectric="C0G",
                       t_ambient_c=(5.0, 40.0), vcc_range=(11.4, 13.8), timer_errors=True)


def best_of(fn, repeat: int = 3) -> tuple[float, object]:
    best, out = float("inf"), None
    for _ in range(repeat):
        t0 = time.perf_counter()
        out = fn()
        best = min(best, time.perf_counter() - t0)
    return best, out


def loop_seconds_per_point(topology: str, points: list[dict]) -> float:
    t0 = time.perf_counter()
    for p in points:
        astable(topology, **p)
    return (time.perf_counter() - t0) / len(points)


def bench_monte_carlo(n: int = 1_000_000) -> None:
    monte_carlo("pot", n=1000, seed=0, **GROW_BAR_SPREAD, **GROW_BAR)   # warm-up: sympy derivation, lambdify
    t, r = best_of(lambda: monte_carlo("pot", n=n, seed=1, **GROW_BAR_SPREAD, **GROW_BAR,
                                       frequency_window=(1200.0, 1700.0)))
    # plain loop: the same sampled design points, one scalar astable() call each
    model = build_model("pot", GROW_BAR_SPREAD["tolerances"], "uniform", None, "C0G", (5.0, 40.0), (11.4, 13.8),
                        True, -2e-3, dict(GROW_BAR))
    m = 3000
    v, mult = values(model, sample(model, m, generator(2)))
    pts = [{k: float(np.broadcast_to(v[k], (m,))[i]) for k in ("ra", "rb", "pot", "wiper", "c", "vcc", "vd", "vsat")}
           for i in range(m)]
    per = loop_seconds_per_point("pot", pts)
    print(f"Monte Carlo, grow-bar dimmer (pot topology, {len(r.sources)} spread sources), n = {n:,}:")
    print(f"  vectorised   {t:8.3f} s   ({t / n * 1e9:.0f} ns/sample), yield {100 * r.yield_:.2f} %")
    print(f"  plain loop   {per * n:8.1f} s   (extrapolated from {m} scalar astable() calls, "
          f"{per * 1e6:.0f} µs each)")
    print(f"  ratio        {per * n / t:8.0f} ×   (aim: vectorised ≤ 0.5 s)")
    tw, w = best_of(lambda: worst_case("pot", **GROW_BAR_SPREAD, **GROW_BAR))
    print(f"Worst case, same box: {tw * 1e3:.1f} ms, {w.n_evaluated} points ({w.method}), "
          f"f {w.frequency_min:.1f} … {w.frequency_max:.1f} Hz")


def bench_synthesis() -> None:
    cases = [
        ("fan control, bypass, E96 × E96 × E6", "bypass", dict(frequency=25e3, duty=0.6, vcc=12, r_series="E96")),
        ("fan control, classic, E24 × E24 × E12", "classic", dict(frequency=25e3, duty=0.7, vcc=12, c_series="E12")),
        ("grow-bar dimmer, pot, E24 × E24 × pots × E6", "pot",
         dict(frequency=2000, duty_range=(0.1, 0.9), vcc=12)),
        ("grow-bar dimmer, pot, E96 × E96 × pots × E6", "pot",
         dict(frequency=2000, duty_range=(0.1, 0.9), vcc=12, r_series="E96")),
    ]
    find("classic", frequency=1000, duty=0.7, vcc=12)   # warm-up
    print("Synthesis (search + Monte Carlo yield of the best 20, 2000 samples each):")
    rng = np.random.default_rng(0)
    for label, topology, kw in cases:
        t, cands = best_of(lambda topology=topology, kw=kw: find(topology, **kw))
        size = cands.search_size
        m = 2000
        r_vals = rng.choice([1e3, 4.7e3, 10e3, 47e3, 100e3], m)
        pts = [dict(ra=float(r_vals[i]), rb=float(r_vals[-i]), c=10e-9, vcc=12.0) for i in range(m)]
        if topology == "pot":
            for p in pts:
                p.update(pot=47e3, wiper=0.0)
        per = loop_seconds_per_point(topology, pts) * (2 if topology == "pot" else 1)
        best = cands[0]
        print(f"  {label}: {size:,} combinations, {cands.in_window:,} in the window")
        print(f"    vectorised {t:7.3f} s;  plain loop {per * size:9.1f} s (extrapolated, {m} astable() calls"
              f"{' × 2 wiper ends' if topology == 'pot' else ''});  ratio {per * size / t:7.0f} ×  (aim ≤ 1 s)")
        print(f"    best: {best.describe()}  f {best.frequency:.1f} Hz, yield {100 * best.yield_:.1f} %")
        if topology == "pot":
            print("    (the duty range and design rules are decided on the ra × rb × pot grid before the "
                  "capacitors are crossed in, so the pot ratio also measures that pruning)")


if __name__ == "__main__":
    bench_monte_carlo()
    print()
    bench_synthesis()
