"""Cross-check a design with a circuit simulation: pwmkit's figures vs ngspice (design layer).

:func:`verify` builds the design's netlist (:func:`pwmkit.netlist.netlist`), runs it in ngspice
and compares what the circuit does with what pwmkit computes (:func:`pwmkit.evaluate.evaluate`):
frequency and duty (the diode-law model, which uses the same Shockley diodes as the circuit, and
the constant-drop closed form), the capacitor extremes, the load currents and the MOSFET's peak
drain voltage. Each row carries a tolerance and the reason for it (:data:`TOLERANCES`).

The tolerances are stated, not tuned per design: the timing rows compare the same physics
(≤ 0.5 %); the closed form's constant drop is a known approximation (≤ 5 %); the driver rows
include what the models leave out on purpose — the MOSFET's gate delay and smooth turn-on, the
freewheel diode's changing drop, and for a motor the switch resistance counted in both half-cycles.
A two-timer design is compared at its operating control voltage (the nominal source, or the
thermistor loop's steady point): PWM frequency and duty, the control-pin voltage, the monostable
capacitor's maximum and, for the driver, the heater current.
"""

from __future__ import annotations

import html
import math
from dataclasses import asdict, dataclass
from typing import Any

from ..errors import DesignError

__all__ = ["CheckRow", "Verification", "verify", "TOLERANCES"]

#: quantity key → (relative tolerance, why).
TOLERANCES: dict[str, tuple[float, str]] = {
    "frequency": (0.005, "same circuit physics (Shockley steering diodes); simulator step ≤ 1/1000 of the "
                         "shorter half-period"),
    "duty": (0.005, "as frequency"),
    "frequency_closed_form": (0.05, "the closed form takes each steering diode as a constant drop (its "
                                    "1 mA value); the circuit's diodes follow the Shockley law"),
    "duty_closed_form": (0.05, "as frequency_closed_form"),
    "v_cap_max": (0.005, "the capacitor turns at the upper threshold (overshoot ≤ one time step)"),
    "v_cap_min": (0.005, "the capacitor turns at the lower threshold"),
    "led_peak": (0.01, "constant-drop LEDs as in the model; R_DS(on) at the gate drive"),
    "led_mean": (0.03, "peak × duty; the MOSFET's turn-on delay shortens the on-time slightly"),
    "motor_mean": (0.03, "the model counts R_DS(on) in both half-cycles and one freewheel drop; the circuit "
                         "has the switch only while on and a Shockley freewheel diode"),
    "motor_ripple": (0.05, "as motor_mean"),
    "pwm_frequency": (0.005, "two-timer: the clock is a classic astable, the same physics as the closed form; step "
                             "≤ 1/4000 of the period"),
    "pwm_duty": (0.005, "two-timer: the model rests the monostable capacitor at the switch's saturation voltage; in the "
                        "circuit r_mono still feeds the closed switch, a few mV higher (≈ 0.1 % of the pulse); latch "
                        "edges within one time step (≤ 1/400 of the shortest interval)"),
    "control_pin": (0.005, "the same divider (control source or thermistor against the internal divider)"),
    "v_mono_peak": (0.005, "the monostable capacitor turns at the control-pin voltage (overshoot ≤ one time step)"),
    "heater_peak": (0.01, "resistive element at the model's element temperature; R_DS(on) at the gate drive"),
    "heater_mean": (0.03, "peak × duty; the MOSFET's turn-on delay shortens the on-time slightly"),
    "drain_peak": (0.03, "motor: supply + clamp drop; the circuit's freewheel diode drops what the Shockley "
                         "law gives at the turn-off current"),
}


@dataclass(frozen=True)
class CheckRow:
    """One model-vs-circuit comparison.

    Attributes
    ----------
    key : quantity key (see :data:`TOLERANCES`); label : plain-language name; unit : SI unit
    model : pwmkit's figure; simulation : the circuit's figure (ngspice)
    difference : simulation / model − 1 [1]; tolerance : allowed |difference| [1]
    passed : |difference| ≤ tolerance; note : why this tolerance
    """

    key: str
    label: str
    unit: str
    model: float
    simulation: float
    difference: float
    tolerance: float
    passed: bool
    note: str


