"""A worked formula laid out for a narrow screen: the expression broken at its factors, the numbers as a table.

:func:`pwmkit.record.formulas.worked` writes the expression with every number substituted on one
line — right for a formula sheet, too wide for a dashboard column. :func:`worked_screen` gives the
same expression (the same sympy object) broken into one factor per line, the design's numbers in
a small table by the screen rule of :mod:`pwmkit.numstyle` (4 significant figures; the formula
sheet keeps full precision) and the result.
"""

from __future__ import annotations

import html
from typing import Any

from ..design import Design

__all__ = ["worked_screen", "expression_lines"]

#: Unit kind of each timing symbol (by its name) for the numbers table.
_SYMBOL_KIND = {"R_A": "Ω", "R_B": "Ω", "P": "Ω", "R_on": "Ω", "R_cv": "Ω", "R_CV": "Ω", "C": "F", "V_cc": "V",
                "V_d": "V", "V_sat": "V", "V_ctl": "V", "w": "wiper"}


def expression_lines(expr: Any, lhs: str, **latex_settings: Any) -> str:
    """LaTeX ``aligned`` block of ``lhs = expr`` with one factor per line.

    The short factors (symbols, numbers) and the denominator form the first line; every longer
    factor (a sum, a logarithm) follows on its own line after a ``\\cdot``. ``latex_settings`` go to
    sympy's ``latex`` (e.g. ``symbol_names`` to write the design's numbers in place of the symbols).
    """
    import sympy as sp

    from .formulas import _latex

    num, den = sp.fraction(expr)
    factors = sp.Mul.make_args(num)
    short = [f for f in factors if f.is_Symbol or f.is_Number]
    long_ = [f for f in factors if not (f.is_Symbol or f.is_Number)]
    head = sp.Mul(*short) if short else sp.Integer(1)
    if latex_settings.get("symbol_names"):  # numbers in place of symbols: keep every factor visible
        first_expr = sp.Mul(head, sp.Pow(den, -1, evaluate=False), evaluate=False) if den != 1 else head
    else:
        first_expr = head / den
    first = _latex(first_expr, **latex_settings) if den != 1 or short else ""
    if not long_:
        return rf"\begin{{aligned}} {lhs} &= {first} \end{{aligned}}"
    lines = []
    for i, f in enumerate(long_):
        piece = _latex(f, **latex_settings)
        if isinstance(f, sp.Add):
            piece = rf"\left({piece}\right)"
        if i == 0 and first:
            lines.append(rf"{lhs} &= {first} \\ &\quad \cdot {piece}")
        elif i == 0:
            lines.append(rf"{lhs} &= {piece}")
        else:
            lines.append(rf"&\quad \cdot {piece}")
    return r"\begin{aligned} " + r" \\ ".join(lines) + r" \end{aligned}"


def worked_screen(design: Design, quantity: str = "t_high") -> str:
    """HTML+LaTeX of a quantity worked out for a screen: broken expression, numbers table, result.

    Parameters
    ----------
    design : Design
    quantity : {"t_high", "t_low", "period", "frequency", "duty"}

    Returns
    -------
    str
        HTML with ``$$…$$`` display math (for :class:`ipywidgets.HTMLMath`).
    """
    from ..numstyle import screen
    from .formulas import _INFO, _worked_parts

    w = _worked_parts(design, quantity)
    lhs, _plain, unit, meaning = _INFO[quantity]
    if quantity in ("t_high", "t_low"):
        block = expression_lines(w["expr"], lhs)
        symbols = sorted(w["expr"].free_symbols, key=lambda s: s.name)
        rows = "".join(
            f"<tr><td style='padding:1px 12px 1px 0;white-space:nowrap;min-width:3.5em'>\\({_symbol_tex(s)}\\)</td>"
            f"<td class='pwmkit-q' style='padding:1px 0;white-space:nowrap'>"
            f"{html.escape(screen(w['values'][s], _SYMBOL_KIND.get(s.name, '')) if _SYMBOL_KIND.get(s.name) else screen(w['values'][s], 'ratio').replace(' ×', ''))}"
            f"</td></tr>" for s in symbols)
    else:
        block = rf"\begin{{aligned}} {lhs} &= {w['latex_def']} \end{{aligned}}"
        from ..values import parse_value

        th, tl = (screen(parse_value(w[k]), "s") for k in ("t_high_text", "t_low_text"))
        rows = (f"<tr><td>\\(t_{{\\mathrm{{high}}}}\\)</td><td class='pwmkit-q'>{html.escape(th)}</td></tr>"
                f"<tr><td>\\(t_{{\\mathrm{{low}}}}\\)</td><td class='pwmkit-q'>{html.escape(tl)}</td></tr>")
    value = w["value"]
    result = screen(value, "duty") if quantity == "duty" else screen(value, unit)
    return (f"<div class='pwmkit-worked'><div style='color:#5a6270;font-size:12px'>{html.escape(meaning)}</div>"
            f"$$ {block} $$"
            f"<table class='pwmkit-worked-numbers' style='font-size:12px;border-collapse:collapse'>"
            f"<caption style='text-align:left;color:#5a6270;white-space:nowrap'>with this design's numbers (SI units)</caption>{rows}"
            f"</table><div class='pwmkit-worked-result' style='font-size:14px;margin-top:4px'>"
            f"<b>\\({lhs} = \\) {html.escape(result)}</b></div></div>")


def _symbol_tex(symbol: Any) -> str:
    from .formulas import _latex

    return _latex(symbol)
