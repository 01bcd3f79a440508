"""Perceived brightness of a PWM-dimmed LED: CIE 1976 lightness L*.

At a fixed peak current the light output of an LED is proportional to the duty cycle, so the
relative luminance of a dimmed source is ``Y/Yn = D``. The eye does not see that linearly; the CIE
1976 lightness scale L* is the usual engineering yardstick for "perceptually even" brightness:

.. math::

    L^* = 116\\, f(Y/Y_n) - 16, \\qquad
    f(t) = \\begin{cases} t^{1/3} & t > (6/29)^3 \\\\
                         \\dfrac{841}{108}\\, t + \\dfrac{4}{29} & t \\le (6/29)^3 \\end{cases}

so that below ``t = (6/29)^3 = 216/24389 ≈ 0.008856`` (L* ≤ 8) the scale is the straight line
``L* = (24389/27)·t ≈ 903.3·t``. Both branches meet at L* = 8 with equal value and slope.

Functions
---------
- :func:`lightness` and :func:`luminance_for_lightness` — the CIE formula and its exact inverse;
- :func:`even_duty_steps` — duty table for n perceptually even brightness steps;
- :func:`pot_taper_lightness` — duty and L* across the travel of a linear or log-taper pot.

Notes
-----
L* is defined for related (surface) colours relative to a reference white ``Yn``. Applying it to a
self-luminous, dimmed source with ``Yn`` = full brightness is an engineering approximation in
common use; a display gamma of about 2.2 or Stevens' power law are alternatives (common practice).

References
----------
CIE 15:2018 *Colorimetry*, 4th ed., section on the CIE 1976 L*a*b* space (section number from memory).
ISO/CIE 11664-4:2019 *Colorimetry — Part 4: CIE 1976 L*a*b* colour space*.
CIE International Lighting Vocabulary (CIE S 017), entry 17-23-076 "CIE 1976 lightness".
"""

from __future__ import annotations

import html
import math
from dataclasses import dataclass
from typing import Any, Literal

import numpy as np

from .._validate import is_scalar_input, quantity, scalar
from ..errors import DesignError

__all__ = [
    "LSTAR_EPSILON",
    "LSTAR_KAPPA",
    "lightness",
    "luminance_for_lightness",
    "DutySteps",
    "even_duty_steps",
    "PotTaper",
    "pot_taper_fraction",
    "pot_taper_lightness",
]

#: Break point of the two branches, ``(6/29)**3 = 216/24389`` (dimensionless Y/Yn).
LSTAR_EPSILON = 216.0 / 24389.0
#: Slope of the linear branch, ``(29/3)**3 = 24389/27`` (L* per unit Y/Yn).
LSTAR_KAPPA = 24389.0 / 27.0
_LSTAR_BREAK = 8.0  # L* at the break point: 116·(6/29) − 16 = 8 exactly

Taper = Literal["linear", "log", "log-segments", "reverse-log"]
_TAPERS = ("linear", "log", "log-segments", "reverse-log")


def lightness(y: Any) -> Any:
    """CIE 1976 lightness L* of a relative luminance Y/Yn.

    .. math::

        L^* = 116\\,(Y/Y_n)^{1/3} - 16 \\quad (Y/Y_n > 216/24389), \\qquad
        L^* = \\tfrac{24389}{27}\\,Y/Y_n \\quad \\text{otherwise}

    Parameters
    ----------
    y : float or array_like
        Relative luminance Y/Yn, 0 … 1; for a PWM-dimmed LED at fixed peak current this is the
        duty cycle [1].

    Returns
    -------
    float or numpy.ndarray
        Lightness L*, 0 … 100 [1].

    Raises
    ------
    DesignError
        If ``y`` is not a finite number in [0, 1].

    Notes
    -----
    The linear branch ``(841/108)·t + 4/29`` inside ``116·f − 16`` simplifies exactly to
    ``(24389/27)·t``. Worked values reproduced in the tests: Y/Yn = 0.18 → 49.496,
    0.5 → 76.069, 0.01 → 8.991.

    Examples
    --------
    >>> round(lightness(0.18), 3), round(lightness(0.5), 3), round(lightness(0.005), 4)
    (49.496, 76.069, 4.5165)

    References
    ----------
    CIE 15:2018 *Colorimetry*, 4th ed.; ISO/CIE 11664-4:2019, CIE 1976 L* formula.
    """
    t = quantity(y, "y (relative luminance Y/Yn)", minimum=0.0, maximum=1.0)
    arr = np.asarray(t, dtype=float)
    above = arr > LSTAR_EPSILON
    out = np.where(above, 116.0 * np.cbrt(arr) - 16.0, LSTAR_KAPPA * arr)
    return scalar(out) if is_scalar_input(t) else out