@dataclass(frozen=True)
class Verification:
    """Result of :func:`verify`.

    Attributes
    ----------
    design : design name; what : "timing" or "driver"
    rows : the comparisons; passed : every row passed
    netlist : the simulated netlist; ngspice_log : the simulator's output
    """

    design: str
    what: str
    rows: tuple[CheckRow, ...]
    passed: bool
    netlist: str
    ngspice_log: str

    def table(self) -> str:
        """Plain-text table: quantity, model, circuit, difference, tolerance, verdict."""
        width = max([34, *(len(r.label) for r in self.rows)])
        head = f"{'quantity':{width}} {'model':>13} {'circuit':>13} {'diff':>9} {'tol':>7}  result"
        lines = [head, "-" * len(head)]
        for r in self.rows:
            m, s = _shown(r, r.model), _shown(r, r.simulation)
            lines.append(f"{r.label:{width}} {m:>13} {s:>13} {100 * r.difference:>+8.3f}% {100 * r.tolerance:>6.2g}%  "
                         f"{'pass' if r.passed else 'FAIL'}")
        verdict = "passes" if self.passed else "FAILS"
        lines.append(f"→ {self.design} {verdict} the circuit cross-check ({len(self.rows)} quantities, ngspice).")
        return "\n".join(lines)

    def to_dict(self) -> dict[str, Any]:
        """JSON-ready dict (no netlist text or log)."""
        return {"design": self.design, "what": self.what, "passed": self.passed,
                "rows": [asdict(r) for r in self.rows]}

    def __repr__(self) -> str:
        bad = sum(not r.passed for r in self.rows)
        return f"Verification({self.design!r}, {self.what}: {len(self.rows)} quantities, {bad} outside tolerance)"

    def _repr_html_(self) -> str:
        cells = "".join(
            f"<tr><td>{html.escape(r.label)}</td><td>{html.escape(_shown(r, r.model))}</td>"
            f"<td>{html.escape(_shown(r, r.simulation))}</td><td>{100 * r.difference:+.3f} %</td>"
            f"<td>{100 * r.tolerance:.2g} %</td><td>{'pass' if r.passed else '<strong>FAIL</strong>'}</td></tr>"
            for r in self.rows)
        return ("<table class='pwmkit-verify'><caption>model vs circuit (ngspice)</caption><tr><th>quantity</th>"
                f"<th>model</th><th>circuit</th><th>difference</th><th>tolerance</th><th></th></tr>{cells}</table>")


def _shown(row: CheckRow, value: float) -> str:
    """Screen text of a model or circuit value: duties in percent, others with their SI prefix (6 digits)."""
    from ..numstyle import screen
    from ..values import format_value

    if "duty" in row.key:  # a fraction in the row (and in --json); people read duty in percent
        return screen(value, "duty", 6)
    return format_value(value, row.unit, 6) if row.unit else f"{value:.6g}"


def _row(key: str, label: str, unit: str, model: float, simulation: float) -> CheckRow:
    tol, note = TOLERANCES[key]
    model, simulation = float(model), float(simulation)
    diff = simulation / model - 1.0 if model != 0 else (0.0 if simulation == 0 else math.inf)
    return CheckRow(key=key, label=label, unit=unit, model=model, simulation=simulation, difference=diff,
                    tolerance=tol, passed=bool(abs(diff) <= tol), note=note)


