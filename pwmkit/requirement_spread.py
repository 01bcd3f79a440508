"""The tolerance spread judged against a design's requirements (design layer).

:func:`requirement_spread` answers, for the frequency window and the duty requirement of
:class:`~pwmkit.design.Requirements`, the two questions the acceptance criterion asks:

- **worst case** — the lowest and highest frequency and the worst duty over every corner of the
  tolerance box (part tolerances, supply range, ambient range with the capacitor's temperature
  envelope and the diode-drop drift, the timer's accuracy), each with the corner where it occurs;
- **yield** — the Monte Carlo share of builds that meet each requirement.

For the pot topology the requirement holds over the whole wiper travel: the frequency window at
both ends of the travel and at the set wiper position, and the duty *reach* — the lowest duty at
one end must get down to ``duty_min`` and the highest at the other end up to ``duty_max`` — in
every corner (worst case) or in the same build at both ends (yield: the samples at the two ends
share their random draws). The frequency over the travel is taken at its ends and at the set
position (over the travel of the usual pot-steered network it changes monotonically or nearly so;
the pot-travel plot shows the whole curve).

It does no physics of its own: it calls :func:`pwmkit.tolerance.worst_case` and the spread model of
:mod:`pwmkit.tolerance` with the tolerance model of :func:`pwmkit.evaluate.tolerance_kwargs`.

References
----------
.. [1] IEC 60063:2015, *Preferred number series for resistors and capacitors* (the tolerance
   bands of the part series).
.. [2] :mod:`pwmkit.tolerance` — the spread model, the worst-case corner search and their
   references.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

import numpy as np

from .errors import DesignError

__all__ = ["RequirementSpread", "requirement_spread", "corner_text", "duty_requirement"]

#: Duty window around a bare ``duty`` target when no ``duty_min``/``duty_max`` is given (± points).
DUTY_TARGET_WINDOW = 0.02


def duty_requirement(design: Any) -> tuple[str, float, float] | None:
    """The duty requirement of a design as (kind, low, high) or None.

    ``kind`` is ``"reach"`` for the pot topology (the travel must cover low … high) and
    ``"window"`` for fixed-duty topologies (the duty must stay in low … high; a bare ``duty``
    target gets ± :data:`DUTY_TARGET_WINDOW`).
    """
    req = design.requirements
    if req.duty_min is None and req.duty_max is None and req.duty is None:
        return None
    if design.timing.topology == "pot":
        lo = req.duty_min if req.duty_min is not None else req.duty
        hi = req.duty_max if req.duty_max is not None else req.duty
        return "reach", float(lo if lo is not None else hi), float(hi if hi is not None else lo)
    if req.duty_min is not None or req.duty_max is not None:
        return ("window", 0.0 if req.duty_min is None else float(req.duty_min),
                1.0 if req.duty_max is None else float(req.duty_max))
    return "window", max(req.duty - DUTY_TARGET_WINDOW, 0.0), min(req.duty + DUTY_TARGET_WINDOW, 1.0)


def corner_text(deviations: Any, wiper: float | None = None) -> str:
    """A corner of the tolerance box in words, e.g. ``"wiper 0 %, ra +5 %, vcc 11.4 V, ambient 40 °C"``."""
    parts = [] if wiper is None else [f"wiper {100 * wiper:.3g} %"]
    for label, dev in dict(deviations).items():
        if label == "vcc":
            parts.append(f"vcc {dev:.4g} V")
        elif label == "ambient":
            parts.append(f"ambient {dev:.4g} °C")
        elif abs(dev) > 0:
            parts.append(f"{label} {100 * dev:+.3g} %")
    return ", ".join(parts) or "nominal"


@dataclass(frozen=True)
class RequirementSpread:
    """The spread of frequency and duty against the requirements (see :func:`requirement_spread`).

    Attributes
    ----------
    criterion : "worst-case" or "yield"; min_yield : the share required by "yield" [1]
    frequency_window : (low, high) required frequency or None [Hz]
    frequency_low, frequency_high : worst-case lowest and highest frequency [Hz]
    frequency_low_at, frequency_high_at : the corner where each occurs (text)
    frequency_yield : Monte Carlo share inside the window (every travel position checked) [1]
    duty_kind : "reach" (pot), "window" (fixed duty) or None without a duty requirement
    duty_required : (low, high) [1] or None
    duty_low, duty_high : worst-case lowest and highest duty (kind "window") or the worst reach —
        highest bottom end and lowest top end over the corners (kind "reach") [1]
    duty_low_at, duty_high_at : the corners (text)
    duty_yield : Monte Carlo share meeting the duty requirement [1] or None
    yield_ : Monte Carlo share meeting both (the same builds) [1]
    n : Monte Carlo samples; n_corners : worst-case points evaluated
    """

    criterion: str
    min_yield: float
    frequency_window: tuple[float, float] | None
    frequency_low: float
    frequency_high: float
    frequency_low_at: str
    frequency_high_at: str
    frequency_yield: float | None
    duty_kind: str | None
    duty_required: tuple[float, float] | None
    duty_low: float
    duty_high: float
    duty_low_at: str
    duty_high_at: str
    duty_yield: float | None
    yield_: float
    n: int
    n_corners: int

    def frequency_inside(self) -> bool | None:
        """Every corner inside the frequency window (None without a window)."""
        if self.frequency_window is None:
            return None
        lo, hi = self.frequency_window
        return lo <= self.frequency_low and self.frequency_high <= hi

    def duty_inside(self) -> bool | None:
        """Every corner meets the duty requirement (None without one)."""
        if self.duty_required is None:
            return None
        lo, hi = self.duty_required
        if self.duty_kind == "reach":
            return self.duty_low <= lo + 1e-12 and self.duty_high >= hi - 1e-12
        return lo <= self.duty_low and self.duty_high <= hi

    def __repr__(self) -> str:
        return (f"RequirementSpread({self.criterion}: f {self.frequency_low:.5g} … {self.frequency_high:.5g} Hz, "
                f"duty {100 * self.duty_low:.4g} … {100 * self.duty_high:.4g} %)")


def _wipers(design: Any) -> tuple[float | None, ...]:
    if design.timing.topology != "pot":
        return (None,)
    return (0.0, float(design.timing.wiper), 1.0)


def requirement_spread(design: Any, kw: dict[str, Any], *, n: int = 20_000, seed: int = 1) -> RequirementSpread:
    """Worst case and Monte Carlo yield of frequency and duty against the design's requirements.

    Parameters
    ----------
    design : pwmkit.design.Design
    kw : dict
        The design's :func:`pwmkit.evaluate.timing_kwargs`.
    n : int
        Monte Carlo samples per travel position.
    seed : int
        Seed (the same builds at every travel position).

    Returns
    -------
    RequirementSpread

    Raises
    ------
    DesignError
        A corner or a sample does not oscillate in the worst case (the tolerance-analysis rule
        reports that), or bad input.
    """
    from ._spread import build_model, evaluate, generator, sample
    from .evaluate import tolerance_kwargs
    from .tolerance import worst_case

    if design.timing.topology == "two-timer":  # clock + monostable: its own corners and reach
        from .two_timer_design import operating_point, requirement_spread_two_timer

        v_pin, v_source, _loop = operating_point(design)
        return requirement_spread_two_timer(design, n=n, seed=seed, v_pin=v_pin if v_source is None else None)
    req = design.requirements
    topo = design.timing.topology
    common = tolerance_kwargs(design)
    duty_req = duty_requirement(design)
    f_window = req.frequency_window
    f_lo, f_hi, f_lo_at, f_hi_at = np.inf, -np.inf, "", ""
    ends: dict[float | None, Any] = {}
    corners = 0
    for wiper in _wipers(design):
        args = dict(kw) if wiper is None else dict(kw, wiper=wiper)
        w = worst_case(topo, **common, **args)
        ends[wiper] = w
        corners += w.n_evaluated
        if w.frequency_min < f_lo:
            f_lo, f_lo_at = w.frequency_min, corner_text(w.frequency_min_at.deviations, wiper)
        if w.frequency_max > f_hi:
            f_hi, f_hi_at = w.frequency_max, corner_text(w.frequency_max_at.deviations, wiper)
    if topo == "pot":
        bottom, top = ends[0.0], ends[1.0]
        d_lo, d_lo_at = bottom.duty_max, corner_text(bottom.duty_max_at.deviations, 0.0)
        d_hi, d_hi_at = top.duty_min, corner_text(top.duty_min_at.deviations, 1.0)
    else:
        w = ends[None]
        d_lo, d_lo_at = w.duty_min, corner_text(w.duty_min_at.deviations)
        d_hi, d_hi_at = w.duty_max, corner_text(w.duty_max_at.deviations)

    # Monte Carlo: the same draws at every travel position (one build, moved along its travel)
    f_ok = np.ones(n, dtype=bool)
    d_ok = np.ones(n, dtype=bool)
    vrange = common.get("vcc_range")
    for wiper in _wipers(design):
        args = dict(kw) if wiper is None else dict(kw, wiper=wiper)
        model = build_model(topo, common["tolerances"], "uniform", None, common["dielectric"], common["t_ambient_c"],
                            vrange, True, common.get("vd_tempco", -2e-3), args)
        dev = sample(model, n, generator(seed))
        f, d, ok, _ = evaluate(model, dev, n)
        with np.errstate(invalid="ignore"):
            if f_window is not None:
                f_ok &= ok & (f >= f_window[0]) & (f <= f_window[1])
            else:
                f_ok &= ok
            if duty_req is not None:
                kind, lo, hi = duty_req
                if kind == "window":
                    d_ok &= ok & (d >= lo) & (d <= hi)
                elif wiper == 0.0:
                    d_ok &= ok & (d <= lo + 1e-12)
                elif wiper == 1.0:
                    d_ok &= ok & (d >= hi - 1e-12)
    if not (np.isfinite(f_lo) and np.isfinite(f_hi)):  # pragma: no cover - worst_case raises first
        raise DesignError("requirement spread: no worst-case point oscillates")
    return RequirementSpread(
        criterion=req.criterion, min_yield=float(req.min_yield), frequency_window=f_window,
        frequency_low=float(f_lo), frequency_high=float(f_hi), frequency_low_at=f_lo_at, frequency_high_at=f_hi_at,
        frequency_yield=float(f_ok.mean()) if f_window is not None else None,
        duty_kind=None if duty_req is None else duty_req[0],
        duty_required=None if duty_req is None else (duty_req[1], duty_req[2]),
        duty_low=float(d_lo), duty_high=float(d_hi), duty_low_at=d_lo_at, duty_high_at=d_hi_at,
        duty_yield=float(d_ok.mean()) if duty_req is not None else None, yield_=float((f_ok & d_ok).mean()),
        n=int(n), n_corners=int(corners),
    )
