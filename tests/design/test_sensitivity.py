"""Exact sensitivities against outside references.

Sources named beside each check:
- finite differences of pwmkit.timing.astable (an independent numeric route: no symbolic derivative);
- sympy evaluated at 30 significant digits (the derivative of the frequency taken directly, not through
  pwmkit's chain rule for t_high/t_low);
- RC-timing facts of the trade (common practice): f ∝ 1/((RA + 2RB)·C) for the ideal classic astable, so
  ∂ln f/∂ln C = −1 and ∂ln f/∂ln RA + ∂ln f/∂ln RB = −1;
- first-order sensitivity of T = R·C·ln(…), common practice check values marked (regression pin) (recomputed here from the sensitivities);
- JCGM 100:2008 (GUM) §4.3.7 (rectangular distribution u = a/√3) and §5.1.2 (law of propagation).
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from pwmkit import DesignError
from pwmkit.sensitivity import parameters_of, sensitivities, standard_uncertainty
from pwmkit.timing import astable

CASES = [
    ("classic", dict(ra=4.7e3, rb=22e3, c=47e-9, vcc=12.0)),
    ("classic", dict(ra=4.7e3, rb=22e3, c=47e-9, vcc=9.0, vctl=5.5, timer="cmos")),
    ("bypass", dict(ra=10e3, rb=3.3e3, c=100e-9, vcc=12.0, vd=0.62)),
    ("steered", dict(ra=10e3, rb=3.3e3, c=100e-9, vcc=5.0, vd=0.55, timer="cmos")),
    ("pot", dict(ra=1e3, rb=2.2e3, pot=47e3, wiper=0.3, c=10e-9, vcc=12.0, vd=0.6)),
    ("pot", dict(ra=1e3, rb=2.2e3, pot=47e3, wiper=0.8, c=10e-9, vcc=12.0, vd=0.6, vctl=7.0, r_on=20.0)),
]


def _resolved(topology: str, kw: dict) -> dict:
    """Every timing parameter's value at the design point (defaults filled in as astable does)."""
    s = sensitivities(topology, **kw)
    return {r.name: r.value for r in s.rows}


@pytest.mark.parametrize("topology,kw", CASES)
def test_sensitivities_match_finite_differences_of_astable(topology: str, kw: dict) -> None:
    s = sensitivities(topology, **kw)
    values = _resolved(topology, kw)
    for row in s.rows:
        x = values[row.name]
        h = 1e-6 if row.name == "wiper" else (1e-6 * abs(x) if x != 0 else 1e-7)
        up, down = dict(kw), dict(kw)
        up[row.name] = x + h   # "vctl" given explicitly moves the threshold at a fixed supply
        if x - h >= 0:
            down[row.name], step = x - h, 2 * h
        else:   # one-sided at a parameter that is 0 (vsat of the CMOS family, r_on of the bipolar one)
            down[row.name], step = x, h
        up_r, down_r = astable(topology, **up), astable(topology, **down)
        df = (up_r.frequency - down_r.frequency) / step
        dd = (up_r.duty - down_r.duty) / step
        # finite differences of astable() (independent numeric route): agree to ~1e-6 relative; the
        # absolute allowance covers double-precision round-off divided by the step
        assert row.d_frequency == pytest.approx(df, rel=1e-6, abs=1e-9 * s.frequency / step), row.name
        assert row.d_duty == pytest.approx(dd, rel=1e-6, abs=1e-9 / step), row.name


