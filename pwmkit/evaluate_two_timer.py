"""Evaluate a two-timer design (design layer; :func:`pwmkit.evaluate.evaluate` hands over to it).

The result is the same :class:`~pwmkit.evaluate.Evaluation` as for the astable drivers, so the
checks, cautions, report and widgets read it the same way: ``timing`` is the PWM *output* (clock
period, monostable pulse) as an AstableResult with topology "two-timer"; ``two_timer`` adds the
clock, the modulator at the operating point and the control range; ``heater`` the element and the
thermistor loop. Operating point: the closed-loop control voltage when a thermistor divider
drives the pin, else the design's nominal control voltage ``timing.vctl`` (default: the middle of
``vctl_min … vctl_max``). Supply corners keep a fixed control source; with the thermistor divider
the pin voltage follows the supply (ratiometric).
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Any

import numpy as np

from .errors import DesignError

__all__ = ["TwoTimerPart", "evaluate_two_timer"]


@dataclass(frozen=True)
class TwoTimerPart:
    """Two-timer figures of an evaluation.

    Attributes
    ----------
    clock : AstableResult of the clock (classic astable)
    pwm : TwoTimerPwm at the operating control voltage
    control : ControlRange over the design's control range, or None when the range cannot be used
    control_error : why not (e.g. part of the range skips cycles at the nominal or the lowest supply), or None
    v_pin : control-pin voltage at the operating point [V]
    v_source : control (source) voltage at the operating point [V] (None with a thermistor loop)
    ratiometric : the control voltage follows the supply (thermistor divider)
    """

    clock: Any
    pwm: Any
    control: Any
    control_error: str | None
    v_pin: float
    v_source: float | None
    ratiometric: bool


def evaluate_two_timer(design: Any, *, spread: bool = True, n_mc: int = 20_000, seed: int = 1) -> Any:
    """Evaluation of a design with ``timing.topology == "two-timer"`` (see the module docstring)."""
    from .checks import Findings
    from .evaluate import (
        Conditions,
        Evaluation,
        SupplyCorners,
        _gate_part,
        _heater_losses,
        _judged,
        _led_losses,
        _load_supply_range,
        _motor_losses,
        _no_load_parts,
        _timer_output,
    )
    from .evaluate_heater import heater_part
    from .parts.timers import get_timer
    from .timing import astable, two_timer_pwm
    from .two_timer_design import (
        as_astable_result,
        control_range_of,
        monte_carlo_two_timer,
        operating_point,
        pin_voltage,
        requirement_spread_two_timer,
        worst_case_two_timer,
    )

    t = design.timing
    fam = get_timer(t.timer)
    with np.errstate(all="ignore"):
        clock = astable("classic", **t.astable_kwargs(design.vcc))
        kw = t.two_timer_kwargs(design.vcc)
        gate, gate_error = _gate_part(design, fam, DesignError)
        rds = 0.0 if gate is None else float(gate.rds_on_25)
        loop_mode = design.load is not None and design.load.kind == "heater" and design.load.has_loop
        v_pin, v_source, loop = operating_point(design)
        pwm = two_timer_pwm(vctl=v_pin, **kw)
        timing = as_astable_result(pwm, design)
        lo, hi = design.supply_range
        try:
            control, control_error = control_range_of(design), None
        except DesignError as exc:
            control, control_error = None, str(exc)
        if control_error is None and lo < design.vcc and not loop_mode:
            try:  # the top of a fixed control range comes closest to the supply at the lowest supply
                control_range_of(design, vcc=lo)
            except DesignError as exc:
                control_error = f"at the lowest supply {lo:.4g} V: {exc}"
        corner_res: list[Any] = []
        corner_err = None
        for vcc in (lo, hi):
            v = v_pin * vcc / design.vcc if loop_mode else pin_voltage(design, v_source, vcc)
            try:
                corner_res.append(as_astable_result(two_timer_pwm(vctl=v, **t.two_timer_kwargs(vcc)), design))
            except DesignError as exc:
                corner_err = f"at {vcc:.4g} V: {exc}"
                break
        corners = (SupplyCorners(lo, hi, None, None, corner_err) if corner_err
                   else SupplyCorners(lo, hi, corner_res[0], corner_res[1], None))
        duty_range = ((control.duty_low, control.duty_high) if control is not None
                      else (float(timing.duty), float(timing.duty)))
        p = _no_load_parts()
        f = float(timing.frequency)
        heater = None
        if design.load is not None and design.load.kind == "led":
            _led_losses(design, timing, gate, f, p)
        elif design.load is not None and design.load.kind == "motor":
            _motor_losses(design, timing, gate, duty_range, f, p)
        elif design.load is not None:
            heater = heater_part(design, float(timing.duty), f, rds, loop=loop if loop_mode else None,
                                 spread=bool(spread))
            p["mosfet"] = _heater_losses(design, heater, gate, f)
        spread_res = worst = spread_note = req_spread = None
        stops = False
        if spread and corners.error is None:
            notes = []
            req = design.requirements
            fw = None if req.frequency is None else (req.frequency * (1 - req.frequency_tolerance),
                                                      req.frequency * (1 + req.frequency_tolerance))
            try:
                spread_res = monte_carlo_two_timer(design, n=int(n_mc), seed=int(seed), frequency_window=fw,
                                                   v_pin=v_pin if loop_mode else None)
                if spread_res.n_failed:
                    stops = True
                    notes.append(f"{spread_res.n_failed} of {spread_res.n} Monte Carlo samples do not work "
                                 f"({', '.join(f'{k}: {v}' for k, v in spread_res.failure_reasons.items())})")
            except DesignError as exc:
                notes.append(f"Monte Carlo: {exc}")
                stops = True
            try:
                worst = worst_case_two_timer(design, v_pin=v_pin if loop_mode else None)
            except DesignError as exc:
                notes.append(str(exc))
                stops = True
            req = design.requirements
            if req.frequency is not None or req.duty_min is not None or req.duty_max is not None or req.duty is not None:
                try:
                    req_spread = requirement_spread_two_timer(design, n=int(n_mc), seed=int(seed),
                                                              v_pin=v_pin if loop_mode else None)
                except DesignError as exc:
                    notes.append(f"requirement spread: {exc}")
            spread_note = "; ".join(notes) or None
        l_lo, l_hi = _load_supply_range(design)
        cond = Conditions(vcc=design.vcc, vcc_min=lo, vcc_max=hi, load_supply=design.load_supply, load_supply_min=l_lo,
                          load_supply_max=l_hi, t_ambient_c=design.t_ambient_c, t_thermal_c=design.t_ambient_max_c,
                          vd=None, v_clamp=p.pop("v_clamp"), duty_reachable=(float(pwm.duty_min), float(pwm.duty_max)),
                          gate_error=gate_error, spread_note=spread_note, spread_stops=stops, quick=not spread)
        part = TwoTimerPart(clock=clock, pwm=pwm, control=control, control_error=control_error, v_pin=v_pin,
                            v_source=v_source, ratiometric=loop_mode)
        ev = Evaluation(design=design, timing=timing, ideal=None, diode_law=None, pot_travel=None,
                        timer_output=_timer_output(design, gate), gate=gate, corners=corners, spread=spread_res,
                        worst_case=worst, sensitivity=None, conditions=cond, findings=Findings(()), cautions=(),
                        two_timer=part, heater=heater, requirement_spread=req_spread, **p)
        ev = _judged(design, ev)
    bad = [k for k, v in ev.key_results().items() if isinstance(v, float) and not math.isfinite(v)]
    if bad:  # pragma: no cover - key_results drops non-finite values; kept as a guard
        raise DesignError(f"evaluate: non-finite results for {', '.join(bad)}")
    return ev
