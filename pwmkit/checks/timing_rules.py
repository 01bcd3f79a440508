"""Design rules of the timer and its timing network.

Every rule reads an evaluation (see :func:`pwmkit.evaluate.evaluate`) and returns one
:class:`~pwmkit.checks.findings.Finding`, or None when it does not apply to the design. Rules do
no physics of their own: they compare figures computed by the model functions with limits.
Thresholds and their origins are in each rule's docstring.
"""

from __future__ import annotations

from collections.abc import Callable
from typing import Any

import numpy as np

from ..parts.timers import get_timer
from ._common import finding, fmt, grade, pct, registry, spread_band

__all__ = ["RULES"]

RULES, _rule = registry()

_DIS_WARN_FRACTION = 0.5  # warn above half the discharge-current limit (our judgement)
_END_RESISTOR_MIN = 1e3  # Ω; keep RA >= 1 kΩ (common practice)
_BIAS_WARN = 0.01  # 1 % shift of the charge headroom (common practice rule of thumb)
_BIAS_FAIL = 0.10  # 10 % (our judgement: the timing is then set by the leakage, not the resistors)
_FMAX_WARN_FRACTION = 0.5  # warn above half the family's practical maximum (our judgement)


@_rule("supply.oscillation")
def supply_oscillation(design: Any, ev: Any) -> Any:
    """The astable must oscillate at both ends of the supply range.

    Fail when the charge asymptote does not exceed the upper threshold or the discharge asymptote
    does not fall below the lower threshold at ``vcc_min`` or ``vcc_max`` (oscillation conditions of the RC law: Alexander & Sadiku, Fundamentals of Electric Circuits, 6th ed., ch. 7); ok
    otherwise. Origin: datasheet-generic (thresholds 1/3 and 2/3 of the supply).
    """
    err = ev.corners.error
    lo, hi = design.supply_range
    title = "Oscillates over the supply range"
    if err:
        return finding("supply.oscillation", "fail", title, None, None, "V",
                       f"At the ends of the supply range {fmt(lo, 'V')} … {fmt(hi, 'V')} the timer stops: {err}",
                       "Raise the minimum supply, use a lower-drop steering diode or drive the control pin.",
                       "datasheet-generic")
    return finding("supply.oscillation", "ok", title, None, None, "V",
                   f"The astable oscillates at {fmt(lo, 'V')} and at {fmt(hi, 'V')}.", "", "datasheet-generic")


@_rule("tolerance.analysis")
def tolerance_analysis(design: Any, ev: Any) -> Any:
    """The tolerance analysis ran and every sample oscillates.

    Applies when the supply corners oscillate; listed as not run until the tolerance analysis runs
    (quick mode). Fail when
    Monte Carlo samples or worst-case points do not oscillate (the design sits near the limits of
    oscillation conditions of the RC law: Alexander & Sadiku, Fundamentals of Electric Circuits, 6th ed., ch. 7); warn when part of the analysis could not run for another reason (e.g. an
    ambient outside the capacitor dielectric's rated range); ok otherwise. Origin:
    datasheet-generic (thresholds 1/3 and 2/3 of the supply).
    """
    if ev.corners.error:
        return None
    title = "Tolerance analysis: oscillates over the spread"
    if ev.conditions.quick:
        return finding("tolerance.analysis", "not-run", title, None, None, "",
                       f"Not run: {_NOT_RUN_WHY}.", "", "datasheet-generic")
    note = ev.conditions.spread_note
    failed = ev.conditions.spread_stops
    if note is None:
        return finding("tolerance.analysis", "ok", title, 0.0, 0.0, "", "Every Monte Carlo sample and every "
                       "worst-case corner oscillates.", "", "datasheet-generic")
    return finding("tolerance.analysis", "fail" if failed else "warn", title,
                   None if ev.spread is None else float(ev.spread.n_failed), 0.0, "",
                   f"Part of the tolerance analysis fails: {note}",
                   "Move the design away from the oscillation limits: more supply headroom over the diode drop "
                   "and thresholds, or narrower tolerances.", "datasheet-generic")


