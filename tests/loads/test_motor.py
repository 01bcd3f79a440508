"""Tests for pwmkit.loads.motor: steady-state chopper current, steady speed, start-up simulation.

Outside references:
- Mohan, Undeland & Robbins, Power Electronics, 3rd ed., ch. 7, from memory worked values ((regression pin) values, recomputed here with plain textbook formulas);
- scipy.integrate.solve_ivp as an independent numerical oracle of the switched ODE;
- Mohan/Undeland/Robbins, *Power Electronics*, 3rd ed., ch. 7 (buck converter: small-ripple ΔI and the
  CCM/DCM boundary I_LB = T_s·V_d·D(1-D)/(2L)) and ch. 13 (dc drives) — section numbers from memory.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from reach import mostly, reached, reaching
from scipy.integrate import solve_ivp
from scipy.optimize import brentq

from pwmkit.errors import DesignError
from pwmkit.loads.motor import (
    MotorCurrent,
    MotorParams,
    audible,
    electrical_time_constant,
    motor_current,
    simulate_startup,
    stall_current,
    steady_speed,
)

# ---------------------------------------------------------------------------------------------------
# independent plain implementations (Mohan, Undeland & Robbins, Power Electronics, 3rd ed., ch. 7, from memory formulas, straightforward math.exp)
# ---------------------------------------------------------------------------------------------------


def plain_ccm(v, e, r, l, f, d, vf=0.0):  # noqa: E741
    """Step-down chopper closed forms (Mohan, Undeland & Robbins, Power Electronics, 3rd ed., ch. 7, from memory), written plainly (no stabilisation)."""
    z = r / (l * f)
    a, b = math.exp(-d * z), math.exp(-(1 - d) * z)
    a_on, a_off = (v - e) / r, -(e + vf) / r
    i_max = (a_on * (1 - a) + a * (1 - b) * a_off) / (1 - a * b)
    i_min = (a_off * (1 - b) + b * (1 - a) * a_on) / (1 - a * b)
    return i_max, i_min


def plain_segment_integrals(a_inf, i0, t1, tau):
    """∫i dt and ∫i² dt of i = A + (I0 - A)e^{-t/τ} over 0…t1 (Mohan, Undeland & Robbins, Power Electronics, 3rd ed., ch. 7, from memory)."""
    c = i0 - a_inf
    s1 = a_inf * t1 + c * tau * (1 - math.exp(-t1 / tau))
    s2 = a_inf**2 * t1 + 2 * a_inf * c * tau * (1 - math.exp(-t1 / tau)) + c**2 * tau / 2 * (1 - math.exp(-2 * t1 / tau))
    return s1, s2


# ---------------------------------------------------------------------------------------------------
# scipy oracle of the switched ODE (one period, events at zero current)
# ---------------------------------------------------------------------------------------------------


def _ode_segment(v_seg, e, r, l, i0, t1):  # noqa: E741
    """Integrate L di/dt = v_seg - R i - E with ∫i, ∫i² as extra states; stop at i = 0."""
    if t1 <= 0.0:
        return i0, 0.0, 0.0, 0.0, i0

    def rhs(_t, y):
        return [(v_seg - r * y[0] - e) / l, y[0], y[0] * y[0]]

    def hit_zero(_t, y):
        return y[0]

    hit_zero.terminal = True
    hit_zero.direction = -1
    events = hit_zero if (v_seg - e) < 0.0 and i0 > 0.0 else None
    if i0 <= 0.0 and v_seg - e <= 0.0:
        return 0.0, 0.0, 0.0, 0.0, 0.0
    sol = solve_ivp(rhs, (0.0, t1), [i0, 0.0, 0.0], rtol=1e-11, atol=1e-14, method="DOP853", events=events)
    t_cond = sol.t[-1]
    i_end = 0.0 if t_cond < t1 * (1 - 1e-12) else sol.y[0, -1]
    return max(i_end, 0.0), sol.y[1, -1], sol.y[2, -1], t_cond, float(np.max(sol.y[0]))


def oracle_period(v, e, r, l, d, f, vf, i0):  # noqa: E741
    period = 1.0 / f
    i1, q_sw, q2_sw, _, pk_on = _ode_segment(v, e, r, l, i0, d * period)
    i2, q_d, q2_d, t_d, pk_off = _ode_segment(-vf, e, r, l, i1, (1 - d) * period)
    return {"i_end": i2, "q_sw": q_sw, "q2_sw": q2_sw, "q_d": q_d, "q2_d": q2_d, "t_d": t_d,
            "i_max": max(pk_on, pk_off, i0)}


def oracle_steady(v, e, r, l, d, f, vf):  # noqa: E741
    """Periodic orbit by shooting on the start current (brentq), then one period of integrals."""
    if oracle_period(v, e, r, l, d, f, vf, 0.0)["i_end"] <= 0.0:
        i_start = 0.0
    else:
        i_start = brentq(lambda x: oracle_period(v, e, r, l, d, f, vf, x)["i_end"] - x, 0.0, v / r,
                         xtol=1e-14, rtol=1e-13)
    res = oracle_period(v, e, r, l, d, f, vf, i_start)
    res["i_start"] = i_start
    return res


ORACLE_CASES = [
    # (v, e, r, l, duty, f, vf) — Mohan, Undeland & Robbins, Power Electronics, 3rd ed., ch. 7, from memory motor and variations in both modes
    (12.0, 6.0, 1.5, 1e-3, 0.7, 20e3, 0.0),     # CCM, §6.2 worked case
    (12.0, 6.0, 1.5, 1e-3, 0.7, 20e3, 0.5),     # CCM with diode drop
    (12.0, 6.0, 1.5, 1e-3, 0.6, 500.0, 0.0),    # DCM, §6.3 worked case
    (12.0, 3.0, 2.0, 0.5e-3, 0.3, 2e3, 0.7),    # DCM with diode drop
    (24.0, 4.0, 0.8, 2e-3, 0.45, 1e3, 0.4),     # CCM, large ripple (z = 0.4)
    (12.0, 1.0, 10.0, 1e-4, 0.5, 5e3, 0.3),     # resistive-ish (z = 20), DCM
]


@pytest.mark.parametrize("case", ORACLE_CASES)
def test_steady_state_matches_solve_ivp_oracle(case):
    # independent oracle: scipy.integrate.solve_ivp (DOP853) + brentq shooting on the periodic orbit
    v, e, r, l, d, f, vf = case  # noqa: E741
    mc = motor_current(v, e, r, l, d, f, vf)
    ref = oracle_steady(v, e, r, l, d, f, vf)
    period = 1.0 / f
    rel = 1e-6
    assert mc.continuous == (ref["i_start"] > 0.0)
    assert mc.i_min == pytest.approx(ref["i_start"], rel=rel, abs=1e-9)
    assert mc.i_max == pytest.approx(ref["i_max"], rel=rel)
    assert mc.i_mean == pytest.approx((ref["q_sw"] + ref["q_d"]) / period, rel=rel)
    assert mc.i_switch_avg == pytest.approx(ref["q_sw"] / period, rel=rel)
    assert mc.i_switch_rms == pytest.approx(math.sqrt(ref["q2_sw"] / period), rel=rel)
    assert mc.i_diode_avg == pytest.approx(ref["q_d"] / period, rel=rel, abs=1e-12)
    assert mc.i_diode_rms == pytest.approx(math.sqrt(ref["q2_d"] / period), rel=rel, abs=1e-12)
    assert mc.i_rms == pytest.approx(math.sqrt((ref["q2_sw"] + ref["q2_d"]) / period), rel=rel)
    assert mc.t_diode == pytest.approx(ref["t_d"], rel=1e-5)


def test_stable_helpers_match_high_precision_sympy():
    # the numerically stable forms (series below x = 0.1, closed forms above) against 40-digit sympy values
    import sympy as sp

    from pwmkit.loads import motor as mod

    x = sp.Symbol("x", positive=True)
    exact = {
        mod._phi: (1 - sp.exp(-x)) / x,
        mod._psi: (sp.exp(-x) - 1 + x) / x**2,
        mod._h: 1 / (1 - sp.exp(-x)) - 1 / x,
        mod._m2: (1 - 2 * (1 - sp.exp(-x)) / x + (1 - sp.exp(-2 * x)) / (2 * x)) / (1 - sp.exp(-x)) ** 2,
    }
    points = [1e-9, 1e-4, 0.0999, 0.1, 0.1001, 0.7, 3.0, 40.0]
    for fun, expr in exact.items():
        got = fun(np.array(points))
        for xv, g in zip(points, got):
            ref = float(expr.subs(x, sp.Float(xv, 40)).evalf(40))
            assert g == pytest.approx(ref, rel=2e-14), (fun.__name__, xv)
            assert float(fun(xv)) == g, (fun.__name__, xv)  # a scalar takes the same value as an array element


def test_series_is_numpys_horner_to_the_bit():
    # the scalar fast path and the array path of the short series equal np.polyval exactly
    from pwmkit.loads import motor as mod

    xs = np.random.default_rng(7).uniform(0.0, 0.1, 400)
    for coeffs in (mod._PSI_C, mod._H_C, mod._M2_C):
        ref = np.polyval(coeffs[::-1], xs)
        assert np.array_equal(mod._series(xs, coeffs), ref)
        assert all(float(mod._series(v, coeffs)) == r for v, r in zip(xs, ref))
        for n in (1, 2, 8, 9):  # the small-array path and the numpy path around its limit
            assert np.array_equal(mod._series(xs[:n].reshape(n, 1), coeffs), ref[:n].reshape(n, 1))


def test_ccm_worked_values_references_6_2():
    # worked case (regression pin), recomputed here with the plain chopper formulas (Mohan, Undeland & Robbins, 3rd ed., ch. 7, from memory)
    v, e, r, l, f, d = 12.0, 6.0, 1.5, 1e-3, 20e3, 0.7  # noqa: E741
    i_max, i_min = plain_ccm(v, e, r, l, f, d)
    assert i_max == pytest.approx(1.662679, abs=5e-7)  # §6.2 (regression pin)
    assert i_min == pytest.approx(1.536691, abs=5e-7)  # §6.2 (regression pin)
    tau, period = l / r, 1 / f
    s_sw, s2_sw = plain_segment_integrals((v - e) / r, i_min, d * period, tau)
    s_d, s2_d = plain_segment_integrals(-e / r, i_max, (1 - d) * period, tau)
    mc = motor_current(v, e, r, l, d, f)
    assert mc.i_max == pytest.approx(i_max, rel=1e-12)
    assert mc.i_min == pytest.approx(i_min, rel=1e-12)
    assert mc.i_ripple_pp == pytest.approx(0.125988, abs=5e-7)  # §6.2 (regression pin) exact ΔI
    assert mc.i_mean == pytest.approx(1.6, abs=5e-7)  # §6.2 (regression pin) I_avg 1.600000
    assert mc.i_switch_avg == pytest.approx(1.120165, abs=5e-7)  # §6.2 (regression pin)
    assert mc.i_switch_rms == pytest.approx(1.339199, abs=5e-7)  # §6.2 (regression pin)
    assert mc.i_diode_avg == pytest.approx(0.479835, abs=5e-7)  # §6.2 (regression pin)
    assert mc.i_diode_rms == pytest.approx(0.876281, abs=5e-7)  # §6.2 (regression pin)
    assert mc.i_rms == pytest.approx(1.600413, abs=5e-7)  # §6.2 (regression pin) load rms
    assert mc.i_switch_avg == pytest.approx(s_sw / period, rel=1e-10)  # sheet integral formula
    assert mc.i_switch_rms == pytest.approx(math.sqrt(s2_sw / period), rel=1e-10)
    assert mc.i_diode_avg == pytest.approx(s_d / period, rel=1e-10)
    assert mc.i_diode_rms == pytest.approx(math.sqrt(s2_d / period), rel=1e-10)
    assert mc.mode == "continuous" and mc.continuous is True
    # small-ripple approximations printed beside the exact values (§6.2): 1.339002 and 0.876582
    di = mc.i_ripple_pp
    assert math.sqrt(d * (1.6**2 + di**2 / 12)) == pytest.approx(1.339002, abs=5e-7)
    assert math.sqrt((1 - d) * (1.6**2 + di**2 / 12)) == pytest.approx(0.876582, abs=5e-7)


def test_ccm_with_diode_drop_references_6_2():
    # Mohan, Undeland & Robbins, Power Electronics, 3rd ed., ch. 7, from memory (regression pin): with Vf = 0.5 V: ΔI 0.131237 A, I_avg 1.5 A, I_D,avg 0.449828 A, I_D,rms 0.821531 A
    mc = motor_current(12.0, 6.0, 1.5, 1e-3, 0.7, 20e3, vf=0.5)
    assert mc.i_ripple_pp == pytest.approx(0.131237, abs=5e-7)
    assert mc.i_mean == pytest.approx(1.5, abs=5e-7)
    assert mc.i_diode_avg == pytest.approx(0.449828, abs=5e-7)
    assert mc.i_diode_rms == pytest.approx(0.821531, abs=5e-7)


def test_dcm_worked_values_references_6_3():
    # Mohan, Undeland & Robbins, Power Electronics, 3rd ed., ch. 7, from memory (regression pin): 12 V, 6 V, 1.5 Ω, 1 mH, 500 Hz, D 0.6
    v, e, r, l, f, d = 12.0, 6.0, 1.5, 1e-3, 500.0, 0.6  # noqa: E741
    mc = motor_current(v, e, r, l, d, f)
    tau, period = l / r, 1 / f
    i_pk = (v - e) / r * (1 - math.exp(-d * period / tau))
    t_x = tau * math.log(1 + i_pk * r / e)
    assert mc.mode == "discontinuous" and mc.continuous is False
    assert i_pk == pytest.approx(3.338804, abs=5e-7)  # §6.3 (regression pin) I_pk
    assert mc.i_max == pytest.approx(i_pk, rel=1e-12)
    assert mc.i_min == 0.0
    assert mc.t_diode == pytest.approx(t_x, rel=1e-12)
    assert mc.t_diode == pytest.approx(0.405e-3, abs=0.5e-6)  # §6.3 (regression pin) t_x 0.405 ms
    assert mc.i_mean == pytest.approx(((v - e) * d - e * t_x / period) / r, rel=1e-12)  # §6.3 formula
    assert mc.i_mean == pytest.approx(1.590825, abs=5e-7)  # §6.3 (regression pin)
    assert mc.i_switch_rms == pytest.approx(1.813925, abs=5e-7)  # §6.3 (regression pin)
    assert mc.i_diode_avg == pytest.approx(0.303759, abs=5e-7)  # §6.3 (regression pin)
    assert mc.i_diode_rms == pytest.approx(0.801809, abs=5e-7)  # §6.3 (regression pin)


def test_critical_back_emf_ratio_references_6_3():
    # Mohan, Undeland & Robbins, Power Electronics, 3rd ed., ch. 7, from memory (regression pin): critical E/V (Vf = 0) = (e^{Dz} - 1)/(e^z - 1): 0.692086 at 20 kHz D 0.7, 0.264580 at 500 Hz D 0.6
    for f, d, crit in [(20e3, 0.7, 0.692086), (500.0, 0.6, 0.264580)]:
        z = 1.5 / (1e-3 * f)
        assert (math.exp(d * z) - 1) / (math.exp(z) - 1) == pytest.approx(crit, abs=5e-7)
        mc = motor_current(12.0, 6.0, 1.5, 1e-3, d, f)
        assert mc.e_boundary / 12.0 == pytest.approx(crit, abs=5e-7)
        below = motor_current(12.0, mc.e_boundary * (1 - 1e-6), 1.5, 1e-3, d, f)
        above = motor_current(12.0, mc.e_boundary * (1 + 1e-6), 1.5, 1e-3, d, f)
        assert below.continuous and not above.continuous
        # at the boundary the mean current equals the reported boundary current (continuity of both forms)
        # (perturbation 1e-6·E_b shifts the mean by ≈ 1e-6·E_b/R ≈ 6e-6 A)
        assert below.i_mean == pytest.approx(mc.i_boundary, abs=1e-5)
        assert above.i_mean == pytest.approx(mc.i_boundary, abs=1e-5)


def test_average_inductor_voltage_is_zero_energy_balance():
    # steady state: mean inductor voltage is zero (volt-second balance, common practice) and the
    # supply power equals copper + diode + electromagnetic power (energy balance)
    rng = np.random.default_rng(7)
    n = 400
    v = rng.uniform(5, 48, n)
    e = rng.uniform(0, 1.2, n) * v
    r = 10 ** rng.uniform(-2, 1.5, n)
    l = 10 ** rng.uniform(-5, -1, n)  # noqa: E741
    d = rng.uniform(0, 1, n)
    f = 10 ** rng.uniform(1, 5, n)
    vf = rng.uniform(0, 1.2, n)
    mc = motor_current(v, e, r, l, d, f, vf)
    period = 1 / f
    t_zero = np.where(mc.continuous, 0.0, period * (1 - d) - mc.t_diode)  # current-zero interval
    mean_terminal = (v * d * period - vf * mc.t_diode + e * t_zero) / period
    # during the zero interval the terminal shows E; with e >= v no current flows at all
    flowing = mc.i_max > 0
    mean_vl = mean_terminal - r * mc.i_mean - e
    assert np.allclose(mean_vl[flowing], 0.0, atol=1e-9 * np.max(v))
    p_in = v * mc.i_switch_avg
    p_out = r * mc.i_rms**2 + vf * mc.i_diode_avg + e * mc.i_mean
    assert np.allclose(p_in, p_out, rtol=1e-9, atol=1e-12)
    # CCM: the closed-form average (§6.2) I_avg = (D·V - (1-D)·Vf - E)/R
    c = mc.continuous
    assert np.allclose(mc.i_mean[c], ((d * v - (1 - d) * vf - e) / r)[c], rtol=1e-9, atol=1e-12)


def test_energy_balance_over_extreme_parameters():
    # energy balance V·I_sw,avg = R·I_rms² + Vf·I_D,avg + E·I_mean across z = 1e-16 … 1e20, including the
    # E = Vf = 0 case whose off-state decay never ends (continuous by definition)
    rng = np.random.default_rng(11)
    n = 20000

    def lu(a, b):
        return 10 ** rng.uniform(a, b, n)

    v = lu(-6, 6)
    e = np.where(rng.random(n) < 0.2, 0.0, lu(-8, 6))
    r, l, f = lu(-12, 9), lu(-15, 3), lu(-3, 9)  # noqa: E741
    d = np.where(rng.random(n) < 0.1, rng.integers(0, 2, n), rng.random(n))
    vf = np.where(rng.random(n) < 0.3, 0.0, lu(-6, 2))
    mc = motor_current(v, e, r, l, d, f, vf)
    p_in = v * mc.i_switch_avg
    p_out = r * mc.i_rms**2 + vf * mc.i_diode_avg + e * mc.i_mean
    assert np.allclose(p_in, p_out, rtol=1e-9, atol=1e-250)
    assert np.all(mc.continuous[(e + vf == 0) & (d > 0)])


def test_small_ripple_limit_mohan():
    # Mohan/Undeland/Robbins 3rd ed. ch. 7 (from memory): ΔI → (V+Vf)·D(1-D)/(L·f) as R → 0
    v, vf, l, f = 12.0, 0.5, 1e-3, 20e3  # noqa: E741
    for d in (0.1, 0.3, 0.5, 0.9):
        e = d * v - (1 - d) * vf - 1e-9 * 1.0  # keeps I_avg = 1 A at R = 1 nΩ
        mc = motor_current(v, e, 1e-9, l, d, f, vf)
        assert mc.i_ripple_pp == pytest.approx((v + vf) * d * (1 - d) / (l * f), rel=1e-9)
        assert mc.i_mean == pytest.approx(1.0, rel=1e-6)
        # Mohan, Undeland & Robbins, Power Electronics, 3rd ed., ch. 7, from memory (regression pin): I_max/I_min symmetric about I_avg in the limit
        assert mc.i_max - mc.i_mean == pytest.approx(mc.i_ripple_pp / 2, rel=1e-6)
    # Mohan, Undeland & Robbins, Power Electronics, 3rd ed., ch. 7, from memory (regression pin) R → 0 check: R = 1 mΩ, E = 8.399 V, I_avg = 1 A: ΔI = 0.126000 = (V-E)D/(Lf)
    mc = motor_current(12.0, 8.399, 1e-3, 1e-3, 0.7, 20e3)
    assert mc.i_ripple_pp == pytest.approx(0.126000, abs=5e-7)
    assert mc.i_mean == pytest.approx(1.0, abs=5e-6)


def test_ripple_maximum_tanh_references_6_2():
    # Mohan, Undeland & Robbins, Power Electronics, 3rd ed., ch. 7, from memory: ΔI is independent of E and peaks at D = 0.5 at ((V+Vf)/R)·tanh(z/4)
    r, l, f, v, vf = 1.5, 1e-3, 2e3, 12.0, 0.5  # noqa: E741
    d = np.linspace(0.01, 0.99, 99)
    mc = motor_current(v, 0.0, r, l, d, f, vf)
    assert d[np.argmax(mc.i_ripple_pp)] == pytest.approx(0.5)
    assert np.max(mc.i_ripple_pp) == pytest.approx((v + vf) / r * math.tanh(r / (4 * f * l)), rel=1e-12)
    other_e = motor_current(v, 1.0, r, l, d, f, vf)
    assert np.allclose(other_e.i_ripple_pp[other_e.continuous], mc.i_ripple_pp[other_e.continuous], rtol=1e-12)


def test_ccm_dcm_boundary_mohan_i_lb():
    # Mohan/Undeland/Robbins 3rd ed. §7-3 (from memory): I_LB = T_s·V_d·D(1-D)/(2L) for R → 0
    v, l, f = 12.0, 1e-3, 20e3  # noqa: E741
    d = np.linspace(0.05, 0.95, 19)
    mc = motor_current(v, 0.0, 1e-9, l, d, f)
    assert np.allclose(mc.i_boundary, v * d * (1 - d) / (2 * l * f), rtol=1e-6)
    # maximum V/(8Lf) at D = 0.5 (Mohan, Undeland & Robbins, Power Electronics, 3rd ed., ch. 7, from memory)
    assert motor_current(v, 0.0, 1e-9, l, 0.5, f).i_boundary == pytest.approx(v / (8 * l * f), rel=1e-6)


def test_stall_diode_average_peaks_at_quarter_v_over_r():
    # Mohan, Undeland & Robbins, Power Electronics, 3rd ed., ch. 7, from memory; stall current as the worst case, common practice (regression pin): stall (E = 0) diode average (1-D)·D·V/R peaks at D = 0.5 at V/(4R) = 2 A
    m = MotorParams(r=1.5, l=1.0, ke=0.01)  # L large → negligible ripple
    d = np.linspace(0.0, 1.0, 101)
    sc = stall_current(m, 12.0, d, 20e3)
    assert d[np.argmax(sc.i_diode_avg)] == pytest.approx(0.5)
    assert np.max(sc.i_diode_avg) == pytest.approx(12.0 / (4 * 1.5), rel=1e-8)
    # with the real 1 mH the exact value stays within 1 % of V/(4R)
    real = stall_current(MotorParams(r=1.5, l=1e-3, ke=0.01), 12.0, 0.5, 20e3)
    assert real.i_diode_avg == pytest.approx(2.0, rel=1e-2)
    assert real.i_mean == pytest.approx(0.5 * 12.0 / 1.5, rel=1e-12)  # I_avg = D·V/R at stall


def test_duty_and_generating_edges():
    # duty 0: no current; duty 1: DC (V - E)/R with no ripple and an idle diode (analytic limits)
    zero = motor_current(12.0, 3.0, 1.5, 1e-3, 0.0, 20e3, 0.7)
    assert (zero.i_mean, zero.i_max, zero.i_rms, zero.mode) == (0.0, 0.0, 0.0, "discontinuous")
    full = motor_current(12.0, 3.0, 1.5, 1e-3, 1.0, 20e3, 0.7)
    assert full.i_mean == pytest.approx(6.0, rel=1e-12)
    assert full.i_ripple_pp == 0.0 and full.i_diode_avg == 0.0 and full.i_diode_rms == 0.0
    assert full.i_switch_rms == pytest.approx(6.0, rel=1e-12)
    # e >= v: a diode-fed armature cannot carry negative current → zero current (model statement)
    for e in (12.0, 15.0):
        gen = motor_current(12.0, e, 1.5, 1e-3, 0.7, 20e3, 0.5)
        assert gen.i_mean == 0.0 and gen.i_max == 0.0 and not gen.continuous
    # no diode drop and no back-EMF: the off-state decay never ends → continuous for any D > 0
    assert motor_current(12.0, 0.0, 1.5, 1e-3, 0.01, 10.0).continuous


def test_extreme_z_is_finite_and_reaches_limits():
    # z from 1e-12 to 1e12: finite numbers; z → ∞ is a resistive load: I_mean = D·(V-E)/R, I_rms = √D·(V-E)/R
    z = 10.0 ** np.arange(-12, 13)
    r = 2.0
    l = r / (z * 1e3)  # noqa: E741 - f = 1 kHz
    mc = motor_current(12.0, 4.0, r, l, 0.3, 1e3, 0.6)
    for name in ("i_mean", "i_min", "i_max", "i_rms", "i_switch_rms", "i_diode_rms", "t_diode", "e_boundary"):
        assert np.all(np.isfinite(getattr(mc, name))), name
    big = motor_current(12.0, 4.0, 2.0, 2.0 / 1e15, 0.3, 1e3, 0.6)
    assert big.i_mean == pytest.approx(0.3 * 8.0 / 2.0, rel=1e-9)
    assert big.i_rms == pytest.approx(math.sqrt(0.3) * 8.0 / 2.0, rel=1e-9)
    # tiny z: CCM and the mean is the §6.2 average
    tiny = motor_current(12.0, 3.0, 2.0, 2.0 / 1e-9, 0.3, 1e3, 0.6)
    assert tiny.continuous and tiny.i_mean == pytest.approx((0.3 * 12 - 0.7 * 0.6 - 3.0) / 2.0, rel=1e-9)


def test_vector_equals_scalar():
    rng = np.random.default_rng(3)
    v = rng.uniform(6, 24, 25)
    e = rng.uniform(0, 20, 25)
    d = rng.uniform(0, 1, 25)
    f = 10 ** rng.uniform(2, 5, 25)
    vec = motor_current(v, e, 1.5, 1e-3, d, f, 0.4)
    assert isinstance(vec.i_mean, np.ndarray) and vec.mode.shape == (25,)
    for k in range(25):
        one = motor_current(float(v[k]), float(e[k]), 1.5, 1e-3, float(d[k]), float(f[k]), 0.4)
        assert isinstance(one.i_mean, float) and isinstance(one.mode, str)
        assert one.mode == vec.mode[k]
        for name in ("i_mean", "i_max", "i_min", "i_rms", "i_diode_avg", "t_diode", "e_boundary"):
            assert getattr(one, name) == pytest.approx(getattr(vec, name)[k], rel=1e-14, abs=1e-300)
    grid = motor_current(12.0, 5.0, 1.5, 1e-3, np.linspace(0, 1, 5)[:, None], np.array([500.0, 20e3]))
    assert grid.i_mean.shape == (5, 2)


@reaching()
@settings(max_examples=150, deadline=None)
@given(case=mostly(
    st.tuples(st.floats(1.0, 1e3), st.floats(0.0, 1.0), st.floats(1e-3, 1e3), st.floats(1e-6, 1.0),
              st.floats(0.0, 1.0), st.floats(1.0, 1e6), st.floats(0.0, 2.0)).map(
                  lambda t: (t[0], t[0] * t[1], *t[2:])),   # back-EMF 0 … the supply
    st.tuples(st.floats(-10, 1e4), st.floats(-5, 1e4), st.floats(-1, 1e6), st.floats(-1e-3, 10.0),
              st.floats(-0.2, 1.2), st.floats(-1.0, 1e7), st.floats(-0.5, 5.0))))
def test_property_finite_or_design_error(case):
    v, e, r, l, d, f, vf = case  # noqa: E741
    # property (style guide): wide random inputs → finite results or DesignError, never NaN/other errors
    try:
        mc = motor_current(v, e, r, l, d, f, vf)
    except DesignError:
        return
    reached()
    for name in ("i_mean", "i_min", "i_max", "i_ripple_pp", "i_switch_avg", "i_switch_rms", "i_diode_avg",
                 "i_diode_rms", "i_rms", "t_diode", "i_boundary", "e_boundary"):
        val = getattr(mc, name)
        assert math.isfinite(val), name
    assert mc.i_min >= 0.0 and mc.i_max >= mc.i_min
    # RMS never below the mean (squares of currents below ~1e-154 A underflow: absolute slack there)
    assert mc.i_rms >= mc.i_mean * (1 - 1e-9) - 1e-150
    assert mc.mode in ("continuous", "discontinuous")


@pytest.mark.parametrize(
    ("kwargs", "match"),
    [
        ({"v": 0.0}, "v: 0 V is out of range"),
        ({"e": -1.0}, "e: -1 V is out of range"),
        ({"r": 0.0}, "r: 0 Ω is out of range"),
        ({"l": -1e-3}, "l: -0.001 H is out of range"),
        ({"duty": 1.5}, "duty: 1.5 is out of range"),
        ({"f": float("nan")}, "f: nan is not a finite number"),
        ({"vf": "abc"}, "vf:"),
        ({"duty": [0.1, 0.2], "f": [1e3, 2e3, 3e3]}, "do not broadcast"),
    ],
)
def test_bad_inputs_raise_design_error(kwargs, match):
    args = {"v": 12.0, "e": 6.0, "r": 1.5, "l": 1e-3, "duty": 0.7, "f": 20e3, "vf": 0.0}
    args.update(kwargs)
    with pytest.raises(DesignError, match=match):
        motor_current(**args)


def test_engineering_strings_accepted():
    assert motor_current("12", "6", "1.5", "1m", "0.7", "20k").i_max == pytest.approx(1.662679, abs=5e-7)


def test_repr_and_html_show_values():
    mc = motor_current(12.0, 6.0, 1.5, 1e-3, 0.7, 20e3)
    assert isinstance(mc, MotorCurrent)
    assert "i_max=1.6627 A" in repr(mc) and "mode=continuous" in repr(mc)
    assert "<table>" in mc._repr_html_() and "i_diode_rms" in mc._repr_html_()


# ---------------------------------------------------------------------------------------------------
# steady speed
# ---------------------------------------------------------------------------------------------------

FAN = MotorParams(r=1.5, l=1e-3, ke=0.01, b=1e-5, t_coulomb=1e-3, drag=2e-9, j=1e-6)


def test_steady_speed_satisfies_torque_balance():
    # definition of the steady state: K_t·I_mean(K_e·ω) = b·ω + c·ω² + T_c + T_L
    for d, f in [(0.7, 20e3), (0.4, 500.0), (1.0, 1e3)]:
        ss = steady_speed(FAN, 12.0, d, f, 0.5)
        mc = motor_current(12.0, FAN.ke * ss.omega, FAN.r, FAN.l, d, f, 0.5)
        assert not ss.stalled
        assert FAN.kt * mc.i_mean == pytest.approx(float(FAN.load_torque(ss.omega)), rel=1e-9)
        assert ss.rpm == pytest.approx(ss.omega * 60 / (2 * math.pi))
        assert ss.p_in == pytest.approx(ss.p_em + ss.p_copper + ss.p_diode, rel=1e-9)  # energy balance
        assert ss.current.mode == mc.mode


def test_steady_speed_full_duty_dc_motor():
    # D = 1 is a DC motor: ω = K_t·V/(R·b + K_t·K_e) with viscous friction only (textbook DC motor)
    m = MotorParams(r=1.5, l=1e-3, ke=0.01, b=1e-5)
    assert steady_speed(m, 12.0, 1.0, 20e3).omega == pytest.approx(0.01 * 12 / (1.5 * 1e-5 + 1e-4), rel=1e-12)


def test_no_load_dcm_speed_rises_to_supply_over_ke():
    # DCM without load: the current only stops when E = V, so ω → V/K_e whatever the duty (§6.3 consequence)
    m = MotorParams(r=1.5, l=1e-3, ke=0.01)
    ss = steady_speed(m, 12.0, np.array([0.2, 0.5, 0.8]), 500.0)
    assert np.allclose(ss.omega, 1200.0, rtol=1e-9)


def test_stalled_when_friction_exceeds_stall_torque():
    m = MotorParams(r=1.5, l=1e-3, ke=0.01, t_load=0.05)  # stall torque at D 0.5: 0.01·4 A = 0.04 N·m
    ss = steady_speed(m, 12.0, 0.5, 20e3)
    assert ss.stalled and ss.omega == 0.0
    assert ss.i_mean == pytest.approx(stall_current(m, 12.0, 0.5, 20e3).i_mean)
    assert not steady_speed(m, 12.0, 0.7, 20e3).stalled  # 0.056 N·m > 0.05 N·m


def test_steady_speed_vector_equals_scalar_and_flags():
    d = np.array([0.2, 0.6, 0.9])
    f = np.array([100.0, 5e3, 25e3])
    vec = steady_speed(FAN, 12.0, d, f, 0.5)
    for k in range(3):
        one = steady_speed(FAN, 12.0, float(d[k]), float(f[k]), 0.5)
        assert one.omega == pytest.approx(vec.omega[k], rel=1e-12)
        assert one.audible == bool(vec.audible[k])
    assert list(vec.audible) == [True, True, False]  # 20 Hz … 20 kHz hearing band (common practice)
    assert vec.tau_e == pytest.approx(electrical_time_constant(FAN))
    assert np.allclose(vec.tau_over_period, FAN.l / FAN.r * f)


def test_audible_band_common_practice():
    # human hearing 20 Hz … 20 kHz (common practice)
    assert audible(20.0) and audible(20e3) and audible(1e3)
    assert not audible(19.9) and not audible(20.1e3)
    assert list(audible([10.0, 1e3, 30e3])) == [False, True, False]
    with pytest.raises(DesignError, match="f: 0 Hz is out of range"):
        audible(0.0)


def test_motor_params_validation():
    with pytest.raises(DesignError, match="ke: 0 V·s/rad is out of range"):
        MotorParams(r=1.0, l=1e-3, ke=0.0)
    with pytest.raises(DesignError, match="b: -1 N·m·s/rad is out of range"):
        MotorParams(r=1.0, l=1e-3, ke=0.01, b=-1.0)
    with pytest.raises(DesignError, match="params.j: inertia is None"):
        simulate_startup(MotorParams(r=1.0, l=1e-3, ke=0.01), 12.0, 0.5, 1e3, 0.01)


# ---------------------------------------------------------------------------------------------------
# start-up simulation vs scipy
# ---------------------------------------------------------------------------------------------------


def oracle_startup(m: MotorParams, v, d, f, t_end, vf):
    """solve_ivp per switching segment with terminal events at i = 0 (diode/switch cut-off)."""
    period = 1 / f
    t_static = m.t_coulomb + m.t_load

    def mech(w, i):
        if w <= 0.0 and m.kt * i <= t_static:
            return 0.0
        return (m.kt * i - m.b * w - m.drag * w * w - t_static) / m.j

    y = np.array([0.0, 0.0])
    n_periods = int(round(t_end * f))
    q_last = 0.0
    for n in range(n_periods):
        q_period = 0.0
        for t0, t1, vseg in ((0.0, d * period, v), (d * period, period, -vf)):
            t = n * period + t0
            t_stop = n * period + t1
            while t < t_stop * (1 - 1e-13):
                conducting = y[0] > 0.0 or vseg - m.ke * y[1] > 0.0

                def rhs(_t, yy, conducting=conducting, vseg=vseg):
                    i = yy[0] if conducting else 0.0
                    di = (vseg - m.r * i - m.ke * yy[1]) / m.l if conducting else 0.0
                    return [di, mech(yy[1], i), i]

                def zero(_t, yy):
                    return yy[0]

                zero.terminal = True
                zero.direction = -1

                def start(_t, yy, vseg=vseg):
                    return vseg - m.ke * yy[1]

                start.terminal = True
                start.direction = 1
                sol = solve_ivp(rhs, (t, t_stop), [y[0], y[1], 0.0], method="DOP853", rtol=1e-10, atol=1e-12,
                                events=zero if conducting else start)
                q_period += sol.y[2, -1]
                y = np.array([max(sol.y[0, -1], 0.0), max(sol.y[1, -1], 0.0)])
                if sol.status == 1 and conducting:
                    y[0] = 0.0
                t = sol.t[-1]
        q_last = q_period
    return y, q_last * f


@pytest.mark.parametrize(
    ("d", "f", "vf"),
    [(0.7, 1e3, 0.5), (0.5, 500.0, 0.0), (0.9, 2e3, 0.7)],
)
def test_startup_matches_solve_ivp(d, f, vf):
    # independent oracle: scipy.integrate.solve_ivp on the coupled switched ODE with zero-current events
    t_end = 0.04
    m = FAN
    tr = simulate_startup(m, 12.0, d, f, t_end, vf, steps_per_segment=4)
    (i_ref, w_ref), i_mean_ref = oracle_startup(m, 12.0, d, f, t_end, vf)
    assert tr.t[-1] == pytest.approx(t_end, rel=1e-9)
    assert tr.omega_final == pytest.approx(w_ref, rel=1e-3)
    assert tr.i_mean_final == pytest.approx(i_mean_ref, rel=2e-3)
    assert tr.i[-1] == pytest.approx(i_ref, rel=2e-3, abs=1e-3)
    assert np.all(tr.i >= 0.0) and np.all(tr.omega >= 0.0)
    assert np.allclose(tr.e, m.ke * tr.omega)


def test_startup_error_falls_second_order():
    # the coupling error of the stepper shrinks ≈ 4× per halving of the step (second order), vs solve_ivp
    (_, w_ref), _ = oracle_startup(FAN, 12.0, 0.7, 1e3, 0.02, 0.5)
    err = [abs(simulate_startup(FAN, 12.0, 0.7, 1e3, 0.02, 0.5, steps_per_segment=n).omega_final / w_ref - 1)
           for n in (2, 4, 8)]
    assert err[0] / err[1] > 3.0 and err[1] / err[2] > 3.0


def test_startup_settles_at_steady_speed():
    # consistency of the two routes: after many mechanical time constants the simulation sits at the
    # averaged steady state (mechanical time constant ≫ PWM period)
    m = MotorParams(r=1.5, l=1e-3, ke=0.01, b=1e-5, j=1e-6)
    tr = simulate_startup(m, 12.0, 0.7, 20e3, 0.12, 0.5)
    ss = steady_speed(m, 12.0, 0.7, 20e3, 0.5)
    assert tr.omega_final == pytest.approx(ss.omega, rel=2e-3)
    assert tr.i_mean_final == pytest.approx(ss.i_mean, rel=1e-2)
    assert tr.i_peak > ss.current.i_max  # the start-up current peak exceeds the running peak
    assert tr.i_peak <= 12.0 / 1.5  # bounded by the stall current V/R (stall current as the worst case, common practice)


def test_startup_stays_still_against_breakaway_torque():
    # Coulomb/static friction above the stall torque: the rotor must not move
    m = MotorParams(r=1.5, l=1e-3, ke=0.01, t_coulomb=0.2, j=1e-6)
    tr = simulate_startup(m, 12.0, 0.5, 5e3, 0.01)
    assert np.all(tr.omega == 0.0)
    assert tr.i_mean_final == pytest.approx(stall_current(m, 12.0, 0.5, 5e3).i_mean, rel=1e-6)


def test_startup_stiff_mechanics_matches_solve_ivp():
    # tiny inertia: mechanical time constant J·R/(K_e·K_t) ≈ 60 ns ≪ τ_e ≈ 1 s, PWM period 6 ms; the rotor and
    # armature form an almost undamped second-order pair (ω_n = 1/√(τ_e·τ_m)), so the speed overshoots towards
    # 2·V/K_e (step response of a lossless LC pair). The stepper refines its step and agrees with solve_ivp.
    m = MotorParams(r=0.0197, l=0.0195, ke=0.3065, b=1.3e-8, t_coulomb=1.28e-4, drag=2.1e-10, j=2.77e-7)
    d, f = 0.553, 163.1
    t_end = 2 / f
    tr = simulate_startup(m, 12.0, d, f, t_end, 0.5)
    (i_ref, w_ref), _ = oracle_startup(m, 12.0, d, f, t_end, 0.5)
    assert tr.omega_final == pytest.approx(w_ref, rel=1e-5)
    assert tr.i[-1] == pytest.approx(i_ref, abs=1e-6)
    assert 1.9 < np.max(tr.omega) / (12.0 / m.ke) <= 2.0
    # random stiff and soft cases: finite, non-negative, or a clear max_steps DesignError
    rng = np.random.default_rng(5)
    for _ in range(30):
        m = MotorParams(r=10 ** rng.uniform(-1, 2), l=10 ** rng.uniform(-5, -2), ke=10 ** rng.uniform(-3, -1),
                        b=10 ** rng.uniform(-9, -3), drag=10 ** rng.uniform(-12, -6), j=10 ** rng.uniform(-9, -4))
        try:
            tr = simulate_startup(m, 12.0, float(rng.random()), 10 ** rng.uniform(2, 4), 2e-3, 0.5,
                                  max_steps=200_000)
        except DesignError as exc:
            assert "max_steps" in str(exc)
            continue
        assert np.all(np.isfinite(tr.omega)) and np.all(tr.omega >= 0.0) and np.all(tr.i >= 0.0)


def test_startup_guards():
    with pytest.raises(DesignError, match="more than max_steps"):
        simulate_startup(FAN, 12.0, 0.5, 1e6, 10.0)
    with pytest.raises(DesignError, match="steps_per_segment: 0 is out of range"):
        simulate_startup(FAN, 12.0, 0.5, 1e3, 0.01, steps_per_segment=0)


def test_mean_only_chopper_gives_the_full_forms_mean_to_the_bit():
    """The speed search's mean-only path computes the same i_mean as the full closed forms (CCM and DCM)."""
    from pwmkit.loads.motor import _chopper

    rng = np.random.default_rng(7)
    n = 400
    v, r, l = rng.uniform(3, 48, n), rng.uniform(0.1, 20, n), 10 ** rng.uniform(-5, -2, n)  # noqa: E741
    e, d = v * rng.uniform(0, 1.1, n), rng.uniform(0, 1, n)
    f, vf = 10 ** rng.uniform(1, 5, n), rng.uniform(0, 1.0, n)
    full = _chopper(v, e, r, l, d, f, vf)
    assert full["continuous"].any() and not full["continuous"].all()  # both modes are drawn
    np.testing.assert_array_equal(_chopper(v, e, r, l, d, f, vf, mean_only=True)["i_mean"], full["i_mean"])
