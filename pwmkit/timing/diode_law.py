"""Independent timing model with diode-law steering diodes.

The closed forms of :mod:`pwmkit.timing.symbolic` treat a steering diode as
a constant drop ``vd``. Here each diode follows the Shockley law with series
resistance (``V = n·V_T·ln(I/I_S + 1) + I·R_S``), the discharge switch is a
saturation voltage behind an on-resistance, and each half-period is
integrated numerically over the steady-state cycle:

.. math:: t_{high} = \\int_{V_L}^{V_H} \\frac{C}{i_{charge}(v)}\\,dv ,\\qquad
          t_{low} = \\int_{V_L}^{V_H} \\frac{C}{i_{discharge}(v)}\\,dv

The node equations are solved per quadrature point by bisection (monotone),
and the integral uses Gauss–Legendre quadrature after the substitution
``v = V∞ − (V∞ − V_L)·e^{−s}``, which makes the integrand nearly constant.

It serves the tests as an oracle and users as an error bound: "at this design
point the constant-drop closed form is off by x %". Scalars only.

References
----------
.. [1] S. M. Sze, K. K. Ng, *Physics of Semiconductor Devices*, 3rd ed.,
   Wiley 2007, ch. 2 (ideal diode law) — from memory.
.. [2] G. Massobrio, P. Antognetti, *Semiconductor Device Modeling with
   SPICE*, 2nd ed., ch. 1 (diode with series resistance) — from memory.
"""

from __future__ import annotations

import dataclasses
from dataclasses import dataclass
from typing import Any

import numpy as np

from .._validate import quantity
from ..errors import DesignError
from .astable import AstableResult, _inputs, astable
from .paths import paths

__all__ = ["DiodeLawTiming", "diode_law_timing"]

_GL_NODES, _GL_WEIGHTS = np.polynomial.legendre.leggauss(48)
_PANELS = 8


@dataclass(frozen=True)
class DiodeLawTiming:
    """Timing from the diode-law model and its comparison with the closed form.

    Attributes
    ----------
    t_high, t_low, period : [s]; frequency : [Hz]; duty : [1]
    vd_charge_equivalent : constant drop that makes the closed-form t_high
        agree [V] (None if the charge path has no diode)
    vd_discharge_equivalent : the same for t_low [V] (None without a discharge diode)
    closed_form : AstableResult at the constant drop the caller gave
    frequency_error : closed-form frequency / diode-law frequency − 1 [1]
    duty_error : closed-form duty − diode-law duty [1]
    """

    t_high: float
    t_low: float
    period: float
    frequency: float
    duty: float
    vd_charge_equivalent: float | None
    vd_discharge_equivalent: float | None
    closed_form: AstableResult
    frequency_error: float
    duty_error: float

    def summary(self) -> str:
        return (f"diode-law f = {self.frequency:.6g} Hz, duty = {100 * self.duty:.4f} %; the constant-drop "
                f"closed form is off by {100 * self.frequency_error:+.3f} % in frequency and "
                f"{100 * self.duty_error:+.3f} points in duty")

    def _repr_html_(self) -> str:
        return f"<p>{self.summary()}</p>"


def _bisect(fun: Any, lo: np.ndarray, hi: np.ndarray, iterations: int = 200) -> np.ndarray:
    """Root of a decreasing function between lo (f ≥ 0) and hi (f ≤ 0), vectorised."""
    for _ in range(iterations):
        mid = 0.5 * (lo + hi)
        positive = fun(mid) > 0
        lo = np.where(positive, mid, lo)
        hi = np.where(positive, hi, mid)
        if np.all(hi - lo <= 1e-15 * np.maximum(np.abs(hi), 1e-300)):
            break
    return 0.5 * (lo + hi)


def _series_diode_current(diode: Any, r: float, v_across: np.ndarray, t_c: float) -> np.ndarray:
    """Current through resistor r in series with a diode, total voltage v_across [A]."""
    v_across = np.maximum(v_across, 0.0)
    # a resistor in series with the diode adds to its series resistance: explicit Lambert-W form
    combined = dataclasses.replace(diode, r_s=diode.r_s + max(r, 0.0))
    return np.asarray(combined.current(v_across, t_c), dtype=float)


