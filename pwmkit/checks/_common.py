"""Shared helpers of the rule modules: the rule registry and small readers of evaluation parts."""

from __future__ import annotations

from collections.abc import Callable
from typing import Any

import numpy as np

from .findings import Finding

__all__ = ["Rule", "registry", "finding", "spread_band", "fmt", "pct", "grade"]

Rule = Callable[[Any, Any], "Finding | None"]


def registry() -> tuple[dict[str, Rule], Callable[[str], Callable[[Rule], Rule]]]:
    """A fresh ordered rule table and the decorator that fills it."""
    table: dict[str, Rule] = {}

    def rule(rule_id: str) -> Callable[[Rule], Rule]:
        def deco(fn: Rule) -> Rule:
            if rule_id in table:
                raise RuntimeError(f"duplicate rule id {rule_id}")
            table[rule_id] = fn
            fn.rule_id = rule_id  # type: ignore[attr-defined]
            return fn

        return deco

    return table, rule


def finding(rule_id: str, severity: str, title: str, value: Any, limit: Any, unit: str, explanation: str,
            remedy: str, origin: str) -> Finding:
    """Build a :class:`Finding`; the remedy is dropped for ``ok`` findings."""
    return Finding(id=rule_id, severity=severity, title=title,  # type: ignore[arg-type]
                   value=None if value is None else float(value), limit=None if limit is None else float(limit),
                   unit=unit, explanation=explanation, remedy="" if severity == "ok" else remedy, origin=origin)


def grade(value: float, warn_above: float, fail_above: float) -> str:
    """``ok`` up to ``warn_above``, ``warn`` up to ``fail_above``, ``fail`` beyond."""
    if value > fail_above:
        return "fail"
    if value > warn_above:
        return "warn"
    return "ok"


def spread_band(spread: Any, name: str) -> tuple[float, float] | None:
    """(1st, 99th) percentile of ``frequency`` or ``duty`` from a spread result, if there is one.

    Uses :meth:`pwmkit.tolerance.SpreadResult.percentile`; also accepts the attribute spellings
    ``<name>_p01``/``<name>_p99`` or a samples array ``<name>``.
    """
    if spread is None:
        return None
    if callable(getattr(spread, "percentile", None)):
        pc = getattr(spread.percentile(np.array([1.0, 99.0])), name)
        return float(pc[0]), float(pc[1])
    lo, hi = getattr(spread, f"{name}_p01", None), getattr(spread, f"{name}_p99", None)
    if lo is None or hi is None:
        samples = getattr(spread, name, None)
        if samples is None or np.ndim(samples) == 0:
            return None
        lo, hi = np.percentile(np.asarray(samples, dtype=float), [1.0, 99.0])
    return float(lo), float(hi)


def fmt(x: float, unit: str, digits: int = 3) -> str:
    """Engineering-notation text of a value (°C, % and plain ratios unprefixed)."""
    from ..values import format_value

    if unit in ("°C", "%", "K", "", "rpm", "points"):
        return f"{x:.{digits}g} {unit}".strip()
    return format_value(float(x), unit, digits)


def pct(x: float, digits: int = 3) -> str:
    """A fraction written as per cent."""
    return f"{100.0 * x:.{digits}g} %"
