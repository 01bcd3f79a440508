"""LED strings on a low-side PWM switch: series resistor, currents, powers and V_F spread.

Model: ``n_parallel`` strings of ``n_series`` LEDs (constant ``vf`` each), each with its own resistor,
returned to ground through one switch (``rds_on`` and/or a fixed drop ``v_switch``); light output ∝ D at
fixed peak current (common practice). Safety: see ``LedDrive.cautions`` and the note constants.

References
----------
E. F. Schubert, *Light-Emitting Diodes*, 2nd ed., CUP 2006, ch. 4 (from memory).
IEC 60115-1 (generic specification: rated dissipation, derating) and IEC 60115-8 (SMD), abstracts only.
IEC 62471:2006 *Photobiological safety of lamps and lamp systems*.
"""

from __future__ import annotations

import html
import math
from collections.abc import Mapping
from dataclasses import dataclass
from types import MappingProxyType
from typing import Any, Literal

import numpy as np

from .._validate import is_scalar_input, quantity, scalar
from ..errors import DesignError, ModelLimit

__all__ = ["LED_EYE_SAFETY_NOTE", "RESISTOR_HOT_NOTE", "RESISTOR_RATINGS", "TYPICAL_VF", "VfRange", "LedString",
           "LedDrive", "led_resistor", "led_current", "led_drive", "resistor_derating",
           "resistor_power_rating"]

#: Caution shown with bright LEDs (common practice).
LED_EYE_SAFETY_NOTE = ("Bright LEDs can harm the eyes: do not stare into them, diffuse or shield high-power and "
                       "blue/violet/UV parts, follow IEC 62471 photobiological safety guidance and the maker's risk "
                       "group; IR and UV parts look dim or invisible yet can hurt (common practice).")
#: Caution shown with resistors that dissipate a noticeable fraction of a watt (common practice).
RESISTOR_HOT_NOTE = ("A resistor dissipating a large part of its rating can run above 100 °C on its surface: keep it "
                     "clear of plastics, wiring and fingers, give it copper area and airflow (common practice).")
#: Common SMD/THT resistor power ratings at the rated ambient (common practice) [W].
RESISTOR_RATINGS: tuple[float, ...] = (1 / 16, 1 / 10, 1 / 8, 1 / 4, 1 / 2, 1.0, 2.0)

_EYE_SAFETY_LED_POWER = 0.2  # W per LED; mid-power LEDs start about here (our judgement)
_HOT_RESISTOR_POWER = 0.25  # W on-state (our judgement, common practice order of magnitude)
_SPREAD_CAUTION = 0.20  # relative current change for ±dvf (our judgement)


@dataclass(frozen=True)
class VfRange:
    """Typical (``typ``, ``min``, ``max`` [V]) forward voltage of an indicator LED colour at
    about 20 mA, its nominal ``wavelength`` [m] (V_F ≳ hc/(qλ), Schubert ch. 4) and the ``origin`` tag."""

    typ: float
    min: float
    max: float
    wavelength: float
    origin: str


_VF_ORIGIN = "common practice / from memory (indicator LEDs at about 20 mA)"
#: Typical V_F per LED colour (common practice / from memory): indicator LEDs at ~20 mA.
TYPICAL_VF: Mapping[str, VfRange] = MappingProxyType({
    "IR": VfRange(1.4, 1.2, 1.6, 940e-9, _VF_ORIGIN),
    "red": VfRange(2.0, 1.8, 2.2, 630e-9, _VF_ORIGIN),
    "amber": VfRange(2.1, 2.0, 2.2, 595e-9, _VF_ORIGIN),
    "yellow": VfRange(2.1, 2.0, 2.2, 590e-9, _VF_ORIGIN),
    "yellow-green": VfRange(2.2, 2.0, 2.4, 570e-9, _VF_ORIGIN),
    "green": VfRange(3.2, 2.8, 3.5, 525e-9, _VF_ORIGIN),
    "blue": VfRange(3.2, 3.0, 3.6, 465e-9, _VF_ORIGIN),
    "white": VfRange(3.2, 2.8, 3.6, 455e-9, _VF_ORIGIN + "; blue die + phosphor"),
    "UV": VfRange(3.5, 3.0, 4.4, 395e-9, _VF_ORIGIN),
})


