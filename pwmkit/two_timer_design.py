"""The two-timer fixed-frequency PWM as a design (design layer): output timing, spread, worst case.

A :class:`~pwmkit.design.Design` with ``timing.topology = "two-timer"`` is a classic astable clock
(``ra``, ``rb``, ``c``) triggering a monostable (``r_mono``, ``c_mono``) whose control pin is
driven by a control voltage ``vctl_min … vctl_max`` (through ``r_ctl_source`` against the
internal divider). This module turns such a design into model calls
(:func:`pwmkit.timing.two_timer_pwm`, :func:`~pwmkit.timing.control_range`) and gives its
tolerance spread:

- Monte Carlo: every resistor within ``r_tolerance``, every capacitor within ``c_tolerance``
  (uniform), the supply uniform over ``vcc_min … vcc_max``, the timer family's own errors
  (initial accuracy, drift, supply sensitivity) on the clock and on the pulse; the control
  voltage held at the operating point (a fixed source; a thermistor divider scales with the
  supply); samples whose pulse does not end before the next clock trigger count as failures;
- worst case: all 2^k corners of the parts and supply box, one vectorised evaluation (the duty is
  monotonic in every parameter of the log law, the frequency in every clock parameter, so
  corners bound it).

References
----------
.. [1] JCGM 101:2008, *Propagation of distributions using a Monte Carlo method*, §5–§7 (from memory).
"""

from __future__ import annotations

import itertools
from typing import Any

import numpy as np

from .errors import DesignError

__all__ = ["output_timing", "pin_voltage", "control_range_of", "monte_carlo_two_timer", "worst_case_two_timer",
           "as_astable_result"]


def pin_voltage(design: Any, v_source: Any, vcc: Any) -> Any:
    """Control-pin voltage of a two-timer design for a source voltage at supply ``vcc`` [V]."""
    return design.timing.control_pin_voltage(v_source, vcc)


def as_astable_result(p: Any, design: Any) -> Any:
    """The PWM output of a :class:`~pwmkit.timing.TwoTimerPwm` as an :class:`~pwmkit.timing.AstableResult`.

    ``t_high`` is the monostable pulse, ``t_low`` the rest of the clock period; the thresholds are
    the monostable's (upper = control-pin voltage, lower = its start level), the charge path is
    ``r_mono`` toward the supply and the discharge path the switch toward the rest level.
    """
    from .timing import AstableResult
    from .timing.monostable import discharge_resistance

    return AstableResult(
        topology="two-timer", timer=p.timer, t_high=p.t_high, t_low=p.period - p.t_high, v_upper=p.vctl, v_lower=p.v_start, v_charge=p.vcc,
        v_discharge=p.v_rest, r_charge=design.timing.r_mono, r_discharge=discharge_resistance(design.timing.timer),
        c=design.timing.c_mono, vcc=p.vcc,
    )


def two_timer_at(design: Any, vcc: float, v_source: Any) -> Any:
    """:class:`~pwmkit.timing.TwoTimerPwm` of a design at a supply and control (source) voltage."""
    from .timing import two_timer_pwm

    return two_timer_pwm(vctl=pin_voltage(design, v_source, vcc), **design.timing.two_timer_kwargs(vcc))


def two_timer_at_pin(design: Any, vcc: float, v_pin: float) -> Any:
    """:class:`~pwmkit.timing.TwoTimerPwm` of a design with its control pin at ``v_pin`` [V]."""
    from .timing import two_timer_pwm

    return two_timer_pwm(vctl=v_pin, **design.timing.two_timer_kwargs(vcc))


def output_timing(design: Any, vcc: float, v_source: Any) -> Any:
    """PWM output timing of a two-timer design as an AstableResult (see :func:`as_astable_result`)."""
    return as_astable_result(two_timer_at(design, vcc, v_source), design)


def control_range_of(design: Any, vcc: float | None = None) -> Any:
    """:class:`~pwmkit.timing.ControlRange` over the design's control range (pin voltages)."""
    from .timing import control_range

    t = design.timing
    vcc = design.vcc if vcc is None else vcc
    lo = float(pin_voltage(design, t.vctl_min, vcc))
    hi = float(pin_voltage(design, t.vctl_max, vcc))
    return control_range(vctl_low=lo, vctl_high=hi, **t.two_timer_kwargs(vcc))


