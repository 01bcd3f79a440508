"""Design rules of heater loads: surface temperature, the fault case, the thermistor loop.

Rules read ``ev.heater`` (see :mod:`pwmkit.evaluate_heater`) and give no finding for other loads.
"""

from __future__ import annotations

from typing import Any

from ._common import finding, fmt, registry

__all__ = ["RULES"]

RULES, _rule = registry()

_PM_WARN = 45.0  # degrees; a phase margin of 45° or more is the usual aim (K. Ogata, Modern Control Engineering, 5th ed., §7-6, from memory)
_PM_FAIL = 20.0  # degrees; below this the step response rings strongly (our judgement)
_DROOP_WARN = 0.5  # droop above 0.5 K per K of ambient: the loop hardly regulates (our judgement)


def _part(design: Any, ev: Any) -> Any:
    if design.load is None or design.load.kind != "heater":
        return None
    return getattr(ev, "heater", None)


@_rule("heater.surface")
def surface_temperature(design: Any, ev: Any) -> Any:
    """Element (surface) temperature in operation against ``t_surface_max_c``.

    The operating temperature at the highest ambient (closed loop if there is one) plus half the
    PWM ripple: fail above the limit, warn within 5 K of it, ok otherwise. Origin: the design's own
    limit; the 5 K margin is our judgement.
    """
    hp = _part(design, ev)
    if hp is None:
        return None
    limit = design.load.t_surface_max_c
    t = float(hp.loop_hot.t_element_c if hp.loop_hot is not None else hp.hot.t_element_c) + 0.5 * float(
        hp.hot.ripple_pp)
    sev = "fail" if t > limit else "warn" if t > limit - 5.0 else "ok"
    return finding("heater.surface", sev, "Heater surface temperature", t, limit, "°C",
                   f"The element runs at about {fmt(t, '°C')} at {design.t_ambient_max_c:g} °C ambient "
                   f"(limit {fmt(limit, '°C')}).",
                   "Lower the duty range or the set point, or spread the heat over a larger area.", "common-practice")


@_rule("heater.fault")
def fault_temperature(design: Any, ev: Any) -> Any:
    """Element temperature with the control lost (switch shorted, sensor open): full power.

    When it exceeds ``t_surface_max_c``: warn without a thermal cut-out, or with one that opens
    above the limit; warn also when the cut-out opens within 5 K of the normal operating temperature
    (nuisance trips, our judgement); ok otherwise. Origin: common practice (an independent
    cut-out for heaters).
    """
    hp = _part(design, ev)
    if hp is None:
        return None
    h = design.load
    limit = h.t_surface_max_c
    title = "Heater temperature with the control lost"
    t_run = float(hp.loop_hot.t_element_c if hp.loop_hot is not None else hp.hot.t_element_c)
    text = f"At full power and {design.t_ambient_max_c:g} °C ambient the element would reach {fmt(hp.t_fault_c, '°C')}"
    if hp.t_fault_c <= limit:
        return finding("heater.fault", "ok", title, hp.t_fault_c, limit, "°C", text + f", within the {fmt(limit, '°C')} "
                       "limit.", "", "common-practice")
    if h.t_cutout_c is None or h.t_cutout_c > limit:
        what = "no thermal cut-out is fitted" if h.t_cutout_c is None else f"the cut-out opens only at {fmt(h.t_cutout_c, '°C')}"
        return finding("heater.fault", "warn", title, hp.t_fault_c, limit, "°C",
                       text + f", above the {fmt(limit, '°C')} limit, and {what}.",
                       "Fit a thermal cut-out (or thermal fuse) in series with the element that opens at or below "
                       "the surface limit, independent of the control.", "common-practice")
    if h.t_cutout_c < t_run + 5.0:
        return finding("heater.fault", "warn", title, h.t_cutout_c, t_run + 5.0, "°C",
                       f"The cut-out opens at {fmt(h.t_cutout_c, '°C')}, within 5 K of the operating temperature "
                       f"{fmt(t_run, '°C')}: it will trip in normal use.",
                       "Lower the operating temperature or pick a cut-out between it and the surface limit.",
                       "common-practice")
    return finding("heater.fault", "ok", title, hp.t_fault_c, limit, "°C",
                   text + f"; the {fmt(h.t_cutout_c, '°C')} cut-out opens first.", "", "common-practice")


@_rule("heater.loop")
def loop_stability(design: Any, ev: Any) -> Any:
    """Stability and strength of the thermistor loop.

    Phase margin of the linearised loop (thermal pole, sensor lag, half a PWM period of sampling delay): fail
    below 20° (our judgement), warn below 45° (the usual aim; K. Ogata, *Modern Control
    Engineering*, 5th ed., §7-6, from memory); warn when the loop saturates at a duty limit or when
    the droop exceeds 0.5 K per K of ambient (our judgement). Origin: from-memory / our judgement.
    """
    hp = _part(design, ev)
    if hp is None or hp.loop is None:
        return None
    lp = hp.loop
    title = "Thermistor loop: stability and regulation"
    if lp.phase_margin_deg < _PM_FAIL:
        return finding("heater.loop", "fail", title, lp.phase_margin_deg, _PM_WARN, "°",
                       f"Phase margin {lp.phase_margin_deg:.3g}° (gain {lp.gain:.3g}): the temperature oscillates.",
                       "Reduce the loop gain (larger r_set or a smaller control range) or put the thermistor "
                       "closer to the element (less lag).", "from-memory")
    if lp.phase_margin_deg < _PM_WARN:
        return finding("heater.loop", "warn", title, lp.phase_margin_deg, _PM_WARN, "°",
                       f"Phase margin {lp.phase_margin_deg:.3g}°: the temperature overshoots and rings after a "
                       "change.", "Reduce the loop gain or the sensor lag.", "from-memory")
    if lp.saturated:
        return finding("heater.loop", "warn", title, lp.duty, None, "",
                       f"The loop settles on a duty limit ({100 * lp.duty:.3g} %): it does not regulate there "
                       f"(element {fmt(lp.t_element_c, '°C')}).",
                       "Move the set point (r_set) into the heater's range.", "common-practice")
    if lp.droop > _DROOP_WARN:
        return finding("heater.loop", "warn", title, lp.droop, _DROOP_WARN, "",
                       f"Loop gain {lp.gain:.3g}: the set temperature moves {lp.droop:.2g} K per K of ambient.",
                       "Raise the loop gain: a stiffer divider (smaller r_set and thermistor) or a buffer.",
                       "common-practice")
    margin = "no crossover (gain below 1)" if lp.crossover == 0 else f"phase margin {lp.phase_margin_deg:.3g}°"
    return finding("heater.loop", "ok", title, lp.phase_margin_deg, _PM_WARN, "°",
                   f"The loop holds {fmt(lp.t_element_c, '°C')} at {100 * lp.duty:.3g} % duty; gain {lp.gain:.3g}, "
                   f"{margin}, droop {lp.droop:.2g} K/K.", "", "from-memory")
