"""Temporal light modulation of a PWM-dimmed LED and the IEEE Std 1789-2015 risk regions.

A low-side switched LED string gives a rectangular light waveform: full output for ``D·T`` and a
residual fraction ``r = L_min/L_max`` (usually 0) for the rest of the period:

.. math::

    \\text{Mod\\%} = 100\\,\\frac{L_{max} - L_{min}}{L_{max} + L_{min}} = 100\\,\\frac{1 - r}{1 + r},
    \\qquad FI = \\frac{A_1}{A_1 + A_2} = \\frac{D(1 - D)(1 - r)}{D + (1 - D)\\,r}

IEEE Std 1789-2015 recommends, against the modulation frequency f [Hz]:

===============================  ==============  =================  ===============
region                           f < 90 Hz       90 Hz ≤ f ≤ f_top  f > f_top
===============================  ==============  =================  ===============
RP1 low risk, f_top 1250 Hz      Mod% < 0.025·f  Mod% < 0.08·f      no restriction
RP2 no observable effect, 3 kHz  Mod% < 0.01·f   Mod% < 0.0333·f    no restriction
===============================  ==============  =================  ===============

Boundary convention (our decision; the standard writes a strict "<"): a modulation *equal* to a
limit fails that region; 90 Hz belongs to the upper band; 1250 Hz and 3000 Hz still belong to the
restricted band. So full on/off PWM (100 %) is low-risk only for f > 1250 Hz and has no observable
effect only for f > 3000 Hz (the slope 0.0333·f alone would reach 100 % at 3003 Hz; the band ends
first). Results never hold ``inf`` or ``NaN``: "no restriction" is ``None``.

References
----------
IEEE Std 1789-2015, *IEEE Recommended Practices for Modulating Current in High-Brightness LEDs for
Mitigating Health Risks to Viewers*, RP1/RP2 — coefficients from a secondary summary of the
standard's figure (from memory; primary text not read).
IES lighting definitions, "flicker index" and "percent flicker"; IEC 60050-845:2020, 845-22-094.
"""

from __future__ import annotations

import html
from dataclasses import dataclass
from typing import Any

import numpy as np

from .._validate import is_scalar_input, quantity, scalar
from ..errors import DesignError

__all__ = ["LOW_RISK", "NO_EFFECT", "FlickerRegion", "Ieee1789Limits", "PwmFlicker", "FlickerCurves",
           "percent_modulation", "flicker_index_pwm", "ieee1789_limits", "frequency_for_region", "flicker_class",
           "pwm_flicker", "ieee1789_curves"]


@dataclass(frozen=True)
class FlickerRegion:
    """One IEEE Std 1789-2015 boundary: ``Mod% < slope_low·f`` below ``f_step`` [Hz], ``Mod% <
    slope_high·f`` from ``f_step`` to ``f_top`` [Hz] inclusive, unrestricted above (slopes [%/Hz])."""

    name: str
    slope_low: float
    slope_high: float
    f_step: float
    f_top: float
    source: str

    def limit(self, frequency: Any) -> np.ndarray:
        """Limit [%] at each frequency [Hz]; ``inf`` above ``f_top`` (internal use only)."""
        f = np.asarray(frequency, dtype=float)
        return np.where(f < self.f_step, self.slope_low * f, np.where(f <= self.f_top, self.slope_high * f, np.inf))

    def threshold(self, modulation_percent: Any) -> np.ndarray:
        """Frequency [Hz] above which the modulation [%] lies in this region (at ``f_step`` itself
        too when the result equals it); finite because Mod% ≤ 100."""
        m = np.asarray(modulation_percent, dtype=float)
        below_step = m / self.slope_low
        return np.where(m <= 0.0, 0.0, np.where(
            below_step < self.f_step, below_step,
            np.where(m < self.slope_high * self.f_step, self.f_step, np.minimum(m / self.slope_high, self.f_top))))


_SOURCE = ("IEEE Std 1789-2015 recommended practices RP1/RP2 (coefficients as published in summaries of "
           "the standard; check the standard's text before relying on a boundary)")
#: RP1: low risk of flicker effects.
LOW_RISK = FlickerRegion("low-risk", 0.025, 0.08, 90.0, 1250.0, _SOURCE)
#: RP2: no observable effect level (NOEL).
NO_EFFECT = FlickerRegion("no-effect", 0.01, 0.0333, 90.0, 3000.0, _SOURCE)
_CLASSES = ("no-effect", "low-risk", "elevated")


