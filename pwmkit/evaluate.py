"""Evaluate a design: every figure, the design-rule findings and the cautions in one result.

:func:`evaluate` takes a :class:`~pwmkit.design.Design` and calls the model functions with its
values — timing (:func:`pwmkit.timing.astable`, :func:`~pwmkit.timing.astable_ideal`,
:func:`~pwmkit.timing.diode_law_timing`), gate drive and losses (:mod:`pwmkit.loads.mosfet`),
the load (:mod:`pwmkit.loads.led`, :mod:`~pwmkit.loads.flicker`, :mod:`~pwmkit.loads.lightness`,
:mod:`~pwmkit.loads.motor`, :mod:`~pwmkit.loads.diode`) and the tolerance spread — then runs the
design rules (:func:`pwmkit.checks.run_checks`) and picks the cautions
(:func:`pwmkit.cautions.cautions_for`). It does no physics of its own; it only decides which
operating conditions each model sees:

- electrical figures at the nominal supply ``vcc`` (the load at ``design.load_supply``);
- temperatures (MOSFET, freewheel diode, resistor derating) at the upper ambient
  ``t_ambient_max_c`` — the hot case the design rules need;
- the MOSFET gate is driven by the timer family's output (output-high level at ``vcc`` behind its
  source resistance, bipolar ≈ 1.35 V below the supply) through ``switch.r_gate``;
- the motor's back-EMF comes from the steady-speed solver at the design duty; the freewheel
  diode's drop is taken from its Shockley model at the diode's operating current;
- a steering diode without a fixed ``vd`` drops what its family gives at 1 mA and 25 °C.

``spread=False`` is the quick mode for widgets (no Monte Carlo, worst case, sensitivity or
diode-law timing); see ``benchmarks/bench_evaluate.py`` for timings.
"""

from __future__ import annotations

import html
import math
from dataclasses import dataclass, fields, is_dataclass, replace
from typing import Any

import numpy as np

from .errors import DesignError, ModelLimit
from .two_timer_design import circuit_words as _circuit_words

__all__ = ["Evaluation", "PotTravel", "TimerOutput", "SupplyCorners", "LedCorners", "Conditions", "evaluate",
           "timing_kwargs", "tolerance_kwargs", "dielectric_of", "TRAVEL_POINTS", "SPEED_ITERATIONS"]

#: Wiper positions of the pot-travel sweep.
TRAVEL_POINTS = 101
#: Bisection steps of the motor steady-speed solver (2^-28 ≈ 4e-9 of the speed bracket 0 … V/K_e).
SPEED_ITERATIONS = 28
_VF_LADDER = 64  # freewheel-diode drops tried (currents 1e-4 … 1 × V/R, about 4 mV apart)
_STEERING_VD_CURRENT = 1e-3  # A, as pwmkit.timing.astable.DEFAULT_VD_CURRENT


# ------------------------------------------------------------------------------------------------
# small result records
# ------------------------------------------------------------------------------------------------
@dataclass(frozen=True)
class PotTravel:
    """Timing over the wiper travel of a pot-steered design (arrays over ``wiper``).

    Attributes
    ----------
    wiper : wiper positions 0 … 1 [1]
    frequency, duty : exact frequency [Hz] and duty [1]
    frequency_ideal, duty_ideal : the textbook ``ln 2`` forms [Hz], [1]
    r_charge, r_discharge : charge and discharge path resistances [Ω]
    """

    wiper: np.ndarray
    frequency: np.ndarray
    duty: np.ndarray
    frequency_ideal: np.ndarray
    duty_ideal: np.ndarray
    r_charge: np.ndarray
    r_discharge: np.ndarray

    @property
    def duty_range(self) -> tuple[float, float]:
        """(lowest, highest) duty over the travel [1]."""
        return float(np.min(self.duty)), float(np.max(self.duty))

    @property
    def frequency_range(self) -> tuple[float, float]:
        """(lowest, highest) frequency over the travel [Hz]."""
        return float(np.min(self.frequency)), float(np.max(self.frequency))

    def __repr__(self) -> str:
        (d0, d1), (f0, f1) = self.duty_range, self.frequency_range
        return (f"PotTravel({len(self.wiper)} positions: duty {100 * d0:.3g} … {100 * d1:.4g} %, "
                f"f {f0:.5g} … {f1:.5g} Hz)")


@dataclass(frozen=True)
class TimerOutput:
    """The timer output as the MOSFET's gate driver.

    Attributes
    ----------
    timer : family name
    v_high, v_high_min, v_high_max : output-high level, no load, at ``vcc``, ``vcc_min``, ``vcc_max`` [V]
    r_source, r_sink : output source (high) and sink (low) resistance [Ω]
    i_gate_plateau : gate current on the Miller plateau at turn-on, None without a gate drive [A]
    v_high_plateau : output-high level while sourcing that current [V]
    t_edge : the family's own output rise/fall time [s]
    """

    timer: str
    v_high: float
    v_high_min: float
    v_high_max: float
    r_source: float
    r_sink: float
    i_gate_plateau: float | None
    v_high_plateau: float | None
    t_edge: float


@dataclass(frozen=True)
class SupplyCorners:
    """Timing at both ends of the supply range (over the pot travel for pot designs).

    ``timing_min``/``timing_max`` are :class:`~pwmkit.timing.AstableResult` at ``vcc_min``/``vcc_max``,
    None when the timer does not oscillate there (``error`` says why).
    """

    vcc_min: float
    vcc_max: float
    timing_min: Any
    timing_max: Any
    error: str | None


@dataclass(frozen=True)
class LedCorners:
    """LED drive at the lowest and highest load supply (``error``: why the LEDs go dark at the low end)."""

    low: Any
    high: Any
    error: str | None


