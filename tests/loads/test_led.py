"""Tests of pwmkit.loads.led — series resistor, currents, powers, ratings, V_F spread.

Sources: the LED worked example of series-resistor law, common practice (values (regression pin), recomputed inline here); IEC 60063
preferred numbers (via pwmkit.eseries); IEC 60115-1 derating shape with typical thick-film
corners (common practice); SI 2019 exact constants through scipy.constants as an independent oracle.
"""

from __future__ import annotations

import math
import re

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from reach import mostly, reached, reaching

from pwmkit.errors import DesignError
from pwmkit.loads import led_resistor
from pwmkit.loads.led import (
    LED_EYE_SAFETY_NOTE,
    RESISTOR_HOT_NOTE,
    RESISTOR_RATINGS,
    TYPICAL_VF,
    LedDrive,
    LedString,
    led_current,
    led_drive,
    resistor_derating,
    resistor_power_rating,
)

FAST = settings(max_examples=120, deadline=None)
WIDE = st.floats(1e-300, 1e300)

# series-resistor law, common practice worked example: 12 V, 3 white LEDs × 3.1 V, R_DS(on) 50 mΩ, 20 mA
VS, VF, N, RDS, I_SET = 12.0, 3.1, 3, 0.05, 0.020


# ---------------------------------------------------------------------------------------------
# series-resistor law, common practice worked example


def test_led_resistor_references_worked_example():
    # series-resistor law, common practice (regression pin): R = (12 − 3·3.1 − 0.02·0.05)/0.02 = 134.95 Ω (hand calculation below)
    hand = (12.0 - 3 * 3.1 - 0.020 * 0.05) / 0.020
    assert hand == pytest.approx(134.95, abs=5e-3)
    assert led_resistor(VS, VF, N, I_SET, v_switch=I_SET * RDS) == pytest.approx(hand, rel=1e-12)
    assert led_resistor(VS, VF, N, I_SET) == pytest.approx(135.0, rel=1e-12)  # ideal switch


def test_led_drive_references_worked_example_e24():
    # series-resistor law, common practice (regression pin): E24 130 Ω → 20.761 mA, 56.03 mW on, 28.02 mW avg at D = 0.5, I_avg 10.38 mA
    d = led_drive(VS, VF, N, i_peak=I_SET, rds_on=RDS, duty=0.5)
    assert d.r_series == pytest.approx(134.95, abs=5e-3)
    assert d.i_peak == pytest.approx(I_SET, rel=1e-12)
    assert d.r_preferred == 130.0  # IEC 60063 E24 nearest to 134.95 Ω (log scale)
    i130 = (12.0 - 9.3) / (130.0 + 0.05)  # hand calculation
    assert d.i_peak_preferred == pytest.approx(i130, rel=1e-12)
    assert d.i_peak_preferred == pytest.approx(20.761e-3, abs=5e-7)
    assert d.p_resistor_preferred_on == pytest.approx(56.03e-3, abs=5e-6)
    assert d.p_resistor_preferred_avg == pytest.approx(28.02e-3, abs=5e-6)
    # series-resistor law, common practice (common practice): 56 mW under the 2× rule needs more than 0.1 W → 1/8 W
    assert d.resistor_rating == 0.125


def test_led_drive_references_next_higher_e24():
    # series-resistor law, common practice (regression pin): 150 Ω → 17.994 mA, 48.57 mW
    d = led_drive(VS, VF, N, i_peak=I_SET, rds_on=RDS, rounding="up")
    assert d.r_preferred == 150.0
    assert d.i_peak_preferred == pytest.approx(17.994e-3, abs=5e-7)
    assert d.p_resistor_preferred_on == pytest.approx(48.57e-3, abs=5e-6)
    assert led_drive(VS, VF, N, i_peak=I_SET, rounding="down").r_preferred == 130.0
    assert led_drive(VS, VF, N, i_peak=I_SET, series="E96").r_preferred == 137.0  # IEC 60063 E96: 137


