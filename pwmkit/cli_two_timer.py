"""``pwmkit demo`` lines for a two-timer design (presentation layer, used by :mod:`pwmkit.cli`)."""

from __future__ import annotations

from typing import Any

__all__ = ["demo_lines"]


def demo_lines(name: str, design: Any) -> list[str]:
    """Text lines describing a two-timer design: clock, pulse, duty range and the heater loop."""
    from .evaluate import evaluate
    from .values import format_value as fv

    t = design.timing
    ev = evaluate(design, spread=False)
    tt = ev.two_timer
    lines = [f"[{name}] two-timer PWM, {t.timer} timers, vcc {fv(design.vcc, 'V')}: clock ra {fv(t.ra, 'Ω')}, "
             f"rb {fv(t.rb, 'Ω')}, c {fv(t.c, 'F')}; monostable r {fv(t.r_mono, 'Ω')}, c {fv(t.c_mono, 'F')}",
             f"  frequency {fv(ev.timing.frequency, 'Hz', 5)}, pulse {fv(ev.timing.t_high, 's', 5)}, duty "
             f"{100 * float(ev.timing.duty):.2f} % at the control pin {tt.v_pin:.3g} V"]
    if tt.control is not None:
        c = tt.control
        lines.append(f"  control {c.vctl_low:.3g} … {c.vctl_high:.3g} V → duty {100 * c.duty_low:.3g} … "
                     f"{100 * c.duty_high:.4g} % (linearity ±{100 * c.linearity_error:.2g} pt)")
    if ev.heater is not None and ev.heater.loop is not None:
        lp = ev.heater.loop
        lines.append(f"  heater held at {lp.t_element_c:.3g} °C ({100 * lp.duty:.3g} % duty) at "
                     f"{design.t_ambient_c:g} °C ambient; loop gain {lp.gain:.2g}")
    return lines + [""]
