"""Checked inputs of a schematic (internal): everything :func:`pwmkit.schematic.draw` accepts,
turned into plain floats, ints and short texts, or refused with a :class:`~pwmkit.DesignError`.
"""

from __future__ import annotations

import unicodedata
from collections.abc import Mapping
from dataclasses import dataclass, field
from typing import Any

import numpy as np

from .._validate import quantity
from ..errors import DesignError
from ..values import format_value

__all__ = ["Spec", "make_spec", "LOADS", "CLAMPS", "ANNOTATION_KEYS"]

LOADS: tuple[str | None, ...] = (None, "led", "motor")
CLAMPS: tuple[str, ...] = ("diode", "zener")

# key -> (where it is written, name shown, unit); unit "%" takes a fraction 0–1
ANNOTATION_KEYS: dict[str, tuple[str, str, str]] = {
    "t_high": ("charge", "t_high", "s"),
    "r_charge": ("charge", "R_charge", "Ω"),
    "t_low": ("discharge", "t_low", "s"),
    "r_discharge": ("discharge", "R_discharge", "Ω"),
    "frequency": ("general", "f", "Hz"),
    "period": ("general", "T", "s"),
    "duty": ("general", "duty", "%"),
}


@dataclass(frozen=True)
class Spec:
    """All inputs of a drawing, checked (internal)."""

    topology: str
    ra: float
    rb: float
    c: float
    pot: float | None
    wiper: float | None
    vctl: float | None
    r_cv: float | None
    c_cv: float | None
    c_decouple: float | None
    vcc: float | None
    load: str | None
    n_series: int
    n_parallel: int
    r_led: float | None
    r_gate: float | None
    v_load: float | None
    clamp: str
    v_zener: float | None
    mosfet_label: str
    notes: dict[str, tuple[str, ...]] = field(default_factory=dict)
    #: part-family labels written beside the symbols
    diode_part: str = "signal diode"
    timer_part: str = "555-type"
    mosfet_part: str = "N-MOSFET"
    freewheel_part: str = "freewheel diode"

    @property
    def shared_supply(self) -> bool:
        """True when the load hangs from the timer supply rail."""
        if self.v_load is None:
            return True
        return self.vcc is not None and abs(self.v_load - self.vcc) <= 1e-9 * max(abs(self.vcc), 1.0)


def _scalar(value: Any, name: str, unit: str, *, minimum: float | None = 0.0, min_inclusive: bool = False,
            maximum: float | None = None) -> float:
    q = quantity(value, name, unit=unit, minimum=minimum, min_inclusive=min_inclusive, maximum=maximum)
    if isinstance(q, np.ndarray):
        raise DesignError(f"{name}: an array of shape {q.shape} was given; a schematic shows one value, give a scalar")
    return float(q)


def _optional(value: Any, name: str, unit: str, **kw: Any) -> float | None:
    return None if value is None else _scalar(value, name, unit, **kw)


def _count(value: Any, name: str, maximum: int) -> int:
    ok = not isinstance(value, bool) and (
        isinstance(value, (int, np.integer)) or (isinstance(value, (float, np.floating)) and float(value).is_integer())
    )
    if not ok or not 1 <= int(value) <= maximum:
        raise DesignError(f"{name}: {value!r} is not allowed; give a whole number from 1 to {maximum}")
    return int(value)


def clean_text(value: Any, name: str, max_len: int = 60) -> str:
    """Short single-line printable text, or ``DesignError``."""
    if not isinstance(value, str):
        raise DesignError(f"{name}: {type(value).__name__} is not text; give a short string")
    text = value.strip()
    if not text or len(text) > max_len or any(unicodedata.category(ch).startswith("C") for ch in text):
        raise DesignError(
            f"{name}: {value!r} is not allowed; give 1 to {max_len} printable characters on one line"
        )
    return text


def _notes(annotations: Any) -> dict[str, tuple[str, ...]]:
    out: dict[str, list[str]] = {"charge": [], "discharge": [], "general": []}
    if annotations is None:
        return {k: () for k in out}
    if not isinstance(annotations, Mapping):
        raise DesignError(f"annotations: {type(annotations).__name__} is not allowed; give a dict such as "
                          "{'t_high': 1.39e-3, 't_low': 0.69e-3}")
    for key, value in annotations.items():
        if not isinstance(key, str):
            raise DesignError(f"annotations: key {key!r} is not text")
        where, shown, unit = ANNOTATION_KEYS.get(key, ("general", key, ""))
        if isinstance(value, str):
            text = f"{shown} {clean_text(value, f'annotations[{key!r}]')}"
        elif key not in ANNOTATION_KEYS:
            raise DesignError(
                f"annotations[{key!r}]: a number needs a known key ({', '.join(ANNOTATION_KEYS)}); "
                "for anything else give the text to show"
            )
        elif unit == "%":
            x = _scalar(value, f"annotations[{key!r}]", "", minimum=0.0, min_inclusive=True, maximum=1.0)
            text = f"{shown} {100.0 * x:.3g} %"
        else:
            x = _scalar(value, f"annotations[{key!r}]", unit, minimum=0.0, min_inclusive=True)
            text = f"{shown} {format_value(x, unit)}"
        clean_text(shown, f"annotations key {key!r}", max_len=30)
        out[where].append(text)
    return {k: tuple(v) for k, v in out.items()}