@dataclass(frozen=True)
class Conditions:
    """Operating conditions the models were given.

    Attributes
    ----------
    vcc, vcc_min, vcc_max : timer supply, nominal and range [V]
    load_supply, load_supply_min, load_supply_max : load supply, nominal and range [V]
    t_ambient_c : nominal ambient [°C]; t_thermal_c : ambient of the temperature figures [°C]
    vd : steering-diode drop used by the closed form (None for classic) [V]
    v_clamp : freewheel clamp voltage at turn-off, diode drop (+ Zener) (None without a motor) [V]
    duty_reachable : (lowest, highest) duty the control reaches [1]
    gate_error : why the gate drive could not be computed, or None
    spread_note : why (part of) the tolerance analysis could not be completed, or None
    spread_stops : some Monte Carlo samples or worst-case points do not oscillate
    quick : True for ``spread=False``
    """

    vcc: float
    vcc_min: float
    vcc_max: float
    load_supply: float
    load_supply_min: float
    load_supply_max: float
    t_ambient_c: float
    t_thermal_c: float
    vd: float | None
    v_clamp: float | None
    duty_reachable: tuple[float, float]
    gate_error: str | None
    spread_note: str | None
    spread_stops: bool
    quick: bool


# ------------------------------------------------------------------------------------------------
# JSON helpers
# ------------------------------------------------------------------------------------------------
_MAX_ARRAY = 1000  # longer arrays (Monte Carlo samples) are summarised in to_dict()


def _jsonable(obj: Any, depth: int = 0) -> Any:
    """Nested plain-Python, JSON-ready copy: numpy → float/list, NaN/inf/masked → None."""
    if depth > 12:
        return repr(obj)
    if obj is None or isinstance(obj, (bool, str)):
        return obj
    if isinstance(obj, (np.bool_,)):
        return bool(obj)
    if isinstance(obj, (int, np.integer)):
        return int(obj)
    if isinstance(obj, (float, np.floating)):
        v = float(obj)
        return v if math.isfinite(v) else None
    if isinstance(obj, np.ma.MaskedArray):
        return _jsonable(np.ma.filled(obj.astype(float), np.nan), depth + 1)
    if isinstance(obj, np.ndarray):
        if obj.size > _MAX_ARRAY:
            flat = obj.astype(float).ravel()
            return {"samples": int(obj.size), "min": _jsonable(np.nanmin(flat)), "max": _jsonable(np.nanmax(flat))}
        return [_jsonable(x, depth + 1) for x in obj.tolist()]
    if hasattr(obj, "to_dict") and callable(obj.to_dict) and not isinstance(obj, type):
        return _jsonable(obj.to_dict(), depth + 1)
    if is_dataclass(obj) and not isinstance(obj, type):
        return {f.name: _jsonable(getattr(obj, f.name), depth + 1) for f in fields(obj)
                if f.name not in ("origin",)}
    if isinstance(obj, dict) or hasattr(obj, "items"):
        return {str(k): _jsonable(v, depth + 1) for k, v in obj.items()}
    if isinstance(obj, (list, tuple)):
        return [_jsonable(x, depth + 1) for x in obj]
    return repr(obj)


def _scalar(x: Any) -> float | None:
    if x is None or isinstance(x, (bool, np.bool_)):
        return None
    v = float(x)
    return v if math.isfinite(v) else None


