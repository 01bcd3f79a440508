"""Formula export (pwmkit.record.formulas): every format reproduces pwmkit.timing.astable.

The Python and C texts are our own generated code (never user text); the tests compile and run
them — Python with compile(), C with gcc when it is installed — and compare with the lambdified
sympy closed forms of :func:`pwmkit.timing.astable` (the reference of the timing package).
"""

from __future__ import annotations

import math
import re
import shutil
import subprocess
from pathlib import Path
from typing import Any

import pytest

from pwmkit import DesignError
from pwmkit.design import Design, Timing, demo_designs
from pwmkit.evaluate import timing_kwargs
from pwmkit.record.formulas import (
    FORMATS,
    QUANTITIES,
    design_variant,
    formula,
    formula_sheet,
    symbol_table,
    worked,
)
from pwmkit.timing import astable, astable_ideal
from pwmkit.values import format_value

RTOL = 1e-12
VALUES = dict(R_A=4700.0, R_B=10e3, P=50e3, w=0.3, C=100e-9, V_cc=12.0, V_d=0.6, V_sat=0.1, R_on=15.0, V_ctl=7.5)
TOPOLOGIES = ("classic", "bypass", "steered", "pot")
VARIANTS = [(d, c) for d in ("general", "saturation", "resistance") for c in ("external", "internal")]


def _reference(topology: str, discharge: str, control: str, ideal: bool = False) -> Any:
    kw: dict[str, Any] = dict(ra=VALUES["R_A"], rb=VALUES["R_B"], c=VALUES["C"], vcc=VALUES["V_cc"])
    if topology == "pot":
        kw.update(pot=VALUES["P"], wiper=VALUES["w"])
    if ideal:
        return astable_ideal(topology, **kw)
    kw.update(vd=VALUES["V_d"], vsat=0.0 if discharge == "resistance" else VALUES["V_sat"],
              r_on=0.0 if discharge == "saturation" else VALUES["R_on"])
    if control == "external":
        kw["vctl"] = VALUES["V_ctl"]
    return astable(topology, **kw)


def _python_function(code: str, name: str) -> Any:
    namespace: dict[str, Any] = {"math": math}
    exec(compile(code, f"<generated {name}>", "exec"), namespace)  # our generated code, tests only
    return namespace[name]


def _call(fn: Any) -> float:
    args = fn.__code__.co_varnames[: fn.__code__.co_argcount]
    return fn(**{a: VALUES[a] for a in args})


@pytest.mark.parametrize("topology", TOPOLOGIES)
@pytest.mark.parametrize(("discharge", "control"), VARIANTS)
def test_python_code_reproduces_astable(topology: str, discharge: str, control: str) -> None:
    ref = _reference(topology, discharge, control)
    for q in QUANTITIES:
        fn = _python_function(formula(topology, q, fmt="python", discharge=discharge, control=control), q)
        assert math.isclose(_call(fn), getattr(ref, q), rel_tol=RTOL)


@pytest.mark.parametrize("topology", TOPOLOGIES)
def test_python_code_of_the_textbook_form_reproduces_astable_ideal(topology: str) -> None:
    ref = _reference(topology, "saturation", "internal", ideal=True)
    for q in ("t_high", "t_low", "frequency"):
        code = formula(topology, q, fmt="python", discharge="saturation", control="internal", ideal=True)
        assert "math.log(2)" in code  # the ln 2 ≈ 0.693 of the textbook forms (common practice)
        assert math.isclose(_call(_python_function(code, q)), getattr(ref, q), rel_tol=RTOL)


_GCC = shutil.which("gcc") or shutil.which("cc")


def _run_c(source: str, tmp_path: Path) -> dict[str, float]:
    src = tmp_path / "prog.c"
    exe = tmp_path / "prog"
    src.write_text(source, encoding="utf-8")
    subprocess.run([_GCC, "-std=c99", "-O0", "-Wall", "-Werror", "-o", str(exe), str(src), "-lm"], check=True,
                   capture_output=True, text=True, timeout=60)
    out = subprocess.run([str(exe)], check=True, capture_output=True, text=True, timeout=30).stdout
    return {k: float(v) for k, v in (line.split() for line in out.splitlines())}


