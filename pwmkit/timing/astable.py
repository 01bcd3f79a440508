"""Numeric evaluation of the exact astable timing.

:func:`astable` evaluates the sympy-derived closed forms
(:mod:`pwmkit.timing.symbolic`), written out as numpy code in the generated
module :mod:`pwmkit.timing._derived` (no sympy at run time; a test derives
them again and compares), broadcasting numpy arrays. Before evaluating, it checks that the
design oscillates: the charge asymptote must lie above the upper threshold
and the discharge asymptote below the lower one; otherwise a
:class:`~pwmkit.errors.DesignError` says why, in volts.
"""

from __future__ import annotations

import functools
import math
from dataclasses import dataclass
from typing import Any

import numpy as np

from ..errors import DesignError, ModelLimit
from ..parts.timers import TimerFamily, get_timer
from ..ranges import checked
from .paths import TOPOLOGIES, paths

__all__ = ["AstableResult", "astable", "astable_ideal", "default_vd", "control_voltage_from_divider"]


@dataclass(frozen=True)
class AstableResult:
    """Timing of a 555-type astable.

    Array results are read-only: inputs that were scalars stay broadcast views (no copies), and
    ``period``, ``frequency`` and ``duty`` are computed from ``t_high`` and ``t_low`` on first
    access, so a large array call holds little more than its two half-periods.

    Attributes
    ----------
    topology : str
    timer : str
        Timer family name.
    t_high : output-high time (capacitor charging) [s]
    t_low : output-low time (capacitor discharging) [s]
    period : t_high + t_low [s] (computed on first access)
    frequency : 1 / period [Hz] (computed on first access)
    duty : t_high / period, fraction 0–1 [1] (computed on first access)
    v_upper, v_lower : comparator thresholds [V]
    v_charge, v_discharge : asymptotes of the charge and discharge [V]
    r_charge, r_discharge : resistance of the charge and discharge paths [Ω]
    c : timing capacitance [F]
    vcc : supply [V]
    v_charge_change : bypass topology only (else None): capacitor voltage where the diode across
        ``rb`` stops conducting, clipped to the swing (``v_upper``: it conducts throughout) [V]
    r_charge_after : bypass only (else None): charge resistance after that point, ``ra + rb`` [Ω]
    """

    topology: str
    timer: str
    t_high: Any
    t_low: Any
    v_upper: Any
    v_lower: Any
    v_charge: Any
    v_discharge: Any
    r_charge: Any
    r_discharge: Any
    c: Any
    vcc: Any
    v_charge_change: Any = None
    r_charge_after: Any = None

    @functools.cached_property
    def period(self) -> Any:
        """t_high + t_low [s]."""
        return _derived_value(self.t_high + self.t_low)

    @functools.cached_property
    def frequency(self) -> Any:
        """1 / period [Hz]."""
        with np.errstate(all="ignore"):
            return _derived_value(1.0 / self.period)

    @functools.cached_property
    def duty(self) -> Any:
        """t_high / period, fraction 0–1 [1]."""
        with np.errstate(all="ignore"):
            return _derived_value(self.t_high / self.period)

    def to_dict(self) -> dict[str, Any]:
        """Every quantity by name, the derived ones included (arrays stay arrays)."""
        names = ("topology", "timer", "t_high", "t_low", "period", "frequency", "duty", "v_upper", "v_lower",
                 "v_charge", "v_discharge", "r_charge", "r_discharge", "c", "vcc")
        return {name: getattr(self, name) for name in names}

    def __repr__(self) -> str:
        if np.ndim(self.frequency) == 0:
            from ..values import format_value

            return (f"AstableResult({self.topology}, {self.timer}: f={format_value(self.frequency, 'Hz', 5)}, "
                    f"duty={100 * self.duty:.3f} %, t_high={format_value(self.t_high, 's', 5)}, "
                    f"t_low={format_value(self.t_low, 's', 5)})")
        return f"AstableResult({self.topology}, {self.timer}: arrays of shape {np.shape(self.frequency)})"

    def _repr_html_(self) -> str:
        from ..values import format_value

        if np.ndim(self.frequency) != 0:
            return f"<p>AstableResult over arrays of shape {np.shape(self.frequency)}</p>"
        rows = [
            ("frequency", format_value(self.frequency, "Hz", 5)),
            ("duty", f"{100 * self.duty:.3f} %"),
            ("t_high (charge)", format_value(self.t_high, "s", 5)),
            ("t_low (discharge)", format_value(self.t_low, "s", 5)),
            ("period", format_value(self.period, "s", 5)),
            ("upper / lower threshold", f"{format_value(self.v_upper, 'V', 4)} / {format_value(self.v_lower, 'V', 4)}"),
            ("charge toward", f"{format_value(self.v_charge, 'V', 4)} through {format_value(self.r_charge, 'Ω', 4)}"),
            ("discharge toward",
             f"{format_value(self.v_discharge, 'V', 4)} through {format_value(self.r_discharge, 'Ω', 4)}"),
        ]
        body = "".join(f"<tr><th style='text-align:left'>{k}</th><td>{v}</td></tr>" for k, v in rows)
        return (f"<table class='pwmkit-result'><caption>astable timing — {self.topology}, {self.timer} timer"
                f"</caption>{body}</table>")


