""""As designed vs as built" as HTML: the readings, their verdicts and the fitted parts (presentation layer).

Used by the HTML report (:mod:`pwmkit.record.report`) and the dashboard's as-built panel
(:mod:`pwmkit.widgets.bench`). Every number comes from :func:`pwmkit.bench.reconcile_design`.
"""

from __future__ import annotations

import html
from typing import Any

__all__ = ["as_built_html", "readings_rows", "parts_rows", "other_rows"]


def _e(text: Any) -> str:
    return html.escape(str(text), quote=True)


def _fv(x: Any, unit: str, digits: int = 4) -> str:
    from ..values import format_value

    try:
        return format_value(float(x), unit, digits)
    except Exception:  # noqa: BLE001 - a display helper never fails on a number
        return "—"


def readings_rows(rec: Any) -> list[tuple[str, ...]]:
    """(reading, conditions, quantity, measured, predicted spread, percentile, verdict) rows."""
    rows = []
    for r in rec.readings:
        cond = []
        if r.vcc is not None:
            cond.append(f"{r.vcc:.4g} V")
        if r.t_ambient_c is not None:
            cond.append(f"{r.t_ambient_c:.3g} °C")
        if r.wiper is not None:
            cond.append(f"wiper {100 * r.wiper:.3g} %")
        label = r.label
        for key, x, unit in (("frequency", r.frequency, "Hz"), ("duty", r.duty, "1")):
            if x is None:
                continue
            lo, hi = r.band[key]
            if unit == "Hz":
                meas, band = _fv(x, "Hz", 5), f"{_fv(lo, 'Hz', 4)} … {_fv(hi, 'Hz', 4)}"
            else:
                meas, band = f"{100 * x:.4g} %", f"{100 * lo:.4g} … {100 * hi:.4g} %"
            rows.append((label, ", ".join(cond) or "design ranges", key, meas, band, f"{r.percentile[key]:.3g} %",
                         "inside" if r.inside else "OUTSIDE"))
    return rows


def parts_rows(rec: Any) -> list[tuple[str, ...]]:
    """(part, as designed, most likely as built, change, ± posterior, resolved) rows."""
    from ..bench.reconciliation import PART_NAMES

    units = {"ra": "Ω", "rb": "Ω", "c": "F", "pot": "Ω", "vd": "V"}
    rows = []
    for key in ("c", "ra", "rb", "pot", "vd", "timer"):
        if key not in rec.estimates:
            continue
        est, nom, unc = rec.estimates[key], rec.nominal[key], rec.uncertainty[key]
        if key == "timer":
            a, b, ch, u = "0 %", f"{100 * est:+.3g} %", f"{100 * est:+.3g} pt", f"± {100 * unc:.2g} %"
        else:
            a, b = _fv(nom, units[key], 4), _fv(est, units[key], 4)
            ch, u = f"{100 * (est / nom - 1):+.3g} %", f"± {_fv(unc, units[key], 2)}"
        rows.append((PART_NAMES[key], a, b, ch, u, "yes" if rec.resolved(key) else "no"))
    return rows


def _design_figure(quantity: str, evaluation: Any) -> tuple[str, str]:
    """(the design's figure for a measured quantity, what it is) from an evaluation, or ("—", "")."""
    if evaluation is None:
        return "—", ""
    if quantity == "i_load":
        if evaluation.motor is not None:
            return _fv(evaluation.motor.i_mean, "A", 3), "mean motor current at the nominal supply and wiper"
        if evaluation.led is not None:
            return _fv(evaluation.led.i_avg_total, "A", 3), "mean LED current at the nominal supply"
    if quantity == "t_mosfet_c" and evaluation.mosfet is not None and not evaluation.mosfet.runaway:
        return (f"{float(evaluation.mosfet.tj_c):.3g} °C", f"junction at the hottest ambient "
                f"{evaluation.conditions.t_thermal_c:g} °C (the case runs cooler)")
    if quantity == "v_high":
        return _fv(evaluation.timer_output.v_high, "V", 3), "timer output-high level, no load, nominal supply"
    return "—", ""