def _bypass_charge_current(diode: Any, ra: float, rb: float, v_across: np.ndarray, t_c: float) -> np.ndarray:
    """Charge current of ra feeding (diode ∥ rb) [A]; v_across = vcc − v_cap."""
    v_across = np.maximum(v_across, 0.0)
    if rb <= 0:
        return v_across / ra

    # bisect on the diode current i (its voltage vf(i) is explicit): ra carries i + vf(i)/rb
    def balance(i: np.ndarray) -> np.ndarray:
        u = diode.vf(i, t_c)
        return (v_across - u) / ra - i - u / rb

    i_d = _bisect(balance, np.zeros_like(v_across), v_across / ra, iterations=80)
    return (v_across - diode.vf(i_d, t_c)) / ra


def _integrate(current: Any, v_lower: float, v_upper: float, v_far: float, c: float, rising: bool) -> float:
    """∫ C / i(v) dv between the thresholds, substituting v = v_far − (v_far − v_start)·e^(−s)."""
    v_start, v_end = (v_lower, v_upper) if rising else (v_upper, v_lower)
    s_end = float(np.log((v_far - v_start) / (v_far - v_end)))
    edges = np.linspace(0.0, s_end, _PANELS + 1)
    total = 0.0
    for a, b in zip(edges[:-1], edges[1:]):
        s = 0.5 * (b - a) * _GL_NODES + 0.5 * (a + b)
        v = v_far - (v_far - v_start) * np.exp(-s)
        i = current(v)
        if np.any(~(i > 0)):
            bad = float(v[np.argmax(~(i > 0))])
            raise DesignError(f"timing: with the diode law the {'charge' if rising else 'discharge'} current "
                              f"falls to zero at {bad:.4g} V before the capacitor reaches the threshold; the "
                              "circuit does not oscillate")
        total += 0.5 * (b - a) * float(np.sum(_GL_WEIGHTS * c * np.abs(v_far - v) / i))
    return total


