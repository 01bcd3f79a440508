"""Symbolic derivation of the monostable and two-timer PWM timing with sympy (imported lazily).

The monostable's pulse is the same first-order RC crossing as the astable half-periods
(:func:`pwmkit.timing.symbolic.crossing_time`): after the trigger the discharge switch opens and
the capacitor charges from its start level ``V_s`` toward the supply through ``R_M``; the output
falls when it reaches the upper threshold, which the control pin sets to ``V_ctl``:

.. math:: t_w = R_M C_M \\ln\\frac{V_{cc} - V_s}{V_{cc} - V_{ctl}}

With ``V_s = 0`` and the internal divider (``V_ctl = 2 V_cc/3``) the derivation gives the trade's
``ln 3 ≈ 1.0986 ≈ 1.1·R·C``. In the two-timer PWM an astable clock of period ``T`` triggers the
monostable, so the duty is ``t_w / T``; its derivatives with respect to the control voltage and
the supply (supply sensitivity) are taken here symbolically and lambdified for numpy.

After the pulse the discharge switch (modelled as a resistance ``R_dis``) empties the capacitor
while ``R_M`` keeps feeding it, so it settles toward ``V_cc·R_dis/(R_M + R_dis)`` with the time
constant ``(R_M ∥ R_dis)·C_M``; the recovery time is derived from the same crossing law.

Everything is cached and nothing here runs at ``import pwmkit``.

References
----------
.. [1] C. K. Alexander, M. N. O. Sadiku, *Fundamentals of Electric Circuits*, 6th ed., ch. 7
   (step response of an RC circuit).
.. [2] Data sheets of the bipolar and CMOS 555-type timer families, monostable operation section
   (pulse width 1.1·R·C with the internal divider; the control-voltage pin moves the threshold).
"""

from __future__ import annotations

import functools
from dataclasses import dataclass
from typing import Any

__all__ = ["MonostableSymbols", "MonostableExpressions", "monostable_symbols", "monostable_expressions",
           "monostable_numeric"]


@dataclass(frozen=True)
class MonostableSymbols:
    """The named sympy symbols of the monostable and two-timer derivation."""

    r: Any
    c: Any
    vcc: Any
    vctl: Any
    v_start: Any
    period: Any
    r_dis: Any
    fraction: Any

    def rows(self) -> list[tuple[Any, str, str]]:
        """(symbol, meaning, unit) for every symbol, for documents."""
        return [
            (self.r, "monostable timing resistor", "Ω"),
            (self.c, "monostable timing capacitor", "F"),
            (self.vcc, "supply voltage", "V"),
            (self.vctl, "control-pin voltage = upper threshold of the monostable", "V"),
            (self.v_start, "capacitor level at the trigger (start level)", "V"),
            (self.period, "clock period", "s"),
            (self.r_dis, "discharge-switch resistance", "Ω"),
            (self.fraction, "residual fraction of the swing left at the end of the recovery", "1"),
        ]


@functools.cache
def monostable_symbols() -> MonostableSymbols:
    """The cached symbol table (imports sympy on first call)."""
    import sympy as sp

    pos = {"positive": True}
    return MonostableSymbols(
        r=sp.Symbol("R_M", **pos), c=sp.Symbol("C_M", **pos), vcc=sp.Symbol("V_cc", **pos),
        vctl=sp.Symbol("V_ctl", **pos), v_start=sp.Symbol("V_s", nonnegative=True, real=True),
        period=sp.Symbol("T", **pos), r_dis=sp.Symbol("R_dis", **pos), fraction=sp.Symbol("epsilon", **pos),
    )


