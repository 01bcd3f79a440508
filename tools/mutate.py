#!/usr/bin/env python3
"""Prove the tests' power: apply physics mutations to a copy of pwmkit and run the outside-source tests.

Outside the normal test run (it runs the selected tests once per mutation, a few minutes in all).
Each mutation patches one piece of source text in a temporary copy of the repository (the patch
must match exactly once), then runs only tests whose oracle is outside the model — ngspice
circuit simulations (tests/netlist), scipy integrating the wired circuit's node equations
(tests/timing/wired_circuit.py users), published worked values (CIE 15 L*, IEEE Std 1789-2015)
— never the regression pins. A mutation is *caught* when at least one of those tests fails.

Usage::

    .venv/bin/python tools/mutate.py            # all mutations, a table at the end
    .venv/bin/python tools/mutate.py -k wiper   # the mutations whose name contains "wiper"

Exit status 0 when every mutation is caught, 1 otherwise.
"""

from __future__ import annotations

import argparse
import os
import re
import shutil
import subprocess
import sys
import tempfile
import time
from dataclasses import dataclass
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]

TIMING_TESTS = ["tests/netlist/test_timing_ngspice.py", "tests/timing/test_astable_closed_forms.py::"
                "test_closed_forms_match_scipy_ode_oracle", "tests/timing/test_diode_law_oracle.py"]
MOTOR_TESTS = ["tests/netlist/test_loads_ngspice.py::test_motor_current_matches_circuit"]
LSTAR_TESTS = ["tests/loads/test_lightness.py::test_lightness_cie15_worked_values",
               "tests/loads/test_lightness.py::test_luminance_for_lightness_cie15_worked_values"]
FLICKER_TESTS = ["tests/loads/test_flicker.py::test_flicker_ieee1789_boundaries",
                 "tests/loads/test_flicker.py::test_flicker_ieee1789_full_on_off_pwm"]


@dataclass(frozen=True)
class Mutation:
    name: str
    file: str
    old: str
    new: str
    tests: tuple[str, ...]


MUTATIONS = [
    Mutation("diode drop sign, charge path (steered/pot)", "pwmkit/timing/paths.py",
             "return Paths(ra, vcc - vd, _plus(rb, r_dis), v_dis + vd)",
             "return Paths(ra, vcc + vd, _plus(rb, r_dis), v_dis + vd)", tuple(TIMING_TESTS)),
    Mutation("diode drop sign, discharge path (pot)", "pwmkit/timing/paths.py",
             "return Paths(ra + wiper * pot, vcc - vd, _plus(rb + (1 - wiper) * pot, r_dis), v_dis + vd)",
             "return Paths(ra + wiper * pot, vcc - vd, _plus(rb + (1 - wiper) * pot, r_dis), v_dis - vd)",
             tuple(TIMING_TESTS)),
    Mutation("diode drop sign, charge path (bypass)", "pwmkit/timing/paths.py",
             "return Paths(ra, vcc - vd, _plus(rb, r_dis), v_dis)", "return Paths(ra, vcc + vd, _plus(rb, r_dis), v_dis)",
             tuple(TIMING_TESTS)),
    Mutation("lower threshold vctl/3", "pwmkit/timing/astable.py",
             'v_upper, v_lower = q["vctl"], q["vctl"] / 2.0\n    _check_oscillates(topology, q, p, v_lower)',
             'v_upper, v_lower = q["vctl"], q["vctl"] / 3.0\n    _check_oscillates(topology, q, p, v_lower)',
             tuple(TIMING_TESTS)),
    Mutation("ra current through the discharge switch ignored", "pwmkit/timing/paths.py",
             "v_dis = (vcc * r_on + vsat * ra) / (ra + r_on)\n        r_dis = ra * r_on / (ra + r_on)",
             "v_dis = vsat + 0 * ra\n        r_dis = r_on + 0 * ra", tuple(TIMING_TESTS)),
    Mutation("switch on-resistance dropped (discharge path)", "pwmkit/timing/paths.py",
             "return Paths(ra, vcc - vd, _plus(rb, r_dis), v_dis + vd)", "return Paths(ra, vcc - vd, rb, v_dis + vd)",
             tuple(TIMING_TESTS)),
    Mutation("switch on-resistance dropped (classic)", "pwmkit/timing/paths.py",
             "return Paths(ra + rb, vcc, _plus(rb, r_dis), v_dis)", "return Paths(ra + rb, vcc, rb, v_dis)",
             tuple(TIMING_TESTS)),
    Mutation("wiper reversed in the charge path", "pwmkit/timing/paths.py",
             "return Paths(ra + wiper * pot, vcc - vd,", "return Paths(ra + (1 - wiper) * pot, vcc - vd,",
             tuple(TIMING_TESTS)),
    Mutation("back-EMF sign", "pwmkit/loads/motor.py",
             '    v, e, r, l, d, f, vf = np.broadcast_arrays(*(np.asarray(a, dtype=float) for a in (v, e, r, l, d, f, vf)))',
             '    v, e, r, l, d, f, vf = np.broadcast_arrays(*(np.asarray(a, dtype=float) for a in (v, e, r, l, d, f, vf)))\n'
             '    e = -e', tuple(MOTOR_TESTS)),
    Mutation("freewheel drop sign", "pwmkit/loads/motor.py",
             '    v, e, r, l, d, f, vf = np.broadcast_arrays(*(np.asarray(a, dtype=float) for a in (v, e, r, l, d, f, vf)))',
             '    v, e, r, l, d, f, vf = np.broadcast_arrays(*(np.asarray(a, dtype=float) for a in (v, e, r, l, d, f, vf)))\n'
             '    vf = -vf', tuple(MOTOR_TESTS)),
    Mutation("L* constant 116 → 118", "pwmkit/loads/lightness.py",
             "out = np.where(above, 116.0 * np.cbrt(arr) - 16.0, LSTAR_KAPPA * arr)",
             "out = np.where(above, 118.0 * np.cbrt(arr) - 16.0, LSTAR_KAPPA * arr)", tuple(LSTAR_TESTS)),
    Mutation("IEEE 1789 low-risk slope 0.08 → 0.1", "pwmkit/loads/flicker.py",
             'LOW_RISK = FlickerRegion("low-risk", 0.025, 0.08, 90.0, 1250.0, _SOURCE)',
             'LOW_RISK = FlickerRegion("low-risk", 0.025, 0.1, 90.0, 1250.0, _SOURCE)', tuple(FLICKER_TESTS)),
]


