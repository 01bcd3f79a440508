"""Inverse design of the two-timer fixed-frequency PWM onto preferred values (design layer).

Targets: the PWM frequency, and the duty range ``duty_low … duty_high`` over a control-voltage
range ``vctl_low … vctl_high`` (at the control pin). Method:

1. **clock** — for every preferred clock capacitor, the trigger pulse (clock low time, the
   minimum pulse) is given a share of the period, ``trigger_fraction`` (default: a quarter of
   ``duty_low``, so the minimum pulse stays below the lowest duty asked for); the textbook forms
   ``t_low = ln 2·R_B·C`` and ``T = ln 2·(R_A + 2R_B)·C`` give ``R_B`` and ``R_A``;
2. **monostable** — the duty is ``k·ln((V_cc − V_s)/(V_cc − V_ctl))`` with ``k = R_M C_M/T``; one
   factor cannot meet both ends of the range exactly (their ratio is fixed by the two control
   voltages), so ``k`` is the geometric mean of the two end values (equal relative error at both
   ends); for every preferred ``C_M``, ``R_M = k·T/C_M``;
3. every combination of the two preferred neighbours of each part is evaluated with the exact
   model in one vectorised call (:func:`pwmkit.timing.two_timer_pwm` at both ends of the range:
   switch drops, start level and recovery included), candidates are ranked by the worst relative
   error of frequency and duty ends (ties: timing resistors nearest 47 kΩ), and the best get the
   full :func:`pwmkit.timing.control_range` (linearity).

Candidates whose pulse would outlast the clock period anywhere in the range, or whose timing
resistors fall outside 1 kΩ … 10 MΩ (common practice for 555-type timers), are dropped.
"""

from __future__ import annotations

import itertools
import math
from dataclasses import dataclass
from typing import Any

import numpy as np

from ._validate import quantity
from .errors import DesignError

__all__ = ["TwoTimerCandidate", "TwoTimerSynthesis", "synthesize_two_timer"]

_R_MIN, _R_MAX = 1e3, 10e6  # Ω (common practice)


@dataclass(frozen=True)
class TwoTimerCandidate:
    """One preferred-value solution.

    Attributes
    ----------
    ra, rb, c : clock parts [Ω], [Ω], [F]
    r_mono, c_mono : monostable parts [Ω], [F]
    frequency : exact PWM frequency [Hz]
    duty_low, duty_high : exact duty at the ends of the control range [1]
    t_trigger : minimum pulse (clock low time) [s]
    linearity_error : largest deviation from the endpoint straight line [1]
    error : worst relative error of frequency, duty_low and duty_high against the targets [1]
    """

    ra: float
    rb: float
    c: float
    r_mono: float
    c_mono: float
    frequency: float
    duty_low: float
    duty_high: float
    t_trigger: float
    linearity_error: float
    error: float

    def timing_fields(self, vctl_low: float, vctl_high: float) -> dict[str, float]:
        """Keywords of :class:`pwmkit.design.Timing` for this candidate (topology "two-timer")."""
        return dict(ra=self.ra, rb=self.rb, c=self.c, r_mono=self.r_mono, c_mono=self.c_mono,
                    vctl_min=vctl_low, vctl_max=vctl_high)

    def __repr__(self) -> str:
        from .values import format_value as fv

        return (f"TwoTimerCandidate(R_A {fv(self.ra, 'Ω')}, R_B {fv(self.rb, 'Ω')}, C {fv(self.c, 'F')}; "
                f"R_M {fv(self.r_mono, 'Ω')}, C_M {fv(self.c_mono, 'F')}: f={self.frequency:.5g} Hz, duty "
                f"{100 * self.duty_low:.3g} … {100 * self.duty_high:.4g} %, error {100 * self.error:.2g} %)")


@dataclass(frozen=True)
class TwoTimerSynthesis:
    """Ranked solutions (best first) and the targets they were found for."""

    candidates: tuple[TwoTimerCandidate, ...]
    frequency: float
    duty_low: float
    duty_high: float
    vctl_low: float
    vctl_high: float
    vcc: float
    k_ideal: float

    @property
    def best(self) -> TwoTimerCandidate:
        return self.candidates[0]

    def __repr__(self) -> str:
        return (f"TwoTimerSynthesis({len(self.candidates)} candidates for {self.frequency:.5g} Hz, duty "
                f"{100 * self.duty_low:.3g} … {100 * self.duty_high:.4g} % over {self.vctl_low:.3g} … "
                f"{self.vctl_high:.3g} V; best {self.best!r})")


