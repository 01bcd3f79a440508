"""Design rules of the two-timer fixed-frequency PWM (astable clock + voltage-controlled monostable).

Rules read ``ev.two_timer`` (see :mod:`pwmkit.evaluate_two_timer`) and give no finding for other
topologies. Thresholds and their origins are in each docstring.
"""

from __future__ import annotations

from typing import Any

from ..parts.timers import get_timer
from ._common import finding, fmt, grade, pct, registry

__all__ = ["RULES", "duty_range_two_timer"]

RULES, _rule = registry()

_PULSE_WARN = 10.0  # minimum pulse at least 10× the switching time (our judgement: edges < 10 % of the pulse)
_PULSE_FAIL = 2.0  # below 2× the MOSFET never fully turns on within the pulse (our judgement)
_LINEARITY_WARN = 0.05  # 5 duty points from the straight line (our judgement)
_BIAS_WARN, _BIAS_FAIL = 0.01, 0.10  # as timing.bias_current (1 % rule, common practice)


def _part(ev: Any) -> Any:
    return getattr(ev, "two_timer", None)


@_rule("two_timer.control_range")
def control_range_rule(design: Any, ev: Any) -> Any:
    """The control range works over the supply range and stays inside the reachable duty.

    Fail when part of ``vctl_min … vctl_max`` cannot be used at the nominal or the lowest supply
    (the capacitor cannot reach the voltage, or the pulse outlasts the clock period and the output
    skips cycles); warn when an end of the range lies outside the reachable duty (below the
    minimum pulse the duty stops falling); ok otherwise. Origin: datasheet-generic (thresholds,
    trigger override).
    """
    tt = _part(ev)
    if tt is None:
        return None
    title = "Control range vs supply and reachable duty"
    if tt.control_error:
        return finding("two_timer.control_range", "fail", title, None, None, "V",
                       f"Part of the control range {fmt(design.timing.vctl_min, 'V')} … "
                       f"{fmt(design.timing.vctl_max, 'V')} cannot be used: {tt.control_error}",
                       "Lower vctl_max (keep it below the supply minus the headroom), lengthen the clock period "
                       "or shorten r_mono·c_mono.", "datasheet-generic")
    c = tt.control
    (v_lo, v_hi) = c.vctl_reachable
    if c.vctl_low < v_lo:
        return finding("two_timer.control_range", "warn", title, c.vctl_low, v_lo, "V",
                       f"Below {fmt(v_lo, 'V')} the pulse is the clock's trigger pulse: the duty stays at "
                       f"{pct(c.duty_reachable[0])} down to {fmt(c.vctl_low, 'V')}.",
                       "Shorten the clock's low time (smaller rb) or raise vctl_min.", "datasheet-generic")
    return finding("two_timer.control_range", "ok", title, c.vctl_high, v_hi, "V",
                   f"The control range {fmt(c.vctl_low, 'V')} … {fmt(c.vctl_high, 'V')} (at the pin) gives "
                   f"{pct(c.duty_low)} … {pct(c.duty_high)} duty; usable up to {fmt(v_hi, 'V')}.", "",
                   "datasheet-generic")


@_rule("two_timer.min_pulse")
def min_pulse(design: Any, ev: Any) -> Any:
    """Minimum pulse (the clock's trigger pulse) against the MOSFET's switching time.

    Ratio ``t_trigger / (t_on + t_off)`` of the gate drive: ok ≥ 10, warn ≥ 2, fail below (our
    judgement: below 2× the switch never settles within the shortest pulse and the duty no longer
    follows the timing). Origin: common practice.
    """
    tt = _part(ev)
    if tt is None or ev.gate is None:
        return None
    t_min = float(tt.pwm.t_trigger)
    t_sw = float(ev.gate.t_on + ev.gate.t_off)
    ratio = t_min / t_sw
    sev = "fail" if ratio < _PULSE_FAIL else "warn" if ratio < _PULSE_WARN else "ok"
    return finding("two_timer.min_pulse", sev, "Minimum pulse vs switching time", ratio, _PULSE_WARN, "",
                   f"The shortest output pulse is the clock's low time {fmt(t_min, 's')}; the MOSFET needs "
                   f"{fmt(t_sw, 's')} to switch on and off ({ratio:.3g}×).",
                   "Lengthen the clock's low time (larger rb) or speed up the gate drive (smaller r_gate).",
                   "common-practice")