def _html_table(title: str, rows: list[tuple[str, str]], note: str = _SOURCE) -> str:
    body = "".join(f"<tr><td>{html.escape(k)}</td><td>{html.escape(v)}</td></tr>" for k, v in rows)
    foot = f"<tr><td colspan='2'><small>{html.escape(note)}</small></td></tr>"
    return f"<table><caption>{html.escape(title)}</caption>{body}{foot}</table>"


def _pct(value: float | None) -> str:
    return "no restriction" if value is None else f"{value:.4g} %"


def _single(*values: Any) -> None:
    if not all(isinstance(v, float) for v in values):
        raise DesignError("give single numbers here; use flicker_class() or ieee1789_curves() for arrays")


def percent_modulation(l_max: Any, l_min: Any) -> Any:
    """Percent modulation (percent flicker) ``100·(L_max − L_min)/(L_max + L_min)`` of a light waveform.

    Parameters
    ----------
    l_max, l_min : float or array_like
        Highest and lowest light level in any common unit, 0 ≤ l_min ≤ l_max [any].

    Returns
    -------
    float or numpy.ndarray
        Modulation 0 … 100 [%]; a source dark throughout (both 0) counts as 0 % (nothing flickers).

    Raises
    ------
    DesignError
        For negative levels or ``l_min > l_max``.

    Examples
    --------
    >>> percent_modulation(1.0, 0.2), percent_modulation(1.0, 0.0)
    (66.66666666666667, 100.0)

    References
    ----------
    IEEE Std 1789-2015, modulation (%); IES lighting definitions, "percent flicker".
    """
    hi = quantity(l_max, "l_max (highest light level)", minimum=0.0)
    lo = quantity(l_min, "l_min (lowest light level)", minimum=0.0)
    h, lo_arr = np.broadcast_arrays(np.asarray(hi, dtype=float), np.asarray(lo, dtype=float))
    if np.any(lo_arr > h):
        i = int(np.argmax((lo_arr > h).ravel()))
        raise DesignError(f"l_min {lo_arr.ravel()[i]:g} exceeds l_max {h.ravel()[i]:g}; allowed 0 <= l_min <= l_max")
    ratio = np.divide(lo_arr, h, out=np.ones_like(h), where=h > 0.0)  # scaled by l_max: no overflow
    out = 100.0 * (1.0 - ratio) / (1.0 + ratio)
    return scalar(out) if is_scalar_input(hi, lo) else out


def flicker_index_pwm(duty: Any, ratio_min_max: Any = 0.0) -> Any:
    """Flicker index of a rectangular (PWM) light waveform, exact.

    .. math:: FI = \\frac{D(1 - D)(1 - r)}{D + (1 - D)\\,r}

    From ``FI = A1/(A1 + A2)``: the mean is ``m = D + (1 − D)r`` (units of L_max), the area above
    the mean is ``D(1 − m)`` per period and the total area ``m``.

    Parameters
    ----------
    duty : float or array_like
        Fraction of the period at full light, 0 … 1 [1].
    ratio_min_max : float or array_like
        Off-time light as a fraction of full light, ``r = L_min/L_max``, 0 … 1 [1].

    Returns
    -------
    float or numpy.ndarray
        Flicker index 0 … 1 [1]; ``1 − D`` for r = 0. A source dark throughout (D = 0, r = 0)
        counts as 0, although FI → 1 as D → 0+ (short flashes).

    Examples
    --------
    >>> flicker_index_pwm(0.25), round(flicker_index_pwm(0.5, 0.2), 4)
    (0.75, 0.3333)

    References
    ----------
    IES lighting definitions, "flicker index"; IEC 60050-845:2020 entry 845-22-094.
    """
    d = quantity(duty, "duty", minimum=0.0, maximum=1.0)
    r = quantity(ratio_min_max, "ratio_min_max (L_min/L_max)", minimum=0.0, maximum=1.0)
    da, ra = np.broadcast_arrays(np.asarray(d, dtype=float), np.asarray(r, dtype=float))
    mean = da + (1.0 - da) * ra
    out = np.where(mean > 0.0, da * (1.0 - da) * (1.0 - ra) / np.where(mean > 0.0, mean, 1.0), 0.0)
    out = np.clip(out, 0.0, 1.0)
    return scalar(out) if is_scalar_input(d, r) else out


