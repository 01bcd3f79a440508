"""Monostable width, control-pin drive and the single-timer control-pin modulation.

Sources: the monostable width R·C·ln(Vcc/(Vcc − Vctl)) and its 1.1·R·C special case with the
internal divider (common practice; bipolar and CMOS 555-type timer data sheets, monostable
operation — typical published datasheet value, generic); the sympy derivation (reference for the
numeric code); ngspice (/usr/bin/ngspice) transient of the RC charge, skipped when absent; the
internal divider of three 5 kΩ resistors (from memory) for the control-pin drive.
"""

from __future__ import annotations

import math
import shutil
import subprocess

import numpy as np
import pytest

from pwmkit import DesignError
from pwmkit.timing import astable, control_voltage_from_divider
from pwmkit.timing.monostable import control_pin_drive, control_pin_sweep, monostable
from pwmkit.timing.monostable_symbolic import monostable_expressions


def test_monostable_width_common_practice_log_law():
    # common practice: t = R·C·ln(Vcc/(Vcc − Vctl)) from a fully discharged capacitor
    for r, c, vcc, vctl in ((10e3, 1e-6, 12.0, 6.0), (47e3, 22e-9, 5.0, 4.5), (1e6, 1e-6, 15.0, 1.0)):
        got = monostable(r=r, c=c, vcc=vcc, vctl=vctl, vsat=0.0).width
        assert got == pytest.approx(r * c * math.log(vcc / (vcc - vctl)), rel=1e-12)


def test_monostable_one_point_one_rc_rule():
    # common practice / datasheet-generic: t_w = 1.1·R·C with the internal divider (exactly ln 3 = 1.0986)
    r = monostable(r=100e3, c=100e-9, vcc=12.0, vsat=0.0)
    assert r.width == pytest.approx(1.1 * 100e3 * 100e-9, rel=0.002)  # "1.1" is printed to 2 digits
    assert r.width == pytest.approx(math.log(3) * 1e-2, rel=1e-12)
    assert r.v_threshold == pytest.approx(8.0) and r.v_trigger == pytest.approx(4.0)


def test_monostable_start_level_shortens_pulse():
    r = monostable(r=10e3, c=1e-6, vcc=12.0, vctl=8.0, vsat=0.1)
    assert r.width == pytest.approx(1e-2 * math.log((12 - 0.1) / (12 - 8)), rel=1e-12)
    assert r.v_start == 0.1
    cm = monostable(r=10e3, c=1e-6, vcc=12.0, timer="cmos")
    assert cm.v_start == pytest.approx(12 * 14 / (10e3 + 14))  # on-resistance divider


def test_monostable_vectorised_equals_scalar():
    v = np.linspace(1.0, 11.0, 7)
    arr = monostable(r="10k", c="1u", vcc=12, vctl=v)
    assert isinstance(arr.width, np.ndarray) and arr.width.shape == (7,)
    for k, vk in enumerate(v):
        assert arr.width[k] == monostable(r=10e3, c=1e-6, vcc=12.0, vctl=float(vk)).width
    assert isinstance(monostable(r=10e3, c=1e-6, vcc=12.0).width, float)


@pytest.mark.parametrize("vctl", [12.0, 13.0])
def test_monostable_unreachable_threshold_is_design_error(vctl):
    with pytest.raises(DesignError, match="vctl: .* cannot be reached"):
        monostable(r=10e3, c=1e-6, vcc=12.0, vctl=vctl)


def test_monostable_bad_inputs():
    with pytest.raises(DesignError, match="not above the capacitor's start level"):
        monostable(r=10e3, c=1e-6, vcc=12.0, vctl=0.05, vsat=0.1)
    with pytest.raises(DesignError, match="r: "):
        monostable(r=-1.0, c=1e-6, vcc=12.0)
    with pytest.raises(DesignError, match="timer"):
        monostable(r=1e3, c=1e-6, vcc=12.0, timer="valve")