@pytest.mark.parametrize("topology,kw", CASES[::2])
def test_frequency_derivative_matches_sympy_30_digits(topology: str, kw: dict) -> None:
    import sympy as sp

    from pwmkit.timing import expressions

    s = sensitivities(topology, **kw)
    values = _resolved(topology, kw)
    e = expressions(topology)
    sym = e.symbols
    subs = {getattr(sym, n): sp.Float(repr(v), 30) for n, v in values.items()}
    for name in ("pot", "wiper"):
        subs.setdefault(getattr(sym, name), sp.Integer(0))
    for row in s.rows:
        if row.name in ("vcc",) and "vctl" not in kw:
            continue  # total derivative (vctl follows vcc); checked by finite differences above
        exact = sp.diff(e.frequency, getattr(sym, row.name)).evalf(30, subs=subs)
        # sympy at 30 digits (direct derivative of f): the lambdified route agrees to ~1e-10
        assert row.d_frequency == pytest.approx(float(exact), rel=1e-9, abs=1e-12 * s.frequency)


def test_classic_ideal_analytic_limits_common_practice() -> None:
    ra, rb, c = 4.7e3, 22e3, 47e-9
    s = sensitivities("classic", ra=ra, rb=rb, c=c, vcc=12.0, vsat=0.0, r_on=0.0)
    # common practice (f = 1.44/((RA+2RB)C)): ∂ln f/∂ln C = −1 exactly, and the two resistors share −1
    assert s.row("c").s_frequency == pytest.approx(-1.0, abs=1e-12)
    assert s.row("ra").s_frequency + s.row("rb").s_frequency == pytest.approx(-1.0, abs=1e-12)
    assert s.row("ra").s_frequency == pytest.approx(-ra / (ra + 2 * rb), rel=1e-12)
    # D = (RA+RB)/(RA+2RB) (common practice) differentiated by hand: ∂D/∂RA = RB/(RA+2RB)²
    assert s.row("ra").d_duty == pytest.approx(rb / (ra + 2 * rb) ** 2, rel=1e-10)
    # ideal timing does not depend on the supply (ratio-metric thresholds, 555-type timer data sheets, typical published datasheet value, generic)
    assert s.row("vcc").s_frequency == pytest.approx(0.0, abs=1e-12)
    assert abs(s.row("c").duty_per_relative) < 1e-12


def test_refs_1_9_worst_case_and_rss_example() -> None:
    # first-order sensitivity of T = R·C·ln(…), common practice (regression pin): R ±1 %, C ±10 %, timer ±2.25 % → worst case ±13.25 %, RSS ±10.30 %
    tol = {"ra": 0.01, "rb": 0.01, "c": 0.10}
    s = sensitivities("classic", ra=10e3, rb=10e3, c=100e-9, vcc=12, vsat=0, r_on=0, tolerances=tol,
                      timer_accuracy=0.0225)
    assert round(100 * s.frequency_rel_worst, 2) == 13.25
    # the example's single "R": both resistors move together, S_R = S_ra + S_rb
    s_r = s.row("ra").s_frequency + s.row("rb").s_frequency
    rss = math.sqrt((s_r * 0.01) ** 2 + (s.row("c").s_frequency * 0.10) ** 2 + 0.0225**2)
    assert round(100 * rss, 2) == 10.30
    # with one dominant timing resistor the module's RSS of the bands gives the same figure
    s1 = sensitivities("classic", ra=100.0, rb=1e6, c=100e-9, vcc=12, vsat=0, r_on=0, tolerances=tol,
                       timer_accuracy=0.0225)
    assert round(100 * s1.frequency_rel_rss, 2) == 10.30


def test_refs_1_9_diode_drop_sensitivity() -> None:
    # first-order sensitivity of T = R·C·ln(…), common practice (regression pin): one-diode circuit of §1.4: ∂t_H/∂Vd = 0.16245 ms/V → −413 ppm/K at −2 mV/K
    s = sensitivities("bypass", ra=10e3, rb=10e3, c=100e-9, vcc=12, vd=0.65, vsat=0.1)
    r, f, d = s.row("vd"), s.frequency, s.duty
    dth = (r.d_duty * f - d * r.d_frequency) / f**2          # t_high = D/f
    assert dth * 1e3 == pytest.approx(0.16245, abs=5e-6)
    assert dth * -2e-3 / (d / f) * 1e6 == pytest.approx(-413, abs=1)
    # two-diode discharge (§1.5): −423 ppm/K of t_L
    s = sensitivities("steered", ra=10e3, rb=10e3, c=100e-9, vcc=12, vd=0.65, vsat=0.1)
    r, f, d = s.row("vd"), s.frequency, s.duty
    dtl = (-r.d_duty * f - (1 - d) * r.d_frequency) / f**2   # t_low = (1 − D)/f
    assert dtl * -2e-3 / ((1 - d) / f) * 1e6 == pytest.approx(-423, abs=1)


