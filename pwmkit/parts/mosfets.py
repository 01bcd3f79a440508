"""Generic N-channel MOSFET families as data: R_DS(on), gate charge, capacitance, thermal data.

A :class:`MosfetFamily` carries the handful of data-sheet numbers that the
low-side switch models in :mod:`pwmkit.loads.mosfet` need, with an origin tag
per value (``"datasheet-generic"``, ``"common-practice"``, ``"from-memory"``,
``"demo"``, or ``"user"`` for your own numbers). The two built-in families are
made-up but realistic (tagged ``"demo"``); for a real design pass the numbers
from your part's data sheet to the constructor.

Gate-charge curve used throughout (Mohan, Undeland & Robbins, Power Electronics, 3rd ed., §2-7 and ch. 22, from memory, linear pieces):

* ``0 … V_pl``: ``Q = Q_gs·V/V_pl`` (``C_iss ≈ Q_gs/V_pl``);
* Miller plateau at ``V_pl``: ``Q_gs … Q_gs + Q_gd``;
* above: ``Q = Q_gs + Q_gd + s·(V - V_pl)`` with ``s = (Q_g - Q_gs - Q_gd)/(V_GS,Q - V_pl)``
  (post-plateau slope through the rated point; extrapolates above it).

References
----------
N. Mohan, T. M. Undeland, W. P. Robbins, *Power Electronics*, 3rd ed., Wiley 2003, ch. 22 (power
MOSFETs) and ch. 28 (gate drives) (from memory).
B. J. Baliga, *Fundamentals of Power Semiconductor Devices*, Springer 2008, ch. 6 (from memory).
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass, field, fields
from types import MappingProxyType
from typing import Any, Literal

import numpy as np

from .._validate import is_scalar_input, quantity
from ..errors import DesignError
from ..origins import origin_text
from .diodes import ORIGINS, _fmt, _html_table

__all__ = ["MosfetFamily", "LOGIC_LEVEL_30V", "STANDARD_LEVEL_60V", "MOSFETS", "get_mosfet"]

_UNITS = {
    "v_ds_max": "V", "i_d_max": "A", "rds_on": "Ω", "v_gs_rated": "V", "rds_on_at_4v5": "Ω", "alpha": "/K",
    "v_th": "V", "v_plateau": "V", "q_g": "C", "v_gs_q": "V", "q_gs": "C", "q_gd": "C", "r_g_int": "Ω",
    "c_oss": "F", "v_gs_max": "V", "r_theta_ja": "K/W", "r_theta_jc": "K/W", "tj_max_c": "°C",
}


@dataclass(frozen=True)
class MosfetFamily:
    """An N-channel enhancement MOSFET family for low-side switching.

    Parameters
    ----------
    name : str
        Generic name (never a brand).
    level : {"logic", "standard"}
        Gate-drive class: logic-level parts are specified at 4.5 V, standard ones at 10 V.
    v_ds_max : float
        Drain-source voltage rating [V].
    i_d_max : float
        Continuous drain current rating, case at 25 °C [A].
    rds_on : float
        On-resistance at ``v_gs_rated`` and 25 °C [Ω].
    v_gs_rated : float
        Gate voltage at which ``rds_on`` is given [V].
    rds_on_at_4v5 : float, optional
        On-resistance at 4.5 V gate drive, 25 °C [Ω] (logic-level parts).
    alpha : float
        R_DS(on) temperature coefficient per kelvin [1/K]: ``R(T) = R_25·(1 + α)^(T - 25)``.
    v_th : float
        Gate threshold voltage [V].
    v_plateau : float
        Miller plateau voltage at the rated test current [V].
    q_g : float
        Total gate charge at ``v_gs_q`` (regression pin).
    v_gs_q : float
        Gate voltage at which ``q_g`` is given [V].
    q_gs, q_gd : float
        Gate-source and gate-drain (Miller) charge (regression pin).
    r_g_int : float
        Internal gate resistance [Ω].
    c_oss : float
        Output capacitance (energy-related) [F].
    v_gs_max : float
        Absolute maximum gate-source voltage [V].
    r_theta_ja, r_theta_jc : float
        Junction to ambient (typical mounting) and junction to case [K/W].
    tj_max_c : float
        Maximum junction temperature [°C].
    origin : Mapping[str, str]
        Origin tag per numeric field.

    Raises
    ------
    DesignError
        Out-of-range values or an inconsistent gate-charge curve
        (``v_th < v_plateau < v_gs_q``, ``q_gs + q_gd < q_g`` required).

    Examples
    --------
    >>> m = MosfetFamily("mine", "standard", 60, 30, 0.02, 10, None, 0.007, 2.5, 4.5, 20e-9, 10,
    ...                  5e-9, 8e-9, 2.0, 200e-12, 20, 62, 1.5, 175)
    >>> round(m.q_g_at(12.0) * 1e9, 2)
    22.55
    """

    name: str
    level: Literal["logic", "standard"]
    v_ds_max: float
    i_d_max: float
    rds_on: float
    v_gs_rated: float
    rds_on_at_4v5: float | None
    alpha: float
    v_th: float
    v_plateau: float
    q_g: float
    v_gs_q: float
    q_gs: float
    q_gd: float
    r_g_int: float
    c_oss: float
    v_gs_max: float
    r_theta_ja: float
    r_theta_jc: float
    tj_max_c: float
    origin: Mapping[str, str] = field(default_factory=dict, compare=False)

    def __post_init__(self) -> None:
        if not isinstance(self.name, str) or not self.name:
            raise DesignError(f"name: {self.name!r} is not allowed; give a non-empty string")
        if self.level not in ("logic", "standard"):
            raise DesignError(f"level: {self.level!r} is not allowed; choose 'logic' or 'standard'")
        for name, unit in _UNITS.items():
            val = getattr(self, name)
            if name == "rds_on_at_4v5" and val is None:
                continue
            low = 0.0
            strict = name not in ("r_g_int", "c_oss", "alpha")
            if name == "tj_max_c":
                low, strict = 25.0, True
            val = float(quantity(val, name, unit=unit, minimum=low, min_inclusive=not strict))
            object.__setattr__(self, name, val)
        if self.alpha > 0.05:
            raise DesignError(f"alpha: {self.alpha:g} /K is out of range; give a fraction per kelvin "
                              "(0.005 … 0.008 typical), not percent")
        if not self.v_th < self.v_plateau < self.v_gs_q:
            raise DesignError(f"v_plateau: {self.v_plateau:g} V must lie between v_th = {self.v_th:g} V and "
                              f"v_gs_q = {self.v_gs_q:g} V (gate-charge curve order)")
        if not self.v_plateau < self.v_gs_rated <= self.v_gs_max:
            raise DesignError(f"v_gs_rated: {self.v_gs_rated:g} V must lie above v_plateau = {self.v_plateau:g} V "
                              f"and not above v_gs_max = {self.v_gs_max:g} V")
        if self.q_gs + self.q_gd >= self.q_g:
            raise DesignError(f"q_g: {self.q_g:g} C must exceed q_gs + q_gd = {self.q_gs + self.q_gd:g} C")
        if self.rds_on_at_4v5 is not None:
            if self.v_plateau >= 4.5 or self.v_gs_rated <= 4.5:
                raise DesignError("rds_on_at_4v5: given, but 4.5 V is not between v_plateau "
                                  f"{self.v_plateau:g} V and v_gs_rated {self.v_gs_rated:g} V")
            if self.rds_on_at_4v5 < self.rds_on:
                raise DesignError(f"rds_on_at_4v5: {self.rds_on_at_4v5:g} Ω is below rds_on = {self.rds_on:g} Ω "
                                  "at the higher gate voltage; on-resistance falls with gate drive")
        for key, tag in dict(self.origin).items():
            if tag not in ORIGINS:
                raise DesignError(f"origin[{key!r}]: {tag!r} is not allowed; choose one of {', '.join(ORIGINS)}")
        object.__setattr__(self, "origin", MappingProxyType(dict(self.origin)))

    # -- derived data -----------------------------------------------------------------------------
    @property
    def v_gs_min_rated(self) -> float:
        """Lowest gate voltage at which an R_DS(on) is guaranteed (4.5 V or ``v_gs_rated``) [V]."""
        return 4.5 if self.rds_on_at_4v5 is not None else self.v_gs_rated

    @property
    def c_iss(self) -> float:
        """Effective input capacitance below the plateau ``Q_gs/V_pl`` [F]."""
        return self.q_gs / self.v_plateau

    @property
    def q_gs2(self) -> float:
        """Gate charge from ``V_th`` to the plateau ``Q_gs·(V_pl - V_th)/V_pl`` (regression pin)."""
        return self.q_gs * (self.v_plateau - self.v_th) / self.v_plateau

    @property
    def post_plateau_slope(self) -> float:
        """Gate charge slope above the plateau [C/V]."""
        return (self.q_g - self.q_gs - self.q_gd) / (self.v_gs_q - self.v_plateau)

    def q_g_at(self, v_gs: Any) -> Any:
        """Gate charge needed to reach ``v_gs`` from 0 V (piecewise-linear curve) (regression pin).

        Parameters
        ----------
        v_gs : float or array_like
            Gate-source voltage [V], ``>= 0``.

        Returns
        -------
        float or numpy.ndarray
            Charge (regression pin); above the plateau it includes the whole Miller charge.
        """
        v = quantity(v_gs, "v_gs", unit="V", minimum=0.0)
        va = np.asarray(v, dtype=float)
        below = self.q_gs * va / self.v_plateau
        above = self.q_gs + self.q_gd + self.post_plateau_slope * (va - self.v_plateau)
        out = np.where(va <= self.v_plateau, below, above)
        return float(out) if is_scalar_input(v) else out

    def rds_on_at(self, v_gs: Any, tj_c: Any = 25.0) -> Any:
        """On-resistance at a gate voltage and junction temperature [Ω].

        At or above ``v_gs_rated`` the rated value is used (no credit for
        over-drive). Between the plateau and the rating an estimate is made from
        the channel law ``R = R_0 + K/(V_GS - V_th)`` fitted through the two rated
        points (or ``R ∝ 1/(V_GS - V_th)`` when only one is known; from memory,
        optimistic far below the rating). Temperature law ``(1 + α)^(T - 25)``.

        Parameters
        ----------
        v_gs : float or array_like
            Gate voltage [V], above ``v_plateau``.
        tj_c : float or array_like
            Junction temperature [°C].

        Returns
        -------
        float or numpy.ndarray
            R_DS(on) [Ω].

        Raises
        ------
        DesignError
            Gate voltage at or below the plateau: the channel is not fully on.
        """
        v = quantity(v_gs, "v_gs", unit="V", minimum=self.v_plateau, min_inclusive=False)
        t = quantity(tj_c, "tj_c", unit="°C", minimum=-60.0, maximum=400.0)
        va = np.asarray(v, dtype=float)
        if self.rds_on_at_4v5 is not None:
            k = (self.rds_on_at_4v5 - self.rds_on) / (1.0 / (4.5 - self.v_th) - 1.0 / (self.v_gs_rated - self.v_th))
            r0 = max(self.rds_on - k / (self.v_gs_rated - self.v_th), 0.0)
            k = (self.rds_on - r0) * (self.v_gs_rated - self.v_th)
            est = r0 + k / (va - self.v_th)
        else:
            est = self.rds_on * (self.v_gs_rated - self.v_th) / (va - self.v_th)
        r25 = np.where(va >= self.v_gs_rated, self.rds_on, est)
        out = r25 * (1.0 + self.alpha) ** (np.asarray(t, dtype=float) - 25.0)
        return float(out) if is_scalar_input(v, t) else out

    def __repr__(self) -> str:
        return (f"MosfetFamily({self.name!r}, {self.level}-level, {self.v_ds_max:g} V, "
                f"R_DS(on)={_fmt(self.rds_on, 'Ω')} @ {self.v_gs_rated:g} V, Q_g={_fmt(self.q_g, 'C')} @ "
                f"{self.v_gs_q:g} V, V_th={self.v_th:g} V)")

    def _repr_html_(self) -> str:
        rows = [("level", self.level)]
        for f in fields(self):
            if f.name in _UNITS:
                val = getattr(self, f.name)
                text = "—" if val is None else _fmt(val, _UNITS[f.name])
                rows.append((f.name, f"{text}  [{origin_text(self.origin.get(f.name, 'user'))}]"))
        return _html_table(f"MOSFET family {self.name}", rows)


def _demo_tags(**special: str) -> dict[str, str]:
    out = dict.fromkeys(_UNITS, "demo")
    out.update(special)
    return out


#: Logic-level 30 V MOSFET, SO-8 class (made-up, realistic demo values).
LOGIC_LEVEL_30V = MosfetFamily(
    name="logic-level-30v", level="logic", v_ds_max=30.0, i_d_max=10.0,
    rds_on=0.018, v_gs_rated=10.0, rds_on_at_4v5=0.026, alpha=0.005,
    v_th=1.8, v_plateau=3.0, q_g=12e-9, v_gs_q=10.0, q_gs=2.5e-9, q_gd=3e-9,
    r_g_int=1.5, c_oss=150e-12, v_gs_max=20.0, r_theta_ja=62.0, r_theta_jc=20.0, tj_max_c=150.0,
    origin=_demo_tags(r_theta_ja="from-memory", tj_max_c="common-practice", v_gs_max="common-practice"),
)

#: Standard-level 60 V MOSFET, TO-220 class (made-up, realistic demo values).
STANDARD_LEVEL_60V = MosfetFamily(
    name="standard-level-60v", level="standard", v_ds_max=60.0, i_d_max=30.0,
    rds_on=0.025, v_gs_rated=10.0, rds_on_at_4v5=None, alpha=0.0055,
    v_th=3.0, v_plateau=5.0, q_g=30e-9, v_gs_q=10.0, q_gs=7e-9, q_gd=10e-9,
    r_g_int=2.0, c_oss=250e-12, v_gs_max=20.0, r_theta_ja=62.0, r_theta_jc=1.5, tj_max_c=175.0,
    origin=_demo_tags(r_theta_ja="from-memory", v_gs_max="common-practice"),
)

#: Registry of the built-in generic families, keyed by name.
MOSFETS: Mapping[str, MosfetFamily] = MappingProxyType({m.name: m for m in (LOGIC_LEVEL_30V, STANDARD_LEVEL_60V)})


def get_mosfet(name_or_family: str | MosfetFamily) -> MosfetFamily:
    """Look up a built-in MOSFET family by name, or pass a :class:`MosfetFamily` through.

    Raises
    ------
    DesignError
        Unknown name; the message lists the known names.

    Examples
    --------
    >>> get_mosfet("logic_level_30v").v_gs_min_rated
    4.5
    """
    from ._registry import lookup

    return lookup(name_or_family, MOSFETS, MosfetFamily, "mosfet", "MOSFET")
