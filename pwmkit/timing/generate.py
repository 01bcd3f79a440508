"""Write the sympy-derived closed forms as plain numpy code: ``pwmkit/timing/_derived.py``.

Deriving and lambdifying the timing with sympy costs about a second in every new process, so the
numeric code runs from a *generated* module instead, committed to the repository like a lock
file. The derivation stays the reference: ``tests/timing/test_derived_module.py`` derives every
form again with sympy, renders the module text and requires it to equal the committed file
exactly. After changing a derivation (or upgrading sympy, whose printing may change), regenerate:

.. code-block:: bash

    python -m pwmkit.timing.generate          # rewrite pwmkit/timing/_derived.py
    python -m pwmkit.timing.generate --check  # exit 1 if the committed file is stale

Adding a form: append a :class:`Form` to :data:`FORMS` — a Python function name, its argument
names, and a builder returning ``[(output name, sympy expression), …]`` in those arguments — then
regenerate. Each group of forms becomes a dictionary of functions in the module (see
:data:`GROUPS`). This module imports sympy; the generated one imports only numpy.
"""

from __future__ import annotations

import argparse
import sys
from collections.abc import Callable, Sequence
from dataclasses import dataclass
from pathlib import Path
from typing import Any

__all__ = ["Form", "FORMS", "GROUPS", "render", "target_path", "main"]

#: Argument order of the timing functions (as :data:`pwmkit.timing.symbolic._ARG_ORDER`).
TIMING_ARGS = ("ra", "rb", "pot", "wiper", "c", "vcc", "vd", "vsat", "r_on", "vctl")


@dataclass(frozen=True)
class Form:
    """One generated function.

    Attributes
    ----------
    group : name of the module-level dictionary the function is listed in
    key : its key in that dictionary (a string or a tuple of strings)
    name : Python function name
    args : argument names
    build : ``build() -> [(output name, sympy expression in symbols named like args), …]``
    doc : one line for the function's docstring
    cse : share common subexpressions (off for short forms, where it only adds temporaries)
    """

    group: str
    key: Any
    name: str
    args: tuple[str, ...]
    build: Callable[[], list[tuple[str, Any]]]
    doc: str
    cse: bool = True


def _timing_symbols(e: Any) -> dict[Any, Any]:
    import sympy as sp

    return {getattr(e.symbols, n): sp.Symbol(n) for n in TIMING_ARGS}


def _timing(topology: str, discharge: str) -> Callable[[], list[tuple[str, Any]]]:
    def build() -> list[tuple[str, Any]]:
        from .symbolic import expressions

        e = expressions(topology, discharge, "external")  # type: ignore[arg-type]
        names = _timing_symbols(e)
        return [("t_high", e.t_high.xreplace(names)), ("t_low", e.t_low.xreplace(names))]

    return build


def _crossing() -> list[tuple[str, Any]]:
    import sympy as sp

    from .symbolic import crossing_time

    law, (r, c, v_inf, v0, v1) = crossing_time()
    names = {r: sp.Symbol("r"), c: sp.Symbol("c"), v_inf: sp.Symbol("v_inf"), v0: sp.Symbol("v_0"),
             v1: sp.Symbol("v_1")}
    return [("t", law.xreplace(names))]


def _partials(topology: str) -> Callable[[], list[tuple[str, Any]]]:
    def build() -> list[tuple[str, Any]]:
        import sympy as sp

        from .symbolic import expressions

        e = expressions(topology, "general", "external")
        names = _timing_symbols(e)
        th, tl = e.t_high.xreplace(names), e.t_low.xreplace(names)
        args = [sp.Symbol(n) for n in TIMING_ARGS]
        out = [("t_high", th), ("t_low", tl)]
        out += [(f"dt_high_d{a}", sp.diff(th, a)) for a in args]
        out += [(f"dt_low_d{a}", sp.diff(tl, a)) for a in args]
        return out

    return build


_TOPOLOGIES = ("classic", "bypass", "steered", "pot")
_DISCHARGES = ("general", "saturation", "resistance")

