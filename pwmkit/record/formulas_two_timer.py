"""Formula export for the two-timer fixed-frequency PWM (clock astable + voltage-controlled monostable).

The expressions are the sympy derivations of :mod:`pwmkit.timing.symbolic` (the clock: a classic
astable on the internal divider) and :mod:`pwmkit.timing.monostable_symbolic` (the pulse), put
together: ``T = t_clock_high + t_trigger``, ``t_high = max(t_w, t_trigger)`` (the trigger held low
keeps the output high), ``t_low = T − t_high``, ``f = 1/T``, ``D = t_high/T``. The capacitor's
start level ``V_s`` enters as a number: the periodic start level of the operating point
(:func:`pwmkit.timing.two_timer_pwm`), which equals the rest level when the capacitor recovers
fully between pulses. Nothing is parsed by sympy; the design's numbers enter as Python floats.
"""

from __future__ import annotations

import functools
from typing import Any

from ..design import Design
from ..errors import DesignError

__all__ = ["two_timer_expressions", "two_timer_values", "worked_two_timer", "formula_sheet_two_timer"]

_QUANTITIES = ("t_high", "t_low", "period", "frequency", "duty")
_UNITS = {"t_high": "s", "t_low": "s", "period": "s", "frequency": "Hz", "duty": "1"}
_MEANING = {"t_high": "output-high time (monostable pulse, at least the trigger pulse)",
            "t_low": "output-low time (rest of the clock period)", "period": "clock period",
            "frequency": "PWM frequency (the clock's)", "duty": "duty cycle"}
_PLAIN = {"t_high": "t_high", "t_low": "t_low", "period": "T", "frequency": "f", "duty": "D"}


@functools.cache
def two_timer_expressions(discharge: str) -> dict[str, Any]:
    """sympy expressions of the two-timer PWM (``discharge``: the clock's "saturation" or "resistance" model)."""
    import sympy as sp

    from ..timing.monostable_symbolic import monostable_expressions
    from ..timing.symbolic import expressions

    clk = expressions("classic", discharge, "internal")  # type: ignore[arg-type]
    mono = monostable_expressions()
    t_w = mono.width
    t_trig = clk.t_low
    period = clk.t_high + clk.t_low
    t_high = sp.Max(t_w, t_trig)
    return {"t_clock_high": clk.t_high, "t_trigger": t_trig, "t_w": t_w, "t_high": t_high,
            "t_low": period - t_high, "period": period, "frequency": 1 / period, "duty": t_high / period}


def two_timer_values(design: Design) -> tuple[str, dict[Any, float]]:
    """(clock discharge model, symbol → number) at the design's operating point."""
    from ..parts.timers import get_timer
    from ..timing import two_timer_pwm
    from ..timing.monostable_symbolic import monostable_symbols
    from ..timing.symbolic import symbols
    from ..two_timer_design import operating_point

    if not isinstance(design, Design) or design.timing.topology != "two-timer":
        raise DesignError("design: expected a pwmkit.design.Design with timing.topology = 'two-timer'")
    t = design.timing
    fam = get_timer(t.timer)
    vsat = fam.vsat if t.vsat is None else t.vsat
    r_on = fam.r_discharge_on if t.r_on is None else t.r_on
    discharge = "saturation" if r_on == 0 else "resistance"
    v_pin = operating_point(design)[0]
    p = two_timer_pwm(vctl=v_pin, **t.two_timer_kwargs(design.vcc))
    s, m = symbols(), monostable_symbols()
    values = {s.ra: t.ra, s.rb: t.rb, s.c: t.c, s.vcc: design.vcc, s.vsat: vsat, s.r_on: r_on, m.r: t.r_mono,
              m.c: t.c_mono, m.vctl: v_pin, m.v_start: float(p.v_start)}
    return discharge, {k: float(v) for k, v in values.items()}


def _rows() -> list[tuple[Any, str, str]]:
    from ..timing.monostable_symbolic import monostable_symbols
    from ..timing.symbolic import symbols

    s, m = symbols(), monostable_symbols()
    clock = [(s.ra, "clock charge resistor", "Ω"), (s.rb, "clock discharge resistor (sets the trigger pulse)", "Ω"),
             (s.c, "clock timing capacitor", "F"), (s.vcc, "supply voltage", "V"),
             (s.vsat, "discharge-transistor saturation voltage", "V"), (s.r_on, "discharge-switch on-resistance", "Ω")]
    return clock + [r for r in m.rows() if r[0] in (m.r, m.c, m.vctl, m.v_start)]


def _value(expr: Any, values: dict[Any, float]) -> float:
    import sympy as sp

    return float(expr.subs({k: sp.Float(v, 30) for k, v in values.items()}).evalf(30))