# ------------------------------------------------------------------------------------------------
# the evaluation
# ------------------------------------------------------------------------------------------------
@dataclass(frozen=True)
class Evaluation:
    """Everything pwmkit computes about one design (see :func:`evaluate`).

    Attributes
    ----------
    design : Design
    timing : AstableResult — exact timing at the nominal design point
    ideal : AstableResult or None — the textbook ``ln 2`` forms (None where they are degenerate)
    diode_law : DiodeLawTiming or None — Shockley-law steering diodes (None: classic, or quick mode)
    pot_travel : PotTravel or None — pot topology only
    timer_output : TimerOutput — the timer output as gate driver
    gate : GateDrive or None — None when the output cannot lift the gate past its plateau
    led : LedDrive or None; led_corners : LedCorners or None
    flicker : PwmFlicker or None — LED loads
    lightness : float or None — CIE 1976 L* at the design duty (LED loads) [1]
    motor : MotorCurrent or None — at the steady speed
    motor_speed : SteadySpeed or None
    motor_stall : MotorCurrent or None — rotor held, highest reachable duty (peak ratings)
    motor_stall_diode : MotorCurrent or None — rotor held, reachable duty nearest 50 % (diode average)
    mosfet : MosfetLosses or None; freewheel : FreewheelDiode or None; clamp : ClampDecay or None
    corners : SupplyCorners — timing at the supply-range ends
    spread, worst_case, sensitivity : tolerance results or None (quick mode)
    conditions : Conditions
    findings : Findings; cautions : tuple of Caution
    two_timer : TwoTimerPart or None — two-timer topology: clock, modulator, control range
        (:mod:`pwmkit.evaluate_two_timer`)
    heater : HeaterPart or None — heater loads: element, sweep, thermistor loop (:mod:`pwmkit.evaluate_heater`)
    requirement_spread : RequirementSpread or None — the spread judged against the requirements
        (:func:`pwmkit.requirement_spread.requirement_spread`; None in quick mode or without a
        frequency or duty requirement)
    """

    design: Any
    timing: Any
    ideal: Any
    diode_law: Any
    pot_travel: PotTravel | None
    timer_output: TimerOutput
    gate: Any
    led: Any
    led_corners: LedCorners | None
    flicker: Any
    lightness: float | None
    motor: Any
    motor_speed: Any
    motor_stall: Any
    motor_stall_diode: Any
    mosfet: Any
    freewheel: Any
    clamp: Any
    corners: SupplyCorners
    spread: Any
    worst_case: Any
    sensitivity: Any
    conditions: Conditions
    findings: Any
    cautions: tuple[Any, ...]
    two_timer: Any = None
    heater: Any = None
    requirement_spread: Any = None

    # -- flat results -----------------------------------------------------------------------------
    def key_results(self) -> dict[str, float | str]:
        """Flat, JSON-ready scalars with stable dotted names (absent when not computed).

        Names: ``design.*``; ``timing.frequency|duty|t_high|t_low|period|v_upper|v_lower``;
        ``ideal.frequency|duty``, ``ideal.frequency_error``; ``diode_law.frequency|duty|frequency_error``;
        ``pot.duty_min|duty_max|frequency_min|frequency_max``; ``timer_output.v_high|r_source``;
        ``gate.v_gate|margin|t_on|t_off|rds_on``; ``led.i_peak|i_peak_total|i_avg_total|p_resistor_on|
        p_resistor_avg|p_leds_avg``; ``flicker.modulation_percent|flicker_index|class``;
        ``lightness.lstar``; ``motor.i_mean|i_min|i_max|i_ripple_pp|i_rms|i_switch_rms|i_diode_avg|mode|
        speed_rpm|back_emf|stall_i_max``; ``mosfet.p_total|p_cond|p_sw|t_junction_c|rds_on_hot|state``;
        ``freewheel.p_total|t_junction_c|current_ratio|voltage_ratio|state``;
        ``clamp.t_zero|v_switch_peak|clamp_energy``; ``spread.frequency_p01|p50|p99``,
        ``spread.duty_p01|p50|p99``, ``spread.frequency_std|n_failed|yield``;
        ``worst_case.frequency_min|frequency_max|duty_min|duty_max``;
        ``sensitivity.frequency.<parameter>`` (∂ln f/∂ln x), ``sensitivity.frequency_rel_std``;
        ``bench.readings|inside|percentile_frequency|percentile_duty|culprit``, ``bench.estimate.<part>``
        (designs with bench readings, full mode; :func:`pwmkit.bench.reconcile_design`);
        ``requirements.frequency_low|frequency_high|duty_low|duty_high|frequency_yield|duty_yield``;
        ``findings.fail_count|warn_count|worst``.
        """
        out: dict[str, float | str] = {}

        def put(name: str, value: Any) -> None:
            if isinstance(value, str):
                out[name] = value
                return
            v = _scalar(value)
            if v is not None:
                out[name] = v

        def group(prefix: str, obj: Any, names: str) -> None:
            """``names``: space-separated ``key`` or ``key=attribute`` items of ``obj``."""
            if obj is not None:
                for item in names.split():
                    key, _, attr = item.partition("=")
                    put(f"{prefix}.{key}", getattr(obj, attr or key))

        d, t = self.design, self.timing
        put("design.name", d.name)
        put("design.topology", d.timing.topology)
        put("design.timer", d.timing.timer)
        put("design.load", "none" if d.load is None else d.load.kind)
        group("timing", t, "frequency duty t_high t_low period v_upper v_lower")
        group("ideal", self.ideal, "frequency duty")
        if self.ideal is not None:
            put("ideal.frequency_error", t.frequency / self.ideal.frequency - 1.0)
        group("diode_law", self.diode_law, "frequency duty frequency_error")
        if self.pot_travel is not None:
            (d0, d1), (f0, f1) = self.pot_travel.duty_range, self.pot_travel.frequency_range
            for key, val in (("duty_min", d0), ("duty_max", d1), ("frequency_min", f0), ("frequency_max", f1)):
                put(f"pot.{key}", val)
        group("timer_output", self.timer_output, "v_high r_source")
        group("gate", self.gate, "v_gate=v_gate_on margin=gate_margin t_on t_off rds_on=rds_on_25")
        group("led", self.led, "i_peak i_peak_total i_avg_total p_resistor_on p_resistor_avg p_leds_avg=p_leds_total_avg")
        group("flicker", self.flicker, "modulation_percent flicker_index class=classification")
        if self.lightness is not None:
            put("lightness.lstar", self.lightness)
        group("motor", self.motor, "i_mean i_min i_max i_ripple_pp i_rms i_switch_rms i_diode_avg mode")
        group("motor", self.motor_speed, "speed_rpm=rpm back_emf=e")
        group("motor", self.motor_stall, "stall_i_max=i_max")
        if self.mosfet is not None:
            m = self.mosfet
            put("mosfet.state", "runaway" if m.runaway else ("over-temperature" if m.over_temperature else "ok"))
            group("mosfet", m, "p_total p_cond p_sw t_junction_c=tj_c rds_on_hot")
        if self.freewheel is not None:
            fw = self.freewheel
            put("freewheel.state", "runaway" if fw.runaway else ("ok" if fw.ok else "check"))
            group("freewheel", fw, "p_total t_junction_c=tj_c voltage_ratio")
            put("freewheel.current_ratio", min(float(fw.current_ratio), 1e6))
        group("clamp", self.clamp, "t_zero v_switch_peak clamp_energy")
        if self.spread is not None:
            pc = self.spread.percentile(np.array([1.0, 50.0, 99.0]))
            for q in ("frequency", "duty"):
                for tag, val in zip(("p01", "p50", "p99"), getattr(pc, q)):
                    put(f"spread.{q}_{tag}", val)
            put("spread.n_failed", float(self.spread.n_failed))
            group("spread", self.spread, "frequency_std yield=yield_")
        group("worst_case", self.worst_case, "frequency_min frequency_max duty_min duty_max")
        if self.sensitivity is not None:
            for row in self.sensitivity.rows:
                put(f"sensitivity.frequency.{row.name}", row.s_frequency)
            put("sensitivity.frequency_rel_std", self.sensitivity.frequency_rel_std)
        if self.two_timer is not None:
            tt = self.two_timer
            group("two_timer", tt.pwm, "v_pin=vctl t_trigger t_recovery duty_min duty_max vctl_min vctl_max")
            group("two_timer", tt.control, "duty_low duty_high linearity_error slope supply_sensitivity "
                                           "supply_sensitivity_ratiometric")
        if self.heater is not None:
            hp = self.heater
            group("heater", hp.element, "t_element_c t_peak_c p_avg p_on i_on ripple_pp warm_up r_hot")
            group("heater", hp.hot, "t_element_hot_c=t_element_c")
            put("heater.t_fault_c", hp.t_fault_c)
            group("heater", hp.loop, "loop_t_c=t_element_c loop_gain=gain phase_margin_deg crossover")
            if hp.loop_spread is not None:
                put("heater.loop_t_min_c", hp.loop_spread[0])
                put("heater.loop_t_max_c", hp.loop_spread[1])
        if self.design.bench and self.spread is not None:  # bench readings against the design
            from .bench.reconciliation import reconcile_design

            try:
                rec = reconcile_design(self.design, n=max(int(self.spread.n), 1000), seed=int(self.spread.seed or 0))
            except DesignError:  # the bench.match finding says why
                rec = None
            if rec is not None:
                put("bench.readings", float(len(rec.readings)))
                put("bench.inside", 1.0 if rec.inside else 0.0)
                for q, p in rec.percentile.items():
                    put(f"bench.percentile_{q}", p)
                put("bench.culprit", rec.culprit)
                for part in ("c", "ra", "rb", "pot", "vd", "timer"):
                    if part in rec.estimates:
                        put(f"bench.estimate.{part}", rec.estimates[part])
        rs = self.requirement_spread
        if rs is not None:
            group("requirements", rs, "frequency_low frequency_high duty_low duty_high")
            for key in ("frequency_yield", "duty_yield"):
                if getattr(rs, key) is not None:
                    put(f"requirements.{key}", getattr(rs, key))
        put("findings.fail_count", float(self.findings.fail_count))
        put("findings.warn_count", float(self.findings.warn_count))
        put("findings.worst", self.findings.worst)
        return out

    def to_dict(self) -> dict[str, Any]:
        """Nested JSON-ready dict (no numpy types, no NaN/inf — None instead; long sample arrays summarised)."""
        out = {f.name: _jsonable(getattr(self, f.name)) for f in fields(self) if f.name not in ("findings",)}
        out["findings"] = self.findings.as_rows()
        out["key_results"] = self.key_results()
        return out

    def __repr__(self) -> str:
        t = self.timing
        return (f"Evaluation({self.design.name!r}: f={float(t.frequency):.5g} Hz, duty={100 * float(t.duty):.4g} %, "
                f"{self.findings.fail_count} fail, {self.findings.warn_count} warn)")

    def _repr_html_(self) -> str:
        return _evaluation_html(self)