_KEYS = ("ra", "rb", "c", "r_mono", "c_mono")


def _box(design: Any) -> list[tuple[str, float, float]]:
    t = design.timing
    out = [(k, -t.r_tolerance if k in ("ra", "rb", "r_mono") else -t.c_tolerance,
            t.r_tolerance if k in ("ra", "rb", "r_mono") else t.c_tolerance) for k in _KEYS]
    return out


def _evaluate_points(design: Any, values: dict[str, np.ndarray], vcc: np.ndarray, v_source: float | None,
                     v_pin: float | None = None) -> tuple[np.ndarray, np.ndarray, np.ndarray, dict[str, int]]:
    """(frequency, duty, ok, reasons) of many design points, failures masked instead of raised.

    The control pin sits at ``pin_voltage(v_source)`` (a fixed source), or — with ``v_pin`` — at
    ``v_pin`` scaled with the supply (a ratiometric divider such as the thermistor's).
    """
    from .timing import astable, two_timer_pwm
    from .timing.monostable import start_level
    from .timing.monostable_symbolic import monostable_numeric

    t = design.timing
    if v_pin is not None:
        vctl = float(v_pin) * vcc / design.vcc
    else:
        vctl = np.asarray(pin_voltage(design, v_source, vcc), dtype=float) * np.ones_like(vcc)
    clk = astable("classic", ra=values["ra"], rb=values["rb"], c=values["c"], vcc=vcc, timer=t.timer,
                  **({} if t.vsat is None else {"vsat": t.vsat}))
    v_rest = start_level(values["r_mono"], vcc, t.timer) if t.vsat is None else np.full_like(vcc, t.vsat)
    with np.errstate(all="ignore"):
        w = monostable_numeric()[0](values["r_mono"], values["c_mono"], vcc, vctl, v_rest)
    reach = vctl < vcc
    fits = np.where(reach, np.maximum(w, clk.t_low) < clk.period, False)
    ok = reach & fits
    reasons = {}
    if np.any(~reach):
        reasons["control voltage at or above the supply"] = int(np.sum(~reach))
    if np.any(reach & ~fits):
        reasons["pulse longer than the clock period (skips cycles)"] = int(np.sum(reach & ~fits))
    freq = np.full(vcc.shape, np.nan)
    duty = np.full(vcc.shape, np.nan)
    if np.any(ok):
        kw = dict(timer=t.timer, **({} if t.vsat is None else {"vsat": t.vsat}))
        p = two_timer_pwm(ra=values["ra"][ok], rb=values["rb"][ok], c=values["c"][ok], r_mono=values["r_mono"][ok],
                          c_mono=values["c_mono"][ok], vcc=vcc[ok], vctl=vctl[ok], **kw)
        freq[ok], duty[ok] = p.frequency, p.duty
    return freq, duty, ok, reasons


