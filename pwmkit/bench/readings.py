"""Bench readings kept with a design: the ``[[bench]]`` entries of a design file (design layer).

A :class:`BenchReading` is what the engineer measured on the built driver: when (``date``), under
which conditions (:class:`BenchConditions` — supply, ambient, wiper), the measured quantities
(:class:`Measured` — value plus the instrument's stated accuracy) and a free note. A design holds
its readings in :attr:`pwmkit.design.Design.bench`; the design file stores them as ``[[bench]]``
tables (``docs/design-file.md``)::

    [[bench]]
    date = 2026-11-30
    note = "first power-up"
    source = "capture fan-bench-demo.csv, channel CH1, 60 whole periods"

    [bench.conditions]
    vcc = 12.05
    t_ambient_c = 21.0
    wiper = 0.6

    [bench.measured]
    frequency = { value = 29876.5, accuracy = 0.0001 }
    duty = { value = 0.5931, resolution = 0.001 }
    i_load = 0.41

Accuracy follows the usual instrument statement "±(a % of reading + b)": ``accuracy`` is the
relative part ``a`` [1] and ``resolution`` the absolute part ``b`` in the quantity's unit; the
stated uncertainty is ``accuracy·|value| + resolution``. A bare number means no accuracy stated.

This module is light (no scipy): it only describes, checks, reads and writes readings. The
comparison with the design is :func:`pwmkit.bench.reconcile`.
"""

from __future__ import annotations

import datetime as _dt
import math
from collections.abc import Mapping, Sequence
from dataclasses import dataclass, field
from typing import Any

from ..errors import DesignError

__all__ = ["QUANTITIES", "Measured", "BenchConditions", "BenchReading", "readings_from_data",
           "readings_to_toml", "reading_path", "check_conditions"]

#: Measured quantities a reading may hold → (unit, meaning). Fractions (duty) in [1].
QUANTITIES: Mapping[str, tuple[str, str]] = {
    "frequency": ("Hz", "PWM frequency"),
    "duty": ("1", "duty cycle (fraction of the period the output is high)"),
    "t_high": ("s", "output-high time"),
    "t_low": ("s", "output-low time"),
    "rise_time": ("s", "output 10–90 % rise time"),
    "fall_time": ("s", "output 90–10 % fall time"),
    "v_high": ("V", "output-high level"),
    "v_low": ("V", "output-low level"),
    "i_load": ("A", "mean load current"),
    "t_mosfet_c": ("°C", "MOSFET case temperature"),
}

#: Limits of each quantity (inclusive lower, inclusive upper) in its unit.
_LIMITS: Mapping[str, tuple[float, float]] = {
    "frequency": (1e-6, 1e9), "duty": (0.0, 1.0), "t_high": (0.0, 1e6), "t_low": (0.0, 1e6),
    "rise_time": (0.0, 1e3), "fall_time": (0.0, 1e3), "v_high": (-1000.0, 1000.0), "v_low": (-1000.0, 1000.0),
    "i_load": (-1000.0, 1000.0), "t_mosfet_c": (-60.0, 250.0),
}

_CONDITION_LIMITS: Mapping[str, tuple[float, float, str]] = {
    "vcc": (0.0, 100.0, "V"), "t_ambient_c": (-60.0, 150.0, "°C"), "wiper": (0.0, 1.0, "1"),
}

_MAX_TEXT = 10_000
_MAX_READINGS = 10_000


def reading_path(index: int | None, *parts: str) -> str:
    """Dotted field path of a reading, e.g. ``bench[2].conditions.vcc`` (index counted from 0).

    Without an index (a reading made in code, not yet part of a design) the path starts at the
    reading's own field, e.g. ``conditions.vcc``.
    """
    return ".".join(((f"bench[{index}]",) if index is not None else ()) + parts)


def _number(value: Any, path: str, unit: str, lo: float, hi: float, *, percent_ok: bool = False) -> float:
    """A finite number (or engineering text) within [lo, hi]; DesignError naming ``path`` otherwise."""
    if isinstance(value, bool) or not isinstance(value, (int, float, str)):
        kind = "a table" if isinstance(value, dict) else "an array" if isinstance(value, list) else \
            "true/false" if isinstance(value, bool) else type(value).__name__
        raise DesignError(f"{path}: expected a number or engineering text such as \"29.9k\", got {kind} {value!r}")
    if isinstance(value, str):
        from ..values import parse_value

        text = value.strip()
        try:
            if percent_ok and text.endswith("%"):
                number = parse_value(text[:-1]) / 100.0
            else:
                number = parse_value(text)
        except DesignError as exc:
            raise DesignError(f"{path}: {exc}") from None
    else:
        try:
            number = float(value)
        except OverflowError:
            raise DesignError(f"{path}: {value!r} is too large to be a number in double precision") from None
    if not math.isfinite(number):
        raise DesignError(f"{path}: {value!r} is not a finite number; give a finite value in {unit}")
    if not lo <= number <= hi:
        u = "" if unit == "1" else f" {unit}"
        raise DesignError(f"{path}: {number:g}{u} is out of range; allowed {lo:g} … {hi:g}{u}")
    return number