def _derived_value(x: Any) -> Any:
    """A float for 0-d results, else the array made read-only."""
    if np.ndim(x) == 0:
        return float(x)
    x.flags.writeable = False
    return x


def _readonly(x: Any, shape: tuple[int, ...]) -> Any:
    """``x`` as a float (scalar call) or a read-only float array of ``shape`` (a view, never a copy)."""
    a = np.asarray(x, dtype=float)
    if not shape:
        return float(a)
    if a.shape != shape:
        return np.broadcast_to(a, shape)  # read-only view
    if a.flags.writeable:
        a = a.view()
        a.flags.writeable = False
    return a


@functools.lru_cache(maxsize=8)
def _signal_diode_drop(current: float) -> float:
    from ..parts.diodes import SMALL_SIGNAL_SILICON

    return float(SMALL_SIGNAL_SILICON.vf(current))


#: Current at which the default steering-diode drop is evaluated [A].
DEFAULT_VD_CURRENT = 1e-3


def default_vd() -> float:
    """Default steering-diode drop [V]: the generic small-signal silicon diode at 1 mA.

    Computed from the diode family's Shockley model
    (:data:`pwmkit.parts.diodes.SMALL_SIGNAL_SILICON`), about 0.61 V. Timing
    currents of a few hundred µA to a few mA are typical (common practice);
    :func:`pwmkit.timing.diode_law_timing` evaluates the drop at the actual
    current instead.
    """
    return _signal_diode_drop(DEFAULT_VD_CURRENT)


def control_voltage_from_divider(vcc: Any, r_ext: Any, timer: str | TimerFamily = "bipolar") -> Any:
    """Control-pin voltage when a resistor ``r_ext`` loads the pin to ground [V].

    The internal divider is three equal resistors ``r`` (bipolar family:
    5 kΩ, from memory). The pin sits at ``2·vcc/3`` behind ``r ∥ 2r``; with
    ``r_ext`` to ground:

    .. math:: V_{ctl} = V_{cc}\\,\\frac{2r \\parallel R_{ext}}{r + 2r \\parallel R_{ext}}

    Parameters
    ----------
    vcc : supply [V]
    r_ext : resistor from the control pin to ground [Ω]
    timer : timer family (needs a known divider value)

    Examples
    --------
    >>> round(control_voltage_from_divider(12.0, 10e3), 6)
    6.0
    """
    fam = get_timer(timer)
    if fam.r_cv_divider <= 0:
        raise DesignError(f"timer: the {fam.description} has no known internal divider value; "
                          "give the control voltage directly (vctl)")
    vcc = checked(vcc, "vcc")
    r_ext = checked(r_ext, "r_ext")
    r = fam.r_cv_divider
    lower = 2 * r * r_ext / (2 * r + r_ext)
    v = vcc * lower / (r + lower)
    return float(v) if np.ndim(v) == 0 else v


def _first_bad(mask: Any, *arrays: Any) -> list[float]:
    idx = int(np.argmax(np.broadcast_to(mask, np.broadcast(*arrays, mask).shape).ravel()))
    return [float(np.broadcast_to(a, np.broadcast(*arrays, mask).shape).ravel()[idx]) for a in arrays]