def monte_carlo_two_timer(design: Any, *, n: int = 20_000, seed: int = 1, frequency_window: Any = None,
                          duty_window: Any = None, bins: int = 50, v_pin: float | None = None,
                          timer_errors: bool = True) -> Any:
    """Monte Carlo spread of the two-timer PWM's frequency and duty at the operating control voltage.

    Parts within their tolerances and the supply over its range (module docstring); ``v_pin``:
    the operating pin voltage of a ratiometric control (default: the nominal source voltage through
    :func:`pin_voltage`). ``timer_errors`` adds the timer family's initial accuracy, temperature
    drift over the ambient range and supply sensitivity as independent uniform bands on the
    clock's frequency and on the monostable's pulse (the family's astable figures, used for the
    monostable too — data sheets give it a tighter one, so this errs on the wide side).

    Returns a :class:`pwmkit.tolerance.SpreadResult` (topology "two-timer"); failures (pulse longer
    than the period) are counted in ``n_failed``, never returned as numbers.
    """
    from .parts.timers import get_timer
    from .tolerance import Histogram, SpreadResult, _histogram

    if isinstance(n, bool) or not isinstance(n, (int, np.integer)) or not 1 <= n <= 20_000_000:
        raise DesignError(f"n: {n!r} is not allowed; give an integer 1 … 20000000")
    t = design.timing
    rng = np.random.default_rng(seed)
    box = _box(design)
    values = {k: getattr(t, k) * (1.0 + rng.uniform(lo, hi, int(n))) for k, lo, hi in box}
    lo, hi = design.supply_range
    vcc = rng.uniform(lo, hi, int(n)) if hi > lo else np.full(int(n), design.vcc)
    v_src = t.vctl_nominal
    freq, duty, ok, reasons = _evaluate_points(design, values, vcc, v_src, v_pin)
    sources_timer: tuple[str, ...] = ()
    if timer_errors:
        fam = get_timer(t.timer)
        t_lo, t_hi = design.t_ambient_min_c, design.t_ambient_max_c
        temp = rng.uniform(t_lo, t_hi, int(n))

        def band() -> np.ndarray:
            u = rng.uniform(-1.0, 1.0, (3, int(n)))
            return (fam.initial_accuracy * u[0] + fam.drift_ppm_per_k * 1e-6 * np.abs(temp - 25.0) * u[1]
                    + fam.supply_sensitivity_per_v * np.abs(vcc - design.vcc) * u[2])

        e_clock, e_pulse = band(), band()
        freq = freq * (1.0 + e_clock)
        duty = duty * (1.0 + e_pulse) * (1.0 + e_clock)  # pulse longer, period shorter
        ok &= duty < 1.0
        sources_timer = (f"timer errors ({fam.name}): initial ±{100 * fam.initial_accuracy:.3g} %, drift "
                         f"{fam.drift_ppm_per_k:g} ppm/K over {t_lo:g} … {t_hi:g} °C, supply "
                         f"{100 * fam.supply_sensitivity_per_v:.3g} %/V; on clock and pulse",)
    n_failed = int(n - ok.sum())
    if n_failed == n:
        raise DesignError(f"monte_carlo: none of the {n} samples works ({', '.join(reasons)})")
    freq, duty = freq[ok], duty[ok]
    nominal = (output_timing(design, design.vcc, v_src) if v_pin is None else
               as_astable_result(two_timer_at_pin(design, design.vcc, v_pin), design))
    yield_ = None
    if frequency_window is not None or duty_window is not None:
        inside = np.ones(freq.shape, dtype=bool)
        if frequency_window is not None:
            inside &= (freq >= frequency_window[0]) & (freq <= frequency_window[1])
        if duty_window is not None:
            inside &= (duty >= duty_window[0]) & (duty <= duty_window[1])
        yield_ = float(inside.sum()) / n
    fc, fe = _histogram(freq, bins)
    dc, de = _histogram(duty, bins)
    sources = tuple(f"{k}: {100 * a:+.4g} … {100 * b:+.4g} % (relative), uniform" for k, a, b in box)
    if hi > lo:
        sources += (f"supply: {lo:g} … {hi:g} V uniform",)
    sources += sources_timer
    return SpreadResult(
        topology="two-timer", timer=t.timer, n=int(n), n_failed=n_failed, failure_reasons=reasons, seed=seed,
        frequency=freq, duty=duty, nominal_frequency=float(nominal.frequency), nominal_duty=float(nominal.duty),
        frequency_mean=float(freq.mean()), frequency_std=float(freq.std()), duty_mean=float(duty.mean()),
        duty_std=float(duty.std()), frequency_histogram=Histogram(fc, fe), duty_histogram=Histogram(dc, de),
        frequency_window=frequency_window, duty_window=duty_window, yield_=yield_, sources=sources,
    )


