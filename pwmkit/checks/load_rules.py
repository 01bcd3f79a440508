"""Design rules of the output stage and the load: gate drive, MOSFET, freewheel diode, LEDs, motor.

Like :mod:`pwmkit.checks.timing_rules`, each rule compares figures computed by the model functions
(carried by the evaluation) with a limit and documents its thresholds and their origin.
"""

from __future__ import annotations

from typing import Any

import numpy as np

from ..parts.mosfets import get_mosfet
from ._common import finding, fmt, grade, pct, registry, spread_band

__all__ = ["RULES", "ASSUMED_RESISTOR_RATING"]

RULES, _rule = registry()

_GATE_MARGIN_WARN = 1.0  # V above the rated gate voltage (our judgement: covers the timer's output-high spread)
_TJ_MARGIN_WARN = 25.0  # K below the maximum junction temperature (common practice derating)
_VDS_WARN_FRACTION = 0.8  # of V_DS(max) (common practice: 80 % voltage derating, ringing not modelled)
_RATING_MARGIN = 1.5  # diode I_F(AV) and V_RRM margin (common practice 1.5–2×)
_RESISTOR_FRACTION = 0.5  # dissipate at most half the (derated) rating (common practice)
_LED_SPREAD_WARN = 0.20  # relative LED current change (our judgement, as pwmkit.loads.led)
_AVERAGE_POWER_FREQUENCY = 100.0  # Hz; above this the average power heats the resistor (common practice)

#: Resistor power rating assumed when the design does not give one [W] (a common ¼ W part).
ASSUMED_RESISTOR_RATING = 0.25


def _applies(design: Any, kind: str) -> bool:
    return design.load is not None and design.load.kind == kind


@_rule("gate.drive")
def gate_drive_level(design: Any, ev: Any) -> Any:
    """Gate voltage against the MOSFET's lowest rated R_DS(on) gate voltage.

    Gate voltage = the timer's output-high level at ``vcc_min`` (bipolar family: about 1.35 V below
    the supply). Fail below the lowest gate voltage at which R_DS(on) is rated (4.5 V logic-level,
    10 V standard); warn with less than 1 V margin (our judgement; the output-high level itself
    has a spread); ok otherwise. Origin: datasheet-generic (R_DS(on) is only guaranteed at the
    stated V_GS).
    """
    if design.load is None:
        return None
    fet = get_mosfet(design.switch.mosfet)
    v = ev.timer_output.v_high_min
    need = fet.v_gs_min_rated
    margin = v - need
    title = "Gate drive enhances the MOSFET"
    sev = "fail" if margin < 0 else ("warn" if margin < _GATE_MARGIN_WARN else "ok")
    extra = f" {ev.conditions.gate_error}" if ev.conditions.gate_error else ""
    return finding("gate.drive", sev, title, v, need, "V",
                   f"At {fmt(ev.conditions.vcc_min, 'V')} the {design.timing.timer} timer drives the gate to "
                   f"{fmt(v, 'V')}; {fet.name} has its R_DS(on) rated from {fmt(need, 'V')} "
                   f"(margin {margin:+.3g} V).{extra}",
                   "Use a logic-level MOSFET, a CMOS timer (output swings to the rail) or a gate driver; or raise "
                   "the minimum supply.", "datasheet-generic")


@_rule("gate.overvoltage")
def gate_overvoltage(design: Any, ev: Any) -> Any:
    """Gate voltage against the MOSFET's absolute-maximum V_GS.

    Fail when the timer's output-high level at ``vcc_max`` exceeds V_GS(max) (20 V typical); ok
    otherwise. Origin: datasheet-generic (absolute maximum rating).
    """
    if design.load is None:
        return None
    fet = get_mosfet(design.switch.mosfet)
    v = ev.timer_output.v_high_max
    sev = "fail" if v > fet.v_gs_max else "ok"
    return finding("gate.overvoltage", sev, "Gate voltage below its absolute maximum", v, fet.v_gs_max, "V",
                   f"The gate sees up to {fmt(v, 'V')}; the absolute maximum of {fet.name} is {fmt(fet.v_gs_max, 'V')}.",
                   "Clamp the gate with a Zener diode or regulate the timer supply.", "datasheet-generic")