def luminance_for_lightness(lstar: Any) -> Any:
    """Relative luminance Y/Yn for a CIE 1976 lightness L* (exact inverse of :func:`lightness`).

    .. math::

        Y/Y_n = \\left(\\frac{L^* + 16}{116}\\right)^3 \\quad (L^* > 8), \\qquad
        Y/Y_n = \\tfrac{27}{24389}\\,L^* \\quad \\text{otherwise}

    Parameters
    ----------
    lstar : float or array_like
        Lightness L*, 0 … 100 [1].

    Returns
    -------
    float or numpy.ndarray
        Relative luminance Y/Yn, 0 … 1 — the duty cycle that gives this lightness at fixed peak
        current [1].

    Raises
    ------
    DesignError
        If ``lstar`` is not a finite number in [0, 100].

    Examples
    --------
    >>> round(luminance_for_lightness(50), 6), round(luminance_for_lightness(5), 6)
    (0.184187, 0.005535)

    References
    ----------
    CIE 15:2018 *Colorimetry*, 4th ed.; ISO/CIE 11664-4:2019 (inverse of the L* formula).
    """
    lv = quantity(lstar, "lstar (CIE 1976 lightness L*)", minimum=0.0, maximum=100.0)
    arr = np.asarray(lv, dtype=float)
    cube = ((arr + 16.0) / 116.0) ** 3
    out = np.where(arr > _LSTAR_BREAK, cube, arr / LSTAR_KAPPA)
    out = np.clip(out, 0.0, 1.0)  # 100 → 1.0 exactly; guards the last ulp only
    return scalar(out) if is_scalar_input(lv) else out


# --------------------------------------------------------------------------------------------
# result formatting


def _html_table(title: str, header: tuple[str, ...], rows: list[tuple[str, ...]]) -> str:
    head = "".join(f"<th>{html.escape(h)}</th>" for h in header)
    body = "".join("<tr>" + "".join(f"<td>{html.escape(c)}</td>" for c in r) + "</tr>" for r in rows)
    return f"<table><caption>{html.escape(title)}</caption><tr>{head}</tr>{body}</table>"


def _thin(n: int, limit: int = 21) -> list[int]:
    """Indices of at most ``limit`` rows spread over ``n`` (first and last always kept)."""
    if n <= limit:
        return list(range(n))
    return sorted({int(round(i)) for i in np.linspace(0, n - 1, limit)})


# --------------------------------------------------------------------------------------------
# perceptually even steps


@dataclass(frozen=True)
class DutySteps:
    """Duty table for perceptually even brightness steps (see :func:`even_duty_steps`).

    Attributes
    ----------
    step : numpy.ndarray
        Step number 1 … n [1].
    lstar : numpy.ndarray
        Target lightness L* of each step, evenly spaced [1].
    duty : numpy.ndarray
        Duty cycle giving that lightness at fixed peak current [1].
    min_duty_increment : float
        Smallest duty difference between neighbouring steps, including the first step up from
        zero duty (off) — the duty resolution the dimmer must offer [1].
    """

    step: np.ndarray
    lstar: np.ndarray
    duty: np.ndarray
    min_duty_increment: float

    def __repr__(self) -> str:
        pairs = ", ".join(f"{lv:.4g}:{d:.4g}" for lv, d in zip(self.lstar, self.duty))
        return f"DutySteps(n={len(self.step)}, L*:duty = {pairs}, min_duty_increment={self.min_duty_increment:.4g})"

    def _repr_html_(self) -> str:
        rows = [
            (str(int(self.step[i])), f"{self.lstar[i]:.2f}", f"{100.0 * self.duty[i]:.3f} %")
            for i in _thin(len(self.step))
        ]
        rows.append(("min. increment", "", f"{100.0 * self.min_duty_increment:.3f} %"))
        return _html_table("perceptually even duty steps (CIE 1976 L*)", ("step", "L*", "duty"), rows)