#: Every generated function, in module order.
FORMS: list[Form] = [
    Form("CROSSING", "rc", "crossing_time", ("r", "c", "v_inf", "v_0", "v_1"), _crossing,
         "Time for an RC node heading from v_0 toward v_inf to reach v_1 [s] (array-safe, no branches).",
         cse=False),
    *(Form("TIMING", (t, d), f"timing_{t}_{d}", TIMING_ARGS, _timing(t, d),
           f"(t_high, t_low) of the {t!r} topology, {d!r} discharge model, external control [s].")
      for t in _TOPOLOGIES for d in _DISCHARGES),
    *(Form("PARTIALS", t, f"partials_{t}", TIMING_ARGS, _partials(t),
           f"t_high, t_low of the {t!r} topology (general discharge) and their partial derivatives "
           "in argument order: d t_high/d arg…, then d t_low/d arg….")
      for t in _TOPOLOGIES),
]

#: Group name → one line describing the dictionary in the generated module.
GROUPS: dict[str, str] = {
    "CROSSING": "kind → f(r, c, v_inf, v_0, v_1) -> (t,): the first-order threshold-crossing law",
    "TIMING": "(topology, discharge) → f(ra, rb, pot, wiper, c, vcc, vd, vsat, r_on, vctl) -> (t_high, t_low)",
    "PARTIALS": "topology → f(ra, rb, pot, wiper, c, vcc, vd, vsat, r_on, vctl) -> (t_high, t_low, ∂t_high…, ∂t_low…)",
}

_HEADER = '''"""Closed forms derived with sympy, written out as numpy code. GENERATED — do not edit.

Regenerate with ``python -m pwmkit.timing.generate`` (see :mod:`pwmkit.timing.generate`); the
test ``tests/timing/test_derived_module.py`` derives every form again and compares the text.
Generated with sympy {version}.
"""

# ruff: noqa: E501
from numpy import log

'''


def _render_form(form: Form) -> str:
    import sympy as sp
    from sympy.printing.numpy import NumPyPrinter

    outputs = form.build()
    printer = NumPyPrinter({"fully_qualified_modules": False, "inline": True, "allow_unknown_functions": False})
    exprs = [expr for _, expr in outputs]
    reps, reduced = sp.cse(exprs, symbols=sp.numbered_symbols("_x"), order="canonical") if form.cse else ([], exprs)
    lines = [f"def {form.name}({', '.join(form.args)}):", f'    """{form.doc}"""']
    for sym, expr in reps:
        lines.append(f"    {sym} = {printer.doprint(expr)}")
    for (out_name, _), expr in zip(outputs, reduced):
        lines.append(f"    {out_name} = {printer.doprint(expr)}")
    lines.append(f"    return ({', '.join(name for name, _ in outputs)},)")
    text = "\n".join(lines) + "\n"
    if "numpy." in text or "math." in text:  # pragma: no cover - a printer change would land here
        raise RuntimeError(f"{form.name}: unexpected module reference in generated code")
    return text


def render(forms: Sequence[Form] = tuple(FORMS)) -> str:
    """The full text of the generated module for ``forms``."""
    import sympy as sp

    parts = [_HEADER.format(version=sp.__version__).rstrip("\n") + "\n"]
    parts += [_render_form(f) for f in forms]
    for group, doc in GROUPS.items():
        members = "".join(f"    {f.key!r}: {f.name},\n" for f in forms if f.group == group)
        parts.append(f"#: {doc}\n{group} = {{\n{members}}}\n")
    return "\n\n".join(parts)


def target_path() -> Path:
    """Where the generated module lives."""
    return Path(__file__).resolve().parent / "_derived.py"


def main(argv: Sequence[str] | None = None) -> int:
    parser = argparse.ArgumentParser(prog="python -m pwmkit.timing.generate",
                                     description="Regenerate pwmkit/timing/_derived.py from the sympy derivation.")
    parser.add_argument("--check", action="store_true", help="exit 1 if the committed file differs; write nothing")
    args = parser.parse_args(argv)
    text = render()
    path = target_path()
    current = path.read_text(encoding="utf-8") if path.exists() else ""
    if args.check:
        if current != text:
            print(f"{path}: stale — run python -m pwmkit.timing.generate", file=sys.stderr)
            return 1
        print(f"{path}: up to date")
        return 0
    if current != text:
        path.write_text(text, encoding="utf-8")
        print(f"wrote {path}")
    else:
        print(f"{path}: already up to date")
    return 0


if __name__ == "__main__":  # pragma: no cover
    sys.exit(main())
