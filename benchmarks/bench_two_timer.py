"""Two-timer PWM and heater benchmark: cold start (generated forms vs the old run-time lambdify
route), vectorised modulator vs a per-element loop, the closed loop, synthesis, and evaluate() of
the heat-mat demo (quick mode, target ≲ 30 ms as for the astables).

All figures are measured side by side in one run and printed with their ratios.

Run: python benchmarks/bench_two_timer.py [n]
"""

from __future__ import annotations

import statistics
import subprocess
import sys
import time
from pathlib import Path

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


_CALL = "two_timer_pwm(ra=56e3, rb=2.2e3, c=100e-9, r_mono=22e3, c_mono=100e-9, vcc=12.0, vctl=5.0)"
#: first two_timer_pwm() in a new process, import included; the generated forms of timing/_derived.py
COLD_GENERATED = ("import time, sys; t = time.perf_counter(); from pwmkit.timing import two_timer_pwm; "
                  f"{_CALL}; print(time.perf_counter() - t, 'sympy' in sys.modules)")
#: the same with the old route: derive with sympy and lambdify before the first call (what
#: two_timer_pwm did before the monostable forms were generated)
COLD_LAMBDIFY = ("import time, sys; t = time.perf_counter(); from pwmkit.timing import two_timer_pwm; "
                 "from pwmkit.timing.monostable_symbolic import monostable_numeric; monostable_numeric(); "
                 f"{_CALL}; print(time.perf_counter() - t, 'sympy' in sys.modules)")
_EXAMPLE = Path(__file__).resolve().parents[1] / "examples" / "greenhouse-heat-mat.toml"
COLD_EVALUATE = ("import time, sys; t = time.perf_counter(); from pwmkit.record.designfile import load_design; "
                 "from pwmkit.evaluate import evaluate; "
                 f"evaluate(load_design({str(_EXAMPLE)!r}), spread=False); "
                 "print(time.perf_counter() - t, 'sympy' in sys.modules)")


def cold(code: str, runs: int = 3) -> tuple[float, str]:
    """Best time of ``code`` in fresh processes [s] and whether sympy got imported."""
    outs = [subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True).stdout.split()
            for _ in range(runs)]
    return min(float(o[0]) for o in outs), outs[0][1]


def main(n: int = 100_000) -> None:
    (t_gen, s_gen), (t_lam, s_lam) = cold(COLD_GENERATED), cold(COLD_LAMBDIFY)
    t_eval, s_eval = cold(COLD_EVALUATE)
    print(f"first two_timer_pwm() in a new process (import included): generated forms {1e3 * t_gen:.0f} ms "
          f"(sympy imported: {s_gen}); old route, sympy derivation + lambdify {1e3 * t_lam:.0f} ms "
          f"(sympy imported: {s_lam}); ratio {t_lam / t_gen:.1f}×")
    print(f"load + evaluate(greenhouse-heat-mat.toml, spread=False) in a new process: {1e3 * t_eval:.0f} ms "
          f"(sympy imported: {s_eval})")
    mat = demo_designs()["heat-mat"]
    t0 = time.perf_counter()
    two_timer_pwm(vctl=5.0, **KW)
    first = time.perf_counter() - t0
    v = np.linspace(1.0, 10.0, n)
    t_vec = timed(lambda: two_timer_pwm(vctl=v, **KW))
    m = 1000
    t_loop = timed(lambda: [two_timer_pwm(vctl=float(x), **KW) for x in v[:m]], repeats=3) * (n / m)
    print(f"first call in this process (modules already imported): {1e3 * first:.1f} ms")
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