def even_duty_steps(n: int, lmin: Any = None, lmax: Any = 100.0) -> DutySteps:
    """Duty cycles for ``n`` perceptually even brightness steps (evenly spaced in CIE L*).

    .. math::

        L^*_k = L^*_{min} + (L^*_{max} - L^*_{min})\\,\\frac{k-1}{n-1}, \\qquad
        D_k = Y/Y_n(L^*_k), \\quad k = 1 \\ldots n

    Parameters
    ----------
    n : int
        Number of steps, 1 … 10000 [1].
    lmin : float, optional
        Lightness of the dimmest step [1]. Default ``lmax / n``, so that the steps continue the
        even spacing down to "off" (n = 10 gives L* = 10, 20 … 100).
    lmax : float
        Lightness of the brightest step, 0 < lmax ≤ 100 [1].

    Returns
    -------
    DutySteps
        Arrays ``step``, ``lstar``, ``duty`` and the scalar ``min_duty_increment`` [1].

    Raises
    ------
    DesignError
        For ``n`` not a whole number in 1 … 10000, or ``lmin`` outside 0 … ``lmax``.

    Notes
    -----
    Light output is taken as proportional to duty at fixed peak current (common practice). The
    first step is the hardest: with n = 10 the dimmest level needs 1.13 % duty, and a
    "half as bright" setting (L* = 50) needs only 18.4 % duty.

    Examples
    --------
    >>> s = even_duty_steps(10)
    >>> [round(float(d), 5) for d in s.duty[:3]]
    [0.01126, 0.02989, 0.06236]

    References
    ----------
    CIE 15:2018 *Colorimetry*, 4th ed.; ISO/CIE 11664-4:2019 (L* formula and its inverse).
    """
    if isinstance(n, bool) or not isinstance(n, (int, np.integer)) or not 1 <= int(n) <= 10_000:
        raise DesignError(f"n (number of steps): {n!r} is not allowed; give a whole number 1 … 10000")
    n = int(n)
    hi = quantity(lmax, "lmax (brightest L*)", minimum=0.0, maximum=100.0, min_inclusive=False)
    if not isinstance(hi, float):
        raise DesignError("lmax (brightest L*): give one number, not an array")
    lo = hi / n if lmin is None else quantity(lmin, "lmin (dimmest L*)", minimum=0.0, maximum=hi)
    if not isinstance(lo, float):
        raise DesignError("lmin (dimmest L*): give one number, not an array")
    lstar = np.array([hi]) if n == 1 else np.linspace(lo, hi, n)
    duty = np.asarray(luminance_for_lightness(lstar), dtype=float)
    increments = np.diff(np.concatenate(([0.0], duty)))
    positive = increments[increments > 0.0]
    min_inc = float(positive.min()) if positive.size else 0.0
    return DutySteps(step=np.arange(1, n + 1), lstar=lstar, duty=duty, min_duty_increment=min_inc)


# --------------------------------------------------------------------------------------------
# potentiometer tapers