def test_led_drive_references_vf_spread():
    # series-resistor law, common practice (regression pin): V_F ±0.2 V per LED with 130 Ω → 25.37 mA / 16.15 mA
    d = led_drive(VS, VF, N, r_series=130.0, rds_on=RDS, dvf=0.2)
    assert d.i_peak_at_vf_min == pytest.approx(25.37e-3, abs=5e-6)
    assert d.i_peak_at_vf_max == pytest.approx(16.15e-3, abs=5e-6)
    # relative to the nominal 20.761 mA: ± n·dvf/headroom = ±0.6/2.7 = ±22.2 % exactly
    # (±23 % when taken relative to the 20 mA target instead)
    assert d.current_spread_plus == pytest.approx(0.6 / 2.7, rel=1e-12)
    assert d.current_spread_minus == pytest.approx(-0.6 / 2.7, rel=1e-12)
    assert any("Small headroom" in c for c in d.cautions)


def test_led_drive_currents_and_energy_balance():
    # common practice: I_avg = D·I_pk, I_rms = √D·I_pk; conservation of energy (independent check):
    # supply power = LEDs + resistors + switch
    d = led_drive(24.0, 2.0, 6, n_parallel=4, r_series=220.0, duty=0.3, rds_on=0.4, v_switch=0.05)
    assert d.i_avg == pytest.approx(0.3 * d.i_peak) and d.i_rms == pytest.approx(math.sqrt(0.3) * d.i_peak)
    assert d.i_peak_total == pytest.approx(4 * d.i_peak) and d.i_rms_total == pytest.approx(4 * d.i_rms)
    assert d.p_supply_avg == pytest.approx(d.p_leds_total_avg + 4 * d.p_resistor_avg + d.p_switch_avg, rel=1e-12)
    assert d.efficiency == pytest.approx(12.0 / 24.0)
    assert d.headroom == pytest.approx(24.0 - 12.0 - 0.05)


def test_parallel_strings_share_switch_nodal_analysis():
    # independent route: nodal analysis of p strings into one switch node, solved with numpy.
    # Unknowns: string currents i_k and drain voltage v_d; i_k·R = Vs − n·Vf − v_d, v_d = R_ds·Σ i_k + V_sw
    vs, vf, n, p, r, rds, vsw = 12.0, 2.0, 4, 5, 47.0, 0.8, 0.1
    a = np.zeros((p + 1, p + 1))
    b = np.zeros(p + 1)
    for k in range(p):
        a[k, k] = r
        a[k, p] = 1.0
        b[k] = vs - n * vf
    a[p, :p] = -rds
    a[p, p] = 1.0
    b[p] = vsw
    sol = np.linalg.solve(a, b)
    assert led_current(vs, vf, n, r, rds_on=rds, n_parallel=p, v_switch=vsw) == pytest.approx(sol[0], rel=1e-12)
    d = led_drive(vs, vf, n, p, r_series=r, rds_on=rds, v_switch=vsw)
    assert d.i_peak_total == pytest.approx(sol[:p].sum(), rel=1e-12)


def test_led_resistor_and_current_are_inverse():
    # with p strings and R_DS(on), the design formula and the analysis formula must agree
    i = 0.035
    r = led_drive(12.0, 2.1, 4, n_parallel=3, i_peak=i, rds_on=0.3).r_series
    assert led_current(12.0, 2.1, 4, r, rds_on=0.3, n_parallel=3) == pytest.approx(i, rel=1e-12)
    assert r == pytest.approx(led_resistor(12.0, 2.1, 4, i, v_switch=3 * i * 0.3), rel=1e-12)


def test_led_resistor_vector_equals_scalar():
    vs = np.array([9.0, 12.0, 15.0, 24.0])
    i = np.array([[0.01], [0.02]])
    grid = led_resistor(vs, 2.0, 3, i, v_switch=0.1)
    assert grid.shape == (2, 4)
    for a in range(2):
        for b in range(4):
            assert grid[a, b] == led_resistor(float(vs[b]), 2.0, 3, float(i[a, 0]), 0.1)
    assert isinstance(led_resistor(12.0, 2.0, 3, 0.02), float)
    np.testing.assert_allclose(led_current(12.0, 2.0, 3, [100.0, 200.0]), [0.06, 0.03])
    assert led_resistor("12", "3.1", 3, "20m") == pytest.approx(135.0)  # engineering text accepted


# ---------------------------------------------------------------------------------------------
# impossible strings and bad input


