"""IEC 60063 preferred-number series (E3 … E192) for resistors and capacitors.

Each series divides a decade into N steps of nearly equal ratio 10**(1/N).  E3 … E24 have two
significant figures and are stored as the published tables, because eight E24 values (2.7, 3.0,
3.3, 3.6, 3.9, 4.3, 4.7, 8.2) do not follow rounding of 10**(i/24).  E48, E96 and E192 have three
significant figures and are generated: 10**(i/N) rounded half-up to three figures (in decimal
arithmetic, so no float rounding traps), with the one published exception E192 i = 185 → 9.20
(the rule gives 9.19).

Public functions take values in SI units (or engineering strings such as ``"4k7"``) and work on a
logarithmic scale across decades.

References
----------
IEC 60063:2015, *Preferred number series for resistors and capacitors*, Tables 1 and 2.
"""

from __future__ import annotations

import functools
import math
from dataclasses import dataclass
from decimal import ROUND_HALF_UP, Decimal, localcontext
from typing import Any

import numpy as np

from ._validate import quantity
from .errors import DesignError

__all__ = ["SERIES", "Bracket", "values", "nearest", "bracket", "in_range", "tolerance"]

SERIES = ("E3", "E6", "E12", "E24", "E48", "E96", "E192")

# IEC 60063:2015 Table 1 (two significant figures).
_E24 = (1.0, 1.1, 1.2, 1.3, 1.5, 1.6, 1.8, 2.0, 2.2, 2.4, 2.7, 3.0, 3.3, 3.6, 3.9, 4.3, 4.7, 5.1, 5.6, 6.2,
        6.8, 7.5, 8.2, 9.1)  # fmt: skip
_E12 = (1.0, 1.2, 1.5, 1.8, 2.2, 2.7, 3.3, 3.9, 4.7, 5.6, 6.8, 8.2)
_E6 = (1.0, 1.5, 2.2, 3.3, 4.7, 6.8)
_E3 = (1.0, 2.2, 4.7)
_TABLES = {"E3": _E3, "E6": _E6, "E12": _E12, "E24": _E24}

# IEC 60063:2015 Table 2: the one value where the published E192 differs from the rounding rule.
_E192_OVERRIDES = {185: Decimal("9.20")}

# Customary tolerance per series (common practice).  IEC 60063 links E3 with tolerances wider than
# ±20 %; ±20 % is used here as the nearest figure a design calculation can take.
_TOLERANCE = {"E3": 0.20, "E6": 0.20, "E12": 0.10, "E24": 0.05, "E48": 0.02, "E96": 0.01, "E192": 0.005}

_MAX_DECADES = 40
_ON_SERIES_RTOL = 1e-9


def _series_name(name: Any) -> str:
    if isinstance(name, str):
        key = name.strip().upper()
        if key in SERIES:
            return key
    allowed = ", ".join(SERIES)
    raise DesignError(f"series {name!r} is not known; allowed: {allowed} (case-insensitive)")


def _generated(n: int) -> tuple[float, ...]:
    """10**(i/n) rounded half-up to 3 significant figures, computed in 40-digit decimal arithmetic."""
    out = []
    with localcontext() as ctx:
        ctx.prec = 40
        for i in range(n):
            if n == 192 and i in _E192_OVERRIDES:
                out.append(float(_E192_OVERRIDES[i]))
                continue
            ideal = Decimal(10) ** (Decimal(i) / Decimal(n))
            out.append(float(ideal.quantize(Decimal("0.01"), rounding=ROUND_HALF_UP)))
    return tuple(out)


@functools.cache
def _mantissas(key: str) -> tuple[float, ...]:
    if key in _TABLES:
        return _TABLES[key]
    return _generated(int(key[1:]))


def values(name: str) -> tuple[float, ...]:
    """Mantissas of one decade of a preferred-number series.

    Parameters
    ----------
    name : str
        ``"E3"``, ``"E6"``, ``"E12"``, ``"E24"``, ``"E48"``, ``"E96"`` or ``"E192"`` (any case).

    Returns
    -------
    tuple of float
        The N values in [1, 10), ascending [1].

    Raises
    ------
    DesignError
        For an unknown series name.

    Notes
    -----
    E3 … E24 are the published two-figure tables; E48 … E192 follow the three-figure rounding rule
    with the published exception E192 9.20 (rule: 9.19).

    Examples
    --------
    >>> values("E12")
    (1.0, 1.2, 1.5, 1.8, 2.2, 2.7, 3.3, 3.9, 4.7, 5.6, 6.8, 8.2)
    >>> len(values("e96")), values("E96")[:4]
    (96, (1.0, 1.02, 1.05, 1.07))

    References
    ----------
    IEC 60063:2015, *Preferred number series for resistors and capacitors*, Tables 1 and 2.
    """
    return _mantissas(_series_name(name))


