"""Report sections of the two-timer PWM and of heater loads (HTML fragments for :mod:`pwmkit.record.report`)."""

from __future__ import annotations

import html
from typing import Any

__all__ = ["circuit_text", "timing_html", "heater_html", "formulas_html"]


def _e(text: Any) -> str:
    return html.escape(str(text), quote=True)


def _fv(x: Any, unit: str, digits: int = 4) -> str:
    from ..values import format_value

    return format_value(float(x), unit, digits)


def circuit_text(design: Any, evaluation: Any) -> list[str]:
    """Plain sentences describing a two-timer circuit (the report escapes them)."""
    from ..parts.timers import get_timer

    t = design.timing
    fam = get_timer(t.timer)
    out = [f"Two {fam.description}s from {_fv(design.vcc, 'V')}: the first runs as a classic astable clock "
           f"(R1 {_fv(t.ra, 'Ω')}, R2 {_fv(t.rb, 'Ω')}, C1 {_fv(t.c, 'F')}) whose short output-low time triggers "
           f"the second, a monostable (R3 {_fv(t.r_mono, 'Ω')}, C4 {_fv(t.c_mono, 'F')}). The PWM output is the "
           "monostable's pulse: its frequency is the clock's, its width is set by the voltage on the monostable's "
           "control pin, which is its upper threshold."]
    tt = getattr(evaluation, "two_timer", None)
    if design.load is not None and design.load.kind == "heater" and design.load.has_loop:
        h = design.load
        out.append(f"The control pin is fed by a divider from the supply: R5 ({_fv(h.r_set, 'Ω')}) on top, an NTC "
                   f"thermistor ({_fv(h.ntc_r25, 'Ω')} at 25 °C, β {h.ntc_beta:g} K) at the heater below, working "
                   "against the timer's internal divider. As the heater warms the thermistor's resistance falls, the "
                   "control voltage falls and so does the duty: a proportional thermostat.")
    else:
        src = ("" if t.r_ctl_source in (None, 0) else f" through a source resistance of {_fv(t.r_ctl_source, 'Ω')}, "
               "which works against the internal divider")
        out.append(f"A control voltage of {_fv(t.vctl_min, 'V')} … {_fv(t.vctl_max, 'V')}{src} sets the duty.")
    if tt is not None:
        out.append(f"At the operating point the control pin sits at {_fv(tt.v_pin, 'V')}.")
    return out


def timing_html(evaluation: Any, table: Any) -> str:
    """Timing section: clock, modulator at the operating point, the control range."""
    tt, ex = evaluation.two_timer, evaluation.timing
    p, clk = tt.pwm, tt.clock
    rows = [("clock frequency", _fv(clk.frequency, "Hz", 5)), ("clock period", _fv(clk.period, "s", 5)),
            ("trigger pulse (clock low time) = minimum pulse", _fv(p.t_trigger, "s", 4)),
            ("output pulse t_high", _fv(ex.t_high, "s", 5)), ("duty", f"{100 * float(ex.duty):.3f} %"),
            ("monostable start level / rest level", f"{_fv(p.v_start, 'V', 4)} / {_fv(p.v_rest, 'V', 4)}"),
            ("capacitor recovery after the pulse", _fv(p.t_recovery, "s", 3)),
            ("reachable duty", f"{100 * float(p.duty_min):.3g} … {100 * float(p.duty_max):.4g} % "
                               f"(control pin {_fv(p.vctl_min, 'V', 3)} … {_fv(p.vctl_max, 'V', 3)})")]
    c = tt.control
    if c is not None:
        rows += [("duty over the control range", f"{100 * c.duty_low:.3g} … {100 * c.duty_high:.4g} % for "
                  f"{_fv(c.vctl_low, 'V', 3)} … {_fv(c.vctl_high, 'V', 3)} at the pin"),
                 ("linearity (endpoint line)", f"±{100 * c.linearity_error:.3g} points, worst at {_fv(c.vctl_worst, 'V', 3)}"),
                 ("supply sensitivity", f"{100 * c.supply_sensitivity:+.3g} points/V with a fixed control voltage, "
                  f"{100 * c.supply_sensitivity_ratiometric:+.2g} points/V with a ratiometric one")]
    elif tt.control_error:
        rows.append(("control range", tt.control_error))
    return table(("quantity", "value"), rows)


def heater_html(evaluation: Any, table: Any) -> str:
    """Heater section: element, temperatures, warm-up, the thermistor loop."""
    from ..evaluate_heater import heater_rows

    rows = heater_rows(evaluation)
    note = ("<p class='note'>Averaged first-order thermal model (element heat capacity and thermal resistance to "
            "ambient); the ripple is the element's swing at the PWM frequency. Check the surface temperature on "
            "the bench with the heater in its real place.</p>")
    return table(("quantity", "value"), rows) + note


def formulas_html(design: Any) -> str:
    """Formulas section of a two-timer design (worked with the design's numbers)."""
    from .formulas_two_timer import worked_two_timer

    return "<pre>" + "\n\n".join(_e(worked_two_timer(design, q, "unicode"))
                                 for q in ("t_high", "t_low", "period", "frequency", "duty")) + "</pre>"