@dataclass(frozen=True)
class MonostableExpressions:
    """Closed forms of the monostable and the two-timer PWM as sympy expressions.

    Attributes
    ----------
    width : pulse width ``t_w`` [s]
    width_internal : ``t_w`` with the internal divider ``V_ctl = 2 V_cc/3`` [s]
    duty : ``t_w / T`` [1]
    duty_per_volt : ``∂duty/∂V_ctl`` [1/V]
    duty_per_supply : ``∂duty/∂V_cc`` at a fixed control voltage [1/V]
    v_rest : level the capacitor settles to with the discharge switch on [V]
    tau_recovery : time constant of the recovery ``(R_M ∥ R_dis)·C_M`` [s]
    t_recovery : time from ``V_ctl`` to within ``ε`` of the swing above ``v_rest`` [s]
    symbols : MonostableSymbols
    """

    width: Any
    width_internal: Any
    duty: Any
    duty_per_volt: Any
    duty_per_supply: Any
    v_rest: Any
    tau_recovery: Any
    t_recovery: Any
    symbols: MonostableSymbols

    def as_dict(self) -> dict[str, Any]:
        return {"t_w": self.width, "D": self.duty, "t_rec": self.t_recovery}

    def _repr_latex_(self) -> str:
        import sympy as sp

        lines = [f"{sp.latex(sp.Symbol(k))} &= {sp.latex(v)}" for k, v in self.as_dict().items()]
        return "$\\begin{aligned}" + " \\\\ ".join(lines) + "\\end{aligned}$"


@functools.cache
def monostable_expressions() -> MonostableExpressions:
    """Derive the monostable width, the two-timer duty and its derivatives, and the recovery.

    Returns
    -------
    MonostableExpressions

    Examples
    --------
    >>> e = monostable_expressions()
    >>> s = e.symbols
    >>> round(float((e.width_internal / (s.r * s.c)).subs(s.v_start, 0)), 4)   # the 1.1·R·C rule
    1.0986
    """
    import sympy as sp

    from .symbolic import crossing_time

    s = monostable_symbols()
    law, (r, c, v_inf, v0, v1) = crossing_time()
    width = law.subs({r: s.r, c: s.c, v_inf: s.vcc, v0: s.v_start, v1: s.vctl})
    width = s.r * s.c * sp.log(sp.cancel(sp.together(sp.simplify(width / (s.r * s.c)).args[0])))
    width = _log_form(width, s)
    width_internal = sp.simplify(width.subs(s.vctl, sp.Rational(2, 3) * s.vcc))
    duty = width / s.period
    v_rest = sp.simplify(s.vcc * s.r_dis / (s.r + s.r_dis))
    r_par = sp.simplify(s.r * s.r_dis / (s.r + s.r_dis))
    tau = r_par * s.c
    # recovery: from V_ctl toward v_rest, until the residual is ε·(V_ctl − v_rest)
    target = v_rest + s.fraction * (s.vctl - v_rest)
    t_rec = sp.simplify(law.subs({r: r_par, c: s.c, v_inf: v_rest, v0: s.vctl, v1: target}))
    return MonostableExpressions(
        width=width, width_internal=width_internal, duty=duty,
        duty_per_volt=sp.simplify(sp.diff(duty, s.vctl)), duty_per_supply=sp.simplify(sp.diff(duty, s.vcc)),
        v_rest=v_rest, tau_recovery=tau, t_recovery=t_rec, symbols=s,
    )


def _log_form(expr: Any, s: MonostableSymbols) -> Any:
    """``R·C·log(ratio)`` with the ratio written ``(V_cc − V_s)/(V_cc − V_ctl)``."""
    import sympy as sp

    logs = list(expr.atoms(sp.log))
    if len(logs) != 1:  # pragma: no cover - a sympy behaviour change would land here
        return expr
    num, den = sp.fraction(sp.cancel(logs[0].args[0]))
    if sp.expand(num).coeff(s.vcc).could_extract_minus_sign():
        num, den = -num, -den
    return s.r * s.c * sp.log(sp.expand(num) / sp.expand(den))


@functools.cache
def monostable_numeric() -> Any:
    """numpy functions ``(width, duty_per_volt, duty_per_supply)`` of ``(r, c, vcc, vctl, v_start, period)``.

    Made with :func:`sympy.lambdify` from :func:`monostable_expressions`; cached.
    """
    import sympy as sp

    e = monostable_expressions()
    s = e.symbols
    args = [s.r, s.c, s.vcc, s.vctl, s.v_start, s.period]
    return (sp.lambdify(args[:5], e.width, modules="numpy"),
            sp.lambdify(args, e.duty_per_volt, modules="numpy"),
            sp.lambdify(args, e.duty_per_supply, modules="numpy"))
