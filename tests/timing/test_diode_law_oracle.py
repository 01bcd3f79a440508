"""The diode-law timing model against scipy's ODE solver and the closed forms.

Sources: scipy.integrate.solve_ivp + scipy.optimize.brentq (independent time-domain simulation with a
Shockley diode with series resistance); REFERENCES.md §1.4 [C] Shockley check value (regression pin);
small-signal silicon switching diode model parameters (typical published datasheet value, generic).
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from scipy.integrate import solve_ivp
from scipy.optimize import brentq

from pwmkit import DesignError
from pwmkit.parts.diodes import SMALL_SIGNAL_SILICON
from pwmkit.timing import astable, diode_law_timing


def _shockley_vf(i: float, t_c: float = 25.0) -> float:
    return float(SMALL_SIGNAL_SILICON.vf(i, t_c))


def _scipy_half_periods(topology: str, ra: float, rb: float, c: float, vcc: float, vsat: float) -> tuple[float, float]:
    """Time-domain oracle: node equations by brentq inside solve_ivp's right-hand side."""
    v_upper, v_lower = 2 * vcc / 3, vcc / 3
    d = SMALL_SIGNAL_SILICON
    vt = 1.380649e-23 * 298.15 / 1.602176634e-19

    def i_diode(u: float) -> float:
        if u <= 0:
            return 0.0
        return brentq(lambda i: d.n * vt * math.log1p(i / d.i_s) + i * d.r_s - u, 0.0, u / d.r_s + 1.0,
                      xtol=1e-18, rtol=1e-14)

    def charge_current(v: float) -> float:
        if topology == "bypass":  # ra feeds diode ∥ rb
            u = brentq(lambda u: (vcc - v - u) / ra - i_diode(u) - u / rb, 0.0, vcc - v, xtol=1e-15, rtol=1e-14)
            return (vcc - v - u) / ra
        return brentq(lambda i: vcc - v - i * ra - _shockley_vf(i), 0.0, (vcc - v) / ra, xtol=1e-18, rtol=1e-14)

    def discharge_current(v: float) -> float:
        if topology == "bypass":
            return (v - vsat) / rb
        return brentq(lambda i: v - vsat - i * rb - _shockley_vf(i), 0.0, (v - vsat) / rb, xtol=1e-18, rtol=1e-14)

    def run(v0: float, target: float, sign: float, current: object) -> float:
        def rhs(_t: float, y: np.ndarray) -> list[float]:
            return [sign * current(float(y[0])) / c]  # type: ignore[operator]

        def hit(_t: float, y: np.ndarray) -> float:
            return y[0] - target

        hit.terminal = True  # type: ignore[attr-defined]
        sol = solve_ivp(rhs, (0, 1.0), [v0], events=hit, rtol=1e-11, atol=1e-13, method="DOP853")
        return float(sol.t_events[0][0])

    return run(v_lower, v_upper, +1, charge_current), run(v_upper, v_lower, -1, discharge_current)


@pytest.mark.parametrize("topology", ["bypass", "steered"])
def test_diode_law_model_matches_scipy_time_domain(topology: str) -> None:
    ra, rb, c, vcc, vsat = 10e3, 15e3, 100e-9, 12.0, 0.1
    t_high, t_low = _scipy_half_periods(topology, ra, rb, c, vcc, vsat)
    r = diode_law_timing(topology, ra=ra, rb=rb, c=c, vcc=vcc, vsat=vsat)
    # scipy solve_ivp + brentq oracle, same physics: <= 1e-6 relative
    assert r.t_high == pytest.approx(t_high, rel=1e-6)
    assert r.t_low == pytest.approx(t_low, rel=1e-6)


def test_classic_diode_law_equals_closed_form() -> None:
    # no diode in the classic network: the quadrature must reproduce the closed form (same physics)
    r = diode_law_timing("classic", ra=4.7e3, rb=33e3, c=22e-9, vcc=9, timer="cmos")
    assert r.frequency_error == pytest.approx(0.0, abs=1e-9)
    assert r.vd_charge_equivalent is None and r.vd_discharge_equivalent is None


def test_reference_sheet_shockley_check_section_1_4() -> None:
    # REFERENCES.md §1.4 [C]: bypass, RA = RB = 10 kΩ, 100 nF, 12 V, Vsat 0.1 V, small-signal diode model:
    # t_H = 0.771843 ms, equivalent constant drop 0.5628 V (regression pins, recomputed there)
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