def _inputs(topology: str, ra: Any, rb: Any, c: Any, vcc: Any, pot: Any, wiper: Any, vd: Any, vsat: Any,
            r_on: Any, vctl: Any, timer: str | TimerFamily) -> dict[str, Any]:
    if not isinstance(topology, str) or topology not in TOPOLOGIES:
        raise DesignError(f"topology: {topology!r} is not known; allowed: {', '.join(TOPOLOGIES)}")
    fam = get_timer(timer)
    q: dict[str, Any] = {"timer": fam}
    q["ra"] = checked(ra, "ra")
    q["rb"] = checked(rb, "rb")
    q["c"] = checked(c, "c")
    q["vcc"] = checked(vcc, "vcc")
    if topology == "pot":
        if pot is None or wiper is None:
            raise DesignError("pot, wiper: the 'pot' topology needs both the potentiometer value (pot, Ω) "
                              "and the wiper position (wiper, 0–1)")
        q["pot"] = checked(pot, "pot")
        q["wiper"] = checked(wiper, "wiper")
    else:
        if pot is not None or wiper is not None:
            raise DesignError(f"pot, wiper: only the 'pot' topology uses a potentiometer; got pot={pot!r}, "
                              f"wiper={wiper!r} with topology {topology!r}")
        q["pot"], q["wiper"] = 0.0, 0.0
    if topology == "classic":
        q["vd"] = 0.0 if vd is None else checked(vd, "vd")
    else:
        q["vd"] = default_vd() if vd is None else checked(vd, "vd")
    q["vsat"] = fam.vsat if vsat is None else checked(vsat, "vsat")
    q["r_on"] = fam.r_discharge_on if r_on is None else checked(r_on, "r_on")
    if vctl is None:
        q["vctl"] = 2.0 * q["vcc"] / 3.0
    else:
        q["vctl"] = checked(vctl, "vctl")
    _check_shapes(q)
    return q


def _bypass_turn_off(q: dict[str, Any]) -> Any:
    """Capacitor voltage above which the bypass diode stops conducting during the charge [V].

    With a constant-drop diode across ``rb``, the diode carries current only while the current in
    ``ra``, ``(vcc − vd − v)/ra``, exceeds what ``rb`` alone carries at the diode's drop, ``vd/rb``;
    that holds below ``v_off = vcc − vd·(ra + rb)/rb`` (−∞ for ``rb = 0``: ``rb`` shorts the diode).
    Above ``v_off`` the capacitor charges through ``ra + rb`` toward ``vcc``.
    """
    with np.errstate(divide="ignore", invalid="ignore"):
        rb = np.asarray(q["rb"], dtype=float)
        v_off = np.where(rb > 0, q["vcc"] - q["vd"] * (q["ra"] + rb) / np.where(rb > 0, rb, 1.0), -np.inf)
    return v_off


def _bypass_t_high(q: dict[str, Any], t_high: Any) -> Any:
    """Charge time of the bypass topology where the diode stops conducting below the upper threshold [s]."""
    v_off = _bypass_turn_off(q)
    v_upper, v_lower = q["vctl"], q["vctl"] / 2.0
    if not np.any(v_off < v_upper):
        return t_high
    ra, rb, c, vcc, vd = q["ra"], q["rb"], q["c"], q["vcc"], q["vd"]
    with np.errstate(all="ignore"):
        v_x = np.clip(v_off, v_lower, v_upper)  # where the path changes, kept inside the swing
        # diode conducting from v_lower to v_x (toward vcc − vd through ra), then ra + rb toward vcc
        t1 = ra * c * np.log((vcc - vd - v_lower) / (vcc - vd - v_x))
        t1 = np.where(v_x > v_lower, t1, 0.0)
        t2 = (ra + rb) * c * np.log((vcc - v_x) / (vcc - v_upper))
        return np.where(v_off < v_upper, t1 + t2, t_high)


def _check_shapes(q: dict[str, Any]) -> None:
    """Array inputs must broadcast together; else a DesignError naming the fields and their shapes."""
    shaped = {k: np.shape(v) for k, v in q.items() if k != "timer" and np.ndim(v) > 0}
    if len(shaped) < 2:
        return
    try:
        np.broadcast_shapes(*shaped.values())
    except ValueError:
        listed = ", ".join(f"{k} {s}" for k, s in shaped.items())
        raise DesignError(f"{', '.join(shaped)}: array shapes {listed} do not broadcast together; give arrays "
                          "of one shape (or shapes numpy can broadcast, such as (n,) with (m, 1)) or scalars") from None