def _steps(quantity: str, e: dict[str, Any]) -> list[tuple[str, Any, Any]]:
    """(name, short form, full expression) of the lines a quantity is worked through."""
    import sympy as sp

    tw, tt, th, tl, tp = (sp.Symbol(n, positive=True) for n in ("t_w", "t_trigger", "t_high", "t_low", "T"))
    clock = [("t_trigger", e["t_trigger"], e["t_trigger"]), ("T", e["period"], e["period"])]
    if quantity == "t_high":
        return [("t_w", e["t_w"], e["t_w"]), ("t_trigger", e["t_trigger"], e["t_trigger"]),
                ("t_high", sp.Max(tw, tt), e["t_high"])]
    if quantity == "period":
        return [("T", e["period"], e["period"])]
    if quantity == "t_low":
        return [*clock[1:], ("t_high", sp.Max(tw, tt), e["t_high"]), ("t_low", tp - th, e["t_low"])]
    if quantity == "frequency":
        return [("T", e["period"], e["period"]), ("f", 1 / tp, e["frequency"])]
    return [("t_high", sp.Max(tw, tt), e["t_high"]), ("T", e["period"], e["period"]), ("D", th / tp, e["duty"])]


def worked_two_timer(design: Design, quantity: str = "t_high", fmt: str = "unicode") -> str:
    """A quantity of a two-timer design worked out with its numbers; fmt "unicode" or "markdown".

    The pulse and the clock are shown with every symbol replaced by the design's number; the
    derived quantities through them (``t_high = max(t_w, t_trigger)``, ``t_low = T − t_high`` …).
    Each line's value comes from the full expression at the design's numbers.
    """
    import sympy as sp

    from ..values import format_value
    from .formulas import _indent_eq, _number_text, _pretty_with_numbers, _result_text

    if quantity not in _QUANTITIES:
        raise DesignError(f"quantity: {quantity!r} is not known; allowed: {', '.join(_QUANTITIES)}")
    if fmt not in ("unicode", "markdown"):
        raise DesignError(f"fmt: {fmt!r} is not allowed for the two-timer sheet; allowed: unicode, markdown")
    discharge, values = two_timer_values(design)
    e = two_timer_expressions(discharge)
    units = {"t_w": "s", "t_trigger": "s", "t_high": "s", "t_low": "s", "T": "s", "f": "Hz", "D": "1"}
    known: dict[Any, float] = dict(values)
    for name, key in (("t_w", "t_w"), ("t_trigger", "t_trigger"), ("t_high", "t_high"), ("T", "period"),
                      ("t_low", "t_low")):
        known[sp.Symbol(name, positive=True)] = _value(e[key], values)
    style = "unicode" if fmt == "unicode" else "latex"
    lines: list[str] = []
    for name, short, full in _steps(quantity, e):
        value = _value(full, values)
        lhs = sp.Symbol(name)
        text = _result_text("duty", value) if name == "D" else format_value(value, units[name], 5)
        nums = {k: _number_text(known[k], style) for k in short.free_symbols}
        if isinstance(short, sp.Max):  # printed by hand: the pretty printers do not reach into Max
            a, b = (str(x) for x in short.args)
            sym = f"max({a}, {b})" if fmt == "unicode" else f"\\max({sp.latex(short.args[0])}, {sp.latex(short.args[1])})"
            num = f"max({nums[short.args[0]]}, {nums[short.args[1]]})" if fmt == "unicode" else (
                f"\\max({nums[short.args[0]]}, {nums[short.args[1]]})")
            if fmt == "markdown":
                lines.append(f"$$\n{sp.latex(lhs)} = {sym} = {num} = {text}\n$$")
            else:
                lines += [f"{name} = {sym}", f"{name} = {num}", f"{name} = {text}"]
            continue
        if fmt == "markdown":
            tex = sp.latex(short, ln_notation=True)
            tex_n = sp.latex(short.subs({k: sp.Symbol(v) for k, v in nums.items()}), ln_notation=True)
            lines.append(f"$$\n{sp.latex(lhs)} = {tex} = {tex_n} = {text.replace('%', chr(92) + '%')}\n$$")
        else:
            general = sp.pretty(sp.Eq(lhs, short, evaluate=False), use_unicode=True, wrap_line=False)
            lines += [general, _indent_eq(name, _pretty_with_numbers(short, nums)), f"{name} = {text}"]
    head = f"{_PLAIN[quantity]} — {_MEANING[quantity]} [{_UNITS[quantity]}]"
    if fmt == "markdown":
        return "\n\n".join(lines)
    lines[-1] = f"{_PLAIN[quantity]} = {_result_text(quantity, _value(e[quantity], values))}"
    return "\n".join([head, *lines])