def _thermal(rule_id: str, title: str, part: str, result: Any, tj_max: float, remedy: str) -> Any:
    if result.runaway:
        return finding(rule_id, "fail", title, None, tj_max, "°C",
                       f"The {part} has no stable temperature at the upper ambient: its loss grows faster with "
                       "temperature than the heat path removes it (thermal runaway).", remedy, "datasheet-generic")
    tj = float(result.tj_c)
    margin = tj_max - tj
    sev = "fail" if margin < 0 else ("warn" if margin < _TJ_MARGIN_WARN else "ok")
    return finding(rule_id, sev, title, tj, tj_max, "°C",
                   f"The {part} junction reaches {tj:.4g} °C at the upper ambient, {margin:.3g} K below its "
                   f"{tj_max:.4g} °C limit (warn below {_TJ_MARGIN_WARN:g} K margin).",
                   remedy, "common-practice" if sev == "warn" else "datasheet-generic")


@_rule("mosfet.temperature")
def mosfet_temperature(design: Any, ev: Any) -> Any:
    """MOSFET junction temperature at the upper ambient.

    Fail under thermal runaway or above T_j(max); warn with less than 25 K margin (common practice
    derating); ok otherwise. Origin: datasheet-generic (T_j(max)), common practice (margin).
    """
    if ev.mosfet is None:
        return None
    fet = ev.mosfet.gate.mosfet
    return _thermal("mosfet.temperature", "MOSFET junction temperature", "MOSFET", ev.mosfet, fet.tj_max_c,
                    "Give the MOSFET copper area or a heat sink, a lower R_DS(on) part, or a stronger gate drive.")


@_rule("mosfet.voltage")
def mosfet_voltage(design: Any, ev: Any) -> Any:
    """Drain peak voltage against V_DS(max).

    Peak = highest load supply + clamp voltage (freewheel diode drop, plus the Zener voltage with a
    Zener clamp); ringing is not modelled. Fail above V_DS(max), warn above 80 % of it (common
    practice derating), ok below. Origin: common-practice.
    """
    if design.load is None:
        return None
    fet = get_mosfet(design.switch.mosfet)
    v_clamp = ev.conditions.v_clamp or 0.0
    peak = ev.conditions.load_supply_max + v_clamp
    sev = grade(peak, _VDS_WARN_FRACTION * fet.v_ds_max, fet.v_ds_max)
    how = f" + clamp {fmt(v_clamp, 'V')}" if v_clamp else ""
    return finding("mosfet.voltage", sev, "Drain voltage below V_DS(max)", peak, fet.v_ds_max, "V",
                   f"The drain sees up to {fmt(peak, 'V')} (supply {fmt(ev.conditions.load_supply_max, 'V')}{how}), "
                   f"{pct(peak / fet.v_ds_max)} of the {fmt(fet.v_ds_max, 'V')} rating (warn above "
                   f"{pct(_VDS_WARN_FRACTION)}; wiring inductance adds ringing).",
                   "Use a higher-voltage MOSFET or a lower Zener clamp voltage.", "common-practice")


@_rule("freewheel.temperature")
def freewheel_temperature(design: Any, ev: Any) -> Any:
    """Freewheel-diode junction temperature at the upper ambient.

    Fail under thermal runaway (hot Schottky leakage) or above T_j(max); warn with less than 25 K
    margin; ok otherwise. Origin: datasheet-generic (T_j(max)), common practice (margin).
    """
    if ev.freewheel is None:
        return None
    return _thermal("freewheel.temperature", "Freewheel-diode junction temperature", "freewheel diode",
                    ev.freewheel, ev.freewheel.diode.tj_max_c,
                    "Use a larger diode (lower V_F, better package) or give it copper area.")


@_rule("freewheel.current")
def freewheel_current(design: Any, ev: Any) -> Any:
    """Freewheel-diode current rating against the stalled-motor worst case.

    Ratio I_F(AV) / worst average diode current (motor stalled, at the reachable duty nearest
    50 %, where the stall diode current peaks at V/(4R)). Fail below 1× or when the stall peak
    current exceeds the surge rating I_FSM; warn below 1.5× (common practice: 1.5–2× margin);
    ok otherwise. Origin: common-practice.
    """
    if ev.freewheel is None or ev.motor_stall_diode is None:
        return None
    dio = ev.freewheel.diode
    i_avg = float(ev.motor_stall_diode.i_diode_avg)
    ratio = dio.i_f_avg / i_avg if i_avg > 0 else 1e12
    i_pk = float(ev.motor_stall.i_max) if ev.motor_stall is not None else 0.0
    title = "Freewheel-diode current rating"
    if i_pk > dio.i_fsm:
        return finding("freewheel.current", "fail", title, i_pk, dio.i_fsm, "A",
                       f"The stalled-motor peak current {fmt(i_pk, 'A')} exceeds the surge rating {fmt(dio.i_fsm, 'A')}.",
                       "Use a larger diode.", "common-practice")
    sev = "fail" if ratio < 1.0 else ("warn" if ratio < _RATING_MARGIN else "ok")
    return finding("freewheel.current", sev, title, min(ratio, 1e6), _RATING_MARGIN, "",
                   f"With the motor stalled the diode averages {fmt(i_avg, 'A')}; its {fmt(dio.i_f_avg, 'A')} rating "
                   f"gives a {min(ratio, 1e6):.3g}× margin (want ≥ {_RATING_MARGIN:g}×).",
                   "Choose a diode rated for 1.5–2× the stall-case average current.", "common-practice")


