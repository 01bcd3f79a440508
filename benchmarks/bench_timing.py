"""Timing-core benchmark: prints figures and ratios measured side by side in one run.

- astable() over 1,000,000 array elements vs a plain-Python loop of the same formula (written
  inline, and the derived formula lambdified for scalars and called per element) and vs a
  hand-written numpy expression of the same physics;
- scipy's ODE solver per design (time per design, extrapolated);
- `import pwmkit` time and which heavy modules it pulls in.

Targets (issue): >= 20x the plain loop (aim 50x), within 2x of hand-written numpy.
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


def main() -> None:
    n = 1_000_000
    rng = np.random.default_rng(1)
    ra = rng.uniform(1e3, 1e5, n)
    rb = rng.uniform(1e3, 1e5, n)
    c = rng.uniform(1e-9, 1e-6, n)
    vcc = rng.uniform(9, 15, n)
    vd, vsat = 0.6, 0.1
    astable("steered", ra=ra[:10], rb=rb[:10], c=c[:10], vcc=vcc[:10], vd=vd, vsat=vsat)  # derive + lambdify once

    t_pwm = best_of(lambda: astable("steered", ra=ra, rb=rb, c=c, vcc=vcc, vd=vd, vsat=vsat, r_on=0.0))

    def hand_numpy() -> None:
        vctl = 2 * vcc / 3
        t_h = ra * c * np.log((vcc - vd - vctl / 2) / (vcc - vd - vctl))
        t_l = rb * c * np.log((vctl - vsat - vd) / (vctl / 2 - vsat - vd))
        p = t_h + t_l
        _ = (1 / p, t_h / p)

    t_np = best_of(hand_numpy)

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
    print(f"import pwmkit: {float(out[0]) * 1e3:.1f} ms; heavy modules pulled in: {out[1]}")


if __name__ == "__main__":
    main()
