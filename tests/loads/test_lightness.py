"""Tests of pwmkit.loads.lightness — CIE 1976 L*, even duty steps, pot tapers.

Published checks use the CIE 1976 lightness formula (CIE 15:2018 *Colorimetry* 4th ed.;
ISO/CIE 11664-4:2019); the worked values are (regression pin) — recomputed here from that formula with sympy
rationals at high precision, not copied.
"""

from __future__ import annotations

import importlib
import subprocess
import sys
from pathlib import Path

import numpy as np
import pytest
import sympy as sp
from hypothesis import given, settings
from hypothesis import strategies as st
from reach import mostly, reached, reaching

from pwmkit.errors import DesignError
from pwmkit.loads.lightness import (
    even_duty_steps,
    lightness,
    luminance_for_lightness,
    pot_taper_fraction,
    pot_taper_lightness,
)

lm = importlib.import_module("pwmkit.loads.lightness")  # the package attribute is the contract function

FAST = settings(max_examples=150, deadline=None)


def _lstar_sympy(y: str | sp.Rational) -> float:
    """CIE 15 / ISO/CIE 11664-4 formula evaluated with exact rationals and 30 digits."""
    t = sp.Rational(y)
    eps = sp.Rational(6, 29) ** 3
    f = sp.root(t, 3) if t > eps else sp.Rational(841, 108) * t + sp.Rational(4, 29)
    return float(sp.N(116 * f - 16, 30))


def _y_sympy(lstar: str | int) -> float:
    """Inverse of the CIE formula (same sources), exact rationals."""
    lv = sp.Rational(lstar)
    delta = sp.Rational(6, 29)
    ft = (lv + 16) / 116
    y = ft**3 if ft > delta else 3 * delta**2 * (ft - sp.Rational(4, 29))
    return float(sp.N(y, 30))


# ---------------------------------------------------------------------------------------------
# published formula, worked values


def test_lightness_cie15_worked_values():
    # published: CIE 15:2018 / ISO/CIE 11664-4:2019 formula; values (regression pin) recomputed (CIE 15:2018, CIE 1976 L*)
    assert lightness(0.18) == pytest.approx(49.496, abs=5e-4)  # 18 % grey → L* 49.496
    assert lightness(0.5) == pytest.approx(76.069, abs=5e-4)
    assert lightness(0.01) == pytest.approx(8.991, abs=5e-4)
    assert lightness(1 / 255) == pytest.approx(3.542, abs=5e-4)  # first 8-bit PWM step
    assert lightness(1.0) == pytest.approx(100.0, abs=1e-12)  # reference white: L* = 100 exactly
    assert lightness(0.0) == 0.0


def test_luminance_for_lightness_cie15_worked_values():
    # published: CIE 15:2018 / ISO/CIE 11664-4:2019 inverse formula; values (regression pin) recomputed
    assert luminance_for_lightness(50) == pytest.approx(0.184187, abs=5e-7)
    assert luminance_for_lightness(25) == pytest.approx(0.044155, abs=5e-7)
    assert luminance_for_lightness(10) == pytest.approx(0.011260, abs=5e-7)
    assert luminance_for_lightness(5) == pytest.approx(0.005535, abs=5e-7)  # linear branch
    assert luminance_for_lightness(1) == pytest.approx(0.001107, abs=5e-7)  # linear branch
    assert luminance_for_lightness(100) == 1.0


@pytest.mark.parametrize("y", ["0", "1/24389", "0.001", "216/24389", "0.00886", "0.05", "0.18", "0.5", "0.9", "1"])
def test_lightness_cie15_sympy_high_precision(y):
    # published: CIE 15:2018 formula evaluated by sympy with exact rationals (independent route)
    assert lightness(float(sp.Rational(y))) == pytest.approx(_lstar_sympy(y), rel=1e-13, abs=1e-13)


