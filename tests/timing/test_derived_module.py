"""The generated numeric module is the sympy derivation, written out (a lock-file check).

`pwmkit/timing/_derived.py` is committed so that no process has to import sympy, derive and
lambdify before its first timing call. These tests derive every form again with sympy, render the
module text and require it to be identical to the committed file; then they evaluate each
generated function against sympy's own high-precision evaluation of the derived expression.
Regenerate with `python -m pwmkit.timing.generate` when a derivation changes.
"""

from __future__ import annotations

import subprocess
import sys

import numpy as np
import pytest

from pwmkit.timing import generate


def test_committed_module_equals_a_fresh_sympy_derivation() -> None:
    committed = generate.target_path().read_text(encoding="utf-8")
    assert committed == generate.render(), "stale: run python -m pwmkit.timing.generate"


def test_check_command_reports_up_to_date() -> None:
    assert generate.main(["--check"]) == 0


def test_every_form_is_listed_in_its_group() -> None:
    from pwmkit.timing import _derived

    for form in generate.FORMS:
        assert getattr(_derived, form.group)[form.key] is getattr(_derived, form.name)


@pytest.mark.parametrize("form", generate.FORMS, ids=lambda f: f.name)
def test_generated_function_matches_sympy_high_precision(form: generate.Form) -> None:
    # the sympy expression evaluated with 30 significant digits is the reference (STYLE.md)
    import sympy as sp

    from pwmkit.timing import _derived

    fn = getattr(_derived, form.name)
    rng = np.random.default_rng(7)
    outputs = form.build()
    for _ in range(3):
        point = {"ra": rng.uniform(1e3, 1e5), "rb": rng.uniform(1e3, 1e5), "pot": rng.uniform(1e3, 1e5),
                 "wiper": rng.uniform(0.05, 0.95), "c": rng.uniform(1e-9, 1e-6), "vcc": rng.uniform(9, 15),
                 "vd": rng.uniform(0.3, 0.7), "vsat": rng.uniform(0.0, 0.2), "r_on": rng.uniform(0.0, 50.0)}
        point["vctl"] = 2 * point["vcc"] / 3
        point.update(r=point["ra"], v_inf=point["vcc"], v_0=point["vctl"] / 2, v_1=point["vctl"])
        got = fn(*(point[a] for a in form.args))
        subs = {sp.Symbol(a): sp.Float(point[a], 30) for a in form.args}
        for (name, expr), value in zip(outputs, got):
            want = float(expr.evalf(30, subs=subs))
            assert value == pytest.approx(want, rel=1e-11, abs=1e-300), name  # regression pin vs sympy


def test_first_timing_call_in_a_new_process_imports_no_sympy() -> None:
    code = ("import sys; from pwmkit.timing import astable;"
            "r = astable('pot', ra='1k', rb='1k', pot='100k', wiper=0.5, c='2.2n', vcc=12); r.duty;"
            "print('sympy' in sys.modules)")
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    assert out.stdout.strip() == "False"


def test_astable_equals_the_topology_closed_forms() -> None:
    # astable() evaluates the crossing law on each topology's path; the per-topology closed forms
    # (sympy's substitution of the same paths, simplified) must give the same numbers
    from pwmkit.timing import _derived, astable

    rng = np.random.default_rng(3)
    n = 200
    kw = dict(ra=rng.uniform(1e3, 1e5, n), rb=rng.uniform(1e3, 1e5, n), c=rng.uniform(1e-9, 1e-6, n),
              vcc=rng.uniform(9, 15, n), vd=rng.uniform(0.3, 0.7, n))
    pot, wiper = rng.uniform(1e3, 1e5, n), rng.uniform(0.05, 0.95, n)
    for topology in ("classic", "bypass", "steered", "pot"):
        for discharge, vsat, r_on in (("general", 0.1, 20.0), ("saturation", 0.1, 0.0), ("resistance", 0.0, 20.0)):
            extra = dict(pot=pot, wiper=wiper) if topology == "pot" else {}
            vd = kw["vd"] if topology != "classic" else 0.0
            r = astable(topology, **{**kw, "vd": vd}, vsat=vsat, r_on=r_on, **extra)
            fn = _derived.TIMING[(topology, discharge)]
            t_high, t_low = fn(kw["ra"], kw["rb"], extra.get("pot", 0.0), extra.get("wiper", 0.0), kw["c"], kw["vcc"],
                               vd, vsat, r_on, 2 * kw["vcc"] / 3)
            # bypass: the closed form holds while the diode across rb conducts, i.e. up to
            # v_off = vcc − vd·(ra + rb)/rb; where v_off lies below the upper threshold astable() adds the
            # segment through ra + rb (checked against the wired circuit in test_bypass_path_change.py)
            conducts = (kw["vcc"] - vd * (kw["ra"] + kw["rb"]) / kw["rb"] >= 2 * kw["vcc"] / 3
                        if topology == "bypass" else np.ones(n, dtype=bool))
            assert conducts.sum() > n // 2
            np.testing.assert_allclose(r.t_high[conducts], t_high[conducts], rtol=1e-12)
            np.testing.assert_allclose(r.t_low, t_low, rtol=1e-12)
