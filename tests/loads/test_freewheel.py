"""Tests for the freewheel diode (pwmkit.loads.diode) and the diode families (pwmkit.parts.diodes).

Outside references:
- diode loss V_F0·I_avg + r_d·I_rms² (common practice); first-order RL decay of the clamp (Alexander &
  Sadiku, *Fundamentals of Electric Circuits*, 6th ed., ch. 7); check values computed from these formulas
  (V_F table, Lambert-W check, temperature coefficient) are regression pins;
- Sze & Ng, *Physics of Semiconductor Devices*, 3rd ed., ch. 2; Antognetti & Massobrio, *Semiconductor
  Device Modeling with SPICE*, 2nd ed., ch. 1 (diode equation, I_S(T) law) — from memory;
- scipy.special.lambertw, scipy.integrate.solve_ivp / quad as independent numerical oracles;
- rating rules of thumb 1.5–2× V_RRM and I_F(AV) (common practice).
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from reach import mostly, reached, reaching
from scipy.integrate import quad, solve_ivp
from scipy.special import lambertw

from pwmkit.errors import DesignError
from pwmkit.loads.diode import ClampDecay, FreewheelDiode, clamp_decay, conduction_loss, freewheel_diode
from pwmkit.loads.motor import motor_current
from pwmkit.parts.diodes import (
    DIODES,
    FAST_RECOVERY_1A,
    SCHOTTKY_1A,
    SMALL_SCHOTTKY,
    SMALL_SIGNAL_SILICON,
    DiodeFamily,
    get_diode,
    lambertw_log,
    thermal_voltage,
)

# ---------------------------------------------------------------------------------------------------
# Shockley model (Shockley law with series resistance: Sze & Ng, Physics of Semiconductor Devices, 3rd ed., ch. 2, from memory)
# ---------------------------------------------------------------------------------------------------

VT25 = 1.380649e-23 * 298.15 / 1.602176634e-19  # kT/q at 25 °C, SI 2019 exact constants


def test_thermal_voltage_references_10():
    # Shockley law with series resistance: Sze & Ng, Physics of Semiconductor Devices, 3rd ed., ch. 2, from memory: V_T = kT/q = 25.693 mV at 25 °C, 25.852 mV at 300 K (CODATA exact k and q)
    assert thermal_voltage(25.0) == pytest.approx(25.693e-3, abs=0.5e-6)
    assert thermal_voltage(300.0 - 273.15) == pytest.approx(25.852e-3, abs=0.5e-6)


@pytest.mark.parametrize(
    ("family", "points"),
    [
        # Shockley law with series resistance: Sze & Ng, Physics of Semiconductor Devices, 3rd ed., ch. 2, from memory (regression pin) computed V_F at 25 °C from published diode-model parameters (generic)
        (SMALL_SIGNAL_SILICON, [(0.1e-3, 0.4918), (0.5e-3, 0.5709), (1e-3, 0.6052), (10e-3, 0.7237),
                                (100e-3, 0.8946)]),
        (SMALL_SCHOTTKY, [(1e-3, 0.2475), (10e-3, 0.3135), (100e-3, 0.4355)]),
        (SCHOTTKY_1A, [(1e-3, 0.1342), (10e-3, 0.1973), (100e-3, 0.2763)]),
    ],
)
def test_forward_voltage_table_references_10(family, points):
    for i, v in points:
        # independent plain evaluation of V = n·V_T·ln(I/I_S + 1) + I·R_S
        plain = family.n * VT25 * math.log(i / family.i_s + 1) + i * family.r_s
        assert family.vf(i) == pytest.approx(plain, rel=1e-7)
        assert family.vf(i) == pytest.approx(v, abs=5e-5)  # §10 table, printed to 0.1 mV


def test_schottky_1a_at_1a():
    # regression pin: the Shockley law with series resistance gives 0.5124 V @ 1 A for this model
    # (n·V_T·ln(1/6.678 µA + 1) = 0.3184 V, + 1 A·0.194 Ω) — we check our recomputation, to 0.1 mV
    plain = 1.04 * VT25 * math.log(1 / 6.678e-6 + 1) + 0.194
    assert SCHOTTKY_1A.vf(1.0) == pytest.approx(plain, abs=1e-7)
    assert SCHOTTKY_1A.vf(1.0) == pytest.approx(0.5124, abs=5e-5)


def test_lambert_w_check_references_10():
    # Shockley law with series resistance: Sze & Ng, Physics of Semiconductor Devices, 3rd ed., ch. 2, from memory (regression pin): small-signal switching diode at 0.700 V → 6.4526 mA, back-substitution 0.700000 V
    i = SMALL_SIGNAL_SILICON.current(0.7)
    assert i == pytest.approx(6.4526e-3, abs=0.5e-7)
    assert SMALL_SIGNAL_SILICON.vf(i) == pytest.approx(0.700000, abs=5e-7)


def test_current_matches_scipy_lambertw_and_back_substitution():
    # independent oracle: scipy.special.lambertw in the §10 explicit form (only where its argument fits a float)
    for fam in DIODES.values():
        v = np.linspace(-2.0, 1.2, 81)
        i = fam.current(v)
        nvt = fam.n * VT25
        arg = fam.i_s * fam.r_s / nvt * np.exp((v + fam.i_s * fam.r_s) / nvt)
        ok = np.isfinite(arg)
        ref = nvt / fam.r_s * lambertw(arg[ok]).real - fam.i_s
        assert np.allclose(i[ok], ref, rtol=1e-9, atol=1e-15)
        fwd = i > 0
        assert np.allclose(fam.vf(i[fwd]), v[fwd], atol=1e-9)  # back-substitution
        assert np.all(i >= -fam.i_s * (1 + 1e-12))  # reverse current saturates at -I_S
    # far beyond a float-sized Lambert-W argument: still finite and consistent
    i_big = SMALL_SCHOTTKY.current(50.0)
    assert math.isfinite(i_big) and SMALL_SCHOTTKY.vf(i_big) == pytest.approx(50.0, rel=1e-12)


def test_lambertw_log_identity():
    # definition: w·e^w = x ⇔ w + ln w = ln x (Corless et al. 1996)
    lx = np.array([-700.0, -30.0, -1.0, 0.0, 1.0, 5.0, 100.0, 1e4, 1e300])
    w = lambertw_log(lx)
    assert np.allclose(w + np.log(w), lx, rtol=1e-14, atol=1e-13)
    assert lambertw_log(np.array([1.0]))[0] == pytest.approx(float(lambertw(math.e).real), rel=1e-15)  # W(e) = 1


def test_temperature_coefficient_references_10():
    # Shockley law with series resistance: Sze & Ng, Physics of Semiconductor Devices, 3rd ed., ch. 2, from memory (regression pin): dV_F/dT = (V_F - E_g - XTI·V_T)/T: Si (1.11 eV, XTI 3) at 0.65 V → -1.80 mV/K,
    # at 0.55 V → -2.14 mV/K; Schottky (0.69 eV, XTI 2) at 0.30 V → -1.48 mV/K
    for fam, v_j, ref in [(SMALL_SIGNAL_SILICON, 0.65, -1.80e-3), (SMALL_SIGNAL_SILICON, 0.55, -2.14e-3),
                          (SMALL_SCHOTTKY, 0.30, -1.48e-3)]:
        i = fam.i_s * math.expm1(v_j / (fam.n * VT25))  # current where the junction part is v_j
        assert fam.vf_tempco(i) == pytest.approx(ref, abs=0.005e-3)
        # independent route: numerical derivative of the model's V_F(T) at constant current (I_S(T) law)
        num = (fam.vf(i, 25.01) - fam.vf(i, 24.99)) / 0.02
        assert num == pytest.approx(fam.vf_tempco(i), rel=2e-3)
    # the "≈ -2 mV/°C for silicon" rule of thumb (common practice)
    assert -2.5e-3 < SMALL_SIGNAL_SILICON.vf_tempco(10e-3) < -1.5e-3


def test_saturation_current_law():
    # I_S(T) = I_S·(T/Tn)^(XTI/n)·exp(Eg/(n·V_T)·(T/Tn - 1)) (Antognetti & Massobrio ch. 1, from memory)
    fam = SMALL_SIGNAL_SILICON
    t, tn = 100.0 + 273.15, 298.15
    vt = 1.380649e-23 * t / 1.602176634e-19
    ref = fam.i_s * (t / tn) ** (fam.xti / fam.n) * math.exp(fam.eg / (fam.n * vt) * (t / tn - 1))
    assert fam.saturation_current(100.0) == pytest.approx(ref, rel=1e-12)
    assert fam.saturation_current(25.0) == pytest.approx(fam.i_s, rel=1e-15)


def test_linearised_tangent():
    v0, rd = SCHOTTKY_1A.linearised(0.5)
    assert v0 + rd * 0.5 == pytest.approx(SCHOTTKY_1A.vf(0.5), rel=1e-12)
    num = (SCHOTTKY_1A.vf(0.5 + 1e-6) - SCHOTTKY_1A.vf(0.5 - 1e-6)) / 2e-6
    assert rd == pytest.approx(num, rel=1e-6)


def test_vector_equals_scalar_diode_model():
    i = np.array([1e-4, 1e-2, 0.3])
    t = np.array([-20.0, 25.0, 100.0])
    vec = SMALL_SCHOTTKY.vf(i, t)
    back = SMALL_SCHOTTKY.current(vec, t)
    for k in range(3):
        assert SMALL_SCHOTTKY.vf(float(i[k]), float(t[k])) == pytest.approx(vec[k], rel=1e-15)
        assert SMALL_SCHOTTKY.current(float(vec[k]), float(t[k])) == pytest.approx(back[k], rel=1e-14)
    assert np.allclose(back, i, rtol=1e-10)


def test_zero_series_resistance_diode():
    ideal = DiodeFamily("ideal", "pn-signal", i_s=1e-14, n=1.0, r_s=0.0)
    assert ideal.current(0.6) == pytest.approx(1e-14 * math.expm1(0.6 / VT25), rel=1e-7)
    with pytest.raises(DesignError, match="overflowing"):
        ideal.current(100.0)


def test_family_registry_and_validation():
    assert set(DIODES) == {"small-signal-silicon", "small-schottky", "schottky-1a", "fast-recovery-1a"}
    assert get_diode("Fast Recovery 1A") is FAST_RECOVERY_1A and get_diode(SCHOTTKY_1A) is SCHOTTKY_1A
    with pytest.raises(DesignError, match="not a known diode family; choose one of small-signal-silicon"):
        get_diode("1N-whatever")
    with pytest.raises(DesignError, match="kind: 'zener' is not allowed"):
        DiodeFamily("z", "zener", i_s=1e-9, n=1.0, r_s=1.0)  # type: ignore[arg-type]
    with pytest.raises(DesignError, match="i_s: 0 A is out of range"):
        DiodeFamily("z", "schottky", i_s=0.0, n=1.0, r_s=1.0)
    with pytest.raises(DesignError, match="origin"):
        DiodeFamily("z", "schottky", i_s=1e-9, n=1.0, r_s=1.0, origin={"n": "guess"})
    for fam in DIODES.values():
        assert set(fam.origin.values()) <= {"datasheet-generic", "common-practice", "from-memory", "demo"}
    # diode loss V_F0·I_avg + r_d·I_rms², common practice (typical published datasheet value, generic): small-signal switching diode t_rr ≈ 4 ns
    assert SMALL_SIGNAL_SILICON.t_rr == 4e-9 and SMALL_SIGNAL_SILICON.i_f_avg == pytest.approx(0.2)
    # fast-recovery class V_F ≈ 0.8–1.3 V at rated current (diode loss V_F0·I_avg + r_d·I_rms², common practice, from memory)
    assert 0.8 <= FAST_RECOVERY_1A.vf(1.0) <= 1.3
    assert "schottky-1a" in repr(SCHOTTKY_1A) and "[datasheet-generic]" in SCHOTTKY_1A._repr_html_()


# ---------------------------------------------------------------------------------------------------
# freewheel diode loss and ratings (diode loss V_F0·I_avg + r_d·I_rms², common practice)
# ---------------------------------------------------------------------------------------------------


def test_conduction_loss_references_8_2():
    # diode loss V_F0·I_avg + r_d·I_rms², common practice (regression pin): I_D,avg 0.4498 A, I_D,rms 0.8215 A, V_F0 0.45 V, r_d 50 mΩ → 236.2 mW
    assert conduction_loss(0.45, 0.05, 0.4498, 0.8215) == pytest.approx(236.2e-3, abs=0.05e-3)
    # same through freewheel_diode with the straight-line override (PN part without recovery, no heating)
    pn = DiodeFamily("pn-test", "fast-recovery", i_s=2e-9, n=1.9, r_s=0.1, q_rr=0.0, i_r=0.0)
    fd = freewheel_diode(pn, 0.4498, 0.8215, 1.7, 12.0, 20e3, v_f0=0.45, r_d=0.05, r_theta=0.0)
    assert fd.p_total == pytest.approx(236.2e-3, abs=0.05e-3)
    assert fd.tj_c == pytest.approx(25.0)
    # with the motor currents of §6.2 (Vf = 0.5 V) computed by motor_current
    mc = motor_current(12.0, 6.0, 1.5, 1e-3, 0.7, 20e3, vf=0.5)
    assert conduction_loss(0.45, 0.05, mc.i_diode_avg, mc.i_diode_rms) == pytest.approx(236.2e-3, abs=0.05e-3)


def test_recovery_loss_references_8_2():
    # diode loss V_F0·I_avg + r_d·I_rms², common practice (regression pin): a PN diode with Q_rr = 50 nC at 12 V, 20 kHz adds 12.0 mW
    pn = DiodeFamily("pn-qrr", "fast-recovery", i_s=2e-9, n=1.9, r_s=0.1, q_rr=50e-9, t_rr=100e-9)
    fd = freewheel_diode(pn, 0.45, 0.82, 1.7, 12.0, 20e3)
    assert fd.p_recovery == pytest.approx(12.0e-3, abs=0.05e-3)
    # a Schottky has no recovery term, only junction-capacitance charge ½·C_j·V²·f (diode loss V_F0·I_avg + r_d·I_rms², common practice, from memory)
    sch = freewheel_diode(SCHOTTKY_1A, 0.45, 0.82, 1.7, 12.0, 20e3)
    assert sch.p_recovery == 0.0
    assert sch.p_capacitive == pytest.approx(0.5 * 110e-12 * 144 * 20e3, rel=1e-12)


def test_tangent_model_brackets_exact_waveform_average():
    # the tangent at I_op = I_rms²/I_avg over-estimates the loss of a varying current (concave V_F),
    # by little: compare with the exact period average of v_F(i)·i over the diode waveform (scipy quad)
    mc = motor_current(12.0, 6.0, 1.5, 1e-3, 0.6, 500.0, vf=0.45)  # DCM, large ripple
    tau = 1e-3 / 1.5
    i_pk = mc.i_max

    def i_of_t(t):
        return -(6.0 + 0.45) / 1.5 + (i_pk + (6.0 + 0.45) / 1.5) * math.exp(-t / tau)

    exact = quad(lambda t: SCHOTTKY_1A.vf(i_of_t(t)) * i_of_t(t), 0.0, mc.t_diode, epsabs=1e-12)[0] * 500.0
    fd = freewheel_diode(SCHOTTKY_1A, mc.i_diode_avg, mc.i_diode_rms, i_pk, 12.0, 500.0, r_theta=0.0)
    assert exact <= fd.p_conduction <= exact * 1.15


def test_rating_verdicts_common_practice():
    # rules of thumb (common practice): V_RRM ≥ 1.5–2× supply, I_F(AV) ≥ 1.5–2× worst-case average
    mc = motor_current(12.0, 6.0, 1.5, 1e-3, 0.7, 20e3, vf=0.5)
    good = freewheel_diode(SCHOTTKY_1A, mc.i_diode_avg, mc.i_diode_rms, 8.0, 12.0, 20e3, 40.0, duty=0.7)
    assert good.ok and good.voltage_ok and good.current_ok and good.surge_ok and not good.notes
    assert good.voltage_ratio == pytest.approx(40.0 / 12.0)
    assert good.current_ratio == pytest.approx(1.0 / mc.i_diode_avg)
    small = freewheel_diode(SMALL_SIGNAL_SILICON, mc.i_diode_avg, mc.i_diode_rms, 8.0, 12.0, 20e3, 40.0)
    assert not small.ok and not small.current_ok and not small.surge_ok
    assert any("I_F(AV)" in n for n in small.notes)
    high_v = freewheel_diode(SCHOTTKY_1A, 0.3, 0.5, 2.0, 30.0, 20e3)
    assert not high_v.voltage_ok and any("V_RRM" in n for n in high_v.notes)
    slow = freewheel_diode(FAST_RECOVERY_1A, 0.3, 0.5, 2.0, 12.0, 100e3)  # t_rr·f = 2 % of the period
    assert not slow.recovery_ok and any("recovery" in n for n in slow.notes)
    assert freewheel_diode(FAST_RECOVERY_1A, 0.3, 0.5, 2.0, 12.0, 20e3).recovery_ok


def test_hot_schottky_leakage_runaway_reported_without_number():
    # Schottky leakage roughly doubles every 10 K (diode loss V_F0·I_avg + r_d·I_rms², common practice, from memory): hot + poor cooling runs away
    fd = freewheel_diode(SCHOTTKY_1A, 0.5, 0.8, 1.7, 38.0, 20e3, 100.0, duty=0.9, r_theta=150.0)
    assert fd.runaway is True and fd.tj_c is None and fd.p_total is None and not fd.ok
    assert any("runaway" in n for n in fd.notes)
    cool = freewheel_diode(SCHOTTKY_1A, 0.5, 0.8, 1.7, 38.0, 20e3, 25.0, duty=0.9, r_theta=60.0)
    assert not cool.runaway and cool.p_leakage > 0.0


def test_vector_equals_scalar_freewheel():
    ia = np.array([0.05, 0.2, 0.5])
    ir = ia * 1.6
    vec = freewheel_diode(SMALL_SCHOTTKY, ia, ir, 0.5, 12.0, 20e3, np.array([25.0, 40.0, 60.0]), duty=0.5)
    for k in range(3):
        one = freewheel_diode(SMALL_SCHOTTKY, float(ia[k]), float(ir[k]), 0.5, 12.0, 20e3, [25.0, 40.0, 60.0][k],
                              duty=0.5)
        assert one.runaway == bool(vec.runaway[k])
        if not one.runaway:
            assert one.tj_c == pytest.approx(float(vec.tj_c[k]), abs=1e-9)
            assert one.p_total == pytest.approx(float(vec.p_total[k]), rel=1e-9)
        assert one.ok == bool(vec.ok[k])


def test_freewheel_bad_inputs():
    with pytest.raises(DesignError, match="i_rms: 0.1 A is below i_avg"):
        freewheel_diode(SCHOTTKY_1A, 0.2, 0.1, 1.0, 12.0, 20e3)
    with pytest.raises(DesignError, match="give both straight-line parameters or neither"):
        freewheel_diode(SCHOTTKY_1A, 0.2, 0.3, 1.0, 12.0, 20e3, v_f0=0.4)
    with pytest.raises(DesignError, match="i_avg: 0 A with i_rms > 0 A is impossible"):
        freewheel_diode(SCHOTTKY_1A, 0.0, 0.3, 1.0, 12.0, 20e3)
    with pytest.raises(DesignError, match="v_reverse: 0 V is out of range"):
        freewheel_diode(SCHOTTKY_1A, 0.2, 0.3, 1.0, 0.0, 20e3)


@reaching()
@settings(max_examples=60, deadline=None)
@given(case=mostly(
    st.tuples(st.floats(1e-3, 2.0), st.floats(1.0, 3.0), st.floats(1.0, 30.0), st.floats(10.0, 2e5),
              st.floats(-40.0, 85.0), st.sampled_from(sorted(DIODES))),
    st.tuples(st.floats(-0.1, 20.0), st.floats(0.5, 5.0), st.floats(-1.0, 500.0), st.floats(-1.0, 1e6),
              st.floats(-80.0, 250.0), st.sampled_from(sorted(DIODES)))))
def test_property_freewheel_finite_or_error(case):
    ia, ratio, vr, f, ta, name = case
    # property (style guide): finite results, runaway with no number, or DesignError — never NaN
    try:
        fd = freewheel_diode(name, ia, ia * ratio, ia * ratio * 2, vr, f, ta)
    except DesignError:
        return
    reached()
    assert isinstance(fd, FreewheelDiode)
    if fd.runaway:
        assert fd.tj_c is None
    else:
        assert math.isfinite(fd.tj_c) and math.isfinite(fd.p_total) and fd.p_total >= 0.0
    assert math.isfinite(fd.voltage_ratio) and math.isfinite(fd.current_ratio)


# ---------------------------------------------------------------------------------------------------
# clamp decay (first-order RL decay: Alexander & Sadiku, Fundamentals of Electric Circuits, 6th ed., ch. 7)
# ---------------------------------------------------------------------------------------------------


def test_clamp_decay_relay_coil_references_8_3():
    # first-order RL decay: Alexander & Sadiku, Fundamentals of Electric Circuits, 6th ed., ch. 7 (regression pin) relay coil L 100 mH, R 100 Ω, I0 120 mA, E = 0
    plain = clamp_decay(0.1, 100.0, 0.12, 0.7)
    assert isinstance(plain, ClampDecay)
    assert plain.t_zero == pytest.approx(0.1 / 100 * math.log(1 + 100 * 0.12 / 0.7), rel=1e-14)
    assert plain.t_zero == pytest.approx(2.898e-3, abs=0.5e-6)  # §8.3: 2.898 ms
    assert plain.clamp_energy == pytest.approx(0.0698e-3, abs=0.05e-6)  # §8.3: 0.0698 mJ
    assert plain.stored_energy == pytest.approx(0.720e-3, abs=0.5e-6)  # §8.3: 0.720 mJ
    zener = clamp_decay(0.1, 100.0, 0.12, 24.7, v_supply=12.0)
    assert zener.t_zero == pytest.approx(0.396e-3, abs=0.5e-6)  # §8.3: 0.396 ms
    assert zener.clamp_energy == pytest.approx(0.548e-3, abs=0.5e-6)  # §8.3: 0.548 mJ
    assert zener.v_switch_peak == pytest.approx(36.7)  # §8.3: switch sees 36.7 V
    assert plain.v_switch_peak is None


def test_clamp_decay_motor_references_8_3():
    # first-order RL decay: Alexander & Sadiku, Fundamentals of Electric Circuits, 6th ed., ch. 7 (regression pin) motor L 1 mH, R 1.5 Ω, I0 1.6 A, V_F 0.7 V: stalled 992.1 µs, running (E 6 V) 204.1 µs
    assert clamp_decay(1e-3, 1.5, 1.6, 0.7).t_zero == pytest.approx(992.1e-6, abs=0.05e-6)
    assert clamp_decay(1e-3, 1.5, 1.6, 0.7, e=6.0).t_zero == pytest.approx(204.1e-6, abs=0.05e-6)


@pytest.mark.parametrize(("l", "r", "i0", "vc", "e"), [(0.1, 100.0, 0.12, 0.7, 0.0), (1e-3, 1.5, 1.6, 0.7, 6.0),
                                                        (5e-3, 0.2, 3.0, 15.7, 2.0)])
def test_clamp_decay_matches_solve_ivp_and_energy_balance(l, r, i0, vc, e):  # noqa: E741
    # independent oracle: scipy solve_ivp of L di/dt = -(R i + E + V_c) with a zero-current event
    def rhs(_t, y):
        di = -(r * y[0] + e + vc) / l
        return [di, y[0], r * y[0] ** 2]

    def zero(_t, y):
        return y[0]

    zero.terminal = True
    zero.direction = -1
    sol = solve_ivp(rhs, (0, 100 * l / r), [i0, 0.0, 0.0], events=zero, rtol=1e-11, atol=1e-15, method="DOP853")
    cd = clamp_decay(l, r, i0, vc, e)
    assert cd.t_zero == pytest.approx(sol.t_events[0][0], rel=1e-8)
    assert cd.charge == pytest.approx(sol.y_events[0][0][1], rel=1e-7)
    assert cd.resistive_energy == pytest.approx(sol.y_events[0][0][2], rel=1e-7)
    # energy balance: ½·L·I0² = resistive + clamp + back-EMF energy
    assert cd.stored_energy == pytest.approx(cd.resistive_energy + cd.clamp_energy + cd.emf_energy, rel=1e-10)


def test_clamp_decay_vector_and_errors():
    vec = clamp_decay(1e-3, 1.5, np.array([0.0, 1.6, 1e-9]), 0.7)
    assert vec.t_zero[0] == 0.0 and vec.charge[0] == 0.0
    assert vec.t_zero[1] == pytest.approx(clamp_decay(1e-3, 1.5, 1.6, 0.7).t_zero, rel=1e-15)
    assert vec.charge[2] == pytest.approx(1e-3 / 1.5 * 1e-9 / 2 * (1.5 * 1e-9 / 0.7), rel=1e-3)  # small-y limit ≈ τ·I0·y/2
    with pytest.raises(DesignError, match="never reaches zero"):
        clamp_decay(1e-3, 1.5, 1.6, 0.0)
    with pytest.raises(DesignError, match="l: 0 H is out of range"):
        clamp_decay(0.0, 1.5, 1.6, 0.7)