def worst_case_two_timer(design: Any, v_pin: float | None = None) -> Any:
    """Worst case of frequency and duty over every corner of the tolerance box (supply range included).

    ``v_pin``: the operating pin voltage of a ratiometric control (as :func:`monte_carlo_two_timer`).
    Returns a :class:`pwmkit.tolerance.WorstCaseResult` (method "corners"); the timer family's own
    errors are not in the corners (they are in the Monte Carlo run).
    """
    from .tolerance import ExtremePoint, WorstCaseResult

    t = design.timing
    box = _box(design)
    lo, hi = design.supply_range
    dims = [(k, a, b) for k, a, b in box] + ([("vcc", lo, hi)] if hi > lo else [])
    corners = np.array(list(itertools.product((0, 1), repeat=len(dims))), dtype=float)
    values: dict[str, np.ndarray] = {}
    for j, (k, a, b) in enumerate(dims):
        pick = np.where(corners[:, j] > 0, b, a)
        if k != "vcc":
            values[k] = getattr(t, k) * (1.0 + pick)
    vcc = np.where(corners[:, -1] > 0, hi, lo) if hi > lo else np.full(len(corners), design.vcc)
    freq, duty, ok, reasons = _evaluate_points(design, values, vcc, t.vctl_nominal, v_pin)
    if not np.all(ok):
        raise DesignError(f"worst case: some corners do not work ({', '.join(f'{k}: {v}' for k, v in reasons.items())})")
    nominal = (output_timing(design, design.vcc, t.vctl_nominal) if v_pin is None else
               as_astable_result(two_timer_at_pin(design, design.vcc, v_pin), design))

    def point(i: int) -> ExtremePoint:
        dev = {k: float(np.where(corners[i, j] > 0, b, a)) for j, (k, a, b) in enumerate(dims)}
        params = {k: float(values[k][i]) for k in values} | {"vcc": float(vcc[i])}
        return ExtremePoint(deviations=dev, params=params, corner=True)

    return WorstCaseResult(
        topology="two-timer", timer=t.timer, frequency_nominal=float(nominal.frequency),
        duty_nominal=float(nominal.duty), frequency_min=float(freq.min()), frequency_max=float(freq.max()),
        duty_min=float(duty.min()), duty_max=float(duty.max()), frequency_min_at=point(int(np.argmin(freq))),
        frequency_max_at=point(int(np.argmax(freq))), duty_min_at=point(int(np.argmin(duty))),
        duty_max_at=point(int(np.argmax(duty))), method="corners", non_monotonic=(), n_evaluated=len(corners),
        sources=tuple(f"{k}: {a:+.4g} … {b:+.4g}" for k, a, b in dims),
    )


def operating_point(design: Any) -> tuple[float, float | None, Any]:
    """(pin voltage [V], source voltage [V] or None, loop or None) of a two-timer design's operating point.

    With a heater and a thermistor divider: the closed loop at the nominal ambient (the switch
    resistance from the timer's gate drive, as :func:`pwmkit.evaluate.evaluate` uses it); otherwise
    the nominal control voltage through :func:`pin_voltage`.
    """
    t = design.timing
    if design.load is not None and design.load.kind == "heater" and design.load.has_loop:
        from .evaluate_heater import heater_kwargs, loop_chain
        from .loads.heater import closed_loop
        from .loads.mosfet import gate_drive
        from .parts.timers import get_timer
        from .timing import astable

        fam = get_timer(t.timer)
        try:
            rds = float(gate_drive(fam.output_high(design.vcc), fam.output_source_resistance(design.vcc),
                                   design.switch.r_gate, design.switch.mosfet, r_sink=fam.r_out_low).rds_on_25)
        except DesignError:
            rds = 0.0
        clock = astable("classic", **t.astable_kwargs(design.vcc))
        d_of_v, v_of_t, d_range, v_range = loop_chain(design)
        loop = closed_loop(d_of_v, v_of_t, duty_range=d_range, vctl_range=v_range, tau_sensor=design.load.tau_sensor,
                           frequency=float(clock.frequency), t_ambient_c=design.t_ambient_c,
                           **heater_kwargs(design, rds))
        v_pin = float(min(max(loop.vctl, v_range[0] * (1 + 1e-12)), v_range[1] * (1 - 1e-12)))
        return v_pin, None, loop
    v_source = t.vctl_nominal
    return float(pin_voltage(design, v_source, design.vcc)), v_source, None


def circuit_words(topology: str) -> str:
    """Short name of the circuit for headings: "pot astable", "two-timer PWM" …"""
    return "two-timer PWM (astable clock + monostable)" if topology == "two-timer" else f"{topology} astable"


