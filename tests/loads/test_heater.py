"""Resistive heater element under PWM and the thermistor loop.

Sources: first-order lumped thermal response T(t) = Ta + P·Rθ·(1 − e^(−t/τ)) (analytical solution;
F. P. Incropera et al., Fundamentals of Heat and Mass Transfer, 6th ed., §5.3 — from memory);
scipy.integrate.solve_ivp of the energy balance built from the element values (with the
temperature coefficient, unaveraged square-wave power for the ripple, and the closed loop with
the thermistor divider); ngspice (/usr/bin/ngspice) transient of the electrical analogue (current
source = power, capacitor = heat capacity, resistor = thermal resistance), skipped when absent;
NTC β model (common practice, thermistor makers' data sheets).
"""

from __future__ import annotations

import cmath
import math
import shutil
import subprocess

import numpy as np
import pytest
from scipy.integrate import solve_ivp

from pwmkit import DesignError
from pwmkit.loads.heater import closed_loop, heater, ntc_resistance, phase_margin, thermistor_source

MAT = dict(r_cold=8.0, r_th=2.5, c_th=800.0, v_supply=12.0, frequency=700.0)


def test_first_order_analytic_solution_alpha_zero():
    # analytical: rise = D·V²/R·Rθ; 90 % after τ·ln 10
    h = heater(**MAT, alpha=0.0, duty=0.4, t_ambient_c=15.0)
    assert h.p_avg == pytest.approx(0.4 * 144 / 8)
    assert h.t_rise == pytest.approx(0.4 * 144 / 8 * 2.5)
    assert h.warm_up == pytest.approx(2.5 * 800 * math.log(10.0), rel=1e-12)
    assert h.t_element_c == pytest.approx(15.0 + 18.0)


@pytest.mark.parametrize("alpha", [0.0039, 0.0007, -0.0015])
def test_warm_up_and_steady_against_solve_ivp(alpha):
    ta, d = 10.0, 0.6
    h = heater(**MAT, alpha=alpha, duty=d, t_ambient_c=ta)

    def rhs(_t, y):
        r = 8.0 * (1 + alpha * (y[0] - 25.0))
        return [(d * 144.0 / r - (y[0] - ta) / 2.5) / 800.0]

    sol = solve_ivp(rhs, (0, 40 * 2000.0), [ta], rtol=1e-11, atol=1e-11, dense_output=True, method="DOP853")
    t_ss = float(sol.y[0, -1])
    assert h.t_element_c == pytest.approx(t_ss, abs=1e-6)

    def reached(_t, y):
        return y[0] - (ta + 0.9 * (t_ss - ta))

    reached.terminal = True
    sol2 = solve_ivp(rhs, (0, 40 * 2000.0), [ta], rtol=1e-11, atol=1e-11, events=reached, method="DOP853")
    assert h.warm_up == pytest.approx(float(sol2.t_events[0][0]), rel=1e-6)


def test_ripple_against_unaveraged_solve_ivp():
    # a small element (soldering-iron-like): 0.2 J/K, 10 K/W, 5 Hz PWM — ripple is visible
    p = dict(r_cold=20.0, alpha=0.0, r_th=10.0, c_th=0.2, v_supply=24.0, frequency=5.0, duty=0.3)
    h = heater(**p, t_ambient_c=25.0)
    tau, period, p_on = 2.0, 0.2, 24.0**2 / 20.0
    y, hi, lo = 0.0, [], []
    for _ in range(200):  # 20 τ, period by period, on then off
        for on, dt in ((True, 0.3 * period), (False, 0.7 * period)):
            s = solve_ivp(lambda _t, x, on=on: [((p_on if on else 0.0) - x[0] / 10.0) / 0.2], (0, dt), [y],
                          rtol=1e-12, atol=1e-12)
            y = float(s.y[0, -1])
            (hi if on else lo).append(y)
    assert h.ripple_pp == pytest.approx(hi[-1] - lo[-1], rel=1e-6)
    assert h.t_rise == pytest.approx(0.3 * p_on * 10.0)
    assert tau == pytest.approx(h.tau)


def test_vectorised_duty_sweep_equals_scalar():
    d = np.linspace(0.0, 1.0, 6)
    a = heater(**MAT, alpha=0.004, duty=d, t_ambient_c=15.0)
    for k, dk in enumerate(d):
        assert a.t_element_c[k] == pytest.approx(heater(**MAT, alpha=0.004, duty=float(dk), t_ambient_c=15.0).t_element_c)
    assert np.all(np.diff(a.t_element_c) > 0)


def test_heater_bad_inputs():
    with pytest.raises(DesignError, match="r_th"):
        heater(**dict(MAT, r_th=0.0), alpha=0.0, duty=0.5)
    with pytest.raises(DesignError, match="duty"):
        heater(**MAT, alpha=0.0, duty=1.5)
    with pytest.raises(DesignError, match="thermal runaway"):
        heater(**dict(MAT, r_th=200.0), alpha=-0.005, duty=1.0, t_ambient_c=25.0)