def make_spec(topology: Any, *, ra: Any, rb: Any, c: Any, pot: Any, wiper: Any, vctl: Any, r_cv: Any, c_cv: Any,
              c_decouple: Any, vcc: Any, load: Any, n_series: Any, n_parallel: Any, r_led: Any, r_gate: Any,
              v_load: Any, clamp: Any, v_zener: Any, mosfet_label: Any, annotations: Any,
              diode_part: Any = "signal diode", timer_part: Any = "555-type", mosfet_part: Any = "N-MOSFET",
              freewheel_part: Any = "freewheel diode") -> Spec:
    """Check every input of :func:`pwmkit.schematic.draw` (see there)."""
    from ..timing.paths import TOPOLOGIES

    if not isinstance(topology, str) or topology not in TOPOLOGIES:
        raise DesignError(f"topology: {topology!r} is not known; allowed: {', '.join(TOPOLOGIES)}")
    if topology == "pot":
        if pot is None or wiper is None:
            raise DesignError("pot, wiper: the 'pot' topology needs both the potentiometer value (pot, Ω) "
                              "and the wiper position (wiper, 0–1)")
        pot_v: float | None = _scalar(pot, "pot", "Ω")
        wiper_v: float | None = _scalar(wiper, "wiper", "", minimum=0.0, min_inclusive=True, maximum=1.0)
    else:
        if pot is not None or wiper is not None:
            raise DesignError(f"pot, wiper: only the 'pot' topology uses a potentiometer; got pot={pot!r}, "
                              f"wiper={wiper!r} with topology {topology!r}")
        pot_v = wiper_v = None
    if load not in LOADS:
        raise DesignError(f"load: {load!r} is not known; allowed: None, 'led', 'motor'")
    if clamp not in CLAMPS:
        raise DesignError(f"clamp: {clamp!r} is not known; allowed: 'diode', 'zener'")
    r_led_v = _optional(r_led, "r_led", "Ω", minimum=0.0, min_inclusive=True)
    if load == "led" and r_led_v is None:
        raise DesignError("r_led: the 'led' load needs the series resistor value (r_led, Ω); give 0 when the "
                          "LED module limits its own current")
    v_zener_v = _optional(v_zener, "v_zener", "V")
    if v_zener_v is not None and not (load == "motor" and clamp == "zener"):
        raise DesignError(f"v_zener: {v_zener!r} was given but only load='motor' with clamp='zener' has a Zener")
    return Spec(
        topology=topology,
        ra=_scalar(ra, "ra", "Ω"),
        rb=_scalar(rb, "rb", "Ω", minimum=0.0, min_inclusive=True),
        c=_scalar(c, "c", "F"),
        pot=pot_v,
        wiper=wiper_v,
        vctl=_optional(vctl, "vctl", "V"),
        r_cv=_optional(r_cv, "r_cv", "Ω"),
        c_cv=_optional(c_cv, "c_cv", "F"),
        c_decouple=_optional(c_decouple, "c_decouple", "F"),
        vcc=_optional(vcc, "vcc", "V"),
        load=load,
        n_series=_count(n_series, "n_series", 200),
        n_parallel=_count(n_parallel, "n_parallel", 100),
        r_led=r_led_v,
        r_gate=_optional(r_gate, "r_gate", "Ω", minimum=0.0, min_inclusive=True),
        v_load=_optional(v_load, "v_load", "V"),
        clamp=clamp,
        v_zener=v_zener_v,
        mosfet_label=clean_text(mosfet_label, "mosfet_label", max_len=24),
        notes=_notes(annotations),
        diode_part=clean_text(diode_part, "diode_part", max_len=40),
        timer_part=clean_text(timer_part, "timer_part", max_len=40),
        mosfet_part=clean_text(mosfet_part, "mosfet_part", max_len=40),
        freewheel_part=clean_text(freewheel_part, "freewheel_part", max_len=40),
    )
