"""One vocabulary for every view: dashboard, notebook record, report, formula sheet and command line.

Presentation-neutral words and phrases (no widget, plot or HTML code here), so that the same thing
has the same name wherever an engineer reads it:

- the two timing models: :data:`EXACT` and :data:`ESTIMATE` (the textbook 0.693·R·C forms);
- differences: relative differences in percent for times and frequencies, duty differences in
  percentage points (:data:`POINTS`);
- the bound a check compares with: "limit" only for a part's limit (an absolute maximum or a
  derated rating); "target", "minimum" or "maximum" otherwise (:func:`bound_word`);
- where a check's threshold comes from: :data:`SOURCE` (one word, never "basis" or "origin");
- human labels for code tokens: timer family, load kind, topology, IEEE 1789 region, fields;
- counts with correct plurals (:func:`plural`), the condition of a worst-case figure
  (:func:`condition`), a rating as part rating and derated limit (:func:`rating_text`).

Numbers are formatted by :mod:`pwmkit.numstyle`.
"""

from __future__ import annotations

from collections.abc import Mapping
from types import MappingProxyType

__all__ = [
    "EXACT", "ESTIMATE", "ESTIMATE_NOTE", "EXACT_NOTE", "DIFFERENCE", "POINTS", "POINTS_LONG", "SOURCE",
    "TIMER_LABELS", "LOAD_LABELS", "TOPOLOGY_LABELS", "FLICKER_LABELS", "FIELD_LABELS", "FIELD_EXAMPLES",
    "BOUND_WORDS", "SEVERITY_WORDS", "bound_word", "plural", "condition", "rating_text", "label",
    "timer_label", "load_label", "topology_label", "DIODE_LABELS", "MOSFET_LABELS", "diode_label", "mosfet_label",
    "timer_part_label", "flicker_label", "field_label", "field_examples",
    "source_label", "severity_count",
]

#: The model with the diode drop, the discharge switch and the control pin (sympy-derived closed form).
EXACT = "exact model"
#: The textbook forms t = 0.693·R·C (ln 2 ≈ 0.693, ideal parts, internal divider).
ESTIMATE = "0.693 estimate"
EXACT_NOTE = "closed form derived with sympy: steering-diode drop, discharge switch and control pin included"
ESTIMATE_NOTE = "textbook 0.693·R·C forms (ln 2 ≈ 0.693): ideal parts, internal divider"
#: Column heading of the difference between the two models.
DIFFERENCE = "exact vs estimate"
#: Unit word of a difference of two duties (percentage points), short and long.
POINTS = "pt"
POINTS_LONG = "percentage points"
#: The one word for where a check's threshold comes from.
SOURCE = "source"

TIMER_LABELS: Mapping[str, str] = MappingProxyType({"bipolar": "bipolar", "cmos": "CMOS"})
LOAD_LABELS: Mapping[str, str] = MappingProxyType({"led": "LED", "motor": "motor", "none": "no load"})
TOPOLOGY_LABELS: Mapping[str, str] = MappingProxyType({
    "classic": "classic (R_A + R_B charge)",
    "bypass": "bypass diode",
    "steered": "two steering diodes",
    "pot": "pot-steered",
})
#: Part families in words, as the schematic and the parts list label them.
DIODE_LABELS: Mapping[str, str] = MappingProxyType({
    "small-signal-silicon": "small-signal Si diode",
    "small-schottky": "small Schottky diode",
    "schottky-1a": "1 A Schottky diode",
    "fast-recovery-1a": "1 A fast-recovery diode",
})
MOSFET_LABELS: Mapping[str, str] = MappingProxyType({
    "logic-level-30v": "logic-level N-MOSFET 30 V",
    "standard-level-60v": "standard-level N-MOSFET 60 V",
})
#: IEEE Std 1789-2015 regions in words.
FLICKER_LABELS: Mapping[str, str] = MappingProxyType({
    "no-effect": "no observable effect",
    "low-risk": "low risk",
    "elevated": "elevated risk",
})
#: Labels of the design fields an engineer edits (label, unit symbol).
FIELD_LABELS: Mapping[str, tuple[str, str]] = MappingProxyType({
    "ra": ("R_A (charge resistor)", "Ω"),
    "rb": ("R_B (discharge resistor)", "Ω"),
    "pot": ("pot (end to end)", "Ω"),
    "wiper": ("wiper position", "%"),
    "c": ("C (timing capacitor)", "F"),
    "vcc": ("supply V_CC", "V"),
    "vctl": ("control voltage", "V"),
    "r_cv": ("control-pin resistor", "Ω"),
})
#: Valid examples per unit, as an engineer would type them.
FIELD_EXAMPLES: Mapping[str, str] = MappingProxyType({
    "Ω": "4k7, 10 kΩ or 470R",
    "F": "2n2, 100 nF or 4.7µ",
    "V": "12, 11.4 V or 5V",
    "Hz": "6k, 25 kHz or 500 Hz",
    "A": "20m, 1.5 A",
    "W": "0.25, 250 mW",
    "%": "25, 50 %",
})

