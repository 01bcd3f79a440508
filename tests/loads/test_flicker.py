"""Tests of pwmkit.loads.flicker — percent modulation, flicker index, IEEE Std 1789-2015 regions.

Sources: IEEE Std 1789-2015 recommended practices RP1/RP2 (coefficients from a secondary summary of the
standard's figure, from memory; the primary text was not read); IES lighting definitions for
flicker index and percent flicker. Check values tagged (regression pin) are recomputed here.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from reach import mostly, reached, reaching

from pwmkit.errors import DesignError
from pwmkit.loads.flicker import (
    LOW_RISK,
    NO_EFFECT,
    flicker_class,
    flicker_index_pwm,
    frequency_for_region,
    ieee1789_curves,
    ieee1789_limits,
    percent_modulation,
    pwm_flicker,
)

FAST = settings(max_examples=150, deadline=None)


def _sampled_metrics(samples: np.ndarray, t: np.ndarray) -> tuple[float, float]:
    """Independent numeric route: percent modulation and flicker index of one sampled period.

    Flicker index per the IES definition A1/(A1 + A2): area above the mean over total area, both
    by numpy's trapezoid rule.
    """
    period = t[-1] - t[0]
    total = np.trapezoid(samples, t)
    mean = total / period
    above = np.trapezoid(np.maximum(samples - mean, 0.0), t)
    mod = 100.0 * (samples.max() - samples.min()) / (samples.max() + samples.min())
    return mod, above / total


def _square_wave(duty: float, residual: float, n: int = 200_001) -> tuple[np.ndarray, np.ndarray]:
    t = np.linspace(0.0, 1.0, n)
    return np.where(t < duty, 1.0, residual), t


# ---------------------------------------------------------------------------------------------
# IEEE Std 1789-2015 boundaries


def test_flicker_ieee1789_boundaries():
    # published: IEEE Std 1789-2015 RP1/RP2; check values (regression pin) (IEEE Std 1789-2015, recommended practices RP1/RP2, from memory)
    lim = ieee1789_limits(100.0)
    assert lim.low_risk_percent == pytest.approx(8.0, abs=5e-3)  # 0.08 × 100 Hz
    assert lim.no_effect_percent == pytest.approx(3.33, abs=5e-3)  # 0.0333 × 100 Hz
    lim = ieee1789_limits(120.0)
    assert lim.low_risk_percent == pytest.approx(9.6, abs=5e-3)
    assert lim.no_effect_percent == pytest.approx(4.0, abs=5e-3)  # 3.996 printed as 4.0
    lim = ieee1789_limits(1000.0)
    assert lim.low_risk_percent == pytest.approx(80.0, abs=5e-3)
    assert lim.no_effect_percent == pytest.approx(33.3, abs=5e-3)
    lim = ieee1789_limits(50.0)  # below 90 Hz: 0.025·f and 0.01·f
    assert (lim.low_risk_percent, lim.no_effect_percent) == pytest.approx((1.25, 0.5))


def test_flicker_ieee1789_step_at_90_hz():
    # published: IEEE Std 1789-2015 — slopes change at 90 Hz: RP1 2.25 % → 7.2 %, RP2 0.9 % → 3.0 %
    below = ieee1789_limits(np.nextafter(90.0, 0.0))
    at = ieee1789_limits(90.0)  # our convention: 90 Hz belongs to the upper band ("90 Hz ≤ f")
    assert below.low_risk_percent == pytest.approx(2.25) and at.low_risk_percent == pytest.approx(7.2)
    assert below.no_effect_percent == pytest.approx(0.9) and at.no_effect_percent == pytest.approx(2.997)
    assert flicker_class(89.9, 5.0) == "elevated" and flicker_class(90.0, 5.0) == "low-risk"


def test_flicker_ieee1789_no_restriction_is_none():
    # published: IEEE Std 1789-2015 — no restriction above 1250 Hz (RP1) / 3000 Hz (RP2);
    # our convention: the band edges themselves are still restricted; never inf or NaN
    assert ieee1789_limits(1250.0).low_risk_percent == pytest.approx(100.0)
    assert ieee1789_limits(1250.001).low_risk_percent is None
    assert ieee1789_limits(3000.0).no_effect_percent == pytest.approx(99.9)
    assert ieee1789_limits(3000.001).no_effect_percent is None
    assert ieee1789_limits(1e9) == ieee1789_limits(1e9).__class__(1e9, None, None)
    assert "no restriction" in ieee1789_limits(5000.0)._repr_html_()


def test_flicker_ieee1789_full_on_off_pwm():
    # IEEE Std 1789-2015, recommended practices RP1/RP2, from memory: full on/off PWM (Mod 100 %) is low-risk only above 1250 Hz and shows no
    # observable effect only above ~3 kHz (100/0.0333 = 3003 Hz; the RP2 band ends at 3000 Hz first)
    assert flicker_class(1250.0, 100.0) == "elevated"
    assert flicker_class(1250.01, 100.0) == "low-risk"
    assert flicker_class(3000.0, 100.0) == "low-risk"
    assert flicker_class(3000.01, 100.0) == "no-effect"
    assert 100.0 / 0.0333 == pytest.approx(3003.0, abs=0.5)
    assert frequency_for_region(100.0, "low-risk") == 1250.0
    assert frequency_for_region(100.0, "no-effect") == 3000.0
    # the classic 555 astable of RC step response: Alexander & Sadiku, Fundamentals of Electric Circuits, 6th ed., ch. 7 (480.9 Hz) driving LEDs on/off is "elevated"
    assert pwm_flicker(480.898, 0.66667).classification == "elevated"


def test_flicker_class_limit_itself_fails_region():
    # our convention (the standard's strict "<"): a modulation equal to the limit fails the region
    for f in (30.0, 100.0, 1000.0):
        lim = ieee1789_limits(f)
        assert flicker_class(f, lim.no_effect_percent) == "low-risk"
        assert flicker_class(f, lim.low_risk_percent) == "elevated"
        assert flicker_class(f, np.nextafter(lim.no_effect_percent, 0.0)) == "no-effect"


def test_flicker_class_vector_equals_scalar():
    f = np.array([10.0, 60.0, 90.0, 100.0, 500.0, 1249.0, 2000.0, 3500.0])
    m = np.array([[0.0], [5.0], [50.0], [100.0]])
    grid = flicker_class(f, m)
    assert isinstance(grid, np.ndarray) and grid.shape == (4, 8)
    for i in range(4):
        for j in range(8):
            assert grid[i, j] == flicker_class(float(f[j]), float(m[i, 0]))
    assert isinstance(flicker_class(100.0, 1.0), str)
    assert set(np.unique(grid)) == {"no-effect", "low-risk", "elevated"}


@reaching()
@FAST
@given(st.floats(1e-6, 100.0), st.sampled_from(["no-effect", "low-risk"]))
def test_frequency_for_region_is_the_threshold(mod, region):
    reached()  # no early return: every example reaches the assertions
    # property: just above the returned frequency the modulation is inside the region, just below
    # it is not (IEEE Std 1789-2015 boundaries; the limit rises monotonically with f)
    f_star = frequency_for_region(mod, region)
    assert math.isfinite(f_star) and 0.0 < f_star <= (3000.0 if region == "no-effect" else 1250.0)
    inside = {"no-effect": ("no-effect",), "low-risk": ("no-effect", "low-risk")}[region]
    assert flicker_class(f_star * (1 + 1e-9) + 1e-9, mod) in inside
    assert flicker_class(f_star * (1 - 1e-7), mod) not in inside


def test_frequency_for_region_examples():
    # IEEE Std 1789-2015 slopes (regression pin): 20 % needs f > 20/0.0333 = 600.6 Hz for no observable effect;
    # 2 % is inside RP2 from the 90 Hz step on (0.0333·90 = 2.997 %); 0.5 % needs f > 50 Hz
    assert frequency_for_region(20.0) == pytest.approx(600.6006, rel=1e-6)
    assert frequency_for_region(2.0) == 90.0
    assert frequency_for_region(0.5) == pytest.approx(50.0)
    assert frequency_for_region(0.0) == 0.0
    np.testing.assert_allclose(frequency_for_region([0.5, 20.0]), [50.0, 600.6006], rtol=1e-6)
    with pytest.raises(DesignError, match=r"region: 'safe' is not known"):
        frequency_for_region(10.0, "safe")


def test_flicker_curves_vertices():
    # IEEE Std 1789-2015 boundaries drawn as vertices; "no restriction" drawn at the 100 % cap
    c = ieee1789_curves(1.0, 1e4)
    np.testing.assert_allclose(c.low_risk_frequency, [1, 90, 90, 1250, 1250, 1e4])
    np.testing.assert_allclose(c.low_risk_percent, [0.025, 2.25, 7.2, 100, 100, 100])
    np.testing.assert_allclose(c.no_effect_frequency, [1, 90, 90, 3000, 3000, 1e4])
    np.testing.assert_allclose(c.no_effect_percent, [0.01, 0.9, 2.997, 99.9, 100, 100])
    assert all(np.all(np.isfinite(a)) for a in (c.low_risk_percent, c.no_effect_percent))
    narrow = ieee1789_curves(100.0, 1000.0, cap_percent=50.0)
    np.testing.assert_allclose(narrow.low_risk_frequency, [100, 1000])
    np.testing.assert_allclose(narrow.low_risk_percent, [8, 50])  # 80 % clipped at the 50 % cap
    assert "<table>" in c._repr_html_() and "vertices" in repr(c)
    assert "IEEE Std 1789-2015" in c.source and LOW_RISK.source == NO_EFFECT.source


# ---------------------------------------------------------------------------------------------
# waveform figures


def test_percent_modulation_definition():
    # IES lighting definitions / IEEE Std 1789-2015: Mod % = 100 (Lmax − Lmin)/(Lmax + Lmin)
    assert percent_modulation(1.0, 0.2) == pytest.approx(66.667, abs=5e-4)  # IEEE Std 1789-2015, recommended practices RP1/RP2, from memory (regression pin)
    assert percent_modulation(1.0, 0.0) == 100.0
    assert percent_modulation(3.0, 3.0) == 0.0
    assert percent_modulation(0.0, 0.0) == 0.0  # dark: nothing flickers (our convention)
    np.testing.assert_allclose(percent_modulation([1.0, 2.0], [0.0, 1.0]), [100.0, 100.0 / 3])
    with pytest.raises(DesignError, match=r"l_min 2 exceeds l_max 1"):
        percent_modulation(1.0, 2.0)
    with pytest.raises(DesignError, match=r"l_max \(highest light level\): -1 is out of range"):
        percent_modulation(-1.0, 0.0)


def test_flicker_index_pwm_reference_checks():
    # IEEE Std 1789-2015, recommended practices RP1/RP2, from memory (regression pin) (IES definition applied to a rectangular wave)
    assert flicker_index_pwm(0.25) == pytest.approx(0.75, abs=5e-5)  # r = 0 → FI = 1 − D
    assert flicker_index_pwm(0.5, 0.2) == pytest.approx(0.3333, abs=5e-5)
    assert flicker_index_pwm(1.0) == 0.0 and flicker_index_pwm(0.3, 1.0) == 0.0  # steady light
    assert flicker_index_pwm(0.0, 0.5) == 0.0
    assert flicker_index_pwm(0.0, 0.0) == 0.0  # dark (our convention; FI → 1 as D → 0+)


@pytest.mark.parametrize(("duty", "residual"), [(0.1, 0.0), (0.25, 0.0), (0.5, 0.2), (0.7, 0.05), (0.9, 0.5)])
def test_flicker_index_vs_numerical_integral(duty, residual):
    # independent route: IES definition A1/(A1 + A2) by numpy trapezoid over a sampled square wave
    samples, t = _square_wave(duty, residual)
    mod, fi = _sampled_metrics(samples, t)
    assert flicker_index_pwm(duty, residual) == pytest.approx(fi, abs=1e-4)
    assert pwm_flicker(100.0, duty, residual).modulation_percent == pytest.approx(mod, rel=1e-12)


def test_sampled_oracle_reproduces_sine_result():
    # validates the numerical oracle itself: sinusoidal modulation depth m has FI = m/π
    # (IEEE Std 1789-2015, recommended practices RP1/RP2, from memory (regression pin): m = 0.3 → 0.095493)
    t = np.linspace(0.0, 1.0, 200_001)
    _, fi = _sampled_metrics(1.0 + 0.3 * np.sin(2 * np.pi * t), t)
    assert fi == pytest.approx(0.3 / np.pi, abs=1e-6)
    assert 0.3 / np.pi == pytest.approx(0.095493, abs=5e-7)


def test_flicker_index_vector_equals_scalar():
    d = np.linspace(0.0, 1.0, 11)
    r = np.array([[0.0], [0.3]])
    grid = flicker_index_pwm(d, r)
    assert grid.shape == (2, 11)
    for i, rv in enumerate((0.0, 0.3)):
        np.testing.assert_array_equal(grid[i], [flicker_index_pwm(float(x), rv) for x in d])


# ---------------------------------------------------------------------------------------------
# PWM summary


def test_pwm_flicker_greenhouse_dimmer():
    # demo scenario (invented values): grow-bar dimmer from a 555 at 400 Hz, 30 % duty, plain switch.
    # IEEE Std 1789-2015: at 400 Hz low-risk < 32 %, no-effect < 13.32 % (regression pin); FI = 1 − D (IES)
    p = pwm_flicker(400.0, 0.3)
    assert p.modulation_percent == 100.0 and p.flicker_index == pytest.approx(0.7)
    assert p.low_risk_limit_percent == pytest.approx(32.0) and p.no_effect_limit_percent == pytest.approx(13.32)
    assert p.classification == "elevated"
    assert (p.frequency_for_low_risk, p.frequency_for_no_effect) == (1250.0, 3000.0)
    # the same dimmer at 4 kHz has no restriction at all
    q = pwm_flicker("4k", 0.3)
    assert q.classification == "no-effect" and q.low_risk_limit_percent is None and q.no_effect_limit_percent is None
    assert "None" not in q._repr_html_() and "no restriction" in q._repr_html_()
    assert "PwmFlicker(f=4000 Hz" in repr(q)


def test_pwm_flicker_residual_and_steady_light():
    # a 20 % residual (off/on) gives Mod 66.67 % (IEEE Std 1789-2015, recommended practices RP1/RP2, from memory (regression pin)); at 100 Hz that is elevated
    p = pwm_flicker(100.0, 0.5, residual=0.2)
    assert p.modulation_percent == pytest.approx(66.667, abs=5e-4)
    assert p.frequency_for_no_effect == pytest.approx(66.6667 / 0.0333, rel=1e-5)
    for duty in (0.0, 1.0):  # steady light: nothing flickers
        s = pwm_flicker(50.0, duty)
        assert s.modulation_percent == 0.0 and s.flicker_index == 0.0 and s.classification == "no-effect"
        assert s.frequency_for_no_effect == 0.0


@pytest.mark.parametrize(("args", "pattern"), [
    ((0.0, 0.5), r"frequency: 0 Hz is out of range; allowed frequency > 0 Hz"),
    ((-50.0, 0.5), r"frequency: -50 Hz is out of range"),
    ((100.0, 1.5), r"duty: 1.5 is out of range; allowed duty <= 1"),
    ((100.0, 0.5, -0.1), r"residual \(off/on light ratio\): -0.1 is out of range"),
    (([100.0, 200.0], 0.5), r"give single numbers"),
])
def test_pwm_flicker_bad_input(args, pattern):
    with pytest.raises(DesignError, match=pattern):
        pwm_flicker(*args)


@pytest.mark.parametrize(("args", "pattern"), [
    ((0.0, 10.0), r"frequency: 0 Hz is out of range"),
    ((100.0, 101.0), r"modulation_percent: 101 % is out of range; allowed modulation_percent <= 100 %"),
    ((100.0, float("inf")), r"not a finite number"),
])
def test_flicker_class_bad_input(args, pattern):
    with pytest.raises(DesignError, match=pattern):
        flicker_class(*args)


@reaching()
@FAST
@given(mostly(st.tuples(st.floats(1e-3, 1e7), st.floats(0.0, 1.0), st.floats(0.0, 1.0)),
              st.tuples(st.floats(-1e12, 1e12), st.floats(-0.5, 1.5), st.floats(-0.5, 1.5))))
def test_pwm_flicker_wide_inputs_finite_or_design_error(case):
    f, duty, residual = case
    # property (STYLE.md): finite figures or DesignError; "no restriction" is None, never inf/NaN
    try:
        p = pwm_flicker(f, duty, residual)
    except DesignError:
        return
    reached()
    for v in (p.modulation_percent, p.flicker_index, p.frequency_for_low_risk, p.frequency_for_no_effect):
        assert math.isfinite(v)
    for v in (p.low_risk_limit_percent, p.no_effect_limit_percent):
        assert v is None or math.isfinite(v)
    assert 0.0 <= p.flicker_index <= 1.0 and 0.0 <= p.modulation_percent <= 100.0
    assert p.classification in ("no-effect", "low-risk", "elevated")


@pytest.mark.parametrize(("call", "pattern"), [
    (lambda: ieee1789_limits([100.0, 200.0]), r"give single numbers"),
    (lambda: ieee1789_curves(1000.0, 100.0), r"f_min 1000 Hz must be below f_max 100 Hz"),
    (lambda: ieee1789_curves(0.0, 100.0), r"f_min: 0 Hz is out of range"),
    (lambda: frequency_for_region(120.0), r"modulation_percent: 120 % is out of range"),
])
def test_ieee1789_helpers_bad_input(call, pattern):
    with pytest.raises(DesignError, match=pattern):
        call()


@reaching()
@FAST
@given(mostly(st.tuples(st.floats(0.0, 1.79e308), st.floats(0.0, 1.0)).map(lambda t: (t[0], t[0] * t[1])),
              st.tuples(st.floats(-1e308, 1.79e308), st.floats(-1e308, 1.79e308))))
def test_percent_modulation_wide_inputs_finite_or_design_error(case):
    l_max, l_min = case
    # property (STYLE.md): finite 0…100 % or DesignError, even near the floating-point limit
    try:
        m = percent_modulation(l_max, l_min)
    except DesignError:
        return
    reached()
    assert math.isfinite(m) and 0.0 <= m <= 100.0
    assert percent_modulation(1.7e308, 0.0) == 100.0 and percent_modulation(1e308, 1e308) == 0.0
