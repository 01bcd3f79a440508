"""Design-rule findings: one :class:`Finding` per rule and the :class:`Findings` collection.

A finding is data, not a message: the rule's id, a severity (``"ok"``, ``"warn"``, ``"fail"``),
the value that was judged and the limit it was judged against (with their unit), a plain-language
explanation, a remedy, and the origin of the rule's threshold:

``"standard: …"``
    a published standard, named (e.g. ``"standard: IEEE Std 1789-2015 RP1/RP2"``);
``"datasheet-generic"``
    a typical value published in data sheets of the generic part family;
``"common-practice"``
    a general fact or rule of thumb of the trade with no single authoritative source;
``"from-memory"``
    recalled, not confirmed against a source — treat with care.

The HTML table uses the Okabe–Ito colour-blind-safe palette and always repeats the severity in
words and with a symbol, so colour is never the only cue.
"""

from __future__ import annotations

import html
import math
from collections.abc import Iterator, Sequence
from dataclasses import dataclass
from typing import Any, Literal, overload

from ..errors import DesignError
from ..origins import origin_text

__all__ = ["SEVERITIES", "NOT_RUN", "ORIGIN_KINDS", "Severity", "Finding", "Findings", "severity_style"]

Severity = Literal["ok", "warn", "fail", "not-run"]
#: Severities in rising order.
SEVERITIES: tuple[str, ...] = ("ok", "warn", "fail")
#: Severity of a rule whose figures have not been computed yet (the tolerance analysis runs on
#: demand): listed, never dropped, and not counted as ok, warn or fail.
NOT_RUN = "not-run"
#: Allowed origin tags (a standard is written ``"standard: <name and clause>"``).
ORIGIN_KINDS: tuple[str, ...] = ("standard", "datasheet-generic", "common-practice", "from-memory")

# Okabe & Ito (2008) colour-universal-design palette: bluish green, orange, vermillion.
_STYLE = {
    "ok": ("#009E73", "✓", "ok"),
    "warn": ("#E69F00", "!", "warning"),
    "fail": ("#D55E00", "✗", "fail"),
    NOT_RUN: ("#7A7F87", "○", "not run"),
}


def severity_style(severity: str) -> tuple[str, str, str]:
    """(colour, symbol, word) used to show a severity; colour-blind-safe (Okabe–Ito palette)."""
    return _STYLE[severity]


def _check_origin(origin: str) -> None:
    if not isinstance(origin, str):
        raise DesignError(f"origin: {origin!r} is not text")
    kind = origin.split(":", 1)[0].strip()
    if kind not in ORIGIN_KINDS or (kind == "standard" and not origin.split(":", 1)[-1].strip()):
        raise DesignError(f"origin: {origin!r} is not allowed; use one of {', '.join(ORIGIN_KINDS)} "
                          "(a standard as 'standard: <name>')")