def test_standard_uncertainty_gum_4_3_7() -> None:
    # JCGM 100:2008 §4.3.7: rectangular ±a → u = a/√3; normal with a = 3σ → u = a/3
    assert standard_uncertainty(-0.05, 0.05, "uniform") == pytest.approx(0.05 / math.sqrt(3))
    assert standard_uncertainty(-0.05, 0.05, "normal") == pytest.approx(0.05 / 3)


def test_gum_propagation_sums_squares_of_contributions() -> None:
    # JCGM 100:2008 §5.1.2 eq. (10), uncorrelated inputs: u_c² = Σ (c_i·u_i)²
    tol = {"ra": 0.05, "rb": 0.01, "c": 0.1, "vd": 0.05}
    s = sensitivities("steered", ra=10e3, rb=4.7e3, c=22e-9, vcc=12, vd=0.6, tolerances=tol,
                      distribution={"c": "normal"})
    expect = math.sqrt(sum((s.row(n).s_frequency * standard_uncertainty(-t, t, "normal" if n == "c" else "uniform"))
                           ** 2 for n, t in tol.items()))
    assert s.frequency_rel_std == pytest.approx(expect, rel=1e-12)
    assert s.row("c").distribution == "normal" and s.row("ra").distribution == "uniform"
    assert s.frequency_rel_worst == pytest.approx(sum(abs(s.row(n).s_frequency) * t for n, t in tol.items()))


def test_parameters_of_topologies() -> None:
    assert "vd" not in parameters_of("classic")
    assert {"pot", "wiper"} <= set(parameters_of("pot"))
    assert "pot" not in parameters_of("steered")


@pytest.mark.parametrize("kw,match", [
    (dict(ra=np.array([1e3, 2e3]), rb=1e3, c=1e-8, vcc=12), "scalars"),
    (dict(ra=1e3, rb=1e3, c=1e-8, vcc=12, foo=1), "foo"),
    (dict(ra=1e3, rb=1e3, c=1e-8, vcc=12, tolerances={"pot": 0.1}), "not used by the 'classic'"),
    (dict(ra=1e3, rb=1e3, c=1e-8, vcc=12, tolerances={"ra": 1.5}), "out of range"),
    (dict(ra=1e3, rb=1e3, c=1e-8, vcc=12, tolerances={"ra": 0.1}, distribution="triangle"), "distribution"),
    (dict(ra=1e3, rb=1e3, c=1e-8), "vcc: missing"),
    (dict(ra=1e3, rb=1e3, c=1e-8, vcc=12, vctl=12.5), "upper threshold"),
])
def test_bad_input_is_design_error(kw: dict, match: str) -> None:
    with pytest.raises(DesignError, match=match):
        sensitivities("classic", **kw)


def test_repr_html_is_a_table() -> None:
    s = sensitivities("pot", ra="1k", rb="1k", pot="47k", wiper=0.5, c="10n", vcc=12, tolerances={"pot": "20%"})
    html = s._repr_html_()
    assert html.startswith("<table") and "pot" in html and "σ_f/f" in html
    assert "SensitivityResult(pot" in repr(s)
    with pytest.raises(DesignError, match="vd"):
        sensitivities("classic", ra=1e3, rb=1e3, c=1e-8, vcc=12).row("vd")
