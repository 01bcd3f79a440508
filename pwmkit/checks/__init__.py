"""Design-rule checks: turn an evaluated design into findings with severities.

:func:`run_checks` applies every rule of :mod:`pwmkit.checks.timing_rules` (timer and timing
network), :mod:`pwmkit.checks.two_timer_rules` (the voltage-controlled two-timer PWM),
:mod:`pwmkit.checks.load_rules` (gate drive, MOSFET, freewheel diode, LEDs, motor),
:mod:`pwmkit.checks.heater_rules` (heater surface, fault temperature, thermistor loop) and
:mod:`pwmkit.checks.bench_rules` (bench readings of the built driver against the design) to
a design and its evaluation, and returns a :class:`Findings` collection. Rules that do not apply
to a design (motor rules for an LED load, pot rules for a fixed network, requirement rules without
a requirement) give no finding. Every rule documents its thresholds and their origin in its
docstring; :data:`CHECK_IDS` lists the ids in the order they run.

The rules compare figures computed by the model functions with limits; they do no physics of
their own. Use :func:`pwmkit.evaluate.evaluate` to get both the figures and the findings.
"""

from __future__ import annotations

from typing import Any

from .bench_rules import RULES as _BENCH_RULES
from .findings import ORIGIN_KINDS, SEVERITIES, Finding, Findings, severity_style
from .heater_rules import RULES as _HEATER_RULES
from .load_rules import RULES as _LOAD_RULES
from .timing_rules import RULES as _TIMING_RULES
from .two_timer_rules import RULES as _TWO_TIMER_RULES

__all__ = ["Finding", "Findings", "CHECK_IDS", "RULES", "SEVERITIES", "ORIGIN_KINDS", "run_checks", "rule_doc",
           "severity_style"]

#: Every rule, keyed by id, in the order they run.
RULES = {**_TIMING_RULES, **_TWO_TIMER_RULES, **_LOAD_RULES, **_HEATER_RULES, **_BENCH_RULES}
#: All rule ids.
CHECK_IDS: tuple[str, ...] = tuple(RULES)


def run_checks(design: Any, evaluation: Any) -> Findings:
    """Apply every design rule to a design and its evaluation.

    Parameters
    ----------
    design : pwmkit.design.Design
        The design.
    evaluation : pwmkit.evaluate.Evaluation
        Its evaluation (the ``findings`` and ``cautions`` fields are not read, so a preliminary
        evaluation without them will do). Attributes read: ``timing``, ``pot_travel``,
        ``corners``, ``timer_output``, ``conditions``, ``led``, ``led_corners``, ``flicker``,
        ``motor``, ``motor_speed``, ``motor_stall``, ``motor_stall_diode``, ``mosfet``,
        ``freewheel``, ``spread``.

    Returns
    -------
    Findings
        One finding per applicable rule, in :data:`CHECK_IDS` order.

    Examples
    --------
    >>> from pwmkit.design import demo_designs
    >>> from pwmkit.evaluate import evaluate
    >>> ev = evaluate(demo_designs()["fan"], spread=False)
    >>> run_checks(ev.design, ev).by_id("gate.drive").severity
    'ok'
    """
    out = []
    for rule_id, rule in RULES.items():
        result = rule(design, evaluation)
        if result is not None:
            if result.id != rule_id:  # pragma: no cover - guards the registry
                raise RuntimeError(f"rule {rule_id} returned a finding for {result.id}")
            out.append(result)
    return Findings(out)


def rule_doc(rule_id: str) -> str:
    """The docstring of a rule: what it checks, its thresholds and their origin."""
    if rule_id not in RULES:
        raise KeyError(f"{rule_id!r} is not a rule id; known ids: {', '.join(CHECK_IDS)}")
    import inspect

    return inspect.getdoc(RULES[rule_id]) or ""
