"""Tests for pwmkit.loads.mosfet and pwmkit.parts.mosfets: gate drive, switching/conduction loss, T_j.

Outside references:
- Mohan, Undeland & Robbins, Power Electronics, 3rd ed., §2-7 and ch. 22, from memory formulas and §7.2 worked example ((regression pin) values, recomputed here);
- Mohan/Undeland/Robbins, *Power Electronics*, 3rd ed., §2-7 eq. (2-6) P_s = ½·V_d·I_o·f_s·(t_c(on)+t_c(off))
  (from memory);
- scipy.optimize.brentq as an independent root finder for the junction temperature.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from reach import mostly, reached, reaching
from scipy.optimize import brentq

from pwmkit.errors import DesignError
from pwmkit.loads.mosfet import GateDrive, MosfetLosses, gate_drive, mosfet_losses
from pwmkit.parts.mosfets import LOGIC_LEVEL_30V, MOSFETS, STANDARD_LEVEL_60V, MosfetFamily, get_mosfet

# Mohan, Undeland & Robbins, Power Electronics, 3rd ed., §2-7 and ch. 22, from memory generic MOSFET (no C_oss given there; extras are switched off where §7.2 is reproduced)
EXAMPLE = MosfetFamily(
    name="worked-example", level="standard", v_ds_max=60.0, i_d_max=30.0, rds_on=0.020, v_gs_rated=10.0,
    rds_on_at_4v5=None, alpha=0.007, v_th=2.5, v_plateau=4.5, q_g=20e-9, v_gs_q=10.0, q_gs=5e-9, q_gd=8e-9,
    r_g_int=2.0, c_oss=0.0, v_gs_max=20.0, r_theta_ja=62.0, r_theta_jc=1.5, tj_max_c=175.0,
)


def test_switching_times_references_7_2():
    # Mohan, Undeland & Robbins, Power Electronics, 3rd ed., §2-7 and ch. 22, from memory (regression pin): driver 12 V, 10 Ω up/down, R_G,ext 10 Ω (R_on = R_off = 22 Ω); recomputed from §7.1
    g = gate_drive(12.0, 10.0, 10.0, EXAMPLE)
    r_loop, c_iss, q_gs2 = 22.0, 5e-9 / 4.5, 5e-9 * (4.5 - 2.5) / 4.5
    assert g.r_loop_on == g.r_loop_off == r_loop
    assert g.q_gs2 == pytest.approx(2.222e-9, abs=0.5e-12)  # §7.2: Q_gs2 = 2.222 nC
    assert g.c_iss == pytest.approx(1111e-12, abs=0.5e-12)  # §7.2: C_iss ≈ 1111 pF
    assert g.i_g_on == pytest.approx(0.3409, abs=5e-5)  # §7.2
    assert g.i_g_off == pytest.approx(0.2045, abs=5e-5)  # §7.2
    assert g.t_d_on == pytest.approx(r_loop * c_iss * math.log(12 / (12 - 2.5)), rel=1e-12)
    assert g.t_d_on == pytest.approx(5.71e-9, abs=0.005e-9)  # §7.2
    assert g.t_ri == pytest.approx(q_gs2 / ((12 - 4.5) / r_loop), rel=1e-12)
    assert g.t_ri == pytest.approx(6.52e-9, abs=0.005e-9)  # §7.2
    assert g.t_fv == pytest.approx(23.47e-9, abs=0.005e-9)  # §7.2
    assert g.t_on == pytest.approx(29.99e-9, abs=0.005e-9)  # §7.2
    assert g.t_d_off == pytest.approx(23.98e-9, abs=0.005e-9)  # §7.2
    assert g.t_rv == pytest.approx(39.11e-9, abs=0.005e-9)  # §7.2
    assert g.t_fi == pytest.approx(10.86e-9, abs=0.005e-9)  # §7.2
    assert g.t_off == pytest.approx(49.98e-9, abs=0.005e-9)  # §7.2
    assert g.fully_enhanced and g.gate_margin == pytest.approx(2.0) and not g.gate_overvoltage


def test_losses_and_junction_temperature_references_7_2():
    # Mohan, Undeland & Robbins, Power Electronics, 3rd ed., §2-7 and ch. 22, from memory (regression pin): load 12 V, 2 A, 20 kHz, D 0.7, T_a 40 °C, R_θJA 62 K/W, α 0.7 %/K
    g = gate_drive(12.0, 10.0, 10.0, EXAMPLE)
    i_rms = math.sqrt(0.7) * 2.0
    res = mosfet_losses(g, 12.0, 2.0, i_rms, 20e3, 40.0, extras=False)
    # Mohan et al. 3rd ed. eq. (2-6) (from memory): P_s = ½·V·I·f·(t_on + t_off)
    assert res.p_sw == pytest.approx(0.5 * 12 * 2 * 20e3 * (g.t_on + g.t_off), rel=1e-12)
    assert res.p_sw == pytest.approx(19.19e-3, abs=0.005e-3)  # §7.2: 19.19 mW
    assert res.p_gate == pytest.approx(5.41e-3, abs=0.005e-3)  # §7.2: Q_g(12 V) 22.55 nC → 5.41 mW
    assert g.q_g_drive == pytest.approx(20e-9 + 7e-9 / 5.5 * 2.0, rel=1e-12)  # §7.2 extrapolation
    assert res.tj_c == pytest.approx(45.19, abs=0.005)  # §7.2: T_j 45.19 °C
    assert res.rds_on_hot == pytest.approx(23.02e-3, abs=0.005e-3)  # §7.2: 23.02 mΩ
    assert res.p_cond == pytest.approx(64.47e-3, abs=0.005e-3)  # §7.2: 64.47 mW
    assert res.p_total == pytest.approx(83.66e-3, abs=0.005e-3)  # §7.2: 83.66 mW
    assert res.tj_margin == pytest.approx(175.0 - res.tj_c)
    assert (res.t_d_on, res.t_ri, res.t_fv, res.t_d_off, res.t_rv, res.t_fi) == (
        g.t_d_on, g.t_ri, g.t_fv, g.t_d_off, g.t_rv, g.t_fi)
    assert not res.runaway and not res.over_temperature
    assert res.v_ds_margin == pytest.approx(48.0)
    # independent check of the fixed point with scipy's brentq on T = T_a + R_θ·P(T)
    tj_ref = brentq(lambda t: 40 + 62 * (res.p_sw + i_rms**2 * 0.02 * 1.007 ** (t - 25)) - t, 40.0, 100.0,
                    xtol=1e-12)
    assert res.tj_c == pytest.approx(tj_ref, abs=1e-8)
    # with extras the MOSFET also takes the R_G,int share of the gate power: slightly hotter
    full = mosfet_losses(g, 12.0, 2.0, i_rms, 20e3, 40.0)
    assert full.p_gate_internal == pytest.approx(res.p_gate * 2.0 / 22.0, rel=1e-12)
    assert full.tj_c > res.tj_c


def test_gate_power_at_rated_point_is_qg_v_f():
    # §7.2: 20 nC·12 V·20 kHz = 4.80 mW if Q_g(10 V) is used; at exactly 10 V drive Q_g(10 V) applies
    g10 = gate_drive(10.0, 10.0, 10.0, EXAMPLE)
    assert g10.q_g_drive == pytest.approx(20e-9, rel=1e-12)
    assert 20e-9 * 12 * 20e3 == pytest.approx(4.80e-3, abs=0.005e-3)
    assert EXAMPLE.q_g_at(4.5) == pytest.approx(5e-9)  # end of Q_gs at the plateau
    assert EXAMPLE.q_g_at(4.5 + 1e-12) == pytest.approx(13e-9, rel=1e-6)  # Miller charge crossed


def test_cmos_timer_drive_is_slow_references_7_2():
    # Mohan, Undeland & Robbins, Power Electronics, 3rd ed., §2-7 and ch. 22, from memory (regression pin): CMOS 555-type output (≈80–200 Ω source, no external resistor): t_fv 87.5–215.5 ns
    assert gate_drive(12.0, 80.0, 0.0, EXAMPLE).t_fv == pytest.approx(87.5e-9, abs=0.05e-9)
    assert gate_drive(12.0, 200.0, 0.0, EXAMPLE).t_fv == pytest.approx(215.5e-9, abs=0.05e-9)


def test_drive_below_plateau_is_a_design_error():
    with pytest.raises(DesignError, match="v_drive_high: 4.5 V does not exceed the Miller plateau 5 V"):
        gate_drive(4.5, 10.0, 0.0, STANDARD_LEVEL_60V)
    with pytest.raises(DesignError, match="v_drive_low: 2 V is not below the threshold"):
        gate_drive(12.0, 10.0, 0.0, LOGIC_LEVEL_30V, v_drive_low=2.0)
    with pytest.raises(DesignError, match="gate loop resistance is zero"):
        gate_drive(12.0, 0.0, 0.0, MosfetFamily(**{**EXAMPLE.__dict__, "r_g_int": 0.0, "origin": {}}))


def test_under_drive_flags_and_rds_estimate():
    # logic-level part is rated at 4.5 V (common practice); a standard part at 10 V only
    ok = gate_drive(5.0, 10.0, 0.0, LOGIC_LEVEL_30V)
    assert ok.fully_enhanced and ok.gate_margin == pytest.approx(0.5)
    low = gate_drive(6.0, 10.0, 0.0, STANDARD_LEVEL_60V)
    assert not low.fully_enhanced and low.gate_margin == pytest.approx(-4.0) and low.rds_estimated
    assert low.rds_on_25 > STANDARD_LEVEL_60V.rds_on
    # the two rated points of the logic-level part are reproduced by the R_0 + K/(V - V_th) fit
    assert LOGIC_LEVEL_30V.rds_on_at(4.5) == pytest.approx(0.026, rel=1e-12)
    assert LOGIC_LEVEL_30V.rds_on_at(10.0) == pytest.approx(0.018, rel=1e-12)
    assert LOGIC_LEVEL_30V.rds_on_at(15.0) == pytest.approx(0.018)  # no credit for over-drive
    rds = LOGIC_LEVEL_30V.rds_on_at(np.linspace(3.5, 10, 20))
    assert np.all(np.diff(rds) < 0)  # falls with gate drive
    over = gate_drive(25.0, 10.0, 0.0, LOGIC_LEVEL_30V)
    assert over.gate_overvoltage


def test_rds_on_temperature_law_from_memory():
    # R(T) = R25·(1+α)^(T-25). Data-sheet normalised R_DS(on)-vs-T_j curves of silicon power MOSFETs
    # give about ×1.4–1.8 at 125 °C (common practice, from memory; e.g. Mohan, Undeland & Robbins,
    # Power Electronics, 3rd ed., ch. 22, from memory). Every built-in family must lie in that band.
    assert EXAMPLE.rds_on_at(10.0, 125.0) == pytest.approx(0.02 * 1.007**100, rel=1e-12)
    for fet in MOSFETS.values():
        ratio = fet.rds_on_at(10.0, 125.0) / fet.rds_on_at(10.0, 25.0)
        assert 1.4 <= ratio <= 1.8, fet.name


def test_thermal_runaway_reported_without_a_temperature():
    # 10 A rms through 20 mΩ on 62 K/W: no operating point exists → runaway, no number (documented choice)
    g = gate_drive(12.0, 10.0, 10.0, EXAMPLE)
    hot = mosfet_losses(g, 12.0, 2.0, 10.0, 20e3, 40.0)
    assert hot.runaway is True and hot.over_temperature is True
    assert hot.tj_c is None and hot.p_total is None and hot.tj_margin is None and hot.rds_on_hot is None
    assert "runaway=yes" in repr(hot) and "tj_c=—" in repr(hot)
    # array input: the same point is masked, the cool one has its number
    arr = mosfet_losses(g, 12.0, 2.0, np.array([1.0, 10.0]), 20e3, 40.0)
    assert list(arr.runaway) == [False, True]
    assert not np.ma.is_masked(arr.tj_c[0]) and np.ma.is_masked(arr.tj_c[1])
    assert np.isfinite(arr.tj_c.compressed()).all()
    # a heat sink (R_θ 5 K/W) rescues it
    sunk = mosfet_losses(g, 12.0, 2.0, 10.0, 20e3, 40.0, r_theta=5.0)
    assert not sunk.runaway and 40.0 < sunk.tj_c < 175.0


def test_vector_equals_scalar_losses():
    g = gate_drive(12.0, 10.0, 0.0, LOGIC_LEVEL_30V)
    i = np.array([0.5, 1.0, 2.0])
    f = np.array([1e3, 20e3, 50e3])
    vec = mosfet_losses(g, 12.7, i, i * 0.9, f, 40.0, i_off=i * 1.1, q_rr=5e-9)
    for k in range(3):
        one = mosfet_losses(g, 12.7, float(i[k]), float(i[k]) * 0.9, float(f[k]), 40.0, i_off=float(i[k]) * 1.1,
                            q_rr=5e-9)
        assert one.tj_c == pytest.approx(float(vec.tj_c[k]), abs=1e-9)
        assert one.p_total == pytest.approx(float(vec.p_total[k]), rel=1e-9)
        assert one.p_sw == pytest.approx(vec.p_sw[k], rel=1e-12)
    # the loss pieces add up; Coss and recovery terms as in Mohan, Undeland & Robbins, Power Electronics, 3rd ed., §2-7 and ch. 22, from memory
    assert np.allclose(vec.p_coss, 0.5 * LOGIC_LEVEL_30V.c_oss * 12.7**2 * f)
    assert np.allclose(vec.p_rr, 5e-9 * 12.7 * f)
    total = vec.p_sw + vec.p_coss + vec.p_rr + vec.p_gate_internal + vec.p_cond
    assert np.allclose(total, vec.p_total, rtol=1e-9)


def test_dcm_turn_on_at_zero_current_has_no_overlap_loss():
    # DCM: the switch turns on at zero current (I_min = 0) — only turn-off overlap loss remains
    g = gate_drive(12.0, 10.0, 10.0, EXAMPLE)
    res = mosfet_losses(g, 12.0, 0.0, 1.8, 500.0, 25.0, i_off=3.34)
    assert res.p_sw_on == 0.0 and res.p_sw == pytest.approx(0.5 * 12 * 3.34 * g.t_off * 500.0)


@reaching()
@settings(max_examples=60, deadline=None)
@given(case=mostly(
    st.tuples(st.floats(4.5, 15.0), st.floats(0.0, 1e3), st.floats(1.0, 30.0), st.floats(0.0, 5.0),
              st.floats(10.0, 1e6), st.floats(-40.0, 85.0)),
    st.tuples(st.floats(0.0, 30.0), st.floats(-5.0, 1e4), st.floats(-1.0, 100.0), st.floats(-1.0, 200.0),
              st.floats(-1.0, 1e7), st.floats(-80.0, 250.0))))
def test_property_finite_or_design_error(case):
    v_drive, r_src, v_ds, i, f, ta = case
    # property (style guide): finite numbers, a runaway result without a number, or DesignError — never NaN
    try:
        g = gate_drive(v_drive, r_src, 4.7, LOGIC_LEVEL_30V)
        res = mosfet_losses(g, v_ds, i, i, f, ta)
    except DesignError:
        return
    reached()
    for name in ("t_on", "t_off", "p_sw", "p_coss", "p_gate", "p_gate_internal"):
        assert math.isfinite(getattr(res, name)), name
    if res.runaway:
        assert res.tj_c is None and res.p_total is None
    else:
        assert math.isfinite(res.tj_c) and math.isfinite(res.p_total) and res.tj_c >= ta


def test_family_registry_and_validation():
    assert set(MOSFETS) == {"logic-level-30v", "standard-level-60v"}
    assert get_mosfet("Standard Level 60V") is STANDARD_LEVEL_60V
    assert get_mosfet(EXAMPLE) is EXAMPLE
    with pytest.raises(DesignError, match="not a known MOSFET family; choose one of logic-level-30v"):
        get_mosfet("IRF-something")
    assert all(tag in ("demo", "from-memory", "common-practice") for tag in LOGIC_LEVEL_30V.origin.values())
    base = {**EXAMPLE.__dict__, "origin": {}}
    with pytest.raises(DesignError, match="v_plateau: 2 V must lie between v_th"):
        MosfetFamily(**{**base, "v_plateau": 2.0})
    with pytest.raises(DesignError, match="q_g: 1e-08 C must exceed q_gs"):
        MosfetFamily(**{**base, "q_g": 10e-9})
    with pytest.raises(DesignError, match="alpha: 0.7 /K is out of range"):
        MosfetFamily(**{**base, "alpha": 0.7})
    with pytest.raises(DesignError, match="origin"):
        MosfetFamily(**{**base, "origin": {"rds_on": "guess"}})
    with pytest.raises(DesignError, match="gate: str is not a GateDrive"):
        mosfet_losses("gate", 12.0, 1.0, 1.0, 1e3)  # type: ignore[arg-type]


def test_repr_html():
    g = gate_drive(12.0, 10.0, 10.0, EXAMPLE)
    res = mosfet_losses(g, 12.0, 2.0, 1.6733, 20e3, 40.0)
    assert isinstance(g, GateDrive) and isinstance(res, MosfetLosses)
    assert "t_fv=23.467 ns" in repr(g)
    assert "<table>" in res._repr_html_() and "tj_c" in res._repr_html_()
    assert "logic-level" in repr(LOGIC_LEVEL_30V) and "[demo]" in LOGIC_LEVEL_30V._repr_html_()
