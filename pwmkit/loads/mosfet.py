"""Low-side MOSFET driven from a timer output: gate drive, switching and conduction loss, T_j.

Model (Mohan, Undeland & Robbins, Power Electronics, 3rd ed., §2-7 and ch. 22, from memory): clamped inductive load with a freewheel diode, gate
charge curve of :class:`pwmkit.parts.mosfets.MosfetFamily`, gate loop
resistances ``R_on = R_source + R_G,ext + R_G,int`` and
``R_off = R_sink + R_G,ext + R_G,int``:

.. math::

    I_{G,on} = \\frac{V_{drv} - V_{pl}}{R_{on}}, \\quad I_{G,off} = \\frac{V_{pl} - V_{low}}{R_{off}},
    \\quad t_{ri} = \\frac{Q_{gs2}}{I_{G,on}}, \\quad t_{fv} = \\frac{Q_{gd}}{I_{G,on}},
    \\quad t_{rv} = \\frac{Q_{gd}}{I_{G,off}}, \\quad t_{fi} = \\frac{Q_{gs2}}{I_{G,off}}

    P_{sw} = \\tfrac12 V f (I_{on} t_{on} + I_{off} t_{off}), \\quad
    P_{gate} = Q_g(V_{drv}) V_{drv} f, \\quad P_{cond} = I_{rms}^2 R_{DS(on)}(T_j)

and ``T_j = T_a + R_θ·P(T_j)`` solved by :func:`pwmkit.loads.thermal.junction_temperature`.
The timer's output-high level under load and its output resistances are plain
numbers here (take them from :mod:`pwmkit.parts.timers`).

Safety: a MOSFET that is under-driven, switched slowly or poorly cooled runs
hot enough to burn skin and to damage boards; check the real part's data sheet
and safe operating area, and follow local codes and licensed practice for
anything mains-connected.

References
----------
N. Mohan, T. M. Undeland, W. P. Robbins, *Power Electronics*, 3rd ed., Wiley 2003, §2-7 eq. (2-6),
ch. 22, ch. 28, ch. 29 (from memory).
R. W. Erickson, D. Maksimović, *Fundamentals of Power Electronics*, 2nd ed., Kluwer 2001, §4.3
(switching loss, diode recovered charge) (from memory).
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Any

import numpy as np

from .._validate import is_scalar_input, quantity
from ..errors import DesignError, ModelLimit
from ..parts.mosfets import MosfetFamily, get_mosfet
from .thermal import junction_temperature, result_html, result_repr

__all__ = ["GateDrive", "MosfetLosses", "gate_drive", "mosfet_losses"]

_GD_UNITS = {
    "v_gate_on": "V", "v_gs_min_rated": "V", "gate_margin": "V", "fully_enhanced": "", "gate_overvoltage": "",
    "rds_on_25": "Ω", "rds_estimated": "", "r_loop_on": "Ω", "r_loop_off": "Ω", "i_g_on": "A", "i_g_off": "A",
    "c_iss": "F", "q_gs2": "C", "q_g_drive": "C", "t_d_on": "s", "t_ri": "s", "t_fv": "s", "t_on": "s",
    "t_d_off": "s", "t_rv": "s", "t_fi": "s", "t_off": "s",
}


@dataclass(frozen=True)
class GateDrive:
    """Gate drive of a MOSFET from a voltage source with output resistance.

    Attributes
    ----------
    mosfet : MosfetFamily
        The switch.
    v_gate_on, v_gate_off : float
        Gate voltage when driven high / low [V].
    v_gs_min_rated : float
        Lowest gate voltage with a guaranteed R_DS(on) [V].
    gate_margin : float
        ``v_gate_on - v_gs_min_rated`` [V]; negative means under-driven.
    fully_enhanced : bool
        ``gate_margin >= 0``.
    gate_overvoltage : bool
        Drive above the absolute-maximum gate voltage.
    rds_on_25 : float
        On-resistance at this drive, 25 °C [Ω] (estimate when under-driven).
    rds_estimated : bool
        True when ``rds_on_25`` is an estimate below the rated gate voltage.
    r_loop_on, r_loop_off : float
        Gate loop resistances for turn-on / turn-off [Ω].
    i_g_on, i_g_off : float
        Gate currents on the Miller plateau [A].
    c_iss, q_gs2, q_g_drive : float
        Input capacitance [F], charge from V_th to plateau (regression pin), total charge at the drive level (regression pin).
    t_d_on, t_ri, t_fv, t_on : float
        Turn-on delay, current rise, voltage fall, and ``t_on = t_ri + t_fv`` [s].
    t_d_off, t_rv, t_fi, t_off : float
        Turn-off delay, voltage rise, current fall, and ``t_off = t_rv + t_fi`` [s].
    """

    mosfet: MosfetFamily
    v_gate_on: float
    v_gate_off: float
    v_gs_min_rated: float
    gate_margin: float
    fully_enhanced: bool
    gate_overvoltage: bool
    rds_on_25: float
    rds_estimated: bool
    r_loop_on: float
    r_loop_off: float
    i_g_on: float
    i_g_off: float
    c_iss: float
    q_gs2: float
    q_g_drive: float
    t_d_on: float
    t_ri: float
    t_fv: float
    t_on: float
    t_d_off: float
    t_rv: float
    t_fi: float
    t_off: float

    def __repr__(self) -> str:
        return result_repr(self, _GD_UNITS)

    def _repr_html_(self) -> str:
        return result_html(self, _GD_UNITS, f"gate drive of {self.mosfet.name}")


def gate_drive(
    v_drive_high: float,
    r_source: float,
    r_gate: float,
    mosfet: MosfetFamily | str,
    *,
    r_sink: float | None = None,
    v_drive_low: float = 0.0,
) -> GateDrive:
    """Gate drive and gate-charge switching times of a MOSFET (Mohan, Undeland & Robbins, Power Electronics, 3rd ed., §2-7 and ch. 22, from memory).

    .. math::

        t_{d(on)} = R_{on} C_{iss} \\ln\\frac{V_{drv} - V_{low}}{V_{drv} - V_{th}}, \\quad
        t_{d(off)} = R_{off} C_{iss} \\ln\\frac{V_{drv} - V_{low}}{V_{pl} - V_{low}},
        \\quad Q_{gs2} = Q_{gs}\\frac{V_{pl} - V_{th}}{V_{pl}}, \\quad C_{iss} = Q_{gs}/V_{pl}

    Parameters
    ----------
    v_drive_high : float
        Driver output-high level at the gate-charging current, e.g. the timer's
        output-high voltage [V].
    r_source : float
        Driver pull-up (source) output resistance [Ω].
    r_gate : float
        External gate resistor [Ω].
    mosfet : MosfetFamily or str
        The switch, or a registry name of :mod:`pwmkit.parts.mosfets`.
    r_sink : float, optional
        Driver pull-down (sink) output resistance [Ω]; defaults to ``r_source``.
    v_drive_low : float
        Driver output-low level [V], below ``v_th``.

    Returns
    -------
    GateDrive
        Gate margin and flags, loop resistances, plateau currents, charges and
        all switching times (see :class:`GateDrive`).

    Raises
    ------
    DesignError
        ``v_drive_high <= v_plateau`` (the switch never leaves the Miller plateau:
        it never fully turns on and would sit in its linear region), or
        ``v_drive_low >= v_th`` (it never turns off), or bad numbers.

    Notes
    -----
    Under-drive between the plateau and the rated gate voltage is *not* an
    error: ``fully_enhanced`` is False and ``rds_on_25`` is an estimate.
    Constant plateau voltage (taken at the data-sheet test current). A driver's
    own edge rate (≈100 ns for a bipolar 555-type output) can dominate when the
    gate-charge times come out shorter; compare with the timer's rise/fall time.
    Reproduces Mohan, Undeland & Robbins, Power Electronics, 3rd ed., §2-7 and ch. 22, from memory: 12 V drive, 10 Ω + 10 Ω + 2 Ω → t_on 29.99 ns, t_off 49.98 ns.

    Examples
    --------
    >>> from pwmkit.parts.mosfets import STANDARD_LEVEL_60V
    >>> g = gate_drive(12.0, 10.0, 10.0, STANDARD_LEVEL_60V)
    >>> g.fully_enhanced, round(g.t_fv * 1e9, 1)
    (True, 31.4)
    """
    fet = get_mosfet(mosfet)
    v_hi = float(quantity(v_drive_high, "v_drive_high", unit="V", minimum=0.0, min_inclusive=False))
    r_src = float(quantity(r_source, "r_source", unit="Ω", minimum=0.0))
    r_g = float(quantity(r_gate, "r_gate", unit="Ω", minimum=0.0))
    r_snk = r_src if r_sink is None else float(quantity(r_sink, "r_sink", unit="Ω", minimum=0.0))
    v_lo = float(quantity(v_drive_low, "v_drive_low", unit="V", minimum=-30.0))
    if v_hi <= fet.v_plateau:
        raise ModelLimit(f"v_drive_high: {v_hi:g} V does not exceed the Miller plateau {fet.v_plateau:g} V of "
                          f"{fet.name}; the MOSFET never fully turns on (it would sit in its linear region and "
                          "overheat) — use a logic-level part or a higher drive voltage")
    if v_lo >= fet.v_th:
        raise ModelLimit(f"v_drive_low: {v_lo:g} V is not below the threshold {fet.v_th:g} V of {fet.name}; "
                          "the MOSFET never turns off")
    r_on = r_src + r_g + fet.r_g_int
    r_off = r_snk + r_g + fet.r_g_int
    if r_on <= 0.0 or r_off <= 0.0:
        raise DesignError("r_source, r_gate: the gate loop resistance is zero; give the driver output resistance "
                          "or the MOSFET's internal gate resistance r_g_int > 0")
    c_iss = fet.c_iss
    q_gs2 = fet.q_gs2
    i_on = (v_hi - fet.v_plateau) / r_on
    i_off = (fet.v_plateau - v_lo) / r_off
    t_d_on = r_on * c_iss * math.log((v_hi - v_lo) / (v_hi - fet.v_th))
    t_ri = q_gs2 / i_on
    t_fv = fet.q_gd / i_on
    t_d_off = r_off * c_iss * math.log((v_hi - v_lo) / (fet.v_plateau - v_lo))
    t_rv = fet.q_gd / i_off
    t_fi = q_gs2 / i_off
    margin = v_hi - fet.v_gs_min_rated
    return GateDrive(
        mosfet=fet, v_gate_on=v_hi, v_gate_off=v_lo, v_gs_min_rated=fet.v_gs_min_rated, gate_margin=margin,
        fully_enhanced=bool(margin >= 0.0), gate_overvoltage=bool(v_hi > fet.v_gs_max or v_lo < -fet.v_gs_max),
        rds_on_25=float(fet.rds_on_at(v_hi, 25.0)), rds_estimated=bool(v_hi < fet.v_gs_rated and
                                                                       v_hi != fet.v_gs_min_rated),
        r_loop_on=r_on, r_loop_off=r_off, i_g_on=i_on, i_g_off=i_off, c_iss=c_iss, q_gs2=q_gs2,
        q_g_drive=float(fet.q_g_at(v_hi - v_lo)) if v_hi - v_lo > 0 else 0.0,
        t_d_on=t_d_on, t_ri=t_ri, t_fv=t_fv, t_on=t_ri + t_fv, t_d_off=t_d_off, t_rv=t_rv, t_fi=t_fi,
        t_off=t_rv + t_fi,
    )


_ML_UNITS = {
    "t_d_on": "s", "t_ri": "s", "t_fv": "s", "t_d_off": "s", "t_rv": "s", "t_fi": "s", "t_on": "s", "t_off": "s",
    "p_sw_on": "W", "p_sw_off": "W", "p_sw": "W", "p_coss": "W", "p_rr": "W",
    "p_gate": "W", "p_gate_internal": "W", "p_cond": "W", "p_total": "W", "rds_on_hot": "Ω", "tj_c": "°C",
    "tj_margin": "K", "runaway": "", "over_temperature": "", "v_ds_margin": "V", "gate_margin": "V",
    "fully_enhanced": "",
}


@dataclass(frozen=True)
class MosfetLosses:
    """Loss budget and junction temperature of a hard-switched low-side MOSFET.

    Attributes
    ----------
    gate : GateDrive
        Gate drive used (loop resistances, gate currents, charges).
    t_d_on, t_ri, t_fv, t_d_off, t_rv, t_fi : float
        Turn-on delay, current rise, voltage fall; turn-off delay, voltage rise, current fall [s].
    t_on, t_off : float
        Switching transition times ``t_ri + t_fv`` and ``t_rv + t_fi`` [s].
    p_sw_on, p_sw_off, p_sw : float or array
        Turn-on, turn-off and total V·I overlap loss [W].
    p_coss, p_rr : float or array
        Output-capacitance loss ``½·C_oss·V²·f`` and diode-recovery loss ``Q_rr·V·f`` in the switch [W].
    p_gate : float or array
        Gate-drive power ``Q_g(V)·V·f`` (mostly in the driver and gate resistors) [W].
    p_gate_internal : float or array
        Share of ``p_gate`` in the MOSFET's internal gate resistance [W].
    p_cond : float, array or None
        Conduction loss ``I_rms²·R_DS(on)(T_j)`` [W].
    p_total : float, array or None
        Total dissipated in the MOSFET [W].
    rds_on_hot : float, array or None
        R_DS(on) at the junction temperature [Ω].
    tj_c : float, array or None
        Junction temperature [°C]. ``None`` (scalar) / masked (array) under thermal runaway.
    tj_margin : float, array or None
        ``tj_max_c - tj_c`` [K].
    runaway : bool or array
        No stable junction temperature below the solver limit (thermal runaway).
    over_temperature : bool or array
        ``tj_c > tj_max_c`` or runaway.
    v_ds_margin : float or array
        ``v_ds_max - v_ds`` [V].
    gate_margin : float
        Gate voltage above the lowest rated R_DS(on) drive [V].
    fully_enhanced : bool
        ``gate_margin >= 0``.
    """

    gate: GateDrive
    t_d_on: float
    t_ri: float
    t_fv: float
    t_d_off: float
    t_rv: float
    t_fi: float
    t_on: float
    t_off: float
    p_sw_on: Any
    p_sw_off: Any
    p_sw: Any
    p_coss: Any
    p_rr: Any
    p_gate: Any
    p_gate_internal: Any
    p_cond: Any
    p_total: Any
    rds_on_hot: Any
    tj_c: Any
    tj_margin: Any
    runaway: Any
    over_temperature: Any
    v_ds_margin: Any
    gate_margin: float
    fully_enhanced: bool

    def __repr__(self) -> str:
        return result_repr(self, _ML_UNITS)

    def _repr_html_(self) -> str:
        return result_html(self, _ML_UNITS, f"losses of {self.gate.mosfet.name}")


def mosfet_losses(
    gate: GateDrive,
    v_ds: Any,
    i_on: Any,
    i_rms: Any,
    f: Any,
    t_ambient_c: Any = 25.0,
    *,
    i_off: Any = None,
    r_theta: float | None = None,
    q_rr: float = 0.0,
    extras: bool = True,
) -> MosfetLosses:
    """Switching, gate and conduction loss of a low-side MOSFET and its junction temperature.

    .. math::

        P = \\tfrac12 V f (I_{on} t_{on} + I_{off} t_{off}) + \\tfrac12 C_{oss} V^2 f + Q_{rr} V f
            + P_{G,int} + I_{rms}^2 R_{25} (1 + α)^{T_j - 25}, \\qquad T_j = T_a + R_θ P(T_j)

    Parameters
    ----------
    gate : GateDrive
        From :func:`gate_drive`.
    v_ds : float or array_like
        Switched drain voltage (supply plus diode drop for a clamped inductive load) [V].
    i_on : float or array_like
        Drain current at turn-on [A] (``I_min`` in CCM, 0 in DCM).
    i_rms : float or array_like
        RMS switch current over the period [A].
    f : float or array_like
        Switching frequency [Hz].
    t_ambient_c : float or array_like
        Ambient temperature [°C].
    i_off : float or array_like, optional
        Drain current at turn-off [A] (``I_max``); defaults to ``i_on``.
    r_theta : float, optional
        Junction-to-ambient thermal resistance [K/W]; defaults to the family's ``r_theta_ja``.
    q_rr : float
        Freewheel-diode recovered charge dumped into the switch at turn-on (regression pin) (0 for Schottky).
    extras : bool
        Include ``p_coss``, ``p_rr`` and ``p_gate_internal`` in the total (True), or
        only switching overlap plus conduction (False, the textbook budget).

    Returns
    -------
    MosfetLosses
        All losses [W], ``tj_c`` [°C], margins, flags (see :class:`MosfetLosses`).

    Raises
    ------
    DesignError
        Out-of-range inputs.

    Notes
    -----
    Thermal runaway (no operating temperature: R_DS(on) rises faster with
    temperature than the heat path can remove) is reported as a result with
    ``runaway = True`` and *no* temperature: ``tj_c``, ``p_cond``, ``p_total``,
    ``rds_on_hot`` and ``tj_margin`` are ``None`` (scalar input) or masked
    (array input). It is not raised, so a sweep can show where it starts.
    Reproduces Mohan, Undeland & Robbins, Power Electronics, 3rd ed., §2-7 and ch. 22, from memory (extras off): P_sw 19.19 mW, T_j 45.19 °C,
    R_DS(on) 23.02 mΩ.

    Examples
    --------
    >>> from pwmkit.parts.mosfets import STANDARD_LEVEL_60V
    >>> g = gate_drive(12.0, 10.0, 10.0, STANDARD_LEVEL_60V)
    >>> res = mosfet_losses(g, 12.0, 2.0, 1.6733, 20e3, 40.0)
    >>> res.runaway, res.tj_c < 60.0
    (False, True)
    """
    if not isinstance(gate, GateDrive):
        raise DesignError(f"gate: {type(gate).__name__} is not a GateDrive; build one with gate_drive(...)")
    fet = gate.mosfet
    v = quantity(v_ds, "v_ds", unit="V", minimum=0.0)
    ion = quantity(i_on, "i_on", unit="A", minimum=0.0)
    ioff = ion if i_off is None else quantity(i_off, "i_off", unit="A", minimum=0.0)
    irms = quantity(i_rms, "i_rms", unit="A", minimum=0.0)
    fr = quantity(f, "f", unit="Hz", minimum=0.0, min_inclusive=False)
    ta = quantity(t_ambient_c, "t_ambient_c", unit="°C", minimum=-60.0, maximum=200.0)
    rth = fet.r_theta_ja if r_theta is None else float(quantity(r_theta, "r_theta", unit="K/W", minimum=0.0))
    qrr = float(quantity(q_rr, "q_rr", unit="C", minimum=0.0))
    scalar_out = is_scalar_input(v, ion, ioff, irms, fr, ta)
    try:
        va, iona, ioffa, irmsa, fa, taa = np.broadcast_arrays(
            *(np.asarray(x, dtype=float) for x in (v, ion, ioff, irms, fr, ta)))
    except ValueError as exc:
        raise DesignError(f"mosfet_losses: array shapes do not broadcast ({exc})") from None

    p_sw_on = 0.5 * va * iona * gate.t_on * fa
    p_sw_off = 0.5 * va * ioffa * gate.t_off * fa
    p_coss = 0.5 * fet.c_oss * va * va * fa
    p_rr = qrr * va * fa
    dv = gate.v_gate_on - gate.v_gate_off
    p_gate = gate.q_g_drive * dv * fa
    p_gate_int = 0.5 * p_gate * (fet.r_g_int / gate.r_loop_on + fet.r_g_int / gate.r_loop_off)
    p_fixed = p_sw_on + p_sw_off + (p_coss + p_rr + p_gate_int if extras else 0.0)
    r25 = gate.rds_on_25
    i2 = irmsa * irmsa

    def power(tj: np.ndarray) -> np.ndarray:
        return p_fixed + i2 * r25 * (1.0 + fet.alpha) ** (np.minimum(tj, 1000.0) - 25.0)

    th = junction_temperature(power, rth, taa, tj_limit_c=max(400.0, fet.tj_max_c + 100.0))

    def fix(x: Any) -> Any:
        return float(x) if scalar_out else x

    if scalar_out:
        if th.runaway:
            tj = p_cond = p_total = rds_hot = margin = None
        else:
            tj = float(th.tj_c)
            rds_hot = r25 * (1.0 + fet.alpha) ** (tj - 25.0)
            p_cond = float(i2) * rds_hot
            p_total = float(th.power)
            margin = fet.tj_max_c - tj
        over = bool(th.runaway or tj > fet.tj_max_c)  # type: ignore[operator]
        runaway = bool(th.runaway)
    else:
        tj = th.tj_c
        rds_hot = r25 * (1.0 + fet.alpha) ** (tj - 25.0)
        p_cond = i2 * rds_hot
        p_total = th.power
        margin = fet.tj_max_c - tj
        runaway = th.runaway
        over = np.asarray(runaway | np.ma.filled(tj > fet.tj_max_c, True))
    return MosfetLosses(
        gate=gate, t_d_on=gate.t_d_on, t_ri=gate.t_ri, t_fv=gate.t_fv, t_d_off=gate.t_d_off, t_rv=gate.t_rv,
        t_fi=gate.t_fi, t_on=gate.t_on, t_off=gate.t_off, p_sw_on=fix(p_sw_on), p_sw_off=fix(p_sw_off),
        p_sw=fix(p_sw_on + p_sw_off), p_coss=fix(p_coss), p_rr=fix(p_rr), p_gate=fix(p_gate),
        p_gate_internal=fix(p_gate_int), p_cond=p_cond, p_total=p_total, rds_on_hot=rds_hot, tj_c=tj,
        tj_margin=margin, runaway=runaway, over_temperature=over, v_ds_margin=fix(fet.v_ds_max - va),
        gate_margin=gate.gate_margin, fully_enhanced=gate.fully_enhanced,
    )