def test_ntc_beta_model():
    # common practice: R25 at 25 °C; β model ratio between 25 °C and 50 °C
    assert ntc_resistance(25.0, 10e3, 3950.0) == pytest.approx(10e3)
    assert ntc_resistance(50.0, 10e3, 3950.0) == pytest.approx(10e3 * math.exp(3950 * (1 / 323.15 - 1 / 298.15)))
    v, r = thermistor_source(25.0, 12.0, 10e3, 3950.0, 10e3)
    assert v == pytest.approx(6.0) and r == pytest.approx(5e3)


def test_phase_margin_against_direct_complex_evaluation():
    k, t1, t2, td = 8.0, 2000.0, 40.0, 1.5e-3
    fc, pm = phase_margin(k, t1, t2, td)
    w = 2 * math.pi * fc

    def loop(w):
        s = 1j * w
        return k * cmath.exp(-s * td) / ((1 + s * t1) * (1 + s * t2))

    assert abs(loop(w)) == pytest.approx(1.0, rel=1e-9)
    assert 180.0 + math.degrees(cmath.phase(loop(w))) == pytest.approx(pm, rel=1e-9)
    assert phase_margin(0.9, t1, t2, td) == (0.0, 180.0)


def test_closed_loop_steady_temperature_against_solve_ivp():
    """The averaged closed loop (element, sensor lag, divider, modulator) integrated to steady state."""
    from pwmkit.timing.monostable import control_pin_drive
    from pwmkit.timing.two_timer import two_timer_pwm

    circuit = dict(ra=20e3, rb=1e3, c=100e-9, r_mono=10e3, c_mono=100e-9, vcc=12.0)
    probe = two_timer_pwm(**circuit, vctl=5.0)
    v_lo, v_hi = float(probe.vctl_min), float(probe.vctl_max)
    d_lo, d_hi = float(probe.duty_min), float(probe.duty_max)

    def duty(v):
        return float(two_timer_pwm(**circuit, vctl=min(max(v, v_lo + 1e-9), v_hi - 1e-9)).duty)

    def vctl_of_t(t):
        vs, rs = thermistor_source(t, 12.0, 10e3, 3950.0, 12e3)
        return float(control_pin_drive(vs, rs, 12.0).vctl)

    loop = closed_loop(duty, vctl_of_t, **MAT, alpha=0.0039, duty_range=(d_lo, d_hi), t_ambient_c=15.0,
                       tau_sensor=60.0, vctl_range=(v_lo, v_hi))
    assert not loop.saturated and loop.stable

    def rhs(_t, y):
        te, ts = y
        d = d_lo if vctl_of_t(ts) <= v_lo else d_hi if vctl_of_t(ts) >= v_hi else duty(vctl_of_t(ts))
        r = 8.0 * (1 + 0.0039 * (te - 25.0))
        return [(d * 144.0 / r - (te - 15.0) / 2.5) / 800.0, (te - ts) / 60.0]

    sol = solve_ivp(rhs, (0, 30000.0), [15.0, 15.0], rtol=1e-8, atol=1e-8, method="LSODA")
    assert loop.t_element_c == pytest.approx(float(sol.y[0, -1]), abs=2e-3)
    assert loop.duty == pytest.approx(duty(vctl_of_t(float(sol.y[1, -1]))), abs=1e-4)


_NGSPICE = shutil.which("ngspice")


@pytest.mark.skipif(_NGSPICE is None, reason="ngspice not installed")
def test_heater_thermal_analogue_against_ngspice(tmp_path):
    """Electrical analogue: 1 A ≙ 1 W pulsed at the PWM, 1 F ≙ 1 J/K, 1 Ω ≙ 1 K/W (α = 0)."""
    p_on, d, f, rth, cth = 28.8, 0.3, 5.0, 10.0, 2.0
    net = f"""heater thermal analogue
I1 0 t PULSE(0 {p_on} 0 1u 1u {d / f - 2e-6} {1 / f})
R1 t 0 {rth}
C1 t 0 {cth}
.tran 1m 200 0 1m
.meas tran tmax MAX v(t) FROM=199 TO=200
.meas tran tmin MIN v(t) FROM=199 TO=200
.meas tran tavg AVG v(t) FROM=199 TO=200
.end
"""
    (tmp_path / "h.cir").write_text(net)
    out = subprocess.run([_NGSPICE, "-b", "h.cir"], cwd=tmp_path, capture_output=True, text=True, timeout=120)
    vals = {}
    for line in out.stdout.splitlines():
        parts = line.replace("=", " = ").split()
        if len(parts) >= 3 and parts[0].lower() in ("tmax", "tmin", "tavg"):
            vals[parts[0].lower()] = float(parts[2])
    h = heater(r_cold=20.0, alpha=0.0, r_th=rth, c_th=cth, v_supply=24.0, frequency=f, duty=d, t_ambient_c=0.0)
    assert h.t_rise == pytest.approx(vals["tavg"], rel=2e-3)
    assert h.ripple_pp == pytest.approx(vals["tmax"] - vals["tmin"], rel=1e-2)


