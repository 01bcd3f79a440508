"""The heater load inside an evaluation (design layer; called by :func:`pwmkit.evaluate.evaluate`).

Decides which conditions the heater models see, and does no physics of its own:

- the element at the design duty and the nominal ambient (:func:`pwmkit.loads.heater.heater`),
  its steady temperature over the duty range 0 … 1 (a sweep for plots) and the hot case at
  ``t_ambient_max_c``;
- with a thermistor divider (``heater.ntc_r25``, ``heater.r_set``) on a two-timer design, the
  closed loop (:func:`pwmkit.loads.heater.closed_loop`): divider → control pin
  (:func:`pwmkit.timing.control_pin_drive`) → duty (:func:`pwmkit.timing.two_timer_pwm`);
- the MOSFET switches the element's hot current (a resistive load: no freewheel diode needed).
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Any

import numpy as np

from .errors import DesignError

__all__ = ["HeaterPart", "heater_kwargs", "heater_part", "loop_chain", "DUTY_SWEEP_POINTS"]

#: Duty points of the steady-temperature-vs-duty sweep.
DUTY_SWEEP_POINTS = 51


@dataclass(frozen=True)
class HeaterPart:
    """Heater figures of an evaluation.

    Attributes
    ----------
    element : HeaterResult at the operating duty, nominal ambient
    hot : HeaterResult at the operating duty, highest ambient
    sweep : HeaterResult over duty 0 … 1 (arrays), nominal ambient
    loop : ClosedLoop or None (no thermistor loop)
    loop_hot : ClosedLoop at the highest ambient, or None
    t_fault_c : element temperature at full duty and the highest ambient (switch shorted, sensor lost) [°C]
    loop_spread : (lowest, highest) closed-loop element temperature at the nominal ambient over every
        corner of the tolerance box, or None (no loop, or quick mode) [°C]
    loop_spread_note : why the corners could not all be evaluated, or None
    """

    element: Any
    hot: Any
    sweep: Any
    loop: Any
    loop_hot: Any
    t_fault_c: float
    loop_spread: tuple[float, float] | None = None
    loop_spread_note: str | None = None


def heater_kwargs(design: Any, rds_on: float = 0.0) -> dict[str, Any]:
    """Element keywords of :func:`pwmkit.loads.heater.heater` for a design (without duty and ambient)."""
    h = design.load
    return dict(r_cold=h.r_cold, alpha=h.alpha, r_th=h.r_th, c_th=h.c_th, v_supply=design.load_supply,
                rds_on=rds_on, t_ref_c=h.t_ref_c)


def loop_chain(design: Any, vcc: float | None = None) -> tuple[Any, Any, tuple[float, float], tuple[float, float]]:
    """(duty_of_vctl, vctl_of_t, duty_range, vctl_range) of a two-timer design with a thermistor divider."""
    from .loads.heater import KELVIN
    from .timing import control_pin_drive, two_timer_pwm
    from .timing.two_timer import _clock, _duty_only, _inputs

    t, h = design.timing, design.load
    vcc = design.vcc if vcc is None else vcc
    kw = t.two_timer_kwargs(vcc)
    probe = two_timer_pwm(vctl=min(2.0 * vcc / 3.0, 0.5 * vcc), **kw)
    v_lo, v_hi = float(probe.vctl_min), float(probe.vctl_max)
    r_extra = 0.0 if t.r_ctl_source is None else float(t.r_ctl_source)
    # inputs checked once here; the loop's many evaluations take the unchecked core path
    q = _inputs(kw["ra"], kw["rb"], kw["c"], kw["r_mono"], kw["c_mono"], vcc, 0.5 * vcc, kw["timer"], None,
                kw.get("vsat"))
    q["_clock"] = _clock(q)
    try:
        r_int = control_pin_drive(0.0, 0.0, vcc, t.timer).r_internal
    except DesignError as exc:
        raise DesignError(f"heater.ntc_r25: the thermistor divider works against the timer's internal divider, "
                          f"whose value is not known for the {t.timer} family ({exc}); use the bipolar family") from None
    v_open = 2.0 * vcc / 3.0
    r25, beta, r_set = float(h.ntc_r25), float(h.ntc_beta), float(h.r_set)

    def duty_of_vctl(v: float) -> float:
        return _duty_only(q, min(max(v, v_lo * (1 + 1e-12)), v_hi * (1 - 1e-12)))

    def vctl_of_t(temp: float) -> float:
        # the thermistor divider (β model) against the internal divider: as thermistor_source and
        # control_pin_drive, written out for the loop's inner evaluations
        r_ntc = r25 * math.exp(beta * (1.0 / (temp + KELVIN) - 1.0 / (25.0 + KELVIN)))
        vs, rs = vcc * r_ntc / (r_set + r_ntc), r_set * r_ntc / (r_set + r_ntc) + r_extra
        return v_open + r_int / (r_int + rs) * (vs - v_open)

    return duty_of_vctl, vctl_of_t, (float(probe.duty_min), float(probe.duty_max)), (v_lo, v_hi)


def heater_part(design: Any, duty: float, frequency: float, rds_on: float, loop: Any = None,
                spread: bool = False) -> HeaterPart:
    """Heater figures at the design's operating duty (the closed-loop duty when there is a loop).

    ``loop``: the nominal-ambient :class:`~pwmkit.loads.heater.ClosedLoop` when already computed;
    ``spread``: also the closed-loop temperature over the tolerance corners (:func:`loop_corners`).
    """
    from .loads.heater import closed_loop, heater

    kw = heater_kwargs(design, rds_on)
    loop_hot = None
    if design.load.has_loop and design.timing.topology == "two-timer":
        d_of_v, v_of_t, d_range, v_range = loop_chain(design)
        common = dict(duty_range=d_range, vctl_range=v_range, tau_sensor=design.load.tau_sensor, frequency=frequency,
                      **kw)
        if loop is None:
            loop = closed_loop(d_of_v, v_of_t, t_ambient_c=design.t_ambient_c, **common)
        loop_hot = closed_loop(d_of_v, v_of_t, t_ambient_c=design.t_ambient_max_c, **common)
        duty = loop.duty
    element = heater(duty=duty, frequency=frequency, t_ambient_c=design.t_ambient_c, **kw)
    hot = heater(duty=duty if loop_hot is None else loop_hot.duty, frequency=frequency,
                 t_ambient_c=design.t_ambient_max_c, **kw)
    sweep = heater(duty=np.linspace(0.0, 1.0, DUTY_SWEEP_POINTS), frequency=frequency, t_ambient_c=design.t_ambient_c,
                   **kw)
    fault = heater(duty=1.0, frequency=frequency, t_ambient_c=design.t_ambient_max_c, **kw)
    band, note = (loop_corners(design, frequency, rds_on) if spread and loop is not None else (None, None))
    return HeaterPart(element=element, hot=hot, sweep=sweep, loop=loop, loop_hot=loop_hot,
                      t_fault_c=float(fault.t_element_c), loop_spread=band, loop_spread_note=note)


def loop_corners(design: Any, frequency: float, rds_on: float) -> tuple[tuple[float, float] | None, str | None]:
    """(lowest, highest) closed-loop temperature over the corners of the tolerance box [°C], and a note.

    Box: the set resistor and the monostable resistor within ``timing.r_tolerance``, the
    monostable capacitor within ``timing.c_tolerance``, the thermistor's R25 within
    ``heater.ntc_tolerance``, the element within ``heater.r_tolerance`` — 2^5 corners at the
    nominal ambient and supply (the supply cancels in the ratiometric divider to first order).
    """
    import dataclasses
    import itertools

    from .loads.heater import closed_loop

    t, h = design.timing, design.load
    temps: list[float] = []
    for s_set, s_rm, s_cm, s_ntc, s_el in itertools.product((-1.0, 1.0), repeat=5):
        load = dataclasses.replace(h, r_set=h.r_set * (1 + s_set * t.r_tolerance),
                                   ntc_r25=h.ntc_r25 * (1 + s_ntc * h.ntc_tolerance),
                                   r_cold=h.r_cold * (1 + s_el * h.r_tolerance))
        d = dataclasses.replace(design, load=load,
                                timing=dataclasses.replace(t, r_mono=t.r_mono * (1 + s_rm * t.r_tolerance),
                                                           c_mono=t.c_mono * (1 + s_cm * t.c_tolerance)))
        try:
            d_of_v, v_of_t, d_range, v_range = loop_chain(d)
            lp = closed_loop(d_of_v, v_of_t, duty_range=d_range, vctl_range=v_range, tau_sensor=h.tau_sensor,
                             frequency=frequency, t_ambient_c=design.t_ambient_c, **heater_kwargs(d, rds_on))
        except DesignError as exc:
            return None, f"a tolerance corner cannot be evaluated: {exc}"
        temps.append(lp.t_element_c)
    return (min(temps), max(temps)), None


def heater_rows(ev: Any) -> list[tuple[str, str]]:
    """(label, text) rows describing the heater part of an evaluation, for summaries and reports."""
    from .values import format_value as fv

    hp = ev.heater
    if hp is None:
        return []
    el = hp.element
    rows = [("heater element", f"{fv(el.p_avg, 'W', 3)} average ({fv(el.p_on, 'W', 3)} while on, "
             f"{fv(el.i_on, 'A', 3)}), {fv(el.r_hot, 'Ω', 3)} hot"),
            ("element temperature", f"{el.t_element_c:.3g} °C at {ev.design.t_ambient_c:g} °C ambient "
             f"({hp.hot.t_element_c:.3g} °C at {ev.design.t_ambient_max_c:g} °C), ripple "
             f"{el.ripple_pp:.2g} K p-p at the PWM frequency"),
            ("warm-up", f"{fv(el.warm_up, 's', 3)} to 90 % of the rise (thermal time constant {fv(el.tau, 's', 3)})"),
            ("full power, no control", f"{hp.t_fault_c:.3g} °C at {ev.design.t_ambient_max_c:g} °C ambient")]
    if hp.loop is not None:
        lp = hp.loop
        margin = ("loop gain below 1, no crossover" if lp.crossover == 0 else
                  f"phase margin {lp.phase_margin_deg:.3g}° at {fv(lp.crossover, 'Hz', 3)}")
        rows.append(("thermistor loop", f"holds {lp.t_element_c:.3g} °C at {100 * lp.duty:.3g} % duty "
                     f"(control pin {lp.vctl:.3g} V); gain {lp.gain:.3g}, {margin}"
                     + ("; saturated at a duty limit" if lp.saturated else "")))
    if hp.loop_spread is not None:
        lo, hi = hp.loop_spread
        rows.append(("set temperature over the tolerances", f"{lo:.3g} … {hi:.3g} °C (worst-case corners of set "
                     "resistor, thermistor, monostable parts and element)"))
    elif hp.loop_spread_note:
        rows.append(("set temperature over the tolerances", hp.loop_spread_note))
    return rows
