"""Property tests: over wide random inputs the two-timer, monostable and heater models give finite
numbers or a DesignError, never NaN (hypothesis)."""

from __future__ import annotations

import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from pwmkit import DesignError
from pwmkit.loads.heater import heater
from pwmkit.timing import monostable, two_timer_pwm

R = st.floats(1.0, 1e8)
C = st.floats(1e-13, 1e-2)
V = st.floats(0.5, 30.0)


@settings(max_examples=150, deadline=None)
@given(r=R, c=C, vcc=V, frac=st.floats(0.0, 1.2))
def test_monostable_finite_or_design_error(r, c, vcc, frac):
    try:
        res = monostable(r=r, c=c, vcc=vcc, vctl=frac * vcc if frac > 0 else None)
    except DesignError:
        return
    assert math.isfinite(res.width) and res.width > 0


@settings(max_examples=100, deadline=None)
@given(ra=R, rb=R, c=C, rm=R, cm=C, vcc=V, frac=st.floats(0.01, 1.1))
def test_two_timer_finite_or_design_error(ra, rb, c, rm, cm, vcc, frac):
    try:
        p = two_timer_pwm(ra=ra, rb=rb, c=c, r_mono=rm, c_mono=cm, vcc=vcc, vctl=frac * vcc)
    except DesignError:
        return
    for x in (p.duty, p.frequency, p.t_high, p.v_start):
        assert math.isfinite(x)
    assert 0 < p.duty < 1


@settings(max_examples=100, deadline=None)
@given(r0=st.floats(0.01, 1e4), alpha=st.floats(-0.005, 0.02), rth=st.floats(0.01, 1e3), cth=st.floats(1e-3, 1e6),
       v=st.floats(0.0, 300.0), d=st.floats(0.0, 1.0), f=st.floats(0.1, 1e6), ta=st.floats(-40.0, 100.0))
def test_heater_finite_or_design_error(r0, alpha, rth, cth, v, d, f, ta):
    try:
        h = heater(r_cold=r0, alpha=alpha, r_th=rth, c_th=cth, v_supply=v, duty=d, frequency=f, t_ambient_c=ta)
    except DesignError:
        return
    for x in (h.t_element_c, h.p_avg, h.ripple_pp, h.warm_up, h.i_on):
        assert math.isfinite(x)
    assert h.ripple_pp >= 0 and h.t_element_c >= ta - 1e-9


def test_two_timer_vector_equals_scalar():
    v = np.linspace(1.0, 8.0, 9)
    kw = dict(ra=20e3, rb=1e3, c=100e-9, r_mono=10e3, c_mono=100e-9, vcc=12.0)
    arr = two_timer_pwm(vctl=v, **kw)
    for k, vk in enumerate(v):
        assert arr.duty[k] == pytest.approx(two_timer_pwm(vctl=float(vk), **kw).duty, rel=1e-12)


@settings(max_examples=60, deadline=None)
@given(ra=st.floats(1e3, 1e6), rb=st.floats(100.0, 1e6), rm=st.floats(1e3, 1e6), cm=st.floats(1e-9, 1e-5),
       vcc=st.floats(4.5, 16.0), frac=st.floats(0.0, 1.0))
def test_two_timer_duty_only_path_equals_the_full_result(ra, rb, rm, cm, vcc, frac):
    """The heater loop's unchecked duty path gives the full model's duty inside the working range."""
    from pwmkit.parts.timers import get_timer
    from pwmkit.timing.two_timer import _clock, _duty_only, _inputs

    kw = dict(ra=ra, rb=rb, c=100e-9, r_mono=rm, c_mono=cm, vcc=vcc)
    try:
        probe = two_timer_pwm(vctl=0.5 * vcc, **kw)
    except DesignError:
        return
    v = probe.vctl_min + frac * (probe.vctl_max - probe.vctl_min)
    try:
        full = two_timer_pwm(vctl=v, **kw).duty
    except DesignError:
        return
    q = _inputs(ra, rb, 100e-9, rm, cm, vcc, v, get_timer("bipolar"), None, None)
    q["_clock"] = _clock(q)
    assert _duty_only(q, v) == pytest.approx(full, rel=1e-14, abs=0.0)