def synthesize_two_timer(*, frequency: Any, duty_low: Any, duty_high: Any, vctl_low: Any, vctl_high: Any, vcc: Any,
                         timer: str = "bipolar", r_series: str = "E24", c_series: str = "E12",
                         trigger_fraction: Any = None, top: int = 5) -> TwoTimerSynthesis:
    """Pick preferred values for a two-timer PWM (see the module docstring).

    Parameters
    ----------
    frequency : PWM frequency [Hz]
    duty_low, duty_high : duty wanted at ``vctl_low`` and ``vctl_high``, 0 < low < high < 1 [1]
    vctl_low, vctl_high : control range at the pin, 0 < low < high < vcc [V]
    vcc : supply [V]
    timer : timer family of both timers
    r_series, c_series : preferred-value series (IEC 60063)
    trigger_fraction : share of the period for the clock's trigger pulse (default duty_low/4) [1]
    top : number of candidates returned (1 … 50)

    Returns
    -------
    TwoTimerSynthesis

    Raises
    ------
    DesignError
        Bad targets, or no preferred-value combination that works.

    Examples
    --------
    >>> s = synthesize_two_timer(frequency=240, duty_low=0.2, duty_high=0.45, vctl_low=4.0, vctl_high=7.0, vcc=12)
    >>> abs(s.best.frequency / 240 - 1) < 0.05
    True
    """
    from . import eseries
    from .timing import astable, control_range, two_timer_pwm
    from .timing.monostable import start_level

    f = float(quantity(frequency, "frequency", unit="Hz", minimum=0.0, min_inclusive=False))
    vcc = float(quantity(vcc, "vcc", unit="V", minimum=0.0, min_inclusive=False))
    dl = float(quantity(duty_low, "duty_low", minimum=0.0, maximum=1.0, min_inclusive=False, max_inclusive=False))
    dh = float(quantity(duty_high, "duty_high", minimum=0.0, maximum=1.0, min_inclusive=False, max_inclusive=False))
    vl = float(quantity(vctl_low, "vctl_low", unit="V", minimum=0.0, min_inclusive=False))
    vh = float(quantity(vctl_high, "vctl_high", unit="V", minimum=0.0, min_inclusive=False))
    if not dl < dh:
        raise DesignError(f"duty_high: {dh:g} is not above duty_low {dl:g}; allowed duty_low < duty_high")
    if not vl < vh < vcc:
        raise DesignError(f"vctl_high: the control range {vl:g} … {vh:g} V must rise and stay below the supply "
                          f"{vcc:g} V (the capacitor charges toward the supply and never reaches it)")
    frac = dl / 4.0 if trigger_fraction is None else float(
        quantity(trigger_fraction, "trigger_fraction", minimum=0.0, maximum=0.5, min_inclusive=False))
    if isinstance(top, bool) or not isinstance(top, int) or not 1 <= top <= 50:
        raise DesignError(f"top: {top!r} is not allowed; give a whole number 1 … 50")
    period = 1.0 / f
    vs = float(start_level(10e3, vcc, timer))
    ll, lh = math.log((vcc - vs) / (vcc - vl)), math.log((vcc - vs) / (vcc - vh))
    k = math.sqrt(dl * dh / (ll * lh))
    c_vals = np.array(eseries.in_range(period / (math.log(2) * 2e6), period / (math.log(2) * 2e3), c_series))
    rows: list[tuple[float, float, float, float, float]] = []
    for c in c_vals:
        rb = frac * period / (math.log(2) * c)
        ra = period / (math.log(2) * c) - 2 * rb
        if ra < _R_MIN or rb < _R_MIN / 10 or ra > _R_MAX:
            continue
        for cm in c_vals:
            rm = k * period / cm
            if not _R_MIN <= rm <= _R_MAX:
                continue
            choices = [sorted({float(b.below), float(b.above)}) for b in
                       (eseries.bracket(x, r_series) for x in (ra, rb, rm))]
            rows += [(ra_p, rb_p, float(c), rm_p, float(cm)) for ra_p, rb_p, rm_p in itertools.product(*choices)]
    found: list[TwoTimerCandidate] = []
    if rows:
        a = np.array(sorted(set(rows)))
        ra_a, rb_a, c_a, rm_a, cm_a = a.T
        clk = astable("classic", ra=ra_a, rb=rb_a, c=c_a, vcc=vcc, timer=timer)
        v_rest = start_level(rm_a, vcc, timer)
        with np.errstate(all="ignore"):
            w_hi = rm_a * cm_a * np.log((vcc - v_rest) / (vcc - vh))
        ok = np.maximum(w_hi, clk.t_low) < clk.period
        if np.any(ok):
            kw = dict(ra=ra_a[ok], rb=rb_a[ok], c=c_a[ok], r_mono=rm_a[ok], c_mono=cm_a[ok], vcc=vcc, timer=timer)
            lo_res, hi_res = two_timer_pwm(vctl=vl, **kw), two_timer_pwm(vctl=vh, **kw)
            err = np.maximum.reduce([np.abs(lo_res.frequency / f - 1), np.abs(lo_res.duty / dl - 1),
                                     np.abs(hi_res.duty / dh - 1)])
            # tie-break: timing resistors near the middle of the usual range (common practice, ~47 kΩ)
            spread_r = np.abs(np.log(kw["ra"] / 47e3)) + np.abs(np.log(kw["r_mono"] / 47e3))
            order = np.lexsort((spread_r, np.round(err, 6)))[: int(top)]
            for i in order:
                r = control_range(vctl_low=vl, vctl_high=vh, ra=float(kw["ra"][i]), rb=float(kw["rb"][i]),
                                  c=float(kw["c"][i]), r_mono=float(kw["r_mono"][i]), c_mono=float(kw["c_mono"][i]),
                                  vcc=vcc, timer=timer, points=101)
                found.append(TwoTimerCandidate(
                    ra=float(kw["ra"][i]), rb=float(kw["rb"][i]), c=float(kw["c"][i]), r_mono=float(kw["r_mono"][i]),
                    c_mono=float(kw["c_mono"][i]), frequency=r.frequency, duty_low=r.duty_low, duty_high=r.duty_high,
                    t_trigger=float(lo_res.t_trigger[i]), linearity_error=r.linearity_error, error=float(err[i])))
    if not found:
        raise DesignError(f"synthesis: no preferred-value two-timer design gives {f:g} Hz with duty {dl:g} … {dh:g} "
                          f"over {vl:g} … {vh:g} V at {vcc:g} V; widen the control range or lower duty_high")
    return TwoTimerSynthesis(candidates=tuple(found), frequency=f, duty_low=dl, duty_high=dh, vctl_low=vl,
                             vctl_high=vh, vcc=vcc, k_ideal=k)
