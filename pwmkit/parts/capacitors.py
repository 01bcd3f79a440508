"""Capacitor dielectric families as data: initial tolerance, temperature behaviour, usable range.

A timing capacitor's value moves with its initial tolerance and with temperature; how much depends on
the dielectric far more than on the maker. The figures below are generic figures of the trade, each
with an origin tag in :attr:`Dielectric.origin`:

``"eia-code"``
    the meaning of the EIA temperature-characteristic code letters (C0G: 0 ± 30 ppm/K;
    X7R: ±15 % over −55…+125 °C) — recalled, widely reproduced in makers' catalogues (from memory);
``"common-practice"``
    a general fact of the trade with no single authoritative source;
``"from-memory"``
    recalled, not confirmed against a data sheet — treat with care;
``"model-choice"``
    how pwmkit turns a bound into a model (said in the field's docstring).

Temperature behaviour is an *envelope*: at each temperature the relative change ΔC/C lies between a
low and a high bound. Linear dielectrics give a slope with a spread (``tempco_ppm_per_k`` ±
``tempco_spread_ppm_per_k``); the others give a table of ``(t_c, low, high)`` rows interpolated
linearly. Capacitance is taken as exact at the reference temperature 25 °C apart from the initial
tolerance.

References
----------
.. [1] EIA-198 / IEC 60384-8 and -9 temperature-characteristic codes for ceramic capacitors, as
   reproduced in makers' catalogues (from memory; the standards themselves were not read).
.. [2] first-order sensitivity of T = R·C·ln(…), common practice (capacitor tolerances, common practice).
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass, field
from types import MappingProxyType
from typing import Any

import numpy as np

from .._validate import quantity
from ..errors import DesignError

__all__ = ["Dielectric", "C0G", "X7R", "FILM_PET", "FILM_PP", "ALUMINIUM_ELECTROLYTIC", "DIELECTRICS",
           "TIMING_PREFERENCE", "get_dielectric", "suggest_dielectric"]

#: Temperature at which a capacitor's nominal value and initial tolerance apply [°C].
T_REFERENCE_C = 25.0


@dataclass(frozen=True)
class Dielectric:
    """A capacitor dielectric family (generic figures, never one maker's part).

    Attributes
    ----------
    name : str
        Registry key, e.g. ``"C0G"``.
    description : str
        Plain-language description.
    tolerance : float
        Typical initial tolerance, half-width as a fraction of nominal [1].
    tolerance_asym : (float, float)
        Initial tolerance band (low, high) as fractions, e.g. (−0.2, 0.2) [1].
    tempco_ppm_per_k : float or None
        Nominal temperature coefficient for linear dielectrics [ppm/K]; None when the
        behaviour is given by ``temperature_table``.
    tempco_spread_ppm_per_k : float
        Half-width of the temperature-coefficient band around ``tempco_ppm_per_k`` [ppm/K].
    temperature_table : tuple of (t_c, low, high)
        Envelope of the relative change ΔC/C versus temperature [°C, 1, 1]; empty for
        linear dielectrics.
    t_range_c : (float, float)
        Rated temperature range [°C].
    c_range : (float, float)
        Usable capacitance range (min, max) of generally available parts [F].
    dc_bias_note, leakage_note, notes : str
        Plain-language remarks for reports.
    origin : Mapping[str, str]
        Origin tag per field.
    """

    name: str
    description: str
    tolerance: float
    tolerance_asym: tuple[float, float]
    tempco_ppm_per_k: float | None
    tempco_spread_ppm_per_k: float
    temperature_table: tuple[tuple[float, float, float], ...]
    t_range_c: tuple[float, float]
    c_range: tuple[float, float]
    dc_bias_note: str
    leakage_note: str
    notes: str = ""
    origin: Mapping[str, str] = field(default_factory=dict, compare=False, repr=False)

    def __post_init__(self) -> None:
        lo, hi = self.tolerance_asym
        if not (-1.0 < lo <= 0.0 <= hi):
            raise DesignError(f"tolerance_asym: {self.tolerance_asym!r} is not allowed; need -1 < low <= 0 <= high")
        if not (0.0 < self.c_range[0] < self.c_range[1]):
            raise DesignError(f"c_range: {self.c_range!r} is not allowed; need 0 < min < max [F]")
        if (self.tempco_ppm_per_k is None) == (len(self.temperature_table) == 0):
            raise DesignError("tempco_ppm_per_k, temperature_table: give exactly one of them")
        if self.temperature_table:
            temps = [row[0] for row in self.temperature_table]
            if temps != sorted(temps) or any(row[1] > row[2] for row in self.temperature_table):
                raise DesignError("temperature_table: rows must be (t_c, low, high) with rising t_c and low <= high")
        object.__setattr__(self, "origin", MappingProxyType(dict(self.origin)))

    def covers(self, c: Any) -> Any:
        """True where the capacitance lies in the usable range of this dielectric [F → bool]."""
        c = np.asarray(c, dtype=float)
        ok = (c >= self.c_range[0] * (1 - 1e-9)) & (c <= self.c_range[1] * (1 + 1e-9))
        return bool(ok) if ok.ndim == 0 else ok

    def temperature_envelope(self, t_c: Any) -> tuple[Any, Any]:
        """Envelope (low, high) of the relative change ΔC/C at temperature ``t_c``.

        .. math:: \\frac{\\Delta C}{C} \\in [\\,low(T),\\ high(T)\\,]

        Linear dielectrics: ``(T − 25 °C)·(tempco ± spread)·1e-6``; the others interpolate
        ``temperature_table`` linearly.

        Parameters
        ----------
        t_c : float or array_like
            Capacitor temperature within :attr:`t_range_c` [°C].

        Returns
        -------
        (low, high) : floats or arrays
            Relative change bounds [1].

        Raises
        ------
        DesignError
            Temperature outside the rated range.

        Examples
        --------
        >>> lo, hi = C0G.temperature_envelope(85.0)
        >>> round(lo * 1e6), round(hi * 1e6)      # ±30 ppm/K × 60 K
        (-1800, 1800)
        """
        lo_t, hi_t = self.t_range_c
        t = quantity(t_c, "t_ambient_c", unit="°C", minimum=lo_t, maximum=hi_t)
        t_arr = np.asarray(t, dtype=float)
        if self.tempco_ppm_per_k is not None:
            a = (t_arr - T_REFERENCE_C) * (self.tempco_ppm_per_k - self.tempco_spread_ppm_per_k) * 1e-6
            b = (t_arr - T_REFERENCE_C) * (self.tempco_ppm_per_k + self.tempco_spread_ppm_per_k) * 1e-6
            low, high = np.minimum(a, b), np.maximum(a, b)
        else:
            table = np.asarray(self.temperature_table, dtype=float)
            low = np.interp(t_arr, table[:, 0], table[:, 1])
            high = np.interp(t_arr, table[:, 0], table[:, 2])
        if t_arr.ndim == 0:
            return float(low), float(high)
        return low, high

    def temperature_band(self, t_min_c: float, t_max_c: float) -> tuple[float, float]:
        """Widest relative change over an ambient range: (min low, max high) [1].

        The envelope is piecewise linear, so its extremes lie at the range ends or at table rows
        (and 25 °C) inside the range.
        """
        t_min_c = float(quantity(t_min_c, "t_ambient_c", unit="°C"))
        t_max_c = float(quantity(t_max_c, "t_ambient_c", unit="°C"))
        if t_min_c > t_max_c:
            raise DesignError(f"t_ambient_c: {t_min_c:g} … {t_max_c:g} °C; the low end must not exceed the high end")
        inner = [row[0] for row in self.temperature_table] + [T_REFERENCE_C]
        points = np.array([t_min_c, t_max_c] + [t for t in inner if t_min_c < t < t_max_c])
        low, high = self.temperature_envelope(points)
        return float(np.min(low)), float(np.max(high))

    def __repr__(self) -> str:
        lo, hi = self.tolerance_asym
        temp = (f"{self.tempco_ppm_per_k:+g} ± {self.tempco_spread_ppm_per_k:g} ppm/K"
                if self.tempco_ppm_per_k is not None else "tabulated temperature envelope")
        return (f"Dielectric({self.name!r}: tolerance {100 * lo:+g}/{100 * hi:+g} %, {temp}, "
                f"{self.c_range[0]:.3g}…{self.c_range[1]:.3g} F)")

    def _repr_html_(self) -> str:
        from ..values import format_value

        lo, hi = self.tolerance_asym
        temp = (f"{self.tempco_ppm_per_k:+g} ± {self.tempco_spread_ppm_per_k:g} ppm/K"
                if self.tempco_ppm_per_k is not None else
                ", ".join(f"{t:g} °C: {100 * a:+.1f}…{100 * b:+.1f} %" for t, a, b in self.temperature_table))
        rows = [
            ("initial tolerance", f"{100 * lo:+g} / {100 * hi:+g} %", self.origin.get("tolerance", "")),
            ("temperature", temp, self.origin.get("temperature", "")),
            ("rated range", f"{self.t_range_c[0]:g} … {self.t_range_c[1]:g} °C", self.origin.get("t_range_c", "")),
            ("usable values", f"{format_value(self.c_range[0], 'F')} … {format_value(self.c_range[1], 'F')}",
             self.origin.get("c_range", "")),
            ("DC bias", self.dc_bias_note, ""),
            ("leakage", self.leakage_note, ""),
        ]
        from ..origins import origin_text

        body = "".join(f"<tr><th style='text-align:left'>{a}</th><td>{origin_text(b)}</td><td>{origin_text(c)}</td></tr>"
                       for a, b, c in rows)
        return f"<table><caption>dielectric {self.name} — {self.description}</caption>{body}</table>"


C0G = Dielectric(
    name="C0G",
    description="class 1 ceramic (C0G/NP0)",
    tolerance=0.05,
    tolerance_asym=(-0.05, 0.05),
    tempco_ppm_per_k=0.0,
    tempco_spread_ppm_per_k=30.0,
    temperature_table=(),
    t_range_c=(-55.0, 125.0),
    c_range=(1e-12, 100e-9),
    dc_bias_note="no measurable loss with DC bias",
    leakage_note="negligible (insulation resistance far above 10 GΩ)",
    notes="the timing capacitor of choice up to some 10 nF; ±1 % and ±2 % parts are common",
    origin={"tolerance": "common-practice", "temperature": "eia-code", "t_range_c": "eia-code",
            "c_range": "from-memory"},
)

X7R = Dielectric(
    name="X7R",
    description="class 2 ceramic (X7R)",
    tolerance=0.10,
    tolerance_asym=(-0.10, 0.10),
    tempco_ppm_per_k=None,
    tempco_spread_ppm_per_k=0.0,
    # EIA code: |ΔC/C| <= 15 % anywhere in −55…+125 °C. Model choice: the bound is reached at the
    # range ends and grows linearly with |T − 25 °C| (real curves are part-dependent).
    temperature_table=((-55.0, -0.15, 0.15), (25.0, 0.0, 0.0), (125.0, -0.15, 0.15)),
    t_range_c=(-55.0, 125.0),
    c_range=(100e-12, 22e-6),
    dc_bias_note="loses capacitance with applied DC, tens of per cent near the rated voltage in small cases",
    leakage_note="low (insulation resistance of order 100 MΩ·µF or more)",
    notes="ages by roughly 1–2 % per decade of hours after manufacture (from memory); poor for timing",
    origin={"tolerance": "common-practice", "temperature": "eia-code (+ model-choice envelope)",
            "t_range_c": "eia-code", "c_range": "from-memory"},
)

FILM_PET = Dielectric(
    name="film-PET",
    description="polyester (PET) film",
    tolerance=0.05,
    tolerance_asym=(-0.05, 0.05),
    tempco_ppm_per_k=400.0,
    tempco_spread_ppm_per_k=200.0,
    temperature_table=(),
    t_range_c=(-55.0, 105.0),
    c_range=(1e-9, 10e-6),
    dc_bias_note="no significant loss with DC bias",
    leakage_note="very low",
    notes="positive temperature coefficient; ±10 % parts are also common",
    origin={"tolerance": "common-practice", "temperature": "from-memory", "t_range_c": "from-memory",
            "c_range": "from-memory"},
)

FILM_PP = Dielectric(
    name="film-PP",
    description="polypropylene (PP) film",
    tolerance=0.05,
    tolerance_asym=(-0.05, 0.05),
    tempco_ppm_per_k=-200.0,
    tempco_spread_ppm_per_k=100.0,
    temperature_table=(),
    t_range_c=(-55.0, 105.0),
    c_range=(100e-12, 10e-6),
    dc_bias_note="no significant loss with DC bias",
    leakage_note="very low",
    notes="stable and low-loss; larger than PET for the same value",
    origin={"tolerance": "common-practice", "temperature": "from-memory", "t_range_c": "from-memory",
            "c_range": "from-memory"},
)

ALUMINIUM_ELECTROLYTIC = Dielectric(
    name="electrolytic",
    description="aluminium electrolytic",
    tolerance=0.20,
    tolerance_asym=(-0.20, 0.20),
    tempco_ppm_per_k=None,
    tempco_spread_ppm_per_k=0.0,
    # Capacitance falls in the cold and rises a little when warm (from memory, typical curves).
    temperature_table=((-40.0, -0.25, 0.0), (-25.0, -0.15, 0.0), (0.0, -0.06, 0.0), (25.0, 0.0, 0.0),
                       (85.0, 0.0, 0.10), (105.0, 0.0, 0.15)),
    t_range_c=(-40.0, 105.0),
    c_range=(1e-6, 10e-3),
    dc_bias_note="polarised: needs a DC bias of the right sign; no ceramic-style loss",
    leakage_note="high: of order 0.01·C·V or 3 µA after a few minutes (from memory), "
                 "which shifts the timing with large resistors",
    notes="some types are −20/+80 %; timing accuracy poor — use only for very low frequencies",
    origin={"tolerance": "common-practice", "temperature": "from-memory", "t_range_c": "from-memory",
            "c_range": "from-memory"},
)

DIELECTRICS: dict[str, Dielectric] = {d.name.lower(): d for d in (C0G, X7R, FILM_PET, FILM_PP, ALUMINIUM_ELECTROLYTIC)}

_ALIASES = {"np0": "c0g", "film": "film-pet", "pet": "film-pet", "polyester": "film-pet", "pp": "film-pp",
            "polypropylene": "film-pp", "aluminium-electrolytic": "electrolytic",
            "aluminum-electrolytic": "electrolytic", "aluminium": "electrolytic", "aluminum": "electrolytic"}

#: Order in which :func:`suggest_dielectric` prefers dielectrics for a timing capacitor
#: (most stable first; common practice).
TIMING_PREFERENCE: tuple[str, ...] = ("c0g", "film-pp", "film-pet", "x7r", "electrolytic")


def get_dielectric(name: str | Dielectric) -> Dielectric:
    """Return a dielectric by name (case-insensitive; "NP0", "PET", "PP" … accepted) or pass one through."""
    if isinstance(name, Dielectric):
        return name
    if isinstance(name, str):
        key = name.strip().lower()
        key = _ALIASES.get(key, key)
        if key in DIELECTRICS:
            return DIELECTRICS[key]
    allowed = ", ".join(d.name for d in DIELECTRICS.values())
    raise DesignError(f"dielectric: {name!r} is not known; allowed: {allowed}")


def suggest_dielectric(c: float) -> Dielectric:
    """The most stable dielectric whose usable range holds ``c`` (order :data:`TIMING_PREFERENCE`).

    Examples
    --------
    >>> suggest_dielectric(4.7e-9).name, suggest_dielectric(470e-9).name, suggest_dielectric(47e-6).name
    ('C0G', 'film-PP', 'electrolytic')
    """
    value = float(quantity(c, "c", unit="F", minimum=0.0, min_inclusive=False))
    for key in TIMING_PREFERENCE:
        if DIELECTRICS[key].covers(value):
            return DIELECTRICS[key]
    lo = min(d.c_range[0] for d in DIELECTRICS.values())
    hi = max(d.c_range[1] for d in DIELECTRICS.values())
    raise DesignError(f"c: {value:g} F is outside every dielectric's usable range; allowed {lo:g} … {hi:g} F")