def test_led_resistor_supply_too_low_names_the_numbers():
    # the contract's example message: 12 V − 4 × 3.1 V − 0.05 V = −0.45 V
    msg = "12 V supply − 4 × 3.1 V − 0.05 V = −0.45 V leaves nothing for the resistor"
    with pytest.raises(DesignError, match=re.escape(msg)):
        led_resistor(12.0, 3.1, 4, 0.02, v_switch=0.05)
    with pytest.raises(DesignError, match=re.escape("5 V supply − 2 × 2.5 V = 0 V leaves nothing")):
        led_resistor(5.0, 2.5, 2, 0.02)
    with pytest.raises(DesignError, match=re.escape("9 V supply − 3 × 3.2 V = −0.6 V")):
        led_resistor([12.0, 9.0], 3.2, 3, 0.02)  # the failing element is reported
    with pytest.raises(DesignError, match="leaves nothing for the resistor"):
        led_drive(12.0, 3.1, 4, i_peak=0.02)


@pytest.mark.parametrize(("kwargs", "pattern"), [
    ({"vsupply": 0.0}, r"vsupply: 0 V is out of range; allowed vsupply > 0 V"),
    ({"vf": -1.0}, r"vf \(forward voltage per LED\): -1 V is out of range"),
    ({"n_series": 2.5}, r"n_series: 2.5 is not allowed; give a whole number"),
    ({"n_series": 0}, r"n_series: 0 is out of range"),
    ({"i_peak": 0.0}, r"i_peak: 0 A is out of range"),
    ({"v_switch": -0.1}, r"v_switch: -0.1 V is out of range"),
    ({"vsupply": "12 volts please"}, r"vsupply"),
])
def test_led_resistor_bad_input(kwargs, pattern):
    args = {"vsupply": 12.0, "vf": 3.1, "n_series": 3, "i_peak": 0.02} | kwargs
    with pytest.raises(DesignError, match=pattern):
        led_resistor(**args)


@pytest.mark.parametrize(("kwargs", "pattern"), [
    ({}, r"give exactly one of r_series .* or i_peak"),
    ({"r_series": 100.0, "i_peak": 0.02}, r"give exactly one of r_series"),
    ({"i_peak": 0.02, "dvf": 3.1}, r"dvf 3.1 V must be smaller than vf 3.1 V"),
    ({"i_peak": 0.02, "rounding": "ceil"}, r"rounding: 'ceil' is not known"),
    ({"i_peak": 0.02, "rating_basis": "peak"}, r"rating_basis: 'peak' is not known"),
    ({"i_peak": 0.02, "duty": [0.2, 0.5]}, r"duty: led_drive analyses one design point"),
    ({"i_peak": 0.02, "series": "E7"}, r"E7"),
    ({"i_peak": 5.0, "rds_on": 1.0}, r"i_peak 5000 mA cannot be reached: headroom 2.7 V .* at most 2700 mA"),
    ({"r_series": -5.0}, r"r_series: -5 Ω is out of range"),
])
def test_led_drive_bad_input(kwargs, pattern):
    with pytest.raises(DesignError, match=pattern):
        led_drive(12.0, 3.1, 3, **kwargs)


# ---------------------------------------------------------------------------------------------
# resistor rating and derating


def test_resistor_derating_iec60115_shape():
    # IEC 60115-1 generic derating: full power to the rated ambient, linear to zero at the upper
    # category temperature; corners 70 °C / 155 °C typical thick film (common practice)
    assert resistor_derating(-40.0) == 1.0 and resistor_derating(70.0) == 1.0
    assert resistor_derating(112.5) == pytest.approx(0.5)  # midway (hand calculation)
    assert resistor_derating(155.0) == 0.0 and resistor_derating(200.0) == 0.0
    assert resistor_derating(97.5, t_max_c=125.0) == pytest.approx(0.5)  # 125 °C parts
    np.testing.assert_allclose(resistor_derating([25.0, 112.5, 155.0]), [1.0, 0.5, 0.0])
    with pytest.raises(DesignError, match=r"t_rated_c 160.0 °C must be a single number below t_max_c 155.0 °C"):
        resistor_derating(25.0, t_rated_c=160.0)
    with pytest.raises(DesignError, match=r"t_ambient_c: -300 °C is out of range"):
        resistor_derating(-300.0)