# ------------------------------------------------------------------------------------------------
# evaluation steps
# ------------------------------------------------------------------------------------------------
def timing_kwargs(design: Any) -> dict[str, Any]:
    """Keyword arguments of :func:`pwmkit.timing.astable` used for a design (without the topology).

    :meth:`Design.astable_kwargs`, plus the steering-diode drop of the design's diode family at
    1 mA and 25 °C when the design does not fix ``vd`` (for the default small-signal silicon diode
    this equals :func:`pwmkit.timing.default_vd`).
    """
    from .parts.diodes import get_diode

    kw = design.astable_kwargs()
    t = design.timing
    if t.topology != "classic" and t.vd is None:
        kw["vd"] = float(get_diode(t.diode).vf(_STEERING_VD_CURRENT))
    return kw


def dielectric_of(design: Any) -> str:
    """Dielectric name of :mod:`pwmkit.parts.capacitors` for a design's ``timing.c_dielectric``.

    The design's generic ``"film"`` is taken as polyester film (``"film-PET"``), the more common
    and less stable film (common practice).
    """
    name = design.timing.c_dielectric
    return {"film": "film-PET"}.get(name, name)


def tolerance_kwargs(design: Any) -> dict[str, Any]:
    """Tolerance-model keywords of :func:`pwmkit.tolerance.monte_carlo` and ``worst_case`` for a design.

    Relative bands ``r_tolerance`` on ``ra``/``rb``, ``pot_tolerance`` on the pot, ``c_tolerance``
    on the capacitor; the dielectric's temperature envelope and the steering diode's drop
    temperature coefficient (its Shockley model at 1 mA, 25 °C) over ``t_ambient_min_c …
    t_ambient_max_c``; the supply range ``vcc_min … vcc_max``; the timer family's initial
    accuracy, drift and supply sensitivity.
    """
    from .parts.diodes import get_diode

    t = design.timing
    tol = {"ra": t.r_tolerance, "rb": t.r_tolerance, "c": t.c_tolerance}
    if t.topology == "pot":
        tol["pot"] = t.pot_tolerance
    lo, hi = design.supply_range
    out: dict[str, Any] = dict(tolerances=tol, dielectric=dielectric_of(design), timer_errors=True,
                               t_ambient_c=(design.t_ambient_min_c, design.t_ambient_max_c),
                               vcc_range=(lo, hi) if hi > lo else None)
    if t.topology != "classic":
        out["vd_tempco"] = float(get_diode(t.diode).vf_tempco(_STEERING_VD_CURRENT, 25.0))
    return out


def _windows(design: Any) -> dict[str, Any]:
    req = design.requirements
    out: dict[str, Any] = {}
    if req.frequency is not None:
        out["frequency_window"] = (req.frequency * (1 - req.frequency_tolerance),
                                   req.frequency * (1 + req.frequency_tolerance))
    if design.timing.topology != "pot" and (req.duty_min is not None or req.duty_max is not None):
        out["duty_window"] = (0.0 if req.duty_min is None else req.duty_min, 1.0 if req.duty_max is None else req.duty_max)
    return out


def _tolerance_part(design: Any, kw: dict[str, Any], n: int, seed: int) -> tuple[Any, Any, Any, str | None, bool]:
    """Monte Carlo spread, worst case, sensitivities; a DesignError of one becomes a note; True if samples stop."""
    from .sensitivity import sensitivities
    from .tolerance import monte_carlo, worst_case

    topo = design.timing.topology
    common = tolerance_kwargs(design)
    notes: list[str] = []
    results: list[Any] = []
    calls = (
        ("Monte Carlo", lambda: monte_carlo(topo, n=n, seed=seed, allow_failures=True, **_windows(design), **common,
                                            **kw)),
        ("worst case", lambda: worst_case(topo, **common, **kw)),
        ("sensitivity", lambda: sensitivities(topo, tolerances=common["tolerances"], timer_accuracy=True, **kw)),
    )
    for label, call in calls:
        try:
            results.append(call())
        except ModelLimit as exc:  # only expected limits become notes; bad input surfaces
            results.append(None)
            notes.append(f"{label}: {exc}")
    mc = results[0]
    if mc is not None and mc.n_failed:
        notes.insert(0, f"{mc.n_failed} of {mc.n} Monte Carlo samples do not oscillate "
                        f"({', '.join(f'{k}: {v}' for k, v in mc.failure_reasons.items())})")
    stops = (mc is not None and mc.n_failed > 0) or any("does not oscillate" in n for n in notes)
    return results[0], results[1], results[2], "; ".join(notes) or None, stops