@_rule("supply.timer_range")
def supply_timer_range(design: Any, ev: Any) -> Any:
    """Supply range inside the timer family's recommended range.

    Fail below the family minimum or above its absolute maximum; warn between the recommended
    maximum and the absolute maximum; ok inside. Origin: datasheet-generic (bipolar 4.5–16 V, 18 V
    absolute; CMOS 2–15 V, 18 V absolute).
    """
    fam = get_timer(design.timing.timer)
    lo, hi = design.supply_range
    from ..glossary import timer_label

    title = f"Supply inside the {timer_label(fam.name)} timer's range"
    span = f"{fmt(fam.vcc_min, 'V')} … {fmt(fam.vcc_max, 'V')}"
    if lo < fam.vcc_min:
        return finding("supply.timer_range", "fail", title, lo, fam.vcc_min, "V",
                       f"The supply goes down to {fmt(lo, 'V')}, below the {fam.description}'s minimum "
                       f"{fmt(fam.vcc_min, 'V')} (recommended {span}).",
                       "Raise the supply or use a timer family that runs from a lower voltage (CMOS).",
                       fam.origin.get("vcc_min", "datasheet-generic"))
    if hi > fam.vcc_abs_max:
        return finding("supply.timer_range", "fail", title, hi, fam.vcc_abs_max, "V",
                       f"The supply reaches {fmt(hi, 'V')}, above the absolute maximum {fmt(fam.vcc_abs_max, 'V')}.",
                       "Regulate the timer supply (a Zener or linear regulator) below the recommended maximum.",
                       fam.origin.get("vcc_abs_max", "datasheet-generic"))
    if hi > fam.vcc_max:
        return finding("supply.timer_range", "warn", title, hi, fam.vcc_max, "V",
                       f"The supply reaches {fmt(hi, 'V')}: above the recommended {span} but below the absolute "
                       f"maximum {fmt(fam.vcc_abs_max, 'V')}; timing and life are not guaranteed there.",
                       "Regulate the timer supply inside the recommended range.",
                       fam.origin.get("vcc_max", "datasheet-generic"))
    return finding("supply.timer_range", "ok", title, hi, fam.vcc_max, "V",
                   f"Supply {fmt(lo, 'V')} … {fmt(hi, 'V')} lies inside the recommended {span}.", "",
                   fam.origin.get("vcc_max", "datasheet-generic"))


@_rule("discharge.current")
def discharge_current(design: Any, ev: Any) -> Any:
    """Peak current into the discharge pin.

    While DIS is on it sinks the current from ``ra``, ``(vcc_max − vsat)/ra``, plus the capacitor's
    discharge peak ``(v_upper − v_discharge)/r_discharge`` (smallest ``r_discharge`` over the pot
    travel, at ``vcc_max``). Ok up to half the family limit, warn up to the limit, fail above.
    Origin of the limits: bipolar 50 mA common practice (its data sheets give no explicit limit,
    only package dissipation, and keep RA ≥ 1 kΩ); CMOS 100 mA datasheet-generic (highest
    specified on-state current).
    """
    fam = get_timer(design.timing.timer)
    t = ev.corners.timing_max if ev.corners.timing_max is not None else ev.timing
    if getattr(ev, "two_timer", None) is not None:  # the clock astable (the monostable is in two_timer_rules)
        t = ev.two_timer.clock
    vcc = float(np.max(t.vcc))
    vsat = design.timing.vsat if design.timing.vsat is not None else fam.vsat
    i_ra = (vcc - vsat) / design.timing.ra
    with np.errstate(divide="ignore"):
        i_cap = np.max(np.where(np.asarray(t.r_discharge) > 0,
                                (np.asarray(t.v_upper) - np.asarray(t.v_discharge)) / np.asarray(t.r_discharge),
                                np.inf))
    i_cap = float(min(i_cap, 1e3))
    total = i_ra + i_cap
    limit = fam.i_discharge_max
    sev = grade(total, _DIS_WARN_FRACTION * limit, limit)
    return finding("discharge.current", sev, "Discharge-pin peak current", total, limit, "A",
                   f"At {fmt(vcc, 'V')} the discharge pin sinks {fmt(i_ra, 'A')} from ra plus a capacitor peak of "
                   f"{fmt(i_cap, 'A')}: {fmt(total, 'A')} against a {fmt(limit, 'A')} limit "
                   f"({pct(total / limit)}; warn above {pct(_DIS_WARN_FRACTION)}).",
                   "Raise ra and the discharge-path end resistor (keep ra ≥ 1 kΩ) and scale the capacitor down.",
                   fam.origin.get("i_discharge_max", "common-practice"))