def _text(value: Any, path: str) -> str:
    if not isinstance(value, str):
        raise DesignError(f"{path}: expected text, got {type(value).__name__} {value!r}")
    if len(value) > _MAX_TEXT:
        raise DesignError(f"{path}: text of {len(value)} characters is too long; allowed up to {_MAX_TEXT}")
    return value


def _date(value: Any, path: str) -> str | None:
    """ISO date or date-time text from a TOML date/date-time or from text; None stays None."""
    if value is None:
        return None
    if isinstance(value, (_dt.datetime, _dt.date)):
        return value.isoformat()
    if isinstance(value, str):
        text = value.strip()
        for parse in (_dt.date.fromisoformat, _dt.datetime.fromisoformat):
            try:
                return parse(text).isoformat()  # normalised: valid TOML date or date-time
            except ValueError:
                continue
        raise DesignError(f"{path}: {value!r} is not a date; give an ISO date such as 2026-11-30 or a date-time "
                          "such as 2026-11-30T14:05:00")
    raise DesignError(f"{path}: expected a date such as 2026-11-30, got {type(value).__name__} {value!r}")


@dataclass(frozen=True)
class Measured:
    """One measured quantity and its instrument's stated accuracy.

    Attributes
    ----------
    quantity : a key of :data:`QUANTITIES` (``"frequency"``, ``"duty"`` …)
    value : the reading [unit of the quantity]
    accuracy : relative part of the stated accuracy, or None [1]
    resolution : absolute part of the stated accuracy, or None [unit of the quantity]
    """

    quantity: str
    value: float
    accuracy: float | None = None
    resolution: float | None = None

    def __post_init__(self) -> None:
        self._check(reading_path(None, "measured", str(self.quantity)))

    def _check(self, path: str) -> None:
        if not isinstance(self.quantity, str) or self.quantity not in QUANTITIES:
            raise DesignError(f"{path}: not a known measured quantity; allowed: {', '.join(QUANTITIES)}")
        unit = QUANTITIES[self.quantity][0]
        lo, hi = _LIMITS[self.quantity]
        object.__setattr__(self, "value", _number(self.value, path, unit, lo, hi, percent_ok=unit == "1"))
        if self.accuracy is not None:
            object.__setattr__(self, "accuracy", _number(self.accuracy, f"{path}.accuracy", "1", 0.0, 1.0,
                                                         percent_ok=True))
        if self.resolution is not None:
            span = max(abs(lo), abs(hi))
            object.__setattr__(self, "resolution", _number(self.resolution, f"{path}.resolution", unit, 0.0, span,
                                                           percent_ok=unit == "1"))

    @property
    def unit(self) -> str:
        """Unit of the quantity ("1" for fractions)."""
        return QUANTITIES[self.quantity][0]

    @property
    def uncertainty(self) -> float | None:
        """Stated uncertainty ``accuracy·|value| + resolution``, None when no accuracy is stated [unit]."""
        if self.accuracy is None and self.resolution is None:
            return None
        return (self.accuracy or 0.0) * abs(self.value) + (self.resolution or 0.0)


@dataclass(frozen=True)
class BenchConditions:
    """Conditions of a reading (None = not recorded).

    Attributes
    ----------
    vcc : timer supply as measured [V]
    t_ambient_c : ambient temperature [°C]
    wiper : wiper position 0–1 of a pot-steered design [1]
    """

    vcc: float | None = None
    t_ambient_c: float | None = None
    wiper: float | None = None

    def __post_init__(self) -> None:
        self._check("conditions")

    def _check(self, path: str) -> None:
        for name, (lo, hi, unit) in _CONDITION_LIMITS.items():
            value = getattr(self, name)
            if value is not None:
                object.__setattr__(self, name, _number(value, f"{path}.{name}", unit, lo, hi,
                                                       percent_ok=unit == "1"))
        if self.vcc is not None and self.vcc <= 0:
            raise DesignError(f"{path}.vcc: {self.vcc:g} V is out of range; allowed vcc > 0 V")