def _copy_repo(dest: Path) -> None:
    ignore = shutil.ignore_patterns(".venv", ".git", "__pycache__", "*.pyc", ".pytest_cache", ".hypothesis",
                                    "pwmkit-notebooks", "build", "*.egg-info")
    for item in ("pwmkit", "tests", "pyproject.toml", "examples", "notebooks"):
        src = ROOT / item
        if src.is_dir():
            shutil.copytree(src, dest / item, ignore=ignore)
        elif src.exists():
            shutil.copy2(src, dest / item)


def run(mutation: Mutation, python: str) -> tuple[bool, str, float]:
    """Apply one mutation in a fresh copy and run its tests; (caught, summary line, seconds)."""
    with tempfile.TemporaryDirectory(prefix="pwmkit-mutant-") as tmp:
        dest = Path(tmp)
        _copy_repo(dest)
        target = dest / mutation.file
        text = target.read_text(encoding="utf-8")
        if text.count(mutation.old) != 1:
            raise SystemExit(f"mutation {mutation.name!r}: the patch matches {text.count(mutation.old)} times in "
                             f"{mutation.file} (expected once); update tools/mutate.py")
        target.write_text(text.replace(mutation.old, mutation.new), encoding="utf-8")
        env = {**os.environ, "PYTHONPATH": str(dest), "PYTHONDONTWRITEBYTECODE": "1"}
        cmd = [python, "-m", "pytest", "-q", "-x", "-p", "no:cacheprovider", "--no-header", "-o", "addopts=",
               "-W", "error", "--rootdir", str(dest), *mutation.tests]
        t0 = time.perf_counter()
        proc = subprocess.run(cmd, cwd=dest, env=env, capture_output=True, text=True, timeout=1800)
        seconds = time.perf_counter() - t0
        check = subprocess.run([python, "-c", "import pwmkit; print(pwmkit.__file__)"], cwd=dest, env=env,
                               capture_output=True, text=True)
        if not check.stdout.strip().startswith(str(dest)):
            raise SystemExit(f"the mutated copy is not the pwmkit the tests import ({check.stdout.strip()})")
    lines = [ln for ln in proc.stdout.splitlines() if ln.strip()]
    failed = [ln for ln in lines if ln.startswith("FAILED")]
    summary = (failed[0].split(" - ")[0].replace("FAILED ", "") if failed else (lines[-1] if lines else "no output"))
    caught = proc.returncode == 1 and bool(failed)
    if proc.returncode not in (0, 1):
        summary = f"pytest exit {proc.returncode}: " + (lines[-1] if lines else proc.stderr.strip()[-200:])
    return caught, summary, seconds


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    parser.add_argument("-k", default="", help="only mutations whose name contains this text")
    parser.add_argument("--python", default=sys.executable, help="Python with pwmkit's test dependencies")
    args = parser.parse_args(argv)
    chosen = [m for m in MUTATIONS if args.k.lower() in m.name.lower()]
    results = []
    for m in chosen:
        print(f"… {m.name}", file=sys.stderr, flush=True)
        caught, summary, seconds = run(m, args.python)
        results.append((m, caught, summary, seconds))
    width = max(len(m.name) for m in chosen)
    print(f"{'mutation':{width}}  {'result':7}  {'s':>5}  first failing outside-source test")
    for m, caught, summary, seconds in results:
        print(f"{m.name:{width}}  {'caught' if caught else 'MISSED':7}  {seconds:5.0f}  {re.sub(r'^tests/', '', summary)}")
    missed = sum(not c for _m, c, _s, _t in results)
    print(f"{len(results) - missed} of {len(results)} mutations caught")
    return 0 if missed == 0 else 1


if __name__ == "__main__":
    sys.exit(main())