def requirement_spread_two_timer(design: Any, *, n: int = 20_000, seed: int = 1, v_pin: float | None = None) -> Any:
    """The two-timer's spread judged against the requirements (:class:`pwmkit.requirement_spread.RequirementSpread`).

    Frequency: every corner of the parts-and-supply box at the operating control voltage (worst
    case) and the Monte Carlo share inside the window (timer errors included). Duty, as a *reach*
    over the control range: the duty at ``vctl_min`` must get down to ``duty_min`` and the duty at
    ``vctl_max`` up to ``duty_max`` — in every corner (worst case: the highest bottom end and the
    lowest top end) or in the same build at both ends (yield).
    """
    from .parts.timers import get_timer
    from .requirement_spread import RequirementSpread, corner_text

    t, req = design.timing, design.requirements
    lo, hi = design.supply_range
    dims = [(k, a, b) for k, a, b in _box(design)] + ([("vcc", lo, hi)] if hi > lo else [])
    corners = np.array(list(itertools.product((0, 1), repeat=len(dims))), dtype=float)
    values = {k: getattr(t, k) * (1.0 + np.where(corners[:, j] > 0, b, a)) for j, (k, a, b) in enumerate(dims)
              if k != "vcc"}
    vcc = np.where(corners[:, -1] > 0, hi, lo) if hi > lo else np.full(len(corners), design.vcc)

    def dev(i: int) -> dict[str, float]:
        return {k: float(np.where(corners[i, j] > 0, b, a)) for j, (k, a, b) in enumerate(dims)}

    f, _d, ok, reasons = _evaluate_points(design, values, vcc, t.vctl_nominal, v_pin)
    if not np.all(ok):
        raise DesignError(f"requirement spread: some corners do not work "
                          f"({', '.join(f'{k}: {v}' for k, v in reasons.items())})")
    _f, d_bottom, ok_b, _r = _evaluate_points(design, values, vcc, t.vctl_min)
    _f, d_top, ok_t, _r = _evaluate_points(design, values, vcc, t.vctl_max)
    duty_req = None
    if req.duty_min is not None or req.duty_max is not None or req.duty is not None:
        d_lo_req = req.duty_min if req.duty_min is not None else req.duty
        d_hi_req = req.duty_max if req.duty_max is not None else req.duty
        duty_req = (float(d_lo_req if d_lo_req is not None else d_hi_req),
                    float(d_hi_req if d_hi_req is not None else d_lo_req))
    if not (np.all(ok_b) and np.all(ok_t)):
        d_lo_w, d_lo_at, d_hi_w, d_hi_at = 1.0, "a corner where the control range fails", 0.0, "the same"
    else:
        i_b, i_t = int(np.argmax(d_bottom)), int(np.argmin(d_top))
        d_lo_w, d_lo_at = float(d_bottom[i_b]), corner_text(dev(i_b)) + f", control {t.vctl_min:g} V"
        d_hi_w, d_hi_at = float(d_top[i_t]), corner_text(dev(i_t)) + f", control {t.vctl_max:g} V"
    i_flo, i_fhi = int(np.argmin(f)), int(np.argmax(f))
    # Monte Carlo: the same builds at the operating point and at both ends of the control range
    rng = np.random.default_rng(seed)
    box = _box(design)
    mc = {k: getattr(t, k) * (1.0 + rng.uniform(a, b, int(n))) for k, a, b in box}
    mv = rng.uniform(lo, hi, int(n)) if hi > lo else np.full(int(n), design.vcc)
    fam = get_timer(t.timer)
    temp = rng.uniform(design.t_ambient_min_c, design.t_ambient_max_c, int(n))

    def band() -> np.ndarray:
        u = rng.uniform(-1.0, 1.0, (3, int(n)))
        return (fam.initial_accuracy * u[0] + fam.drift_ppm_per_k * 1e-6 * np.abs(temp - 25.0) * u[1]
                + fam.supply_sensitivity_per_v * np.abs(mv - design.vcc) * u[2])

    e_clock, e_pulse = band(), band()
    fm, _dm, okm, _r = _evaluate_points(design, mc, mv, t.vctl_nominal, v_pin)
    _f, dmb, okb, _r = _evaluate_points(design, mc, mv, t.vctl_min)
    _f, dmt, okt, _r = _evaluate_points(design, mc, mv, t.vctl_max)
    scale = (1.0 + e_pulse) * (1.0 + e_clock)
    window = req.frequency_window
    with np.errstate(invalid="ignore"):
        fm = fm * (1.0 + e_clock)
        f_ok = okm & ((fm >= window[0]) & (fm <= window[1]) if window is not None else True)
        d_ok = okb & okt
        if duty_req is not None:
            d_ok &= (dmb * scale <= duty_req[0] + 1e-12) & (dmt * scale >= duty_req[1] - 1e-12)
    return RequirementSpread(
        criterion=req.criterion, min_yield=float(req.min_yield), frequency_window=window,
        frequency_low=float(f[i_flo]), frequency_high=float(f[i_fhi]), frequency_low_at=corner_text(dev(i_flo)),
        frequency_high_at=corner_text(dev(i_fhi)), frequency_yield=float(f_ok.mean()) if window is not None else None,
        duty_kind=None if duty_req is None else "reach", duty_required=duty_req, duty_low=d_lo_w, duty_high=d_hi_w,
        duty_low_at=d_lo_at, duty_high_at=d_hi_at, duty_yield=float(d_ok.mean()) if duty_req is not None else None,
        yield_=float((f_ok & d_ok).mean()), n=int(n), n_corners=3 * len(corners),
    )