def _requirement_part(design: Any, kw: dict[str, Any], n: int, seed: int) -> tuple[Any, str | None]:
    """The spread judged against the requirements, or (None, why it could not be computed)."""
    from .requirement_spread import duty_requirement, requirement_spread

    if design.requirements.frequency is None and duty_requirement(design) is None:
        return None, None
    try:
        return requirement_spread(design, kw, n=n, seed=seed), None
    except DesignError as exc:
        return None, f"requirement spread: {exc}"


def _pot_travel(topology: str, kw: dict[str, Any]) -> PotTravel:
    from .timing import astable, astable_ideal

    grids = (np.linspace(0.0, 1.0, TRAVEL_POINTS), np.linspace(0.0, 1.0, TRAVEL_POINTS)[1:-1])
    for i, w in enumerate(grids):
        try:
            args = dict(kw, wiper=w)
            r = astable(topology, **args)
            ideal = astable_ideal(topology, ra=kw["ra"], rb=kw["rb"], c=kw["c"], vcc=kw["vcc"], pot=kw["pot"], wiper=w)
        except ModelLimit:
            if i == len(grids) - 1:
                raise
            continue
        return PotTravel(wiper=w, frequency=r.frequency, duty=r.duty, frequency_ideal=ideal.frequency,
                         duty_ideal=ideal.duty, r_charge=r.r_charge, r_discharge=r.r_discharge)
    raise AssertionError("unreachable")  # pragma: no cover


def _corners(design: Any, kw: dict[str, Any], travel: PotTravel | None) -> SupplyCorners:
    from .timing import astable, control_voltage_from_divider

    lo, hi = design.supply_range
    out: list[Any] = []
    for vcc in (lo, hi):
        args = dict(kw, vcc=vcc)
        if travel is not None:
            args["wiper"] = travel.wiper
        if design.timing.r_cv is not None:
            args["vctl"] = control_voltage_from_divider(vcc, design.timing.r_cv, design.timing.timer)
        try:
            out.append(astable(design.timing.topology, **args))
        except ModelLimit as exc:
            return SupplyCorners(lo, hi, None, None, f"at {vcc:.4g} V: {exc}")
    return SupplyCorners(lo, hi, out[0], out[1], None)


def _timer_output(design: Any, gate: Any) -> TimerOutput:
    from .parts.timers import get_timer

    fam = get_timer(design.timing.timer)
    lo, hi = design.supply_range
    i_g = None if gate is None else gate.i_g_on
    return TimerOutput(
        timer=fam.name, v_high=fam.output_high(design.vcc), v_high_min=fam.output_high(lo),
        v_high_max=fam.output_high(hi), r_source=fam.output_source_resistance(design.vcc), r_sink=fam.r_out_low,
        i_gate_plateau=i_g, v_high_plateau=None if i_g is None else fam.output_high(design.vcc, i_g),
        t_edge=fam.t_edge,
    )


def _load_supply_range(design: Any) -> tuple[float, float]:
    return design.supply_range if design.v_load is None else (design.v_load, design.v_load)


def _led_part(design: Any, timing: Any, gate: Any, p: dict[str, Any]) -> None:
    from .loads.flicker import pwm_flicker
    from .loads.led import led_drive
    from .loads.lightness import lightness

    load = design.load
    p["flicker"] = pwm_flicker(timing.frequency, timing.duty)
    p["lightness"] = lightness(timing.duty)
    if gate is None:
        return

    def drive(vs: float) -> Any:
        return led_drive(vs, load.vf, load.n_series, load.n_parallel, r_series=load.r_series, duty=timing.duty,
                         rds_on=gate.rds_on_25, series=design.timing.r_series, dvf=load.vf_spread,
                         t_ambient_c=design.t_ambient_max_c)

    p["led"] = drive(design.load_supply)
    lo, hi = _load_supply_range(design)
    high = drive(hi) if hi != design.load_supply else p["led"]
    try:
        low = drive(lo) if lo != design.load_supply else p["led"]
        p["led_corners"] = LedCorners(low, high, None)
    except ModelLimit as exc:
        p["led_corners"] = LedCorners(None, high, str(exc))


def _element(obj: Any, k: int) -> Any:
    """Element ``k`` of an array-valued result dataclass, as the scalar result (floats, bools, str)."""
    vals: dict[str, Any] = {}
    for f in fields(obj):
        x = getattr(obj, f.name)
        if is_dataclass(x) and not isinstance(x, type):
            vals[f.name] = _element(x, k)
        elif isinstance(x, np.ndarray) and x.ndim > 0:
            item = x.ravel()[k]
            vals[f.name] = bool(item) if x.dtype == bool else (str(item) if x.dtype.kind in "US" else float(item))
        else:
            vals[f.name] = x
    return type(obj)(**vals)