@_rule("two_timer.linearity")
def linearity(design: Any, ev: Any) -> Any:
    """Linearity of duty vs control voltage over the control range.

    Largest distance of the duty from the straight line through the ends of the range: ok up to 5
    duty points, warn above (our judgement; the log law bends toward the supply). Origin:
    common practice.
    """
    tt = _part(ev)
    if tt is None or tt.control is None:
        return None
    c = tt.control
    sev = "warn" if c.linearity_error > _LINEARITY_WARN else "ok"
    return finding("two_timer.linearity", sev, "Duty vs control voltage: linearity", 100 * c.linearity_error,
                   100 * _LINEARITY_WARN, "points",
                   f"The duty departs from the straight line through the ends of the range by up to "
                   f"{100 * c.linearity_error:.3g} points (at {fmt(c.vctl_worst, 'V')}); the log law "
                   "R·C·ln((Vcc − V0)/(Vcc − Vctl)) bends up toward the supply.",
                   "Use a narrower control range farther below the supply, or a constant-current charge.",
                   "common-practice")


@_rule("two_timer.mono_bias")
def mono_bias(design: Any, ev: Any) -> Any:
    """Threshold bias current through the monostable resistor against its headroom.

    Ratio ``i_threshold_max·r_mono / (vcc_min − vctl_max)`` (at the top of the control range, where
    the headroom is smallest): ok ≤ 1 % (common practice rule of thumb), warn ≤ 10 %, fail above.
    Origin: common practice; datasheet-generic bias currents.
    """
    tt = _part(ev)
    if tt is None:
        return None
    fam = get_timer(design.timing.timer)
    v_top = tt.control.vctl_high if tt.control is not None else float(tt.pwm.vctl)
    head = design.supply_range[0] - v_top
    if head <= 0:
        return None  # two_timer.control_range fails already
    ratio = fam.i_threshold_max * design.timing.r_mono / head
    sev = grade(ratio, _BIAS_WARN, _BIAS_FAIL)
    return finding("two_timer.mono_bias", sev, "Monostable bias current vs headroom", 100 * ratio, 100 * _BIAS_WARN,
                   "%", f"Up to {fmt(fam.i_threshold_max, 'A')} through {fmt(design.timing.r_mono, 'Ω')} against "
                   f"{fmt(head, 'V')} of headroom shifts the pulse by about {100 * ratio:.3g} %.",
                   "Use a smaller r_mono and a larger c_mono, or a CMOS timer.", "common-practice")


def duty_range_two_timer(design: Any, ev: Any, title: str) -> Any:
    """``duty.range`` for the two-timer topology: the control range must reach ``duty_min … duty_max``.

    Fail when the nominal duty over the control range (or, without one, the nominal duty) misses
    the required range. Then the spread is judged by ``requirements.criterion`` as for the pot
    topology's reach: ``worst-case`` — the duty at ``vctl_min`` must get down to ``duty_min`` and the
    duty at ``vctl_max`` up to ``duty_max`` in every corner; ``yield`` — the Monte Carlo share of
    builds that do both must reach ``min_yield``. Not run in quick mode. Origin: the design's own
    requirement; criteria common practice.
    """
    from .timing_rules import _duty_reach_verdict

    req = design.requirements
    tt = _part(ev)
    if tt is None or tt.control is None:
        lo = hi = float(ev.timing.duty)
    else:
        lo, hi = tt.control.duty_low, tt.control.duty_high
    want_lo = req.duty_min if req.duty_min is not None else (req.duty if req.duty is not None else lo)
    want_hi = req.duty_max if req.duty_max is not None else (req.duty if req.duty is not None else hi)
    short = max(lo - want_lo, want_hi - hi, 0.0)
    window = f"{pct(want_lo)} … {pct(want_hi)}"
    if short > 1e-9:
        return finding("duty.range", "fail", title, 100 * short, 0.0, "points",
                       f"The control range gives {pct(lo)} … {pct(hi)} duty; required {window}.",
                       "Widen the control range, or re-pick r_mono and c_mono against the clock period (synthesis).",
                       "common-practice")
    nominal = f"The control range gives {pct(lo)} … {pct(hi)} duty at the nominal values (required {window})"
    rs = getattr(ev, "requirement_spread", None)
    return _duty_reach_verdict(design, ev, rs, title, nominal, want_lo, want_hi, "range",
                               "Widen the control range beyond the required duty, or use tighter monostable parts.")
