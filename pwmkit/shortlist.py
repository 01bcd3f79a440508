"""Ranked part sets for a design's requirements, judged by its acceptance criterion (design layer).

:func:`shortlist` turns the requirements of a starting design (frequency window, duty or duty
range, supply and ambient ranges, timer family, part series) into preferred-value part sets:

1. :func:`pwmkit.synthesis.find` searches every combination of preferred values for sets whose
   nominal timing meets the targets (per topology asked for);
2. each set becomes a :class:`~pwmkit.design.Design` — the starting design with these parts, the
   capacitor's dielectric and initial tolerance, the resistors at the customary tolerance of their
   series (IEC 60063 association, common practice) — and is judged with
   :func:`pwmkit.requirement_spread.requirement_spread`: worst-case corners and Monte Carlo yield
   over the design's own tolerance model, supply range and ambient range;
3. the sets are ranked: those that meet the criterion first, then by yield, part count, number of
   distinct values and the nominal frequency error.

The same function serves the command line (``pwmkit find``, ``pwmkit new``) and the dashboard's
candidates panel; it reports progress through a callback and stops early when asked to.

References
----------
.. [1] IEC 60063:2015, *Preferred number series for resistors and capacitors*.
"""

from __future__ import annotations

import time
from collections.abc import Callable
from dataclasses import dataclass, replace
from typing import Any

from .errors import DesignError

__all__ = ["RankedSet", "Shortlist", "Cancelled", "shortlist", "topologies_for", "TOPOLOGY_CHOICES"]

#: Topologies :func:`shortlist` accepts ("any" picks by the duty requirement).
TOPOLOGY_CHOICES = ("pot", "steered", "bypass", "classic", "any")


class Cancelled(Exception):  # noqa: N818 - the trade word, not an error condition
    """Raised inside :func:`shortlist` when its ``cancel`` callable returns True."""


@dataclass(frozen=True)
class RankedSet:
    """One part set with its design and its verdict against the requirements.

    Attributes
    ----------
    rank : 1 = best
    design : pwmkit.design.Design with these parts
    candidate : pwmkit.synthesis.Candidate (nominal figures of the search)
    spread : pwmkit.requirement_spread.RequirementSpread
    meets : True when the set meets the acceptance criterion for frequency and duty
    why : the first requirement it misses, in words ("" when it meets them)
    yield_ : Monte Carlo share meeting frequency and duty together [1]
    discharge_current : peak discharge-pin current at the highest supply [A]
    part_count : timing parts; bom_lines : distinct part values
    """

    rank: int
    design: Any
    candidate: Any
    spread: Any
    meets: bool
    why: str
    yield_: float
    discharge_current: float
    part_count: int
    bom_lines: int

    def values_text(self) -> str:
        """The parts in engineering notation."""
        return self.candidate.describe()

    def row(self) -> dict[str, Any]:
        """Flat JSON-ready figures (SI units) for tables, CSV and JSON."""
        t = self.design.timing
        s = self.spread
        out: dict[str, Any] = {
            "rank": self.rank, "topology": t.topology, "vcc": self.design.vcc, "timer": t.timer, "ra": t.ra, "rb": t.rb, "c": t.c, "pot": t.pot,
            "wiper": t.wiper, "c_dielectric": t.c_dielectric, "r_series": t.r_series, "c_series": t.c_series,
            "frequency": self.candidate.frequency, "frequency_low": s.frequency_low,
            "frequency_high": s.frequency_high, "duty_low": s.duty_low, "duty_high": s.duty_high,
            "duty_reach_min": self.candidate.duty_min, "duty_reach_max": self.candidate.duty_max,
            "yield": self.yield_, "part_count": self.part_count, "bom_lines": self.bom_lines,
            "discharge_current": self.discharge_current, "meets": self.meets, "why": self.why,
        }
        return out


class Shortlist(list):
    """The ranked sets of :func:`shortlist` (a list, best first) with facts about the search.

    Attributes
    ----------
    found : True when at least one set meets the criterion
    misses : topology → why the search found nothing there
    searched : combinations evaluated; elapsed : seconds
    criterion : the criterion in words
    """

    found: bool = False
    misses: dict[str, str]
    searched: int = 0
    elapsed: float = 0.0
    criterion: str = ""

    def nearest_miss(self) -> str:
        """Why nothing meets the requirements: the best set's shortfall, or the search's own reason."""
        if self:
            best = self[0]
            return f"closest set {best.values_text()} — {best.why}"
        return "; ".join(f"{topo}: {why}" for topo, why in self.misses.items()) or "no part set"


