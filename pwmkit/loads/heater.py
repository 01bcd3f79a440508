"""Resistive heater under PWM: element power, temperature, ripple, warm-up, and a thermistor loop.

The element is a resistance with a linear temperature coefficient,
``R(T) = R_0·(1 + α·(T − T_0))``, in a first-order thermal network: heat capacity ``C_θ`` and
thermal resistance ``R_θ`` to ambient. Averaged over the PWM period (period ≪ ``τ = R_θ·C_θ``):

.. math:: C_θ\\,\\frac{dT}{dt} = \\frac{D\\,V^2}{R(T)} - \\frac{T - T_a}{R_θ}

With ``y = T − T_a``, ``β = 1 + α (T_a − T_0)`` and ``K = R_θ D V²/R_0`` the steady rise solves
``α y² + β y − K = 0``, written cancellation-free as ``y = 2K/(β + √(β² + 4αK))``; the warm-up
from ambient integrates in closed form (partial fractions of the same quadratic). At the PWM
frequency the element temperature ripples around its mean like an RC node under a square wave:

.. math:: ΔT_{pp} = R_θ P_{on}\\frac{(1 - a)(1 - b)}{1 - a b},\\quad a = e^{-D T_{pwm}/τ},\\ b = e^{-(1-D) T_{pwm}/τ}

A thermistor divider (NTC at the bottom, set resistor at the top) feeding the control pin of the
two-timer PWM (:func:`pwmkit.timing.two_timer_pwm`) closes a proportional loop:
:func:`closed_loop` finds the steady temperature and the loop's phase margin (thermal pole,
sensor lag and the sampling of the control voltage once per PWM period, taken as a hold of half a
period).

References
----------
.. [1] F. P. Incropera, D. P. DeWitt, T. L. Bergman, A. S. Lavine, *Fundamentals of Heat and Mass
   Transfer*, 6th ed., Wiley 2007, §5.3 (lumped capacitance) (from memory).
.. [2] C. K. Alexander, M. N. O. Sadiku, *Fundamentals of Electric Circuits*, 6th ed., ch. 7
   (RC response to a pulse train).
.. [3] NTC thermistor makers' data sheets: the β model ``R = R_25·exp(β(1/T − 1/T_25))``
   (common practice).
.. [4] K. Ogata, *Modern Control Engineering*, 5th ed., Prentice Hall 2010, §7-6 (phase margin)
   (from memory).
.. [5] G. F. Franklin, J. D. Powell, M. L. Workman, *Digital Control of Dynamic Systems*, 3rd ed.,
   Addison-Wesley 1998: a zero-order hold behaves like a delay of half the sample period
   (common practice; from memory).
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Any

import numpy as np

from .._validate import quantity
from ..errors import DesignError
from .thermal import result_html, result_repr

__all__ = ["HeaterResult", "heater", "steady_rise", "warm_up_time", "ripple_pp", "ntc_resistance",
           "thermistor_source", "ClosedLoop", "closed_loop", "StepResponse", "closed_loop_step", "WARMUP_FRACTION",
           "KELVIN"]

#: Fraction of the steady temperature rise that ends the warm-up [1] (90 %, common practice).
WARMUP_FRACTION = 0.9
#: 0 °C in kelvin.
KELVIN = 273.15


def _f(x: Any) -> Any:
    x = np.asarray(x, dtype=float)
    return float(x) if x.ndim == 0 else x


def steady_rise(k: Any, alpha: Any, beta: Any) -> Any:
    """Steady temperature rise ``y`` solving ``α y² + β y − K = 0`` (cancellation-free root) [K].

    ``K = R_θ·D·V²/R_0`` is the rise without a temperature coefficient [K]; ``β = 1 + α (T_a − T_0)``.
    A negative ``α`` whose discriminant goes negative has no steady state (runaway): DesignError.
    """
    disc = np.asarray(beta) ** 2 + 4.0 * np.asarray(alpha) * np.asarray(k)
    if np.any(disc < 0):
        raise DesignError("alpha: with this negative temperature coefficient the element's power rises faster "
                          "with temperature than the thermal path can remove it (thermal runaway); no steady "
                          "temperature exists")
    return _f(2.0 * np.asarray(k) / (np.asarray(beta) + np.sqrt(disc)))


def warm_up_time(tau: Any, k: Any, alpha: Any, beta: Any, fraction: Any = WARMUP_FRACTION) -> Any:
    """Time from ambient to ``fraction`` of the steady rise, averaged model, closed form [s].

    .. math::
        t(y) = -\\frac{τ}{\\sqrt{Δ}}\\left[\\frac{β + \\sqrt{Δ}}{2}\\ln\\left(1 - \\frac{y}{y_1}\\right)
               - \\frac{β - \\sqrt{Δ}}{2}\\ln\\left(1 - \\frac{y}{y_2}\\right)\\right],\\quad Δ = β^2 + 4αK

    with ``y_1`` the steady rise and ``y_2`` the other root (``1/y_2 = −2α/(β + √Δ)``, 0 at α = 0,
    where the form reduces to ``−τ ln(1 − fraction)``).
    """
    disc = np.asarray(beta) ** 2 + 4.0 * np.asarray(alpha) * np.asarray(k)
    if np.any(disc <= 0):
        raise DesignError("alpha: no steady temperature (thermal runaway), so there is no warm-up time")
    sq = np.sqrt(disc)
    y1 = 2.0 * np.asarray(k) / (np.asarray(beta) + sq)
    inv_y2 = -2.0 * np.asarray(alpha) / (np.asarray(beta) + sq)
    y = np.asarray(fraction) * y1
    t = -np.asarray(tau) / sq * (0.5 * (beta + sq) * np.log1p(-y / y1) - 0.5 * (beta - sq) * np.log1p(-y * inv_y2))
    return _f(t)


def ripple_pp(r_th: Any, p_on: Any, tau: Any, duty: Any, frequency: Any) -> Any:
    """Peak-to-peak element temperature ripple at the PWM frequency, steady state [K]."""
    x_on = np.asarray(duty) / (np.asarray(frequency) * np.asarray(tau))
    x_off = (1.0 - np.asarray(duty)) / (np.asarray(frequency) * np.asarray(tau))
    with np.errstate(invalid="ignore", divide="ignore"):
        out = np.asarray(r_th) * np.asarray(p_on) * np.expm1(-x_on) * np.expm1(-x_off) / -np.expm1(-x_on - x_off)
    return _f(np.where(np.asarray(duty) * (1 - np.asarray(duty)) > 0, out, 0.0))


@dataclass(frozen=True)
class HeaterResult:
    """A resistive heater element under PWM, steady state.

    Attributes
    ----------
    duty, frequency : PWM duty [1] and frequency [Hz]
    t_element_c : mean element temperature [°C]
    t_rise : mean rise above ambient [K]
    t_peak_c : highest element temperature over a PWM period (mean + half the ripple) [°C]
    r_hot : element resistance at that temperature [Ω]
    i_on : element current while switched on [A]
    i_rms : RMS current over the period, ``√D·i_on`` [A]
    p_on : element power while on [W]; p_avg : average power ``D·p_on`` [W]
    ripple_pp : peak-to-peak temperature ripple at the PWM frequency [K]
    tau : thermal time constant ``R_θ·C_θ`` [s]
    warm_up : time from ambient to :data:`WARMUP_FRACTION` of the steady rise [s]
    t_ambient_c : ambient [°C]
    """

    duty: Any
    frequency: Any
    t_element_c: Any
    t_rise: Any
    t_peak_c: Any
    r_hot: Any
    i_on: Any
    i_rms: Any
    p_on: Any
    p_avg: Any
    ripple_pp: Any
    tau: Any
    warm_up: Any
    t_ambient_c: Any

    _UNITS = {"duty": "", "frequency": "Hz", "t_element_c": "°C", "t_rise": "K", "t_peak_c": "°C", "r_hot": "Ω",
              "i_on": "A", "p_avg": "W", "ripple_pp": "K", "warm_up": "s"}

    def __repr__(self) -> str:
        if np.ndim(self.t_element_c) != 0:
            return f"HeaterResult(arrays of shape {np.shape(self.t_element_c)})"
        return result_repr(self, self._UNITS)

    def _repr_html_(self) -> str:
        return result_html(self, self._UNITS, "heater element")


def _heater_inputs(r_cold: Any, alpha: Any, r_th: Any, c_th: Any, v_supply: Any, duty: Any, frequency: Any,
                   t_ambient_c: Any, rds_on: Any, t_ref_c: Any) -> dict[str, Any]:
    return dict(
        r0=quantity(r_cold, "r_cold", unit="Ω", minimum=0.0, min_inclusive=False),
        alpha=quantity(alpha, "alpha", unit="1/K", minimum=-0.005, maximum=0.02),
        r_th=quantity(r_th, "r_th", unit="K/W", minimum=0.0, min_inclusive=False),
        c_th=quantity(c_th, "c_th", unit="J/K", minimum=0.0, min_inclusive=False),
        v=quantity(v_supply, "v_supply", unit="V", minimum=0.0),
        duty=quantity(duty, "duty", minimum=0.0, maximum=1.0),
        f=quantity(frequency, "frequency", unit="Hz", minimum=0.0, min_inclusive=False),
        ta=quantity(t_ambient_c, "t_ambient_c", unit="°C", minimum=-60.0, maximum=150.0),
        rds=quantity(rds_on, "rds_on", unit="Ω", minimum=0.0),
        t0=quantity(t_ref_c, "t_ref_c", unit="°C", minimum=-60.0, maximum=150.0),
    )


def heater(*, r_cold: Any, alpha: Any, r_th: Any, c_th: Any, v_supply: Any, duty: Any, frequency: Any,
           t_ambient_c: Any = 25.0, rds_on: Any = 0.0, t_ref_c: Any = 25.0) -> HeaterResult:
    """Steady state of a resistive heater element switched by PWM (averaged first-order model).

    Parameters
    ----------
    r_cold : element resistance at ``t_ref_c`` [Ω]
    alpha : linear temperature coefficient of resistance, −0.005 … 0.02 [1/K]
    r_th : thermal resistance element → ambient [K/W]
    c_th : heat capacity of the element and what it warms with it [J/K]
    v_supply : heater supply [V]
    duty : PWM duty 0 … 1 (scalar or array: steady temperature vs duty) [1]
    frequency : PWM frequency [Hz]
    t_ambient_c : ambient [°C]
    rds_on : switch on-resistance in series (drop taken at the hot resistance) [Ω]
    t_ref_c : temperature at which ``r_cold`` is given [°C]

    Returns
    -------
    HeaterResult

    Notes
    -----
    The switch resistance enters as a divider, ``V_el = V·R/(R + R_DS(on))``, evaluated at the
    rise without it (R_DS(on) ≪ R for heaters; the error is second order). The ripple uses the
    power at the mean temperature. Valid when the PWM period is much shorter than ``τ`` (the
    averaged model); convection that changes with temperature is not modelled.

    Examples
    --------
    >>> h = heater(r_cold=8.0, alpha=0.0, r_th=2.5, c_th=800.0, v_supply=12.0, duty=0.5, frequency=700.0)
    >>> round(h.p_avg, 3), round(h.t_rise, 3), round(h.warm_up / h.tau, 4)     # 9 W, 22.5 K, ln 10
    (9.0, 22.5, 2.3026)

    References
    ----------
    .. [1] F. P. Incropera et al., *Fundamentals of Heat and Mass Transfer*, 6th ed., §5.3 (from memory).
    """
    q = _heater_inputs(r_cold, alpha, r_th, c_th, v_supply, duty, frequency, t_ambient_c, rds_on, t_ref_c)
    return _heater_core(q)


def _steady(q: dict[str, Any], duty: Any) -> tuple[Any, Any, Any, Any, Any]:
    """(β, steady rise y [K], hot resistance [Ω], element voltage [V], K [K]) at ``duty``."""
    r0, alpha, r_th, v = q["r0"], q["alpha"], q["r_th"], np.asarray(q["v"])
    ta, rds, t0 = q["ta"], q["rds"], q["t0"]
    beta = 1.0 + np.asarray(alpha) * (np.asarray(ta) - t0)
    if np.any(beta <= 0):
        raise DesignError("alpha: the element resistance is not positive at the ambient temperature; check alpha "
                          "and t_ref_c")
    # first pass without the switch drop, then the divider at that hot resistance
    y = steady_rise(np.asarray(r_th) * duty * v**2 / r0, alpha, beta)
    r_hot = r0 * (beta + np.asarray(alpha) * y)
    v_el = v * r_hot / (r_hot + rds)
    k = np.asarray(r_th) * np.asarray(duty) * v_el**2 / r0
    y = steady_rise(k, alpha, beta)
    r_hot = r0 * (beta + np.asarray(alpha) * y)
    return beta, y, r_hot, v_el, k


def _heater_core(q: dict[str, Any]) -> HeaterResult:
    r0, alpha, r_th, c_th, v = q["r0"], q["alpha"], q["r_th"], q["c_th"], np.asarray(q["v"])
    duty, f, ta = q["duty"], q["f"], q["ta"]
    beta, y, r_hot, v_el, k = _steady(q, duty)
    p_on = v_el**2 / r_hot
    tau = np.asarray(r_th) * c_th
    with np.errstate(all="ignore"):
        warm = warm_up_time(tau, np.where(np.asarray(k) > 0, k, 1.0), alpha, beta)
    warm = np.where(np.asarray(k) > 0, warm, 0.0)
    rip = ripple_pp(r_th, p_on, tau, duty, f)
    t_el = np.asarray(ta) + y
    shape = np.broadcast(t_el, duty, v, r0, r_th, c_th, f).shape

    def out(x: Any) -> Any:
        x = np.asarray(x, dtype=float)
        return float(x) if not shape else np.array(np.broadcast_to(x, shape))

    i_on = v_el / r_hot
    return HeaterResult(
        duty=out(duty), frequency=out(f), t_element_c=out(t_el), t_rise=out(y), t_peak_c=out(t_el + 0.5 * rip),
        r_hot=out(r_hot), i_on=out(i_on), i_rms=out(np.sqrt(duty) * i_on), p_on=out(p_on), p_avg=out(duty * p_on),
        ripple_pp=out(rip), tau=out(tau), warm_up=out(warm), t_ambient_c=out(ta),
    )


def ntc_resistance(t_c: Any, r25: Any, beta: Any) -> Any:
    """NTC thermistor resistance by the β model, ``R_25·exp(β (1/T − 1/298.15 K))`` [Ω].

    Examples
    --------
    >>> round(ntc_resistance(25.0, 10e3, 3950.0), 6)
    10000.0

    References
    ----------
    .. [1] NTC thermistor makers' data sheets, β (B-value) model between 25 °C and a second
       temperature (common practice).
    """
    t = np.asarray(quantity(t_c, "t_c", unit="°C", minimum=-100.0, maximum=300.0)) + KELVIN
    r25 = quantity(r25, "ntc_r25", unit="Ω", minimum=0.0, min_inclusive=False)
    beta = quantity(beta, "ntc_beta", unit="K", minimum=100.0, maximum=10000.0)
    return _f(np.asarray(r25) * np.exp(np.asarray(beta) * (1.0 / t - 1.0 / (25.0 + KELVIN))))


def thermistor_source(t_c: Any, vcc: Any, r25: Any, beta: Any, r_set: Any) -> tuple[Any, Any]:
    """Open-circuit voltage [V] and source resistance [Ω] of the divider ``vcc — r_set — node — NTC — 0 V``.

    The node falls as the NTC warms, so the duty falls as the heater warms (negative feedback).
    """
    r_ntc = np.asarray(ntc_resistance(t_c, r25, beta))
    r_set = quantity(r_set, "r_set", unit="Ω", minimum=0.0, min_inclusive=False)
    v = np.asarray(vcc) * r_ntc / (r_set + r_ntc)
    return _f(v), _f(r_set * r_ntc / (r_set + r_ntc))


@dataclass(frozen=True)
class ClosedLoop:
    """Thermistor-controlled heater: steady state and stability of the proportional loop.

    Attributes
    ----------
    t_element_c : closed-loop steady element temperature [°C]
    duty : duty there [1]; vctl : control-pin voltage there [V]
    t_full_c : temperature below which the control asks for more than the reachable maximum duty
        (searched within ambient − 80 K … full-power temperature + 80 K, clamped to it) [°C]
    t_off_c : temperature above which only the minimum pulse is left (same bracket) [°C]
    t_open_full_c : element temperature at full duty with no control (the fault case: a shorted
        switch or a lost sensor) [°C]
    gain : loop gain at DC, ``−∂T/∂T_sensor`` around the operating point [1]
    droop : change of the steady temperature per kelvin of ambient, ``1/(1 + gain)`` [1]
    crossover : frequency where the loop gain is 1 [Hz] (0 when the gain never reaches 1)
    phase_margin_deg : phase margin [°] (180 when the gain never reaches 1)
    stable : phase margin above 0
    tau_plant, tau_sensor, delay : thermal time constant (with the element's own self-regulation),
        sensor lag and sampling delay (half a PWM period: a sample and hold once per period) [s]
    saturated : the steady state sits on a limit of the duty range (no regulation there)
    """

    t_element_c: float
    duty: float
    vctl: float
    t_full_c: float
    t_off_c: float
    t_open_full_c: float
    gain: float
    droop: float
    crossover: float
    phase_margin_deg: float
    stable: bool
    tau_plant: float
    tau_sensor: float
    delay: float
    saturated: bool

    _UNITS = {"t_element_c": "°C", "duty": "", "vctl": "V", "t_off_c": "°C", "gain": "", "crossover": "Hz",
              "phase_margin_deg": "", "stable": ""}

    def __repr__(self) -> str:
        return result_repr(self, self._UNITS)

    def _repr_html_(self) -> str:
        return result_html(self, self._UNITS, "closed loop")


def _illinois(g: Any, lo: float, hi: float, xtol: float = 1e-9, steps: int = 100) -> float:
    """Root of an increasing ``g`` in ``[lo, hi]`` by bracketed Illinois regula falsi (clamped to the ends)."""
    g_lo, g_hi = g(lo), g(hi)
    if g_lo >= 0:
        return lo
    if g_hi <= 0:
        return hi
    side = 0
    for _ in range(steps):
        x = (lo * g_hi - hi * g_lo) / (g_hi - g_lo)
        gx = g(x)
        if gx > 0:
            hi, g_hi = x, gx
            if side == -1:
                g_lo *= 0.5
            side = -1
        else:
            lo, g_lo = x, gx
            if side == 1:
                g_hi *= 0.5
            side = 1
        if hi - lo < xtol or gx == 0:
            break
    return 0.5 * (lo + hi) if gx != 0 else x


def _crossing(vctl_of_t: Any, level: float, t_lo: float, t_hi: float) -> float:
    """Temperature [°C] where a falling ``vctl_of_t`` crosses ``level`` (clamped to the bracket ends)."""
    if not math.isfinite(level):
        return t_lo if level > 0 else t_hi
    if float(vctl_of_t(t_lo)) <= level:
        return t_lo
    if float(vctl_of_t(t_hi)) >= level:
        return t_hi
    for _ in range(50):
        mid = 0.5 * (t_lo + t_hi)
        if float(vctl_of_t(mid)) > level:
            t_lo = mid
        else:
            t_hi = mid
    return 0.5 * (t_lo + t_hi)


def phase_margin(gain: float, tau1: float, tau2: float, delay: float) -> tuple[float, float]:
    """(crossover [Hz], phase margin [°]) of ``L(s) = K e^{−s t_d}/((1 + s τ_1)(1 + s τ_2))``.

    The crossover solves ``τ_1²τ_2² x² + (τ_1² + τ_2²) x + 1 − K² = 0`` for ``x = ω²``. With
    ``K ≤ 1`` there is no crossover: (0, 180).
    """
    if gain <= 1.0:
        return 0.0, 180.0
    a, b, c = (tau1 * tau2) ** 2, tau1**2 + tau2**2, 1.0 - gain**2
    x = (-c / b) if a == 0 else 2.0 * (-c) / (b + math.sqrt(b * b - 4.0 * a * c))
    w = math.sqrt(x)
    phase = math.degrees(math.atan(w * tau1) + math.atan(w * tau2) + w * delay)
    return w / (2.0 * math.pi), 180.0 - phase


def closed_loop(duty_of_vctl: Any, vctl_of_t: Any, *, r_cold: Any, alpha: Any, r_th: Any, c_th: Any,
                v_supply: Any, frequency: Any, duty_range: tuple[float, float], t_ambient_c: Any = 25.0,
                rds_on: Any = 0.0, t_ref_c: Any = 25.0, tau_sensor: Any = 30.0,
                vctl_range: tuple[float, float] | None = None) -> ClosedLoop:
    """Closed-loop steady temperature and phase margin of a thermistor-controlled heater.

    The steady state solves ``T − T_a = R_θ·P(D(V_ctl(T)), T)`` by bracketed Illinois regula falsi
    between ambient and the temperature at the highest duty (the left side rises with ``T``, the
    right side falls); the loop is linearised there
    (``∂D/∂T`` by central difference of the given chain) and its phase margin computed with
    :func:`phase_margin`.

    Parameters
    ----------
    duty_of_vctl : callable ``vctl [V] → duty [1]`` (e.g. from :func:`pwmkit.timing.two_timer_pwm`)
    vctl_of_t : callable ``element temperature [°C] → vctl [V]`` (thermistor divider and control pin)
    r_cold, alpha, r_th, c_th, v_supply, frequency, t_ambient_c, rds_on, t_ref_c : as :func:`heater`
    duty_range : (lowest, highest) duty the modulator reaches [1]
    tau_sensor : thermistor lag behind the element [s]
    vctl_range : (lowest, highest) control voltage the modulator accepts; outside it the duty is
        held at the nearer limit [V]

    Returns
    -------
    ClosedLoop

    References
    ----------
    .. [1] K. Ogata, *Modern Control Engineering*, 5th ed., §7-6 (phase margin) (from memory).
    .. [2] G. F. Franklin, J. D. Powell, M. L. Workman, *Digital Control of Dynamic Systems*, 3rd ed.:
       a sample and hold acts like half a sample period of delay (common practice; from memory).
    """
    q = _heater_inputs(r_cold, alpha, r_th, c_th, v_supply, 0.0, frequency, t_ambient_c, rds_on, t_ref_c)
    tau_s = float(quantity(tau_sensor, "tau_sensor", unit="s", minimum=0.0))
    d_lo, d_hi = (float(x) for x in duty_range)
    v_lo, v_hi = vctl_range if vctl_range is not None else (-math.inf, math.inf)

    def duty_at(t: float) -> tuple[float, float, bool]:
        v = float(vctl_of_t(t))
        if v <= v_lo:
            return d_lo, v, True
        if v >= v_hi:
            return d_hi, v, True
        return min(max(float(duty_of_vctl(v)), d_lo), d_hi), v, False

    def rise_at(d: float) -> float:
        return float(_steady(q, d)[1])

    ta = float(q["ta"])
    t_full = ta + rise_at(1.0)
    t_max = ta + rise_at(d_hi)

    def g(t: float) -> float:  # > 0 when the element is hotter than the control sustains
        return (t - ta) - rise_at(duty_at(t)[0])

    t_ss = _illinois(g, ta, t_max)
    d_ss, v_ss, sat = duty_at(t_ss)
    # linearisation
    h = 0.01
    dd_dt = (duty_at(t_ss + h)[0] - duty_at(t_ss - h)[0]) / (2 * h)
    r0, al, rth, v = float(q["r0"]), float(q["alpha"]), float(q["r_th"]), float(q["v"])
    r_hot = r0 * (1.0 + al * (t_ss - float(q["t0"])))
    v_el = v * r_hot / (r_hot + float(q["rds"]))
    dp_dd = v_el**2 / r_hot
    dp_dt = -d_ss * v_el**2 * al * r0 / r_hot**2
    g_th = 1.0 / rth - dp_dt
    r_eff = 1.0 / g_th
    gain = max(0.0, -dd_dt * dp_dd * r_eff)
    tau_p = float(q["c_th"]) * r_eff
    delay = 0.5 / float(q["f"])  # sample and hold once per PWM period: half a period of delay
    fc, pm = phase_margin(gain, tau_p, tau_s, delay)
    t_full = _crossing(vctl_of_t, v_hi, ta - 80.0, t_full + 80.0)
    t_off = _crossing(vctl_of_t, v_lo, ta - 80.0, ta + rise_at(1.0) + 80.0)
    return ClosedLoop(
        t_element_c=t_ss, duty=d_ss, vctl=v_ss, t_full_c=t_full, t_off_c=t_off, t_open_full_c=ta + rise_at(1.0),
        gain=gain,
        droop=1.0 / (1.0 + gain), crossover=fc, phase_margin_deg=pm, stable=pm > 0.0, tau_plant=tau_p,
        tau_sensor=tau_s, delay=delay, saturated=sat or d_ss <= d_lo or d_ss >= d_hi,
    )


@dataclass(frozen=True)
class StepResponse:
    """Warm-up of a thermistor-controlled heater from ambient (averaged closed loop, time domain).

    Attributes
    ----------
    t : time [s]
    t_element_c, t_sensor_c : element and thermistor temperatures [°C]
    duty : duty the modulator gives [1]
    t_final_c : temperature at the end of the run [°C]
    overshoot : largest excursion above the final temperature [K]
    settling_time : last time the element is outside ±2 % of its final rise [s]
    """

    t: np.ndarray
    t_element_c: np.ndarray
    t_sensor_c: np.ndarray
    duty: np.ndarray
    t_final_c: float
    overshoot: float
    settling_time: float

    def __repr__(self) -> str:
        return (f"StepResponse(final {self.t_final_c:.4g} °C, overshoot {self.overshoot:.3g} K, settles in "
                f"{self.settling_time:.4g} s)")


def closed_loop_step(duty_of_vctl: Any, vctl_of_t: Any, *, r_cold: Any, alpha: Any, r_th: Any, c_th: Any,
                     v_supply: Any, duty_range: tuple[float, float], t_ambient_c: Any = 25.0, rds_on: Any = 0.0,
                     t_ref_c: Any = 25.0, tau_sensor: Any = 30.0, vctl_range: tuple[float, float] | None = None,
                     t_end: Any = None, steps: int = 1000) -> StepResponse:
    """Warm-up of the thermistor loop from ambient: the averaged energy balance of the element and
    the thermistor's first-order lag, integrated with the classical fourth-order Runge-Kutta method.

    .. math::
        C_θ \\dot T_e = D(V_{ctl}(T_s))\\,\\frac{V_{el}^2}{R(T_e)} - \\frac{T_e - T_a}{R_θ},\\qquad
        τ_s \\dot T_s = T_e - T_s

    Parameters
    ----------
    duty_of_vctl, vctl_of_t, duty_range, vctl_range : the modulator and the divider, as :func:`closed_loop`
    r_cold, alpha, r_th, c_th, v_supply, t_ambient_c, rds_on, t_ref_c, tau_sensor : as :func:`closed_loop`
    t_end : length of the run [s] (default 8·R_θ·C_θ)
    steps : Runge-Kutta steps (100 … 200000)

    Returns
    -------
    StepResponse

    Notes
    -----
    The PWM period is taken as short against the thermal time constants (averaged model); the
    switch resistance divides the supply as in :func:`heater`.

    References
    ----------
    .. [1] E. Hairer, S. P. Nørsett, G. Wanner, *Solving Ordinary Differential Equations I*, 2nd ed.,
       Springer 1993, §II.1 (the classical Runge-Kutta method) (from memory).
    """
    q = _heater_inputs(r_cold, alpha, r_th, c_th, v_supply, 0.0, 1.0, t_ambient_c, rds_on, t_ref_c)
    tau_s = float(quantity(tau_sensor, "tau_sensor", unit="s", minimum=0.0))
    if isinstance(steps, bool) or not isinstance(steps, int) or not 100 <= steps <= 200_000:
        raise DesignError(f"steps: {steps!r} is not allowed; give a whole number 100 … 200000")
    r0, al, rth, cth, v = (float(q[k]) for k in ("r0", "alpha", "r_th", "c_th", "v"))
    ta, t0, rds = float(q["ta"]), float(q["t0"]), float(q["rds"])
    end = 8.0 * rth * cth if t_end is None else float(quantity(t_end, "t_end", unit="s", minimum=0.0,
                                                                 min_inclusive=False))
    d_lo, d_hi = (float(x) for x in duty_range)
    v_lo, v_hi = vctl_range if vctl_range is not None else (-math.inf, math.inf)

    def duty(ts: float) -> float:
        vc = float(vctl_of_t(ts))
        if vc <= v_lo:
            return d_lo
        if vc >= v_hi:
            return d_hi
        return min(max(float(duty_of_vctl(vc)), d_lo), d_hi)

    def rhs(te: float, ts: float) -> tuple[float, float]:
        r = r0 * (1.0 + al * (te - t0))
        if r <= 0:
            raise DesignError("alpha: the element resistance reaches zero during the warm-up; check alpha")
        v_el = v * r / (r + rds)
        d = duty(ts)
        dte = (d * v_el**2 / r - (te - ta) / rth) / cth
        dts = (te - ts) / tau_s if tau_s > 0 else dte
        return dte, dts

    h = end / steps
    te, ts = ta, ta
    t_arr, te_arr, ts_arr, d_arr = [0.0], [te], [ts], [duty(ts)]
    for k in range(steps):
        k1 = rhs(te, ts)
        k2 = rhs(te + 0.5 * h * k1[0], ts + 0.5 * h * k1[1])
        k3 = rhs(te + 0.5 * h * k2[0], ts + 0.5 * h * k2[1])
        k4 = rhs(te + h * k3[0], ts + h * k3[1])
        te += h / 6.0 * (k1[0] + 2 * k2[0] + 2 * k3[0] + k4[0])
        ts += h / 6.0 * (k1[1] + 2 * k2[1] + 2 * k3[1] + k4[1])
        if tau_s == 0:
            ts = te
        t_arr.append((k + 1) * h)
        te_arr.append(te)
        ts_arr.append(ts)
        d_arr.append(duty(ts))
    te_a = np.array(te_arr)
    final = float(te_a[-1])
    rise = final - ta
    outside = np.nonzero(np.abs(te_a - final) > 0.02 * abs(rise))[0] if rise != 0 else np.array([], dtype=int)
    settle = float(t_arr[int(outside[-1]) + 1]) if outside.size and outside[-1] + 1 < len(t_arr) else (
        0.0 if not outside.size else math.inf)
    return StepResponse(t=np.array(t_arr), t_element_c=te_a, t_sensor_c=np.array(ts_arr), duty=np.array(d_arr),
                        t_final_c=final, overshoot=max(0.0, float(te_a.max()) - final), settling_time=settle)