def _motor_part(design: Any, timing: Any, gate: Any, duty_range: tuple[float, float], p: dict[str, Any]) -> None:
    from .loads.diode import clamp_decay, freewheel_diode
    from .loads.motor import MotorParams, stall_current, steady_speed
    from .parts.diodes import get_diode

    if gate is None:
        return
    load, fw = design.load, design.freewheel
    dio = get_diode(fw.diode)
    v = design.load_supply
    f, duty = float(timing.frequency), float(timing.duty)
    zener = fw.v_zener if fw.clamp == "zener" else 0.0
    params = MotorParams(r=load.r + gate.rds_on_25, l=load.l, ke=load.ke, b=load.b, t_load=load.t_load, j=load.j)
    # The freewheel diode's drop depends on its current, which depends on the speed: solve the speed for
    # a ladder of drops (one vectorised call) and keep the self-consistent rung, V_F(I_op) = V_F.
    ladder = dio.vf(np.geomspace(1e-4, 1.0, _VF_LADDER) * v / load.r, design.t_ambient_c) + zener
    speeds = steady_speed(params, v, duty, f, ladder, iterations=SPEED_ITERATIONS)
    c = speeds.current
    conducting = c.i_diode_avg > 0
    i_op = np.where(conducting, c.i_diode_rms**2 / np.where(conducting, c.i_diode_avg, 1.0), c.i_mean)
    k = int(np.argmin(np.abs(dio.vf(i_op, design.t_ambient_c) + zener - ladder)))
    speed = _element(speeds, k)
    v_clamp = float(ladder[k])
    mc = speed.current
    d_lo, d_hi = duty_range
    stalls = stall_current(params, v, np.array([d_hi, min(max(0.5, d_lo), d_hi)]), f, v_clamp)
    stall, stall_d = _element(stalls, 0), _element(stalls, 1)
    v_max = _load_supply_range(design)[1]
    p.update(motor=mc, motor_speed=speed, motor_stall=stall, motor_stall_diode=stall_d, v_clamp=v_clamp)
    p["freewheel"] = freewheel_diode(dio, mc.i_diode_avg, mc.i_diode_rms, stall.i_max, v_max, f,
                                     design.t_ambient_max_c, duty=duty)
    p["clamp"] = clamp_decay(load.l, load.r, mc.i_max, v_clamp, e=speed.e, v_supply=v)


def _gate_part(design: Any, fam: Any, limits: type[DesignError]) -> tuple[Any, str | None]:
    """Gate drive from the timer output, and why not: ``(gate, None)``, ``(None, message)`` when the
    drive hits one of ``limits``, or ``(None, None)`` without a load."""
    from .loads.mosfet import gate_drive

    if design.load is None:
        return None, None
    try:
        return gate_drive(fam.output_high(design.vcc), fam.output_source_resistance(design.vcc),
                          design.switch.r_gate, design.switch.mosfet, r_sink=fam.r_out_low), None
    except limits as exc:
        return None, str(exc)


def _no_load_parts() -> dict[str, Any]:
    """The load figures of an :class:`Evaluation`, all None until the load's part fills them."""
    return dict(led=None, led_corners=None, flicker=None, lightness=None, motor=None, motor_speed=None,
                motor_stall=None, motor_stall_diode=None, freewheel=None, clamp=None, mosfet=None, v_clamp=None)


def _led_losses(design: Any, timing: Any, gate: Any, f: float, p: dict[str, Any]) -> None:
    """LED string figures and the MOSFET's losses driving it at ``f`` [Hz] (into ``p``)."""
    from .loads.mosfet import mosfet_losses

    _led_part(design, timing, gate, p)
    if p["led"] is not None:
        p["mosfet"] = mosfet_losses(gate, design.load_supply, p["led"].i_peak_total, p["led"].i_rms_total, f,
                                    design.t_ambient_max_c)


def _motor_losses(design: Any, timing: Any, gate: Any, duty_range: tuple[float, float], f: float,
                  p: dict[str, Any]) -> None:
    """Motor figures and the MOSFET's losses (clamped turn-off, diode recovery) at ``f`` [Hz] (into ``p``)."""
    from .loads.mosfet import mosfet_losses
    from .parts.diodes import get_diode

    _motor_part(design, timing, gate, duty_range, p)
    if p["motor"] is not None:
        mc, dio = p["motor"], get_diode(design.freewheel.diode)
        p["mosfet"] = mosfet_losses(gate, design.load_supply + p["v_clamp"], mc.i_min, mc.i_switch_rms, f,
                                    design.t_ambient_max_c, i_off=mc.i_max,
                                    q_rr=dio.q_rr if dio.has_recovery else 0.0)


def _heater_losses(design: Any, heater: Any, gate: Any, f: float) -> Any:
    """The MOSFET's losses switching the hot heater element at ``f`` [Hz], or None without a gate drive."""
    from .loads.mosfet import mosfet_losses

    if gate is None:
        return None
    el = heater.hot
    return mosfet_losses(gate, design.load_supply, el.i_on, el.i_rms, f, design.t_ambient_max_c, i_off=el.i_on)


def _judged(design: Any, ev: Evaluation) -> Evaluation:
    """The evaluation with its findings and then its cautions (which read the findings) filled in."""
    from . import cautions as _cautions
    from .checks import run_checks

    ev = replace(ev, findings=run_checks(design, ev))
    return replace(ev, cautions=_cautions.cautions_for(design, ev))