def topologies_for(design: Any, topology: str) -> tuple[str, ...]:
    """The topologies to search: ``topology`` itself, or for "any" by the duty requirement."""
    if topology not in TOPOLOGY_CHOICES:
        raise DesignError(f"topology: {topology!r} is not allowed; allowed: {', '.join(TOPOLOGY_CHOICES)}")
    if topology != "any":
        return (topology,)
    req = design.requirements
    if req.duty_min is not None and req.duty_max is not None and req.duty_max > req.duty_min:
        return ("pot",)
    return ("steered", "bypass", "classic")


def _duty_target(design: Any, topology: str) -> dict[str, Any]:
    req = design.requirements
    lo, hi = req.duty_min, req.duty_max
    if topology == "pot":
        if lo is None or hi is None or not hi > lo:
            raise DesignError("duty: the pot topology needs a duty range to reach (e.g. --duty 20..90%)")
        return {"duty_range": (lo, hi)}
    if lo is not None and hi is not None:
        return {"duty": 0.5 * (lo + hi), "duty_tolerance": max(0.5 * (hi - lo), 1e-4)}
    if req.duty is None:
        raise DesignError(f"duty: the {topology!r} topology needs a duty target (e.g. --duty 30%)")
    return {"duty": req.duty}


#: Extra duty travel asked of the pot search beyond the required range, so that the tolerance
#: corners still reach it (our choice; the sets found with no margin are judged too).
REACH_MARGINS = (0.04, 0.0)


def _search_targets(duty: dict[str, Any]) -> list[dict[str, Any]]:
    if "duty_range" not in duty:
        return [duty]
    lo, hi = duty["duty_range"]
    return [{"duty_range": (max(lo - m, 0.002), min(hi + m, 0.998))} for m in REACH_MARGINS]


def _dielectric_key(name: str) -> str:
    key = name.lower()
    return "film" if key.startswith("film") else key


def _discharge_current(design: Any) -> float:
    from .evaluate import timing_kwargs
    from .parts.timers import get_timer
    from .timing import astable

    kw = timing_kwargs(design)
    kw["vcc"] = design.supply_range[1]
    if design.timing.topology == "pot":
        kw["wiper"] = 1.0
    r = astable(design.timing.topology, **kw)
    vsat = design.timing.vsat if design.timing.vsat is not None else get_timer(design.timing.timer).vsat
    return float((kw["vcc"] - vsat) / design.timing.ra + (r.v_upper - r.v_discharge) / r.r_discharge)


def _why(spread: Any, criterion: str, min_yield: float) -> str:
    from .values import format_value

    parts = []
    if criterion == "worst-case":
        if spread.frequency_inside() is False:
            lo, hi = spread.frequency_window
            side = (f"lowest {format_value(spread.frequency_low, 'Hz', 4)} at {spread.frequency_low_at}"
                    if spread.frequency_low < lo else
                    f"highest {format_value(spread.frequency_high, 'Hz', 4)} at {spread.frequency_high_at}")
            parts.append(f"frequency leaves {format_value(lo, 'Hz', 4)} … {format_value(hi, 'Hz', 4)}: {side}")
        if spread.duty_inside() is False:
            parts.append(f"duty {100 * spread.duty_low:.4g} … {100 * spread.duty_high:.4g} % over the corners misses "
                         f"{100 * spread.duty_required[0]:.4g} … {100 * spread.duty_required[1]:.4g} %")
    else:
        for name in ("frequency", "duty"):
            y = getattr(spread, f"{name}_yield")
            if y is not None and y < min_yield:
                parts.append(f"{name} yield {100 * y:.4g} % below {100 * min_yield:.4g} %")
    return "; ".join(parts)