def test_resistor_power_rating_two_times_margin():
    # common practice: dissipate ≤ 50 % of the rating; ratings 1/16 … 2 W
    assert RESISTOR_RATINGS == (1 / 16, 0.1, 0.125, 0.25, 0.5, 1.0, 2.0)
    assert resistor_power_rating(0.0) == 1 / 16
    assert resistor_power_rating(0.05) == 0.1  # exactly half of 0.1 W is allowed
    assert resistor_power_rating(0.0501) == 0.125
    assert resistor_power_rating(1.0) == 2.0
    assert resistor_power_rating(1.01) is None
    assert resistor_power_rating(0.09, margin=1.0) == 0.1
    # derated at 100 °C: k = 55/85 → 56 mW needs ≥ 173 mW → 1/4 W (hand calculation)
    assert resistor_power_rating(0.056, t_ambient_c=100.0) == 0.25
    assert resistor_power_rating(0.001, t_ambient_c=155.0) is None
    with pytest.raises(DesignError, match=r"margin: 0 is out of range"):
        resistor_power_rating(0.1, margin=0.0)


def test_led_drive_cautions_for_power_leds():
    # a 1 W-class string: hot resistor, no common rating, bright LEDs → the usual cautions
    d = led_drive(24.0, 3.0, 3, i_peak=0.7)
    assert d.resistor_rating is None
    assert LED_EYE_SAFETY_NOTE in d.cautions and RESISTOR_HOT_NOTE in d.cautions
    assert any("No common rating" in c for c in d.cautions)
    assert "IEC 62471" in LED_EYE_SAFETY_NOTE
    html = d._repr_html_()
    assert "none fits" in html and "IEC 62471" in html and "<table>" in html
    # average-basis rating is smaller at low duty (PWM average governs above ~100 Hz)
    lo = led_drive(12.0, 3.1, 3, i_peak=0.05, duty=0.1, rating_basis="average")
    hi = led_drive(12.0, 3.1, 3, i_peak=0.05, duty=0.1)
    assert lo.resistor_rating < hi.resistor_rating


# ---------------------------------------------------------------------------------------------
# V_F data


def _photon_voltage(wavelength: float) -> float:
    """h·c/(q·λ) from scipy.constants (CODATA / SI 2019 exact values) — the V_F floor."""
    from scipy import constants as c

    return c.h * c.c / (c.e * wavelength)


def test_photon_voltage_floor_values():
    # series-resistor law, common practice (regression pin): hc/(qλ) = 1239.84/λ[nm] V → 940 nm 1.32 V … 465 nm 2.67 V, recomputed
    for nm, printed in ((940, 1.32), (630, 1.97), (590, 2.10), (525, 2.36), (465, 2.67)):
        assert _photon_voltage(nm * 1e-9) == pytest.approx(printed, abs=5e-3)
        assert _photon_voltage(nm * 1e-9) == pytest.approx(1239.84 / nm, rel=1e-5)


def test_typical_vf_table():
    # common practice / from memory (series-resistor law, common practice): the colours asked for, ordered min ≤ typ ≤ max,
    # and V_F ≳ hc/(qλ) (Schubert, Light-Emitting Diodes 2nd ed. ch. 4, from memory)
    for colour in ("red", "amber", "yellow", "green", "blue", "white", "IR", "UV"):
        assert colour in TYPICAL_VF
    for colour, v in TYPICAL_VF.items():
        assert v.min <= v.typ <= v.max, colour
        assert "from memory" in v.origin and "common practice" in v.origin
        assert v.typ >= _photon_voltage(v.wavelength) - 0.15, colour
    with pytest.raises(TypeError):
        TYPICAL_VF["red"] = TYPICAL_VF["blue"]  # read-only table