#: Word for the bound of each check (rule id → word); anything not listed is a "threshold".
BOUND_WORDS: Mapping[str, str] = MappingProxyType({
    "supply.timer_range": "maximum",
    "discharge.current": "maximum",
    "pot.end_resistors": "minimum",
    "timing.bias_current": "maximum",
    "duty.range": "maximum",
    "frequency.target": "target",
    "frequency.family_max": "maximum",
    "capacitor.range": "maximum",
    "cv.bypass": "minimum",
    "gate.drive": "minimum",
    "gate.overvoltage": "limit",
    "mosfet.temperature": "limit",
    "mosfet.voltage": "limit",
    "led.resistor_power": "derated limit",
    "led.current_spread": "maximum",
    "led.flicker": "minimum",
    "freewheel.temperature": "limit",
    "freewheel.current": "minimum",
    "freewheel.voltage": "minimum",
    "freewheel.recovery": "maximum",
    "motor.conduction": "minimum",
    "motor.audible": "minimum",
})
#: Severity → (singular, plural) in counts.
SEVERITY_WORDS: Mapping[str, tuple[str, str]] = MappingProxyType({
    "fail": ("failure", "failures"), "warn": ("warning", "warnings"), "ok": ("passed", "passed"),
    "not-run": ("not run", "not run"),
})


def bound_word(rule_id: str) -> str:
    """The word for what a check compares its value with ("limit", "target", "minimum", "maximum" …).

    >>> bound_word("frequency.target"), bound_word("mosfet.temperature"), bound_word("x.new")
    ('target', 'limit', 'threshold')
    """
    return BOUND_WORDS.get(rule_id, "threshold")


def plural(n: int | float, singular: str, plural_form: str | None = None) -> str:
    """``n`` with the noun in the right number.

    >>> plural(0, "warning"), plural(1, "string"), plural(3, "string"), plural(2, "LED", "LEDs")
    ('0 warnings', '1 string', '3 strings', '2 LEDs')
    """
    many = plural_form if plural_form is not None else singular + "s"
    count = int(n) if float(n).is_integer() else n
    return f"{count} {singular if count == 1 else many}"


def severity_count(severity: str, n: int) -> str:
    """``"1 failure"``, ``"0 warnings"``, ``"18 passed"``.

    >>> severity_count("warn", 0), severity_count("fail", 1), severity_count("ok", 18)
    ('0 warnings', '1 failure', '18 passed')
    """
    one, many = SEVERITY_WORDS.get(severity, (severity, severity))
    return plural(n, one, many)


