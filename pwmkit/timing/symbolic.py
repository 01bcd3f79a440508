"""Symbolic derivation of the astable timing with sympy (imported lazily).

Each half-period is derived, not typed in: the capacitor voltage of a
first-order RC node heading from ``V0`` toward ``V∞``,

.. math:: v(t) = V_\\infty + (V_0 - V_\\infty)\\,e^{-t/RC},

is solved with :func:`sympy.solve` for the time at which it crosses the
comparator threshold ``V1``. Substituting each topology's path
(:mod:`pwmkit.timing.paths`) and the thresholds ``V_H = V_ctl``,
``V_L = V_ctl/2`` gives ``t_high`` and ``t_low``; period, frequency and
duty follow. With the internal divider (``V_ctl = 2·Vcc/3``) and ideal parts
the familiar ``ln 2`` factor (≈ 0.693) falls out of the derivation.

All symbols are declared positive (or nonnegative) so that simplification
behaves. Derivations are cached; nothing here runs at ``import pwmkit``.

References
----------
.. [1] Any first-order circuits text, e.g. C. K. Alexander, M. N. O. Sadiku,
   *Fundamentals of Electric Circuits*, 6th ed., ch. 7 (step response of an
   RC circuit).
.. [2] Data sheets of the bipolar and CMOS 555-type timer families, astable
   operation section (threshold 2/3 and trigger 1/3 of the supply; the
   control-voltage pin moves both).
"""

from __future__ import annotations

import functools
from dataclasses import dataclass
from typing import Any, Literal

from ..errors import DesignError
from .paths import TOPOLOGIES, paths

__all__ = ["SymbolTable", "TimingExpressions", "symbols", "crossing_time", "expressions", "numeric_function"]

Discharge = Literal["general", "saturation", "resistance"]
Control = Literal["external", "internal"]


@dataclass(frozen=True)
class SymbolTable:
    """The named sympy symbols and their meaning and unit."""

    ra: Any
    rb: Any
    pot: Any
    wiper: Any
    c: Any
    vcc: Any
    vd: Any
    vsat: Any
    r_on: Any
    vctl: Any

    def rows(self) -> list[tuple[Any, str, str]]:
        """(symbol, meaning, unit) for every symbol, for documents."""
        return [
            (self.ra, "charge resistor (R1 in the pot topology)", "Ω"),
            (self.rb, "discharge resistor (end resistor in the pot topology)", "Ω"),
            (self.pot, "potentiometer end-to-end resistance", "Ω"),
            (self.wiper, "wiper position: fraction of the pot in the charge path (0 … 1)", "1"),
            (self.c, "timing capacitor", "F"),
            (self.vcc, "supply voltage", "V"),
            (self.vd, "steering-diode forward drop", "V"),
            (self.vsat, "discharge-transistor saturation voltage", "V"),
            (self.r_on, "discharge-switch on-resistance", "Ω"),
            (self.vctl, "control-pin voltage = upper threshold (lower threshold is half of it)", "V"),
        ]


@functools.cache
def symbols() -> SymbolTable:
    """The cached symbol table (imports sympy on first call)."""
    import sympy as sp

    pos = {"positive": True}
    nonneg = {"nonnegative": True, "real": True}
    return SymbolTable(
        ra=sp.Symbol("R_A", **pos),
        rb=sp.Symbol("R_B", **nonneg),
        pot=sp.Symbol("P", **pos),
        wiper=sp.Symbol("w", **nonneg),
        c=sp.Symbol("C", **pos),
        vcc=sp.Symbol("V_cc", **pos),
        vd=sp.Symbol("V_d", **nonneg),
        vsat=sp.Symbol("V_sat", **nonneg),
        r_on=sp.Symbol("R_on", **nonneg),
        vctl=sp.Symbol("V_ctl", **pos),
    )


@functools.cache
def crossing_time() -> tuple[Any, tuple[Any, ...]]:
    """Solve the RC law for the threshold-crossing time.

    Returns
    -------
    (expr, (R, C, V_inf, V_0, V_1))
        ``expr`` is the time [s] at which ``v(t)`` reaches ``V_1``, as a sympy
        expression in the returned symbols.
    """
    import sympy as sp

    t = sp.Symbol("t", positive=True)
    r, c = sp.symbols("R C", positive=True)
    v_inf, v0, v1 = sp.symbols("V_inf V_0 V_1", real=True)
    law = sp.Eq(v_inf + (v0 - v_inf) * sp.exp(-t / (r * c)), v1)
    solutions = sp.solve(law, t)
    if len(solutions) != 1:  # pragma: no cover - a sympy behaviour change would land here
        raise RuntimeError(f"expected one crossing time, sympy gave {solutions}")
    return solutions[0], (r, c, v_inf, v0, v1)


@dataclass(frozen=True)
class TimingExpressions:
    """Closed-form timing of one topology as sympy expressions.

    Attributes
    ----------
    topology, discharge, control : the variant derived
    t_high, t_low, period, frequency, duty : sympy expressions [s, s, s, Hz, 1]
    symbols : SymbolTable
    """

    topology: str
    discharge: str
    control: str
    t_high: Any
    t_low: Any
    period: Any
    frequency: Any
    duty: Any
    symbols: SymbolTable

    def as_dict(self) -> dict[str, Any]:
        return {"t_high": self.t_high, "t_low": self.t_low, "period": self.period,
                "frequency": self.frequency, "duty": self.duty}

    def _repr_latex_(self) -> str:
        import sympy as sp

        lines = [f"{sp.latex(sp.Symbol(k))} &= {sp.latex(v)}" for k, v in self.as_dict().items()]
        return "$\\begin{aligned}" + " \\\\ ".join(lines) + "\\end{aligned}$"