@dataclass(frozen=True)
class Ieee1789Limits:
    """IEEE Std 1789-2015 limits at ``frequency`` [Hz]: ``low_risk_percent`` (RP1) and
    ``no_effect_percent`` (RP2) [%], ``None`` where there is no restriction."""

    frequency: float
    low_risk_percent: float | None
    no_effect_percent: float | None

    def _repr_html_(self) -> str:
        return _html_table("IEEE Std 1789-2015 limits", [
            ("frequency", f"{self.frequency:.5g} Hz"), ("low risk (RP1) below", _pct(self.low_risk_percent)),
            ("no observable effect (RP2) below", _pct(self.no_effect_percent))])


def ieee1789_limits(frequency: Any) -> Ieee1789Limits:
    """Modulation limits of IEEE Std 1789-2015 RP1 (low risk) and RP2 (no observable effect).

    .. math::

        \\text{RP1: } 0.025 f\\;(f < 90),\\; 0.08 f\\;(90 \\le f \\le 1250);\\quad
        \\text{RP2: } 0.01 f\\;(f < 90),\\; 0.0333 f\\;(90 \\le f \\le 3000);\\quad \\text{none above}

    Parameters
    ----------
    frequency : float
        Modulation (PWM) frequency, > 0 [Hz].

    Returns
    -------
    Ieee1789Limits
        ``low_risk_percent`` and ``no_effect_percent`` [%], ``None`` = no restriction.

    Raises
    ------
    DesignError
        For a frequency that is not one positive finite number.

    Examples
    --------
    >>> lim = ieee1789_limits(100.0)
    >>> round(lim.low_risk_percent, 3), round(lim.no_effect_percent, 3), ieee1789_limits(2e3).low_risk_percent
    (8.0, 3.33, None)

    References
    ----------
    IEEE Std 1789-2015, RP1/RP2 (coefficients from a secondary summary of the
    standard's figure; from memory).
    """
    f = quantity(frequency, "frequency", unit="Hz", minimum=0.0, min_inclusive=False)
    _single(f)
    lr, ne = float(LOW_RISK.limit(f)), float(NO_EFFECT.limit(f))
    return Ieee1789Limits(f, None if lr == np.inf else lr, None if ne == np.inf else ne)


def frequency_for_region(modulation_percent: Any, region: str = "no-effect") -> Any:
    """Frequency above which a modulation lies inside an IEEE Std 1789-2015 region.

    Parameters
    ----------
    modulation_percent : float or array_like
        Percent modulation 0 … 100 [%].
    region : {"no-effect", "low-risk"}
        RP2 (no observable effect) or RP1 (low risk).

    Returns
    -------
    float or numpy.ndarray
        Threshold [Hz]: every higher frequency is inside the region; at most 3000 Hz (no-effect)
        or 1250 Hz (low-risk); 0 for zero modulation.

    Examples
    --------
    >>> frequency_for_region(100.0, "low-risk"), frequency_for_region(100.0), frequency_for_region(2.0)
    (1250.0, 3000.0, 90.0)
    """
    m = quantity(modulation_percent, "modulation_percent", unit="%", minimum=0.0, maximum=100.0)
    if region not in ("no-effect", "low-risk"):
        raise DesignError(f"region: {region!r} is not known; choose 'no-effect' or 'low-risk'")
    out = (NO_EFFECT if region == "no-effect" else LOW_RISK).threshold(m)
    return scalar(out) if is_scalar_input(m) else out


def flicker_class(frequency: Any, modulation_percent: Any) -> Any:
    """Classify a modulation per IEEE Std 1789-2015: "no-effect", "low-risk" or "elevated".

    "no-effect": inside RP2 (no observable effect level); "low-risk": inside RP1 only;
    "elevated": outside RP1 (the standard recommends mitigation; not a proven hazard).

    Parameters
    ----------
    frequency : float or array_like
        Modulation frequency, > 0 [Hz].
    modulation_percent : float or array_like
        Percent modulation 0 … 100 [%].

    Returns
    -------
    str or numpy.ndarray
        A class name for scalar input; an array of str (broadcast shape) for array input.

    Raises
    ------
    DesignError
        For a non-positive frequency or a modulation outside [0, 100].

    Notes
    -----
    A modulation equal to a limit fails that region. Full on/off PWM: "elevated" up to 1250 Hz,
    "low-risk" above, "no-effect" only above 3000 Hz.

    Examples
    --------
    >>> flicker_class(500.0, 100.0), flicker_class(2000.0, 100.0), flicker_class(120.0, 3.0)
    ('elevated', 'low-risk', 'no-effect')

    References
    ----------
    IEEE Std 1789-2015, RP1/RP2 (coefficients from a secondary summary of the
    standard's figure; from memory).
    """
    f = quantity(frequency, "frequency", unit="Hz", minimum=0.0, min_inclusive=False)
    m = quantity(modulation_percent, "modulation_percent", unit="%", minimum=0.0, maximum=100.0)
    fa, ma = np.broadcast_arrays(np.asarray(f, dtype=float), np.asarray(m, dtype=float))
    out = np.where(ma < NO_EFFECT.limit(fa), _CLASSES[0], np.where(ma < LOW_RISK.limit(fa), _CLASSES[1], _CLASSES[2]))
    return str(out) if is_scalar_input(f, m) else out