@_rule("pot.end_resistors")
def pot_end_resistors(design: Any, ev: Any) -> Any:
    """End resistors of the pot-steered topology.

    ``ra`` (R1) limits the discharge-pin current and ``rb`` the capacitor's discharge current when the
    wiper reaches an end. Ok when both are ≥ 1 kΩ; warn below; fail for ``rb = 0`` (at the
    discharge end of the travel the capacitor is dumped straight into DIS). Origin: common practice
    (timer data sheets specify the astable with RA = 1–100 kΩ).
    """
    t = design.timing
    if t.topology != "pot":
        return None
    small = min(t.ra, t.rb)
    title = "Pot end resistors"
    if t.rb == 0:
        return finding("pot.end_resistors", "fail", title, small, _END_RESISTOR_MIN, "Ω",
                       "rb = 0: with the wiper at the discharge end the capacitor discharges straight into the "
                       "discharge pin through the steering diode only.",
                       "Fit an end resistor rb of at least 1 kΩ.", "common-practice")
    sev = "ok" if small >= _END_RESISTOR_MIN else "warn"
    return finding("pot.end_resistors", sev, title, small, _END_RESISTOR_MIN, "Ω",
                   f"ra = {fmt(t.ra, 'Ω')}, rb = {fmt(t.rb, 'Ω')}; below about 1 kΩ the charge or discharge "
                   "current at the end of the pot travel gets large.",
                   "Use end resistors of 1 kΩ or more (and a smaller capacitor for the same frequency).",
                   "common-practice")


@_rule("timing.bias_current")
def timing_bias_current(design: Any, ev: Any) -> Any:
    """Threshold-input bias current against the timing headroom.

    Ratio ``i_threshold_max·r / headroom`` for the charge (``r_charge``, headroom ``v_charge −
    v_upper``) and the discharge (``r_discharge``, headroom ``v_lower − v_discharge``), worst over
    the pot travel at ``vcc_min``. Ok ≤ 1 % (common practice rule of thumb), warn ≤ 10 %, fail
    above (our judgement: the bias current, not the resistors, then sets the timing). Origin:
    common practice (1 % rule), datasheet-generic (bipolar 250 nA, CMOS 150 pA maximum).
    """
    fam = get_timer(design.timing.timer)
    t = ev.corners.timing_min if ev.corners.timing_min is not None else ev.timing
    if getattr(ev, "two_timer", None) is not None:  # the clock astable (the monostable is in two_timer_rules)
        t = ev.two_timer.clock
    i_b = fam.i_threshold_max
    charge = i_b * np.asarray(t.r_charge) / (np.asarray(t.v_charge) - np.asarray(t.v_upper))
    dis = i_b * np.asarray(t.r_discharge) / (np.asarray(t.v_lower) - np.asarray(t.v_discharge))
    ratio = float(max(np.max(charge), np.max(dis)))
    sev = grade(ratio, _BIAS_WARN, _BIAS_FAIL)
    return finding("timing.bias_current", sev, "Threshold bias current vs timing headroom", 100 * ratio,
                   100 * _BIAS_WARN, "%",
                   f"The {fam.name} timer's threshold current (up to {fmt(i_b, 'A')}) through the timing resistors "
                   f"(up to {fmt(float(np.max(t.r_charge)), 'Ω')}) shifts the charge/discharge headroom by "
                   f"{100 * ratio:.3g} % at {fmt(float(np.min(t.vcc)), 'V')}.",
                   "Use smaller timing resistors and a larger capacitor, or a CMOS timer (pA bias current).",
                   "common-practice")