@_rule("freewheel.voltage")
def freewheel_voltage(design: Any, ev: Any) -> Any:
    """Freewheel-diode reverse-voltage margin.

    Ratio V_RRM / highest load supply. Fail below 1×, warn below 1.5× (common practice 1.5–2×),
    ok otherwise. Origin: common-practice.
    """
    if ev.freewheel is None:
        return None
    dio = ev.freewheel.diode
    v = ev.conditions.load_supply_max
    ratio = dio.v_rrm / v
    sev = "fail" if ratio < 1.0 else ("warn" if ratio < _RATING_MARGIN else "ok")
    return finding("freewheel.voltage", sev, "Freewheel-diode reverse voltage", ratio, _RATING_MARGIN, "",
                   f"V_RRM {fmt(dio.v_rrm, 'V')} against a {fmt(v, 'V')} supply: {ratio:.3g}× (want ≥ {_RATING_MARGIN:g}×).",
                   "Use a diode with a higher reverse-voltage rating.", "common-practice")


@_rule("freewheel.recovery")
def freewheel_recovery(design: Any, ev: Any) -> Any:
    """Reverse recovery of a PN freewheel diode against the PWM period.

    Warn when t_rr exceeds 1 % of the period (the recovery current spikes the MOSFET at every
    turn-on); ok for Schottky parts or short t_rr. Origin: common-practice.
    """
    if ev.freewheel is None:
        return None
    dio = ev.freewheel.diode
    f = float(ev.timing.frequency)
    sev = "ok" if ev.freewheel.recovery_ok else "warn"
    what = "a Schottky diode (no recovery charge)" if not dio.has_recovery else f"t_rr {fmt(dio.t_rr, 's')}"
    return finding("freewheel.recovery", sev, "Freewheel-diode recovery", dio.t_rr * f * 100, 1.0, "%",
                   f"The freewheel diode is {what}: {100 * dio.t_rr * f:.3g} % of the {fmt(f, 'Hz', 4)} period.",
                   "Use a Schottky or ultrafast diode.", "common-practice")


@_rule("led.resistor_power")
def led_resistor_power(design: Any, ev: Any) -> Any:
    """LED series-resistor dissipation against its (derated) power rating.

    Power at the highest load supply: the average at the highest reachable duty when the PWM
    frequency is ≥ 100 Hz, else the on-state power (common practice). Rating: the design's
    ``load.r_power_rating`` if it has one, else an assumed ¼ W part; derated linearly from 70 °C
    (IEC 60115-1 shape, :func:`pwmkit.loads.led.resistor_derating`) at the upper ambient. Ok up to
    50 % of the derated rating, warn up to 100 %, fail above. Origin: common practice (2× margin;
    average power above 100 Hz); derating shape IEC 60115-1 (abstract only).
    """
    if not _applies(design, "led") or ev.led is None:
        return None
    from ..loads.led import resistor_derating

    high = ev.led_corners.high if ev.led_corners.high is not None else ev.led
    f = float(ev.timing.frequency)
    duty_hi = ev.conditions.duty_reachable[1]
    power = high.p_resistor_on * (duty_hi if f >= _AVERAGE_POWER_FREQUENCY else 1.0)
    rating = getattr(design.load, "r_power_rating", None)
    assumed = rating is None
    rating = ASSUMED_RESISTOR_RATING if assumed else float(rating)
    k = resistor_derating(design.t_ambient_max_c)
    usable = rating * k
    frac = power / usable if usable > 0 else np.inf
    sev = grade(frac, _RESISTOR_FRACTION, 1.0)
    basis = "average" if f >= _AVERAGE_POWER_FREQUENCY else "on-state"
    rating_text = f"an assumed {fmt(rating, 'W')} part (the design gives no rating)" if assumed else fmt(rating, "W")
    return finding("led.resistor_power", sev, "LED resistor power rating", power, _RESISTOR_FRACTION * usable, "W",
                   f"Each {fmt(high.r_series, 'Ω')} resistor dissipates {fmt(power, 'W')} ({basis}, at "
                   f"{fmt(high.vsupply, 'V')} and {pct(duty_hi)} duty): {pct(min(frac, 99.99))} of {rating_text} "
                   f"derated to {pct(k)} at {design.t_ambient_max_c:g} °C (keep ≤ {pct(_RESISTOR_FRACTION)}).",
                   f"Fit at least a {fmt(high.resistor_rating, 'W')} resistor." if high.resistor_rating else
                   "Split the resistor, raise its value, or use a constant-current driver.",
                   "common-practice")


