"""Two-timer PWM and heater benchmark: vectorised modulator vs a per-element loop, the closed loop,
synthesis, and evaluate() of the heat-mat demo (quick mode, target ≲ 30 ms as for the astables).

All figures are measured side by side in one run and printed with their ratios.

Run: python benchmarks/bench_two_timer.py [n]
"""

from __future__ import annotations

import statistics
import sys
import time

import numpy as np

from pwmkit.design import demo_designs
from pwmkit.evaluate import evaluate
from pwmkit.synthesis_two_timer import synthesize_two_timer
from pwmkit.timing import control_range, two_timer_pwm

TARGET_QUICK = 30e-3  # s
KW = dict(ra=56e3, rb=2.2e3, c=100e-9, r_mono=22e3, c_mono=100e-9, vcc=12.0)


def timed(fn, repeats: int = 5) -> float:
    times = []
    for _ in range(repeats):
        t0 = time.perf_counter()
        fn()
        times.append(time.perf_counter() - t0)
    return statistics.median(times)


def main(n: int = 100_000) -> None:
    mat = demo_designs()["heat-mat"]
    t0 = time.perf_counter()
    two_timer_pwm(vctl=5.0, **KW)
    first = time.perf_counter() - t0
    v = np.linspace(1.0, 10.0, n)
    t_vec = timed(lambda: two_timer_pwm(vctl=v, **KW))
    m = 1000
    t_loop = timed(lambda: [two_timer_pwm(vctl=float(x), **KW) for x in v[:m]], repeats=3) * (n / m)
    print(f"first call (sympy derivation + lambdify): {1e3 * first:.1f} ms")
    print(f"two_timer_pwm over {n} control voltages: vectorised {1e3 * t_vec:.2f} ms, per-element loop "
          f"{1e3 * t_loop:.0f} ms (scaled from {m}); ratio {t_loop / t_vec:.0f}×")
    t_range = timed(lambda: control_range(vctl_low=4.0, vctl_high=7.0, **KW))
    print(f"control_range (201 points, linearity, supply sensitivity): {1e3 * t_range:.2f} ms")
    evaluate(mat, spread=False)
    t_quick = timed(lambda: evaluate(mat, spread=False), repeats=7)
    print(f"evaluate(heat-mat, spread=False): {1e3 * t_quick:.1f} ms (target {1e3 * TARGET_QUICK:.0f} ms, ratio "
          f"{t_quick / TARGET_QUICK:.2f})")
    t_full = timed(lambda: evaluate(mat, n_mc=20_000), repeats=3)
    print(f"evaluate(heat-mat) with 20 000 Monte Carlo samples and the worst case: {1e3 * t_full:.0f} ms")
    from pwmkit.evaluate_heater import heater_kwargs, loop_chain
    from pwmkit.loads.heater import closed_loop, closed_loop_step

    d_of_v, v_of_t, d_range, v_range = loop_chain(mat)
    common = dict(duty_range=d_range, vctl_range=v_range, tau_sensor=60.0, t_ambient_c=15.0, **heater_kwargs(mat))
    t_loop = timed(lambda: closed_loop(d_of_v, v_of_t, frequency=240.0, **common))
    t_step = timed(lambda: closed_loop_step(d_of_v, v_of_t, **common), repeats=3)
    print(f"closed_loop (steady state + phase margin): {1e3 * t_loop:.2f} ms; closed_loop_step (1000 RK4 steps): "
          f"{1e3 * t_step:.0f} ms; ratio {t_step / t_loop:.0f}×")
    t_syn = timed(lambda: synthesize_two_timer(frequency=240, duty_low=0.22, duty_high=0.45, vctl_low=4.0,
                                               vctl_high=7.0, vcc=12.0), repeats=3)
    print(f"synthesize_two_timer (E24/E12): {1e3 * t_syn:.0f} ms")


if __name__ == "__main__":
    main(int(sys.argv[1]) if len(sys.argv) > 1 else 100_000)