def evaluate(design: Any, *, spread: bool = True, n_mc: int = 20_000, seed: int = 1,
             diode_law: bool | None = None) -> Evaluation:
    """Evaluate a design: timing, gate drive, load, losses, tolerance spread, findings and cautions.

    Parameters
    ----------
    design : pwmkit.design.Design
        The design.
    spread : bool
        Run the tolerance analysis (Monte Carlo, worst-case corners, sensitivities) and the
        diode-law timing. False is the quick mode for widgets.
    n_mc : int
        Monte Carlo samples (100 … 2,000,000).
    seed : int
        Random seed of the Monte Carlo run (reproducible results).
    diode_law : bool, optional
        Compute the diode-law timing; default: the same as ``spread``.

    Returns
    -------
    Evaluation

    Raises
    ------
    DesignError
        Bad input or a design that cannot work at its nominal point (does not oscillate, supply too
        low for the LED string …); the message names the field and the numbers.

    Examples
    --------
    >>> from pwmkit.design import demo_designs
    >>> ev = evaluate(demo_designs()["fan"], spread=False)
    >>> round(ev.timing.frequency), ev.motor.mode
    (29871, 'continuous')
    """
    from .checks import Findings
    from .design import Design
    from .parts.timers import get_timer
    from .timing import astable, astable_ideal

    if not isinstance(design, Design):
        raise DesignError(f"design: expected a pwmkit.design.Design, got {type(design).__name__}")
    if isinstance(n_mc, bool) or not isinstance(n_mc, (int, np.integer)) or not 100 <= n_mc <= 2_000_000:
        raise DesignError(f"n_mc: {n_mc!r} is not allowed; give a whole number 100 … 2000000")
    if isinstance(seed, bool) or not isinstance(seed, (int, np.integer)) or seed < 0:
        raise DesignError(f"seed: {seed!r} is not allowed; give a whole number >= 0")
    want_diode_law = bool(spread) if diode_law is None else bool(diode_law)
    t = design.timing
    if t.topology == "two-timer":
        from .evaluate_two_timer import evaluate_two_timer

        return evaluate_two_timer(design, spread=spread, n_mc=int(n_mc), seed=int(seed))
    with np.errstate(all="ignore"):
        kw = timing_kwargs(design)
        timing = astable(t.topology, **kw)
        try:  # None when the textbook form is degenerate (rb = 0 at a wiper end)
            ideal = astable_ideal(t.topology, ra=t.ra, rb=t.rb, c=t.c, vcc=design.vcc, pot=kw.get("pot"),
                                  wiper=kw.get("wiper"))
        except ModelLimit:
            ideal = None
        travel = _pot_travel(t.topology, kw) if t.topology == "pot" else None
        corners = _corners(design, kw, travel)
        duty_range = travel.duty_range if travel is not None else (float(timing.duty), float(timing.duty))
        gate, gate_error = _gate_part(design, get_timer(t.timer), ModelLimit)
        p = _no_load_parts()
        f = float(timing.frequency)
        if design.load is not None and design.load.kind == "led":
            _led_losses(design, timing, gate, f, p)
        elif design.load is not None and design.load.kind == "heater":
            from .evaluate_heater import heater_part

            p["heater"] = heater_part(design, float(timing.duty), f, 0.0 if gate is None else float(gate.rds_on_25))
            p["mosfet"] = _heater_losses(design, p["heater"], gate, f)
        elif design.load is not None:
            _motor_losses(design, timing, gate, duty_range, f, p)
        dl = None
        if want_diode_law and t.topology != "classic":
            from .timing import diode_law_timing

            dl = diode_law_timing(t.topology, **kw, diode=t.diode, t_c=design.t_ambient_c)
        spread_res = worst = sens = spread_note = None
        stops = False
        req_spread = None
        if spread and corners.error is None:
            spread_res, worst, sens, spread_note, stops = _tolerance_part(design, kw, int(n_mc), int(seed))
            req_spread, note = _requirement_part(design, kw, int(n_mc), int(seed))
            if note:
                spread_note = f"{spread_note}; {note}" if spread_note else note
                stops = stops or "does not oscillate" in note
        lo, hi = design.supply_range
        l_lo, l_hi = _load_supply_range(design)
        cond = Conditions(vcc=design.vcc, vcc_min=lo, vcc_max=hi, load_supply=design.load_supply, load_supply_min=l_lo,
                          load_supply_max=l_hi, t_ambient_c=design.t_ambient_c, t_thermal_c=design.t_ambient_max_c,
                          vd=kw.get("vd") if t.topology != "classic" else None, v_clamp=p.pop("v_clamp"),
                          duty_reachable=duty_range, gate_error=gate_error, spread_note=spread_note,
                          spread_stops=stops, quick=not spread)
        ev = Evaluation(design=design, timing=timing, ideal=ideal, diode_law=dl, pot_travel=travel,
                        timer_output=_timer_output(design, gate), gate=gate, corners=corners, spread=spread_res,
                        worst_case=worst, sensitivity=sens, conditions=cond, findings=Findings(()), cautions=(),
                        requirement_spread=req_spread, **p)
        ev = _judged(design, ev)
    bad = [k for k, v in ev.key_results().items() if isinstance(v, float) and not math.isfinite(v)]
    if bad:  # pragma: no cover - key_results drops non-finite values; kept as a guard
        raise DesignError(f"evaluate: non-finite results for {', '.join(bad)}; check the orders of magnitude")
    return ev




# ------------------------------------------------------------------------------------------------
# notebook summary
# ------------------------------------------------------------------------------------------------
_CSS = ("font-family:system-ui,-apple-system,'Segoe UI',sans-serif;font-size:13px;max-width:64em;"
        "font-variant-numeric:tabular-nums;line-height:1.35")
_TABLE = "border-collapse:collapse;margin:.3em 0 .8em 0"
_CELL = "padding:.15em .7em;border-bottom:1px solid #ddd;text-align:left;vertical-align:top"


def _table(title: str, header: tuple[str, ...], rows: list[tuple[str, ...]]) -> str:
    head = "".join(f"<th style='{_CELL}'>{html.escape(h)}</th>" for h in header)
    body = "".join("<tr>" + "".join(f"<td style='{_CELL}'>{html.escape(c)}</td>" for c in r) + "</tr>" for r in rows)
    return (f"<table style='{_TABLE}'><caption style='text-align:left;font-weight:600'>{html.escape(title)}</caption>"
            f"<tr>{head}</tr>{body}</table>")


def _timing_rows(ev: Evaluation) -> list[tuple[str, ...]]:
    from .numstyle import screen
    from .values import format_value as fv

    t, i = ev.timing, ev.ideal
    rows = []
    for label, k, unit in (("frequency", "frequency", "Hz"), ("t_high (charge)", "t_high", "s"),
                           ("t_low (discharge)", "t_low", "s")):
        x, y = float(getattr(t, k)), None if i is None else float(getattr(i, k))
        rows.append((label, screen(x, unit), "—" if y is None else screen(y, unit),
                     screen(x / y - 1, "relative") if y else ""))
    rows.insert(1, ("duty", screen(t.duty, "duty"), "—" if i is None else screen(i.duty, "duty"),
                    "" if i is None else screen(t.duty - i.duty, "points")))
    if ev.pot_travel is not None:
        (d0, d1), (f0, f1) = ev.pot_travel.duty_range, ev.pot_travel.frequency_range
        rows.append(("over the pot travel", f"{100 * d0:.3g} … {100 * d1:.4g} %; {fv(f0, 'Hz', 4)} … {fv(f1, 'Hz', 4)}",
                     f"{100 * float(np.min(ev.pot_travel.duty_ideal)):.3g} … "
                     f"{100 * float(np.max(ev.pot_travel.duty_ideal)):.4g} %", ""))
    if ev.diode_law is not None:
        rows.append(("with diode-law steering", fv(ev.diode_law.frequency, "Hz", 5), "",
                     f"closed form {100 * ev.diode_law.frequency_error:+.2f} %"))
    if ev.spread is not None:
        pc = ev.spread.percentile(np.array([1.0, 99.0]))
        rows.append(("tolerance spread, 1st–99th percentile",
                     f"{fv(pc.frequency[0], 'Hz', 4)} … {fv(pc.frequency[1], 'Hz', 4)}",
                     f"duty {100 * pc.duty[0]:.3f} … {100 * pc.duty[1]:.3f} %", f"n = {ev.spread.n}"))
    if ev.worst_case is not None:
        w = ev.worst_case
        rows.append(("worst case", f"{fv(w.frequency_min, 'Hz', 4)} … {fv(w.frequency_max, 'Hz', 4)}",
                     f"duty {100 * w.duty_min:.3f} … {100 * w.duty_max:.3f} %",
                     f"{100 * w.frequency_rel_low:+.1f} / {100 * w.frequency_rel_high:+.1f} %"))
    return rows


