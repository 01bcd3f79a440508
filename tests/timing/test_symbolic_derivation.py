"""The sympy derivation is the reference for the numeric code.

Sources: sympy (dsolve as an independent second derivation route; evalf at 30 digits as the
high-precision reference), the ln 2 textbook factor (common practice).
"""

from __future__ import annotations

import numpy as np
import pytest
import sympy as sp

from pwmkit.timing import astable, expressions
from pwmkit.timing.symbolic import crossing_time, symbols


def test_crossing_time_agrees_with_dsolve_route() -> None:
    # Route 1: pwmkit solves v(t) = V1 on the closed-form RC law. Route 2 (here): sympy dsolve of
    # R·C·dv/dt = V∞ − v with v(0) = V0, then solve for the crossing. Both must agree symbolically.
    law, (r, c, v_inf, v0, v1) = crossing_time()
    t = sp.Symbol("t", positive=True)
    v = sp.Function("v")
    sol = sp.dsolve(sp.Eq(r * c * v(t).diff(t), v_inf - v(t)), v(t), ics={v(0): v0}).rhs
    t_cross = sp.solve(sp.Eq(sol, v1), t)
    assert len(t_cross) == 1
    assert sp.simplify(sp.expand_log(t_cross[0] - law, force=True)) == 0


@pytest.mark.parametrize("topology", ["classic", "bypass", "steered", "pot"])
def test_ideal_internal_forms_show_ln2(topology: str) -> None:
    e = expressions(topology, control="internal", ideal=True)
    s = e.symbols
    # textbook forms (common practice): every half-period is ln2 · R · C
    ln2 = sp.log(2)
    expected_high = {"classic": (s.ra + s.rb), "bypass": s.ra, "steered": s.ra, "pot": s.ra + s.wiper * s.pot}
    expected_low = {"classic": s.rb, "bypass": s.rb, "steered": s.rb, "pot": s.rb + (1 - s.wiper) * s.pot}
    assert sp.simplify(e.t_high - ln2 * expected_high[topology] * s.c) == 0
    assert sp.simplify(e.t_low - ln2 * expected_low[topology] * s.c) == 0


def test_steered_vd_limit_reduces_to_bypass_and_classic_pieces() -> None:
    st = expressions("steered", "saturation", "internal")
    by = expressions("bypass", "saturation", "internal")
    s = st.symbols
    assert sp.simplify(st.t_high - by.t_high) == 0  # same charge path
    assert sp.simplify(st.t_low.subs(s.vd, 0) - by.t_low) == 0  # vd -> 0 on the discharge side


@pytest.mark.parametrize("topology", ["classic", "bypass", "steered", "pot"])
def test_numeric_matches_high_precision_sympy(topology: str) -> None:
    e = expressions(topology)
    s = e.symbols
    rng = np.random.default_rng(7)
    for _ in range(5):
        vals = dict(ra=float(rng.uniform(1e3, 1e5)), rb=float(rng.uniform(1e3, 1e5)), c=float(rng.uniform(1e-9, 1e-6)),
                    vcc=float(rng.uniform(6, 15)), vd=float(rng.uniform(0.3, 0.7)), vsat=float(rng.uniform(0, 0.3)),
                    r_on=float(rng.uniform(0, 20)), pot=float(rng.uniform(1e3, 1e5)), wiper=float(rng.uniform(0, 1)))
        vals["vctl"] = float(rng.uniform(0.5, 0.8) * vals["vcc"])
        subs = {getattr(s, k): sp.Float(v, 30) for k, v in vals.items()}
        ref_high = float(e.t_high.evalf(30, subs=subs))
        ref_low = float(e.t_low.evalf(30, subs=subs))
        kw = dict(vals)
        if topology != "pot":
            kw.pop("pot"), kw.pop("wiper")
        r = astable(topology, **kw)
        # sympy evalf at 30 significant digits is the reference
        assert r.t_high == pytest.approx(ref_high, rel=1e-11)
        assert r.t_low == pytest.approx(ref_low, rel=1e-11)


def test_symbols_are_positive_or_nonnegative() -> None:
    s = symbols()
    assert s.ra.is_positive and s.c.is_positive and s.vcc.is_positive
    assert s.vd.is_nonnegative and s.vsat.is_nonnegative and s.r_on.is_nonnegative


def test_expressions_latex_and_code_render() -> None:
    e = expressions("steered", "saturation", "internal")
    latex = e._repr_latex_()
    assert "\\log" in latex and "V_{d}" in latex
    assert "log" in sp.pycode(e.t_high)