@dataclass(frozen=True)
class Finding:
    """The verdict of one design rule.

    Attributes
    ----------
    id : str
        Stable rule id, e.g. ``"gate.drive"`` (see :data:`pwmkit.checks.CHECK_IDS`).
    severity : {"ok", "warn", "fail"}
        ``fail`` — the design breaks a limit or a requirement; ``warn`` — it works but with a
        small or unknown margin; ``ok`` — checked and fine.
    title : str
        Short name of the rule.
    value : float or None
        The judged quantity, in ``unit`` (None when the rule is a yes/no question).
    limit : float or None
        The threshold the value was compared with, in ``unit``.
    unit : str
        Unit of ``value`` and ``limit`` ("" for plain ratios).
    explanation : str
        What was found, in plain language with the numbers.
    remedy : str
        What to change ("" when nothing needs changing).
    origin : str
        Where the threshold comes from (see module docstring).
    """

    id: str
    severity: Severity
    title: str
    value: float | None
    limit: float | None
    unit: str
    explanation: str
    remedy: str
    origin: str

    def __post_init__(self) -> None:
        if self.severity not in (*SEVERITIES, NOT_RUN):
            raise DesignError(f"severity: {self.severity!r} is not allowed; allowed: {', '.join(SEVERITIES)}, "
                              f"{NOT_RUN}")
        for name in ("value", "limit"):
            v = getattr(self, name)
            if v is not None:
                v = float(v)
                if not math.isfinite(v):
                    raise DesignError(f"finding {self.id}: {name} {v!r} is not finite")
                object.__setattr__(self, name, v)
        _check_origin(self.origin)

    @property
    def passed(self) -> bool:
        """True unless the severity is ``"fail"``."""
        return self.severity != "fail"

    def to_dict(self) -> dict[str, Any]:
        """JSON-ready dict of all fields."""
        return {"id": self.id, "severity": self.severity, "title": self.title, "value": self.value,
                "limit": self.limit, "unit": self.unit, "explanation": self.explanation, "remedy": self.remedy,
                "origin": self.origin}

    def __repr__(self) -> str:
        val = "" if self.value is None else f" {self.value:.4g}"
        lim = "" if self.limit is None else f" (limit {self.limit:.4g})"
        unit = f" {self.unit}" if self.unit and self.value is not None else ""
        return f"Finding({self.id}: {self.severity}{val}{unit}{lim})"


def _row_html(f: Finding) -> str:
    from ..values import format_value

    colour, symbol, word = severity_style(f.severity)

    def num(x: float | None) -> str:
        if x is None:
            return ""
        if f.unit in ("%", "°C", "", "K", "points", "rpm"):
            return f"{x:.4g} {f.unit}".strip()
        return format_value(x, f.unit, 3)

    badge = (f"<span style='display:inline-block;min-width:5.5em;padding:0 .4em;border-left:.5em solid {colour};"
             f"font-weight:600'>{symbol} {word}</span>")
    remedy = f"<br><em>Remedy:</em> {html.escape(f.remedy)}" if f.remedy else ""
    return (f"<tr><td>{badge}</td><td><b>{html.escape(f.title)}</b><br><code>{html.escape(f.id)}</code></td>"
            f"<td style='text-align:right;white-space:nowrap'>{html.escape(num(f.value))}</td>"
            f"<td style='text-align:right;white-space:nowrap'>{html.escape(num(f.limit))}</td>"
            f"<td style='max-width:34em'>{html.escape(f.explanation)}{remedy}<br><small>origin: "
            f"{html.escape(origin_text(f.origin))}</small></td></tr>")