def tolerance(name: str) -> float:
    """Customary tolerance associated with a series, as a fraction.

    E3 0.20, E6 0.20, E12 0.10, E24 0.05, E48 0.02, E96 0.01, E192 0.005 (common practice).

    Parameters
    ----------
    name : str
        Series name (any case).

    Returns
    -------
    float
        Half-width of the customary tolerance band, fraction of nominal [1].

    Notes
    -----
    IEC 60063 associates E3 with tolerances wider than ±20 %; this function returns 0.20 for E3 as the
    tightest figure that series is meant for.  E192 parts also come in ±0.25 % and ±0.1 %.

    Examples
    --------
    >>> tolerance("E24"), tolerance("e96")
    (0.05, 0.01)

    References
    ----------
    IEC 60063:2015 (informative text on series and tolerance); common practice of the trade.
    """
    return _TOLERANCE[_series_name(name)]


def _decade_split(x: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Split positive x into mantissa m in [1, 10) and integer decade k, with x = m·10**k."""
    k = np.floor(np.log10(x))
    m = _scale(x, -k)
    # log10 can be off by one ulp near powers of ten; nudge back into [1, 10).
    low = m < 1.0
    k = np.where(low, k - 1, k)
    high = m >= 10.0
    k = np.where(high, k + 1, k)
    m = np.where(low | high, _scale(x, -k), m)
    return m, k


def _scale(x: np.ndarray, k: np.ndarray) -> np.ndarray:
    """x·10**k, multiplying or dividing by exact powers of ten (in two steps for huge |k|)."""
    k = np.asarray(k, dtype=float)
    half = np.trunc(k / 2)
    rest = k - half

    def times(v: np.ndarray, e: np.ndarray) -> np.ndarray:
        return np.where(e >= 0, v * 10.0 ** np.abs(e), v / 10.0 ** np.abs(e))

    with np.errstate(over="ignore", under="ignore"):
        return np.where(np.abs(k) <= 300, times(x, k), times(times(x, half), rest))


def _clean(mantissa: float, decade: float) -> float:
    """The decimal value mantissa·10**decade as the closest float (4700.0, not 4699.999…)."""
    value = float(f"{mantissa!r}e{int(decade)}")
    if not math.isfinite(value) or value == 0.0:
        raise DesignError(
            f"series value {mantissa!r}e{int(decade)} lies outside the float range; use a smaller x"
        )
    return value


def _positive(x: Any, name: str = "x") -> float | np.ndarray:
    return quantity(x, name, minimum=0.0, min_inclusive=False)


def _result(values_: np.ndarray, scalar_in: bool) -> float | np.ndarray:
    return float(values_.reshape(())) if scalar_in else values_


def nearest(x: Any, name: str) -> float | np.ndarray:
    """Series value nearest to ``x`` on a logarithmic scale.

    .. math:: \\hat x = \\arg\\min_{v \\in E_N \\cdot 10^k} |\\ln x - \\ln v|

    Parameters
    ----------
    x : float, str or array_like
        Positive value [any unit], e.g. a computed resistance [Ω] or ``"4k6"``.
    name : str
        Series name (any case).

    Returns
    -------
    float or numpy.ndarray
        The nearest series value in the same unit as ``x``; an array for array input [same unit].

    Raises
    ------
    DesignError
        For a non-positive, non-finite or unreadable ``x``, or an unknown series.

    Notes
    -----
    The search crosses decade edges (9.6 kΩ → 10 kΩ in E24).  At an exact geometric midpoint the
    lower value is returned.  Results are the decimal series values as the closest floats.

    Examples
    --------
    >>> nearest(4600, "E24"), nearest("9k6", "E24"), nearest(0.95, "E24")
    (4700.0, 10000.0, 0.91)

    References
    ----------
    IEC 60063:2015, *Preferred number series for resistors and capacitors*.
    """
    key = _series_name(name)
    xv = _positive(x)
    scalar_in = np.ndim(xv) == 0
    arr = np.asarray(xv, dtype=float)
    mant = np.asarray(_mantissas(key) + (10.0,))
    m, k = _decade_split(arr)
    distance = np.abs(np.log(m)[..., None] - np.log(mant))
    idx = np.argmin(distance, axis=-1)
    out = np.empty(arr.shape, dtype=float)
    for pos in np.ndindex(arr.shape):
        out[pos] = _clean(float(mant[idx[pos]]), k[pos])
    return _result(out, scalar_in)


@dataclass(frozen=True)
class Bracket:
    """The two series values around a value.

    Attributes
    ----------
    below : float or numpy.ndarray
        Largest series value ≤ x [same unit as x].
    above : float or numpy.ndarray
        Smallest series value ≥ x (equal to ``below`` when x is on the series) [same unit as x].
    """

    below: float | np.ndarray
    above: float | np.ndarray

    @property
    def on_series(self) -> bool | np.ndarray:
        """True where x itself is a series value."""
        eq = np.asarray(self.below) == np.asarray(self.above)
        return bool(eq) if eq.ndim == 0 else eq

    def __repr__(self) -> str:
        return f"Bracket(below={self.below!r}, above={self.above!r})"

    def _repr_html_(self) -> str:
        rows = "".join(
            f"<tr><th style='text-align:left'>{label}</th><td>{value}</td></tr>"
            for label, value in (("below", self.below), ("above", self.above))
        )
        return f"<table><caption>Bracket</caption>{rows}</table>"


def bracket(x: Any, name: str) -> Bracket:
    """The series values just below and just above ``x``.

    Parameters
    ----------
    x : float, str or array_like
        Positive value [any unit].
    name : str
        Series name (any case).

    Returns
    -------
    Bracket
        ``below`` ≤ x ≤ ``above``; both equal ``x`` when x lies on the series (within a relative
        1e-9, to absorb binary noise such as 4.699999999e3) [same unit as x].

    Raises
    ------
    DesignError
        For a non-positive, non-finite or unreadable ``x``, or an unknown series.

    Examples
    --------
    >>> bracket(4600, "E24")
    Bracket(below=4300.0, above=4700.0)
    >>> bracket("4k7", "E12")
    Bracket(below=4700.0, above=4700.0)

    References
    ----------
    IEC 60063:2015, *Preferred number series for resistors and capacitors*.
    """
    key = _series_name(name)
    xv = _positive(x)
    scalar_in = np.ndim(xv) == 0
    arr = np.asarray(xv, dtype=float)
    mant = np.asarray(_mantissas(key) + (10.0,))
    m, k = _decade_split(arr)
    below = np.empty(arr.shape, dtype=float)
    above = np.empty(arr.shape, dtype=float)
    for pos in np.ndindex(arr.shape):
        mi = float(m[pos])
        close = np.nonzero(np.abs(mant - mi) <= _ON_SERIES_RTOL * mant)[0]
        if close.size:
            lo_i = hi_i = int(close[0])
        else:
            hi_i = int(np.searchsorted(mant, mi))  # mant[hi_i-1] < mi < mant[hi_i]; mi >= 1 so hi_i >= 1
            lo_i = hi_i - 1
        below[pos] = _clean(float(mant[lo_i]), k[pos])
        above[pos] = _clean(float(mant[hi_i]), k[pos])
    return Bracket(below=_result(below, scalar_in), above=_result(above, scalar_in))


def in_range(lo: Any, hi: Any, name: str) -> tuple[float, ...]:
    """All series values in the closed interval [lo, hi], ascending.

    Parameters
    ----------
    lo, hi : float or str
        Positive bounds with lo ≤ hi [any unit, the same for both].
    name : str
        Series name (any case).

    Returns
    -------
    tuple of float
        Series values v with lo ≤ v ≤ hi (ends included within a relative 1e-9) [same unit].

    Raises
    ------
    DesignError
        For non-positive or unreadable bounds, lo > hi, a span of more than 40 decades, or an unknown
        series.

    Examples
    --------
    >>> in_range(1000, 2000, "E12")
    (1000.0, 1200.0, 1500.0, 1800.0)
    >>> in_range("8k", "12k", "E24")
    (8200.0, 9100.0, 10000.0, 11000.0, 12000.0)

    References
    ----------
    IEC 60063:2015, *Preferred number series for resistors and capacitors*.
    """
    key = _series_name(name)
    low = quantity(lo, "lo", minimum=0.0, min_inclusive=False)
    high = quantity(hi, "hi", minimum=0.0, min_inclusive=False)
    if np.ndim(low) or np.ndim(high):
        raise DesignError("in_range: lo and hi must be single values, not arrays")
    low, high = float(low), float(high)
    if low > high:
        raise DesignError(f"in_range: lo {low:g} is above hi {high:g}; allowed lo <= hi")
    k_lo = math.floor(math.log10(low)) - 1
    k_hi = math.floor(math.log10(high)) + 1
    if k_hi - k_lo > _MAX_DECADES:
        raise DesignError(
            f"in_range: {low:g} … {high:g} spans {k_hi - k_lo - 2} decades; allowed at most {_MAX_DECADES - 2}"
        )
    mant = _mantissas(key)
    out = []
    for k in range(k_lo, k_hi + 1):
        for v in mant:
            value = _clean(v, k)
            if low * (1 - _ON_SERIES_RTOL) <= value <= high * (1 + _ON_SERIES_RTOL):
                out.append(value)
    return tuple(out)