@pytest.mark.parametrize("lstar", [0, 1, 5, 8, 9, 25, 50, 75, 99, 100])
def test_luminance_cie15_sympy_high_precision(lstar):
    # published: inverse of the CIE 15:2018 formula written in f-space (ISO/CIE 11664-4 form)
    assert luminance_for_lightness(lstar) == pytest.approx(_y_sympy(lstar), rel=1e-13, abs=1e-16)


def test_lightness_cie15_duty_table():
    # CIE 15:2018, CIE 1976 L* table L* 10…100 → Y/Yn (regression pin), recomputed with sympy; printed to 5 decimals
    printed = [0.01126, 0.02989, 0.06236, 0.11251, 0.18419, 0.28123, 0.40749, 0.56681, 0.76303, 1.0]
    steps = even_duty_steps(10)
    np.testing.assert_allclose(steps.lstar, np.arange(10, 101, 10), atol=1e-12)
    np.testing.assert_allclose(steps.duty, printed, atol=5e-6)
    np.testing.assert_allclose(steps.duty, [_y_sympy(k) for k in range(10, 101, 10)], rtol=1e-13)


def test_lightness_branches_meet_at_break_point():
    # CIE 15:2018: the constants 841/108 and 4/29 make value and slope continuous at (6/29)^3
    eps = (6 / 29) ** 3
    below, above = np.nextafter(eps, 0.0), np.nextafter(eps, 1.0)
    assert lightness(eps) == pytest.approx(8.0, abs=1e-12)
    assert lightness(above) - lightness(below) == pytest.approx(0.0, abs=1e-9)
    h = 1e-7  # one-sided slopes: 24389/27 on both sides (sympy: (116/3)(29/6)^2 = 24389/27)
    slope_left = (lightness(eps) - lightness(eps - h)) / h
    slope_right = (lightness(eps + h) - lightness(eps)) / h
    exact = float(sp.Rational(116, 3) * sp.Rational(29, 6) ** 2)
    assert exact == pytest.approx(24389 / 27, rel=1e-15)
    assert slope_left == pytest.approx(exact, rel=1e-6)
    assert slope_right == pytest.approx(exact, rel=1e-5)


@reaching()
@FAST
@given(st.floats(0.0, 1.0))
def test_lightness_inverse_round_trip(y):
    reached()  # no early return: every example reaches the assertions
    # the inverse is exact (CIE 15:2018); round trip to float precision, never NaN
    lv = lightness(y)
    assert 0.0 <= lv <= 100.0
    assert luminance_for_lightness(lv) == pytest.approx(y, rel=1e-12, abs=1e-15)


@reaching()
@FAST
@given(st.floats(0.0, 100.0))
def test_luminance_inverse_round_trip(lv):
    reached()  # no early return: every example reaches the assertions
    y = luminance_for_lightness(lv)
    assert 0.0 <= y <= 1.0
    assert lightness(y) == pytest.approx(lv, rel=1e-12, abs=1e-12)


@reaching()
@FAST
@given(mostly(st.one_of(st.floats(0.0, 1.0), st.floats(0.0, 1.0).map(lambda y: f"{y:.6g}")),
              st.one_of(st.floats(allow_nan=True, allow_infinity=True), st.text(max_size=8))))
def test_lightness_wide_input_finite_or_design_error(x):
    # property: finite result or DesignError, never NaN (STYLE.md)
    try:
        out = lightness(x)
    except DesignError:
        return
    reached()
    assert np.isfinite(out) and 0.0 <= out <= 100.0


def test_lightness_vector_equals_scalar_and_monotonic():
    y = np.linspace(0.0, 1.0, 1001)
    vec = lightness(y)
    assert isinstance(vec, np.ndarray) and vec.shape == y.shape
    np.testing.assert_array_equal(vec, [lightness(float(v)) for v in y])
    assert np.all(np.diff(vec) > 0)
    back = luminance_for_lightness(vec)
    np.testing.assert_allclose(back, y, rtol=1e-12, atol=1e-15)
    assert isinstance(lightness(0.5), float) and isinstance(luminance_for_lightness(50), float)


