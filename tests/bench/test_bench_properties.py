"""Property tests: wide random input gives finite results or a DesignError — never NaN, never another error."""

from __future__ import annotations

import math
import subprocess
import sys

import numpy as np
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from pwmkit import DesignError
from pwmkit.bench import capture_timing, read_capture


@settings(max_examples=60, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(n=st.integers(0, 400), seed=st.integers(0, 2**31 - 1), scale=st.floats(1e-6, 1e3),
       kind=st.sampled_from(["noise", "square", "steps", "nan", "repeat"]))
def test_capture_timing_is_finite_or_refuses(n, seed, scale, kind):
    rng = np.random.default_rng(seed)
    t = np.cumsum(rng.uniform(0.1, 1.0, n)) * 1e-6
    if kind == "noise":
        v = scale * rng.standard_normal(n)
    elif kind == "square":
        v = scale * ((np.arange(n) // max(1, int(rng.integers(1, 40)))) % 2) + 0.01 * scale * rng.standard_normal(n)
    elif kind == "steps":
        v = scale * rng.integers(0, 3, n).astype(float)
    elif kind == "nan":
        v = rng.standard_normal(n)
        if n:
            v[rng.integers(0, n)] = np.nan
    else:
        v = rng.standard_normal(n)
        if n > 2:
            t[n // 2] = t[n // 2 - 1]
    try:
        m = capture_timing(t, v)
    except DesignError:
        return
    for name in ("frequency", "duty", "period", "t_high", "t_low", "v_high", "v_low", "frequency_limit", "duty_limit"):
        assert math.isfinite(getattr(m, name)), name
    assert 0.0 <= m.duty <= 1.0 and m.n_periods >= 2


@settings(max_examples=60, deadline=None)
@given(text=st.text(alphabet="0123456789,;.\t -eE#%abcV()[]s\n", max_size=300))
def test_read_capture_reads_or_refuses(tmp_path_factory, text):
    p = tmp_path_factory.mktemp("cap") / "x.csv"
    p.write_text(text, encoding="utf-8")
    try:
        c = read_capture(p)
    except DesignError:
        return
    assert c.time.ndim == 1 and all(ch.shape == c.time.shape for ch in c.channels.values())


def test_bench_package_is_light():
    code = ("import sys, pwmkit.bench, pwmkit.bench.readings, pwmkit.bench.capture;"
            "from pwmkit.record import load_design;"
            "load_design('examples/greenhouse-fan-as-built.toml');"
            "print(','.join(m for m in ('scipy', 'ipywidgets', 'bokeh', 'sympy') if m in sys.modules))")
    from pathlib import Path

    root = Path(__file__).resolve().parents[2]
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True, cwd=root)
    assert out.stdout.strip() == ""


@settings(max_examples=12, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(f=st.floats(1.0, 1e7), d=st.floats(0.0, 1.0), vcc=st.none() | st.floats(0.5, 30.0),
       t=st.none() | st.floats(-40.0, 120.0))
def test_reconcile_is_finite_or_refuses(f, d, vcc, t):
    from pwmkit.bench import reconcile
    from pwmkit.design import Design, Timing

    design = Design(timing=Timing(topology="steered", ra=10e3, rb=4.7e3, c=47e-9, r_tolerance=0.01,
                                  c_tolerance=0.1))
    try:
        r = reconcile(design, frequency=f, duty=d, vcc=vcc, t_ambient_c=t, n=2000)
    except DesignError:
        return
    assert all(math.isfinite(x) for x in r.estimates.values())
    assert all(0.0 <= p <= 100.0 for p in r.percentile.values())
    assert r.culprit in r.estimates or r.culprit == "vcc"