def pot_taper_fraction(travel: Any, taper: Taper = "linear", half_travel: float = 0.10) -> Any:
    """Resistance fraction between the start terminal and the wiper of a pot at a given travel.

    .. math::

        \\text{linear: } g(x) = x, \\qquad
        \\text{log: } g(x) = \\frac{b^x - 1}{b - 1},\\; b = \\left(\\frac{1}{h} - 1\\right)^2,
        \\qquad \\text{reverse-log: } 1 - g_{log}(1 - x)

    and ``log-segments`` is two straight lines through (0, 0), (0.5, h), (1, 1).

    Parameters
    ----------
    travel : float or array_like
        Mechanical travel (rotation) 0 … 1 [1].
    taper : {"linear", "log", "log-segments", "reverse-log"}
        Resistance law. ``"log"`` is the audio ("A") taper modelled as an exponential through
        ``g(0.5) = half_travel``; ``"log-segments"`` approximates it by two linear segments, as
        many carbon-track audio pots are actually made (common practice).
    half_travel : float
        Resistance fraction at mid travel for the log tapers, 0.001 ≤ h < 0.5; the customary audio
        taper is 10 % (some parts 15 % or 20 %) (common practice) [1].

    Returns
    -------
    float or numpy.ndarray
        Resistance fraction g, 0 … 1 [1].

    Raises
    ------
    DesignError
        For an unknown taper, travel outside [0, 1] or half_travel outside [0.001, 0.5).

    Notes
    -----
    The exponential through the mid point follows from ``g(0.5) = 1/(√b + 1) = h``. With
    h = 10 %: b = 81, g(x) = (81^x − 1)/80. Real pots deviate from either model by the track
    tolerance (often ±20 %, common practice); treat the result as a sketch of the law.

    Examples
    --------
    >>> round(pot_taper_fraction(0.5, "log"), 6), round(pot_taper_fraction(0.75, "log-segments"), 3)
    (0.1, 0.55)
    """
    if taper not in _TAPERS:
        raise DesignError(f"taper: {taper!r} is not known; choose one of {', '.join(_TAPERS)}")
    x = quantity(travel, "travel (pot rotation)", minimum=0.0, maximum=1.0)
    h = quantity(half_travel, "half_travel (fraction at mid travel)", minimum=0.001, maximum=0.5,
                 max_inclusive=False)
    if not isinstance(h, float):
        raise DesignError("half_travel: give one number, not an array")
    arr = np.asarray(x, dtype=float)

    def log_law(u: np.ndarray) -> np.ndarray:
        b = (1.0 / h - 1.0) ** 2
        return np.expm1(u * math.log(b)) / (b - 1.0)

    if taper == "linear":
        g = arr.copy()
    elif taper == "log":
        g = log_law(arr)
    elif taper == "reverse-log":
        g = 1.0 - log_law(1.0 - arr)
    else:  # log-segments
        g = np.where(arr <= 0.5, 2.0 * h * arr, h + (1.0 - h) * 2.0 * (arr - 0.5))
    g = np.clip(g, 0.0, 1.0)
    return scalar(g) if is_scalar_input(x) else g


@dataclass(frozen=True)
class PotTaper:
    """Duty and lightness across the travel of a dimmer pot (see :func:`pot_taper_lightness`).

    Attributes
    ----------
    taper : str
        The resistance law used.
    travel : float or numpy.ndarray
        Mechanical travel 0 … 1 [1].
    fraction : float or numpy.ndarray
        Resistance fraction start-to-wiper [1].
    duty : float or numpy.ndarray
        Duty cycle [1].
    lstar : float or numpy.ndarray
        Resulting lightness L* [1].
    lstar_target : float or numpy.ndarray
        Lightness of a perceptually linear knob between the end points, ``L*(D_min) +
        (L*(D_max) − L*(D_min))·travel`` [1].
    lstar_error : float or numpy.ndarray
        ``lstar − lstar_target``; negative = dimmer than a perceptually linear knob [1].
    """

    taper: str
    travel: Any
    fraction: Any
    duty: Any
    lstar: Any
    lstar_target: Any
    lstar_error: Any

    def __repr__(self) -> str:
        err = np.abs(np.asarray(self.lstar_error))
        return (f"PotTaper(taper={self.taper!r}, points={err.size}, "
                f"duty {np.min(self.duty):.4g}…{np.max(self.duty):.4g}, "
                f"max |L* error| = {float(err.max()):.3g})")

    def _repr_html_(self) -> str:
        t, d, lv, e = (np.atleast_1d(np.asarray(v, dtype=float))
                       for v in (self.travel, self.duty, self.lstar, self.lstar_error))
        rows = [(f"{t[i]:.3f}", f"{100.0 * d[i]:.2f} %", f"{lv[i]:.1f}", f"{e[i]:+.1f}") for i in _thin(t.size)]
        return _html_table(f"dimmer pot, {self.taper} taper", ("travel", "duty", "L*", "L* − linear"), rows)