def _check_oscillates(topology: str, q: dict[str, Any], p: Any, v_lower: Any = None) -> None:
    v_upper = q["vctl"]
    v_lower = q["vctl"] / 2.0 if v_lower is None else v_lower
    v_charge = p.v_charge
    if topology == "bypass":  # the diode stops conducting: the last part of the charge heads for vcc
        v_charge = np.where(_bypass_turn_off(q) < v_upper, q["vcc"], p.v_charge)
    if not np.all(v_charge > v_upper):
        bad = np.logical_not(v_charge > v_upper)
        vch, vu, vcc, vd = _first_bad(bad, v_charge, v_upper, q["vcc"], q["vd"])
        what = f"supply {vcc:.4g} V" if topology == "classic" else f"supply {vcc:.4g} V minus diode drop {vd:.4g} V"
        raise ModelLimit(
            f"vcc: {what} = {vch:.4g} V cannot reach the upper threshold {vu:.4g} V; the capacitor stalls "
            f"below it and the output latches high. Raise vcc or lower vctl"
            + ("" if topology == "classic" else " (or use a lower-drop diode)")
        )
    if not np.all(p.v_discharge < v_lower):
        bad = np.logical_not(p.v_discharge < v_lower)
        vdis, vl = _first_bad(bad, p.v_discharge, v_lower)
        raise ModelLimit(
            f"vcc: the discharge path heads for {vdis:.4g} V (switch saturation/on-resistance"
            + ("" if topology in ("classic", "bypass") else " plus diode drop")
            + f"), which cannot fall to the lower threshold {vl:.4g} V; the output latches low. "
            "Raise vcc or vctl, or lower the discharge-path drops"
        )
    if not np.min(p.r_discharge) > 0:
        raise ModelLimit(
            "rb: the discharge path resistance is 0 Ω (rb = 0 with the wiper at the discharge end and an "
            "ideal discharge switch): the discharge pin would short the capacitor. Add an end resistor rb > 0"
        )


def astable(topology: str, *, ra: Any, rb: Any, c: Any, vcc: Any, pot: Any = None, wiper: Any = None,
            vd: Any = None, vsat: Any = None, vctl: Any = None, timer: str | TimerFamily = "bipolar",
            r_on: Any = None) -> AstableResult:
    """Exact steady-state timing of a 555-type astable.

    The half-periods come from the RC threshold-crossing law solved by sympy
    (:func:`pwmkit.timing.symbolic.expressions`):

    .. math::
        t_{high} = R_{ch} C \\ln\\frac{V_{ch} - V_L}{V_{ch} - V_H},\\qquad
        t_{low} = R_{dis} C \\ln\\frac{V_H - V_{dis}}{V_L - V_{dis}}

    with ``V_H = vctl``, ``V_L = vctl/2`` and each topology's path
    resistance and asymptote (see :mod:`pwmkit.timing.paths`).

    Parameters
    ----------
    topology : {"classic", "bypass", "steered", "pot"}
        Timing network; see :mod:`pwmkit.timing.paths`.
    ra : float, str or array_like
        Charge resistor (R1 of the pot topology), > 0 [Ω].
    rb : float, str or array_like
        Discharge resistor (end resistor of the pot topology), ≥ 0 [Ω].
    c : float, str or array_like
        Timing capacitor, > 0 [F].
    vcc : float, str or array_like
        Supply voltage, > 0 [V].
    pot : float, str or array_like, optional
        Potentiometer end-to-end resistance, "pot" topology only [Ω].
    wiper : float or array_like, optional
        Wiper position 0–1 (1 = all of the pot in the charge path), "pot" only [1].
    vd : float, str or array_like, optional
        Steering-diode drop [V]; default :func:`default_vd` (small-signal
        silicon diode at 1 mA); ignored by "classic".
    vsat : float, str or array_like, optional
        Discharge saturation voltage [V]; default from the timer family.
    vctl : float, str or array_like, optional
        Control-pin voltage = upper threshold [V]; default ``2·vcc/3``.
    timer : {"bipolar", "cmos"} or TimerFamily
        Timer family; sets the ``vsat`` and ``r_on`` defaults.
    r_on : float, str or array_like, optional
        Discharge switch on-resistance [Ω]; default from the timer family.

    Returns
    -------
    AstableResult
        Floats for scalar input, arrays (broadcast) for array input.

    Raises
    ------
    DesignError
        Bad input, or a design that does not oscillate (the message says why).

    Notes
    -----
    Bypass topology: the diode across ``rb`` conducts only while the charge current exceeds
    ``vd/rb``. Where it stops conducting below the upper threshold (small ``rb``, large ``vd``),
    the rest of the charge runs through ``ra + rb`` toward ``vcc`` and ``t_high`` is the sum of
    the two segments (the symbolic form covers the conducting segment); ``r_charge`` and
    ``v_charge`` describe the conducting diode.

    Steady state only (the first high time after power-up is longer: the
    capacitor starts from 0 V, see :func:`pwmkit.timing.waveform`).
    Comparator and flip-flop delays, threshold bias currents and capacitor
    leakage are not included; the design-rule checks estimate them.

    Examples
    --------
    >>> r = astable("classic", ra="10k", rb="10k", c="100n", vcc=12, vsat=0)
    >>> round(r.frequency, 3), round(r.duty, 5)
    (480.898, 0.66667)
    >>> r = astable("bypass", ra="10k", rb="10k", c="100n", vcc=12, vd=0.65, vsat=0.1)
    >>> round(r.t_high * 1e3, 6), round(r.frequency, 2)
    (0.78574, 670.41)

    References
    ----------
    .. [1] C. K. Alexander, M. N. O. Sadiku, *Fundamentals of Electric
       Circuits*, 6th ed., ch. 7 (RC step response).
    .. [2] Data sheets of the bipolar and CMOS 555-type timer families,
       astable operation (typical published datasheet values, generic).
    """
    q = _inputs(topology, ra, rb, c, vcc, pot, wiper, vd, vsat, r_on, vctl, timer)
    return _astable_core(topology, q)