@dataclass(frozen=True)
class BenchReading:
    """One bench session's reading of the built driver.

    Attributes
    ----------
    measured : tuple of Measured (each quantity at most once)
    conditions : BenchConditions
    date : ISO date or date-time text, or None
    note : free text
    source : where the numbers come from (e.g. the capture file), free text
    """

    measured: tuple[Measured, ...] = ()
    conditions: BenchConditions = field(default_factory=BenchConditions)
    date: str | None = None
    note: str = ""
    source: str = ""

    def __post_init__(self) -> None:
        self.check(None)

    def check(self, index: int | None) -> None:
        """Validate, naming fields as ``bench[index]…`` (DesignError)."""
        if isinstance(self.measured, Mapping):
            items = tuple(m if isinstance(m, Measured) else Measured(k, m) for k, m in self.measured.items())
            object.__setattr__(self, "measured", items)
        if not isinstance(self.measured, (tuple, list)):
            raise DesignError(f"{reading_path(index, 'measured')}: expected Measured values, got "
                              f"{type(self.measured).__name__}")
        object.__setattr__(self, "measured", tuple(self.measured))
        seen: set[str] = set()
        for m in self.measured:
            if not isinstance(m, Measured):
                raise DesignError(f"{reading_path(index, 'measured')}: expected Measured values, got "
                                  f"{type(m).__name__}")
            if m.quantity in seen:
                raise DesignError(f"{reading_path(index, 'measured', m.quantity)}: given twice; give each quantity once")
            seen.add(m.quantity)
            m._check(reading_path(index, "measured", m.quantity))
        if not isinstance(self.conditions, BenchConditions):
            raise DesignError(f"{reading_path(index, 'conditions')}: expected BenchConditions, got "
                              f"{type(self.conditions).__name__}")
        self.conditions._check(reading_path(index, "conditions"))
        object.__setattr__(self, "date", _date(self.date, reading_path(index, "date")))
        object.__setattr__(self, "note", _text(self.note, reading_path(index, "note")))
        object.__setattr__(self, "source", _text(self.source, reading_path(index, "source")))

    def get(self, quantity: str) -> Measured | None:
        """The measured quantity of that name, or None."""
        for m in self.measured:
            if m.quantity == quantity:
                return m
        return None

    def value(self, quantity: str) -> float | None:
        """Value of a measured quantity, or None."""
        m = self.get(quantity)
        return None if m is None else m.value

    def __repr__(self) -> str:
        vals = ", ".join(f"{m.quantity}={m.value:.6g}" for m in self.measured)
        c = self.conditions
        cond = ", ".join(f"{k}={getattr(c, k):g}" for k in ("vcc", "t_ambient_c", "wiper") if getattr(c, k) is not None)
        return f"BenchReading({self.date or 'undated'}: {vals}{'; ' + cond if cond else ''})"


# --------------------------------------------------------------------------------------------
# design file: reading and writing [[bench]]
# --------------------------------------------------------------------------------------------
_READING_KEYS = ("date", "note", "source", "conditions", "measured")
_MEASURED_KEYS = ("value", "accuracy", "resolution")


def _unknown(path: str, key: str, known: Sequence[str]) -> DesignError:
    import difflib

    hint = difflib.get_close_matches(key, list(known), n=1)
    did = f" (did you mean {hint[0]!r}?)" if hint else ""
    return DesignError(f"{path}.{key}: unknown key{did}; known keys: {', '.join(known)}")