class Findings(Sequence[Finding]):
    """An ordered, immutable collection of findings (tuple-like).

    Iterate, index and ``len()`` as with a tuple; plus counts, the worst severity and lookup by
    rule id.

    Examples
    --------
    >>> f = Finding("gate.drive", "warn", "Gate drive", 5.2, 4.5, "V", "text", "remedy", "datasheet-generic")
    >>> fs = Findings([f])
    >>> fs.warn_count, fs.worst, fs.by_id("gate.drive").severity, fs.by_id("led.flicker")
    (1, 'warn', 'warn', None)
    """

    __slots__ = ("_items",)

    def __init__(self, items: Sequence[Finding] | Iterator[Finding] = ()) -> None:
        items = tuple(items)
        for item in items:
            if not isinstance(item, Finding):
                raise DesignError(f"findings: {type(item).__name__} is not a Finding")
        ids = [f.id for f in items]
        if len(set(ids)) != len(ids):
            raise DesignError(f"findings: duplicate rule ids in {ids}")
        self._items: tuple[Finding, ...] = items

    @overload
    def __getitem__(self, index: int) -> Finding: ...

    @overload
    def __getitem__(self, index: slice) -> Findings: ...

    def __getitem__(self, index: int | slice) -> Finding | Findings:
        if isinstance(index, slice):
            return Findings(self._items[index])
        return self._items[index]

    def __len__(self) -> int:
        return len(self._items)

    def __iter__(self) -> Iterator[Finding]:
        return iter(self._items)

    def __eq__(self, other: object) -> bool:
        if isinstance(other, Findings):
            return self._items == other._items
        if isinstance(other, tuple):
            return self._items == other
        return NotImplemented

    def __hash__(self) -> int:
        return hash(self._items)

    def _count(self, severity: str) -> int:
        return sum(1 for f in self._items if f.severity == severity)

    @property
    def fail_count(self) -> int:
        """Number of failed rules."""
        return self._count("fail")

    @property
    def warn_count(self) -> int:
        """Number of warnings."""
        return self._count("warn")

    @property
    def ok_count(self) -> int:
        """Number of rules checked and fine."""
        return self._count("ok")

    @property
    def not_run_count(self) -> int:
        """Number of rules whose figures have not been computed yet (see :data:`NOT_RUN`)."""
        return self._count(NOT_RUN)

    @property
    def worst(self) -> str:
        """The worst severity present among ok, warn and fail (``"ok"`` when empty)."""
        return max((f.severity for f in self._items if f.severity != NOT_RUN), key=SEVERITIES.index, default="ok")

    def by_id(self, rule_id: str) -> Finding | None:
        """The finding of rule ``rule_id``, or None when the rule did not apply to this design.

        Raises
        ------
        KeyError
            ``rule_id`` is not a known rule id.
        """
        from . import CHECK_IDS

        if rule_id not in CHECK_IDS:
            raise KeyError(f"{rule_id!r} is not a rule id; known ids: {', '.join(CHECK_IDS)}")
        for f in self._items:
            if f.id == rule_id:
                return f
        return None

    def of_severity(self, severity: str) -> Findings:
        """The findings with one severity."""
        if severity not in (*SEVERITIES, NOT_RUN):
            raise DesignError(f"severity: {severity!r} is not allowed; allowed: {', '.join(SEVERITIES)}, {NOT_RUN}")
        return Findings(f for f in self._items if f.severity == severity)

    def as_rows(self) -> list[dict[str, Any]]:
        """One JSON-ready dict per finding (fields of :class:`Finding`), in rule order."""
        return [f.to_dict() for f in self._items]

    def __repr__(self) -> str:
        return (f"Findings({len(self)} rules: {self.fail_count} fail, {self.warn_count} warn, "
                f"{self.ok_count} ok)")

    def _repr_html_(self) -> str:
        return self.to_html()

    def to_html(self, compact: bool = False) -> str:
        """HTML table, failures first; ``compact`` folds the ``ok`` findings into one row of titles."""
        order = sorted(self._items, key=lambda f: -SEVERITIES.index(f.severity) if f.severity in SEVERITIES else 1)
        shown = [f for f in order if not (compact and f.severity == "ok")]
        body = "".join(_row_html(f) for f in shown)
        if compact and self.ok_count:
            colour, symbol, word = severity_style("ok")
            titles = ", ".join(html.escape(f.title) for f in order if f.severity == "ok")
            body += (f"<tr><td><span style='display:inline-block;min-width:5.5em;padding:0 .4em;border-left:.5em "
                     f"solid {colour};font-weight:600'>{symbol} {word}</span></td><td colspan='4'>{titles}</td></tr>")
        head = ("<tr><th>severity</th><th>rule</th><th>value</th><th>limit</th>"
                "<th>finding and remedy</th></tr>")
        caption = (f"design-rule checks — {self.fail_count} fail, {self.warn_count} warning"
                   f"{'' if self.warn_count == 1 else 's'}, {self.ok_count} ok"
                   + (f", {self.not_run_count} not run" if self.not_run_count else ""))
        return (f"<table class='pwmkit-findings' style='border-collapse:collapse'>"
                f"<caption style='text-align:left;font-weight:600'>{caption}</caption>{head}{body}</table>")
