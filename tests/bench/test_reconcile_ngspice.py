"""Reconcile against an ngspice transient of the wired steered astable (skipped without ngspice).

The netlist is the real circuit built from component values: R_A from the supply to the
discharge node, D1 into the capacitor, D2 and R_B back to the discharge node, and the timer's
comparators and discharge transistor as one voltage-controlled switch with hysteresis (on above
2/3, off below 1/3 of the supply, as the internal divider sets them) to a 0.1 V saturation
source. Each steering diode is a near-ideal junction (emission coefficient 0.05) in series with
a 0.62 V source, so its drop stays within about a millivolt of the design's constant ``vd``. The
built capacitor is 8 % above the design's. The discharge-node waveform goes through
:func:`capture_timing` like a scope capture.
"""

from __future__ import annotations

import math
import shutil
import subprocess

import numpy as np
import pytest

from pwmkit.bench import capture_timing, reconcile
from pwmkit.design import Design, Timing

NGSPICE = shutil.which("ngspice")
pytestmark = pytest.mark.skipif(NGSPICE is None, reason="ngspice is not installed")

C_DESIGN = 47e-9
NETLIST = """steered astable, built capacitor +8 %
VCC vcc 0 12
RA vcc dis 10k
VD1 dis a1 0.62
D1 a1 c dideal
D2 c a2 dideal
VD2 a2 b2 0.62
RB b2 dis 4.7k
C1 c 0 {c} IC=4.2
S1 dis vs c 0 swmod
VS vs 0 0.1
.model dideal D(IS=1e-14 N=0.05)
.model swmod sw(vt=6 vh=2 ron=0.001 roff=1e12)
.control
set wr_singlescale
tran 0.25u 5m uic
wrdata {out} v(dis)
quit
.endc
.end
"""


def _diode_drop(i: float) -> float:
    """0.62 V plus the near-ideal junction's N·V_T·ln(1 + I/I_S) at 27 °C (ngspice's default temperature)."""
    vt = 1.380649e-23 * 300.15 / 1.602176634e-19   # k·T/q, CODATA 2018 constants
    return 0.62 + 0.05 * vt * math.log1p(i / 1e-14)


def test_ngspice_build_with_capacitor_off_by_8_percent(tmp_path):
    out = tmp_path / "out.txt"
    (tmp_path / "astable.cir").write_text(NETLIST.format(c=f"{1.08 * C_DESIGN:.6g}", out=out), encoding="utf-8")
    subprocess.run([NGSPICE, "-b", "astable.cir"], cwd=tmp_path, check=True, capture_output=True, timeout=120)
    data = np.loadtxt(out)
    t, v = data[:, 0], data[:, 1]
    keep = np.concatenate([np.diff(t) > 0, [True]])     # ngspice repeats a time point at breakpoints
    m = capture_timing(t[keep], v[keep], threshold=2.0)
    assert m.n_periods >= 3
    vd = _diode_drop(0.5e-3)                             # charge current ≈ 0.35 … 0.7 mA
    design = Design(name="spice", vcc=12.0, timing=Timing(topology="steered", ra=10e3, rb=4.7e3, c=C_DESIGN, vd=vd,
                                                           vsat=0.1, r_on=0.0, r_tolerance=0.01, c_tolerance=0.1))
    r = reconcile(design, frequency=m.frequency, duty=m.duty, vcc=12.0, t_ambient_c=25.0,
                  frequency_accuracy=max(m.frequency_limit, 1e-4), duty_accuracy=max(m.duty_limit, 1e-3))
    assert r.inside
    assert r.culprit == "c"
    assert r.estimates["c"] == pytest.approx(1.08 * C_DESIGN, rel=0.02)
