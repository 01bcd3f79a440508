"""The diode-law timing model against scipy integrating the wired circuit, and against the closed forms.

Sources: scipy.integrate.solve_ivp + scipy.optimize.brentq on the node equations of the wired circuit
with Shockley diodes (tests/timing/wired_circuit.py: built from the component values and the diode
model parameters, reverse current included; independent of pwmkit's model code); small-signal silicon
switching diode and small Schottky model parameters (typical published datasheet values, generic);
check values computed from the formulas (regression pins).
"""

from __future__ import annotations

import pytest
from wired_circuit import Circuit, Shockley, half_periods

from pwmkit import DesignError
from pwmkit.parts.diodes import SMALL_SCHOTTKY, SMALL_SIGNAL_SILICON
from pwmkit.parts.timers import get_timer
from pwmkit.timing import astable, diode_law_timing


def _oracle(topology: str, diode, timer: str = "bipolar", **kw: float) -> tuple[float, float]:
    fam = get_timer(timer)
    cir = Circuit(topology, vsat=kw.pop("vsat", fam.vsat), r_on=fam.r_discharge_on,
                  diode=Shockley(diode.i_s, diode.n, diode.r_s), **kw)
    return half_periods(cir)


@pytest.mark.parametrize("topology, extra", [("bypass", {}), ("steered", {}), ("pot", dict(pot=47e3, wiper=0.3)),
                                             ("bypass", dict(rb=470.0)), ("pot", dict(pot=100e3, wiper=0.0))])
@pytest.mark.parametrize("timer", ["bipolar", "cmos"])
@pytest.mark.parametrize("diode", [SMALL_SIGNAL_SILICON, SMALL_SCHOTTKY], ids=["silicon", "schottky"])
def test_diode_law_model_matches_scipy_wired_circuit(topology: str, extra: dict, timer: str, diode) -> None:
    kw = {"ra": 10e3, "rb": 15e3, "c": 100e-9, "vcc": 12.0, **extra}
    t_high, t_low = _oracle(topology, diode, timer, **kw)
    r = diode_law_timing(topology, timer=timer, diode=diode, **kw)
    # scipy solve_ivp + brentq on the wired circuit's node equations (outside oracle): <= 1e-6 relative
    assert r.t_high == pytest.approx(t_high, rel=1e-6)
    assert r.t_low == pytest.approx(t_low, rel=1e-6)


def test_closed_form_matches_scipy_wired_circuit_with_the_equivalent_drop() -> None:
    # the closed form at the equivalent constant drop reproduces the wired circuit's charge time
    t_high, _ = _oracle("bypass", SMALL_SIGNAL_SILICON, ra=10e3, rb=10e3, c=100e-9, vcc=12.0, vsat=0.1)
    r = diode_law_timing("bypass", ra=10e3, rb=10e3, c=100e-9, vcc=12, vd=0.65, vsat=0.1)
    assert r.t_high == pytest.approx(t_high, rel=1e-6)  # scipy oracle
    cf = astable("bypass", ra=10e3, rb=10e3, c=100e-9, vcc=12, vd=r.vd_charge_equivalent, vsat=0.1)
    assert cf.t_high == pytest.approx(t_high, rel=1e-6)  # scipy oracle


def test_classic_diode_law_equals_closed_form() -> None:
    # no diode in the classic network: the quadrature must reproduce the closed form (same physics)
    r = diode_law_timing("classic", ra=4.7e3, rb=33e3, c=22e-9, vcc=9, timer="cmos")
    assert r.frequency_error == pytest.approx(0.0, abs=1e-9)
    assert r.vd_charge_equivalent is None and r.vd_discharge_equivalent is None


def test_shockley_bypass_regression_pins() -> None:
    # bypass, RA = RB = 10 kΩ, 100 nF, 12 V, Vsat 0.1 V, small-signal diode model:
    # t_H = 0.771843 ms, equivalent constant drop 0.5628 V (regression pins, computed from the model)
    r = diode_law_timing("bypass", ra=10e3, rb=10e3, c=100e-9, vcc=12, vd=0.65, vsat=0.1)
    assert r.t_high * 1e3 == pytest.approx(0.771843, abs=2e-6)
    assert r.vd_charge_equivalent == pytest.approx(0.5628, abs=1e-4)
    # closed form with the equivalent drop reproduces the diode-law charge time
    cf = astable("bypass", ra=10e3, rb=10e3, c=100e-9, vcc=12, vd=r.vd_charge_equivalent, vsat=0.1)
    assert cf.t_high == pytest.approx(r.t_high, rel=1e-9)


def test_pot_equivalent_drops_are_plausible_silicon() -> None:
    r = diode_law_timing("pot", ra=1e3, rb=1e3, pot=100e3, wiper=0.4, c=10e-9, vcc=12)
    # silicon junction at 0.05–1 mA: about 0.45–0.65 V (common practice)
    assert 0.45 < r.vd_charge_equivalent < 0.65
    assert 0.45 < r.vd_discharge_equivalent < 0.65
    assert "closed form is off by" in r.summary()


def test_diode_law_rejects_arrays_and_non_oscillating() -> None:
    with pytest.raises(DesignError, match="scalars only"):
        diode_law_timing("steered", ra=[1e3, 2e3], rb=1e3, c=1e-9, vcc=12)
    with pytest.raises(DesignError, match="cannot reach"):
        diode_law_timing("steered", ra=1e3, rb=1e3, c=1e-9, vcc=1.5, vd=0.65)
