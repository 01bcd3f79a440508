"""Test oracle: node equations of the wired astable, integrated with scipy (independent of pwmkit).

Built from the component values and the wiring only — no pwmkit model function or result field:

* nodes: the capacitor ``v`` (state), the discharge pin ``u`` (algebraic, from KCL), and inside
  each steering branch the diode in series with its resistors;
* the discharge switch: open while the output is high; closed, it is ``vsat`` behind ``r_on``
  (``r_on = 0``: ``u = vsat``);
* thresholds ``vctl`` and ``vctl/2``; ``vctl`` from the control pin (internal divider of three
  equal resistors: ``2·vcc/3``; an external source; or a resistor to ground on the divider);
* diodes either constant-drop ideal diodes (each combination of on/off diodes is a linear
  circuit, solved exactly; the consistent one — forward current ≥ 0 in every on diode, voltage
  ≤ drop on every off diode — is kept) or Shockley diodes ``i = I_S·(e^{(x − i·R)/(n·V_T)} − 1)``
  solved with brentq, reverse current included;
* ``solve_ivp`` (DOP853, rtol 1e-11) integrates ``C·dv/dt = i_cap(v)`` from the lower threshold
  with terminal events at the thresholds.

Sources: scipy.integrate.solve_ivp and scipy.optimize.brentq (general-purpose numeric tools);
first-order circuit node analysis (C. K. Alexander, M. N. O. Sadiku, *Fundamentals of Electric
Circuits*, 6th ed., ch. 3 nodal analysis, ch. 7 first-order circuits); the Shockley diode law
with series resistance (S. M. Sze, K. K. Ng, *Physics of Semiconductor Devices*, 3rd ed.,
ch. 2 — from memory).
"""

from __future__ import annotations

import itertools
import math
from dataclasses import dataclass

import numpy as np
from scipy.integrate import solve_ivp
from scipy.optimize import brentq

K_B, Q_E = 1.380649e-23, 1.602176634e-19  # SI 2019 exact constants


@dataclass(frozen=True)
class Shockley:
    """A diode by its model parameters (saturation current [A], emission coefficient, series R [Ω])."""

    i_s: float
    n: float
    r_s: float
    t_c: float = 25.0

    @property
    def n_vt(self) -> float:
        return self.n * K_B * (self.t_c + 273.15) / Q_E

    def current(self, x: float, r_series: float = 0.0) -> float:
        """Current of the diode in series with ``r_series`` at total voltage ``x`` [A]."""
        r = self.r_s + r_series
        if x <= 0:  # reverse: the series drop of a nA current is negligible
            return self.i_s * math.expm1(x / self.n_vt)
        def f(i: float) -> float:
            return self.n_vt * math.log1p(i / self.i_s) + i * r - x
        hi = x / r if r > 0 else self.i_s * math.expm1(min(x / self.n_vt, 700.0))
        return brentq(f, 0.0, max(hi, 1e-30), xtol=1e-22, rtol=1e-15, maxiter=400)


@dataclass(frozen=True)
class Circuit:
    """The wired astable (SI units). ``diode`` None: constant-drop ideal diodes of drop ``vd``."""

    topology: str
    ra: float
    rb: float
    c: float
    vcc: float
    pot: float = 0.0
    wiper: float = 0.0
    vd: float = 0.0
    vsat: float = 0.0
    r_on: float = 0.0
    vctl: float | None = None
    r_cv: float | None = None
    r_divider: float = 5e3
    diode: Shockley | None = None

    @property
    def v_upper(self) -> float:
        if self.vctl is not None:
            return self.vctl
        if self.r_cv is not None:  # divider r–r–r with r_cv across the lower two
            lower = 1.0 / (1.0 / (2 * self.r_divider) + 1.0 / self.r_cv)
            return self.vcc * lower / (self.r_divider + lower)
        return 2.0 * self.vcc / 3.0

    # the diode branches between DIS (u) and the capacitor (v): (anode side, series resistance)
    def branches(self) -> list[tuple[str, float]]:
        """('dis→cap' | 'cap→dis', series resistance) of each diode; plain resistors separately."""
        if self.topology == "classic":
            return []
        if self.topology == "bypass":
            return [("dis->cap", 0.0)]
        if self.topology == "steered":
            return [("dis->cap", 0.0), ("cap->dis", self.rb)]
        if self.topology == "pot":
            return [("dis->cap", self.wiper * self.pot), ("cap->dis", self.rb + (1.0 - self.wiper) * self.pot)]
        raise ValueError(self.topology)

    def plain_resistance(self) -> float | None:
        """Resistor directly between DIS and the capacitor (classic rb, bypass rb), None if none."""
        return self.rb if self.topology in ("classic", "bypass") else None