@dataclass(frozen=True)
class PwmFlicker:
    """Flicker figures of PWM-dimmed light (see :func:`pwm_flicker` for the fields)."""

    frequency: float
    duty: float
    residual: float
    modulation_percent: float
    flicker_index: float
    classification: str
    low_risk_limit_percent: float | None
    no_effect_limit_percent: float | None
    frequency_for_low_risk: float
    frequency_for_no_effect: float

    def __repr__(self) -> str:
        return (f"PwmFlicker(f={self.frequency:.5g} Hz, D={self.duty:.4g}, Mod={self.modulation_percent:.4g} %, "
                f"FI={self.flicker_index:.4g}, {self.classification}; low-risk < {_pct(self.low_risk_limit_percent)}, "
                f"no-effect < {_pct(self.no_effect_limit_percent)}; no-effect above "
                f"{self.frequency_for_no_effect:.5g} Hz)")

    def _repr_html_(self) -> str:
        return _html_table("PWM light flicker", [
            ("frequency", f"{self.frequency:.5g} Hz"), ("duty", f"{100.0 * self.duty:.4g} %"),
            ("residual light (off/on)", f"{100.0 * self.residual:.4g} %"),
            ("percent modulation", f"{self.modulation_percent:.4g} %"), ("flicker index", f"{self.flicker_index:.4g}"),
            ("IEEE 1789 class", self.classification), ("low-risk limit here", _pct(self.low_risk_limit_percent)),
            ("no-effect limit here", _pct(self.no_effect_limit_percent)),
            ("low-risk above", f"{self.frequency_for_low_risk:.5g} Hz"),
            ("no observable effect above", f"{self.frequency_for_no_effect:.5g} Hz")])


def pwm_flicker(frequency: Any, duty: Any, residual: Any = 0.0) -> PwmFlicker:
    """Percent modulation, flicker index and IEEE Std 1789-2015 class of PWM-dimmed light.

    .. math::

        \\text{Mod\\%} = 100\\,\\frac{1 - r}{1 + r}\\;(0 < D < 1), \\qquad
        FI = \\frac{D(1 - D)(1 - r)}{D + (1 - D)\\,r}

    Parameters
    ----------
    frequency : float
        PWM frequency, > 0 [Hz].
    duty : float
        Duty cycle, 0 … 1 [1].
    residual : float
        Off-time light as a fraction of on-time light, 0 … 1 (0 for a plain low-side switch) [1].

    Returns
    -------
    PwmFlicker
        ``frequency`` [Hz], ``duty``, ``residual`` [1], ``modulation_percent`` [%],
        ``flicker_index`` [1], ``classification``, limits at this frequency
        ``low_risk_limit_percent``/``no_effect_limit_percent`` [%] (``None`` = no restriction) and
        ``frequency_for_low_risk``/``frequency_for_no_effect`` [Hz] (see :func:`frequency_for_region`).

    Raises
    ------
    DesignError
        For frequency ≤ 0, duty/residual outside [0, 1], or arrays.

    Notes
    -----
    Light is taken to follow the current instantly (phosphor persistence ignored — conservative).
    At D = 0 or 1, or r = 1, the light is steady: modulation and flicker index are 0.

    Examples
    --------
    >>> p = pwm_flicker(480.9, 0.5)
    >>> p.modulation_percent, p.flicker_index, p.classification, p.frequency_for_low_risk
    (100.0, 0.5, 'elevated', 1250.0)

    References
    ----------
    IEEE Std 1789-2015, RP1/RP2 (coefficients from a secondary summary of the
    standard's figure; from memory); IES lighting definitions, "flicker index".
    """
    f = quantity(frequency, "frequency", unit="Hz", minimum=0.0, min_inclusive=False)
    d = quantity(duty, "duty", minimum=0.0, maximum=1.0)
    r = quantity(residual, "residual (off/on light ratio)", minimum=0.0, maximum=1.0)
    _single(f, d, r)
    mod = 0.0 if d in (0.0, 1.0) else float(percent_modulation(1.0, r))
    limits = ieee1789_limits(f)
    return PwmFlicker(
        frequency=f, duty=d, residual=r, modulation_percent=mod, flicker_index=float(flicker_index_pwm(d, r)),
        classification=flicker_class(f, mod), low_risk_limit_percent=limits.low_risk_percent,
        no_effect_limit_percent=limits.no_effect_percent, frequency_for_low_risk=float(LOW_RISK.threshold(mod)),
        frequency_for_no_effect=float(NO_EFFECT.threshold(mod)))