def formula_sheet_two_timer(design: Design, fmt: str = "markdown") -> str:
    """Formula sheet of a two-timer design: "markdown", "unicode", "latex", "python" or "c"."""
    import sympy as sp

    import pwmkit

    from .formulas import latex_text

    if fmt not in ("markdown", "unicode", "latex", "python", "c"):
        raise DesignError(f"fmt: {fmt!r} is not allowed; allowed: markdown, unicode, latex, python, c")
    discharge, values = two_timer_values(design)
    e = two_timer_expressions(discharge)
    rows = [r for r in _rows() if any(r[0] in e[q].free_symbols for q in _QUANTITIES)]
    intro = [f"Design: {design.name}",
             "Topology: two-timer fixed-frequency PWM — a classic astable clock (R_A, R_B, C) triggers a "
             "monostable (R_M, C_M) whose threshold the control pin sets to V_ctl",
             f"Clock discharge model: {discharge}; monostable start level V_s from the periodic operating point",
             f"Derived with sympy from the RC threshold-crossing law (pwmkit {pwmkit.__version__}). Verify on the bench."]
    used = [r[0] for r in rows]
    if fmt in ("python", "c"):
        funcs = []
        for q in _QUANTITIES:
            args = [s for s in used if s in e[q].free_symbols]
            if fmt == "python":
                body = sp.pycode(e[q], fully_qualified_modules=True)
                funcs.append(f"def {q}({', '.join(map(str, args))}):\n    \"\"\"{_MEANING[q]} [{_UNITS[q]}]\"\"\"\n"
                             f"    return {body}\n")
            else:
                body = sp.ccode(e[q])
                funcs.append(f"/* {_MEANING[q]} [{_UNITS[q]}] */\ndouble {q}({', '.join(f'double {a}' for a in args)})\n"
                             f"{{\n    return {body};\n}}\n")
        if fmt == "python":
            head = [f"# Timing formulas of the pwmkit design {design.name!r}.", *[f"# {x}" for x in intro], "",
                    "import math", "", "# Symbols (SI units):", *[f"#   {s}  {m} [{u}]" for s, m, u in rows], ""]
            vals = ["VALUES = {", *[f"    {str(s)!r}: {values[s]!r}," for s in used], "}", ""]
            main = ["", 'if __name__ == "__main__":']
            for q in _QUANTITIES:
                call = ", ".join(f"VALUES[{str(s)!r}]" for s in used if s in e[q].free_symbols)
                main.append(f"    print({q!r}, repr({q}({call})))")
            return "\n".join(head) + "\n" + "\n\n".join(funcs) + "\n\n" + "\n".join(vals) + "\n".join(main) + "\n"
        head = ["/* Timing formulas of the pwmkit design " + design.name.replace("*/", "* /") + ".",
                *[" * " + x for x in intro], " */", "#include <math.h>", "#include <stdio.h>", ""]
        main = ["int main(void)", "{", *[f"    const double {s} = {values[s]!r};" for s in used]]
        for q in _QUANTITIES:
            call = ", ".join(str(s) for s in used if s in e[q].free_symbols)
            main.append(f'    printf("{q} %.17g\\n", {q}({call}));')
        main += ["    return 0;", "}"]
        return "\n".join(head) + "\n" + "\n".join(funcs) + "\n" + "\n".join(main) + "\n"
    from ..values import format_value

    if fmt == "unicode":
        title = f"Timing formulas — {design.name}"
        out = [title, "=" * len(title), *intro, ""]
        out += [worked_two_timer(design, q, "unicode") + "\n" for q in _QUANTITIES]
        out += ["Symbols", "-------", *[f"{str(s):<8}  {m} [{u}]" for s, m, u in rows], "", "Values used:",
                *[f"{str(s):<8} = {format_value(values[s], u, 6) if u not in ('1',) else values[s]}" for s, _, u in rows]]
        return "\n".join(out) + "\n"
    if fmt == "markdown":
        out = [f"# Timing formulas — {design.name}", "", *[f"- {x}" for x in intro], ""]
        for q in _QUANTITIES:
            out += [f"## {_MEANING[q].capitalize()}", "", worked_two_timer(design, q, "markdown"), ""]
        out += ["## Symbols", "", "| symbol | meaning | unit |", "|---|---|---|",
                *[f"| ${sp.latex(s)}$ | {m} | {u} |" for s, m, u in rows], "", "## Values used", "",
                *[f"- ${sp.latex(s)}$ = {format_value(values[s], u, 6)}" for s, _, u in rows]]
        return "\n".join(out) + "\n"
    out = ["\\documentclass{article}", "\\usepackage{amsmath}", "\\usepackage[margin=2cm]{geometry}",
           f"\\title{{Timing formulas --- {latex_text(design.name)}}}", "\\date{}", "\\begin{document}", "\\maketitle",
           "\\begin{itemize}", *[f"\\item {latex_text(x)}" for x in intro], "\\end{itemize}"]
    for q in _QUANTITIES:
        value = _value(e[q], values)
        out += [f"\\section*{{{latex_text(_MEANING[q].capitalize())}}}", "\\begin{align*}",
                f"{_PLAIN[q]} &= {sp.latex(e[q], ln_notation=True)} \\\\",
                f"{_PLAIN[q]} &= {latex_text(format_value(value, _UNITS[q], 5) if q != 'duty' else f'{100 * value:.4g} %')}",
                "\\end{align*}"]
    out += ["\\end{document}"]
    return "\n".join(out) + "\n"