@_rule("led.current_spread")
def led_current_spread(design: Any, ev: Any) -> Any:
    """LED current over the supply range and the LED forward-voltage spread.

    Worst case: highest load supply with the lowest V_F, and lowest supply with the highest V_F
    (``load.vf_spread`` per LED). Fail when the LEDs go dark at the lowest supply; warn when the
    current moves by more than 20 % (our judgement; a small headroom ``V_s − n·V_F`` makes the
    current very sensitive, series-resistor law, common practice); ok otherwise. Origin: common-practice.
    """
    if not _applies(design, "led") or ev.led is None:
        return None
    title = "LED current spread"
    if ev.led_corners.error:
        return finding("led.current_spread", "fail", title, None, None, "A",
                       f"At the lowest supply the LEDs go dark: {ev.led_corners.error}",
                       "Use fewer LEDs per string or a higher supply.", "common-practice")
    high = ev.led_corners.high if ev.led_corners.high is not None else ev.led
    low = ev.led_corners.low if ev.led_corners.low is not None else ev.led
    i0 = ev.led.i_peak
    i_hi, i_lo = high.i_peak_at_vf_min, low.i_peak_at_vf_max
    dev = max(i_hi / i0 - 1.0, 1.0 - i_lo / i0)
    sev = "ok" if dev <= _LED_SPREAD_WARN else "warn"
    return finding("led.current_spread", sev, title, 100 * dev, 100 * _LED_SPREAD_WARN, "%",
                   f"Nominal {fmt(i0, 'A')} per string; {fmt(i_lo, 'A')} … {fmt(i_hi, 'A')} over the supply "
                   f"{fmt(low.vsupply, 'V')} … {fmt(high.vsupply, 'V')} and V_F ± {fmt(ev.led.dvf, 'V')} per LED "
                   f"(headroom {fmt(ev.led.headroom, 'V')}).",
                   "Use fewer LEDs per string, a regulated LED supply or a constant-current driver; check the LEDs' "
                   "maximum current.", "common-practice")


@_rule("led.flicker")
def led_flicker(design: Any, ev: Any) -> Any:
    """PWM light flicker against IEEE Std 1789-2015.

    Classified at the lowest of the nominal, pot-travel and spread (1st percentile) frequencies,
    full on/off modulation. With ``requirements.flicker`` set: fail when the nominal point misses
    the required region, warn when only the travel or spread low end does, ok otherwise. Without a
    requirement: warn in the "elevated" region, ok otherwise. Origin: standard: IEEE Std 1789-2015
    RP1/RP2 (coefficients from a secondary summary).
    """
    if not _applies(design, "led") or ev.flicker is None:
        return None
    from ..loads.flicker import flicker_class

    origin = "standard: IEEE Std 1789-2015 RP1/RP2"
    rank = {"no-effect": 0, "low-risk": 1, "elevated": 2}
    fl = ev.flicker
    f_low = float(fl.frequency)
    if ev.pot_travel is not None:
        duty = np.asarray(ev.pot_travel.duty)
        inner = (duty > 0) & (duty < 1)
        if np.any(inner):
            f_low = min(f_low, float(np.min(np.asarray(ev.pot_travel.frequency)[inner])))
    band = spread_band(ev.spread, "frequency")
    if band is not None:
        f_low = min(f_low, band[0])
    mod = 100.0 if ev.pot_travel is not None else fl.modulation_percent
    worst = flicker_class(f_low, mod)
    req = design.requirements.flicker
    title = "Light flicker (IEEE 1789)"
    text = (f"At {fmt(float(fl.frequency), 'Hz', 4)} with {fl.modulation_percent:.3g} % modulation the light is "
            f"'{fl.classification}'; at the lowest frequency {fmt(f_low, 'Hz', 4)} it is '{worst}'.")
    need = {"no-effect": fmt(3000.0, "Hz"), "low-risk": fmt(1250.0, "Hz")}
    if req is None:
        sev = "warn" if worst == "elevated" else "ok"
        return finding("led.flicker", sev, title, f_low, 1250.0, "Hz", text,
                       f"Raise the PWM frequency above {need['low-risk']} (low risk) or {need['no-effect']} "
                       "(no observable effect).", origin)
    if rank[fl.classification] > rank[req]:
        sev = "fail"
    elif rank[worst] > rank[req]:
        sev = "warn"
    else:
        sev = "ok"
    return finding("led.flicker", sev, title, f_low, 3000.0 if req == "no-effect" else 1250.0, "Hz",
                   text + f" Required: '{req}'.",
                   f"Raise the PWM frequency above {need[req]} for full on/off PWM.", origin)