@pytest.mark.skipif(_GCC is None, reason="needs a C compiler")
@pytest.mark.parametrize("topology", TOPOLOGIES)
def test_c_code_reproduces_astable(topology: str, tmp_path: Path) -> None:
    discharge, control = "general", "external"
    ref = _reference(topology, discharge, control)
    funcs = "\n".join(formula(topology, q, fmt="c", discharge=discharge, control=control) for q in QUANTITIES)
    decls = "\n".join(f"    const double {k} = {v!r};" for k, v in VALUES.items())
    calls = []
    for q in QUANTITIES:
        args = re.search(rf"double {q}\((.*)\)", funcs).group(1)  # type: ignore[union-attr]
        names = ", ".join(a.split()[1] for a in args.split(", "))
        calls.append(f'    printf("{q} %.17g\\n", {q}({names}));')
    unused = "\n".join(f"    (void){k};" for k in VALUES)
    program = (f"#include <math.h>\n#include <stdio.h>\n{funcs}\nint main(void)\n{{\n{decls}\n{unused}\n"
               + "\n".join(calls) + "\n    return 0;\n}\n")
    got = _run_c(program, tmp_path)
    for q in QUANTITIES:
        assert math.isclose(got[q], getattr(ref, q), rel_tol=RTOL)


def _design_reference(design: Design) -> Any:
    if design.timing.topology == "two-timer":  # the evaluation's output timing (clock + monostable)
        from pwmkit.evaluate import evaluate

        return evaluate(design, spread=False).timing
    return astable(design.timing.topology, **timing_kwargs(design))


def _designs() -> dict[str, Design]:
    demos = demo_designs()
    fan = demos["fan"]
    return {
        **demos,
        "classic-cv": Design(name="classic-cv", timing=Timing(topology="classic", ra="4k7", rb="22k", c="47n",
                                                              r_cv="10k")),
        "bypass-vctl": Design(name="bypass-vctl", vcc=9.0, timing=Timing(topology="bypass", ra="10k", rb="4k7",
                                                                         c="10n", vctl=5.5, timer="cmos")),
        "steered-override": fan.replace(name="steered-override",
                                        timing=Timing(topology="steered", ra="3k3", rb="6k8", c="4n7", vd=0.45,
                                                      vsat=0.12, r_on=8.0)),
    }


@pytest.mark.parametrize("key", list(_designs()))
def test_python_formula_sheet_reproduces_the_design_timing(key: str) -> None:
    design = _designs()[key]
    ref = _design_reference(design)
    namespace: dict[str, Any] = {"__name__": "pwmkit_sheet"}
    exec(compile(formula_sheet(design, "python"), "<sheet>", "exec"), namespace)  # generated code, tests only
    values = namespace["VALUES"]
    for q in QUANTITIES:
        fn = namespace[q]
        args = fn.__code__.co_varnames[: fn.__code__.co_argcount]
        assert math.isclose(fn(*(values[a] for a in args)), getattr(ref, q), rel_tol=RTOL)


@pytest.mark.skipif(_GCC is None, reason="needs a C compiler")
@pytest.mark.parametrize("key", ["grow-bar", "classic-cv", "steered-override"])
def test_c_formula_sheet_compiles_and_reproduces_the_design_timing(key: str, tmp_path: Path) -> None:
    design = _designs()[key]
    ref = _design_reference(design)
    got = _run_c(formula_sheet(design, "c"), tmp_path)
    for q in QUANTITIES:
        assert math.isclose(got[q], getattr(ref, q), rel_tol=RTOL)


@pytest.mark.parametrize("key", list(_designs()))
def test_worked_results_match_the_design_timing(key: str) -> None:
    design = _designs()[key]
    ref = _design_reference(design)
    for q, unit in (("t_high", "s"), ("t_low", "s"), ("period", "s"), ("frequency", "Hz")):
        last = worked(design, q, "unicode").splitlines()[-1]
        assert last.endswith(format_value(getattr(ref, q), unit, 5)), last
    assert worked(design, "duty", "unicode").splitlines()[-1].endswith(f"({100 * ref.duty:.4g} %)")


def test_design_variant_follows_the_timer_family() -> None:
    # bipolar family: saturation voltage, no on-resistance; CMOS: on-resistance, no saturation voltage
    # (generic data-sheet models of pwmkit.parts.timers)
    d_fan, c_fan, _ = design_variant(demo_designs()["fan"])
    d_bar, c_bar, values = design_variant(demo_designs()["grow-bar"])
    assert (d_fan, c_fan) == ("saturation", "internal")
    assert (d_bar, c_bar) == ("resistance", "internal")
    assert math.isclose(values[next(s for s in values if str(s) == "V_ctl")], 8.0)


@pytest.mark.parametrize("topology", TOPOLOGIES)
def test_latex_markdown_and_unicode_texts(topology: str) -> None:
    tex = formula(topology, "t_high", fmt="latex", discharge="saturation", control="internal")
    assert tex.startswith(r"t_{\mathrm{high}} = ") and r"\ln" in tex
    md = formula(topology, "duty", fmt="markdown")
    assert md.startswith("$$\n") and md.endswith("\n$$") and r"\ln" in md
    uni = formula(topology, "t_low", fmt="unicode")
    assert "t_low =" in uni and "log" in uni and "⋅" in uni
    mathml = formula(topology, "t_high", fmt="mathml")
    assert mathml.startswith("<math") and "<mi>ln</mi>" in mathml