def _travel_range(ev: Any, name: str) -> tuple[float, float]:
    if ev.pot_travel is not None:
        arr = np.asarray(getattr(ev.pot_travel, name), dtype=float)
        return float(np.min(arr)), float(np.max(arr))
    v = float(getattr(ev.timing, name))
    return v, v


_NOT_RUN_WHY = ("the tolerance analysis (worst-case corners and Monte Carlo) has not run yet — press “Run Monte "
                "Carlo” in the dashboard, or evaluate with spread=True")


def _spread_verdict(design: Any, ev: Any, rule_id: str, title: str, nominal_text: str, unit: str,
                    inside: bool | None, band_text: str, bad_corner: str, share: float | None,
                    remedy: str) -> Any:
    """ok/warn/fail of a requirement judged by its criterion (the nominal point already passed)."""
    req = design.requirements
    crit = req.criterion_text()
    y = "" if share is None else f" Monte Carlo yield {pct(share, 4)} (n = {ev.requirement_spread.n})."
    if req.criterion == "worst-case":
        if inside:
            return finding(rule_id, "ok", title, 0.0, 0.0, unit, f"{nominal_text}; every worst-case corner stays "
                           f"inside: {band_text}.{y}", "", "common-practice")
        return finding(rule_id, "fail", title, None if share is None else 100 * share, None, "%",
                       f"{nominal_text}, but the worst-case corners leave the requirement: {band_text}; "
                       f"{bad_corner}.{y} Criterion: {crit}.", remedy, "common-practice")
    need = req.min_yield
    if share is not None and share >= need:
        extra = "" if inside else f" Some corners leave it ({band_text}; {bad_corner})."
        return finding(rule_id, "ok", title, 100 * share, 100 * need, "%",
                       f"{nominal_text}; yield {pct(share, 4)} meets the criterion {crit}.{extra}", "",
                       "common-practice")
    return finding(rule_id, "fail", title, None if share is None else 100 * share, 100 * need, "%",
                   f"{nominal_text}, but only {pct(share or 0.0, 4)} of the Monte Carlo builds meet it "
                   f"(criterion {crit}); {band_text}; {bad_corner}.", remedy, "common-practice")


def _not_run(design: Any, ev: Any, rule_id: str, title: str, nominal_text: str) -> Any:
    if ev.conditions.quick:
        return finding(rule_id, "not-run", title, None, None, "", f"{nominal_text}. Judged by the criterion "
                       f"{design.requirements.criterion_text()}: not run — {_NOT_RUN_WHY}.", "", "common-practice")
    return finding(rule_id, "warn", title, None, None, "", f"{nominal_text}, but the spread could not be judged "
                   f"against the requirement: {ev.conditions.spread_note or 'no spread figures'}.",
                   "See the tolerance-analysis finding.", "common-practice")


def _duty_reach_verdict(design: Any, ev: Any, rs: Any, title: str, nominal_text: str, want_lo: float,
                        want_hi: float, what: str, remedy: str) -> Any:
    """``duty.range`` when the duty must *reach* both ends ``want_lo … want_hi`` (pot travel, control range).

    ``what`` names what moves the duty in the band text ("travel", "range"); the nominal point
    has already passed. Not run without the requirement spread ``rs``.
    """
    if rs is None:
        return _not_run(design, ev, "duty.range", title, nominal_text)
    band = f"over the corners the {what} reaches only {pct(rs.duty_low)} … {pct(rs.duty_high)}"
    bad = []
    if rs.duty_low > want_lo + 1e-12:
        bad.append(f"the bottom end stops at {pct(rs.duty_low)} at {rs.duty_low_at}")
    if rs.duty_high < want_hi - 1e-12:
        bad.append(f"the top end stops at {pct(rs.duty_high)} at {rs.duty_high_at}")
    return _spread_verdict(design, ev, "duty.range", title, nominal_text, "points", rs.duty_inside(), band,
                           " and ".join(bad) or "every corner reaches it", rs.duty_yield, remedy)