def pot_taper_lightness(
    wiper: Any,
    taper: Taper = "linear",
    *,
    half_travel: float = 0.10,
    duty_min: Any = 0.0,
    duty_max: Any = 1.0,
) -> PotTaper:
    """Duty cycle and perceived lightness a linear or log-taper pot gives across its travel.

    .. math::

        D(x) = D_{min} + (D_{max} - D_{min})\\, g(x), \\qquad L^*(x) = L^*(D(x))

    with ``g`` the taper law of :func:`pot_taper_fraction`.

    Parameters
    ----------
    wiper : float or array_like
        Mechanical travel of the pot, 0 … 1 [1].
    taper : {"linear", "log", "log-segments", "reverse-log"}
        Resistance law of the pot (see :func:`pot_taper_fraction`).
    half_travel : float
        Fraction at mid travel for the log tapers (default 10 %) [1].
    duty_min, duty_max : float
        Duty at the two ends of the travel, 0 ≤ duty_min < duty_max ≤ 1 [1].

    Returns
    -------
    PotTaper
        ``travel``, ``fraction``, ``duty``, ``lstar``, ``lstar_target``, ``lstar_error`` [1].

    Raises
    ------
    DesignError
        For travel or duties out of range, ``duty_min ≥ duty_max`` or an unknown taper.

    Notes
    -----
    The duty is linear in the resistance fraction. This is exact for the ideal pot-steered
    fixed-frequency astable, where ``D = (R1 + Pa)/(R1 + P)``: there ``duty_min = R1/(R1 + P)``
    and ``duty_max = 1``. Diode drops make the real law slightly non-linear — use
    :mod:`pwmkit.timing` for that. A 10 % log taper puts L* ≈ 38 at mid travel where a
    perceptually linear knob would give 50; a linear pot gives L* ≈ 76 there.

    Examples
    --------
    >>> p = pot_taper_lightness([0.0, 0.5, 1.0], "log")
    >>> [round(float(v), 2) for v in p.lstar]
    [0.0, 37.84, 100.0]
    """
    d0 = quantity(duty_min, "duty_min", minimum=0.0, maximum=1.0)
    d1 = quantity(duty_max, "duty_max", minimum=0.0, maximum=1.0)
    if not (isinstance(d0, float) and isinstance(d1, float)):
        raise DesignError("duty_min, duty_max: give one number each, not arrays")
    if not d0 < d1:
        raise DesignError(f"duty_min {d0:g} must be below duty_max {d1:g}")
    g = pot_taper_fraction(wiper, taper, half_travel)
    x = quantity(wiper, "wiper (pot travel)", minimum=0.0, maximum=1.0)
    duty = d0 + (d1 - d0) * np.asarray(g, dtype=float)
    duty = np.clip(duty, d0, d1)
    lstar = np.asarray(lightness(duty), dtype=float)
    l0, l1 = lightness(d0), lightness(d1)
    target = l0 + (l1 - l0) * np.asarray(x, dtype=float)
    if is_scalar_input(x):
        return PotTaper(taper, float(x), float(g), scalar(duty), scalar(lstar), scalar(target),
                        scalar(lstar - target))
    return PotTaper(taper, np.asarray(x, dtype=float), np.asarray(g, dtype=float), duty, lstar, target,
                    lstar - target)


# --------------------------------------------------------------------------------------------
# ``pwmkit.loads`` re-exports the function ``lightness`` under the same name as this submodule.
# Once the submodule has been imported, Python binds the *module* to ``pwmkit.loads.lightness``,
# which would hide the function. Making the module callable keeps ``pwmkit.loads.lightness(y)``
# working whichever of the two the attribute holds.
