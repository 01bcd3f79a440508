"""Generic diode families: Shockley model with series resistance, ratings and switching data.

A :class:`DiodeFamily` is plain data (a frozen dataclass) plus the static
forward characteristic

.. math::

    V_F(I) = n V_T \\ln\\left(\\frac{I}{I_S(T)} + 1\\right) + I R_S ,
    \\qquad V_T = k T / q ,

with the usual diode-model saturation-current temperature law

.. math::

    I_S(T) = I_S \\left(\\frac{T}{T_{nom}}\\right)^{XTI/n}
             \\exp\\left(\\frac{E_g}{n V_T(T)}\\left(\\frac{T}{T_{nom}} - 1\\right)\\right) .

The inverse :meth:`DiodeFamily.current` uses the Lambert-W closed form,
evaluated by our own vectorised Newton iteration on the logarithmic form
(no scipy at run time).

The families are generic (never brands). Every number carries an origin tag
in ``origin``: ``"datasheet-generic"`` (typical published data-sheet or
diode-model value of the generic family), ``"common-practice"``,
``"from-memory"`` or ``"demo"`` (invented for the demo scenario).

References
----------
S. M. Sze and K. K. Ng, *Physics of Semiconductor Devices*, 3rd ed., Wiley 2007, ch. 2 (from memory).
P. Antognetti and G. Massobrio, *Semiconductor Device Modeling with SPICE*, 2nd ed.,
McGraw-Hill 1993, ch. 1 (diode model, I_S(T) law) (from memory).
R. M. Corless et al., "On the Lambert W function", Adv. Comput. Math. 5 (1996) 329-359.
"""

from __future__ import annotations

import html
import math
from collections.abc import Mapping
from dataclasses import dataclass, field, fields
from types import MappingProxyType
from typing import Any, Literal

import numpy as np

from .._validate import is_scalar_input, quantity, scalar
from ..errors import DesignError
from ..origins import origin_text
from ..ranges import checked

__all__ = [
    "BOLTZMANN",
    "ELEMENTARY_CHARGE",
    "DiodeFamily",
    "DiodeKind",
    "SMALL_SIGNAL_SILICON",
    "SMALL_SCHOTTKY",
    "SCHOTTKY_1A",
    "FAST_RECOVERY_1A",
    "DIODES",
    "get_diode",
    "thermal_voltage",
    "lambertw_log",
]

BOLTZMANN = 1.380649e-23  # J/K, exact (SI 2019)
ELEMENTARY_CHARGE = 1.602176634e-19  # C, exact (SI 2019)
KELVIN_OFFSET = 273.15

DiodeKind = Literal["pn-signal", "schottky", "fast-recovery", "ultrafast", "rectifier"]
_KINDS = ("pn-signal", "schottky", "fast-recovery", "ultrafast", "rectifier")
ORIGINS = ("datasheet-generic", "common-practice", "from-memory", "demo", "user")


def thermal_voltage(t_c: Any = 25.0) -> Any:
    """Thermal voltage ``V_T = k·T/q`` at a temperature in °C.

    Parameters
    ----------
    t_c : float or array_like
        Junction temperature [°C].

    Returns
    -------
    float or numpy.ndarray
        Thermal voltage [V].

    Examples
    --------
    >>> round(thermal_voltage(25.0) * 1e3, 3)
    25.693
    """
    t = quantity(t_c, "t_c", unit="°C", minimum=-KELVIN_OFFSET, min_inclusive=False)
    return scalar(BOLTZMANN * (np.asarray(t) + KELVIN_OFFSET) / ELEMENTARY_CHARGE)