def _window_verdict(design: Any, ev: Any, rs: Any, rule_id: str, title: str, nominal_text: str, unit: str,
                    name: str, show: Callable[[float], str], lo_req: float, hi_req: float, band_words: str,
                    remedy: str) -> Any:
    """A requirement whose spread must stay *inside* ``lo_req … hi_req`` (duty window, frequency window).

    ``name`` is the quantity in the requirement spread ``rs`` ("duty", "frequency": its ``_low``,
    ``_high``, ``_low_at``, ``_high_at``, ``_inside()`` and ``_yield``), ``show`` formats a value,
    ``band_words`` opens the band text. The nominal point has already passed. Not run without ``rs``.
    """
    if rs is None:
        return _not_run(design, ev, rule_id, title, nominal_text)
    low, high = getattr(rs, f"{name}_low"), getattr(rs, f"{name}_high")
    band = f"{band_words} {show(low)} … {show(high)}"
    bad = []
    if low < lo_req:
        bad.append(f"lowest {show(low)} at {getattr(rs, f'{name}_low_at')}")
    if high > hi_req:
        bad.append(f"highest {show(high)} at {getattr(rs, f'{name}_high_at')}")
    return _spread_verdict(design, ev, rule_id, title, nominal_text, unit, getattr(rs, f"{name}_inside")(), band,
                           " and ".join(bad) or "every corner stays inside", getattr(rs, f"{name}_yield"), remedy)


@_rule("duty.range")
def duty_range(design: Any, ev: Any) -> Any:
    """The required duty range is reachable — by the stated acceptance criterion.

    Pot topology: the duty over the whole wiper travel must cover ``duty_min … duty_max``.
    Fixed-duty topologies: the duty must lie in ``duty_min … duty_max`` or, with only a target
    ``duty``, within ±2 duty points of it (our default window). Fail when the nominal design misses
    it. Then the tolerance spread is judged by ``requirements.criterion``: ``worst-case`` fails
    when any worst-case corner misses (the finding names the corner); ``yield`` fails when the
    Monte Carlo share that meets it is below ``min_yield``. Without the tolerance analysis (quick
    mode) the rule is listed as not run. Origin: the design's own requirement; worst-case and
    yield criteria common practice.
    """
    from ..requirement_spread import duty_requirement

    spec = duty_requirement(design)
    if spec is None:
        return None
    kind, want_lo, want_hi = spec
    title = "Duty range reachable"
    if design.timing.topology == "two-timer":
        from .two_timer_rules import duty_range_two_timer

        return duty_range_two_timer(design, ev, title)
    window = f"{pct(want_lo)} … {pct(want_hi)}"
    rs = ev.requirement_spread
    if kind == "reach":
        lo, hi = _travel_range(ev, "duty")
        short = max(lo - want_lo, want_hi - hi, 0.0)
        if short > 1e-9:
            return finding("duty.range", "fail", title, 100 * short, 0.0, "points",
                           f"The pot travel reaches {pct(lo)} … {pct(hi)} duty; required {window}.",
                           "Lower the end resistors relative to the pot, or use a larger pot.", "common-practice")
        nominal = f"The pot travel reaches {pct(lo)} … {pct(hi)} duty at the nominal values (required {window})"
        return _duty_reach_verdict(design, ev, rs, title, nominal, want_lo, want_hi, "travel",
                                   "Lower the end resistors relative to the pot (more travel margin beyond the "
                                   "required range), or use tighter parts.")
    d = float(ev.timing.duty)
    off = max(want_lo - d, d - want_hi, 0.0)
    if off > 0:
        return finding("duty.range", "fail", title, 100 * off, 0.0, "points",
                       f"The duty is {pct(d)}, outside the required {window}.",
                       "Change the ratio of the charge and discharge resistors (use synthesis to pick values).",
                       "common-practice")
    nominal = f"The nominal duty {pct(d)} lies inside {window}"
    return _window_verdict(design, ev, rs, "duty.range", title, nominal, "points", "duty", pct, want_lo, want_hi,
                           "over the corners it moves",
                           "Use tighter-tolerance resistors or a steered topology with matched paths.")