def test_led_string_description():
    s = LedString.typical("white", 3, n_parallel=2)
    assert s.vf == TYPICAL_VF["white"].typ and s.v_string == pytest.approx(3 * s.vf) and s.colour == "white"
    d = s.drive(12.0, i_peak=0.02)
    assert isinstance(d, LedDrive) and d.n_parallel == 2 and d.i_peak_total == pytest.approx(0.04)
    assert LedString(2, "2.0").vf == 2.0
    with pytest.raises(DesignError, match=r"colour: 'purple' is not in the table"):
        LedString.typical("purple", 3)
    with pytest.raises(DesignError, match=r"n_series: 1.5 is not allowed"):
        LedString(1.5, 3.0)
    with pytest.raises(DesignError, match=r"vf \(forward voltage per LED\): 0 V is out of range"):
        LedString(3, 0.0)


def test_led_drive_repr():
    d = led_drive(VS, VF, N, i_peak=I_SET, rds_on=RDS, duty=0.5)
    text = repr(d)
    assert "R=134.95 Ω" in text and "E24 130 Ω → 20.76 mA" in text and "rating 0.125 W" in text
    assert "20.76 mA" in d._repr_html_() and "130 Ω" in d._repr_html_()


# ---------------------------------------------------------------------------------------------
# properties


@reaching()
@FAST
@given(mostly(st.tuples(st.floats(12.0, 48.0), st.floats(1.6, 3.4), st.integers(1, 3), st.floats(1e-3, 1.0),
                        st.floats(0.0, 0.5)),
              st.tuples(st.floats(-1e6, 1e6), st.floats(-10, 10), st.integers(-2, 50), st.floats(-1.0, 10.0),
                        st.floats(-1, 5))))
def test_led_resistor_wide_inputs_finite_or_design_error(case):
    vs, vf, n, i, vsw = case
    # property (STYLE.md): finite positive resistance or DesignError, never NaN
    try:
        r = led_resistor(vs, vf, n, i, vsw)
    except DesignError:
        return
    reached()
    assert math.isfinite(r) and r > 0.0


@reaching()
@FAST
@given(mostly(st.tuples(st.floats(12.0, 48.0), st.floats(1.6, 3.4), st.integers(1, 3), st.integers(1, 20),
                        st.floats(1e-3, 0.5), st.floats(0.0, 1.0), st.floats(0.0, 0.2), st.floats(-40.0, 85.0)),
              st.tuples(st.floats(0.5, 1000.0), st.floats(0.5, 5.0), st.integers(1, 20), st.integers(1, 20),
                        st.floats(1e-4, 5.0), st.floats(0.0, 1.0), st.floats(0.0, 2.0), st.floats(-40.0, 200.0))))
def test_led_drive_wide_inputs_finite_or_design_error(case):
    vs, vf, n, p, i, duty, rds, t = case
    try:
        d = led_drive(vs, vf, n, p, i_peak=i, duty=duty, rds_on=rds, t_ambient_c=t, dvf=0.1)
    except DesignError:
        return
    reached()
    for name, value in vars(d).items():
        if isinstance(value, float):
            assert math.isfinite(value), name
    assert d.resistor_rating is None or d.resistor_rating in RESISTOR_RATINGS
    assert d.i_peak_at_vf_max <= d.i_peak <= d.i_peak_at_vf_min
    assert d.i_peak_at_vf_max >= 0.0


@reaching()
@FAST
@given(mostly(st.tuples(st.floats(1e-3, 10.0), st.integers(1, 10), st.floats(1e-3, 1e100), st.floats(0.0, 1.0),
                        st.floats(0.0, 1e6), st.floats(1.5, 1e100)).map(
                            lambda t: (t[0] * t[1] * t[5], t[0], t[1], t[2], t[3], t[4])),
              st.tuples(WIDE, st.floats(1e-3, 10.0), st.integers(1, 10), WIDE, st.floats(0.0, 1.0), st.floats(0.0, 1e6))))
def test_led_drive_extreme_magnitudes_finite_or_design_error(case):
    # valid branch: the supply a factor 1.5 … 1e100 above the string voltage, resistances up to 1e100 Ω
    vs, vf, n, r, duty, rds = case
    # property (STYLE.md): even absurd magnitudes give finite figures or a DesignError, never NaN/inf
    try:
        d = led_drive(vs, vf, n, r_series=r, duty=duty, rds_on=rds, dvf=vf / 2)
    except DesignError:
        return
    reached()
    assert all(math.isfinite(x) for x in vars(d).values() if isinstance(x, float))
