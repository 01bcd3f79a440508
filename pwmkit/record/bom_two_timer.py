"""Bill-of-materials rows of the two-timer PWM and of heater loads (used by :func:`pwmkit.record.bom_rows`).

Reference designators follow the two-timer schematic (:mod:`pwmkit.schematic.two_timer`): U2 the
monostable, R3/C4 its timing parts, R5 and TH1 the thermistor divider, R6 a control-source
resistor, V1 the control source, RH1 the heater element, F1 its thermal cut-out.
"""

from __future__ import annotations

from typing import Any

__all__ = ["two_timer_rows", "heater_rows"]


def two_timer_rows(design: Any, row: Any, fv: Any, pct: Any, series_note: Any) -> list[Any]:
    """Rows of the monostable half and the control input of a two-timer design."""
    from ..parts.timers import get_timer

    t = design.timing
    fam = get_timer(t.timer)
    v_max = design.supply_range[1]
    out = [row("U2", 1, "555-type timer, monostable (PWM output)", "", "", "", f"{fam.description}"),
           row("R3", 1, "resistor, monostable timing", fv(t.r_mono, "Ω"), t.r_series, pct(t.r_tolerance),
               series_note(t.r_mono, t.r_series, "Ω")),
           row("C4", 1, "capacitor, monostable timing", fv(t.c_mono, "F"), t.c_series, pct(t.c_tolerance),
               f"rated above {v_max:g} V; {series_note(t.c_mono, t.c_series, 'F')}")]
    load = design.load
    if not (load is not None and load.kind == "heater" and load.has_loop):
        if t.r_ctl_source:
            out.append(row("R6", 1, "resistor, control-source resistance", fv(t.r_ctl_source, "Ω"), t.r_series, "",
                           series_note(t.r_ctl_source, t.r_series, "Ω")))
        out.append(row("V1", 1, "control voltage at U2 pin 5", f"{fv(t.vctl_min, 'V')} … {fv(t.vctl_max, 'V')}",
                       "", "", "sets the duty at the clock's fixed frequency"))
    return out


def heater_rows(design: Any, row: Any, fv: Any, series_note: Any) -> list[Any]:
    """Rows of a heater load: element, thermistor divider, thermal cut-out."""
    h, t = design.load, design.timing
    out = [row("RH1", 1, "heater element", fv(h.r_cold, "Ω"), "", "",
               f"at {h.t_ref_c:g} °C, temperature coefficient {h.alpha:g} /K; surface limit {h.t_surface_max_c:g} °C")]
    if h.has_loop:
        out += [row("R5", 1, "resistor, thermistor divider (set point)", fv(h.r_set, "Ω"), t.r_series, "",
                    series_note(h.r_set, t.r_series, "Ω")),
                row("TH1", 1, "NTC thermistor at the heater", fv(h.ntc_r25, "Ω"), "", "",
                    f"at 25 °C, β {h.ntc_beta:g} K; in thermal contact with the element")]
    if h.t_cutout_c is not None:
        out.append(row("F1", 1, "thermal cut-out in series with the element", f"{h.t_cutout_c:g} °C", "", "",
                       "opens independently of the PWM control; rated for the heater current"))
    else:
        out.append(row("F1", 0, "thermal cut-out — not fitted", "", "", "",
                       "recommended: a cut-out that opens at or below the surface limit"))
    return out