def verify(design: Any, *, what: str | None = None, timeout: float = 300.0) -> Verification:
    """Run the design's netlist in ngspice and compare the circuit with pwmkit's figures.

    Parameters
    ----------
    design : pwmkit.design.Design
    what : {"timing", "driver"}, optional
        Default: "driver" when the design has a load, else "timing".
    timeout : seconds the simulation may run.

    Returns
    -------
    Verification

    Raises
    ------
    pwmkit.netlist.NgspiceMissing
        ngspice is not installed (the message says how to install it).
    DesignError
        Bad design, or the simulation failed / did not reach a measurement.

    Examples
    --------
    >>> from pwmkit.design import demo_designs
    >>> from pwmkit.netlist import find_ngspice
    >>> if find_ngspice():
    ...     print(verify(demo_designs()["fan"]).passed)
    ... else:
    ...     print(True)
    True
    """
    from ..evaluate import evaluate
    from .build import deck
    from .ngspice import run_ngspice

    if what is None:
        what = "driver" if getattr(design, "load", None) is not None else "timing"
    dk = deck(design, what=what)  # validates design and what
    if design.timing.topology == "two-timer":
        return _verify_two_timer(design, what, dk, run_ngspice(dk.text, timeout=timeout))
    ev = evaluate(design, spread=False, diode_law=True)
    sim = run_ngspice(dk.text, timeout=timeout)
    f1, r1, f2 = sim.get("f1"), sim.get("r1"), sim.get("f2")
    period = f2 - f1
    if not period > 0:
        raise DesignError("ngspice: the measured period is not positive; see the log")
    freq, duty = 1.0 / period, (f2 - r1) / period
    rows: list[CheckRow] = []
    # the circuit's steering diodes are Shockley diodes unless the design fixes vd (constant drops)
    shockley = ev.diode_law is not None and design.timing.vd is None
    exact = ev.diode_law if shockley else ev.timing
    name = "diode-law model" if shockley else "closed form"
    rows.append(_row("frequency", f"frequency ({name})", "Hz", exact.frequency, freq))
    rows.append(_row("duty", f"duty ({name})", "", exact.duty, duty))
    if shockley:
        rows.append(_row("frequency_closed_form", "frequency (constant-drop closed form)", "Hz",
                         ev.timing.frequency, freq))
        rows.append(_row("duty_closed_form", "duty (constant-drop closed form)", "", ev.timing.duty, duty))
    rows.append(_row("v_cap_max", "capacitor maximum", "V", ev.timing.v_upper, sim.get("vcap_max")))
    rows.append(_row("v_cap_min", "capacitor minimum", "V", ev.timing.v_lower, sim.get("vcap_min")))
    if what == "driver":
        if dk.load == "led":
            led = ev.led
            if led is None:
                raise DesignError("design: the LED drive could not be evaluated")
            n = design.load.n_parallel
            peak = sum(sim.get(f"iled{k}_max") for k in range(n)) / n
            mean = sum(sim.get(f"iled{k}_avg") for k in range(n)) / n
            rows.append(_row("led_peak", "LED string current, peak", "A", led.i_peak, peak))
            rows.append(_row("led_mean", "LED string current, mean", "A", led.i_avg, mean))
        else:
            mc = ev.motor
            if mc is None or ev.clamp is None:
                raise DesignError("design: the motor current could not be evaluated")
            rows.append(_row("motor_mean", "motor current, mean", "A", mc.i_mean, sim.get("imot_avg")))
            rows.append(_row("motor_ripple", "motor current, ripple (peak-peak)", "A", mc.i_ripple_pp,
                             sim.get("imot_max") - sim.get("imot_min")))
            rows.append(_row("drain_peak", "MOSFET drain voltage, peak", "V", ev.clamp.v_switch_peak,
                             sim.get("vdrain_max")))
    return Verification(design=design.name, what=what, rows=tuple(rows), passed=all(r.passed for r in rows),
                        netlist=dk.text, ngspice_log=sim.log)


def _verify_two_timer(design: Any, what: str, dk: Any, sim: Any) -> Verification:
    """Rows of a two-timer design: PWM frequency and duty at the operating control voltage, the heater."""
    from ..two_timer_design import operating_point, two_timer_at_pin

    f1, r1, f2 = sim.get("f1"), sim.get("r1"), sim.get("f2")
    period = f2 - f1
    if not period > 0:
        raise DesignError("ngspice: the measured period is not positive; see the log")
    v_pin, _v_source, _loop = operating_point(design)
    p = two_timer_at_pin(design, design.vcc, v_pin)
    rows = [_row("pwm_frequency", "PWM frequency (clock closed form)", "Hz", p.frequency, 1.0 / period),
            _row("pwm_duty", "PWM duty (monostable model)", "", p.duty, (f2 - r1) / period),
            _row("control_pin", "control-pin voltage", "V", v_pin, sim.get("vcv_avg")),
            _row("v_mono_peak", "monostable capacitor maximum", "V", p.v_peak, sim.get("vmono_max"))]
    if what == "driver":
        from ..evaluate import evaluate

        ev = evaluate(design, spread=False, diode_law=False)
        if ev.heater is None:
            raise DesignError("design: the heater element could not be evaluated")
        el = ev.heater.element
        rows.append(_row("heater_peak", "heater current, peak", "A", el.i_on, sim.get("iheat_max")))
        rows.append(_row("heater_mean", "heater current, mean", "A", el.i_on * el.duty, sim.get("iheat_avg")))
    return Verification(design=design.name, what=what, rows=tuple(rows), passed=all(r.passed for r in rows),
                        netlist=dk.text, ngspice_log=sim.log)