def test_numeric_width_matches_sympy_high_precision():
    e = monostable_expressions()
    s = e.symbols
    for r, c, vcc, vctl, vs in ((10e3, 1e-6, 12.0, 6.0, 0.1), (3.3e3, 4.7e-9, 5.0, 1.0, 0.0)):
        ref = e.width.subs({s.r: r, s.c: c, s.vcc: vcc, s.vctl: vctl, s.v_start: vs}).evalf(30)
        assert monostable(r=r, c=c, vcc=vcc, vctl=vctl, vsat=vs).width == pytest.approx(float(ref), rel=1e-13)


def test_sympy_derivatives_against_finite_difference():
    e = monostable_expressions()
    s = e.symbols
    vals = {s.r: 10e3, s.c: 1e-7, s.vcc: 12.0, s.vctl: 6.0, s.v_start: 0.1, s.period: 1.5e-3}
    h = 1e-6
    d = e.duty
    fd = (d.subs({**vals, s.vctl: 6.0 + h}) - d.subs({**vals, s.vctl: 6.0 - h})) / (2 * h)
    assert float(e.duty_per_volt.subs(vals)) == pytest.approx(float(fd), rel=1e-6)
    fd = (d.subs({**vals, s.vcc: 12.0 + h}) - d.subs({**vals, s.vcc: 12.0 - h})) / (2 * h)
    assert float(e.duty_per_supply.subs(vals)) == pytest.approx(float(fd), rel=1e-6)


def test_control_pin_drive_matches_divider_and_references_check_value():
    # Rext = 10 kΩ to ground at 12 V against the 5k/5k/5k divider gives 6.000 V (regression pin, computed from the divider)
    d = control_pin_drive(0.0, 10e3, 12.0)
    assert d.vctl == pytest.approx(6.0, abs=1e-12)
    assert d.vctl == pytest.approx(control_voltage_from_divider(12.0, 10e3))
    assert d.r_internal == pytest.approx(10e3 / 3)  # 5k ∥ 10k (from memory: three 5 kΩ)
    assert control_pin_drive(5.0, 0.0, 12.0).vctl == pytest.approx(5.0)  # stiff source wins
    assert control_pin_drive(5.0, 1e9, 12.0).vctl == pytest.approx(8.0, abs=1e-4)  # weak source: 2Vcc/3
    with pytest.raises(DesignError, match="r_divider"):
        control_pin_drive(5.0, 1e3, 12.0, timer="cmos")
    assert control_pin_drive(5.0, 1e3, 12.0, timer="cmos", r_divider=100e3).gain > 0.98


def test_control_pin_sweep_references_table():
    # worked table (classic, ideal switch) computed from the closed forms — regression pins
    s = control_pin_sweep("classic", [6.0, 8.0, 9.0, 11.5], ra=10e3, rb=10e3, c=100e-9, vcc=12.0, vsat=0.0)
    assert s.frequency == pytest.approx([664.86, 480.90, 395.93, 174.08], abs=0.01)
    assert s.duty == pytest.approx([0.5392, 0.6667, 0.7256, 0.8793], abs=1e-4)
    ref = astable("classic", ra=10e3, rb=10e3, c=100e-9, vcc=12.0, vsat=0.0, vctl=9.0)
    assert s.frequency[2] == ref.frequency


_NGSPICE = shutil.which("ngspice")


@pytest.mark.skipif(_NGSPICE is None, reason="ngspice not installed")
def test_monostable_width_against_ngspice(tmp_path):
    """ngspice transient of the timing RC from the start level; the crossing of vctl is the pulse end."""
    r, c, vcc, vctl, vs = 10e3, 100e-9, 12.0, 7.0, 0.1
    net = f"""monostable timing RC
V1 vcc 0 {vcc}
R1 vcc cap {r}
C1 cap 0 {c} IC={vs}
.tran 1u 5m UIC
.meas tran tw WHEN v(cap)={vctl} RISE=1
.end
"""
    (tmp_path / "m.cir").write_text(net)
    out = subprocess.run([_NGSPICE, "-b", "m.cir"], cwd=tmp_path, capture_output=True, text=True, timeout=60)
    line = next(x for x in out.stdout.splitlines() if x.strip().lower().startswith("tw"))
    t_spice = float(line.split("=")[1].split()[0])
    assert monostable(r=r, c=c, vcc=vcc, vctl=vctl, vsat=vs).width == pytest.approx(t_spice, rel=2e-3)