def _ratio(num: Any, den: Any, what: str, scalar_in: bool = True) -> Any:
    """``num/den`` as float (scalar_in) or array; DesignError if it left the floating-point range."""
    with np.errstate(over="ignore", divide="ignore", invalid="ignore"):
        x = np.asarray(num, dtype=float) / np.asarray(den, dtype=float)
    if not np.all(np.isfinite(x)):
        raise DesignError(f"{what}: the inputs give a result outside the floating-point range")
    return float(x) if scalar_in else x


def _v(x: float) -> str:  # a number for an error message, with a true minus sign
    return f"{x:.4g}".replace("-", "−")


def _count(value: Any, name: str) -> Any:
    n = quantity(value, name, minimum=1.0)
    bad = (np.asarray(n) != np.round(n)) | (np.asarray(n) > 1e6)
    if np.any(bad):
        raise DesignError(f"{name}: {np.asarray(n).ravel()[np.argmax(bad.ravel())]:g} is not allowed; "
                          "give a whole number 1 … 1000000")
    return n


def _string_inputs(vsupply: Any, vf: Any, n_series: Any, v_switch: Any) -> tuple[Any, ...]:
    """Checked (vsupply, vf, n_series, v_switch, headroom); the headroom error shows the numbers."""
    vs = quantity(vsupply, "vsupply", unit="V", minimum=0.0, min_inclusive=False)
    v = quantity(vf, "vf (forward voltage per LED)", unit="V", minimum=0.0, min_inclusive=False)
    n = _count(n_series, "n_series")
    vsw = quantity(v_switch, "v_switch", unit="V", minimum=0.0)
    b_vs, b_v, b_n, b_sw = np.broadcast_arrays(*(np.asarray(a, dtype=float) for a in (vs, v, n, vsw)))
    with np.errstate(over="ignore"):
        head = b_vs - b_n * b_v - b_sw  # −inf on overflow: rejected below with the numbers
    if np.any(head <= 0.0):
        k = int(np.argmax((head <= 0.0).ravel()))
        vs_k, n_k, v_k, sw_k, h_k = (float(a.ravel()[k]) for a in (b_vs, b_n, b_v, b_sw, head))
        sw = f" − {_v(sw_k)} V" if sw_k else ""
        raise ModelLimit(
            f"{_v(vs_k)} V supply − {int(n_k)} × {_v(v_k)} V{sw} = {_v(h_k)} V leaves nothing for the "
            f"resistor; allowed: vsupply > n_series·vf + v_switch (fewer LEDs per string or a higher supply)")
    return vs, v, n, vsw, head


def led_resistor(vsupply: Any, vf: Any, n_series: Any, i_peak: Any, v_switch: Any = 0.0) -> Any:
    """Series resistor that sets the peak current of one LED string.

    .. math::

        R = \\frac{V_s - n\\,V_F - V_{sw}}{I_{pk}}

    Parameters
    ----------
    vsupply, vf : float or array_like
        Supply voltage and forward voltage of one LED at ``i_peak``, both > 0 [V].
    n_series : int or array_like
        LEDs in series, whole number ≥ 1 [1].
    i_peak : float or array_like
        Wanted current while the switch is on, > 0 [A].
    v_switch : float or array_like
        Drop across the switch while on, ≥ 0 (``I·R_DS(on)`` or V_CE(sat)) [V].

    Returns
    -------
    float or numpy.ndarray
        Resistance [Ω].

    Raises
    ------
    DesignError
        Out-of-range input, or ``vsupply − n_series·vf − v_switch ≤ 0`` (message shows the numbers).

    Examples
    --------
    >>> round(led_resistor(12.0, 3.1, 3, 0.020, v_switch=0.020 * 0.05), 2)
    134.95
    """
    i = quantity(i_peak, "i_peak", unit="A", minimum=0.0, min_inclusive=False)
    vs, v, n, vsw, head = _string_inputs(vsupply, vf, n_series, v_switch)
    return _ratio(head, i, "led_resistor", is_scalar_input(vs, v, n, i, vsw))


