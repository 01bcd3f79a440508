"""Design rule of the built driver: do the bench readings match the design?

Applies to designs that hold bench readings (``[[bench]]`` in the design file) with a frequency
or a duty, when the tolerance analysis is run (not in quick mode). The comparison itself is
:func:`pwmkit.bench.reconcile_design`; this rule only turns its verdict into a finding.
"""

from __future__ import annotations

from typing import Any

from ._common import finding, fmt, registry

__all__ = ["RULES"]

RULES, _rule = registry()


@_rule("bench.match")
def bench_match(design: Any, ev: Any) -> Any:
    """Bench readings lie inside the spread the design predicts at their conditions.

    Each reading's frequency and duty are placed in the Monte Carlo distribution of the design at
    the reading's supply, ambient and wiper (:func:`pwmkit.bench.reconcile`). Ok when every
    reading's stated uncertainty interval meets the 0.135 … 99.865 % band (the ±3σ equivalent);
    fail otherwise, naming the part that alone explains the readings with the smallest move
    relative to its tolerance. Value: the percentile of the reading furthest from the median;
    limit: the band edge on its side. Warn when the comparison cannot run (e.g. a reading's supply
    at which the design does not oscillate). Origin: common-practice (three-sigma coverage).
    """
    if not getattr(design, "bench", ()) or ev.spread is None:
        return None
    from ..bench import reconcile_design
    from ..errors import DesignError

    title = "Bench readings inside the predicted spread"
    try:
        rec = reconcile_design(design, n=max(int(ev.spread.n), 1000), seed=int(ev.spread.seed or 0))
    except DesignError as exc:
        return finding("bench.match", "warn", title, None, None, "%", f"The readings could not be compared: {exc}",
                       "Check the readings' conditions (supply, wiper) in the [[bench]] entries.", "common-practice")
    if rec is None:
        return None
    far = max(rec.percentile.values(), key=lambda p: abs(p - 50.0))
    limit = 99.865 if far >= 50.0 else 0.135
    parts = []
    for r in rec.readings:
        got = []
        if r.frequency is not None:
            lo, hi = r.band["frequency"]
            got.append(f"frequency {fmt(r.frequency, 'Hz', 5)} at the {r.percentile['frequency']:.3g} % point of "
                       f"{fmt(lo, 'Hz', 4)} … {fmt(hi, 'Hz', 4)}")
        if r.duty is not None:
            lo, hi = r.band["duty"]
            got.append(f"duty {100 * r.duty:.4g} % at the {r.percentile['duty']:.3g} % point of "
                       f"{100 * lo:.4g} … {100 * hi:.4g} %")
        parts.append(f"{r.label} {'inside' if r.inside else 'OUTSIDE'}: " + ", ".join(got))
    readings = "; ".join(parts)
    if rec.inside:
        return finding("bench.match", "ok", title, far, limit, "%",
                       f"{readings}. Most likely difference: {rec.closest.text()}.", "", "common-practice")
    culprit = rec.closest
    return finding("bench.match", "fail", title, far, limit, "%",
                   f"{readings}. Likely culprit: {culprit.text()}.",
                   f"Measure the {culprit.name} out of circuit (and check it is the part the design names); "
                   "if the build is right, correct the design record to the fitted value.", "common-practice")
