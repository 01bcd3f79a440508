"""Charge and discharge paths of the 555-type astable topologies.

One description serves both the symbolic derivation (sympy symbols in) and
the numeric checks and waveforms (floats or numpy arrays in): every
expression below uses only ``+``, ``-``, ``*`` and ``/``.

Circuit model (output high while the timing capacitor charges):

* the threshold and trigger pins are tied to the capacitor node; the
  comparators switch at ``v_upper = vctl`` and ``v_lower = vctl / 2``;
* the discharge pin (DIS) is fed from the supply through ``ra``; while the
  discharge switch is on it is modelled as a source ``vsat`` behind
  ``r_on`` (bipolar family: ``vsat`` with ``r_on = 0``; CMOS family:
  ``r_on`` with ``vsat = 0``). Seen from the timing network, DIS is then a
  Thevenin source ``(vcc·r_on + vsat·ra) / (ra + r_on)`` behind
  ``ra·r_on / (ra + r_on)``; with ``r_on = 0`` this is simply ``vsat``;
* a steering diode is a constant drop ``vd`` (the diode-law model in
  :mod:`pwmkit.timing.diode_law` checks this assumption).

Topologies:

``classic``
    charge through ``ra + rb`` toward ``vcc``; discharge through ``rb``
    toward DIS.
``bypass``
    one diode across ``rb`` (anode at DIS): charge through ``ra`` and the
    diode toward ``vcc − vd``; discharge through ``rb`` toward DIS (the
    diode is reverse-biased).
``steered``
    two diodes: charge through ``ra`` and D1 toward ``vcc − vd``; discharge
    through D2 and ``rb`` toward DIS ``+ vd``.
``pot``
    ``steered`` with a potentiometer ``pot`` whose wiper sits at DIS: charge
    resistance ``ra + wiper·pot``, discharge resistance
    ``rb + (1 − wiper)·pot``.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any, Literal

__all__ = ["TOPOLOGIES", "Topology", "Paths", "paths"]

Topology = Literal["classic", "bypass", "steered", "pot"]
TOPOLOGIES: tuple[str, ...] = ("classic", "bypass", "steered", "pot")


@dataclass(frozen=True)
class Paths:
    """Equivalent first-order circuits of the two half-cycles.

    Attributes
    ----------
    r_charge : resistance of the charge path [Ω]
    v_charge : asymptote the capacitor heads for while charging [V]
    r_discharge : resistance of the discharge path [Ω]
    v_discharge : asymptote the capacitor heads for while discharging [V]
    """

    r_charge: Any
    v_charge: Any
    r_discharge: Any
    v_discharge: Any


def _plus(a: Any, b: Any) -> Any:
    """``a + b``, but ``a`` itself when ``b`` is the float 0.0 of an ideal switch (no array copy)."""
    return a if isinstance(b, float) and b == 0.0 else a + b


def paths(topology: str, *, ra: Any, rb: Any, pot: Any, wiper: Any, vcc: Any, vd: Any, vsat: Any,
          r_on: Any) -> Paths:
    """Charge/discharge resistance and asymptote of a topology (symbolic or numeric).

    Parameters
    ----------
    topology : {"classic", "bypass", "steered", "pot"}
    ra, rb : resistors [Ω]; pot : potentiometer end-to-end [Ω]; wiper : position [1]
    vcc : supply [V]; vd : steering-diode drop [V]; vsat : discharge saturation [V]
    r_on : discharge switch on-resistance [Ω]

    Returns
    -------
    Paths
    """
    if isinstance(r_on, (int, float)) and r_on == 0:  # ideal-resistance switch: DIS sits at vsat
        v_dis, r_dis = vsat, 0.0
    else:
        v_dis = (vcc * r_on + vsat * ra) / (ra + r_on)
        r_dis = ra * r_on / (ra + r_on)
    if topology == "classic":
        return Paths(ra + rb, vcc, _plus(rb, r_dis), v_dis)
    if topology == "bypass":
        return Paths(ra, vcc - vd, _plus(rb, r_dis), v_dis)
    if topology == "steered":
        return Paths(ra, vcc - vd, _plus(rb, r_dis), v_dis + vd)
    if topology == "pot":
        return Paths(ra + wiper * pot, vcc - vd, _plus(rb + (1 - wiper) * pot, r_dis), v_dis + vd)
    from ..errors import DesignError

    raise DesignError(f"topology: {topology!r} is not known; allowed: {', '.join(TOPOLOGIES)}")