@_rule("frequency.target")
def frequency_target(design: Any, ev: Any) -> Any:
    """PWM frequency inside the required window ``frequency·(1 ± frequency_tolerance)`` — by the criterion.

    Fail when the nominal frequency (or, for the pot topology, the frequency anywhere on the
    nominal travel) is outside. Then the tolerance spread is judged by
    ``requirements.criterion``: ``worst-case`` fails when any worst-case corner (at either end
    of the pot travel or at the set wiper) leaves the window — the finding names the corner;
    ``yield`` fails when the Monte Carlo share inside is below ``min_yield``. Without the
    tolerance analysis (quick mode) the rule is listed as not run. Origin: the design's own
    requirement; worst-case and yield criteria common practice.
    """
    req = design.requirements
    if req.frequency is None:
        return None
    lo_req, hi_req = req.frequency_window
    f0 = float(ev.timing.frequency)
    title = "Frequency on target"
    window = f"{fmt(lo_req, 'Hz', 4)} … {fmt(hi_req, 'Hz', 4)}"
    rel = f0 / req.frequency - 1.0
    if not lo_req <= f0 <= hi_req:
        return finding("frequency.target", "fail", title, f0, req.frequency, "Hz",
                       f"The frequency is {fmt(f0, 'Hz', 4)} ({100 * rel:+.3g} %), outside the required {window}.",
                       "Scale the capacitor (or all timing resistors) by the frequency ratio.", "common-practice")
    t_lo, t_hi = _travel_range(ev, "frequency")
    if t_lo < lo_req or t_hi > hi_req:
        return finding("frequency.target", "fail", title, t_lo if t_lo < lo_req else t_hi, req.frequency, "Hz",
                       f"Nominal {fmt(f0, 'Hz', 4)} is inside {window}, but over the pot travel the frequency moves "
                       f"{fmt(t_lo, 'Hz', 4)} … {fmt(t_hi, 'Hz', 4)} at the nominal values.",
                       "Balance the charge and discharge paths (matched steering diodes, equal end resistors) or "
                       "widen the window.", "common-practice")
    nominal = f"Nominal {fmt(f0, 'Hz', 4)} ({100 * rel:+.3g} %) is inside the required {window}"
    rs = ev.requirement_spread
    return _window_verdict(design, ev, rs, "frequency.target", title, nominal, "Hz", "frequency",
                           lambda v: fmt(v, "Hz", 4), lo_req, hi_req, "the corners span",
                           "Use tighter-tolerance parts (C0G capacitor, 1 % resistors, a tighter pot), a narrower "
                           "supply or ambient range, or widen the window.")


@_rule("frequency.family_max")
def frequency_family_max(design: Any, ev: Any) -> Any:
    """Highest frequency against the timer family's practical maximum.

    Highest of the nominal, pot-travel and spread (99th percentile) frequencies. Ok up to half the
    practical maximum, warn up to it, fail above (comparator and discharge delays then dominate).
    Origin of the practical maxima: bipolar about 300 kHz from memory, CMOS 1.2 MHz
    datasheet-generic.
    """
    fam = get_timer(design.timing.timer)
    f_hi = _travel_range(ev, "frequency")[1]
    band = spread_band(ev.spread, "frequency")
    if band is not None:
        f_hi = max(f_hi, band[1])
    limit = fam.f_max_practical
    sev = grade(f_hi, _FMAX_WARN_FRACTION * limit, limit)
    return finding("frequency.family_max", sev, "Frequency within the timer's practical range", f_hi, limit, "Hz",
                   f"The highest frequency is {fmt(f_hi, 'Hz', 4)}, {pct(f_hi / limit)} of the {fam.name} family's "
                   f"practical maximum {fmt(limit, 'Hz')} (warn above {pct(_FMAX_WARN_FRACTION)}: there the "
                   "comparator and discharge delays add noticeably to each half-period).",
                   "Lower the frequency, or use a CMOS timer for higher frequencies.",
                   fam.origin.get("f_max_practical", "from-memory"))


