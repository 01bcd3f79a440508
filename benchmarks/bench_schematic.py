"""Cost of drawing a schematic, per topology and load (the widget redraws on every debounced change).

Run: ``python benchmarks/bench_schematic.py [repeats]``. Prints the first-draw time (includes the
schemdraw import), then the median and 90th-percentile wall time and the median CPU time of a draw
over ``repeats`` draws (default 50) for each topology with no load, an LED string and a motor with
Zener clamp, and the ratio of median CPU time to the plain classic timer. CPU time is the steadier
figure on a shared machine. No pass/fail: the figures are for judging the widget's debounce interval.
"""

from __future__ import annotations

import statistics
import sys
import time

CASES = {
    "classic": {},
    "bypass": {},
    "steered": {},
    "pot": {"pot": "100k", "wiper": 0.3},
}
LOADS = {
    "none": {},
    "led": {"load": "led", "n_series": 6, "n_parallel": 2, "r_led": "470", "r_gate": "100"},
    "motor+zener": {"load": "motor", "clamp": "zener", "r_gate": "47", "v_zener": 24},
}
NOTES = {"t_high": 1.39e-3, "t_low": 0.69e-3, "frequency": 480.0, "duty": 0.667}


def main(repeats: int = 50) -> None:
    t0 = time.perf_counter()
    from pwmkit.schematic import draw

    first = draw("classic", ra="4k7", rb="10k", c="100n", vcc=12)
    t_first = time.perf_counter() - t0
    print(f"first draw incl. imports: {1e3 * t_first:7.1f} ms  (svg {len(first.svg) / 1e3:.1f} kB)")
    print(f"{'topology':9s} {'load':12s} {'median':>9s} {'p90':>9s} {'cpu':>9s} {'ratio':>6s} {'svg kB':>7s}")
    base = None
    for topology, extra in CASES.items():
        for load, load_kw in LOADS.items():
            kw = dict(ra="4k7", rb="10k", c="100n", vcc=12, annotations=NOTES, **extra, **load_kw)
            times, cpu = [], []
            for _ in range(repeats):
                t, c = time.perf_counter(), time.process_time()
                sch = draw(topology, **kw)
                times.append(time.perf_counter() - t)
                cpu.append(time.process_time() - c)
            times.sort()
            median, cpu_median = statistics.median(times), statistics.median(cpu)
            p90 = times[min(len(times) - 1, int(0.9 * len(times)))]
            base = base or cpu_median
            print(f"{topology:9s} {load:12s} {1e3 * median:7.2f}ms {1e3 * p90:7.2f}ms {1e3 * cpu_median:7.2f}ms "
                  f"{cpu_median / base:6.2f} {len(sch.svg) / 1e3:7.1f}")


if __name__ == "__main__":
    main(int(sys.argv[1]) if len(sys.argv) > 1 else 50)