@pytest.mark.parametrize(("func", "value", "pattern"), [
    (lightness, 1.2, r"y \(relative luminance Y/Yn\): 1.2 is out of range; allowed .* <= 1"),
    (lightness, -0.1, r"y \(relative luminance Y/Yn\): -0.1 is out of range"),
    (lightness, float("nan"), r"not a finite number"),
    (luminance_for_lightness, 100.5, r"lstar \(CIE 1976 lightness L\*\): 100.5 is out of range"),
    (luminance_for_lightness, [10, -1], r"lstar .*: -1 is out of range"),
])
def test_lightness_out_of_range_is_design_error(func, value, pattern):
    with pytest.raises(DesignError, match=pattern):
        func(value)


def test_lightness_accepts_engineering_text():
    assert lightness("180m") == pytest.approx(lightness(0.18))


# ---------------------------------------------------------------------------------------------
# even steps


def test_even_duty_steps_options_and_resolution():
    s = even_duty_steps(4, lmin=25.0, lmax=100.0)
    np.testing.assert_allclose(s.lstar, [25, 50, 75, 100])
    # CIE 15:2018 inverse at L* = 25 → 0.044155 (regression pin); first increment from off is the duty itself
    assert s.duty[0] == pytest.approx(0.044155, abs=5e-7)
    assert s.min_duty_increment == pytest.approx(min(np.diff(np.r_[0.0, s.duty])))
    one = even_duty_steps(1)
    assert one.duty.tolist() == [1.0] and one.lstar.tolist() == [100.0]
    assert "DutySteps(n=4" in repr(s) and "<table>" in s._repr_html_()
    assert s._repr_html_().count("<tr>") == 4 + 2  # header + 4 steps + increment row


@pytest.mark.parametrize(("kwargs", "pattern"), [
    ({"n": 0}, r"n \(number of steps\): 0 is not allowed"),
    ({"n": 2.5}, r"n \(number of steps\): 2.5 is not allowed"),
    ({"n": True}, r"n \(number of steps\)"),
    ({"n": 5, "lmin": 60.0, "lmax": 50.0}, r"lmin \(dimmest L\*\): 60 is out of range; allowed .* <= 50"),
    ({"n": 5, "lmax": 0.0}, r"lmax \(brightest L\*\): 0 is out of range"),
    ({"n": 5, "lmax": [50, 60]}, r"lmax .*give one number"),
])
def test_even_duty_steps_bad_input(kwargs, pattern):
    with pytest.raises(DesignError, match=pattern):
        even_duty_steps(**kwargs)


# ---------------------------------------------------------------------------------------------
# pot tapers


def test_pot_taper_log_definition():
    # our definition (documented, common practice): exponential audio taper with 10 % at half travel
    assert pot_taper_fraction(0.5, "log") == pytest.approx(0.10, rel=1e-14)
    # b = (1/h − 1)^2 = 81 → g(0.25) = (81^0.25 − 1)/80 = (3 − 1)/80 exactly (hand calculation)
    assert pot_taper_fraction(0.25, "log") == pytest.approx(2 / 80, rel=1e-14)
    assert pot_taper_fraction(0.5, "log", half_travel=0.2) == pytest.approx(0.2, rel=1e-14)
    # two-segment approximation passes through (0.5, h) with straight lines (hand calculation)
    assert pot_taper_fraction(0.25, "log-segments") == pytest.approx(0.05)
    assert pot_taper_fraction(0.75, "log-segments") == pytest.approx(0.55)
    # reverse log is the point reflection of log: 1 − g(1 − x)
    x = np.linspace(0, 1, 11)
    np.testing.assert_allclose(pot_taper_fraction(x, "reverse-log"), 1 - pot_taper_fraction(1 - x, "log"), atol=1e-15)
    for taper in ("linear", "log", "log-segments", "reverse-log"):
        g = pot_taper_fraction(np.linspace(0, 1, 201), taper)
        assert g[0] == 0.0 and g[-1] == pytest.approx(1.0, abs=1e-15)
        assert np.all(np.diff(g) > 0)