def lambertw_log(log_x: Any) -> np.ndarray:
    """Principal branch ``w = W(x)`` for ``x = exp(log_x)``, given only ``log_x``.

    Solves ``w + ln w = log_x`` by Newton's method in ``u = ln w``
    (``g(u) = e^u + u - log_x`` is convex and increasing, so after the first
    step the iteration decreases monotonically onto the root). Working with
    ``log_x`` avoids overflow where ``x`` itself would exceed the float range.

    Parameters
    ----------
    log_x : array_like
        Natural logarithm of the Lambert-W argument (any finite real).

    Returns
    -------
    numpy.ndarray
        ``W(exp(log_x)) > 0``.
    """
    lx = np.asarray(log_x, dtype=float)
    big = lx > 1.0
    safe_lx = np.where(big, lx, 2.0)
    w0_big = safe_lx - np.log(safe_lx) + np.log(safe_lx) / safe_lx
    # below: W(x) ~ x/(1+x) for x <= e
    u = np.where(big, np.log(np.maximum(w0_big, 1e-300)), lx - np.log1p(np.exp(np.minimum(lx, 1.0))))
    for _ in range(60):
        eu = np.exp(np.minimum(u, 700.0))
        step = (eu + u - lx) / (eu + 1.0)
        u = u - step
        if np.all(np.abs(step) <= 1e-15 * np.maximum(1.0, np.abs(u))):
            break
    w = np.exp(u)
    # one Newton polish in w itself: exp(u) carries the rounding of u (~1e-13 relative for u ~ 700)
    return np.maximum(w - (w + np.log(w) - lx) * (w / (w + 1.0)), np.finfo(float).tiny)


def _html_table(title: str, rows: list[tuple[str, str]]) -> str:
    body = "".join(f"<tr><td>{html.escape(k)}</td><td>{html.escape(v)}</td></tr>" for k, v in rows)
    return f"<table><caption>{html.escape(title)}</caption>{body}</table>"


def _fmt(x: float, unit: str) -> str:
    if x == 0.0:
        return f"0 {unit}".strip()
    exp3 = int(math.floor(math.log10(abs(x)) / 3.0))
    exp3 = max(-5, min(exp3, 3))
    prefix = {-5: "f", -4: "p", -3: "n", -2: "µ", -1: "m", 0: "", 1: "k", 2: "M", 3: "G"}[exp3]
    return f"{x / 10 ** (3 * exp3):.4g} {prefix}{unit}".strip()


_UNITS = {
    "i_s": "A", "n": "", "r_s": "Ω", "eg": "eV", "xti": "", "v_rrm": "V", "i_f_avg": "A",
    "i_fsm": "A", "q_rr": "C", "t_rr": "s", "c_j": "F", "r_theta_ja": "K/W", "tj_max_c": "°C",
    "i_r": "A", "t_nom_c": "°C",
}