def _reading_from_table(index: int, table: Any) -> BenchReading:
    path = reading_path(index)
    if not isinstance(table, dict):
        raise DesignError(f"{path}: expected a [[bench]] table, got {type(table).__name__}")
    for key in table:
        if key not in _READING_KEYS:
            raise _unknown(path, key, _READING_KEYS)
    cond_table = table.get("conditions", {})
    if not isinstance(cond_table, dict):
        raise DesignError(f"{path}.conditions: expected a table [bench.conditions], got {cond_table!r}")
    for key in cond_table:
        if key not in _CONDITION_LIMITS:
            raise _unknown(f"{path}.conditions", key, tuple(_CONDITION_LIMITS))
    meas_table = table.get("measured", {})
    if not isinstance(meas_table, dict):
        raise DesignError(f"{path}.measured: expected a table [bench.measured], got {meas_table!r}")
    measured = []
    for key, item in meas_table.items():
        mpath = f"{path}.measured.{key}"
        if key not in QUANTITIES:
            raise _unknown(f"{path}.measured", key, tuple(QUANTITIES))
        if isinstance(item, dict):
            for k in item:
                if k not in _MEASURED_KEYS:
                    raise _unknown(mpath, k, _MEASURED_KEYS)
            if "value" not in item:
                raise DesignError(f"{mpath}.value: missing; give value = … (and optionally accuracy, resolution)")
            m = object.__new__(Measured)
            for name in ("quantity", "value", "accuracy", "resolution"):
                object.__setattr__(m, name, key if name == "quantity" else item.get(name))
        else:
            m = object.__new__(Measured)
            for name, v in (("quantity", key), ("value", item), ("accuracy", None), ("resolution", None)):
                object.__setattr__(m, name, v)
        m._check(mpath)
        measured.append(m)
    cond = object.__new__(BenchConditions)
    for name in _CONDITION_LIMITS:
        object.__setattr__(cond, name, cond_table.get(name))
    reading = object.__new__(BenchReading)
    for name, default in (("measured", tuple(measured)), ("conditions", cond), ("date", table.get("date")),
                          ("note", table.get("note", "")), ("source", table.get("source", ""))):
        object.__setattr__(reading, name, default)
    reading.check(index)
    return reading


def check_conditions(design: Any) -> None:
    """Refuse readings whose conditions do not fit the design (a wiper on a design without a pot)."""
    for i, reading in enumerate(design.bench):
        if reading.conditions.wiper is not None and design.timing.topology != "pot":
            raise DesignError(f"{reading_path(i, 'conditions', 'wiper')}: {reading.conditions.wiper:g} given, but the "
                              f"{design.timing.topology!r} topology has no potentiometer; remove the wiper")


def readings_from_data(value: Any) -> tuple[BenchReading, ...]:
    """The readings of a parsed design file's ``bench`` array (DesignError with the field path)."""
    if not isinstance(value, list):
        raise DesignError("bench: expected an array of tables written [[bench]], got "
                          f"{'a table [bench]' if isinstance(value, dict) else type(value).__name__}")
    if len(value) > _MAX_READINGS:
        raise DesignError(f"bench: {len(value)} readings; allowed up to {_MAX_READINGS}")
    return tuple(_reading_from_table(i, t) for i, t in enumerate(value))


def _toml_text(text: str) -> str:
    from ..record.designfile import _toml_string

    return _toml_string(text, multiline="\n" in text)


def _toml_float(x: float) -> str:
    return repr(float(x))


def _unit_comment(unit: str, value: float) -> str:
    if unit in ("1", "°C"):
        return f"  # {100 * value:.6g} %" if unit == "1" else ""
    from ..values import format_value

    try:
        return f"  # {format_value(value, unit, 5)}"
    except DesignError:  # pragma: no cover - finite numbers always format
        return ""


def reading_to_toml(reading: BenchReading) -> str:
    """One ``[[bench]]`` entry as TOML text (reads back to an equal reading)."""
    lines = ["[[bench]]"]
    if reading.date is not None:
        lines.append(f"date = {reading.date}")
    if reading.note:
        lines.append(f"note = {_toml_text(reading.note)}")
    if reading.source:
        lines.append(f"source = {_toml_text(reading.source)}")
    c = reading.conditions
    if any(getattr(c, k) is not None for k in _CONDITION_LIMITS):
        lines += ["", "[bench.conditions]"]
        for name, (_lo, _hi, unit) in _CONDITION_LIMITS.items():
            v = getattr(c, name)
            if v is not None:
                lines.append(f"{name} = {_toml_float(v)}{_unit_comment(unit, v)}")
    if reading.measured:
        lines += ["", "[bench.measured]"]
        for m in reading.measured:
            if m.accuracy is None and m.resolution is None:
                body = _toml_float(m.value)
            else:
                parts = [f"value = {_toml_float(m.value)}"]
                if m.accuracy is not None:
                    parts.append(f"accuracy = {_toml_float(m.accuracy)}")
                if m.resolution is not None:
                    parts.append(f"resolution = {_toml_float(m.resolution)}")
                body = "{ " + ", ".join(parts) + " }"
            lines.append(f"{m.quantity} = {body}{_unit_comment(m.unit, m.value)}")
    return "\n".join(lines) + "\n"


def readings_to_toml(readings: Sequence[BenchReading]) -> str:
    """All ``[[bench]]`` entries as TOML text ("" for none)."""
    return "\n".join(reading_to_toml(r) for r in readings)