def test_pot_taper_lightness_mid_travel():
    # CIE 15:2018 formula (regression pin): a 10 % log pot at mid travel gives L* = 116·0.1^(1/3) − 16 = 37.84,
    # a linear pot gives L*(0.5) = 76.07; a perceptually linear knob would give 50
    log = pot_taper_lightness(0.5, "log")
    lin = pot_taper_lightness(0.5, "linear")
    assert log.duty == pytest.approx(0.1) and log.lstar == pytest.approx(37.84, abs=5e-3)
    assert lin.lstar == pytest.approx(76.069, abs=5e-4)
    assert log.lstar_target == pytest.approx(50.0) and log.lstar_error == pytest.approx(37.84 - 50, abs=5e-3)
    assert isinstance(log.duty, float)


def test_pot_taper_pot_steered_astable_duty():
    # RC step response: Alexander & Sadiku, Fundamentals of Electric Circuits, 6th ed., ch. 7 ideal pot-steered astable: D = (R1 + Pa)/(R1 + P); R1 = 1 kΩ, P = 100 kΩ,
    # wiper 0.3 → 30.69 % (regression pin); expressed here as duty_min = R1/(R1 + P), duty_max = 1
    r1, pot = 1e3, 100e3
    p = pot_taper_lightness([0.0, 0.3, 0.5, 1.0], "linear", duty_min=r1 / (r1 + pot), duty_max=1.0)
    np.testing.assert_allclose(p.duty, [(r1 + w * pot) / (r1 + pot) for w in (0.0, 0.3, 0.5, 1.0)], rtol=1e-14)
    assert p.duty[1] == pytest.approx(0.3069, abs=5e-5)
    assert p.lstar_target[0] == pytest.approx(lightness(r1 / (r1 + pot)))


def test_pot_taper_log_closer_to_perceptual_than_linear():
    # common practice: an audio taper approximates a perceptually even dimmer better than linear
    x = np.linspace(0, 1, 101)
    err_log = np.abs(pot_taper_lightness(x, "log").lstar_error).max()
    err_lin = np.abs(pot_taper_lightness(x, "linear").lstar_error).max()
    assert err_log < err_lin
    res = pot_taper_lightness(x, "log-segments")
    assert res.lstar.shape == x.shape and "<table>" in res._repr_html_() and "log-segments" in repr(res)


@pytest.mark.parametrize(("kwargs", "pattern"), [
    ({"wiper": 1.5}, r"travel \(pot rotation\): 1.5 is out of range"),
    ({"wiper": 0.5, "taper": "audio"}, r"taper: 'audio' is not known"),
    ({"wiper": 0.5, "taper": "log", "half_travel": 0.5}, r"half_travel .*: 0.5 is out of range"),
    ({"wiper": 0.5, "duty_min": 0.6, "duty_max": 0.4}, r"duty_min 0.6 must be below duty_max 0.4"),
])
def test_pot_taper_bad_input(kwargs, pattern):
    with pytest.raises(DesignError, match=pattern):
        pot_taper_lightness(**kwargs)


# ---------------------------------------------------------------------------------------------
# the contract name pwmkit.loads.lightness is both a function and (once imported) the submodule


def test_contract_name_callable_after_submodule_import():
    import pwmkit.loads

    assert pwmkit.loads.lightness(0.18) == pytest.approx(49.496, abs=5e-4)  # CIE 15 (regression pin)
    assert lm.even_duty_steps is even_duty_steps


def test_contract_name_in_fresh_interpreter():
    code = ("import pwmkit.loads as L\n"
            "a = L.lightness(0.5)\n"
            "import pwmkit.loads.lightness\n"
            "b = L.lightness(0.5)\n"
            "from pwmkit.loads import lightness\n"
            "print(a, b, lightness(0.5), L.luminance_for_lightness(50))\n")
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True,
                         cwd=Path(__file__).resolve().parents[2])
    a, b, c, y = (float(v) for v in out.stdout.split())
    assert a == b == c == pytest.approx(76.069, abs=5e-4)  # CIE 15 (regression pin)
    assert y == pytest.approx(0.184187, abs=5e-7)