@_rule("motor.conduction")
def motor_conduction(design: Any, ev: Any) -> Any:
    """Continuous or discontinuous motor current.

    Warn in discontinuous conduction (the current falls to zero each period: speed is less linear
    with duty and the peak current is higher for the same torque); ok in continuous conduction.
    Origin: common-practice (chopper CCM/DCM boundary, Mohan et al. ch. 7).
    """
    if not _applies(design, "motor") or ev.motor is None:
        return None
    m = ev.motor
    sev = "ok" if m.continuous else "warn"
    return finding("motor.conduction", sev, "Motor current continuous", float(m.i_min), 0.0, "A",
                   f"The armature current runs {fmt(float(m.i_min), 'A')} … {fmt(float(m.i_max), 'A')} ({m.mode} "
                   f"conduction; back-EMF boundary {fmt(float(m.e_boundary), 'V')}).",
                   "Raise the PWM frequency or add series inductance for continuous current.", "common-practice")


@_rule("motor.audible")
def motor_audible(design: Any, ev: Any) -> Any:
    """PWM frequency in the audible band (20 Hz – 20 kHz) for motors and fans.

    Warn when the nominal, pot-travel or spread (1st–99th percentile) frequencies fall in the band
    (the winding sings at the PWM frequency); ok above it. Origin: common-practice.
    """
    if not _applies(design, "motor"):
        return None
    from ..loads.motor import AUDIBLE_RANGE, audible

    freqs = [float(ev.timing.frequency)]
    if ev.pot_travel is not None:
        freqs += [float(np.min(ev.pot_travel.frequency)), float(np.max(ev.pot_travel.frequency))]
    band = spread_band(ev.spread, "frequency")
    if band is not None:
        freqs += list(band)
    hits = [f for f in freqs if audible(f)]
    f_show = min(hits) if hits else min(freqs)
    sev = "warn" if hits else "ok"
    return finding("motor.audible", sev, "PWM above the audible band", f_show, AUDIBLE_RANGE[1], "Hz",
                   f"The PWM frequency spans {fmt(min(freqs), 'Hz', 4)} … {fmt(max(freqs), 'Hz', 4)} (nominal, pot "
                   f"travel, tolerance spread); the audible band is {fmt(AUDIBLE_RANGE[0], 'Hz')} … "
                   f"{fmt(AUDIBLE_RANGE[1], 'Hz')}.",
                   "Move the PWM frequency above about 22 kHz with margin for the tolerances.", "common-practice")


@_rule("motor.start")
def motor_start(design: Any, ev: Any) -> Any:
    """The motor turns at the design duty.

    Warn when the stall torque at the design duty does not overcome the friction and load torque
    (the motor stays stalled and draws its stall current); ok when it runs. Origin: common-practice.
    """
    if not _applies(design, "motor") or ev.motor_speed is None:
        return None
    s = ev.motor_speed
    sev = "warn" if s.stalled else "ok"
    return finding("motor.start", sev, "Motor turns at the design duty", float(s.rpm), None, "rpm",
                   "The motor stays stalled at this duty and draws its stall current." if s.stalled else
                   f"The motor runs at {float(s.rpm):.4g} rpm with {fmt(float(s.i_mean), 'A')} mean current.",
                   "Raise the duty (or the minimum of the pot travel) above the start-up duty.", "common-practice")