@dataclass(frozen=True)
class DiodeFamily:
    """A diode family: Shockley forward model, ratings, switching and thermal data.

    Parameters
    ----------
    name : str
        Generic family name (never a brand).
    kind : {"pn-signal", "schottky", "fast-recovery", "ultrafast", "rectifier"}
        Technology; PN kinds have reverse-recovery charge, Schottky parts only capacitance.
    i_s : float
        Saturation current at ``t_nom_c`` [A].
    n : float
        Emission coefficient (ideality) [1].
    r_s : float
        Ohmic series resistance [Ω]; 0 allowed.
    eg : float
        Activation energy for the ``I_S(T)`` law [eV] (1.11 silicon PN, ≈0.69 Schottky).
    xti : float
        Saturation-current temperature exponent [1] (3 PN, 2 Schottky).
    v_rrm : float
        Repetitive peak reverse voltage rating [V].
    i_f_avg : float
        Average forward current rating ``I_F(AV)`` [A].
    i_fsm : float
        Non-repetitive surge forward current rating [A].
    q_rr : float
        Reverse-recovery charge at a typical operating point [C] (0 for Schottky).
    t_rr : float
        Reverse-recovery time [s].
    c_j : float
        Junction capacitance near zero bias [F].
    r_theta_ja : float
        Junction-to-ambient thermal resistance, typical mounting [K/W].
    tj_max_c : float
        Maximum junction temperature [°C].
    i_r : float
        Typical reverse leakage near rated voltage at 25 °C [A]; :meth:`leakage` scales it
        with ``V_R/V_RRM`` and doubles it every 10 K (a rough rule, from memory).
    t_nom_c : float
        Temperature at which ``i_s`` was extracted [°C].
    origin : Mapping[str, str]
        Origin tag per numeric field (see module docstring); missing fields count as ``"user"``.

    Raises
    ------
    DesignError
        A value that is not finite or out of its physical range, or an unknown kind/origin tag.

    Examples
    --------
    >>> d = DiodeFamily("my-diode", "pn-signal", i_s=4.352e-9, n=1.906, r_s=0.6458)
    >>> round(d.vf(0.01), 4)
    0.7237
    """

    name: str
    kind: DiodeKind
    i_s: float
    n: float
    r_s: float
    eg: float = 1.11
    xti: float = 3.0
    v_rrm: float = 100.0
    i_f_avg: float = 0.2
    i_fsm: float = 1.0
    q_rr: float = 0.0
    t_rr: float = 0.0
    c_j: float = 0.0
    r_theta_ja: float = 300.0
    tj_max_c: float = 150.0
    i_r: float = 0.0
    t_nom_c: float = 25.0
    origin: Mapping[str, str] = field(default_factory=dict, compare=False)

    def __post_init__(self) -> None:
        if not isinstance(self.name, str) or not self.name:
            raise DesignError(f"name: {self.name!r} is not allowed; give a non-empty string")
        if self.kind not in _KINDS:
            raise DesignError(f"kind: {self.kind!r} is not allowed; choose one of {', '.join(_KINDS)}")
        positive = {"i_s": "A", "n": "", "v_rrm": "V", "i_f_avg": "A", "i_fsm": "A", "r_theta_ja": "K/W"}
        for name, unit in positive.items():
            object.__setattr__(self, name, float(quantity(getattr(self, name), name, unit=unit,
                                                          minimum=0.0, min_inclusive=False)))
        for name, unit in {"r_s": "Ω", "q_rr": "C", "t_rr": "s", "c_j": "F", "i_r": "A"}.items():
            object.__setattr__(self, name, float(quantity(getattr(self, name), name, unit=unit, minimum=0.0)))
        object.__setattr__(self, "eg", float(quantity(self.eg, "eg", unit="eV", minimum=0.1, maximum=5.0)))
        object.__setattr__(self, "xti", float(quantity(self.xti, "xti", minimum=-10.0, maximum=10.0)))
        object.__setattr__(self, "tj_max_c", float(quantity(self.tj_max_c, "tj_max_c", unit="°C",
                                                            minimum=-50.0, maximum=400.0)))
        object.__setattr__(self, "t_nom_c", float(quantity(self.t_nom_c, "t_nom_c", unit="°C",
                                                           minimum=-100.0, maximum=300.0)))
        for key, tag in dict(self.origin).items():
            if tag not in ORIGINS:
                raise DesignError(f"origin[{key!r}]: {tag!r} is not allowed; choose one of {', '.join(ORIGINS)}")
        object.__setattr__(self, "origin", MappingProxyType(dict(self.origin)))

    # -- temperature laws ----------------------------------------------------------------------
    def saturation_current(self, t_c: Any = 25.0) -> Any:
        """Saturation current ``I_S(T)`` from the standard diode-model law [A].

        Parameters
        ----------
        t_c : float or array_like
            Junction temperature [°C].

        Returns
        -------
        float or numpy.ndarray
            ``I_S(T)`` [A].
        """
        t = np.asarray(quantity(t_c, "t_c", unit="°C", minimum=-200.0, maximum=400.0)) + KELVIN_OFFSET
        t_nom = self.t_nom_c + KELVIN_OFFSET
        vt = BOLTZMANN * t / ELEMENTARY_CHARGE
        ratio = t / t_nom
        log_is = math.log(self.i_s) + (self.xti / self.n) * np.log(ratio) + self.eg / (self.n * vt) * (ratio - 1.0)
        return scalar(np.exp(log_is))

    # -- forward characteristic ------------------------------------------------------------------
    def vf(self, i: Any, t_c: Any = 25.0) -> Any:
        """Forward voltage ``V_F = n·V_T·ln(I/I_S + 1) + I·R_S``.

        Parameters
        ----------
        i : float or array_like
            Forward current [A], ``>= 0``.
        t_c : float or array_like
            Junction temperature [°C].

        Returns
        -------
        float or numpy.ndarray
            Forward voltage [V].

        Examples
        --------
        >>> round(SMALL_SIGNAL_SILICON.vf(0.1), 4)
        0.8946
        """
        cur = checked(i, "i", "current")
        temp = quantity(t_c, "t_c", unit="°C", minimum=-200.0, maximum=400.0)
        i_s = np.asarray(self.saturation_current(temp))
        vt = BOLTZMANN * (np.asarray(temp) + KELVIN_OFFSET) / ELEMENTARY_CHARGE
        v = self.n * vt * np.log1p(np.asarray(cur) / i_s) + np.asarray(cur) * self.r_s
        return v.item() if is_scalar_input(cur, temp) else v

    def current(self, v: Any, t_c: Any = 25.0) -> Any:
        """Forward current at a given terminal voltage, explicit Lambert-W form.

        .. math::

            I = \\frac{n V_T}{R_S} W\\left(\\frac{I_S R_S}{n V_T}
                \\exp\\frac{V + I_S R_S}{n V_T}\\right) - I_S

        ``W`` is evaluated from its logarithm by :func:`lambertw_log`, then one
        Newton step on ``V_F(I) - V = 0`` polishes the result. For ``R_S = 0``
        the plain Shockley law ``I = I_S·(exp(V/(n·V_T)) - 1)`` is used.

        Parameters
        ----------
        v : float or array_like
            Terminal voltage, anode to cathode [V]; negative values give ``-I_S < I < 0``.
        t_c : float or array_like
            Junction temperature [°C].

        Returns
        -------
        float or numpy.ndarray
            Forward current [A].

        Raises
        ------
        DesignError
            ``R_S = 0`` and a voltage so high that the current overflows.

        Examples
        --------
        >>> round(SMALL_SIGNAL_SILICON.current(0.7) * 1e3, 4)
        6.4526
        """
        volt = quantity(v, "v", unit="V")
        temp = quantity(t_c, "t_c", unit="°C", minimum=-200.0, maximum=400.0)
        vv, tt = np.broadcast_arrays(np.asarray(volt, dtype=float), np.asarray(temp, dtype=float))
        i_s = np.asarray(self.saturation_current(tt), dtype=float)
        nvt = self.n * BOLTZMANN * (tt + KELVIN_OFFSET) / ELEMENTARY_CHARGE
        if self.r_s == 0.0:
            arg = vv / nvt
            if np.any(arg + np.log(i_s) > 700.0):
                raise DesignError(f"v: {float(np.max(vv)):g} V drives an ideal (R_S = 0) diode to an overflowing "
                                  "current; give a series resistance r_s > 0 or a lower voltage")
            out = i_s * np.expm1(arg)
        else:
            log_x = np.log(i_s * self.r_s / nvt) + (vv + i_s * self.r_s) / nvt
            w = lambertw_log(log_x)
            out = nvt / self.r_s * w - i_s
            # one Newton polish on F(I) = nVt·ln(1 + I/Is) + I·Rs - V (skip reverse region, handled by W)
            fwd = out > 0.0
            safe = np.where(fwd, out, 1.0)
            f_val = nvt * np.log1p(safe / i_s) + safe * self.r_s - vv
            f_der = nvt / (i_s + safe) + self.r_s
            out = np.where(fwd, np.maximum(safe - f_val / f_der, 0.0), out)
        return out.item() if is_scalar_input(volt, temp) else out

    def linearised(self, i_op: float, t_c: float = 25.0) -> tuple[float, float]:
        """Tangent straight-line model ``V_F ≈ V_F0 + r_d·I`` at an operating current.

        ``r_d = dV/dI = n·V_T/(I + I_S) + R_S`` and ``V_F0 = V_F(I_op) - r_d·I_op``.

        Parameters
        ----------
        i_op : float
            Operating current [A], ``> 0``.
        t_c : float
            Junction temperature [°C].

        Returns
        -------
        tuple of float
            ``(v_f0 [V], r_d [Ω])``.
        """
        i_op = float(quantity(i_op, "i_op", unit="A", minimum=0.0, min_inclusive=False))
        t_c = float(quantity(t_c, "t_c", unit="°C", minimum=-200.0, maximum=400.0))
        i_s = float(self.saturation_current(t_c))
        nvt = self.n * float(thermal_voltage(t_c))
        r_d = nvt / (i_op + i_s) + self.r_s
        return float(self.vf(i_op, t_c)) - r_d * i_op, r_d

    def vf_tempco(self, i: Any, t_c: Any = 25.0) -> Any:
        """Forward-voltage temperature coefficient at constant current.

        ``dV_F/dT = (V_F,j - E_g - XTI·V_T)/T`` with ``V_F,j`` the junction part of
        ``V_F`` (series-resistance drop excluded, ``R_S`` taken as temperature independent).

        Parameters
        ----------
        i : float or array_like
            Forward current [A].
        t_c : float or array_like
            Junction temperature [°C].

        Returns
        -------
        float or numpy.ndarray
            Temperature coefficient [V/K] (negative for normal diodes).
        """
        cur = checked(i, "i", "current")
        temp = quantity(t_c, "t_c", unit="°C", minimum=-200.0, maximum=400.0)
        v_j = np.asarray(self.vf(cur, temp)) - np.asarray(cur) * self.r_s
        t_k = np.asarray(temp) + KELVIN_OFFSET
        vt = BOLTZMANN * t_k / ELEMENTARY_CHARGE
        out = (v_j - self.eg - self.xti * vt) / t_k
        return out.item() if is_scalar_input(cur, temp) else out

    def leakage(self, v_reverse: float, t_c: float = 25.0) -> float:
        """Reverse leakage estimate: ``i_r·(V_R/V_RRM)`` doubled every 10 K above 25 °C [A].

        A rough rule (from memory); it matters mainly for Schottky parts when hot.
        """
        v_reverse = float(quantity(v_reverse, "v_reverse", unit="V", minimum=0.0))
        t_c = float(quantity(t_c, "t_c", unit="°C", minimum=-200.0, maximum=400.0))
        return self.i_r * min(v_reverse / self.v_rrm, 1.0) * 2.0 ** ((t_c - 25.0) / 10.0)

    @property
    def has_recovery(self) -> bool:
        """True for PN kinds (reverse-recovery charge matters)."""
        return self.kind != "schottky"

    def __repr__(self) -> str:
        return (f"DiodeFamily({self.name!r}, {self.kind}, I_S={_fmt(self.i_s, 'A')}, n={self.n:g}, "
                f"R_S={_fmt(self.r_s, 'Ω')}, V_RRM={self.v_rrm:g} V, I_F(AV)={_fmt(self.i_f_avg, 'A')}, "
                f"t_rr={_fmt(self.t_rr, 's')})")

    def _repr_html_(self) -> str:
        rows = [("kind", self.kind)]
        for f in fields(self):
            if f.name in _UNITS:
                val = getattr(self, f.name)
                tag = origin_text(self.origin.get(f.name, "user"))
                rows.append((f.name, f"{_fmt(val, _UNITS[f.name])}  [{tag}]"))
        return _html_table(f"diode family {self.name}", rows)