def shortlist(design: Any, *, topology: str = "any", top: int = 10, n_yield: int = 2000, seed: int = 1,
              search_factor: int = 3, progress: Callable[[float, str], None] | None = None,
              cancel: Callable[[], bool] | None = None) -> Shortlist:
    """Ranked preferred-value part sets that meet a design's requirements.

    Parameters
    ----------
    design : pwmkit.design.Design
        Starting design: its requirements (frequency, duty or duty range, criterion), supply and
        ambient ranges, timer family, part series and load. Its timing values are replaced.
    topology : {"pot", "steered", "bypass", "classic", "any"}
        Topology to search; "any" picks pot for a duty range, else steered, bypass and classic.
    top : int
        Sets to return (1 … 100).
    n_yield : int
        Monte Carlo samples per set and travel position (100 … 200000).
    seed : int
        Monte Carlo seed.
    search_factor : int
        The search keeps ``search_factor × top`` sets per topology for judging.
    progress : callable, optional
        ``progress(fraction, stage)`` while the search runs (fraction 0 … 1).
    cancel : callable, optional
        Polled while the search runs; returning True raises :class:`Cancelled`.

    Returns
    -------
    Shortlist
        Best first; ``found`` says whether any set meets the criterion.

    Raises
    ------
    DesignError
        Bad input (the message names the field). A target that no part set meets is not an
        error: the shortlist is then empty or has ``found = False``, and
        :meth:`Shortlist.nearest_miss` says why.
    Cancelled
        ``cancel()`` returned True.
    """
    from . import eseries
    from .design import Design
    from .evaluate import timing_kwargs
    from .parts.capacitors import get_dielectric
    from .requirement_spread import requirement_spread
    from .synthesis import find

    t0 = time.perf_counter()
    if not isinstance(design, Design):
        raise DesignError(f"design: expected a pwmkit.design.Design, got {type(design).__name__}")
    for name, value, lo, hi in (("top", top, 1, 100), ("n_yield", n_yield, 100, 200_000),
                                ("search_factor", search_factor, 1, 20)):
        if isinstance(value, bool) or not isinstance(value, int) or not lo <= value <= hi:
            raise DesignError(f"{name}: {value!r} is not allowed; give a whole number {lo} … {hi}")
    if isinstance(seed, bool) or not isinstance(seed, int) or seed < 0:
        raise DesignError(f"seed: {seed!r} is not allowed; give a whole number >= 0")
    req = design.requirements
    if req.frequency is None:
        raise DesignError("requirements.frequency: missing; the search needs a target frequency")
    topos = topologies_for(design, topology)
    targets = {topo: _duty_target(design, topo) for topo in topos} if topology != "any" else {}
    if topology == "any":
        for topo in topos:
            try:
                targets[topo] = _duty_target(design, topo)
            except DesignError:
                continue
        if not targets:
            raise DesignError("duty: give a duty target (e.g. --duty 30%) or a range to reach (e.g. --duty 20..90%)")

    def tick(fraction: float, stage: str) -> None:
        if cancel is not None and cancel():
            raise Cancelled("search cancelled")
        if progress is not None:
            progress(min(max(fraction, 0.0), 1.0), stage)

    out = Shortlist()
    out.misses = {}
    out.criterion = req.criterion_text()
    judged: list[tuple[tuple[Any, ...], RankedSet]] = []
    n_topo = len(targets)
    r_tol = eseries.tolerance(design.timing.r_series)
    for i, (topo, duty) in enumerate(targets.items()):
        share = 1.0 / n_topo
        base = i * share

        def search_progress(fraction: float, base: float = base, share: float = share, topo: str = topo) -> None:
            tick(base + 0.4 * share * fraction, f"searching {topo} part sets")

        tick(base, f"searching {topo} part sets")
        found: list[Any] = []
        seen: set[tuple[Any, ...]] = set()
        for target in _search_targets(duty):
            try:
                part = find(topo, frequency=req.frequency, vcc=design.vcc, r_series=design.timing.r_series,
                            c_series=design.timing.c_series, timer=design.timing.timer,
                            frequency_tolerance=req.frequency_tolerance, n_candidates=top * search_factor, n_yield=0,
                            progress=search_progress, progress_after=0.0, **target)
            except DesignError as exc:
                out.misses.setdefault(topo, str(exc))
                continue
            out.searched += part.search_size
            for cand in part:
                key = tuple(sorted((k, v) for k, v in cand.params.items() if k != "wiper"))
                if key not in seen:
                    seen.add(key)
                    found.append(cand)
        if found:
            out.misses.pop(topo, None)
        for k, cand in enumerate(found):
            tick(base + share * (0.4 + 0.6 * k / max(len(found), 1)), f"judging {topo} sets over the tolerances")
            diel = get_dielectric(cand.dielectric)
            timing = replace(design.timing, topology=topo, ra=cand.params["ra"], rb=cand.params["rb"],
                             c=cand.params["c"], pot=cand.params.get("pot"), wiper=cand.params.get("wiper"),
                             c_dielectric=_dielectric_key(diel.name), c_tolerance=diel.tolerance, r_tolerance=r_tol)
            try:
                d = design.replace(timing=timing)
                spread = requirement_spread(d, timing_kwargs(d), n=n_yield, seed=seed)
                dis = _discharge_current(d)
            except DesignError as exc:  # e.g. the ambient range is outside the dielectric's rating
                out.misses.setdefault(topo, f"a set was left out: {exc}")
                continue
            why = _why(spread, req.criterion, req.min_yield)
            joint = spread.yield_
            ranked = RankedSet(rank=0, design=d, candidate=cand, spread=spread, meets=not why, why=why,
                               yield_=joint, discharge_current=dis, part_count=cand.part_count,
                               bom_lines=cand.bom_lines)
            key = (not ranked.meets, -round(joint, 4), cand.part_count, cand.bom_lines, abs(cand.frequency_error))
            judged.append((key, ranked))
    judged.sort(key=lambda kr: kr[0])
    for rank, (_k, ranked) in enumerate(judged[:top], 1):
        out.append(replace(ranked, rank=rank))
    out.found = any(r.meets for r in out)
    out.elapsed = time.perf_counter() - t0
    tick(1.0, "done")
    return out

