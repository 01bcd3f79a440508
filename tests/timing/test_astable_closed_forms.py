"""Exact astable timing against outside references.

Sources named beside each check:
- scipy.integrate.solve_ivp + brentq integrating the node equations of the wired circuit built from the
  component values (tests/timing/wired_circuit.py; independent of pwmkit's path and result fields);
- sympy (high-precision evaluation of the derived expressions; dsolve as a second derivation route);
- ln 2 ≈ 0.693 factor of the textbook astable formulas (common practice; 555-type timer data sheets'
  t = 0.693·R·C, typical published datasheet value, generic);
- check values computed from the closed-form formulas (regression pins).
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from wired_circuit import Circuit, half_periods

import pwmkit
from pwmkit import DesignError
from pwmkit.parts.timers import get_timer
from pwmkit.timing import astable, astable_ideal, control_voltage_from_divider, paths

TOPOLOGY_CASES = [
    ("classic", {}),
    ("bypass", {}),
    ("steered", {}),
    ("pot", {"pot": 47e3, "wiper": 0.3}),
]


def _simulate(topology: str, **kw: float) -> tuple[float, float]:
    """Oracle: node equations of the wired circuit from the component values (tests/timing/wired_circuit.py).

    The discharge switch takes the timer family's published values (bipolar: vsat 0.1 V, no
    resistance; CMOS: 14 Ω) unless given; nothing is read from the result under test.
    """
    fam = get_timer(kw.pop("timer", "bipolar"))
    cir = Circuit(topology, ra=kw["ra"], rb=kw["rb"], c=kw["c"], vcc=kw["vcc"], pot=kw.get("pot", 0.0),
                  wiper=kw.get("wiper", 0.0), vd=kw.get("vd", 0.0), vsat=kw.get("vsat", fam.vsat),
                  r_on=kw.get("r_on", fam.r_discharge_on), vctl=kw.get("vctl"))
    return half_periods(cir)


@pytest.mark.parametrize("topology,extra", TOPOLOGY_CASES)
@pytest.mark.parametrize("timer", ["bipolar", "cmos"])
def test_closed_forms_match_scipy_ode_oracle(topology: str, extra: dict, timer: str) -> None:
    kw = dict(ra=4.7e3, rb=22e3, c=47e-9, vcc=12.0, timer=timer, **extra)
    if topology != "classic":
        kw["vd"] = 0.62
    r = astable(topology, **kw)
    t_high, t_low = _simulate(topology, **kw)
    # scipy solve_ivp (DOP853, rtol 1e-11) on the wired circuit's node equations: <= 1e-6 relative
    assert r.t_high == pytest.approx(t_high, rel=1e-6)
    assert r.t_low == pytest.approx(t_low, rel=1e-6)


def test_control_voltage_modulation_matches_scipy_ode_oracle() -> None:
    kw = dict(ra=10e3, rb=10e3, c=100e-9, vcc=12.0, vsat=0.0, r_on=0.0, vctl=9.0)
    r = astable("classic", **kw)
    t_high, t_low = _simulate("classic", **kw)
    assert r.t_high == pytest.approx(t_high, rel=1e-6)  # scipy solve_ivp oracle
    assert r.t_low == pytest.approx(t_low, rel=1e-6)


def test_classic_ideal_ln2_factor_common_practice() -> None:
    r = astable_ideal("classic", ra=10e3, rb=10e3, c=100e-9)
    # common practice / 555-type data sheets: t_high = 0.693·(RA+RB)·C, t_low = 0.693·RB·C, f = 1.44/((RA+2RB)C)
    assert r.t_high / (20e3 * 100e-9) == pytest.approx(math.log(2), rel=1e-12)
    assert round(r.t_high / (20e3 * 100e-9), 3) == 0.693
    assert r.t_low / (10e3 * 100e-9) == pytest.approx(0.693, abs=5e-4)
    assert r.frequency * (30e3 * 100e-9) == pytest.approx(1.44, abs=3e-3)
    assert r.duty == pytest.approx(2 / 3, rel=1e-12)  # (RA+RB)/(RA+2RB), common practice


def test_worked_values_reference_sheet_section_1() -> None:
    # RC step response: Alexander & Sadiku, Fundamentals of Electric Circuits, 6th ed., ch. 7 (regression pin) worked values (Vcc 12 V, RA = RB = 10 kΩ, C = 100 nF) — regression pins
    base = dict(ra="10k", rb="10k", c="100n", vcc=12)
    r = astable("classic", **base, vsat=0.1)
    assert r.t_low == pytest.approx(0.705886e-3, rel=2e-6)
    assert r.frequency == pytest.approx(477.970, abs=1e-3)
    r = astable("bypass", **base, vd=0.65, vsat=0.1)
    assert r.t_high == pytest.approx(0.785740e-3, rel=2e-6)
    assert r.frequency == pytest.approx(670.41, abs=0.01)
    assert r.duty == pytest.approx(0.5268, abs=1e-4)
    r = astable("steered", **base, vd=0.65, vsat=0.1)
    assert r.t_low == pytest.approx(0.802346e-3, rel=2e-6)
    assert r.frequency == pytest.approx(629.69, abs=0.01)


@pytest.mark.parametrize("wiper,t_high_us,t_low_us", [(0.0, 7.857, 802.346), (0.3, 243.579, 561.643),
                                                      (0.5, 400.727, 401.173), (0.7, 557.875, 240.704)])
def test_pot_table_reference_sheet_section_1_6(wiper: float, t_high_us: float, t_low_us: float) -> None:
    # RC step response: Alexander & Sadiku, Fundamentals of Electric Circuits, 6th ed., ch. 7 (regression pin) table (R1 1 kΩ, P 100 kΩ, C 10 nF, Vcc 12 V, Vd 0.65 V, Vsat 0.1 V) — regression pins
    r = astable("pot", ra=1e3, rb=0, pot=100e3, wiper=wiper, c=10e-9, vcc=12, vd=0.65, vsat=0.1)
    assert r.t_high * 1e6 == pytest.approx(t_high_us, abs=1e-3)
    assert r.t_low * 1e6 == pytest.approx(t_low_us, abs=1e-3)


@pytest.mark.parametrize("vctl,t_high_ms", [(6.0, 0.810930), (8.0, 1.386294), (9.0, 1.832581), (11.5, 5.051457)])
def test_control_voltage_table_reference_sheet_section_1_7(vctl: float, t_high_ms: float) -> None:
    # RC step response: Alexander & Sadiku, Fundamentals of Electric Circuits, 6th ed., ch. 7 (regression pin) (classic, RA = RB = 10 kΩ, 100 nF, ideal switch) — regression pins
    r = astable("classic", ra=10e3, rb=10e3, c=100e-9, vcc=12, vsat=0, r_on=0, vctl=vctl)
    assert r.t_high * 1e3 == pytest.approx(t_high_ms, abs=1e-6)
    assert r.t_low * 1e3 == pytest.approx(0.693147, abs=1e-6)  # ln2·RB·C, independent of vctl


def test_control_pin_divider_reference_sheet_section_1_7() -> None:
    # RC step response: Alexander & Sadiku, Fundamentals of Electric Circuits, 6th ed., ch. 7: bipolar divider 3 × 5 kΩ (from memory); Rext 10 kΩ at 12 V gives 6.000 V (regression pin)
    assert control_voltage_from_divider(12.0, 10e3) == pytest.approx(6.0, abs=1e-9)
    with pytest.raises(DesignError, match="no known internal divider"):
        control_voltage_from_divider(12.0, 10e3, timer="cmos")


def test_steered_reduces_to_ideal_when_drops_vanish() -> None:
    # limit vd -> 0, vsat -> 0: the steered forms reduce to ln2·RA·C and ln2·RB·C (common practice)
    r = astable("steered", ra=3.3e3, rb=6.8e3, c=22e-9, vcc=9, vd=0, vsat=0, r_on=0)
    assert r.t_high == pytest.approx(math.log(2) * 3.3e3 * 22e-9, rel=1e-12)
    assert r.t_low == pytest.approx(math.log(2) * 6.8e3 * 22e-9, rel=1e-12)


def test_pot_ideal_period_independent_of_wiper() -> None:
    # ideal pot-steered astable: T = ln2·(R1 + P)·C for every wiper position (common practice)
    w = np.linspace(0, 1, 11)
    r = astable_ideal("pot", ra=1e3, rb=470.0, pot=100e3, wiper=w, c=10e-9)
    assert np.allclose(r.period, math.log(2) * (1e3 + 470 + 100e3) * 10e-9, rtol=1e-12)
    # with real diode drops the frequency moves a little with the wiper (RC step response: Alexander & Sadiku, Fundamentals of Electric Circuits, 6th ed., ch. 7)
    real = astable("pot", ra=1e3, rb=470.0, pot=100e3, wiper=w, c=10e-9, vcc=12, vd=0.65, vsat=0.1)
    assert np.ptp(real.frequency) / np.mean(real.frequency) > 1e-3


def test_vector_equals_scalar() -> None:
    ra = np.array([1e3, 4.7e3, 10e3])
    c = np.array([[1e-9], [100e-9]])
    r = astable("steered", ra=ra, rb="22k", c=c, vcc=12)
    assert r.frequency.shape == (2, 3)
    for i in range(2):
        for j in range(3):
            s = astable("steered", ra=float(ra[j]), rb=22e3, c=float(c[i, 0]), vcc=12)
            assert isinstance(s.frequency, float)
            assert r.frequency[i, j] == pytest.approx(s.frequency, rel=1e-13)
            assert r.duty[i, j] == pytest.approx(s.duty, rel=1e-13)


def test_engineering_strings_and_lists_accepted() -> None:
    a = astable("bypass", ra="4k7", rb="10 kΩ", c="100nF", vcc="12 V", vd="0.6")
    b = astable("bypass", ra=4700, rb=10e3, c=100e-9, vcc=12, vd=0.6)
    assert a.frequency == b.frequency
    lst = astable("bypass", ra=["4k7", "10k"], rb=10e3, c=100e-9, vcc=12)
    assert lst.frequency.shape == (2,)


def test_frequency_falls_as_capacitance_rises_and_duty_rises_with_wiper() -> None:
    c = np.geomspace(1e-10, 1e-4, 50)
    f = astable("steered", ra=10e3, rb=10e3, c=c, vcc=12).frequency
    assert np.all(np.diff(f) < 0)
    w = np.linspace(0, 1, 41)
    d = astable("pot", ra=1e3, rb=1e3, pot=50e3, wiper=w, c=10e-9, vcc=12).duty
    assert np.all(np.diff(d) > 0)


def test_cmos_discharge_on_resistance_sees_charge_resistor_thevenin() -> None:
    # the discharge pin is fed from vcc through ra while the switch is on: Thevenin of ra and r_on
    r = astable("classic", ra=1e3, rb=10e3, c=10e-9, vcc=12, timer="cmos", r_on=14.0)
    v_th = 12 * 14 / (1e3 + 14)
    r_th = 1e3 * 14 / (1e3 + 14)
    expected = (10e3 + r_th) * 10e-9 * math.log((8 - v_th) / (4 - v_th))
    assert r.t_low == pytest.approx(expected, rel=1e-12)
    p = paths("classic", ra=1e3, rb=10e3, pot=0, wiper=0, vcc=12, vd=0, vsat=0, r_on=14.0)
    assert p.v_discharge == pytest.approx(v_th)


@pytest.mark.parametrize(
    "kwargs,match",
    [
        (dict(topology="steered", vcc=1.9, vd=0.65), r"minus diode drop 0.65 V = 1.25 V cannot reach the upper"),
        (dict(topology="classic", vcc=12, vctl=12.5), r"cannot reach the upper threshold 12.5 V"),
        (dict(topology="steered", vcc=12, vctl=1.4, vd=0.65, vsat=0.1), r"cannot fall to the lower threshold"),
        (dict(topology="pot", vcc=12, pot=10e3), r"needs both"),
        (dict(topology="pot", vcc=12, pot=10e3, wiper=1.2), r"wiper: 1.2 is out of range"),
        (dict(topology="classic", vcc=12, pot=10e3, wiper=0.5), r"only the 'pot' topology"),
        (dict(topology="ring", vcc=12), r"topology: 'ring' is not known"),
        (dict(topology="classic", vcc="10q"), r"10q"),
        (dict(topology="classic", vcc=float("nan")), r"vcc: nan is not a finite number"),
        (dict(topology="classic", vcc=-5), r"vcc: -5 V is out of range"),
        (dict(topology="classic", vcc=12, timer="ttl"), r"timer: 'ttl' is not a known timer family"),
        (dict(topology="pot", vcc=12, pot=10e3, wiper=1.0, rb=0, r_on=0), r"discharge path resistance is 0"),
    ],
)
def test_impossible_or_bad_designs_raise_design_error(kwargs: dict, match: str) -> None:
    kw = dict(ra=10e3, rb=10e3, c=10e-9)
    kw.update(kwargs)
    topology = kw.pop("topology")
    with pytest.raises(DesignError, match=match):
        astable(topology, **kw)


def test_design_error_is_value_error_and_exported() -> None:
    assert issubclass(pwmkit.DesignError, ValueError)
    with pytest.raises(ValueError):
        astable("classic", ra=-1, rb=1, c=1e-9, vcc=5)


def test_result_reprs_for_notebooks() -> None:
    r = astable("steered", ra="10k", rb="10k", c="100n", vcc=12)
    assert "kHz" in repr(r) or "Hz" in repr(r)
    html = r._repr_html_()
    assert "<table" in html and "frequency" in html
