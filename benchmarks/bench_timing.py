"""Timing-core benchmark: prints figures and ratios measured side by side in one run.

- astable() over 1,000,000 array elements vs a plain-Python loop of the same formula (written
  inline, and the derived formula lambdified for scalars and called per element) and vs a
  hand-written numpy expression of the same physics;
- scipy's ODE solver per design (time per design, extrapolated);
- the pot topology over 1,000,000 elements vs hand-written numpy (frequency and duty read);
- peak memory of one 10,000,000-element call (tracemalloc) against the input arrays' bytes;
- cold start: `import pwmkit` and the first `astable` call in a new process, and which heavy
  modules they pull in.

Targets (issues): >= 20x the plain loop (aim 50x), within 2x of hand-written numpy (steered and
pot), a 1e7-element call peaks at <= 4x its input arrays' bytes, first call <= 0.5 s.
Run: python benchmarks/bench_timing.py
"""

from __future__ import annotations

import math
import subprocess
import sys
import time

import numpy as np

from pwmkit.timing import astable


def best_of(fn, repeat: int = 5) -> float:
    times = []
    for _ in range(repeat):
        t0 = time.perf_counter()
        fn()
        times.append(time.perf_counter() - t0)
    return min(times)


def paired(a, b, repeat: int = 9) -> tuple[float, float]:
    """Best times of ``a`` and ``b`` run alternately (so a busy machine slows both alike)."""
    ta, tb = [], []
    for _ in range(repeat):
        ta.append(best_of(a, 1))
        tb.append(best_of(b, 1))
    return min(ta), min(tb)


