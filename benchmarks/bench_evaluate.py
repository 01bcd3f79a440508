"""evaluate() benchmark: median time per demo design, quick mode (spread=False) and full analysis.

Target (issue 6): quick mode ≲ 30 ms per design, so that widgets can re-evaluate on every slider
move. The first call of a process derives and lambdifies the sympy expressions (reported
separately); every later call uses the cached numeric functions. Also prints where the quick-mode
time goes (the largest model calls) and the ratio to the target.

Run: python benchmarks/bench_evaluate.py [repeats]
"""

from __future__ import annotations

import statistics
import sys
import time

from pwmkit.design import demo_designs
from pwmkit.evaluate import evaluate

TARGET_QUICK = 30e-3  # s


def median_time(fn, repeats: int) -> tuple[float, float]:
    times = []
    for _ in range(repeats):
        t0 = time.perf_counter()
        fn()
        times.append(time.perf_counter() - t0)
    return statistics.median(times), min(times)


def breakdown(design) -> list[tuple[str, float]]:
    """Cumulative time of the heaviest model calls inside one quick evaluation (cProfile)."""
    import cProfile
    import pstats

    prof = cProfile.Profile()
    prof.enable()
    for _ in range(5):
        evaluate(design, spread=False)
    prof.disable()
    stats = pstats.Stats(prof)
    wanted = ("steady_speed", "stall_current", "astable", "led_drive", "mosfet_losses", "freewheel_diode",
              "gate_drive", "run_checks", "cautions_for", "_pot_travel", "_corners")
    out = []
    for (_file, _line, name), (_cc, _nc, _tt, ct, _callers) in stats.stats.items():
        if name in wanted:
            out.append((name, ct / 5))
    total = sum(ct for (_f, _l, n), (_a, _b, _c, ct, _d) in stats.stats.items() if n == "evaluate") / 5
    return sorted(out, key=lambda x: -x[1]) + [("evaluate (profiled total)", total)]


def main() -> None:
    repeats = int(sys.argv[1]) if len(sys.argv) > 1 else 21
    designs = demo_designs()
    t0 = time.perf_counter()
    for d in designs.values():
        evaluate(d, spread=True, n_mc=1000)
    print(f"first calls (sympy derivation + lambdify, both demos, full): {1e3 * (time.perf_counter() - t0):.0f} ms\n")
    print(f"{'design':10} {'mode':24} {'median':>10} {'best':>10} {'vs 30 ms':>9}")
    for name, d in designs.items():
        for label, kwargs in (("quick (spread=False)", dict(spread=False)),
                              ("full (n_mc = 20000)", dict(spread=True, n_mc=20_000)),
                              ("full (n_mc = 2000)", dict(spread=True, n_mc=2_000))):
            reps = repeats if kwargs["spread"] is False else max(3, repeats // 4)
            med, best = median_time(lambda d=d, kw=kwargs: evaluate(d, **kw), reps)
            ratio = f"{med / TARGET_QUICK:8.2f}x" if not kwargs["spread"] else ""
            print(f"{name:10} {label:24} {1e3 * med:8.1f} ms {1e3 * best:8.1f} ms {ratio:>9}")
    print("\nwhere the quick-mode time goes (cumulative, per evaluation, under the profiler):")
    for name, d in designs.items():
        print(f"  {name}:")
        for fn, t in breakdown(d):
            print(f"    {fn:28} {1e3 * t:7.2f} ms")


if __name__ == "__main__":
    main()