def condition_sweep_two_timer(design: Any, *, n: int = 41) -> Any:
    """Frequency and duty of a two-timer design over its supply range and its ambient range.

    As :func:`pwmkit.condition_sweep.condition_sweep` for the astables: parts nominal, the control
    pin at the operating point (a fixed source, or scaled with the supply for a ratiometric divider);
    the band is the timer family's supply sensitivity (supply sweep), and the capacitor dielectric's
    temperature envelope on both timing capacitors with the family's drift (ambient sweep), on the
    clock and on the pulse.
    """
    from .condition_sweep import ConditionCurve, ConditionSweep, _grid
    from .evaluate import dielectric_of
    from .parts.capacitors import get_dielectric
    from .parts.timers import get_timer

    if isinstance(n, bool) or not isinstance(n, int) or not 2 <= n <= 1001:
        raise DesignError(f"n: {n!r} is not allowed; give a whole number 2 … 1001")
    t = design.timing
    fam = get_timer(t.timer)
    v_pin, v_source, _loop = operating_point(design)
    ratiometric = v_source is None
    lo, hi = design.supply_range

    def run(vcc: np.ndarray, k_c: np.ndarray, e_clock: np.ndarray, e_pulse: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        values = {"ra": np.full(vcc.shape, t.ra), "rb": np.full(vcc.shape, t.rb), "c": t.c * k_c,
                  "r_mono": np.full(vcc.shape, t.r_mono), "c_mono": t.c_mono * k_c}
        f, d, ok, reasons = _evaluate_points(design, values, vcc, v_source, v_pin if ratiometric else None)
        if not ok.all():
            raise DesignError(f"condition sweep: the two-timer PWM stops inside the range ({', '.join(reasons)})")
        return f * (1 + e_clock), d * (1 + e_clock) * (1 + e_pulse)

    v = _grid(lo, hi, n)
    ones, zeros = np.ones(v.size), np.zeros(v.size)
    k = fam.supply_sensitivity_per_v * np.abs(v - design.vcc)
    runs = [run(v, ones, zeros, zeros), run(v, ones, -k, -k), run(v, ones, k, k), run(v, ones, -k, k),
            run(v, ones, k, -k)]
    fs, ds = np.array([r[0] for r in runs[1:]]), np.array([r[1] for r in runs[1:]])
    supply = ConditionCurve("supply", "V", v, runs[0][0], fs.min(axis=0), fs.max(axis=0), runs[0][1], ds.min(axis=0),
                            ds.max(axis=0))
    temp = _grid(design.t_ambient_min_c, design.t_ambient_max_c, n)
    env_lo, env_hi = get_dielectric(dielectric_of(design)).temperature_envelope(temp)
    env_lo, env_hi = np.asarray(env_lo, dtype=float) * np.ones(temp.size), np.asarray(env_hi, dtype=float) * np.ones(temp.size)
    vn = np.full(temp.size, design.vcc)
    span = fam.drift_ppm_per_k * 1e-6 * np.abs(temp - 25.0)
    mid = run(vn, 1 + 0.5 * (env_lo + env_hi), np.zeros(temp.size), np.zeros(temp.size))
    band = [run(vn, 1 + env, s1 * span, s2 * span) for env in (env_lo, env_hi) for s1 in (-1, 1) for s2 in (-1, 1)]
    fs, ds = np.array([r[0] for r in band]), np.array([r[1] for r in band])
    ambient = ConditionCurve("ambient", "°C", temp, mid[0], fs.min(axis=0), fs.max(axis=0), mid[1], ds.min(axis=0),
                             ds.max(axis=0))
    return ConditionSweep(supply, ambient)