@_rule("capacitor.electrolytic")
def capacitor_electrolytic(design: Any, ev: Any) -> Any:
    """Electrolytic timing capacitor.

    Warn for an aluminium electrolytic timing capacitor (tolerance often −20/+80 %, high and
    temperature-dependent leakage); ok for other dielectrics. Origin: common practice.
    """
    diel = design.timing.c_dielectric
    title = "Timing-capacitor dielectric"
    if diel == "electrolytic":
        return finding("capacitor.electrolytic", "warn", title, None, None, "",
                       "An electrolytic timing capacitor is often −20/+80 % and leaks microamps that shift the "
                       "timing, more so when warm.",
                       "Use a film or C0G capacitor with larger resistors, or a lower frequency only where "
                       "accuracy does not matter.", "common-practice")
    return finding("capacitor.electrolytic", "ok", title, None, None, "",
                   f"The timing capacitor is {diel}, not electrolytic.", "", "common-practice")


@_rule("capacitor.range")
def capacitor_range(design: Any, ev: Any) -> Any:
    """Timing capacitor value inside its dielectric's usable range.

    Warn when the value is outside the range in which parts of that dielectric are generally made
    (e.g. C0G up to about 100 nF); ok inside. Origin: from memory (ranges of generally available
    parts, :mod:`pwmkit.parts.capacitors`).
    """
    from ..parts.capacitors import get_dielectric

    name = design.timing.c_dielectric
    diel = get_dielectric({"film": "film-pet"}.get(name, name))
    c = design.timing.c
    lo, hi = diel.c_range
    title = "Capacitor value available in its dielectric"
    origin = "from-memory" if "memory" in diel.origin.get("c_range", "from-memory") else "common-practice"
    if diel.covers(c):
        return finding("capacitor.range", "ok", title, c, hi, "F",
                       f"{fmt(c, 'F')} lies in the usual {diel.name} range {fmt(lo, 'F')} … {fmt(hi, 'F')}.", "",
                       origin)
    return finding("capacitor.range", "warn", title, c, hi if c > hi else lo, "F",
                   f"{fmt(c, 'F')} is outside the usual {diel.name} range {fmt(lo, 'F')} … {fmt(hi, 'F')}; such "
                   "parts are rare or do not exist.",
                   "Change the dielectric or rescale the timing resistors to move the capacitor into range.", origin)


@_rule("cv.bypass")
def cv_bypass(design: Any, ev: Any) -> Any:
    """Control-voltage pin bypass.

    When the control pin is not driven (no ``vctl``): bipolar family without a bypass capacitor →
    warn (supply noise and the output's current spikes move the thresholds); CMOS family → ok (some
    CMOS data sheets say the bypass is not required). Driven pin or bypass fitted → ok. Origin:
    datasheet-generic.
    """
    t = design.timing
    title = "Control-pin bypass"
    if t.vctl is not None:
        return finding("cv.bypass", "ok", title, None, None, "", "The control pin is driven by a source.", "",
                       "datasheet-generic")
    if t.cv_bypass is not None:
        return finding("cv.bypass", "ok", title, t.cv_bypass, None, "F",
                       f"The control pin has a {fmt(t.cv_bypass, 'F')} bypass capacitor.", "", "datasheet-generic")
    if t.timer == "bipolar":
        return finding("cv.bypass", "warn", title, None, None, "",
                       "The bipolar timer's control pin is left without a bypass capacitor; its thresholds then "
                       "follow supply noise and the large current spikes at each output edge.",
                       "Fit 10 nF from the control pin to ground, close to the timer.", "datasheet-generic")
    return finding("cv.bypass", "ok", title, None, None, "",
                   "CMOS timer without a control-pin bypass: some CMOS data sheets say it is not required; fit "
                   "10 nF if the supply is noisy.", "", "datasheet-generic")