def _load_rows(ev: Evaluation) -> list[tuple[str, str]]:
    from .values import format_value as fv

    c = ev.conditions
    rows: list[tuple[str, str]] = [("gate drive", f"{fv(ev.timer_output.v_high, 'V', 3)} from the {ev.timer_output.timer} "
                                    f"output ({fv(ev.timer_output.r_source, 'Ω', 3)} source)")]
    if ev.gate is not None:
        rows.append(("switching on / off", f"{fv(ev.gate.t_on, 's', 3)} / {fv(ev.gate.t_off, 's', 3)}, "
                     f"R_DS(on) {fv(ev.gate.rds_on_25, 'Ω', 3)} at 25 °C"))
    elif c.gate_error:
        rows.append(("gate drive problem", c.gate_error))
    if ev.led is not None:
        led = ev.led
        rows += [("LED current peak / average", f"{fv(led.i_peak, 'A', 3)} / {fv(led.i_avg, 'A', 3)} per string, "
                  f"{fv(led.i_peak_total, 'A', 3)} peak in total"),
                 ("resistor power on / average", f"{fv(led.p_resistor_on, 'W', 3)} / {fv(led.p_resistor_avg, 'W', 3)}")]
    if ev.flicker is not None:
        rows.append(("flicker (IEEE 1789)", f"{ev.flicker.modulation_percent:.3g} % modulation, "
                     f"index {ev.flicker.flicker_index:.3g}: {ev.flicker.classification}"))
    if ev.lightness is not None:
        rows.append(("perceived brightness", f"L* = {ev.lightness:.3g} at {100 * float(ev.timing.duty):.3g} % duty"))
    if ev.motor is not None:
        m, s = ev.motor, ev.motor_speed
        rows += [("motor current mean / ripple", f"{fv(m.i_mean, 'A', 3)} / {fv(m.i_ripple_pp, 'A', 3)} p-p, {m.mode}"),
                 ("motor speed", f"{float(s.rpm):.4g} rpm, back-EMF {fv(s.e, 'V', 3)}" + (" (stalled)" if s.stalled else ""))]
        if ev.motor_stall is not None:
            rows.append(("stalled rotor", f"{fv(ev.motor_stall.i_mean, 'A', 3)} mean, {fv(ev.motor_stall.i_max, 'A', 3)} peak"))
    t_amb = f" at {c.t_thermal_c:g} °C ambient"
    if ev.mosfet is not None:
        m = ev.mosfet
        rows.append(("MOSFET", "thermal runaway" + t_amb if m.runaway else
                     f"{fv(m.p_total, 'W', 3)}, junction {m.tj_c:.3g} °C{t_amb}"))
    if ev.freewheel is not None:
        fw = ev.freewheel
        rows.append(("freewheel diode", "thermal runaway" + t_amb if fw.runaway else
                     f"{fv(fw.p_total, 'W', 3)}, junction {fw.tj_c:.3g} °C{t_amb}"))
    if ev.heater is not None:
        from .evaluate_heater import heater_rows

        rows += heater_rows(ev)
    if ev.clamp is not None:
        rows.append(("turn-off", f"drain peak {fv(ev.clamp.v_switch_peak, 'V', 3)}, current ends after "
                     f"{fv(ev.clamp.t_zero, 's', 3)}"))
    return rows


def _evaluation_html(ev: Evaluation) -> str:
    from .checks import severity_style
    from .values import format_value as fv

    d, c = ev.design, ev.conditions
    colour, symbol, word = severity_style(ev.findings.worst)
    verdict = (f"<span style='border-left:.5em solid {colour};padding-left:.4em;font-weight:600'>{symbol} "
               f"{ev.findings.fail_count} fail, {ev.findings.warn_count} warning(s), {ev.findings.ok_count} ok</span>")
    load = "no load" if d.load is None else f"{d.load.kind} load from {fv(c.load_supply, 'V', 3)}"
    head = (f"<div style='font-size:15px;font-weight:600'>{html.escape(d.name)}</div>"
            f"<div>{html.escape(_circuit_words(d.timing.topology))}, {html.escape(d.timing.timer)} timer, supply "
            f"{html.escape(fv(c.vcc, 'V', 3))} ({html.escape(fv(c.vcc_min, 'V', 3))} … {html.escape(fv(c.vcc_max, 'V', 3))}), "
            f"{html.escape(load)}{' — quick mode, no tolerance analysis' if c.quick else ''}</div><div>{verdict}</div>")
    from .glossary import DIFFERENCE, ESTIMATE, EXACT

    timing = _table("Timing", ("", EXACT, ESTIMATE, DIFFERENCE), _timing_rows(ev))
    stage = _table("Output stage and load", ("", "value"), _load_rows(ev))
    cautions = "".join(f"<li><b>{html.escape(x.title)}.</b> {html.escape(x.text)}</li>" for x in ev.cautions)
    return (f"<div class='pwmkit-evaluation' style=\"{_CSS}\">{head}{timing}{stage}{ev.findings.to_html(compact=True)}"
            f"<div style='font-weight:600;margin-top:.6em'>Cautions</div><ul style='margin-top:.2em'>{cautions}</ul></div>")