def _astable_core(topology: str, q: dict[str, Any]) -> AstableResult:
    """:func:`astable` on values already read and checked by :func:`_inputs` (no re-validation)."""
    from ._derived import crossing_time

    p = paths(topology, ra=q["ra"], rb=q["rb"], pot=q["pot"], wiper=q["wiper"], vcc=q["vcc"], vd=q["vd"],
              vsat=q["vsat"], r_on=q["r_on"])
    v_upper, v_lower = q["vctl"], q["vctl"] / 2.0
    _check_oscillates(topology, q, p, v_lower)
    # each half-period is the sympy-solved crossing law on the topology's path: the closed forms of
    # symbolic.expressions() are exactly this composition (tests compare them)
    with np.errstate(all="ignore"):
        (t_high,) = crossing_time(p.r_charge, q["c"], p.v_charge, v_lower, v_upper)
        (t_low,) = crossing_time(p.r_discharge, q["c"], p.v_discharge, v_upper, v_lower)
        if topology == "bypass":  # the diode across rb may stop conducting inside the charge
            t_high = np.asarray(_bypass_t_high(q, t_high), dtype=float)
    shape = np.broadcast_shapes(*(np.shape(v) for k, v in q.items() if k != "timer"))
    # t_high, t_low >= 0 by construction, so finite half-periods whose smallest sum is well above zero
    # make period, frequency and duty finite too (four reductions, no temporary arrays)
    lows = float(np.min(t_high)) + float(np.min(t_low)) if np.size(t_high) and np.size(t_low) else 1.0
    highs = float(np.max(t_high)) + float(np.max(t_low)) if np.size(t_high) and np.size(t_low) else 1.0
    if not (math.isfinite(highs) and lows > 1e-300):
        raise ModelLimit("timing: the design gives a non-finite period (component values too extreme for "
                          "double precision); check the orders of magnitude of ra, rb, pot and c")
    fam = q["timer"]
    return AstableResult(
        topology=topology, timer=fam.name, t_high=_readonly(t_high, shape), t_low=_readonly(t_low, shape),
        v_upper=_readonly(q["vctl"], shape), v_lower=_readonly(v_lower, shape),
        v_charge=_readonly(p.v_charge, shape), v_discharge=_readonly(p.v_discharge, shape),
        r_charge=_readonly(p.r_charge, shape), r_discharge=_readonly(p.r_discharge, shape),
        c=_readonly(q["c"], shape), vcc=_readonly(q["vcc"], shape),
        v_charge_change=None if topology != "bypass" else _readonly(
            np.clip(_bypass_turn_off(q), v_lower, v_upper), shape),
        r_charge_after=None if topology != "bypass" else _readonly(q["ra"] + q["rb"], shape),
    )


def astable_ideal(topology: str, *, ra: Any, rb: Any, c: Any, vcc: Any = 12.0, pot: Any = None,
                  wiper: Any = None) -> AstableResult:
    """The textbook timing: ideal diodes and switch, internal divider (the ``ln 2 ≈ 0.693`` forms).

    Same derivation as :func:`astable` with ``vd = vsat = r_on = 0`` and
    ``vctl = 2·vcc/3``; the supply then cancels.

    Examples
    --------
    >>> r = astable_ideal("classic", ra=10e3, rb=10e3, c=100e-9)
    >>> round(r.t_high / ((10e3 + 10e3) * 100e-9), 6)   # ln 2 (common practice: 0.693)
    0.693147
    """
    return astable(topology, ra=ra, rb=rb, c=c, vcc=vcc, pot=pot, wiper=wiper, vd=0.0, vsat=0.0, r_on=0.0,
                   vctl=None)