def _tags(default: str, **special: str) -> dict[str, str]:
    keys = ["i_s", "n", "r_s", "eg", "xti", "v_rrm", "i_f_avg", "i_fsm", "q_rr", "t_rr", "c_j",
            "r_theta_ja", "tj_max_c", "i_r"]
    out = dict.fromkeys(keys, default)
    out.update(special)
    return out


#: Small-signal silicon switching diode (DO-35 glass class, ~200 mA, 75-100 V, t_rr 4 ns).
SMALL_SIGNAL_SILICON = DiodeFamily(
    name="small-signal-silicon", kind="pn-signal",
    i_s=4.352e-9, n=1.906, r_s=0.6458, eg=1.11, xti=3.0,
    v_rrm=100.0, i_f_avg=0.2, i_fsm=1.0, q_rr=4e-12, t_rr=4e-9, c_j=4e-12,
    r_theta_ja=350.0, tj_max_c=200.0, i_r=25e-9,
    origin=_tags("datasheet-generic", eg="common-practice", xti="common-practice", i_fsm="from-memory",
                 q_rr="demo", r_theta_ja="from-memory", tj_max_c="from-memory", i_r="from-memory"),
)

#: Small Schottky (SOT-23 class, 200 mA, 30 V).
SMALL_SCHOTTKY = DiodeFamily(
    name="small-schottky", kind="schottky",
    i_s=74.09e-9, n=1.01, r_s=0.692, eg=0.69, xti=2.0,
    v_rrm=30.0, i_f_avg=0.2, i_fsm=0.6, q_rr=0.0, t_rr=5e-9, c_j=10e-12,
    r_theta_ja=500.0, tj_max_c=125.0, i_r=0.5e-6,
    origin=_tags("datasheet-generic", i_fsm="from-memory", q_rr="common-practice", t_rr="from-memory",
                 c_j="from-memory", r_theta_ja="from-memory", tj_max_c="from-memory", i_r="from-memory"),
)