@dataclass(frozen=True)
class FlickerCurves:
    """Vertices of the IEEE Std 1789-2015 boundaries for a flicker map: ``low_risk_frequency`` [Hz]
    with ``low_risk_percent`` [%], ``no_effect_frequency`` [Hz] with ``no_effect_percent`` [%];
    "no restriction" is drawn at ``cap_percent`` [%]. The limits are straight lines through the
    origin, hence straight between vertices on linear and on log–log axes."""

    low_risk_frequency: np.ndarray
    low_risk_percent: np.ndarray
    no_effect_frequency: np.ndarray
    no_effect_percent: np.ndarray
    cap_percent: float
    source: str

    def __repr__(self) -> str:
        return (f"FlickerCurves(low-risk {len(self.low_risk_frequency)} vertices, "
                f"no-effect {len(self.no_effect_frequency)} vertices, cap {self.cap_percent:g} %)")

    def _repr_html_(self) -> str:
        rows = [(f"{name} @ {f:.5g} Hz", f"{p:.4g} %") for name, fs, ps in (
            ("low-risk", self.low_risk_frequency, self.low_risk_percent),
            ("no-effect", self.no_effect_frequency, self.no_effect_percent)) for f, p in zip(fs, ps)]
        return _html_table("IEEE Std 1789-2015 boundary vertices", rows, self.source)


def _polyline(region: FlickerRegion, f_min: float, f_max: float, cap: float) -> tuple[np.ndarray, np.ndarray]:
    """Vertices of one boundary; at a band edge two vertices: the value just below, then just above."""
    pts: list[tuple[float, float]] = [(f_min, float(region.limit(f_min)))]
    if f_min < region.f_step < f_max:
        pts += [(region.f_step, region.slope_low * region.f_step), (region.f_step, region.slope_high * region.f_step)]
    if f_min < region.f_top < f_max:
        pts += [(region.f_top, region.slope_high * region.f_top), (region.f_top, np.inf)]
    pts.append((f_max, float(region.limit(f_max))))
    return np.array([v[0] for v in pts]), np.minimum(np.array([v[1] for v in pts]), cap)


def ieee1789_curves(f_min: Any = 1.0, f_max: Any = 10_000.0, cap_percent: Any = 100.0) -> FlickerCurves:
    """Boundary curves of IEEE Std 1789-2015 RP1/RP2 for plotting a flicker map.

    Parameters
    ----------
    f_min, f_max : float
        Frequency span, 0 < f_min < f_max [Hz].
    cap_percent : float
        Level drawn for "no restriction" and upper clip of the curves, > 0 (100 % is the largest
        possible modulation) [%].

    Returns
    -------
    FlickerCurves
        Vertex arrays ``low_risk_frequency``/``low_risk_percent`` and
        ``no_effect_frequency``/``no_effect_percent`` [Hz], [%], all finite.

    Examples
    --------
    >>> [round(float(v), 2) for v in ieee1789_curves(10.0, 1e4).low_risk_percent]
    [0.25, 2.25, 7.2, 100.0, 100.0, 100.0]

    References
    ----------
    IEEE Std 1789-2015, RP1/RP2 (coefficients from a secondary summary of the
    standard's figure; from memory).
    """
    lo = quantity(f_min, "f_min", unit="Hz", minimum=0.0, min_inclusive=False)
    hi = quantity(f_max, "f_max", unit="Hz", minimum=0.0, min_inclusive=False)
    cap = quantity(cap_percent, "cap_percent", unit="%", minimum=0.0, min_inclusive=False)
    _single(lo, hi, cap)
    if not lo < hi:
        raise DesignError(f"f_min {lo:g} Hz must be below f_max {hi:g} Hz")
    lf, lp = _polyline(LOW_RISK, lo, hi, cap)
    nf, npct = _polyline(NO_EFFECT, lo, hi, cap)
    return FlickerCurves(lf, lp, nf, npct, cap, _SOURCE)