def _cap_current_ideal(cir: Circuit, v: float, switch_on: bool) -> float:
    """Current into the capacitor with constant-drop ideal diodes: enumerate the diode states.

    One unknown node, DIS at ``u``. An element with no resistance (an on diode without series
    resistor, the closed switch with ``r_on = 0``, ``rb = 0``) pins ``u`` and carries whatever
    current KCL leaves; every other element is linear in ``u``.
    """
    br = cir.branches()
    r_plain = cir.plain_resistance()
    for states in itertools.product((True, False), repeat=len(br)):
        pins: list[tuple[str, float]] = []  # (element, u it imposes)
        g, i0 = 1.0 / cir.ra, cir.vcc / cir.ra  # current out of DIS through the linear elements = g·u − i0
        if switch_on:
            if cir.r_on > 0:
                g, i0 = g + 1.0 / cir.r_on, i0 + cir.vsat / cir.r_on
            else:
                pins.append(("switch", cir.vsat))
        if r_plain is not None:
            if r_plain > 0:
                g, i0 = g + 1.0 / r_plain, i0 + v / r_plain
            else:
                pins.append(("rb", v))
        for k, ((d, r), on) in enumerate(zip(br, states)):
            if not on:
                continue
            target = v + cir.vd if d == "dis->cap" else v - cir.vd  # u where the diode's x equals vd
            if r > 0:  # dis->cap carries (u − target)/r out of DIS; cap->dis carries (target − u)/r in
                g, i0 = g + 1.0 / r, i0 + target / r
            else:
                pins.append((f"d{k}", target))
        if len(pins) > 1:
            continue  # two elements pinning DIS at once: only on a measure-zero set of v
        u = pins[0][1] if pins else i0 / g
        remainder = (g * u - i0) * -1.0  # current the pinned element must carry out of DIS
        i_cap, ok = 0.0, True
        if r_plain is not None and r_plain > 0:
            i_cap += (u - v) / r_plain
        for (d, r), on in zip(br, states):
            x = (u - v) if d == "dis->cap" else (v - u)  # forward voltage of the branch
            if not on:
                ok &= x <= cir.vd + 1e-12
                continue
            if r > 0:
                i = (x - cir.vd) / r
            else:  # pinned diode: its current is the remainder (out of DIS for dis->cap, into for cap->dis)
                i = remainder if d == "dis->cap" else -remainder
            ok &= i >= -1e-15
            i_cap += i if d == "dis->cap" else -i
        if pins and pins[0][0] == "rb":
            i_cap += remainder
        if ok:
            return i_cap
    raise RuntimeError("no consistent diode state (the circuit has no solution)")


def _cap_current_shockley(cir: Circuit, v: float, switch_on: bool) -> float:
    """Current into the capacitor with Shockley diodes: KCL at DIS solved with brentq."""
    d = cir.diode
    assert d is not None
    br = cir.branches()
    r_plain = cir.plain_resistance()

    def to_cap(u: float) -> float:
        i = 0.0
        if r_plain is not None and r_plain > 0:
            i += (u - v) / r_plain
        for direction, r in br:
            if direction == "dis->cap":
                i += d.current(u - v, r)
            else:
                i -= d.current(v - u, r)
        return i

    if r_plain == 0:
        u = v
        return (cir.vcc - u) / cir.ra - ((u - cir.vsat) / cir.r_on if switch_on else 0.0)
    if switch_on and cir.r_on == 0:
        return to_cap(cir.vsat)

    def kcl(u: float) -> float:
        out = to_cap(u) + ((u - cir.vsat) / cir.r_on if switch_on else 0.0)
        return (cir.vcc - u) / cir.ra - out

    u = brentq(kcl, min(v, cir.vsat) - 2.0, cir.vcc + 2.0, xtol=1e-15, rtol=1e-15, maxiter=400)
    return to_cap(u)


def cap_current(cir: Circuit, v: float, switch_on: bool) -> float:
    """Current into the timing capacitor at capacitor voltage ``v`` [A]."""
    if cir.diode is None:
        return _cap_current_ideal(cir, v, switch_on)
    return _cap_current_shockley(cir, v, switch_on)


def half_periods(cir: Circuit) -> tuple[float, float]:
    """(t_high, t_low) of the steady state, integrated with solve_ivp [s]."""
    v_hi, v_lo = cir.v_upper, cir.v_upper / 2.0

    def phase(v0: float, target: float, switch_on: bool) -> float:
        def rhs(_t: float, y: np.ndarray) -> list[float]:
            return [cap_current(cir, float(y[0]), switch_on) / cir.c]

        def hit(_t: float, y: np.ndarray) -> float:
            return float(y[0]) - target

        hit.terminal = True  # type: ignore[attr-defined]
        # time scale from the components only: the largest resistance times c, generously
        horizon = 200.0 * (cir.ra + cir.rb + cir.pot + cir.r_on + 1.0) * cir.c
        sol = solve_ivp(rhs, (0.0, horizon), [v0], events=hit, rtol=1e-11, atol=1e-13 * max(1.0, cir.vcc),
                        method="DOP853")
        if not sol.t_events[0].size:
            raise RuntimeError("threshold not reached: the circuit does not oscillate")
        return float(sol.t_events[0][0])

    return phase(v_lo, v_hi, False), phase(v_hi, v_lo, True)