#: 1 A Schottky rectifier (DO-41 class, 40 V).
SCHOTTKY_1A = DiodeFamily(
    name="schottky-1a", kind="schottky",
    i_s=6.678e-6, n=1.04, r_s=0.194, eg=0.69, xti=2.0,
    v_rrm=40.0, i_f_avg=1.0, i_fsm=25.0, q_rr=0.0, t_rr=0.0, c_j=110e-12,
    r_theta_ja=80.0, tj_max_c=125.0, i_r=50e-6,
    origin=_tags("from-memory", i_s="datasheet-generic", n="datasheet-generic", r_s="datasheet-generic",
                 eg="common-practice", xti="common-practice", v_rrm="datasheet-generic",
                 i_f_avg="datasheet-generic", q_rr="common-practice", t_rr="common-practice"),
)

#: Fast-recovery 1 A PN rectifier (DO-41 class, 200 V, t_rr 200 ns). Model values invented (demo)
#: to give V_F ≈ 0.88 V at 0.1 A and ≈ 1.08 V at 1 A, typical of the class (from memory).
FAST_RECOVERY_1A = DiodeFamily(
    name="fast-recovery-1a", kind="fast-recovery",
    i_s=2e-9, n=1.9, r_s=0.1, eg=1.11, xti=3.0,
    v_rrm=200.0, i_f_avg=1.0, i_fsm=30.0, q_rr=60e-9, t_rr=200e-9, c_j=15e-12,
    r_theta_ja=65.0, tj_max_c=150.0, i_r=1e-6,
    origin=_tags("from-memory", i_s="demo", n="demo", r_s="demo", eg="common-practice",
                 xti="common-practice", q_rr="demo", c_j="demo"),
)

#: Registry of the built-in generic families, keyed by name.
DIODES: Mapping[str, DiodeFamily] = MappingProxyType({
    d.name: d for d in (SMALL_SIGNAL_SILICON, SMALL_SCHOTTKY, SCHOTTKY_1A, FAST_RECOVERY_1A)
})


def get_diode(name_or_family: str | DiodeFamily) -> DiodeFamily:
    """Look up a built-in diode family by name, or pass a :class:`DiodeFamily` through.

    Names are matched case-insensitively; ``_`` and spaces count as ``-``.

    Parameters
    ----------
    name_or_family : str or DiodeFamily
        A registry name such as ``"schottky-1a"`` or a user family.

    Returns
    -------
    DiodeFamily

    Raises
    ------
    DesignError
        Unknown name; the message lists the known names.

    Examples
    --------
    >>> get_diode("Schottky_1A").i_f_avg
    1.0
    """
    from ._registry import lookup

    return lookup(name_or_family, DIODES, DiodeFamily, "diode")
