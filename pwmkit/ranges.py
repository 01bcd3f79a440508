"""Plausible ranges of the quantities a user types: one table for the API, design files and widgets.

A value outside its range is almost always a typo or a unit slip ("10 kF" for a resistor,
``1e-300`` for a capacitor), and far outside it double-precision arithmetic breaks down
(``1/1e-300`` overflows). So every public edge checks the same table: :func:`pwmkit.timing.astable`
and the other timing functions, the design objects (:mod:`pwmkit.design`, hence design files
and the widget fields, which build design objects) and the command line. The bounds are wide:
they refuse nonsense, not unusual designs; whether a value is *good* is for the design rules.

Each row says why its bounds are where they are (common practice for 555-type timer circuits).
"""

from __future__ import annotations

import functools
from dataclasses import dataclass
from typing import Any

__all__ = ["Range", "RANGES", "range_of", "checked"]


@dataclass(frozen=True)
class Range:
    """Allowed values of one quantity.

    Attributes
    ----------
    low, high : bounds [unit]
    unit : SI unit symbol ("" for fractions)
    low_inclusive, high_inclusive : whether the bounds themselves are allowed
    why : the reason for the bounds, for documents
    """

    low: float
    high: float
    unit: str
    low_inclusive: bool = True
    high_inclusive: bool = True
    why: str = ""

    def text(self, name: str) -> str:
        """``"1 Ω ≤ ra ≤ 1 GΩ"`` — the range as the messages write it."""
        from .values import format_value

        lo = format_value(self.low, self.unit, 4) if self.low else (f"0 {self.unit}".strip())
        hi = format_value(self.high, self.unit, 4)
        return f"{lo} {'≤' if self.low_inclusive else '<'} {name} {'≤' if self.high_inclusive else '<'} {hi}"

    def limits(self) -> dict[str, Any]:
        """Keyword arguments for :func:`pwmkit._validate.quantity`."""
        return dict(minimum=self.low, maximum=self.high, min_inclusive=self.low_inclusive,
                    max_inclusive=self.high_inclusive)


_RES = "resistors from 1 Ω to 1 GΩ; below, wiring and switch resistance dominate; above, leakage does"
_CAP = "timing capacitors from 1 pF (stray capacitance) to 1 F"
_SUPPLY = "555-type timers run from a few volts to 18 V; 100 V leaves room for load supplies"

#: Quantity name → its plausible range (the names of :func:`pwmkit.timing.astable`'s arguments and
#: of the design objects' fields).
RANGES: dict[str, Range] = {
    "ra": Range(1.0, 1e9, "Ω", why=_RES),
    "rb": Range(0.0, 1e9, "Ω", why=_RES + "; 0 Ω allowed (pot topology end resistor)"),
    "pot": Range(1.0, 1e9, "Ω", why=_RES),
    "r_on": Range(0.0, 1e6, "Ω", why="discharge-switch on-resistance: 0 (ideal) to 1 MΩ"),
    "r_cv": Range(1.0, 1e9, "Ω", why=_RES),
    "r_ext": Range(1.0, 1e9, "Ω", why=_RES),
    "c": Range(1e-12, 1.0, "F", why=_CAP),
    "cv_bypass": Range(1e-12, 1.0, "F", why=_CAP),
    "vcc": Range(0.0, 100.0, "V", low_inclusive=False, why=_SUPPLY),
    "v_load": Range(0.0, 100.0, "V", low_inclusive=False, why=_SUPPLY),
    "vcc_min": Range(0.0, 100.0, "V", low_inclusive=False, why=_SUPPLY),
    "vcc_max": Range(0.0, 100.0, "V", low_inclusive=False, why=_SUPPLY),
    "vctl": Range(0.0, 100.0, "V", low_inclusive=False, why="the control pin sits between 0 V and the supply"),
    "vd": Range(0.0, 5.0, "V", why="a diode drop: 0 (ideal) to 5 V (a string of diodes or an LED)"),
    "vsat": Range(0.0, 5.0, "V", why="discharge-switch saturation: 0 (ideal) to 5 V"),
    "wiper": Range(0.0, 1.0, "", why="fraction of the pot in the charge path"),
    "frequency": Range(1e-3, 1e7, "Hz", why="555-type astables run from millihertz to a few megahertz"),
    "current": Range(0.0, 1e4, "A", why="currents of a low-voltage driver, 0 to 10 kA"),
    "t_ambient_c": Range(-60.0, 150.0, "°C", why="ambient temperatures of electronics"),
}


def range_of(name: str) -> Range:
    """The range of a quantity (the last dotted part of ``name`` is looked up: ``timing.ra`` → ``ra``)."""
    key = name.rsplit(".", 1)[-1]
    return RANGES[key]


def checked(value: Any, name: str, key: str | None = None) -> Any:
    """``value`` read (engineering text, number or array) and checked against its range.

    Parameters
    ----------
    value : float, str or array_like
        The input [unit of the quantity].
    name : str
        Field name used in messages (``"ra"``, ``"timing.ra"`` …).
    key : str, optional
        Row of :data:`RANGES` (default: the last dotted part of ``name``).

    Returns
    -------
    float or numpy.ndarray

    Raises
    ------
    DesignError
        Unreadable input, a unit that does not match, or a value outside the range (the message
        names the field, the value and the range).

    Examples
    --------
    >>> checked("4k7", "ra")
    4700.0
    """
    from ._validate import quantity

    r = RANGES[key or name.rsplit(".", 1)[-1]]
    return quantity(value, name, unit=r.unit, allowed=_allowed_text(r, name), **r.limits())


@functools.lru_cache(maxsize=512)
def _allowed_text(r: Range, name: str) -> str:
    # formatted once per (range, field): every model call checks its inputs
    return r.text(name)