def _check_variant(topology: str, discharge: str, control: str) -> None:
    if topology not in TOPOLOGIES:
        raise DesignError(f"topology: {topology!r} is not known; allowed: {', '.join(TOPOLOGIES)}")
    if discharge not in ("general", "saturation", "resistance"):
        raise DesignError(f"discharge: {discharge!r} is not known; allowed: general, saturation, resistance")
    if control not in ("external", "internal"):
        raise DesignError(f"control: {control!r} is not known; allowed: external, internal")


@functools.cache
def expressions(topology: str, discharge: Discharge = "general", control: Control = "external",
                ideal: bool = False) -> TimingExpressions:
    """Derive the closed-form timing of a topology.

    Parameters
    ----------
    topology : {"classic", "bypass", "steered", "pot"}
    discharge : {"general", "saturation", "resistance"}
        Discharge-switch model: both ``V_sat`` and ``R_on`` (general), the
        bipolar saturation voltage only (``R_on = 0``), or the CMOS
        on-resistance only (``V_sat = 0``).
    control : {"external", "internal"}
        ``"external"`` keeps ``V_ctl`` as a symbol (driven or loaded control
        pin); ``"internal"`` substitutes the internal divider ``V_ctl = 2·V_cc/3``.
    ideal : bool
        Substitute ``V_d = V_sat = R_on = 0`` (the textbook forms).

    Returns
    -------
    TimingExpressions
    """
    import sympy as sp

    _check_variant(topology, discharge, control)
    s = symbols()
    law, (r, c, v_inf, v0, v1) = crossing_time()
    p = paths(topology, ra=s.ra, rb=s.rb, pot=s.pot, wiper=s.wiper, vcc=s.vcc, vd=s.vd, vsat=s.vsat,
              r_on=s.r_on)
    v_upper, v_lower = s.vctl, s.vctl / 2
    t_high = law.subs({r: p.r_charge, c: s.c, v_inf: p.v_charge, v0: v_lower, v1: v_upper})
    t_low = law.subs({r: p.r_discharge, c: s.c, v_inf: p.v_discharge, v0: v_upper, v1: v_lower})
    subs: dict[Any, Any] = {}
    if discharge == "saturation" or ideal:
        subs[s.r_on] = 0
    if discharge == "resistance" or ideal:
        subs[s.vsat] = 0
    if ideal:
        subs[s.vd] = 0
    if control == "internal":
        subs[s.vctl] = sp.Rational(2, 3) * s.vcc
    t_high = _tidy(t_high.subs(subs))
    t_low = _tidy(t_low.subs(subs))
    period = t_high + t_low
    return TimingExpressions(
        topology=topology,
        discharge=discharge,
        control=control,
        t_high=t_high,
        t_low=t_low,
        period=period,
        frequency=1 / period,
        duty=t_high / period,
        symbols=s,
    )


def _tidy(expr: Any) -> Any:
    """Bring ``k·log(ratio)`` into a readable canonical form.

    The coefficient (a resistance times C) and the ratio are simplified
    separately; a ratio whose numerator and denominator both start with a minus
    sign is negated top and bottom.
    """
    import sympy as sp

    logs = [a for a in expr.atoms(sp.log)]
    if len(logs) != 1:
        return sp.simplify(expr)
    log_term = logs[0]
    coeff = _fewer_minus(sp.factor(sp.simplify(expr / log_term)))
    ratio = sp.cancel(sp.together(log_term.args[0]))
    num, den = sp.fraction(ratio)
    num, den = sp.factor(num), sp.factor(den)
    if _reads_better_negated(num) and _reads_better_negated(den):
        num, den = sp.factor(-num), sp.factor(-den)
    return coeff * sp.log(num / den)


def _minus_count(expr: Any) -> int:
    import sympy as sp

    return sum(1 for term in sp.Add.make_args(sp.expand(expr)) if term.could_extract_minus_sign())


def _reads_better_negated(expr: Any) -> bool:
    """True if ``-expr`` reads better: the supply (or else the control voltage) gets a plus sign."""
    import sympy as sp

    s = symbols()
    expanded = sp.expand(expr)
    for key in (s.vcc, s.vctl):
        coeff = expanded.coeff(key)
        if coeff != 0:
            return bool(coeff.could_extract_minus_sign())
    return _minus_count(-expr) < _minus_count(expr)


def _fewer_minus(expr: Any) -> Any:
    """Negate sum factors of a product that read better negated (``-(P·w − P − R_B)`` → ``P − P·w + R_B``)."""
    import sympy as sp

    sign = 1
    factors = []
    for f in sp.Mul.make_args(expr):
        if f == -1:
            sign = -sign
            continue
        if isinstance(f, sp.Add) and _minus_count(-f) < _minus_count(f):
            sign = -sign
            f = sp.expand(-f)
        factors.append(f)
    return sp.Mul(sign, *factors)


_ARG_ORDER = ("ra", "rb", "pot", "wiper", "c", "vcc", "vd", "vsat", "r_on", "vctl")


@functools.cache
def numeric_function(topology: str, discharge: Discharge = "general") -> Any:
    """A numpy function ``f(ra, rb, pot, wiper, c, vcc, vd, vsat, r_on, vctl) -> (t_high, t_low)``.

    Made with :func:`sympy.lambdify` from the external-control expressions of
    the chosen discharge model (the simpler "saturation" form when
    ``r_on = 0``, "resistance" when ``vsat = 0``); cached per variant.
    """
    import sympy as sp

    e = expressions(topology, discharge, "external")
    s = e.symbols
    args = [getattr(s, name) for name in _ARG_ORDER]
    return sp.lambdify(args, (e.t_high, e.t_low), modules="numpy", cse=True)