def led_current(vsupply: Any, vf: Any, n_series: Any, r_series: Any, rds_on: Any = 0.0,
                n_parallel: Any = 1, v_switch: Any = 0.0) -> Any:
    """Peak current of one string for a given series resistor, ``(V_s − nV_F − V_sw)/(R + p·R_DS(on))``.

    Parameters
    ----------
    vsupply, vf, n_series, v_switch : float or array_like
        As for :func:`led_resistor` [V], [V], [1], [V].
    r_series, rds_on : float or array_like
        Series resistor of each string, > 0; on-resistance of the shared switch, ≥ 0 [Ω].
    n_parallel : int or array_like
        Strings sharing the switch, ≥ 1 [1].

    Returns
    -------
    float or numpy.ndarray
        Peak current per string [A].

    Examples
    --------
    >>> round(led_current(12.0, 3.1, 3, 130.0, rds_on=0.05) * 1e3, 3)
    20.761
    """
    r = quantity(r_series, "r_series", unit="Ω", minimum=0.0, min_inclusive=False)
    rds = quantity(rds_on, "rds_on", unit="Ω", minimum=0.0)
    p = _count(n_parallel, "n_parallel")
    vs, v, n, vsw, head = _string_inputs(vsupply, vf, n_series, v_switch)
    den = np.asarray(r) + np.asarray(p) * np.asarray(rds)
    return _ratio(head, den, "led_current", is_scalar_input(vs, v, n, r, rds, p, vsw))


def resistor_derating(t_ambient_c: Any, t_rated_c: float = 70.0, t_max_c: float = 155.0) -> Any:
    """Fraction of a resistor's rated power allowed at an ambient temperature, linear derating.

    .. math:: k = \\min\\left(1, \\max\\left(0, \\frac{T_{max} - T}{T_{max} - T_{rated}}\\right)\\right)

    Parameters
    ----------
    t_ambient_c : float or array_like
        Ambient temperature around the resistor [°C].
    t_rated_c, t_max_c : float
        Rated ambient (full power; 70 °C for most thick film) and upper category temperature (zero
        power; 155 °C typical, 125 °C for some) [°C].

    Returns
    -------
    float or numpy.ndarray
        Derating factor 0 … 1 (IEC 60115-1 derating shape, abstract only; corners common practice) [1].

    Examples
    --------
    >>> resistor_derating(25.0), round(resistor_derating(112.5), 3), resistor_derating(160.0)
    (1.0, 0.5, 0.0)
    """
    t = quantity(t_ambient_c, "t_ambient_c", unit="°C", minimum=-273.15)
    tr = quantity(t_rated_c, "t_rated_c", unit="°C", minimum=-273.15)
    tm = quantity(t_max_c, "t_max_c", unit="°C", minimum=-273.15)
    if not (isinstance(tr, float) and isinstance(tm, float)) or not tr < tm:
        raise DesignError(f"t_rated_c {tr} °C must be a single number below t_max_c {tm} °C")
    out = np.clip((tm - np.asarray(t, dtype=float)) / (tm - tr), 0.0, 1.0)
    return scalar(out) if is_scalar_input(t) else out


