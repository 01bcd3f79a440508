"""Schematic of a :class:`pwmkit.design.Design` (maps the design's fields onto :func:`draw`)."""

from __future__ import annotations

from typing import Any

from ..errors import DesignError
from .draw import draw
from .parts import Schematic

__all__ = ["for_design"]


def for_design(design: Any, *, annotate: bool = True, timing: Any = None) -> Schematic:
    """Draw the schematic of a design with its own part values.

    Parameters
    ----------
    design : pwmkit.design.Design
    annotate : bool
        Write the computed t_high, t_low, path resistances, frequency and duty beside the paths.
    timing : AstableResult, optional
        Already computed timing (saves a recomputation); default ``design.astable()``.

    Returns
    -------
    Schematic
    """
    from ..glossary import diode_label, mosfet_label, timer_part_label

    t = design.timing
    if t.topology == "two-timer":
        from .two_timer import for_two_timer

        return for_two_timer(design, annotate=annotate, timing=timing)
    kw: dict[str, Any] = dict(ra=t.ra, rb=t.rb, c=t.c, vcc=design.vcc, c_cv=t.cv_bypass,
                              diode_part=diode_label(t.diode), timer_part=timer_part_label(t.timer))
    if t.topology == "pot":
        kw.update(pot=t.pot, wiper=t.wiper)
    if t.vctl is not None:
        kw["vctl"] = t.vctl
    if t.r_cv is not None:
        kw["r_cv"] = t.r_cv
    load = design.load
    if load is not None:
        kw["r_gate"] = design.switch.r_gate
        kw["mosfet_part"] = mosfet_label(design.switch.mosfet)
        if design.v_load is not None:
            kw["v_load"] = design.v_load
        if load.kind == "led":
            kw.update(load="led", n_series=load.n_series, n_parallel=load.n_parallel, r_led=load.r_series)
        elif load.kind == "heater":
            raise DesignError("design.load: the schematic draws heater loads on the two-timer topology only; "
                              "this astable drawing knows LED and motor loads")
        else:
            kw.update(load="motor", clamp=design.freewheel.clamp,
                      freewheel_part=f"freewheel {diode_label(design.freewheel.diode)}")
            if design.freewheel.clamp == "zener":
                kw["v_zener"] = design.freewheel.v_zener
    if annotate:
        r = timing if timing is not None else design.astable()
        kw["annotations"] = {k: float(getattr(r, k)) for k in ("t_high", "t_low", "frequency", "duty", "r_charge",
                                                                 "r_discharge")}
    return draw(t.topology, **kw)
