"""Brushed DC motor on a low-side PWM switch with a freewheeling diode.

Armature model (Mohan, Undeland & Robbins, Power Electronics, 3rd ed., ch. 7, from memory): ``v_a = R·i + L·di/dt + E``, ``E = K_e·ω``.
Switch on: terminal voltage ``V``; off: the current freewheels through the
diode at ``-V_f`` until it reaches zero, then stays zero (discontinuous
conduction, DCM). The current never reverses (regenerative current through the
MOSFET channel or body diode is outside this model).

Over one PWM period the speed (hence ``E``) is constant, so every segment is
an exact exponential ``i(t) = A + (I_0 - A)·e^{-t/τ}`` with ``τ = L/R``. The
steady state is the periodic orbit of that piecewise-exponential map, found
in closed form; averages and RMS values come from exact segment integrals
written in numerically stable forms (``expm1``/``log1p`` and short series near
zero), so ``z = R/(L·f)`` from 1e-12 to 1e12 gives finite, accurate numbers.

:func:`simulate_startup` steps the coupled electrical/mechanical system from
standstill with the same exact exponential per switching segment (speed
frozen at a predicted mid-step value) and a trapezoidal mechanical update.

References
----------
N. Mohan, T. M. Undeland, W. P. Robbins, *Power Electronics: Converters, Applications and Design*,
3rd ed., Wiley 2003, ch. 7 (step-down converter, CCM/DCM boundary I_LB) and ch. 13 (dc motor
drives) — section numbers from memory.
A. Hughes, B. Drury, *Electric Motors and Drives*, 4th ed., Newnes 2013, ch. 4 (chopper-fed d.c.
motor drives) — from memory.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Any

import numpy as np

from .._validate import is_scalar_input, quantity
from ..errors import DesignError
from .thermal import result_html, result_repr

__all__ = [
    "MotorCurrent",
    "MotorParams",
    "SteadySpeed",
    "StartupTrace",
    "motor_current",
    "steady_speed",
    "stall_current",
    "electrical_time_constant",
    "audible",
    "simulate_startup",
    "AUDIBLE_RANGE",
]

#: Human hearing range used by :func:`audible` [Hz] (common practice).
AUDIBLE_RANGE = (20.0, 20e3)

_SERIES_X = 0.1  # below this argument the short series replace the closed forms
# Taylor coefficients (sympy series, truncation error < 3e-17 relative for x < 0.1)
_PSI_C = (1 / 2, -1 / 6, 1 / 24, -1 / 120, 1 / 720, -1 / 5040, 1 / 40320, -1 / 362880, 1 / 3628800)
_H_C = (1 / 2, 1 / 12, 0.0, -1 / 720, 0.0, 1 / 30240, 0.0, -1 / 1209600)
_M2_C = (1 / 3, 1 / 12, 1 / 180, -1 / 720, -1 / 5040, 1 / 30240, 1 / 151200, -1 / 1209600, -1 / 4790016)


# ------------------------------------------------------------------------------------------------
# numerically stable helper functions of x = t/τ (all finite for x in [0, inf))
# ------------------------------------------------------------------------------------------------
def _series(x: np.ndarray, coeffs: tuple[float, ...]) -> np.ndarray:
    """Σ coeffs[k]·x^k by Horner's rule, the same operations as ``np.polyval(coeffs[::-1], x)``.

    A scalar (the dashboard's case: one design, a root search of a dozen steps) is summed in plain
    floats, which is about ten times faster than numpy's per-call overhead.
    """
    if np.ndim(x) == 0:
        return np.float64(_horner(float(x), coeffs))
    if np.size(x) <= 8:  # a few supply or tolerance corners: plain floats too
        xs = np.asarray(x, dtype=float)
        return np.array([_horner(v, coeffs) for v in xs.ravel().tolist()]).reshape(xs.shape)
    acc = np.full(np.shape(x), float(coeffs[-1]))
    for c in coeffs[-2::-1]:
        acc = acc * x + c
    return acc


def _horner(x: float, coeffs: tuple[float, ...]) -> float:
    acc = float(coeffs[-1])
    for c in coeffs[-2::-1]:
        acc = acc * x + c
    return acc


def _phi(x: np.ndarray) -> np.ndarray:
    """(1 - e^-x)/x, 1 at x = 0."""
    x = np.asarray(x, dtype=float)
    safe = np.where(x > 0.0, x, 1.0)
    return np.where(x > 0.0, -np.expm1(-safe) / safe, 1.0)


def _psi(x: np.ndarray) -> np.ndarray:
    """(e^-x - 1 + x)/x², 1/2 at x = 0."""
    x = np.asarray(x, dtype=float)
    safe = np.where(x < _SERIES_X, 1.0, x)
    return np.where(x < _SERIES_X, _series(x, _PSI_C), (np.expm1(-safe) + safe) / safe / safe)


def _h(x: np.ndarray) -> np.ndarray:
    """1/(1 - e^-x) - 1/x: mean of a normalised exponential step, 1/2 at x = 0, 1 at x = inf."""
    x = np.asarray(x, dtype=float)
    safe = np.where(x < _SERIES_X, 1.0, x)
    return np.where(x < _SERIES_X, _series(x, _H_C), -1.0 / np.expm1(-safe) - 1.0 / safe)


def _m2(x: np.ndarray) -> np.ndarray:
    """Mean square of the normalised step (1 - e^-u)/(1 - e^-x) over u in [0, x]; 1/3 at 0, 1 at inf."""
    x = np.asarray(x, dtype=float)
    safe = np.where(x < _SERIES_X, 1.0, x)
    one_minus = -np.expm1(-safe)
    bracket = 1.0 - 2.0 * one_minus / safe - np.expm1(-2.0 * safe) / (2.0 * safe)
    return np.where(x < _SERIES_X, _series(x, _M2_C), bracket / (one_minus * one_minus))


def _lam(y: np.ndarray) -> np.ndarray:
    """log(1 + y)/y, 1 at y = 0."""
    y = np.asarray(y, dtype=float)
    safe = np.where(y > 0.0, y, 1.0)
    return np.where(y > 0.0, np.log1p(safe) / safe, 1.0)


def _segment(i0: np.ndarray, i1: np.ndarray, x: np.ndarray, mean_only: bool = False) -> tuple[np.ndarray, Any]:
    """Mean and mean square of the exponential from ``i0`` to ``i1`` over ``x = t1/τ`` (None for
    the mean square with ``mean_only``)."""
    d = i1 - i0
    h = _h(x)
    mean = i0 + d * h
    if mean_only:
        return mean, None
    msq = i0 * i0 + 2.0 * i0 * d * h + d * d * _m2(x)
    return mean, np.maximum(msq, 0.0)


# ------------------------------------------------------------------------------------------------
# steady-state chopper current (closed form)
# ------------------------------------------------------------------------------------------------
def _chopper(v, e, r, l, d, f, vf, mean_only=False) -> dict[str, np.ndarray]:  # noqa: E741 - l is the trade symbol
    """Core closed forms on broadcast float arrays (no validation); only ``i_mean`` with ``mean_only``
    (the speed search's inner evaluations)."""
    v, e, r, l, d, f, vf = np.broadcast_arrays(*(np.asarray(a, dtype=float) for a in (v, e, r, l, d, f, vf)))
    lf = l * f
    z = r / lf
    x_on, x_off = d * z, (1.0 - d) * z
    vs = v + vf
    # peak-to-peak ripple (§6.2): (Vs/R)·pq/s, written without 1/R
    ripple = vs * d * (1.0 - d) / lf * _phi(x_on) * _phi(x_off) / _phi(z)
    i_avg_formula = (d * v - (1.0 - d) * vf - e) / r
    # I_max: stable offset form for z <= 1, direct §6.2 form for z > 1
    offset = vs * d * (_psi(z) - d * _psi(x_on)) / (_phi(z) * lf)
    imax_small = i_avg_formula + offset
    a = np.exp(-x_on)
    p, q, s = -np.expm1(-x_on), -np.expm1(-x_off), -np.expm1(-z)
    s_safe = np.where(s > 0.0, s, 1.0)
    a_on = (v - e) / r
    a_off = -(e + vf) / r
    imax_big = (a_on * p + a * q * a_off) / s_safe
    i_max_ccm = np.where(z <= 1.0, imax_small, imax_big)
    imin_big = (a_off * q + np.exp(-x_off) * p * a_on) / s_safe
    i_min_ccm = np.where(z <= 1.0, i_max_ccm - ripple, imin_big)
    # without back-EMF and diode drop the off-state decay never reaches zero: continuous for any D > 0
    continuous = ((i_min_ccm > 0.0) | (e + vf <= 0.0)) & (d > 0.0)
    i_min_ccm = np.maximum(i_min_ccm, 0.0)

    # CCM segment integrals
    on_mean, on_msq = _segment(i_min_ccm, i_max_ccm, x_on, mean_only)
    off_mean, off_msq = _segment(i_max_ccm, i_min_ccm, x_off, mean_only)

    # DCM: start from zero, peak A_on·(1 - e^{-Dz}) written without 1/R
    i_pk = np.maximum((v - e) * d / lf * _phi(x_on), 0.0)
    clamp_v = e + vf
    clamp_pos = clamp_v > 0.0
    y = np.where(clamp_pos, np.maximum(v - e, 0.0) * p / np.where(clamp_pos, clamp_v, 1.0), 0.0)
    # diode conduction time as fraction of the period: log1p(y)/z = y·λ(y)/z
    frac_x = np.where(clamp_pos, np.maximum(v - e, 0.0) * d * _phi(x_on) / np.where(clamp_pos, clamp_v, 1.0)
                      * _lam(y), 0.0)
    frac_x = np.minimum(frac_x, 1.0 - d)
    x_x = frac_x * z
    dcm_on_mean, dcm_on_msq = _segment(np.zeros_like(i_pk), i_pk, x_on, mean_only)
    dcm_d_mean, dcm_d_msq = _segment(i_pk, np.zeros_like(i_pk), x_x, mean_only)

    sw_avg = np.where(continuous, d * on_mean, d * dcm_on_mean)
    if mean_only:
        return {"i_mean": sw_avg + np.where(continuous, (1.0 - d) * off_mean, frac_x * dcm_d_mean)}
    sw_msq = np.where(continuous, d * on_msq, d * dcm_on_msq)
    di_avg = np.where(continuous, (1.0 - d) * off_mean, frac_x * dcm_d_mean)
    di_msq = np.where(continuous, (1.0 - d) * off_msq, frac_x * dcm_d_msq)
    i_max = np.where(continuous, i_max_ccm, i_pk)
    i_min = np.where(continuous, i_min_ccm, 0.0)

    # CCM/DCM boundary: the CCM waveform with I_min = 0 (stable in ripple form)
    i_boundary = ripple * (d * _h(x_on) + (1.0 - d) * (1.0 - _h(x_off)))
    e_boundary = d * v - (1.0 - d) * vf - r * i_boundary
    period = 1.0 / f
    return {
        "i_mean": sw_avg + di_avg,
        "i_min": i_min,
        "i_max": i_max,
        "i_ripple_pp": i_max - i_min,
        "continuous": continuous,
        "i_switch_avg": sw_avg,
        "i_switch_rms": np.sqrt(sw_msq),
        "i_diode_avg": di_avg,
        "i_diode_rms": np.sqrt(di_msq),
        "i_rms": np.sqrt(sw_msq + di_msq),
        "t_diode": np.where(continuous, (1.0 - d) * period, frac_x * period),
        "i_boundary": i_boundary,
        "e_boundary": e_boundary,
        "tau": l / r,
        "z": z,
    }


_MC_UNITS = {
    "i_mean": "A", "i_min": "A", "i_max": "A", "i_ripple_pp": "A", "mode": "", "i_switch_avg": "A",
    "i_switch_rms": "A", "i_diode_avg": "A", "i_diode_rms": "A", "i_rms": "A", "t_diode": "s",
    "i_boundary": "A", "e_boundary": "V", "tau": "s",
}


@dataclass(frozen=True)
class MotorCurrent:
    """Steady-state armature current of a PWM-driven DC motor (one period).

    Floats for scalar input, numpy arrays (broadcast) otherwise.

    Attributes
    ----------
    i_mean, i_min, i_max, i_ripple_pp
        Mean, minimum, maximum and peak-to-peak current [A] (DCM: ``i_min = 0``).
    mode, continuous
        ``"continuous"`` or ``"discontinuous"`` (str or array of str); ``continuous`` as bool.
    i_switch_avg, i_switch_rms, i_diode_avg, i_diode_rms, i_rms
        Switch (MOSFET), freewheel-diode and armature average/RMS currents over the period [A].
    t_diode
        Diode conduction time per period [s] (``(1-D)/f`` in CCM).
    i_boundary, e_boundary
        Mean current [A] and back-EMF [V] at the CCM/DCM boundary for this duty and frequency:
        continuous conduction iff ``e < e_boundary``.
    tau, z
        Electrical time constant ``L/R`` [s] and period over time constant ``R/(L·f)`` [1].
    """

    i_mean: Any
    i_min: Any
    i_max: Any
    i_ripple_pp: Any
    mode: Any
    continuous: Any
    i_switch_avg: Any
    i_switch_rms: Any
    i_diode_avg: Any
    i_diode_rms: Any
    i_rms: Any
    t_diode: Any
    i_boundary: Any
    e_boundary: Any
    tau: Any
    z: Any

    def __repr__(self) -> str:
        return result_repr(self, _MC_UNITS)

    def _repr_html_(self) -> str:
        return result_html(self, _MC_UNITS, "motor current (steady state)")


def _pack_current(out: dict[str, np.ndarray], scalar_out: bool) -> MotorCurrent:
    for key, val in out.items():
        if key != "continuous" and not np.all(np.isfinite(val)):
            raise DesignError(f"motor current: {key} overflows for these inputs (r/(l·f) or v/r out of the "
                              "float range); check the units of r, l and f")
    cont = out["continuous"]
    mode = np.where(cont, "continuous", "discontinuous")
    if scalar_out:
        vals = {k: float(v) for k, v in out.items() if k != "continuous"}
        return MotorCurrent(mode=str(mode), continuous=bool(cont), **vals)
    return MotorCurrent(mode=mode, continuous=cont, **{k: v for k, v in out.items() if k != "continuous"})


_INPUTS = (("v", "V", False), ("e", "V", True), ("r", "Ω", False), ("l", "H", False), ("duty", "", True),
           ("f", "Hz", False), ("vf", "V", True))  # name, unit, zero allowed; all >= 0, duty <= 1


def _check_inputs(*values: Any) -> tuple[Any, ...]:
    out = tuple(quantity(x, name, unit=unit, minimum=0.0, min_inclusive=zero, maximum=1.0 if name == "duty" else None)
                for x, (name, unit, zero) in zip(values, _INPUTS))
    try:
        np.broadcast_shapes(*(np.shape(a) for a in out))
    except ValueError as exc:
        raise DesignError(f"motor inputs: array shapes do not broadcast ({exc})") from None
    return out


def motor_current(v: Any, e: Any, r: Any, l: Any, duty: Any, f: Any, vf: Any = 0.0) -> MotorCurrent:  # noqa: E741
    """Steady-state chopper current of a DC motor: exact piecewise-exponential solution (CCM and DCM).

    With ``z = R/(L·f)``, ``a = e^{-Dz}``, ``b = e^{-(1-D)z}``, ``A_on = (V-E)/R``,
    ``A_off = -(E+V_f)/R`` (Mohan, Undeland & Robbins, Power Electronics, 3rd ed., ch. 7, from memory):

    .. math::

        I_{max} = \\frac{A_{on}(1-a) + a(1-b)A_{off}}{1-ab}, \\quad
        ΔI = \\frac{V+V_f}{R}\\,\\frac{(1-a)(1-b)}{1-ab}, \\quad I_{min} = I_{max} - ΔI .

    Continuous conduction iff ``I_min > 0``; otherwise the current starts each
    period at zero, peaks at ``I_pk = A_on(1-a)`` and the diode conducts for
    ``t_x = τ·ln(1 + I_pk·R/(E+V_f))``. Averages and RMS values are exact
    integrals of the exponential segments.

    Parameters
    ----------
    v : float or array_like
        Supply voltage [V], ``> 0``.
    e : float or array_like
        Back-EMF ``K_e·ω`` [V], ``>= 0``; ``e >= v`` gives zero current (see Notes).
    r : float or array_like
        Armature resistance, switch on-resistance folded in [Ω], ``> 0``.
    l : float or array_like
        Armature inductance [H], ``> 0``.
    duty : float or array_like
        Switch on-time fraction [1], ``0 … 1``.
    f : float or array_like
        PWM frequency [Hz], ``> 0``.
    vf : float or array_like
        Freewheel-diode forward drop, constant [V], ``>= 0``.

    Returns
    -------
    MotorCurrent
        ``i_mean, i_min, i_max, i_ripple_pp`` [A], ``mode``, ``continuous``,
        ``i_switch_avg, i_switch_rms, i_diode_avg, i_diode_rms, i_rms`` [A],
        ``t_diode`` [s], ``i_boundary`` [A], ``e_boundary`` [V], ``tau`` [s], ``z`` [1].
        Floats for scalar input, arrays (broadcast) otherwise.

    Raises
    ------
    DesignError
        Non-finite or out-of-range inputs, shapes that do not broadcast, or a current that overflows.

    Notes
    -----
    Ideal switch, constant diode drop, ``E`` constant over the period
    (mechanical time constant ≫ ``1/f``). Current never reverses: with
    ``e >= v`` (motor overhauled, generating) or ``duty = 0`` no current flows
    and the result is all zeros in ``"discontinuous"`` mode. Reproduces the
    Mohan, Undeland & Robbins, Power Electronics, 3rd ed., ch. 7, from memory worked values (12 V, 6 V, 1.5 Ω, 1 mH, 20 kHz, D 0.7:
    ``I_max`` 1.662679 A, ``I_min`` 1.536691 A) and the §6.3 DCM case.

    Examples
    --------
    >>> mc = motor_current(12.0, 6.0, 1.5, 1e-3, 0.7, 20e3)
    >>> round(mc.i_max, 6), round(mc.i_min, 6), mc.mode
    (1.662679, 1.536691, 'continuous')
    >>> motor_current(12.0, 6.0, 1.5, 1e-3, 0.6, 500.0).mode
    'discontinuous'

    References
    ----------
    Mohan, Undeland, Robbins, *Power Electronics*, 3rd ed., ch. 7 and ch. 13 (from memory).
    Hughes, Drury, *Electric Motors and Drives*, 4th ed., ch. 4 (from memory).
    """
    args = _check_inputs(v, e, r, l, duty, f, vf)
    with np.errstate(over="ignore", invalid="ignore", divide="ignore", under="ignore"):
        out = _chopper(*args)
    return _pack_current(out, is_scalar_input(*args))


# ------------------------------------------------------------------------------------------------
# motor parameters, steady speed
# ------------------------------------------------------------------------------------------------
@dataclass(frozen=True)
class MotorParams:
    """Brushed DC motor and its mechanical load (SI units).

    Parameters
    ----------
    r : float
        Armature resistance (add the switch R_DS(on) if it matters) [Ω].
    l : float
        Armature inductance [H].
    ke : float
        Back-EMF constant [V·s/rad].
    kt : float, optional
        Torque constant [N·m/A]; equals ``ke`` in SI units when omitted.
    b : float
        Viscous friction [N·m·s/rad].
    t_coulomb : float
        Coulomb (dry) friction torque [N·m].
    t_load : float
        Constant load torque [N·m] (passive: opposes rotation, never drives it).
    drag : float
        Quadratic (fan/propeller) load coefficient, torque ``drag·ω²`` [N·m·s²/rad²].
    j : float, optional
        Rotor plus load inertia [kg·m²]; needed by :func:`simulate_startup` only.

    Examples
    --------
    >>> MotorParams(r=1.5, l=1e-3, ke=0.01).kt
    0.01
    """

    r: float
    l: float  # noqa: E741
    ke: float
    kt: float | None = None
    b: float = 0.0
    t_coulomb: float = 0.0
    t_load: float = 0.0
    drag: float = 0.0
    j: float | None = None

    def __post_init__(self) -> None:
        pos = {"r": "Ω", "l": "H", "ke": "V·s/rad"}
        for name, unit in pos.items():
            object.__setattr__(self, name, float(quantity(getattr(self, name), name, unit=unit,
                                                          minimum=0.0, min_inclusive=False)))
        kt = self.ke if self.kt is None else self.kt
        object.__setattr__(self, "kt", float(quantity(kt, "kt", unit="N·m/A", minimum=0.0, min_inclusive=False)))
        for name, unit in {"b": "N·m·s/rad", "t_coulomb": "N·m", "t_load": "N·m", "drag": "N·m·s²/rad²"}.items():
            object.__setattr__(self, name, float(quantity(getattr(self, name), name, unit=unit, minimum=0.0)))
        if self.j is not None:
            object.__setattr__(self, "j", float(quantity(self.j, "j", unit="kg·m²", minimum=0.0,
                                                         min_inclusive=False)))

    def load_torque(self, omega: Any) -> Any:
        """Resisting torque at speed ``omega`` > 0: ``b·ω + drag·ω² + T_c + T_load`` [N·m]."""
        w = np.asarray(omega, dtype=float)
        return self.b * w + self.drag * w * w + self.t_coulomb + self.t_load


def electrical_time_constant(params: MotorParams) -> float:
    """Armature time constant ``τ_e = L/R`` [s]."""
    return params.l / params.r


def audible(f: Any) -> Any:
    """True where a PWM frequency lies in the audible band 20 Hz … 20 kHz (common practice).

    Motor windings and laminations "sing" at the PWM frequency; drives that must
    be quiet use f above 20 kHz (common practice).

    Parameters
    ----------
    f : float or array_like
        PWM frequency [Hz].

    Returns
    -------
    bool or numpy.ndarray of bool

    Examples
    --------
    >>> audible(1e3), audible(25e3)
    (True, False)
    """
    fr = quantity(f, "f", unit="Hz", minimum=0.0, min_inclusive=False)
    res = (np.asarray(fr) >= AUDIBLE_RANGE[0]) & (np.asarray(fr) <= AUDIBLE_RANGE[1])
    return bool(res) if np.ndim(fr) == 0 else res


def stall_current(params: MotorParams, v: Any, duty: Any = 1.0, f: Any = 20e3, vf: Any = 0.0) -> MotorCurrent:
    """Current with the rotor held (``E = 0``): the worst case for switch and diode ratings.

    At stall ``I_mean = (D·V - (1-D)·V_f)/R`` and the diode average
    ``(1-D)·D·V/R`` peaks at ``D = 0.5`` at ``V/(4R)`` (Mohan, Undeland & Robbins, Power Electronics, 3rd ed., ch. 7, from memory; stall current as the worst case, common practice).

    Parameters
    ----------
    params : MotorParams
    v : float or array_like
        Supply [V].
    duty : float or array_like
        Duty cycle [1].
    f : float or array_like
        PWM frequency [Hz].
    vf : float or array_like
        Diode drop [V].

    Returns
    -------
    MotorCurrent

    Examples
    --------
    >>> round(stall_current(MotorParams(1.5, 1e-3, 0.01), 12.0).i_mean, 6)
    8.0
    """
    return motor_current(v, 0.0, params.r, params.l, duty, f, vf)


_SS_UNITS = {
    "omega": "rad/s", "rpm": "rpm", "e": "V", "i_mean": "A", "torque": "N·m", "stalled": "",
    "p_in": "W", "p_em": "W", "p_copper": "W", "p_diode": "W", "tau_e": "s", "tau_over_period": "",
    "audible": "",
}


@dataclass(frozen=True)
class SteadySpeed:
    """Steady operating point of a PWM-driven motor against its load.

    Floats/bools for scalar input, numpy arrays (broadcast) otherwise.

    Attributes
    ----------
    omega, rpm, e
        Speed [rad/s] and [rpm]; back-EMF [V].
    i_mean, torque
        Mean armature current [A]; electromagnetic torque ``K_t·I_mean`` [N·m].
    stalled
        True where the stall torque cannot overcome friction plus load (``omega = 0``).
    current : MotorCurrent
        Full current result at the operating point.
    p_in, p_em, p_copper, p_diode
        Supply power ``V·I_sw,avg``, electromagnetic ``E·I_mean``, copper ``R·I_rms²``
        and diode ``V_f·I_D,avg`` [W] (``p_in = p_em + p_copper + p_diode``).
    tau_e, tau_over_period
        Electrical time constant ``L/R`` [s] and ``τ_e·f`` [1] (well above 1: small ripple).
    audible
        PWM frequency within 20 Hz … 20 kHz (common practice).
    """

    omega: Any
    rpm: Any
    e: Any
    i_mean: Any
    torque: Any
    stalled: Any
    current: MotorCurrent
    p_in: Any
    p_em: Any
    p_copper: Any
    p_diode: Any
    tau_e: float
    tau_over_period: Any
    audible: Any

    def __repr__(self) -> str:
        return result_repr(self, _SS_UNITS)

    def _repr_html_(self) -> str:
        return result_html(self, _SS_UNITS, "motor steady state")


def _ccm_speed(params: MotorParams, v: np.ndarray, d: np.ndarray, vf: np.ndarray) -> np.ndarray:
    """Speed [rad/s] where the torque balance holds if the current is continuous (NaN if it has no root).

    ``K_t·(D·V - (1-D)·V_f - K_e·ω)/R = b·ω + drag·ω² + T_c + T_L`` solved for ``ω`` in the
    cancellation-free form ``2C/(B + sqrt(B² + 4·drag·C))``.
    """
    b = params.b + params.kt * params.ke / params.r
    c = params.kt * (d * v - (1.0 - d) * vf) / params.r - params.t_coulomb - params.t_load
    with np.errstate(invalid="ignore", divide="ignore", over="ignore"):
        return 2.0 * c / (b + np.sqrt(b * b + 4.0 * params.drag * c))


def steady_speed(params: MotorParams, v: Any, duty: Any, f: Any, vf: Any = 0.0, *, iterations: int = 80) -> SteadySpeed:
    """Steady speed under PWM (CCM or DCM) by a bracketed root search on the torque balance.

    .. math::

        K_t · I_{mean}(E = K_e ω) = b ω + c ω^2 + T_c + T_L

    The left side falls and the right side rises with ``ω``, so the balance
    has one root in ``[0, V/K_e]`` (at ``E = V`` the current is zero). The
    mean current is the exact :func:`motor_current` value, so DCM is handled
    — with no load torque in DCM the speed climbs to ``V/K_e`` whatever the duty.

    Parameters
    ----------
    params : MotorParams
    v : float or array_like
        Supply [V].
    duty : float or array_like
        Duty cycle [1].
    f : float or array_like
        PWM frequency [Hz].
    vf : float or array_like
        Freewheel-diode drop [V].
    iterations : int
        Maximum root-search steps (the search stops earlier once the speed has
        converged to about 1e-12 relative; plain bisection needs about 50).

    Returns
    -------
    SteadySpeed
        Vectorised over ``v, duty, f, vf`` (broadcast).

    Notes
    -----
    Friction and load torques are passive. When ``K_t·I_mean(0)`` does not exceed
    ``T_c + T_L`` the motor does not start (``stalled``, ``omega = 0``); the
    current then is the stall current — a hot case for motor, switch and diode.

    Examples
    --------
    >>> m = MotorParams(r=1.5, l=1e-3, ke=0.01, b=1e-5)
    >>> round(steady_speed(m, 12.0, 1.0, 20e3).omega, 2)
    1043.48
    """
    v, _, _, _, duty, f, vf = _check_inputs(v, 0.0, params.r, params.l, duty, f, vf)
    scalar_out = is_scalar_input(v, duty, f, vf)
    v_a, d_a, f_a, vf_a = np.broadcast_arrays(*(np.asarray(x, dtype=float) for x in (v, duty, f, vf)))
    kt, ke, r, l = params.kt, params.ke, params.r, params.l  # noqa: E741

    def balance(w: np.ndarray) -> np.ndarray:
        with np.errstate(over="ignore", invalid="ignore", divide="ignore", under="ignore"):
            i = _chopper(v_a, ke * w, r, l, d_a, f_a, vf_a, mean_only=True)["i_mean"]
        return kt * i - params.load_torque(w)

    lo, hi = np.zeros_like(v_a), v_a / ke
    f_lo, f_hi = balance(lo), balance(hi)
    stalled = f_lo <= 0.0
    # Bracketed root search on the (decreasing) torque balance: Illinois-modified regula falsi,
    # which converges superlinearly; a bisection step is taken whenever the secant point is
    # unusable. The first point is the continuous-conduction root, where the mean current
    # (D·V - (1-D)·V_f - K_e·ω)/R is linear in speed and the balance a quadratic: where the motor
    # runs in continuous conduction the search starts on the root and stops a step later.
    guess = _ccm_speed(params, v_a, d_a, vf_a)
    x = np.full(v_a.shape, np.inf)
    side = np.zeros(v_a.shape, dtype=int)
    for step in range(int(iterations)):
        with np.errstate(over="ignore", invalid="ignore", divide="ignore"):
            sec = guess if step == 0 else hi - f_hi * (hi - lo) / (f_hi - f_lo)
        x_new = np.where(np.isfinite(sec) & (sec >= lo) & (sec <= hi), sec, 0.5 * (lo + hi))
        fx = balance(x_new)
        pos = fx > 0.0
        lo, f_lo = np.where(pos, x_new, lo), np.where(pos, fx, f_lo)
        hi, f_hi = np.where(pos, hi, x_new), np.where(pos, f_hi, fx)
        f_hi = np.where(pos & (side == 1), 0.5 * f_hi, f_hi)
        f_lo = np.where(~pos & (side == -1), 0.5 * f_lo, f_lo)
        side = np.where(pos, 1, -1)
        done = np.all((np.abs(x_new - x) <= 1e-12 * np.abs(x_new)) | (fx == 0.0) | stalled)
        x = x_new
        if done:
            break
    omega = np.where(stalled, 0.0, x)
    e = ke * omega
    with np.errstate(over="ignore", invalid="ignore", divide="ignore", under="ignore"):
        out = _chopper(v_a, e, r, l, d_a, f_a, vf_a)
    mc = _pack_current(out, scalar_out)
    i_mean = out["i_mean"]
    vals = {
        "omega": omega, "rpm": omega * 30.0 / math.pi, "e": e, "i_mean": i_mean, "torque": kt * i_mean,
        "p_in": v_a * out["i_switch_avg"], "p_em": e * i_mean, "p_copper": r * out["i_rms"] ** 2,
        "p_diode": vf_a * out["i_diode_avg"], "tau_over_period": (l / r) * f_a,
    }
    aud = (f_a >= AUDIBLE_RANGE[0]) & (f_a <= AUDIBLE_RANGE[1])
    if scalar_out:
        return SteadySpeed(current=mc, stalled=bool(stalled), audible=bool(aud), tau_e=l / r,
                           **{k: float(x) for k, x in vals.items()})
    return SteadySpeed(current=mc, stalled=stalled, audible=aud, tau_e=l / r, **vals)


# ------------------------------------------------------------------------------------------------
# start-up simulation (own stepper)
# ------------------------------------------------------------------------------------------------
_TR_UNITS = {"omega_final": "rad/s", "i_mean_final": "A", "i_peak": "A", "steps": ""}


@dataclass(frozen=True)
class StartupTrace:
    """Time history of a start from standstill.

    Attributes
    ----------
    t : numpy.ndarray
        Time [s] (every step end, switching instants included).
    i : numpy.ndarray
        Armature current [A].
    omega : numpy.ndarray
        Speed [rad/s].
    e : numpy.ndarray
        Back-EMF [V].
    omega_final : float
        Speed at ``t_end`` [rad/s].
    i_mean_final : float
        Mean current over the last whole PWM period (exact charge) [A].
    i_peak : float
        Largest current in the run [A] (switch and diode peak rating check).
    steps : int
        Number of steps taken.
    """

    t: np.ndarray
    i: np.ndarray
    omega: np.ndarray
    e: np.ndarray
    omega_final: float
    i_mean_final: float
    i_peak: float
    steps: int

    def __repr__(self) -> str:
        return result_repr(self, _TR_UNITS)

    def _repr_html_(self) -> str:
        return result_html(self, _TR_UNITS, "motor start-up")


def _h_scalar(x: float) -> float:
    if x < _SERIES_X:
        return 0.5 + x * (1 / 12 + x * x * (-1 / 720 + x * x / 30240))
    return -1.0 / math.expm1(-x) - 1.0 / x


def simulate_startup(
    params: MotorParams,
    v: float,
    duty: float,
    f: float,
    t_end: float,
    vf: float = 0.0,
    *,
    steps_per_segment: int = 2,
    max_steps: int = 2_000_000,
) -> StartupTrace:
    """Start-up from standstill: exact exponential current per step, trapezoidal mechanics.

    Each PWM period is split at the switching instant; each segment into
    at least ``steps_per_segment`` steps of length ``h``, more where needed to keep
    ``h·ρ ≤ 0.05`` for the slow electro-mechanical pole ``ρ`` of the armature/rotor
    pair (``≈ 1/τ_m``, or ``1/√(τ_e·τ_m)`` when the pair is underdamped) and the
    friction pole ``(b + 2c·V/K_e)/J``. Per step:

    1. predict the speed at the step end (explicit Euler) and take the mid-step speed ``ω_m``;
    2. current exactly: ``i(t) = A + (i_0 - A)e^{-t/τ}``, ``A = (v_seg - K_e ω_m)/R`` with
       ``v_seg = V`` (on) or ``-V_f`` (off); when ``A < 0`` the current stops at zero after
       ``τ·ln(1 + i_0/(-A))`` (diode cut-off, DCM) and stays zero;
    3. speed: ``J(ω_1 - ω_0) = K_t Q - (b (ω_0+ω_1)/2 + c ω_m^2 + T_c + T_L) h`` with the exact
       charge ``Q = ∫ i dt``; speed never goes negative (passive friction/load).

    Parameters
    ----------
    params : MotorParams
        Needs ``j``.
    v : float
        Supply [V].
    duty : float
        Duty cycle [1].
    f : float
        PWM frequency [Hz].
    t_end : float
        Simulated time [s], rounded up to a whole number of PWM periods.
    vf : float
        Freewheel-diode drop [V].
    steps_per_segment : int
        Minimum steps per on/off segment (1 … 1000).
    max_steps : int
        Guard against runaway run times and memory.

    Returns
    -------
    StartupTrace
        ``t, i, omega, e`` arrays and ``omega_final, i_mean_final, i_peak, steps``.

    Raises
    ------
    DesignError
        Missing inertia, bad inputs, or more than ``max_steps`` steps needed.

    Notes
    -----
    Second order in the step for the electro-mechanical coupling; the electrical
    part is exact for frozen speed. Checked against ``scipy.integrate.solve_ivp``
    in the tests.

    Examples
    --------
    >>> m = MotorParams(r=1.5, l=1e-3, ke=0.01, b=1e-5, j=1e-6)
    >>> tr = simulate_startup(m, 12.0, 0.7, 1e3, 0.05)
    >>> tr.omega_final > 0.0
    True
    """
    if params.j is None:
        raise DesignError("params.j: inertia is None; simulate_startup needs the rotor + load inertia j > 0 [kg·m²]")
    v = float(quantity(v, "v", unit="V", minimum=0.0, min_inclusive=False))
    duty = float(quantity(duty, "duty", minimum=0.0, maximum=1.0))
    f = float(quantity(f, "f", unit="Hz", minimum=0.0, min_inclusive=False))
    t_end = float(quantity(t_end, "t_end", unit="s", minimum=0.0, min_inclusive=False))
    vf = float(quantity(vf, "vf", unit="V", minimum=0.0))
    nsub = int(quantity(steps_per_segment, "steps_per_segment", minimum=1, maximum=1000))
    n_periods = int(math.ceil(t_end * f - 1e-9))
    r, ke, kt, j = params.r, params.ke, params.kt, params.j
    tau = params.l / r
    b, drag, t_static = params.b, params.drag, params.t_coulomb + params.t_load
    period = 1.0 / f
    # slowest electro-mechanical pole (the fast electrical one is integrated exactly) and friction pole
    b_eff = b + 2.0 * drag * v / ke
    trace, det = r / params.l + b_eff / j, (r * b_eff + ke * kt) / (params.l * j)
    disc = trace * trace - 4.0 * det
    rho = math.sqrt(det) if disc < 0.0 else 2.0 * det / (trace + math.sqrt(disc))
    h_max = 0.05 / max(rho, b_eff / j)
    segs = [(length, vs, max(nsub, math.ceil(length / h_max)))
            for length, vs in ((duty * period, v), ((1.0 - duty) * period, -vf)) if length > 0.0]
    n_steps = n_periods * sum(n_seg for _, _, n_seg in segs)
    if n_steps > max_steps:
        raise DesignError(f"t_end: {t_end:g} s at {f:g} Hz needs {n_steps} steps (mechanical time scale "
                          f"{20 * h_max:.3g} s against a {period:.3g} s PWM period), more than max_steps = "
                          f"{max_steps}; shorten t_end or raise max_steps")
    t_arr = np.empty(n_steps + 1)
    i_arr = np.empty(n_steps + 1)
    w_arr = np.empty(n_steps + 1)
    t_arr[0] = i_arr[0] = w_arr[0] = 0.0
    i_cur = w_cur = q_last = 0.0
    k = 0
    for n in range(n_periods):
        t0 = n * period
        q_period = 0.0
        offset = 0.0
        for length, v_seg, n_seg in segs:
            h = length / n_seg
            x = h / tau
            ex = math.exp(-x)
            hb = 0.5 * b * h / j
            for m in range(n_seg):
                # 1. predictor for the mid-step speed
                w_pred = w_cur + h * (kt * i_cur - (b * w_cur + drag * w_cur * w_cur + t_static)) / j
                w_mid = 0.5 * (w_cur + max(w_pred, 0.0))
                a_inf = (v_seg - ke * w_mid) / r
                # 2. exact current over the step with diode/switch cut-off at zero
                if a_inf >= 0.0 or i_cur <= 0.0:
                    i_new = a_inf + (i_cur - a_inf) * ex if a_inf >= 0.0 else 0.0
                    x_c = x
                else:
                    x_zero = math.log1p(i_cur / -a_inf)
                    if x_zero < x:
                        i_new, x_c = 0.0, x_zero
                    else:
                        i_new, x_c = a_inf + (i_cur - a_inf) * ex, x
                q = tau * x_c * (i_cur + (i_new - i_cur) * _h_scalar(x_c))
                # 3. trapezoidal mechanical update
                w_new = (w_cur * (1.0 - hb) + (kt * q - (drag * w_mid * w_mid + t_static) * h) / j) / (1.0 + hb)
                w_cur = max(w_new, 0.0)
                i_cur = i_new
                q_period += q
                k += 1
                t_arr[k] = t0 + offset + (m + 1) * h
                i_arr[k] = i_cur
                w_arr[k] = w_cur
            offset += length
        q_last = q_period
    t_out, i_out, w_out = t_arr[: k + 1], i_arr[: k + 1], w_arr[: k + 1]
    if not (np.all(np.isfinite(i_out)) and np.all(np.isfinite(w_out))):  # pragma: no cover - guarded inputs
        raise DesignError("simulate_startup: the simulation produced non-finite values; check units")
    return StartupTrace(
        t=t_out, i=i_out, omega=w_out, e=ke * w_out, omega_final=float(w_out[-1]),
        i_mean_final=float(q_last * f), i_peak=float(np.max(i_out)), steps=int(k),
    )

