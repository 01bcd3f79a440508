"""Tests for pwmkit.loads.thermal: fixed-point junction temperature, runaway detection, thermal paths.

Outside references:
- scipy.optimize.brentq as an independent root finder of T = T_a + R_θ·P(T);
- an analytic runaway criterion for exponential power P = P0·e^{k(T-25)} (derived here: the heating
  line touches T where R_θ·k·P = 1);
- Mohan/Undeland/Robbins, *Power Electronics*, 3rd ed., ch. 29 (series thermal resistances) (from memory).
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from reach import reached, reaching
from scipy.optimize import brentq

from pwmkit.errors import DesignError
from pwmkit.loads.thermal import ThermalPath, ThermalResult, junction_temperature


def test_constant_power_is_linear_rise():
    # T_j = T_a + P·R_θ (Mohan et al. ch. 29, from memory)
    res = junction_temperature(0.5, 62.0, 40.0)
    assert isinstance(res, ThermalResult)
    assert res.tj_c == pytest.approx(71.0, abs=1e-9) and res.power == 0.5 and not res.runaway
    assert res.loop_gain == pytest.approx(0.0, abs=1e-12)


@pytest.mark.parametrize(("p0", "k", "rth", "ta"), [(0.1, 0.007, 62.0, 40.0), (1.0, 0.02, 10.0, 25.0),
                                                    (0.05, 0.05, 20.0, 60.0), (2.0, 0.005, 3.0, -20.0)])
def test_fixed_point_matches_brentq(p0, k, rth, ta):
    # independent oracle: scipy.optimize.brentq on the lowest root above ambient
    def power(t):
        return p0 * np.exp(k * (np.asarray(t) - 25.0))

    res = junction_temperature(power, rth, ta)
    assert not res.runaway
    # the lowest root lies below the minimum of G(T) = T_a + R_θ·P(T) - T at T* (R_θ·k·P(T*) = 1)
    t_star = 25.0 + math.log(1.0 / (rth * k * p0)) / k
    ref = brentq(lambda t: ta + rth * float(power(t)) - t, ta, max(t_star, ta + 1e-9), xtol=1e-13)
    assert res.tj_c == pytest.approx(ref, abs=1e-7)
    assert res.power == pytest.approx(float(power(ref)), rel=1e-7)
    assert res.loop_gain == pytest.approx(rth * k * float(power(ref)), rel=1e-3)  # R_θ·dP/dT
    assert 0.0 < res.loop_gain < 1.0  # a stable operating point


def test_runaway_matches_analytic_criterion():
    # P = P0·e^{k(T-25)}: an operating point exists iff min_T [T_a + R_θ·P(T) - T] <= 0, the minimum being
    # at R_θ·k·P(T*) = 1, i.e. iff T_a + 1/k - T* <= 0 (derived here). Test well away from the edge.
    k, rth, ta = 0.01, 50.0, 40.0
    p_edge = math.exp(-k * (ta + 1.0 / k - 25.0)) / (rth * k)  # P0 with G(T*) = 0
    for factor, expect_runaway in [(0.5, False), (0.9, False), (1.1, True), (3.0, True)]:
        p0 = p_edge * factor

        def power(t, p0=p0):
            return p0 * np.exp(k * (np.asarray(t) - 25.0))

        res = junction_temperature(power, rth, ta)
        assert res.runaway is expect_runaway
        if expect_runaway:
            assert res.tj_c is None and res.power is None and res.loop_gain is None
        else:
            assert math.isfinite(res.tj_c)


def test_array_input_masks_runaway_points():
    rth = np.array([10.0, 100.0, 300.0, 1000.0])

    def power(t):
        return 0.1 * 1.02 ** (np.asarray(t) - 25.0)

    res = junction_temperature(power, rth, 40.0)
    assert isinstance(res.tj_c, np.ma.MaskedArray)
    assert list(res.runaway) == [False, False, True, True]
    for k in range(4):
        one = junction_temperature(power, float(rth[k]), 40.0)
        assert one.runaway == bool(res.runaway[k])
        if not one.runaway:
            assert one.tj_c == pytest.approx(float(res.tj_c[k]), abs=1e-9)


def test_decreasing_power_still_converges():
    # negative temperature coefficient (e.g. a diode's V_F) with loop gain magnitude < 1
    res = junction_temperature(lambda t: 0.5 - 0.001 * (np.asarray(t) - 25.0), 60.0, 25.0)
    ref = brentq(lambda t: 25.0 + 60.0 * (0.5 - 0.001 * (t - 25.0)) - t, 25.0, 100.0, xtol=1e-13)
    assert res.tj_c == pytest.approx(ref, abs=1e-7)


def test_bad_power_functions_raise():
    with pytest.raises(DesignError, match="power: the power function returned a non-finite value"):
        junction_temperature(lambda t: np.full(np.shape(t), np.nan), 10.0, 25.0)
    with pytest.raises(DesignError, match="power: -1 W is negative"):
        junction_temperature(lambda t: np.full(np.shape(t), -1.0), 10.0, 25.0)
    with pytest.raises(DesignError, match="r_theta: -1 K/W is out of range"):
        junction_temperature(1.0, -1.0, 25.0)
    with pytest.raises(DesignError, match="power: -2 W is out of range"):
        junction_temperature(-2.0, 10.0, 25.0)


def test_thermal_path_series_sum():
    # series junction → case → sink → ambient (Mohan et al. ch. 29, from memory)
    path = ThermalPath(r_theta_jc=1.5, r_theta_cs=0.5, r_theta_sa=20.0)
    assert path.r_theta == pytest.approx(22.0)
    assert ThermalPath(r_theta_ja=62.0, r_theta_jc=1.5).r_theta == 62.0  # junction-to-ambient figure wins
    # largest sink keeping 1 W at 40 °C under 150 °C: 110 K/W - 2 K/W = 108 K/W
    assert path.max_sink_resistance(1.0, 40.0, 150.0) == pytest.approx(108.0)
    with pytest.raises(DesignError, match="already exceeds"):
        path.max_sink_resistance(100.0, 40.0, 150.0)
    with pytest.raises(DesignError, match="give r_theta_ja, or both r_theta_jc and r_theta_sa"):
        ThermalPath(r_theta_jc=1.0)


@reaching()
@settings(max_examples=80, deadline=None)
@given(p0=st.floats(0.0, 1e3), k=st.floats(-0.01, 0.2), rth=st.floats(0.0, 1e3), ta=st.floats(-60.0, 150.0))
def test_property_finite_or_runaway(p0, k, rth, ta):
    # never NaN: a finite temperature at/above a consistent fixed point, or runaway with no number
    def power(t):
        return p0 * np.exp(k * (np.minimum(np.asarray(t), 2000.0) - 25.0))

    try:
        res = junction_temperature(power, rth, ta)
    except DesignError:
        return
    reached()
    if res.runaway:
        assert res.tj_c is None
    else:
        assert math.isfinite(res.tj_c)
        assert res.tj_c == pytest.approx(ta + rth * float(power(res.tj_c)), abs=1e-6 * max(1.0, abs(res.tj_c)))