def other_rows(design: Any, evaluation: Any = None) -> list[tuple[str, ...]]:
    """(reading, quantity, measured, the design's figure, what that figure is) for the readings other
    than frequency and duty."""
    from ..bench.readings import QUANTITIES

    rows = []
    for i, r in enumerate(design.bench):
        for m in r.measured:
            if m.quantity in ("frequency", "duty"):
                continue
            unit = QUANTITIES[m.quantity][0]
            shown = f"{m.value:.3g} °C" if unit == "°C" else _fv(m.value, unit, 4)
            if m.uncertainty:
                shown += f" ± {m.uncertainty:.2g} °C" if unit == "°C" else f" ± {_fv(m.uncertainty, unit, 2)}"
            fig, what = _design_figure(m.quantity, evaluation)
            rows.append((f"bench[{i}]" + (f" {r.date}" if r.date else ""), QUANTITIES[m.quantity][1], shown, fig, what))
    return rows


def _table(head: tuple[str, ...], rows: list[tuple[str, ...]]) -> str:
    h = "".join(f"<th>{_e(x)}</th>" for x in head)
    body = "".join("<tr>" + "".join(f"<td>{_e(c)}</td>" for c in r) + "</tr>" for r in rows)
    return f"<table class='pwmkit-asbuilt'><tr>{h}</tr>{body}</table>"


def as_built_html(design: Any, rec: Any, evaluation: Any = None) -> str:
    """The as-built comparison of a design with bench readings as an HTML fragment.

    ``rec`` is :func:`pwmkit.bench.reconcile_design` of ``design`` (None when it holds no
    frequency or duty reading); ``evaluation`` (optional) gives the design's figures for the other
    readings (load current, MOSFET temperature, output level).
    """
    others = other_rows(design, evaluation)
    other_html = ("<h3>Other readings</h3>" + _table(("reading", "quantity", "measured", "design", "design figure"),
                                                     others)) if others else ""
    if rec is None and others:
        return other_html
    if rec is None:
        n = len(getattr(design, "bench", ()))
        return (f"<p class='note'>{n} bench reading(s), none with a frequency or duty to compare.</p>" if n else
                "<p class='note'>No bench readings yet: add a scope capture with <code>pwmkit bench add "
                "DESIGN.toml CAPTURE.csv</code> or <code>[[bench]]</code> entries in the design file.</p>")
    colour = "#009E73" if rec.inside else "#D55E00"
    verdict = ("every reading lies inside the predicted spread" if rec.inside else
               f"{sum(not r.inside for r in rec.readings)} of {len(rec.readings)} reading(s) lie OUTSIDE the "
               "predicted spread")
    head = (f"<p style='border-left:6px solid {colour};padding-left:8px'><b>{'✓' if rec.inside else '✗'} "
            f"{_e(verdict)}.</b> Closest explanation: {_e(rec.closest.text())}.</p>")
    readings = _table(("reading", "conditions", "quantity", "measured", "predicted 0.135 … 99.865 %",
                       "percentile", "verdict"), readings_rows(rec))
    parts = _table(("part", "as designed", "most likely as built", "change", "± (posterior)",
                    "resolved by the readings"), parts_rows(rec))
    notes = []
    for i, r in enumerate(design.bench):
        bits = [x for x in (r.date, r.source, r.note) if x]
        if bits:
            notes.append(f"<li>reading {i}: {_e(' — '.join(bits))}</li>")
    extra = (f"<details><summary>where the readings come from</summary><ul>{''.join(notes)}</ul></details>"
             if notes else "")
    return (head + readings + "<h3>Most likely part values given the readings</h3>" + parts + other_html
            + "<p class='note'>Maximum a-posteriori fit with the parts' tolerances as priors; “not resolved” means "
              "the readings do not narrow that part much beyond its tolerance (e.g. a capacitor and a pot track "
              "scale the period together).</p>" + extra)