def condition(*, vcc: float | None = None, t_c: float | None = None, duty: float | None = None,
              what: str = "") -> str:
    """The operating condition of a worst-case figure: ``"at 13.8 V, 45 °C"``.

    Parameters
    ----------
    vcc : float, optional
        Supply of the figure [V].
    t_c : float, optional
        Ambient of the figure [°C].
    duty : float, optional
        Duty of the figure [1].
    what : str
        Optional qualifier put after the supply, e.g. "highest supply".

    >>> condition(vcc=13.8, t_c=45), condition(vcc=12.0, what="nominal")
    ('at 13.8 V, 45 °C', 'at 12 V (nominal)')
    """
    from .numstyle import screen

    parts = []
    if vcc is not None:
        parts.append(screen(vcc, "V") + (f" ({what})" if what else ""))
    if t_c is not None:
        parts.append(screen(t_c, "°C"))
    if duty is not None:
        parts.append(screen(duty, "duty") + " duty")
    return ("at " + ", ".join(parts)) if parts else ""


def rating_text(part_rating: float | None, derated_limit: float | None, t_c: float) -> str:
    """A power rating as the part's rating and the derated limit it is used up to.

    >>> rating_text(0.5, 0.25, 40)
    '0.5 W part, derated limit 0.25 W at 40 °C'

    Ratings are written in plain watts, as parts are sold (common practice).
    """
    from .numstyle import screen

    if part_rating is None:
        return "no standard rating fits — see the checks"
    limit = "" if derated_limit is None else f", derated limit {derated_limit:.3g} W at {screen(t_c, '°C')}"
    return f"{part_rating:.3g} W part{limit}"


def label(mapping: Mapping[str, str], token: str | None) -> str:
    """The human label of a code token (the token itself when unknown)."""
    if token is None:
        return "—"
    return mapping.get(str(token), str(token))


def timer_label(family: str) -> str:
    """Human label.

    >>> timer_label("cmos")
    'CMOS'
    """
    return label(TIMER_LABELS, family)


def load_label(kind: str | None) -> str:
    """Human label.

    >>> load_label("led"), load_label(None)
    ('LED', 'no load')
    """
    return "no load" if kind is None else label(LOAD_LABELS, kind)


def diode_label(family: str) -> str:
    """Human label of a diode family.

    >>> diode_label("schottky-1a")
    '1 A Schottky diode'
    """
    return label(DIODE_LABELS, family)


def mosfet_label(family: str) -> str:
    return label(MOSFET_LABELS, family)


def timer_part_label(family: str) -> str:
    """The timer as a part: ``"CMOS 555-type"``.

    >>> timer_part_label("bipolar")
    'bipolar 555-type'
    """
    return f"{timer_label(family)} 555-type"


def topology_label(topology: str) -> str:
    return label(TOPOLOGY_LABELS, topology)


def flicker_label(region: str | None) -> str:
    """Human label.

    >>> flicker_label("no-effect")
    'no observable effect'
    """
    return label(FLICKER_LABELS, region)


def field_label(name: str) -> str:
    """``"C (timing capacitor) [F]"`` for ``"c"``; the name itself when unknown."""
    if name not in FIELD_LABELS:
        return name
    text, unit = FIELD_LABELS[name]
    return f"{text} [{unit}]"


def field_examples(unit: str) -> str:
    """Valid examples to type for a quantity in ``unit``."""
    return FIELD_EXAMPLES.get(unit, "a number such as 4.7, 4k7 or 100n")


def source_label(origin: str) -> str:
    """A check's source tag in words: ``"datasheet-generic"`` → ``"typical data-sheet value (generic part family)"``.

    >>> source_label("standard: IEEE Std 1789-2015 RP1/RP2")
    'IEEE Std 1789-2015 RP1/RP2'
    """
    kind, _, rest = origin.partition(":")
    words = {
        "datasheet-generic": "typical value of the part family — check your part's data sheet",
        "common-practice": "common practice",
        "from-memory": "typical value — check your part's data sheet",
        "standard": rest.strip(),
    }
    return words.get(kind.strip(), origin)