def diode_law_timing(topology: str, *, ra: Any, rb: Any, c: Any, vcc: Any, pot: Any = None, wiper: Any = None,
                     vd: Any = None, vsat: Any = None, vctl: Any = None, timer: Any = "bipolar", r_on: Any = None,
                     diode: Any = "small-signal-silicon", t_c: float = 25.0) -> DiodeLawTiming:
    """Timing with Shockley-law steering diodes, integrated numerically (scalars).

    Parameters
    ----------
    topology, ra, rb, c, vcc, pot, wiper, vsat, vctl, timer, r_on
        As for :func:`pwmkit.timing.astable`.
    vd : float, optional
        Constant drop for the closed form this model is compared with [V].
    diode : str or DiodeFamily
        Steering-diode family (see :mod:`pwmkit.parts.diodes`).
    t_c : float
        Diode junction temperature [°C].

    Returns
    -------
    DiodeLawTiming

    Notes
    -----
    The diode in the bypass topology is in parallel with ``rb`` during the
    charge (both carry current into the capacitor) and reverse-biased during
    the discharge. A reverse-biased steering diode carries its Shockley reverse
    current ``I_S·(1 − e^{−V_R/(n·V_T)})`` (tens of nA for small Schottky
    diodes, which matters in megaohm networks).

    Examples
    --------
    >>> r = diode_law_timing("bypass", ra=10e3, rb=10e3, c=100e-9, vcc=12, vd=0.65, vsat=0.1)
    >>> round(r.t_high * 1e3, 4)
    0.7718
    """
    from ..parts.diodes import get_diode

    dio = get_diode(diode)
    t_c = float(quantity(t_c, "t_c", unit="°C", minimum=-55.0, maximum=175.0))
    q = _inputs(topology, ra, rb, c, vcc, pot, wiper, vd, vsat, r_on, vctl, timer)
    for key, val in q.items():
        if key != "timer" and np.ndim(val) != 0:
            raise DesignError(f"{key}: the diode-law model takes scalars only, got an array")
    closed = astable(topology, ra=q["ra"], rb=q["rb"], c=q["c"], vcc=q["vcc"],
                     pot=q["pot"] if topology == "pot" else None, wiper=q["wiper"] if topology == "pot" else None,
                     vd=q["vd"], vsat=q["vsat"], vctl=q["vctl"], timer=q["timer"], r_on=q["r_on"])
    ra_, rb_, pot_, w = q["ra"], q["rb"], q["pot"], q["wiper"]
    vcc_, c_, v_upper = q["vcc"], q["c"], q["vctl"]
    v_lower = v_upper / 2.0
    # Discharge pin as a Thevenin source (same as the closed form, without diodes).
    p0 = paths("classic", ra=ra_, rb=0.0, pot=0.0, wiper=0.0, vcc=vcc_, vd=0.0, vsat=q["vsat"], r_on=q["r_on"])
    v_th, r_th = p0.v_discharge, p0.r_discharge

    from ..parts.diodes import thermal_voltage

    i_s, n_vt = float(dio.saturation_current(t_c)), dio.n * float(thermal_voltage(t_c))

    def leak(v_reverse: np.ndarray) -> np.ndarray:
        """Reverse current of the off diode at its reverse voltage (Shockley law) [A]."""
        return i_s * -np.expm1(-np.maximum(v_reverse, 0.0) / n_vt)

    r_pa = w * pot_ if topology == "pot" else 0.0
    r_pb = (1.0 - w) * pot_ if topology == "pot" else 0.0

    if topology == "classic":
        def i_charge(v: np.ndarray) -> np.ndarray:
            return (vcc_ - v) / (ra_ + rb_)
    elif topology == "bypass":
        def i_charge(v: np.ndarray) -> np.ndarray:
            return _bypass_charge_current(dio, ra_, rb_, vcc_ - v, t_c)
    else:

        def i_charge(v: np.ndarray) -> np.ndarray:
            # DIS at u: ra carries D1's current (through the pot's charge half) plus the reverse
            # current of D2, which sees u − v (no drop in rb for a current of I_S)
            def balance(u: np.ndarray) -> np.ndarray:
                return (vcc_ - u) / ra_ - _series_diode_current(dio, r_pa, u - v, t_c) - leak(u - v)

            u = _bisect(balance, np.asarray(v, dtype=float).copy(), np.full_like(v, vcc_), iterations=90)
            return (vcc_ - u) / ra_

    if topology in ("classic", "bypass"):
        def i_discharge(v: np.ndarray) -> np.ndarray:
            # bypass: the diode across rb is reverse-biased by v − u and leaks into DIS
            if topology == "classic" or rb_ <= 0:  # no diode in the path, or rb shorts it
                return (v - v_th) / (rb_ + r_th)
            if r_th <= 0:
                u = np.full_like(v, v_th)
            else:
                def balance(u: np.ndarray) -> np.ndarray:
                    return (u - v_th) / r_th - (v - u) / rb_ - leak(v - u)

                u = _bisect(lambda x: -balance(x), np.full_like(v, v_th), np.asarray(v, dtype=float).copy(),
                            iterations=90)
            return (v - u) / rb_ + leak(v - u)
    else:
        r_dis = rb_ + r_pb

        def i_discharge(v: np.ndarray) -> np.ndarray:
            # DIS at u (the switch's Thevenin source v_th behind r_th): D2's current through rb and
            # the pot's discharge half plus the reverse current of D1, which sees v − u
            if r_th <= 0:
                u = np.full_like(v, v_th)
            else:
                def balance(u: np.ndarray) -> np.ndarray:
                    return (u - v_th) / r_th - _series_diode_current(dio, r_dis, v - u, t_c) - leak(v - u)

                u = _bisect(lambda x: -balance(x), np.full_like(v, v_th), np.asarray(v, dtype=float).copy(),
                            iterations=90)
            return _series_diode_current(dio, r_dis, v - u, t_c) + leak(v - u)

    if not vcc_ > v_upper:
        raise DesignError(f"vcc: supply {vcc_:.4g} V cannot reach the upper threshold {v_upper:.4g} V")
    t_high = _integrate(i_charge, v_lower, v_upper, vcc_, c_, rising=True)
    t_low = _integrate(i_discharge, v_lower, v_upper, v_th, c_, rising=False)
    period = t_high + t_low

    vd_ch: float | None = None
    vd_dis: float | None = None
    if topology != "classic":
        r_eq = ra_ + (w * pot_ if topology == "pot" else 0.0)
        k = float(np.exp(t_high / (r_eq * c_)))
        vd_ch = float(vcc_ - (k * v_upper - v_lower) / (k - 1.0))
    if topology in ("steered", "pot"):
        r_eq = rb_ + ((1.0 - w) * pot_ if topology == "pot" else 0.0) + r_th
        k = float(np.exp(t_low / (r_eq * c_)))
        vd_dis = float((k * v_lower - v_upper) / (k - 1.0) - v_th)
    frequency = 1.0 / period
    duty = t_high / period
    return DiodeLawTiming(
        t_high=float(t_high), t_low=float(t_low), period=float(period), frequency=float(frequency),
        duty=float(duty), vd_charge_equivalent=vd_ch, vd_discharge_equivalent=vd_dis, closed_form=closed,
        frequency_error=float(closed.frequency / frequency - 1.0), duty_error=float(closed.duty - duty),
    )