def test_with_symbols_lists_only_the_symbols_that_occur() -> None:
    text = formula("classic", "t_high", fmt="markdown", discharge="saturation", control="internal",
                   with_symbols=True)
    assert "| $R_{A}$ | charge resistor" in text and "| $C$ | timing capacitor | F |" in text
    assert "V_{d}" not in text and "potentiometer" not in text  # classic: no diode, no pot


@pytest.mark.parametrize("fmt", FORMATS)
def test_symbol_table_has_every_symbol_with_meaning_and_unit(fmt: str) -> None:
    from pwmkit.timing.symbolic import symbols

    text = symbol_table(fmt)
    for _sym, meaning, _unit in symbols().rows():
        assert (meaning.replace("…", r"\ldots{}") if fmt == "latex" else meaning) in text


@pytest.mark.parametrize("fmt", ["latex", "markdown", "unicode"])
def test_worked_shows_expression_numbers_and_result(fmt: str) -> None:
    design = demo_designs()["grow-bar"]
    text = worked(design, "t_high", fmt)
    ref = _design_reference(design)
    if fmt == "markdown":
        assert text.count("$$") == 6  # three display blocks: formula, numbers, result
    if fmt == "latex":
        assert text.startswith(r"\begin{align*}") and r"\mu" in text
    assert "2.2" in text and "100000" in text  # C = 2.2 nF and P = 100 kΩ appear as numbers
    shown = format_value(ref.t_high, "s", 5).split()[0]
    assert shown in text


@pytest.mark.parametrize("fmt", FORMATS)
def test_formula_sheets_in_every_format(fmt: str) -> None:
    sheet = formula_sheet(demo_designs()["fan"], fmt)
    assert "fan" in sheet
    if fmt == "markdown":
        assert sheet.startswith("# Timing formulas — fan") and "$$" in sheet and "| symbol |" in sheet
    if fmt == "latex":
        assert sheet.startswith(r"\documentclass") and sheet.rstrip().endswith(r"\end{document}")


def test_hostile_design_names_stay_inside_comments(tmp_path: Path) -> None:
    with pytest.raises(DesignError, match="design.name: contains the control character U\\+000A"):
        demo_designs()["fan"].replace(name='x"""\nimport os')  # a line break in a name is refused
    evil = 'x""" import os; os.system("echo pwned") # */ int evil = 1; /*\\'
    design = demo_designs()["fan"].replace(name=evil)
    namespace: dict[str, Any] = {"__name__": "pwmkit_sheet"}
    exec(compile(formula_sheet(design, "python"), "<sheet>", "exec"), namespace)  # generated code, tests only
    assert "os" not in namespace  # the name did not become code
    if _GCC is not None:
        assert set(_run_c(formula_sheet(design, "c"), tmp_path)) == set(QUANTITIES)
    code = worked(design, "t_high", "c")
    assert "*/ int evil" not in code


def test_bad_arguments_are_design_errors() -> None:
    with pytest.raises(DesignError, match="quantity: 'speed' is not known"):
        formula("pot", "speed")
    with pytest.raises(DesignError, match="fmt: 'rtf' is not known"):
        formula("pot", "t_high", fmt="rtf")
    with pytest.raises(DesignError, match="topology: 'ring' is not known"):
        formula("ring", "t_high")
    with pytest.raises(DesignError, match="discharge: 'leaky' is not known"):
        formula("pot", "t_high", discharge="leaky")
    with pytest.raises(DesignError, match="fmt: 'mathml' is not known"):
        worked(demo_designs()["fan"], "t_high", "mathml")
    with pytest.raises(DesignError, match="design: expected a pwmkit.design.Design"):
        worked("fan", "t_high", "markdown")  # type: ignore[arg-type]


def test_record_package_never_evaluates_text() -> None:
    # Safety rule of the project: no eval/exec/sympify/pickle of file content anywhere in pwmkit.record.
    pattern = re.compile(r"\b(eval|exec|sympify|parse_expr|pickle|marshal|yaml\.load)\s*\(|import pickle")
    root = Path(__file__).resolve().parents[2] / "pwmkit" / "record"
    offenders = [f"{p.name}:{i}" for p in root.glob("*.py")
                 for i, line in enumerate(p.read_text(encoding="utf-8").splitlines(), 1) if pattern.search(line)]
    assert offenders == []