def resistor_power_rating(power: Any, t_ambient_c: Any = 25.0, margin: Any = 0.5,
                          ratings: tuple[float, ...] = RESISTOR_RATINGS,
                          t_rated_c: float = 70.0, t_max_c: float = 155.0) -> float | None:
    """Smallest rating ``P_r`` in ``ratings`` with ``power ≤ margin·k(T)·P_r`` (k: :func:`resistor_derating`).

    Parameters
    ----------
    power : float
        Dissipation to carry, ≥ 0 [W].
    t_ambient_c, t_rated_c, t_max_c : float
        Ambient temperature and derating corners [°C].
    margin : float
        Usable fraction of the derated rating, (0, 1]; 0.5 = at most half the rating (common practice) [1].
    ratings : tuple of float
        Candidate ratings, default :data:`RESISTOR_RATINGS` [W].

    Returns
    -------
    float or None
        The rating [W]; ``None`` when no candidate suffices.

    Examples
    --------
    >>> resistor_power_rating(0.056), resistor_power_rating(0.056, t_ambient_c=100.0)
    (0.125, 0.25)
    """
    p = quantity(power, "power", unit="W", minimum=0.0)
    m = quantity(margin, "margin", minimum=0.0, maximum=1.0, min_inclusive=False)
    k = resistor_derating(t_ambient_c, t_rated_c, t_max_c)
    if not all(isinstance(v, float) for v in (p, m, k)):
        raise DesignError("power, margin, t_ambient_c: give single numbers")
    for rating in sorted(float(quantity(r, "ratings", unit="W", minimum=0.0, min_inclusive=False)) for r in ratings):
        if k > 0.0 and p <= m * k * rating:
            return rating
    return None


@dataclass(frozen=True)
class LedString:
    """``n_parallel`` strings of ``n_series`` LEDs with forward voltage ``vf`` [V] each, on one
    switch, each string with its own resistor; ``colour`` is a display name (optional)."""

    n_series: int
    vf: float
    n_parallel: int = 1
    colour: str | None = None

    def __post_init__(self) -> None:
        v = quantity(self.vf, "vf (forward voltage per LED)", unit="V", minimum=0.0, min_inclusive=False)
        if not isinstance(v, float) or not (self.colour is None or isinstance(self.colour, str)):
            raise DesignError(f"vf {self.vf!r}, colour {self.colour!r}: give one number and text (or None)")
        object.__setattr__(self, "vf", v)
        for name in ("n_series", "n_parallel"):
            object.__setattr__(self, name, int(_count(getattr(self, name), name)))

    @classmethod
    def typical(cls, colour: str, n_series: int, n_parallel: int = 1) -> LedString:
        """LEDs with the typical V_F of a colour from :data:`TYPICAL_VF`."""
        if colour not in TYPICAL_VF:
            raise DesignError(f"colour: {colour!r} is not in the table; choose one of {', '.join(TYPICAL_VF)}")
        return cls(n_series, TYPICAL_VF[colour].typ, n_parallel, colour)

    @property
    def v_string(self) -> float:
        """Forward voltage of one string, ``n_series·vf`` [V]."""
        return self.n_series * self.vf

    def drive(self, vsupply: Any, **kwargs: Any) -> LedDrive:
        """Analyse this arrangement with :func:`led_drive` (keywords are passed on)."""
        return led_drive(vsupply, self.vf, self.n_series, self.n_parallel, **kwargs)


