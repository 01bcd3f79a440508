"""Numeric evaluation of the monostable and the control-pin drive of a 555-type timer.

:func:`monostable` evaluates the sympy-derived pulse width
(:mod:`pwmkit.timing.monostable_symbolic`) as written out in the generated module
:mod:`pwmkit.timing._derived` (no sympy at run time; see :mod:`pwmkit.timing.generate`);
:func:`control_pin_drive` gives the control-pin voltage when a source with an internal resistance
(a thermistor divider, an op-amp, another circuit) works against the timer's internal divider;
:func:`control_pin_sweep` is the single-timer control-pin modulation of an astable (frequency and
duty both move).
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

import numpy as np

from .._validate import quantity
from ..errors import DesignError
from ..parts.timers import TimerFamily, get_timer

__all__ = ["MonostableResult", "monostable", "ControlPinDrive", "control_pin_drive", "ControlPinSweep",
           "control_pin_sweep", "discharge_resistance", "start_level"]


def _html_table(caption: str, rows: list[tuple[str, str]]) -> str:
    """A small two-column HTML table for notebook displays (escaped)."""
    import html

    body = "".join(f"<tr><th style='text-align:left'>{html.escape(k)}</th><td>{html.escape(v)}</td></tr>"
                   for k, v in rows)
    return f"<table class='pwmkit-result'><caption>{html.escape(caption)}</caption>{body}</table>"


def _out(x: Any, shape: tuple[int, ...]) -> Any:
    x = np.asarray(x, dtype=float)
    if not shape and x.ndim == 0:
        return float(x)
    return np.array(np.broadcast_to(x, shape))


@dataclass(frozen=True)
class MonostableResult:
    """Pulse of a 555-type monostable.

    Attributes
    ----------
    timer : timer family name
    width : output pulse width [s]
    v_start : capacitor level at the trigger (start level) [V]
    v_threshold : upper threshold = control-pin voltage [V]
    v_trigger : trigger level = half the control-pin voltage [V]
    r, c : timing resistor [Ω] and capacitor [F]
    vcc : supply [V]
    """

    timer: str
    width: Any
    v_start: Any
    v_threshold: Any
    v_trigger: Any
    r: Any
    c: Any
    vcc: Any

    def __repr__(self) -> str:
        if np.ndim(self.width) == 0:
            from ..values import format_value

            return (f"MonostableResult({self.timer}: width={format_value(self.width, 's', 5)}, "
                    f"start {self.v_start:.4g} V → threshold {self.v_threshold:.4g} V)")
        return f"MonostableResult({self.timer}: arrays of shape {np.shape(self.width)})"

    def _repr_html_(self) -> str:
        from ..values import format_value as fv

        if np.ndim(self.width) != 0:
            return f"<p>MonostableResult over arrays of shape {np.shape(self.width)}</p>"
        return _html_table(f"monostable pulse — {self.timer} timer", [
            ("pulse width", fv(self.width, "s", 5)), ("start level", fv(self.v_start, "V", 4)),
            ("threshold (control pin)", fv(self.v_threshold, "V", 4)), ("trigger level", fv(self.v_trigger, "V", 4)),
            ("timing R / C", f"{fv(self.r, 'Ω', 4)} / {fv(self.c, 'F', 4)}")])


def discharge_resistance(timer: str | TimerFamily) -> float:
    """Resistance of the discharge switch used for the capacitor's recovery [Ω].

    CMOS families: the on-resistance ``r_discharge_on``. Bipolar families (modelled as a
    saturation voltage): the saturation voltage at its test current read as a resistance,
    ``vsat / vsat_test_current`` (model choice, 10 Ω for the generic bipolar part).
    """
    fam = get_timer(timer)
    if fam.r_discharge_on > 0:
        return fam.r_discharge_on
    return fam.vsat / fam.vsat_test_current


def start_level(r: Any, vcc: Any, timer: str | TimerFamily) -> Any:
    """Capacitor level with the discharge switch on (the monostable's rest level) [V].

    Bipolar families: the saturation voltage ``vsat``. CMOS families: ``R_M`` and the switch
    on-resistance divide the supply, ``vcc·r_on/(r + r_on)``.
    """
    fam = get_timer(timer)
    if fam.r_discharge_on > 0:
        return vcc * fam.r_discharge_on / (r + fam.r_discharge_on)
    return fam.vsat + 0.0 * np.asarray(vcc)


def monostable(*, r: Any, c: Any, vcc: Any, vctl: Any = None, vsat: Any = None,
               timer: str | TimerFamily = "bipolar") -> MonostableResult:
    """Pulse width of a 555-type monostable (sympy-derived RC crossing).

    After the trigger the capacitor charges from its start level toward the supply; the pulse ends
    when it reaches the upper threshold, the control-pin voltage:

    .. math:: t_w = R\\,C\\,\\ln\\frac{V_{cc} - V_s}{V_{cc} - V_{ctl}}

    With the internal divider (``vctl = 2·vcc/3``) and ``V_s = 0`` this is ``ln 3·R·C ≈ 1.1·R·C``.

    Parameters
    ----------
    r : float, str or array_like
        Timing resistor from the supply to the capacitor, > 0 [Ω].
    c : float, str or array_like
        Timing capacitor, > 0 [F].
    vcc : float, str or array_like
        Supply voltage, > 0 [V].
    vctl : float, str or array_like, optional
        Control-pin voltage = upper threshold [V]; default ``2·vcc/3``.
    vsat : float, str or array_like, optional
        Start level of the capacitor (discharge switch on) [V]; default :func:`start_level` of the
        family (bipolar: its saturation voltage; CMOS: the on-resistance divider, about 0).
    timer : {"bipolar", "cmos"} or TimerFamily

    Returns
    -------
    MonostableResult
        Floats for scalar input, arrays (broadcast) for array input.

    Raises
    ------
    DesignError
        Bad input, a control voltage at or above the supply (the capacitor never reaches it: the
        output stays high) or at or below the start level (no pulse).

    Notes
    -----
    The width is measured from the trigger; a trigger held low for longer than ``t_w`` stretches
    the pulse (see :func:`pwmkit.timing.two_timer_pwm`). Threshold bias current and capacitor
    leakage are not included.

    Examples
    --------
    >>> r = monostable(r="100k", c="100n", vcc=12, vsat=0)
    >>> round(r.width / (100e3 * 100e-9), 4)       # ln 3, the 1.1·R·C rule
    1.0986
    >>> round(monostable(r=10e3, c=1e-6, vcc=12, vctl=6, vsat=0).width * 1e3, 4)
    6.9315

    References
    ----------
    .. [1] C. K. Alexander, M. N. O. Sadiku, *Fundamentals of Electric Circuits*, 6th ed., ch. 7.
    .. [2] Data sheets of the bipolar and CMOS 555-type timer families, monostable operation
       (``t_w = 1.1·R·C``; typical published datasheet value, generic).
    """
    q = _monostable_inputs(r, c, vcc, vctl, vsat, timer)
    return _monostable_core(q)


def _monostable_inputs(r: Any, c: Any, vcc: Any, vctl: Any, vsat: Any, timer: Any) -> dict[str, Any]:
    fam = get_timer(timer)
    q: dict[str, Any] = {"timer": fam}
    q["r"] = quantity(r, "r", unit="Ω", minimum=0.0, min_inclusive=False)
    q["c"] = quantity(c, "c", unit="F", minimum=0.0, min_inclusive=False)
    q["vcc"] = quantity(vcc, "vcc", unit="V", minimum=0.0, min_inclusive=False)
    q["vctl"] = 2.0 * q["vcc"] / 3.0 if vctl is None else quantity(vctl, "vctl", unit="V", minimum=0.0,
                                                                  min_inclusive=False)
    q["v_start"] = _start_or_given(vsat, q["r"], q["vcc"], fam)
    return q


def _start_or_given(vsat: Any, r: Any, vcc: Any, fam: TimerFamily) -> Any:
    """The capacitor's start level: ``vsat`` when given (checked, ≥ 0), else :func:`start_level` [V]."""
    if vsat is None:
        return start_level(r, vcc, fam)
    return quantity(vsat, "vsat", unit="V", minimum=0.0)


def _first(mask: Any, *arrays: Any) -> list[float]:
    shape = np.broadcast(mask, *arrays).shape
    idx = int(np.argmax(np.broadcast_to(mask, shape).ravel()))
    return [float(np.broadcast_to(a, shape).ravel()[idx]) for a in arrays]


def _check_threshold(vctl: Any, vcc: Any, v_start: Any, above_supply: str, below_start: str) -> None:
    """Raise a DesignError unless the upper threshold ``vctl`` lies above ``v_start`` and below ``vcc``.

    The capacitor charges from its start level toward the supply, so a pulse ends only for a
    threshold strictly between the two. ``above_supply`` and ``below_start`` are the messages,
    with ``{v}`` the first offending ``vctl`` and ``{s}`` the supply or start level there [V].
    """
    bad = np.logical_not(np.asarray(vctl) < np.asarray(vcc))
    if np.any(bad):
        v, s = _first(bad, vctl, vcc)
        raise DesignError(above_supply.format(v=v, s=s))
    bad = np.logical_not(np.asarray(vctl) > np.asarray(v_start))
    if np.any(bad):
        v, s = _first(bad, vctl, v_start)
        raise DesignError(below_start.format(v=v, s=s))


def _monostable_core(q: dict[str, Any]) -> MonostableResult:
    from ._derived import monostable_width

    vcc, vctl, vs = q["vcc"], q["vctl"], q["v_start"]
    _check_threshold(vctl, vcc, vs,
                     "vctl: {v:.4g} V cannot be reached: the capacitor charges toward the supply {s:.4g} V and "
                     "never gets there, so the output stays high; allowed vctl < vcc",
                     "vctl: {v:.4g} V is not above the capacitor's start level {s:.4g} V, so there is no timed "
                     "pulse; raise vctl")
    with np.errstate(all="ignore"):
        (width,) = monostable_width(q["r"], q["c"], vcc, vctl, vs)
        width = np.asarray(width, dtype=float)
    if not np.all(np.isfinite(width)):
        raise DesignError("monostable: the pulse width is not finite (component values too extreme for double "
                          "precision); check the orders of magnitude of r and c")
    shape = np.broadcast(width, q["r"], q["c"], vcc, vctl, vs).shape
    return MonostableResult(timer=q["timer"].name, width=_out(width, shape), v_start=_out(vs, shape),
                            v_threshold=_out(vctl, shape), v_trigger=_out(np.asarray(vctl) / 2.0, shape),
                            r=_out(q["r"], shape), c=_out(q["c"], shape), vcc=_out(vcc, shape))


@dataclass(frozen=True)
class ControlPinDrive:
    """Control-pin voltage with a source working against the internal divider.

    Attributes
    ----------
    vctl : resulting control-pin voltage [V]
    v_source, r_source : open-circuit voltage and internal resistance of the source [V], [Ω]
    v_open : control-pin voltage with nothing connected, ``2·vcc/3`` [V]
    r_internal : Thevenin resistance of the internal divider at the pin, ``2·r/3`` [Ω]
    gain : ``∂vctl/∂v_source = r_internal/(r_internal + r_source)`` [1]
    error : ``vctl − v_source`` [V]
    """

    vctl: Any
    v_source: Any
    r_source: Any
    v_open: Any
    r_internal: float
    gain: Any
    error: Any


def control_pin_drive(v_source: Any, r_source: Any, vcc: Any, timer: str | TimerFamily = "bipolar",
                      r_divider: Any = None) -> ControlPinDrive:
    """Control-pin voltage when a source ``v_source`` behind ``r_source`` drives the pin [V].

    The internal divider is three equal resistors ``r`` from the supply to ground with the pin at
    the top of the lower two, so the pin sits at ``2·vcc/3`` behind ``r ∥ 2r = 2r/3``. Node equation:

    .. math:: V_{ctl} = \\frac{V_s/R_s + V_{cc}/r}{1/R_s + 1/r + 1/(2r)}

    Parameters
    ----------
    v_source : open-circuit voltage of the source, ≥ 0 [V]
    r_source : its internal resistance, ≥ 0 (0 = stiff source) [Ω]
    vcc : supply [V]
    timer : timer family; sets the divider resistor ``r`` (bipolar 5 kΩ, from memory)
    r_divider : override of ``r`` [Ω] (needed for families without a known value, e.g. CMOS)

    Examples
    --------
    >>> round(control_pin_drive(6.0, 0.0, 12.0).vctl, 6)
    6.0
    >>> round(control_pin_drive(0.0, 10e3, 12.0).vctl, 6)       # = control_voltage_from_divider(12, 10k)
    6.0

    References
    ----------
    .. [1] Data sheets of the bipolar 555-type timer family, functional block diagram (three
       equal divider resistors).
    """
    fam = get_timer(timer)
    if r_divider is None:
        if fam.r_cv_divider <= 0:
            raise DesignError(f"r_divider: the {fam.description} has no known internal divider value; give "
                              "r_divider (Ω) from the part's data sheet")
        r = fam.r_cv_divider
    else:
        r = float(quantity(r_divider, "r_divider", unit="Ω", minimum=0.0, min_inclusive=False))
    vs = quantity(v_source, "v_source", unit="V", minimum=0.0)
    rs = quantity(r_source, "r_source", unit="Ω", minimum=0.0)
    vcc = quantity(vcc, "vcc", unit="V", minimum=0.0, min_inclusive=False)
    r_int = 2.0 * r / 3.0
    v_open = 2.0 * np.asarray(vcc) / 3.0
    gain = r_int / (r_int + np.asarray(rs))
    v = v_open + gain * (np.asarray(vs) - v_open)
    shape = np.broadcast(v, vs, rs, vcc).shape
    return ControlPinDrive(vctl=_out(v, shape), v_source=_out(vs, shape), r_source=_out(rs, shape),
                           v_open=_out(v_open, shape), r_internal=r_int, gain=_out(gain, shape),
                           error=_out(v - np.asarray(vs), shape))


@dataclass(frozen=True)
class ControlPinSweep:
    """Single-timer control-pin modulation of an astable (arrays over ``vctl``).

    Attributes
    ----------
    topology : astable topology
    vctl : control-pin voltages [V]
    frequency, duty, t_high, t_low : the exact astable timing at each voltage [Hz], [1], [s], [s]
    """

    topology: str
    vctl: np.ndarray
    frequency: np.ndarray
    duty: np.ndarray
    t_high: np.ndarray
    t_low: np.ndarray


def control_pin_sweep(topology: str, vctl: Any, **astable_kwargs: Any) -> ControlPinSweep:
    """Frequency and duty of one astable whose control pin is driven to ``vctl`` [V].

    Raising the control voltage raises both thresholds (``V_H = vctl``, ``V_L = vctl/2``): the
    charge takes longer, the discharge hardly changes, so frequency falls and duty rises together
    (:func:`pwmkit.timing.astable` with ``vctl`` as an array).

    Examples
    --------
    >>> s = control_pin_sweep("classic", [6.0, 8.0], ra=10e3, rb=10e3, c=100e-9, vcc=12.0, vsat=0.0)
    >>> [round(float(f), 2) for f in s.frequency]
    [664.86, 480.9]

    References
    ----------
    .. [1] Data sheets of the bipolar and CMOS 555-type timer families: the control-voltage pin
       sets the upper threshold, the lower one is half of it (typical published datasheet value,
       generic).
    """
    from .astable import astable

    v = np.atleast_1d(np.asarray(quantity(vctl, "vctl", unit="V", minimum=0.0, min_inclusive=False), dtype=float))
    r = astable(topology, vctl=v, **astable_kwargs)
    return ControlPinSweep(topology=topology, vctl=v, frequency=np.atleast_1d(r.frequency),
                           duty=np.atleast_1d(r.duty), t_high=np.atleast_1d(r.t_high), t_low=np.atleast_1d(r.t_low))