def _sampled_swing(gain_per_k, tau_s, f):
    """Sampled-data simulation with solve_ivp: duty from the sensor at each period start, held over
    the period (the modulator samples the control voltage once per period); returns the late swing [K]."""
    def duty(ts):
        return min(max(0.5 - gain_per_k * (ts - 30.0), 0.0), 1.0)

    period, te, ts, hist = 1.0 / f, 15.0, 15.0, []
    for _ in range(int(60000 * f)):
        d = duty(ts)
        s = solve_ivp(lambda _t, y, d=d: [(d * 18.0 - (y[0] - 15.0) / 2.5) / 800.0, (y[0] - y[1]) / tau_s],
                      (0, period), [te, ts], rtol=1e-9, atol=1e-9)
        te, ts = float(s.y[0, -1]), float(s.y[1, -1])
        hist.append(te)
    tail = np.array(hist[len(hist) // 2:])
    return float(tail.max() - tail.min())


@pytest.mark.parametrize(("gain_per_k", "tau_s", "f"), [(0.5, 300.0, 0.004), (0.3, 300.0, 0.004), (0.5, 60.0, 0.01)])
def test_phase_margin_verdict_against_sampled_simulation(gain_per_k, tau_s, f):
    """Stability verdict of closed_loop() against a time-domain run of the same loop (very slow PWM,
    so the sampling delay matters): negative margin ⇔ a sustained oscillation."""
    def v_of_t(t):
        return min(max(0.5 - gain_per_k * (t - 30.0), 0.0), 1.0)

    loop = closed_loop(lambda v: v, v_of_t, r_cold=8.0, alpha=0.0, r_th=2.5, c_th=800.0, v_supply=12.0,
                       frequency=f, duty_range=(0.0, 1.0), t_ambient_c=15.0, tau_sensor=tau_s)
    swing = _sampled_swing(gain_per_k, tau_s, f)
    assert loop.gain > 1
    if loop.stable:
        assert loop.phase_margin_deg > 10 and swing < 1e-3
    else:
        assert swing > 1.0
    assert (gain_per_k, tau_s) != (0.5, 300.0) or not loop.stable  # the case is really unstable


def test_warm_up_closed_form_against_sympy_integral():
    """The partial-fraction closed form of the warm-up against sympy's own integral of
    dt = τ·(β + α·y)/(K − β·y − α·y²)·dy from 0 to 0.9·y_steady (sympy as the reference tool)."""
    import sympy as sp

    from pwmkit.loads.heater import steady_rise, warm_up_time

    y = sp.Symbol("y", positive=True)
    for tau, k, alpha, beta in ((2000.0, 40.0, 0.0039, 1.0), (500.0, 12.0, -0.002, 0.97), (10.0, 3.0, 0.0, 1.0)):
        y1 = steady_rise(k, alpha, beta)
        integrand = sp.nsimplify(tau) * (sp.nsimplify(beta) + sp.nsimplify(alpha) * y) / (
            sp.nsimplify(k) - sp.nsimplify(beta) * y - sp.nsimplify(alpha) * y**2)
        ref = sp.Integral(integrand, (y, 0, sp.Float(0.9 * y1, 30))).evalf(25)
        assert warm_up_time(tau, k, alpha, beta) == pytest.approx(float(ref), rel=1e-10)


def test_closed_loop_step_against_solve_ivp_and_the_steady_state():
    """The loop's warm-up (fourth-order Runge-Kutta in the model) against scipy's DOP853 on the same
    equations, and its end point against closed_loop()'s steady temperature."""
    from pwmkit.loads.heater import closed_loop_step

    def v_of_t(t):
        return min(max(0.5 - 0.05 * (t - 30.0), 0.0), 1.0)

    kw = dict(r_cold=8.0, alpha=0.0039, r_th=2.5, c_th=800.0, v_supply=12.0, duty_range=(0.0, 1.0),
              t_ambient_c=15.0, tau_sensor=60.0)
    step = closed_loop_step(lambda v: v, v_of_t, **kw)

    def rhs(_t, y):
        r = 8.0 * (1 + 0.0039 * (y[0] - 25.0))
        return [(v_of_t(y[1]) * 144.0 / r - (y[0] - 15.0) / 2.5) / 800.0, (y[0] - y[1]) / 60.0]

    sol = solve_ivp(rhs, (0, step.t[-1]), [15.0, 15.0], t_eval=step.t[::50], rtol=1e-10, atol=1e-10, method="DOP853")
    assert step.t_element_c[::50] == pytest.approx(sol.y[0], abs=2e-3)
    loop = closed_loop(lambda v: v, v_of_t, frequency=1e3, **{k: v for k, v in kw.items()})
    assert step.t_final_c == pytest.approx(loop.t_element_c, abs=0.05)
    assert 0 < step.settling_time < step.t[-1] and step.overshoot >= 0