@dataclass(frozen=True)
class LedDrive:
    """Result of :func:`led_drive`. Per string unless named ``_total``; ``_on`` = switch conducting,
    ``_avg`` = PWM average. Units V, Ω, A, W, °C or [1]; see :func:`led_drive` for each field."""

    vsupply: float
    vf: float
    n_series: int
    n_parallel: int
    duty: float
    rds_on: float
    v_switch: float
    headroom: float
    r_series: float
    i_peak: float
    i_peak_total: float
    i_avg: float
    i_avg_total: float
    i_rms: float
    i_rms_total: float
    p_resistor_on: float
    p_resistor_avg: float
    p_led_on: float
    p_led_avg: float
    p_leds_total_avg: float
    p_switch_avg: float
    p_supply_avg: float
    efficiency: float
    series: str
    r_preferred: float
    i_peak_preferred: float
    p_resistor_preferred_on: float
    p_resistor_preferred_avg: float
    resistor_rating: float | None
    rating_basis: str
    t_ambient_c: float
    dvf: float
    i_peak_at_vf_min: float
    i_peak_at_vf_max: float
    current_spread_plus: float
    current_spread_minus: float
    cautions: tuple[str, ...]

    def __repr__(self) -> str:
        rating = "none fits" if self.resistor_rating is None else f"{self.resistor_rating:g} W"
        return (f"LedDrive({self.n_parallel}×{self.n_series} LEDs at {self.vf:g} V from {self.vsupply:g} V, "
                f"R={self.r_series:.5g} Ω → I_pk={self.i_peak * 1e3:.4g} mA, D={self.duty:.4g}; "
                f"{self.series} {self.r_preferred:g} Ω → {self.i_peak_preferred * 1e3:.4g} mA, "
                f"P_R(on)={self.p_resistor_preferred_on * 1e3:.4g} mW, rating {rating}; "
                f"V_F ±{self.dvf:g} V → {self.current_spread_plus:+.1%}/{self.current_spread_minus:+.1%})")

    def _repr_html_(self) -> str:
        from ..values import format_value

        unit, skip = {"v": "V", "h": "V", "d": "V", "r": "Ω", "i": "A", "p": "W"}, ("duty", "t_ambient_c", "efficiency")
        rows = [("strings × LEDs, duty", f"{self.n_parallel} × {self.n_series}, {100 * self.duty:.4g} %")]
        rows += [(k, format_value(x, unit[k[0]], 4)) for k, x in vars(self).items()
                 if type(x) is float and k not in skip and k[0] in unit and k != "resistor_rating"]
        rows += [("efficiency (LED share of supply power)", f"{100 * self.efficiency:.3g} %"),
                 ("current spread at V_F ∓ dvf", f"{self.current_spread_plus:+.1%} / {self.current_spread_minus:+.1%}"),
                 (f"{self.series} resistor rating ({self.rating_basis}, {self.t_ambient_c:g} °C)",
                  "none fits — see cautions" if self.resistor_rating is None else f"{self.resistor_rating:g} W")]
        body = "".join(f"<tr><td>{html.escape(k)}</td><td>{html.escape(v)}</td></tr>" for k, v in rows)
        notes = "".join(f"<li>{html.escape(c)}</li>" for c in self.cautions)
        foot = f"<tr><td colspan='2'><ul>{notes}</ul></td></tr>" if notes else ""
        return f"<table><caption>LED drive</caption>{body}{foot}</table>"


def _preferred(r: float, series: str, rounding: str) -> float:
    from .. import eseries

    b = eseries.bracket(r, series)
    return float(eseries.nearest(r, series) if rounding == "nearest" else b.above if rounding == "up" else b.below)


def _cautions(head: float, dv: float, spread: tuple[float, float], p_led_on: float, p_r_max: float,
              basis_power: float, rating: float | None, t_amb: float, margin: Any) -> tuple[str, ...]:
    return tuple(text for cond, text in (
        (rating is None, f"No common rating up to {RESISTOR_RATINGS[-1]:g} W carries {basis_power:.3g} W at "
                         f"{t_amb:g} °C with a {margin:g} margin: use a larger resistor, split it, or a "
                         "constant-current driver (common practice)."),
        (p_r_max >= _HOT_RESISTOR_POWER, RESISTOR_HOT_NOTE),
        (max(spread[0], -spread[1]) > _SPREAD_CAUTION,
         f"Small headroom ({head:.3g} V): ±{dv:g} V of V_F per LED moves the current by {spread[0]:+.0%}/"
         f"{spread[1]:+.0%}; use fewer LEDs per string, a higher supply or a current regulator (common practice)."),
        (p_led_on >= _EYE_SAFETY_LED_POWER, LED_EYE_SAFETY_NOTE),
    ) if cond)


