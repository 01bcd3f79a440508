"""Two-timer fixed-frequency PWM: an astable clock triggering a monostable whose threshold the
control pin moves.

The clock (a classic astable, :func:`pwmkit.timing.astable`) pulls the monostable's trigger low
once per period ``T`` for its output-low time ``t_low``. The monostable's pulse
(:func:`pwmkit.timing.monostable`) is the PWM output, so the duty is ``t_w/T`` at the clock's
fixed frequency, set by the control-pin voltage:

.. math:: D = \\frac{R_M C_M}{T}\\ln\\frac{V_{cc} - V_0}{V_{cc} - V_{ctl}}

Limits of the range (all computed):

- **minimum pulse** — while the trigger is still held low the output stays high (the trigger
  overrides, common practice), so the pulse is never shorter than the clock's low time;
- **recovery** — after the pulse the discharge switch (:func:`~pwmkit.timing.monostable.discharge_resistance`)
  empties the capacitor with the time constant ``(R_M ∥ R_dis)·C_M``; if the next trigger comes
  before it has settled, the capacitor starts higher (``V_0`` above its rest level) and the pulse
  is shorter. The start level is solved as the periodic fixed point of charge and recovery;
- **retrigger** — a pulse that does not end before the next clock trigger loses that trigger (the
  output skips cycles): such a control voltage is outside the range.

References
----------
.. [1] C. K. Alexander, M. N. O. Sadiku, *Fundamentals of Electric Circuits*, 6th ed., ch. 7.
.. [2] Data sheets of the bipolar and CMOS 555-type timer families, monostable and astable
   operation, and the pulse-width-modulation application (clock on the trigger, modulation on the
   control-voltage pin) (typical published datasheet values, generic).
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Any

import numpy as np

from .._validate import quantity
from ..errors import DesignError
from ..parts.timers import TimerFamily, get_timer
from .monostable import _check_threshold, _first, _out, _start_or_given, discharge_resistance, start_level

__all__ = ["TwoTimerPwm", "two_timer_pwm", "ControlRange", "control_range", "RECOVERY_FRACTION"]

#: Residual fraction of the capacitor swing that counts as "recovered" (1 %, our choice: it shifts the
#: next pulse by well under 1 % of its width) [1].
RECOVERY_FRACTION = 0.01
_FIXED_POINT_STEPS = 40
_LINEARITY_POINTS = 201


@dataclass(frozen=True)
class TwoTimerPwm:
    """Timing of the two-timer fixed-frequency PWM at one or more control voltages.

    Attributes
    ----------
    timer, clock_timer : monostable and clock timer families
    vctl : control-pin voltage of the monostable [V]
    period, frequency : clock period [s] and frequency [Hz]
    t_trigger : clock output-low time = trigger pulse [s]
    width : monostable RC pulse from the periodic start level [s]
    t_high : output-high time ``max(width, t_trigger)`` [s]
    duty : ``t_high/period`` [1]
    v_start : capacitor level at each trigger (periodic fixed point) [V]
    v_rest : level the capacitor settles to with the discharge switch on [V]
    v_peak : capacitor level when the output falls [V]
    t_recovery : time after the pulse to recover within :data:`RECOVERY_FRACTION` [s]
    duty_min, duty_max : reachable duty: minimum pulse and pulse plus recovery filling the period [1]
    vctl_min, vctl_max : control voltages at those limits [V]
    duty_per_volt : ``∂D/∂V_ctl`` (full recovery) [1/V]
    vcc : supply [V]
    """

    timer: str
    clock_timer: str
    vctl: Any
    period: Any
    frequency: Any
    t_trigger: Any
    width: Any
    t_high: Any
    duty: Any
    v_start: Any
    v_rest: Any
    v_peak: Any
    t_recovery: Any
    duty_min: Any
    duty_max: Any
    vctl_min: Any
    vctl_max: Any
    duty_per_volt: Any
    vcc: Any

    def __repr__(self) -> str:
        if np.ndim(self.duty) == 0:
            return (f"TwoTimerPwm(f={self.frequency:.5g} Hz, vctl={self.vctl:.4g} V: duty={100 * self.duty:.3f} %, "
                    f"reachable {100 * self.duty_min:.3g} … {100 * self.duty_max:.4g} %)")
        return f"TwoTimerPwm(arrays of shape {np.shape(self.duty)})"

    def _repr_html_(self) -> str:
        from ..values import format_value as fv
        from .monostable import _html_table

        if np.ndim(self.duty) != 0:
            return f"<p>TwoTimerPwm over arrays of shape {np.shape(self.duty)}</p>"
        return _html_table(f"two-timer PWM — {self.clock_timer} clock, {self.timer} monostable", [
            ("frequency (clock)", fv(self.frequency, "Hz", 5)), ("duty", f"{100 * self.duty:.3f} %"),
            ("control pin", fv(self.vctl, "V", 4)), ("output pulse / RC pulse", f"{fv(self.t_high, 's', 5)} / "
                                                                              f"{fv(self.width, 's', 5)}"),
            ("trigger pulse (minimum pulse)", fv(self.t_trigger, "s", 4)),
            ("start level / rest level", f"{fv(self.v_start, 'V', 4)} / {fv(self.v_rest, 'V', 4)}"),
            ("recovery after the pulse", fv(self.t_recovery, "s", 3)),
            ("reachable duty", f"{100 * self.duty_min:.3g} … {100 * self.duty_max:.4g} % (pin "
                               f"{fv(self.vctl_min, 'V', 3)} … {fv(self.vctl_max, 'V', 3)})")])


def _inputs(ra: Any, rb: Any, c: Any, r_mono: Any, c_mono: Any, vcc: Any, vctl: Any, timer: Any, clock_timer: Any,
            vsat: Any) -> dict[str, Any]:
    fam = get_timer(timer)
    q: dict[str, Any] = {"timer": fam, "clock_timer": get_timer(fam if clock_timer is None else clock_timer)}
    q["ra"] = quantity(ra, "ra", unit="Ω", minimum=0.0, min_inclusive=False)
    q["rb"] = quantity(rb, "rb", unit="Ω", minimum=0.0, min_inclusive=False)
    q["c"] = quantity(c, "c", unit="F", minimum=0.0, min_inclusive=False)
    q["r_mono"] = quantity(r_mono, "r_mono", unit="Ω", minimum=0.0, min_inclusive=False)
    q["c_mono"] = quantity(c_mono, "c_mono", unit="F", minimum=0.0, min_inclusive=False)
    q["vcc"] = quantity(vcc, "vcc", unit="V", minimum=0.0, min_inclusive=False)
    q["vctl"] = quantity(vctl, "vctl", unit="V", minimum=0.0, min_inclusive=False)
    q["v_rest"] = _start_or_given(vsat, q["r_mono"], q["vcc"], fam)
    q["_vsat_fixed"] = vsat is not None
    return q


def two_timer_pwm(*, ra: Any, rb: Any, c: Any, r_mono: Any, c_mono: Any, vcc: Any, vctl: Any,
                  timer: str | TimerFamily = "bipolar", clock_timer: str | TimerFamily | None = None,
                  vsat: Any = None) -> TwoTimerPwm:
    """Duty of the two-timer fixed-frequency PWM at a control voltage (exact RC model).

    Parameters
    ----------
    ra, rb, c : clock astable (classic topology): charge resistor, discharge resistor, capacitor [Ω], [Ω], [F]
    r_mono, c_mono : monostable timing resistor and capacitor [Ω], [F]
    vcc : supply of both timers [V]
    vctl : control-pin voltage of the monostable (scalar or array) [V]
    timer : monostable timer family
    clock_timer : clock timer family (default: the same)
    vsat : rest level of the monostable capacitor [V] (default :func:`~pwmkit.timing.monostable.start_level`)

    Returns
    -------
    TwoTimerPwm

    Raises
    ------
    DesignError
        Bad input; a control voltage the capacitor cannot reach (``vctl >= vcc``) or at/below its
        start level; a pulse that does not end before the next clock trigger (the output would
        skip cycles) — the message gives the highest usable control voltage.

    Examples
    --------
    >>> p = two_timer_pwm(ra=20e3, rb=1e3, c=100e-9, r_mono=10e3, c_mono=100e-9, vcc=12.0, vctl=6.0, vsat=0.0)
    >>> round(p.frequency, 2), round(p.duty, 4)
    (655.22, 0.4542)

    References
    ----------
    .. [1] C. K. Alexander, M. N. O. Sadiku, *Fundamentals of Electric Circuits*, 6th ed., ch. 7.
    .. [2] Data sheets of the bipolar and CMOS 555-type timer families: monostable operation, the
       trigger held low keeps the output high, and the pulse-width-modulation application
       (typical published datasheet values, generic; common practice).
    """
    q = _inputs(ra, rb, c, r_mono, c_mono, vcc, vctl, timer, clock_timer, vsat)
    return _two_timer_core(q)


def _clock(q: dict[str, Any]) -> Any:
    from .astable import astable

    return astable("classic", ra=q["ra"], rb=q["rb"], c=q["c"], vcc=q["vcc"], timer=q["clock_timer"])


def _settle(vcc: Any, vctl: Any, v_rest: Any, rc: Any, tau_d: Any, t_trig: Any, period: Any) -> tuple[Any, Any, Any, Any]:
    """The settled cycle by fixed-point iteration: (start voltage [V], width [s], high time [s], peak [V]).

    Each period the monostable capacitor starts from what the discharge left of the last peak; the
    width, high time and peak follow from that start (no error-state handling: callers set it).
    """
    v0 = np.asarray(v_rest, dtype=float)
    atol = 1e-15 * float(np.max(vcc))
    for _ in range(_FIXED_POINT_STEPS):
        w = np.log((vcc - v0) / (vcc - vctl)) * rc
        t_high = np.maximum(w, t_trig)
        v_peak = np.where(w >= t_trig, vctl, vcc - (vcc - v0) * np.exp(-t_trig / rc))
        v0_new = v_rest + (v_peak - v_rest) * np.exp(-np.maximum(period - t_high, 0.0) / tau_d)
        done = bool(np.all(np.abs(v0_new - v0) <= atol))  # np.allclose(rtol=0) without its overhead
        v0 = v0_new
        if done:
            break
    w = np.log((vcc - v0) / (vcc - vctl)) * rc
    t_high = np.maximum(w, t_trig)
    v_peak = np.where(w >= t_trig, vctl, vcc - (vcc - v0) * np.exp(-t_trig / rc))
    return v0, w, t_high, v_peak


def _duty_only(q: dict[str, Any], vctl: float) -> float:
    """Duty [1] of the settled cycle at one control voltage inside the working range, unchecked.

    For inner loops (the heater's closed loop) that have checked the inputs and the range once:
    the same fixed point as :func:`two_timer_pwm`, without the limits, the slope and the result object.
    """
    clk = q["_clock"] if q.get("_clock") is not None else _clock(q)
    r, cm = float(q["r_mono"]), float(q["c_mono"])
    r_dis = discharge_resistance(q["timer"])
    period, t_trig = float(clk.period), float(clk.t_low)
    with np.errstate(all="ignore"):
        t_high = _settle(float(q["vcc"]), vctl, float(q["v_rest"]), r * cm, r * r_dis / (r + r_dis) * cm, t_trig,
                         period)[2]
    return float(t_high) / period


def _two_timer_core(q: dict[str, Any]) -> TwoTimerPwm:
    from ._derived import monostable_width, two_timer_duty

    clk = q["_clock"] if q.get("_clock") is not None else _clock(q)
    vcc, vctl, v_rest = q["vcc"], q["vctl"], q["v_rest"]
    r, cm = q["r_mono"], q["c_mono"]
    rc = np.asarray(r) * cm
    period, t_trig = np.asarray(clk.period), np.asarray(clk.t_low)
    _check_threshold(vctl, vcc, v_rest,
                     "vctl: {v:.4g} V cannot be reached: the monostable capacitor charges toward the supply "
                     "{s:.4g} V and never gets there; allowed vctl < vcc",
                     "vctl: {v:.4g} V is not above the monostable's start level {s:.4g} V; raise vctl")
    r_dis = discharge_resistance(q["timer"])
    tau_d = np.asarray(r) * r_dis / (np.asarray(r) + r_dis) * cm
    t_rec = tau_d * math.log(1.0 / RECOVERY_FRACTION)
    # limits of the range with a fully recovered capacitor
    vctl_min = vcc - (vcc - v_rest) * np.exp(-t_trig / rc)
    vctl_max = vcc - (vcc - v_rest) * np.exp(-(period - t_rec) / rc)
    with np.errstate(all="ignore"):
        w_full = np.asarray(monostable_width(r, cm, vcc, vctl, v_rest)[0], dtype=float)
    bad = np.logical_not(np.maximum(w_full, t_trig) < period)
    if np.any(bad):
        v, vmax, f = _first(bad, vctl, vctl_max, 1.0 / period)
        raise DesignError(f"vctl: at {v:.4g} V the monostable pulse does not end before the next clock trigger "
                          f"(clock {f:.4g} Hz), so the output skips cycles; keep vctl below about {vmax:.4g} V "
                          "or lengthen the clock period")
    with np.errstate(all="ignore"):
        v0, w, t_high, v_peak = _settle(vcc, vctl, v_rest, rc, tau_d, t_trig, period)
        duty = t_high / period
        slope = np.asarray(two_timer_duty(r, cm, vcc, vctl, v_rest, period)[1], dtype=float)
    if not (np.all(np.isfinite(duty)) and np.all(np.isfinite(w))):
        raise DesignError("two_timer_pwm: non-finite timing (component values too extreme for double precision)")
    shape = np.broadcast(duty, vctl, vcc, r, cm, period).shape
    return TwoTimerPwm(
        timer=q["timer"].name, clock_timer=q["clock_timer"].name, vctl=_out(vctl, shape), period=_out(period, shape),
        frequency=_out(1.0 / period, shape), t_trigger=_out(t_trig, shape), width=_out(w, shape),
        t_high=_out(t_high, shape), duty=_out(duty, shape), v_start=_out(v0, shape), v_rest=_out(v_rest, shape),
        v_peak=_out(v_peak, shape), t_recovery=_out(t_rec, shape), duty_min=_out(t_trig / period, shape),
        duty_max=_out((period - t_rec) / period, shape), vctl_min=_out(vctl_min, shape),
        vctl_max=_out(vctl_max, shape), duty_per_volt=_out(slope, shape), vcc=_out(vcc, shape),
    )


@dataclass(frozen=True)
class ControlRange:
    """Duty of the two-timer PWM over a control-voltage range.

    Attributes
    ----------
    vctl : control voltages of the sweep [V]; duty : duty there [1]
    vctl_low, vctl_high : ends of the range asked for [V]
    duty_low, duty_high : duty at the ends [1]
    slope : endpoint straight line, ``(duty_high − duty_low)/(vctl_high − vctl_low)`` [1/V]
    linearity_error : largest deviation of the duty from that line, in duty [1]
    vctl_worst : control voltage of the largest deviation [V]
    duty_reachable : (minimum, maximum) duty the circuit can give at all [1]
    vctl_reachable : control voltages of those limits [V]
    supply_sensitivity : ``∂D/∂V_cc`` with a fixed control voltage (clock included) [1/V]
    supply_sensitivity_ratiometric : the same with the control voltage proportional to the supply
        (a divider from the same supply) [1/V]
    frequency : clock frequency [Hz]
    """

    vctl: np.ndarray
    duty: np.ndarray
    vctl_low: float
    vctl_high: float
    duty_low: float
    duty_high: float
    slope: float
    linearity_error: float
    vctl_worst: float
    duty_reachable: tuple[float, float]
    vctl_reachable: tuple[float, float]
    supply_sensitivity: float
    supply_sensitivity_ratiometric: float
    frequency: float

    def __repr__(self) -> str:
        return (f"ControlRange({self.vctl_low:.4g} … {self.vctl_high:.4g} V → duty {100 * self.duty_low:.3g} … "
                f"{100 * self.duty_high:.4g} %, linearity ±{100 * self.linearity_error:.3g} pt, "
                f"f={self.frequency:.5g} Hz)")

    def _repr_html_(self) -> str:
        from ..values import format_value as fv
        from .monostable import _html_table

        return _html_table("two-timer PWM over the control range", [
            ("control range (pin)", f"{fv(self.vctl_low, 'V', 4)} … {fv(self.vctl_high, 'V', 4)}"),
            ("duty", f"{100 * self.duty_low:.3g} … {100 * self.duty_high:.4g} %"),
            ("slope", f"{100 * self.slope:.3g} points/V"),
            ("linearity (endpoint line)", f"±{100 * self.linearity_error:.3g} points at {fv(self.vctl_worst, 'V', 3)}"),
            ("reachable duty", f"{100 * self.duty_reachable[0]:.3g} … {100 * self.duty_reachable[1]:.4g} %"),
            ("supply sensitivity", f"{100 * self.supply_sensitivity:+.3g} points/V fixed control, "
                                   f"{100 * self.supply_sensitivity_ratiometric:+.2g} points/V ratiometric"),
            ("frequency", fv(self.frequency, "Hz", 5))])


def control_range(*, vctl_low: Any, vctl_high: Any, points: int = _LINEARITY_POINTS, **kwargs: Any) -> ControlRange:
    """Duty range, linearity and supply sensitivity of the two-timer PWM over ``vctl_low … vctl_high``.

    The linearity error is the largest distance of the exact duty from the straight line through
    the two ends of the range (endpoint line); it is found on a grid of ``points`` control voltages
    and, for the fully recovered log law, at the analytic point where the slope of the duty equals
    the line's slope, ``V* = V_cc − R_M C_M/(T·slope)``. Supply sensitivities are central
    differences of the exact model at the middle of the range (± 10 mV), the clock's own supply
    dependence included.

    Parameters
    ----------
    vctl_low, vctl_high : ends of the control range, low < high [V]
    points : grid size, 3 … 10001
    **kwargs : the circuit, as for :func:`two_timer_pwm` (without ``vctl``)

    Examples
    --------
    >>> r = control_range(vctl_low=2.0, vctl_high=8.0, ra=20e3, rb=1e3, c=100e-9, r_mono=10e3, c_mono=100e-9,
    ...                   vcc=12.0, vsat=0.0)
    >>> round(r.duty_low, 4), round(r.duty_high, 4), round(r.linearity_error, 3)
    (0.1195, 0.7198, 0.068)

    References
    ----------
    .. [1] Endpoint (terminal-based) linearity as quoted for sensors and converters: the largest
       deviation from the straight line through the two end points (common practice).
    """
    lo = float(quantity(vctl_low, "vctl_low", unit="V", minimum=0.0, min_inclusive=False))
    hi = float(quantity(vctl_high, "vctl_high", unit="V", minimum=0.0, min_inclusive=False))
    if not hi > lo:
        raise DesignError(f"vctl_high: {hi:g} V is not above vctl_low {lo:g} V; allowed vctl_low < vctl_high")
    if isinstance(points, bool) or not isinstance(points, (int, np.integer)) or not 3 <= points <= 10001:
        raise DesignError(f"points: {points!r} is not allowed; give a whole number 3 … 10001")
    if "vctl" in kwargs:
        raise DesignError("vctl: give the range as vctl_low and vctl_high, not vctl")
    grid = np.linspace(lo, hi, int(points))
    q = _inputs(vctl=grid, **_circuit_args(kwargs))
    for name in ("ra", "rb", "c", "r_mono", "c_mono", "vcc"):
        if np.ndim(q[name]) != 0:
            raise DesignError(f"{name}: control_range takes one circuit; give a single value")
    q["_clock"] = _clock(q)  # one clock for every evaluation at this supply (the supply steps below drop it)
    res = _two_timer_core(q)
    duty = np.asarray(res.duty)
    slope = (duty[-1] - duty[0]) / (hi - lo)
    dev = duty - (duty[0] + slope * (grid - lo))
    k = int(np.argmax(np.abs(dev)))
    err, v_worst = abs(float(dev[k])), float(grid[k])
    if slope > 0:
        v_star = float(q["vcc"] - q["r_mono"] * q["c_mono"] / (float(res.period[0]) * slope))
        if lo < v_star < hi:
            at = _two_timer_core(dict(q, vctl=v_star))
            d = float(at.duty) - (duty[0] + slope * (v_star - lo))
            if abs(d) > err:
                err, v_worst = float(abs(d)), v_star
    mid = 0.5 * (lo + hi)
    dv = 0.01
    d_fixed = [float(_two_timer_core(dict(q, vctl=mid, vcc=q["vcc"] + s, _clock=None,
                                          v_rest=_rest(q, q["vcc"] + s))).duty) for s in (-dv, dv)]
    ratio = mid / q["vcc"]
    d_ratio = [float(_two_timer_core(dict(q, vctl=ratio * (q["vcc"] + s), vcc=q["vcc"] + s, _clock=None,
                                          v_rest=_rest(q, q["vcc"] + s))).duty) for s in (-dv, dv)]
    return ControlRange(
        vctl=grid, duty=duty, vctl_low=lo, vctl_high=hi, duty_low=float(duty[0]), duty_high=float(duty[-1]),
        slope=float(slope), linearity_error=err, vctl_worst=v_worst,
        duty_reachable=(float(res.duty_min[0]), float(res.duty_max[0])),
        vctl_reachable=(float(res.vctl_min[0]), float(res.vctl_max[0])),
        supply_sensitivity=(d_fixed[1] - d_fixed[0]) / (2 * dv),
        supply_sensitivity_ratiometric=(d_ratio[1] - d_ratio[0]) / (2 * dv), frequency=float(res.frequency[0]),
    )


def _circuit_args(kwargs: dict[str, Any]) -> dict[str, Any]:
    allowed = ("ra", "rb", "c", "r_mono", "c_mono", "vcc", "timer", "clock_timer", "vsat")
    unknown = sorted(set(kwargs) - set(allowed))
    if unknown:
        raise DesignError(f"{unknown[0]}: not a parameter of the two-timer circuit; allowed: {', '.join(allowed)}")
    missing = [k for k in allowed[:6] if k not in kwargs]
    if missing:
        raise DesignError(f"{missing[0]}: a value is required for the two-timer circuit")
    out = dict(kwargs)
    out.setdefault("timer", "bipolar")
    out.setdefault("clock_timer", None)
    out.setdefault("vsat", None)
    return out


def _rest(q: dict[str, Any], vcc: float) -> Any:
    """Rest level at another supply (a fixed ``vsat`` stays fixed)."""
    if q.get("_vsat_fixed"):
        return q["v_rest"]
    return start_level(q["r_mono"], vcc, q["timer"])