def main() -> None:
    n = 1_000_000
    rng = np.random.default_rng(1)
    ra = rng.uniform(1e3, 1e5, n)
    rb = rng.uniform(1e3, 1e5, n)
    c = rng.uniform(1e-9, 1e-6, n)
    vcc = rng.uniform(9, 15, n)
    vd, vsat = 0.6, 0.1
    astable("steered", ra=ra[:10], rb=rb[:10], c=c[:10], vcc=vcc[:10], vd=vd, vsat=vsat)  # warm-up

    def pwm_steered() -> None:
        r = astable("steered", ra=ra, rb=rb, c=c, vcc=vcc, vd=vd, vsat=vsat, r_on=0.0)
        _ = (r.frequency, r.duty)

    pwm_steered()

    def hand_numpy() -> None:
        vctl = 2 * vcc / 3
        t_h = ra * c * np.log((vcc - vd - vctl / 2) / (vcc - vd - vctl))
        t_l = rb * c * np.log((vctl - vsat - vd) / (vctl / 2 - vsat - vd))
        p = t_h + t_l
        _ = (1 / p, t_h / p)

    t_pwm, t_np = paired(pwm_steered, hand_numpy)

    m = 50_000
    ra_l, rb_l, c_l, vcc_l = ra[:m].tolist(), rb[:m].tolist(), c[:m].tolist(), vcc[:m].tolist()

    def plain_loop() -> None:
        for a, b, cc, v in zip(ra_l, rb_l, c_l, vcc_l):
            vctl = 2 * v / 3
            t_h = a * cc * math.log((v - vd - vctl / 2) / (v - vd - vctl))
            t_l = b * cc * math.log((vctl - vsat - vd) / (vctl / 2 - vsat - vd))
            p = t_h + t_l
            _ = (1 / p, t_h / p)

    t_loop = best_of(plain_loop, 3) * (n / m)

    # the same derived expressions, lambdified for scalars (math module) and called per element
    import sympy as sp

    from pwmkit.timing.symbolic import _ARG_ORDER, expressions

    e = expressions("steered", "saturation", "external")
    scalar_fn = sp.lambdify([getattr(e.symbols, k) for k in _ARG_ORDER], (e.t_high, e.t_low), modules="math")

    def formula_loop() -> None:
        for a, b, cc, v in zip(ra_l, rb_l, c_l, vcc_l):
            t_h, t_l = scalar_fn(a, b, 0.0, 0.0, cc, v, vd, vsat, 0.0, 2 * v / 3)
            p = t_h + t_l
            _ = (1 / p, t_h / p)

    t_formula_loop = best_of(formula_loop, 3) * (n / m)

    try:
        from scipy.integrate import solve_ivp

        def one_ode(a: float, b: float, cc: float, v: float) -> float:
            vctl = 2 * v / 3
            total = 0.0
            for v0, vinf, r, target in ((vctl / 2, v - vd, a, vctl), (vctl, vsat + vd, b, vctl / 2)):
                def ev(_t, y, target=target):  # noqa: ANN001
                    return y[0] - target
                ev.terminal = True
                sol = solve_ivp(lambda _t, y, vinf=vinf, r=r: [(vinf - y[0]) / (r * cc)], (0, 20 * r * cc), [v0],
                                events=ev, rtol=1e-8, atol=1e-12)
                total += float(sol.t_events[0][0])
            return total

        k = 200
        t0 = time.perf_counter()
        for i in range(k):
            one_ode(ra_l[i], rb_l[i], c_l[i], vcc_l[i])
        t_ode = (time.perf_counter() - t0) / k * n
    except ImportError:  # pragma: no cover
        t_ode = float("nan")

    # pot topology, frequency and duty read (they are computed on first access)
    pot = rng.uniform(1e4, 1e5, n)
    wiper = rng.uniform(0.0, 1.0, n)

    def pwm_pot() -> None:
        r = astable("pot", ra=ra, rb=rb, c=c, vcc=vcc, pot=pot, wiper=wiper, vd=vd, vsat=vsat, r_on=0.0)
        _ = (r.frequency, r.duty)

    def hand_pot() -> None:
        vctl = 2 * vcc / 3
        t_h = (ra + wiper * pot) * c * np.log((vcc - vd - vctl / 2) / (vcc - vd - vctl))
        t_l = (rb + (1 - wiper) * pot) * c * np.log((vctl - vsat - vd) / (vctl / 2 - vsat - vd))
        p = t_h + t_l
        _ = (1 / p, t_h / p)

    pwm_pot()
    t_pot, t_pot_np = paired(pwm_pot, hand_pot)

    # peak memory of one large call: one 1e7 array input (ra), the rest scalars
    import tracemalloc

    big = rng.uniform(1e3, 1e5, 10_000_000)
    tracemalloc.start()
    base = tracemalloc.get_traced_memory()[0]
    tracemalloc.reset_peak()
    big_r = astable("steered", ra=big, rb=10e3, c=100e-9, vcc=12.0)
    peak_call = tracemalloc.get_traced_memory()[1] - base
    _ = (big_r.frequency, big_r.duty)
    peak_all = tracemalloc.get_traced_memory()[1] - base
    tracemalloc.stop()
    del big_r

    cold = ("import time, sys; t=time.perf_counter(); from pwmkit.timing import astable; "
            "r=astable('pot', ra='1k', rb='1k', pot='100k', wiper=0.5, c='2.2n', vcc=12); r.frequency; "
            "print(time.perf_counter()-t, 'sympy' in sys.modules)")
    cold_runs = [subprocess.run([sys.executable, "-c", cold], capture_output=True, text=True, check=True).stdout.split()
                 for _ in range(3)]
    t_cold = min(float(o[0]) for o in cold_runs)

    code = ("import time; t=time.perf_counter(); import pwmkit, sys; dt=time.perf_counter()-t; "
            "print(dt, ','.join(m for m in ('sympy','ipywidgets','bokeh','scipy') if m in sys.modules) or 'none')")
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True).stdout.split()

    print(f"astable('steered') over {n:,} elements")
    print(f"  pwmkit.timing.astable       {t_pwm * 1e3:9.1f} ms")
    print(f"  hand-written numpy          {t_np * 1e3:9.1f} ms   pwmkit / numpy = {t_pwm / t_np:5.2f}x (target <= 2x)")
    print(f"  plain-Python loop (extrap.) {t_loop * 1e3:9.1f} ms   loop / pwmkit = {t_loop / t_pwm:5.1f}x (target >= 20x)"
          "   [formula written inline]")
    print(f"  plain-Python loop (extrap.) {t_formula_loop * 1e3:9.1f} ms   loop / pwmkit = "
          f"{t_formula_loop / t_pwm:5.1f}x (target >= 20x)   [derived formula called per element]")
    print(f"  scipy solve_ivp (extrap.)   {t_ode:9.1f} s    ode / pwmkit  = {t_ode / t_pwm:8.0f}x")
    print(f"astable('pot') over {n:,} elements (frequency and duty read)")
    print(f"  pwmkit.timing.astable       {t_pot * 1e3:9.1f} ms")
    print(f"  hand-written numpy          {t_pot_np * 1e3:9.1f} ms   pwmkit / numpy = {t_pot / t_pot_np:5.2f}x "
          "(target <= 2x)")
    mb = big.nbytes / 1e6
    print(f"astable('steered', ra=<10,000,000 floats>, rest scalars): input {mb:.0f} MB")
    print(f"  peak during the call        {peak_call / 1e6:9.1f} MB   = {peak_call / big.nbytes:4.2f}x input "
          "(target <= 4x)")
    print(f"  peak after reading frequency and duty {peak_all / 1e6:6.1f} MB = {peak_all / big.nbytes:4.2f}x input")
    print(f"import pwmkit: {float(out[0]) * 1e3:.1f} ms; heavy modules pulled in: {out[1]}")
    print(f"first astable() in a new process (import included): {t_cold * 1e3:.0f} ms (target <= 500 ms); "
          f"sympy imported: {cold_runs[0][1]}")


if __name__ == "__main__":
    main()