def led_drive(vsupply: Any, vf: Any, n_series: Any, n_parallel: Any = 1, *, r_series: Any = None,
              i_peak: Any = None, duty: Any = 1.0, rds_on: Any = 0.0, v_switch: Any = 0.0, series: str = "E24",
              rounding: Literal["nearest", "up", "down"] = "nearest", dvf: Any = 0.2, t_ambient_c: Any = 25.0,
              power_margin: Any = 0.5, rating_basis: Literal["on-state", "average"] = "on-state") -> LedDrive:
    """Currents, powers, preferred resistor, power rating and V_F sensitivity of an LED drive.

    .. math::

        I_{pk} = \\frac{V_s - n V_F - V_{sw}}{R + p R_{DS(on)}},\\quad
        P_R = I_{pk}^2 R \\;(\\text{on}),\\; D\\, I_{pk}^2 R \\;(\\text{avg}),\\quad
        I_{pk}(V_F \\pm \\Delta) = \\frac{\\max(0,\\, V_s - n (V_F \\pm \\Delta) - V_{sw})}{R + p R_{DS(on)}}

    Give exactly one of ``r_series`` (analyse a fitted resistor) or ``i_peak`` (design: the exact
    resistor for that current is analysed and a preferred value is suggested).

    Parameters
    ----------
    vsupply, vf, n_series, v_switch : float
        As for :func:`led_resistor` [V], [V], [1], [V].
    n_parallel, duty : float
        Strings sharing the switch, each with its own resistor; PWM duty cycle 0 … 1 [1].
    r_series, i_peak : float, optional
        Series resistor per string [Ω] or wanted peak current per string [A] — give one.
    rds_on : float
        Switch on-resistance, carrying the total current [Ω].
    series, rounding : str
        IEC 60063 series of the suggestion ("E12", "E24", "E96" …); ``"nearest"`` (log scale),
        ``"up"`` (current ≤ target) or ``"down"``.
    dvf : float
        V_F deviation per LED for the sensitivity, 0 ≤ dvf < vf; 0.2 V: generic assumption (from memory) [V].
    t_ambient_c, power_margin : float
        Resistor ambient [°C]; usable fraction of the derated rating (0.5 = 2× margin) [1].
    rating_basis : {"on-state", "average"}
        Rate for the on-state power (a dimmer can be turned fully on) or the PWM average (enough
        above ~100 Hz at a fixed duty, common practice).

    Returns
    -------
    LedDrive
        ``r_series`` [Ω], ``headroom`` [V]; ``i_peak``, ``i_avg``, ``i_rms`` and their ``_total``
        [A]; ``p_resistor_on``/``_avg``, ``p_led_on``/``_avg`` (per LED), ``p_leds_total_avg``,
        ``p_switch_avg``, ``p_supply_avg`` [W]; ``efficiency`` (LED share of supply power) [1];
        ``r_preferred`` [Ω], ``i_peak_preferred`` [A], ``p_resistor_preferred_on``/``_avg`` [W],
        ``resistor_rating`` [W] or ``None``; ``i_peak_at_vf_min``/``_max`` [A],
        ``current_spread_plus``/``_minus`` [1]; ``cautions`` (text).

    Raises
    ------
    DesignError
        Bad input; both/neither of ``r_series``/``i_peak``; supply too low; unreachable current.

    Notes
    -----
    The V_F sensitivity is exact for the constant-V_F model; as I ∝ headroom, the relative spread is
    ``± n·dvf / headroom`` whatever R is. At PWM frequencies of a few Hz check the resistor's
    pulse-load rating and working voltage too (common practice).

    Examples
    --------
    >>> d = led_drive(12.0, 3.1, 3, i_peak=0.020, rds_on=0.05, duty=0.5)
    >>> round(d.r_series, 2), d.r_preferred, round(d.i_peak_preferred * 1e3, 3), d.resistor_rating
    (134.95, 130.0, 20.761, 0.125)

    References
    ----------
    Common practice (module model); IEC 60063:2015; IEC 60115-1 (abstract); IEC 62471:2006.
    """
    vs, v, n, vsw, head = _string_inputs(vsupply, vf, n_series, v_switch)
    d, rds = quantity(duty, "duty", minimum=0.0, maximum=1.0), quantity(rds_on, "rds_on", unit="Ω", minimum=0.0)
    dv = quantity(dvf, "dvf (V_F deviation per LED)", unit="V", minimum=0.0)  # < vf, checked below
    t_amb, p = quantity(t_ambient_c, "t_ambient_c", unit="°C", minimum=-273.15), _count(n_parallel, "n_parallel")
    i_set = None if i_peak is None else quantity(i_peak, "i_peak", unit="A", minimum=0.0, min_inclusive=False)
    r = None if r_series is None else quantity(r_series, "r_series", unit="Ω", minimum=0.0, min_inclusive=False)
    for name, value in zip(("vsupply", "vf", "n_series", "v_switch", "duty", "rds_on", "dvf", "t_ambient_c",
                            "n_parallel", "i_peak", "r_series"), (vs, v, n, vsw, d, rds, dv, t_amb, p, i_set, r)):
        if value is not None and not isinstance(value, float):
            raise DesignError(f"{name}: led_drive analyses one design point; give a single number "
                              "(use led_resistor/led_current for sweeps)")
    n, p, head = int(n), int(p), float(head)
    if dv >= v:
        raise DesignError(f"dvf {dv:g} V must be smaller than vf {v:g} V")
    for name, option, allowed in (("rounding", rounding, ("nearest", "up", "down")),
                                  ("rating_basis", rating_basis, ("on-state", "average"))):
        if option not in allowed:
            raise DesignError(f"{name}: {option!r} is not known; allowed {', '.join(allowed)}")
    if (r is None) == (i_set is None):
        raise DesignError("give exactly one of r_series (to analyse a resistor) or i_peak (to design one)")
    r_sw = p * rds
    if i_set is not None:
        r = _ratio(head, i_set, "r_series") - r_sw
        if r <= 0.0:
            raise ModelLimit(
                f"i_peak {_v(i_set * 1e3)} mA cannot be reached: headroom {_v(head)} V over the shared switch "
                f"resistance {p} × {_v(rds)} Ω allows at most {_v(head / r_sw * 1e3)} mA per string")
    try:
        i = head / (r + r_sw)
        r_pref = _preferred(r, series, rounding)
        i_pref = head / (r_pref + r_sw)
        p_pref_on = i_pref**2 * r_pref
        basis_power = p_pref_on if rating_basis == "on-state" else d * p_pref_on
        rating = resistor_power_rating(basis_power, t_amb, power_margin)
        i_hi, i_lo = max(head + n * dv, 0.0) / (r + r_sw), max(head - n * dv, 0.0) / (r + r_sw)
        spread = (i_hi / i - 1.0, i_lo / i - 1.0)
        i_tot, p_led_on, p_r_on = p * i, v * i, i**2 * r
        result = LedDrive(
            vsupply=vs, vf=v, n_series=n, n_parallel=p, duty=d, rds_on=rds, v_switch=vsw, headroom=head,
            r_series=r, i_peak=i, i_peak_total=i_tot, i_avg=d * i, i_avg_total=d * i_tot,
            i_rms=math.sqrt(d) * i, i_rms_total=math.sqrt(d) * i_tot, p_resistor_on=p_r_on,
            p_resistor_avg=d * p_r_on, p_led_on=p_led_on, p_led_avg=d * p_led_on,
            p_leds_total_avg=n * p * d * p_led_on, p_switch_avg=d * (rds * i_tot**2 + vsw * i_tot),
            p_supply_avg=d * vs * i_tot, efficiency=n * v / vs, series=str(series).upper(), r_preferred=r_pref,
            i_peak_preferred=i_pref, p_resistor_preferred_on=p_pref_on, p_resistor_preferred_avg=d * p_pref_on,
            resistor_rating=rating, rating_basis=rating_basis, t_ambient_c=t_amb, dvf=dv,
            i_peak_at_vf_min=i_hi, i_peak_at_vf_max=i_lo, current_spread_plus=spread[0],
            current_spread_minus=spread[1],
            cautions=_cautions(head, dv, spread, p_led_on, max(p_pref_on, p_r_on), basis_power, rating, t_amb,
                               power_margin),
        )
    except (OverflowError, ZeroDivisionError):
        result = None
    if result is None or not all(math.isfinite(x) for x in vars(result).values() if isinstance(x, float)):
        raise DesignError("led_drive: the inputs give figures outside the floating-point range; check the units")
    return result
