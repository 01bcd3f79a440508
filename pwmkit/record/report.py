"""One self-contained HTML review document per design (presentation layer).

:func:`report_html` gathers what a reviewer needs on one page: the requirements, the circuit in
words and as a schematic, the parts with their preferred-value series, the timing (exact against
the textbook 0.693 estimate), interactive plots (capacitor waveform with thresholds and the load
current, pot travel, Monte Carlo histograms, MOSFET losses), the spread summary, the bench readings
against the design ("as designed vs as built", when the design holds readings), the design-rule findings, the timing
formulas with the design's numbers worked in, and the safety cautions.

The file needs nothing from the network: BokehJS is embedded inline (only the parts the plots
use), formulas are MathML (rendered by the browser) with the LaTeX source and a plain-text
version alongside, the schematic is inline SVG, and the styles are in the page. Every text that
comes from the design file is HTML-escaped.

Colours: a restrained palette of our own on the Okabe–Ito colour-blind-safe set
(:mod:`pwmkit.plots.style`); severities are always written in words as well.
"""

from __future__ import annotations

import html
import os
from pathlib import Path
from typing import Any

from ..design import Design, LedLoad, MotorLoad
from ..errors import DesignError
from ..two_timer_design import circuit_words as _circuit_words

__all__ = ["report_html", "write_report", "finding_value_text"]

_CSS = """
:root { --ink:#1f2328; --muted:#5a6270; --rule:#d9dcd6; --panel:#f6f5f1; --accent:#0072B2;
        --ok:#009E73; --warn:#E69F00; --fail:#D55E00; }
* { box-sizing: border-box; }
body { margin:0; background:#fcfcfa; color:var(--ink);
       font:15px/1.5 'Source Sans 3','Segoe UI',Helvetica,Arial,sans-serif; }
main { max-width:1080px; margin:0 auto; padding:28px 32px 60px; }
header.top { border-bottom:3px double var(--rule); margin-bottom:20px; padding-bottom:10px; }
header.top h1 { font-size:26px; margin:0; letter-spacing:.01em; }
header.top p { margin:4px 0 0; color:var(--muted); }
h2 { font-size:18px; margin:34px 0 10px; padding-left:10px; border-left:4px solid var(--accent); }
h3 { font-size:15px; margin:18px 0 6px; color:var(--muted); letter-spacing:.02em; }
table { border-collapse:collapse; width:100%; margin:6px 0 12px; font-size:14px; }
th, td { text-align:left; padding:5px 8px; border-bottom:1px solid var(--rule); vertical-align:top; }
th { font-weight:600; background:var(--panel); }
td.num, th.num { text-align:right; white-space:nowrap; font-variant-numeric:tabular-nums; }
.verdict { display:flex; gap:14px; flex-wrap:wrap; margin:10px 0 6px; }
.verdict div { background:var(--panel); border:1px solid var(--rule); padding:8px 14px; min-width:150px; }
.verdict b { display:block; font-size:20px; }
.sev { display:inline-block; min-width:6.2em; padding:0 6px; font-weight:600; border-left:6px solid; }
.sev-ok { border-color:var(--ok); } .sev-warn { border-color:var(--warn); } .sev-fail { border-color:var(--fail); }
.plot { margin:8px 0 16px; }
.schematic { background:white; border:1px solid var(--rule); padding:8px; overflow-x:auto; }
.schematic svg { max-width:100%; height:auto; }
pre { background:var(--panel); border:1px solid var(--rule); padding:10px; overflow-x:auto; font-size:12.5px;
      line-height:1.25; }
details { margin:4px 0 12px; } summary { cursor:pointer; color:var(--muted); }
math[display=block] { margin:8px 0; overflow-x:auto; }
.caution { border:1px solid var(--rule); border-left:6px solid var(--warn); background:#fffdf7; padding:8px 12px;
           margin:8px 0; }
.note { color:var(--muted); font-size:13px; }
table.record-header { width:auto; font-size:13px; margin:10px 0 0; }
table.record-header th { background:none; color:var(--muted); font-weight:normal; padding:2px 14px 2px 0; }
table.record-header td { padding:2px 0; } table.record-header td.hash { font-family:ui-monospace,monospace;
  font-size:12px; word-break:break-all; }
.caution-summary { margin:12px 0; }
footer { margin-top:40px; border-top:1px solid var(--rule); padding-top:10px; color:var(--muted); font-size:13px; }
"""


def _e(text: Any) -> str:
    return html.escape(str(text), quote=True)


def _fv(x: Any, unit: str, digits: int = 4) -> str:
    from ..values import format_value

    return format_value(float(x), unit, digits)


def _table(head: tuple[str, ...], rows: list[tuple[Any, ...]], numeric: tuple[int, ...] = (), cls: str = "") -> str:
    th = "".join(f"<th class='num'>{_e(h)}</th>" if i in numeric else f"<th>{_e(h)}</th>" for i, h in enumerate(head))
    body = "".join("<tr>" + "".join(f"<td class='num'>{_e(c)}</td>" if i in numeric else f"<td>{_e(c)}</td>"
                                    for i, c in enumerate(r)) + "</tr>" for r in rows)
    return f"<table class='{cls}'><thead><tr>{th}</tr></thead><tbody>{body}</tbody></table>"


# ------------------------------------------------------------------------------------------------
# sections
# ------------------------------------------------------------------------------------------------
def _requirements(design: Design) -> str:
    r = design.requirements
    rows: list[tuple[str, str]] = []
    if r.frequency is not None:
        rows.append(("PWM frequency", f"{_fv(r.frequency, 'Hz')} ± {100 * r.frequency_tolerance:.3g} %"))
    if r.duty is not None:
        rows.append(("duty", f"{100 * r.duty:.3g} %"))
    if r.duty_min is not None or r.duty_max is not None:
        lo = "—" if r.duty_min is None else f"{100 * r.duty_min:.3g} %"
        hi = "—" if r.duty_max is None else f"{100 * r.duty_max:.3g} %"
        rows.append(("duty range to reach" if design.timing.topology == "pot" else "duty window", f"{lo} … {hi}"))
    if r.flicker is not None:
        rows.append(("flicker (IEEE Std 1789-2015 region)", r.flicker))
    lo, hi = design.supply_range
    rows.append(("timer supply", f"{_fv(design.vcc, 'V')} (range {_fv(lo, 'V')} … {_fv(hi, 'V')})"))
    if design.v_load is not None:
        rows.append(("load supply", _fv(design.v_load, "V")))
    rows.append(("ambient", f"{design.t_ambient_c:g} °C (range {design.t_ambient_min_c:g} … "
                            f"{design.t_ambient_max_c:g} °C)"))
    rows.append(("load", "none" if design.load is None else design.load.kind))
    rows.append(("acceptance criterion", r.criterion_text() + (" — every corner of the tolerance box inside the "
                 "requirement" if r.criterion == "worst-case" else " of the Monte Carlo builds inside the requirement")))
    return _table(("requirement", "value"), rows)


_TOPOLOGY_TEXT = {
    "classic": "The capacitor charges through R1 and R2 in series and discharges through R2 into the timer's "
               "discharge pin, so the output is high for longer than it is low.",
    "bypass": "A diode across R2 lets the capacitor charge through R1 alone and discharge through R2, so high "
              "and low times are set separately (the diode drop is in the charge path).",
    "steered": "Two steering diodes separate the paths: the capacitor charges through R1 and D1 and discharges "
               "through D2 and R2, so high and low times are set separately.",
    "pot": "A potentiometer P1 with its wiper on the discharge pin splits its track between the two paths: the "
           "capacitor charges through R1, the wiper-side part of P1 and D1, and discharges through D2, the other "
           "part of P1 and R2. Turning P1 moves duty while the period stays nearly constant.",
}


def _circuit(design: Design, evaluation: Any) -> str:
    from ..parts.timers import get_timer

    t = design.timing
    fam = get_timer(t.timer)
    if t.topology == "two-timer":
        from .report_two_timer import circuit_text

        parts = circuit_text(design, evaluation)
    else:
        parts = [f"A {fam.description} runs as an astable multivibrator from {_fv(design.vcc, 'V')}. "
                 + _TOPOLOGY_TEXT[t.topology]]
    if t.topology == "two-timer":
        pass
    elif t.vctl is not None:
        parts.append(f"An external {_fv(t.vctl, 'V')} at the control pin sets the upper threshold (the lower "
                     "one is half of it).")
    elif t.r_cv is not None:
        parts.append(f"R3 ({_fv(t.r_cv, 'Ω')}) from the control pin to ground lowers both thresholds to "
                     f"{_fv(evaluation.timing.v_upper, 'V')} and {_fv(evaluation.timing.v_lower, 'V')}.")
    else:
        parts.append("The internal divider sets the thresholds at 2/3 and 1/3 of the supply"
                     + (f"; C2 ({_fv(t.cv_bypass, 'F')}) bypasses the control pin." if t.cv_bypass else "."))
    load = design.load
    if load is not None:
        sw = design.switch
        parts.append(f"The timer output drives a low-side N-channel MOSFET ({sw.mosfet}) through "
                     f"{_fv(sw.r_gate, 'Ω')}.")
    if isinstance(load, LedLoad):
        from ..glossary import plural

        parts.append(f"The load is {plural(load.n_parallel, 'string')} of {load.n_series} {load.colour} LEDs, each string "
                     f"with a {_fv(load.r_series, 'Ω')} series resistor, from {_fv(design.load_supply, 'V')}.")
    elif isinstance(load, MotorLoad):
        clamp = (f" in series with a {_fv(design.freewheel.v_zener, 'V')} Zener clamp"
                 if design.freewheel.clamp == "zener" else "")
        parts.append(f"The load is a brushed DC motor (R {_fv(load.r, 'Ω')}, L {_fv(load.l, 'H')}) from "
                     f"{_fv(design.load_supply, 'V')}, with a freewheel diode ({design.freewheel.diode}){clamp} "
                     "across it.")
    elif load is not None and load.kind == "heater":
        parts.append(f"The load is a resistive heater element ({_fv(load.r_cold, 'Ω')} at {load.t_ref_c:g} °C, "
                     f"temperature coefficient {load.alpha:g} /K) from {_fv(design.load_supply, 'V')}"
                     + (f", with a {load.t_cutout_c:g} °C thermal cut-out in series." if load.t_cutout_c is not None
                        else "; no thermal cut-out is fitted."))
    return "<p>" + " ".join(_e(p) for p in parts) + "</p>"


def _schematic(design: Design, evaluation: Any) -> str:
    try:
        from ..schematic import for_design
    except ImportError:  # pragma: no cover - the schematic package is optional
        return ""
    try:
        svg = for_design(design, timing=evaluation.timing).svg
    except (DesignError, ImportError) as exc:
        return f"<p class='note'>Schematic not drawn: {_e(exc)}</p>"
    start = svg.find("<svg")
    return f"<div class='schematic'>{svg[start:] if start >= 0 else svg}</div>"


def _timing(evaluation: Any) -> str:
    if getattr(evaluation, "two_timer", None) is not None:
        from .report_two_timer import timing_html

        return timing_html(evaluation, _table)
    ex, ideal = evaluation.timing, evaluation.ideal
    rows = []
    from .. import glossary as g
    from ..numstyle import screen

    for label, key, unit in (("t_high (charge)", "t_high", "s"), ("t_low (discharge)", "t_low", "s"),
                             ("period", "period", "s"), ("frequency", "frequency", "Hz")):
        a, b = float(getattr(ex, key)), float(getattr(ideal, key))
        rows.append((label, screen(a, unit), screen(b, unit), screen(a / b - 1, "relative")))
    rows.append(("duty", screen(ex.duty, "duty"), screen(ideal.duty, "duty"),
                 screen(float(ex.duty) - float(ideal.duty), "points")))
    out = _table(("quantity", g.EXACT, g.ESTIMATE, g.DIFFERENCE), rows, numeric=(1, 2, 3))
    out += (f"<p class='note'>{_e(g.EXACT)}: {_e(g.EXACT_NOTE)}. {_e(g.ESTIMATE)}: {_e(g.ESTIMATE_NOTE)}. "
            f"Duty differences are in {_e(g.POINTS_LONG)} ({_e(g.POINTS)}).</p>")
    dl = evaluation.diode_law
    if dl is not None:
        out += (f"<p class='note'>With Shockley-law steering diodes (an independent model) the frequency is "
                f"{_e(_fv(dl.frequency, 'Hz', 5))} and the duty {100 * float(dl.duty):.3f} % "
                f"({100 * float(dl.frequency_error):+.3f} % frequency difference from the constant-drop "
                "closed form).</p>")
    cond = evaluation.conditions
    if cond.vd is not None:
        out += (f"<p class='note'>Closed form with a steering-diode drop of {_e(_fv(cond.vd, 'V'))}, thresholds "
                f"{_e(_fv(ex.v_upper, 'V'))} / {_e(_fv(ex.v_lower, 'V'))}.</p>")
    return out


def _spread(evaluation: Any) -> str:
    sp = evaluation.spread
    if sp is None:
        note = evaluation.conditions.spread_note
        return ("<p class='note'>No tolerance analysis in this report (quick mode)"
                + (f": {_e(note)}" if note else "") + ".</p>")
    import numpy as np

    from .. import glossary as g
    from ..numstyle import screen, screen_range

    q = np.array([0.135, 1.0, 50.0, 99.0, 99.865])
    p = sp.percentile(q)
    rows = [(f"{qq:g} %", screen(f, "Hz"), screen(d, "duty")) for qq, f, d in zip(q, p.frequency, p.duty)]
    out = _table(("percentile", "frequency", "duty"), rows, numeric=(1, 2))
    items = [f"{g.plural(sp.n, 'sample')} (seed {sp.seed})"
             + (f", {g.plural(sp.n_failed, 'sample')} do not oscillate" if sp.n_failed else ""),
             f"frequency {screen(sp.frequency_mean, 'Hz')} ± {screen(sp.frequency_std, 'Hz', 3)} (mean ± σ)",
             f"duty {screen(sp.duty_mean, 'duty')} ± {screen(sp.duty_std, 'points').lstrip('+')} (mean ± σ)"]
    if sp.yield_ is not None:
        items.append(f"yield inside the requirement window: {screen(sp.yield_, 'duty')}")
    wc = evaluation.worst_case
    if wc is not None:
        cond = evaluation.conditions
        items.append(f"worst case over the tolerances, {screen_range(cond.vcc_min, cond.vcc_max, 'V')} supply and "
                     f"{screen_range(evaluation.design.t_ambient_min_c, evaluation.design.t_ambient_max_c, '°C')} "
                     f"ambient: frequency {screen_range(wc.frequency_min, wc.frequency_max, 'Hz')}, "
                     f"duty {screen_range(wc.duty_min, wc.duty_max, 'duty')}")
    if sp.sources:
        items.append("spread sources: " + "; ".join(sp.sources))
    if evaluation.conditions.spread_note:
        items.append(evaluation.conditions.spread_note)
    return out + "<ul>" + "".join(f"<li>{_e(i)}</li>" for i in items) + "</ul>"


def finding_value_text(x: float | None, unit: str) -> str:
    """A finding's value or bound as text by the screen rule of :mod:`pwmkit.numstyle`; "—" for None."""
    from ..numstyle import screen

    if x is None:
        return "—"
    if unit == "points":
        return screen(float(x) / 100.0, "points")
    if unit in ("", "1"):
        return screen(x, "ratio")
    return screen(x, unit)


def _findings(evaluation: Any) -> str:
    from .. import glossary as g
    from ..checks import severity_style
    from ..origins import origin_text

    fs = evaluation.findings
    order = {"fail": 0, "warn": 1, "ok": 2}
    rows = []
    for f in sorted(fs, key=lambda f: order.get(f.severity, 3)):
        _, symbol, word = severity_style(f.severity)
        remedy = f"<br><em>Remedy:</em> {_e(f.remedy)}" if f.remedy and f.severity != "ok" else ""
        bound = "—" if f.limit is None else f"{g.bound_word(f.id)} {finding_value_text(f.limit, f.unit)}"
        rows.append(f"<tr><td><span class='sev sev-{_e(f.severity)}'>{_e(symbol)} {_e(word)}</span></td>"
                    f"<td><b>{_e(f.title)}</b><br><code>{_e(f.id)}</code></td><td class='num'>{_e(finding_value_text(f.value, f.unit))}</td>"
                    f"<td class='num'>{_e(bound)}</td><td>{_e(f.explanation)}{remedy}"
                    f"<br><span class='note'>{_e(g.SOURCE)}: {_e(origin_text(f.origin))}</span></td></tr>")
    head = ("<tr><th>severity</th><th>rule</th><th class='num'>value</th><th class='num'>compared with</th>"
            "<th>finding</th></tr>")
    return f"<table class='findings'><thead>{head}</thead><tbody>{''.join(rows)}</tbody></table>"


def _formulas(design: Design) -> str:
    from .formulas import design_variant, formula, worked

    if design.timing.topology == "two-timer":
        from .report_two_timer import formulas_html

        return formulas_html(design)
    discharge, control, _ = design_variant(design)
    topo = design.timing.topology
    out = []
    for q, title in (("t_high", "Output-high time"), ("t_low", "Output-low time")):
        out.append(f"<h3>{_e(title)}</h3>")
        out.append(formula(topo, q, fmt="mathml", discharge=discharge, control=control))
        out.append(f"<pre>{_e(worked(design, q, 'unicode'))}</pre>")
        latex = formula(topo, q, fmt="latex", discharge=discharge, control=control)
        out.append(f"<details><summary>LaTeX source</summary><pre>{_e(latex)}</pre></details>")
    out.append("<h3>Period, frequency, duty</h3>")
    out.append("<pre>" + "\n\n".join(_e(worked(design, q, "unicode")) for q in ("period", "frequency", "duty"))
               + "</pre>")
    from .formulas import symbol_table

    out.append(f"<details><summary>symbols</summary><pre>{_e(symbol_table('unicode'))}</pre></details>")
    return "".join(out)


def _heater_section(evaluation: Any) -> list[tuple[str, str, str]]:
    if getattr(evaluation, "heater", None) is None:
        return []
    from .report_two_timer import heater_html

    return [("heater", "Heater element and temperature", heater_html(evaluation, _table))]


def _cautions(evaluation: Any) -> str:
    return "".join(f"<div class='caution'><b>{_e(c.title)}.</b> {_e(c.text)}</div>" for c in evaluation.cautions)


def _as_built(design: Design, evaluation: Any, divs: dict[str, str]) -> str:
    """Bench readings against the design (:mod:`pwmkit.record.asbuilt`) and their plots."""
    from .asbuilt import as_built_html
    from .report_plots import as_built_reconciliation

    try:
        rec = as_built_reconciliation(evaluation)
    except DesignError as exc:
        return f"<p class='note'>The bench readings could not be compared with the design: {_e(exc)}</p>"
    return as_built_html(design, rec, evaluation) + (
        f"<div class='plot'>{divs['as-built']}</div>" if "as-built" in divs else "")


def _plots(evaluation: Any) -> tuple[str, dict[str, str]]:
    """(script and BokehJS to put in <head>, div per figure key)."""
    from bokeh.embed import components
    from bokeh.embed.bundle import bundle_for_objs_and_resources
    from bokeh.resources import INLINE

    from .report_plots import report_figures

    figs = report_figures(evaluation)
    if not figs:  # pragma: no cover - the waveform is always there
        return "", {}
    script, divs = components(figs)
    bundle = bundle_for_objs_and_resources(list(figs.values()), INLINE)
    if bundle.js_files or bundle.css_files:  # pragma: no cover - INLINE resources never link out
        raise RuntimeError("bokeh resources would load files from the network")
    return "".join(bundle) + script, dict(divs)


# ------------------------------------------------------------------------------------------------
# public API
# ------------------------------------------------------------------------------------------------
def _record_header(design: Design, source_name: str | None, source_bytes: bytes | None, date: str | None) -> str:
    """The review header: design, source file and its content hash, date, pwmkit version, revision note."""
    import datetime
    import hashlib

    import pwmkit

    if date is None:
        date = datetime.datetime.now(datetime.timezone.utc).strftime("%Y-%m-%d %H:%M UTC")
    digest = hashlib.sha256(source_bytes).hexdigest() if source_bytes is not None else None
    rows = [("design", design.name),
            ("source file", source_name or "— (built in Python, no design file)"),
            ("content hash (SHA-256)", digest or "—"),
            ("date", date),
            ("pwmkit version", pwmkit.__version__),
            ("revision note", design.revision or "— (none in the design file: add design.revision)")]
    body = "".join(f"<tr><th>{_e(k)}</th><td class='{'hash' if 'hash' in k else ''}'>{_e(v)}</td></tr>"
                   for k, v in rows)
    return f"<table class='record-header'><tbody>{body}</tbody></table>"


def _cautions_summary(evaluation: Any) -> str:
    items = list(evaluation.cautions)
    if not items:
        return ""
    titles = " · ".join(_e(c.title) for c in items)
    return (f"<div class='caution caution-summary'><b>⚠ Cautions</b> — {titles}. "
            "<a href='#cautions'>Full texts at the end.</a></div>")


def report_html(design: Design, evaluation: Any = None, *, source_name: str | None = None,
                source_bytes: bytes | None = None, date: str | None = None) -> str:
    """The design's review document as one self-contained HTML page.

    Parameters
    ----------
    design : Design
    evaluation : pwmkit.evaluate.Evaluation, optional
        Its evaluation; computed with the full tolerance analysis when not given.
    source_name : str, optional
        Name of the design file the design was read from (shown in the header).
    source_bytes : bytes, optional
        The design file's content; its SHA-256 hash is shown in the header.
    date : str, optional
        Date text for the header (default: now, UTC).

    Returns
    -------
    str
        A complete HTML document (UTF-8) with inline BokehJS, styles, SVG and MathML; it loads
        nothing from the network.
    """
    if not isinstance(design, Design):
        raise DesignError(f"design: expected a pwmkit.design.Design, got {type(design).__name__}")
    if evaluation is None:
        from ..evaluate import evaluate

        evaluation = evaluate(design)
    elif getattr(evaluation, "design", design) != design:
        raise DesignError("evaluation: it belongs to another design; evaluate this design or leave it out")
    import pwmkit

    from .bom import bom_rows

    head_js, divs = _plots(evaluation)
    fs = evaluation.findings
    tm = evaluation.timing
    name = _e(design.name)
    from .. import glossary as g
    from ..numstyle import screen

    verdict = (f"<div class='verdict'><div>frequency<b>{_e(screen(tm.frequency, 'Hz'))}</b></div>"
               f"<div>duty<b>{_e(screen(tm.duty, 'duty'))}</b></div>"
               f"<div>checks<b>{_e(g.severity_count('fail', fs.fail_count))} · "
               f"{_e(g.severity_count('warn', fs.warn_count))} · {_e(g.severity_count('ok', fs.ok_count))}</b></div></div>")
    bom = _table(("ref", "qty", "part", "value", "series", "tolerance", "notes"),
                 [r.as_tuple() for r in bom_rows(design, evaluation)], numeric=(1,))
    sections = [
        ("summary", "Summary", verdict + _cautions_summary(evaluation)
         + (f"<p>{_e(design.notes)}</p>" if design.notes else "")),
        ("requirements", "Requirements", _requirements(design)),
        ("circuit", "Circuit", _circuit(design, evaluation) + _schematic(design, evaluation)),
        ("parts", "Parts and preferred-value series", bom
         + "<p class='note'>Preferred values after IEC 60063; tolerances as given in the design.</p>"),
        ("timing", "Timing", _timing(evaluation)
         + f"<div class='plot'>{divs.get('waveform', '')}</div>"
         + (f"<h3>Pot travel</h3><div class='plot'>{divs['pot']}</div>" if "pot" in divs else "")
         + (f"<h3>MOSFET losses</h3><div class='plot'>{divs['losses']}</div>" if "losses" in divs else "")),
        *_heater_section(evaluation),
        ("spread", "Spread over tolerances, temperature and supply", _spread(evaluation)
         + (f"<div class='plot'>{divs['spread']}</div>" if "spread" in divs else "")),
        *([("as-built", "As designed vs as built", _as_built(design, evaluation, divs))] if design.bench else []),
        ("findings", "Design-rule checks", _findings(evaluation)),
        ("formulas", "Timing formulas with this design's numbers", _formulas(design)),
        ("cautions", "Cautions", _cautions(evaluation)),
    ]
    from .report_crosscheck import crosscheck_section

    crosscheck = crosscheck_section(design)  # only where ngspice is installed
    if crosscheck is not None:
        sections.insert(-1, ("crosscheck", "Cross-check with a circuit simulation (ngspice)", crosscheck))
    body = "".join(f"<section id='{sid}'><h2>{_e(title)}</h2>{content}</section>" for sid, title, content in sections)
    return (
        "<!DOCTYPE html>\n<html lang='en'><head><meta charset='utf-8'>"
        "<meta name='viewport' content='width=device-width, initial-scale=1'>"
        f"<meta name='generator' content='pwmkit {_e(pwmkit.__version__)}'>"
        f"<title>pwmkit design record — {name}</title><style>{_CSS}</style>{head_js}</head>"
        f"<body><main><header class='top'><h1>Design record — {name}</h1>"
        f"<p>{_e(_circuit_words(design.timing.topology))}, {_e(g.timer_label(design.timing.timer))} timer"
        f"{', ' + _e(g.load_label(design.load.kind)) + ' load' if design.load is not None else ''}. "
        "Every figure below is computed by pwmkit's models from the design file.</p>"
        f"{_record_header(design, source_name, source_bytes, date)}</header>"
        f"{body}<footer>Generated by pwmkit {_e(pwmkit.__version__)}. Model results for review: verify every design "
        "on the bench and follow the part makers' data sheets, local codes and licensed practice.</footer>"
        "</main></body></html>\n"
    )


def write_report(design: Design, path: str | os.PathLike[str], *, evaluation: Any = None, force: bool = False,
                 source: str | os.PathLike[str] | None = None) -> Path:
    """Write :func:`report_html` to ``path`` atomically (refuses to replace a file unless ``force``).

    ``source`` is the design file the design was read from: its name and content hash go into the
    report header.

    Returns
    -------
    pathlib.Path
        The file written.
    """
    from .files import atomic_write

    p = Path(path)
    if p.exists() and not force:
        raise DesignError(f"{p}: already exists; use --force (force=True) to replace it")
    name = data = None
    if source is not None:
        src = Path(source)
        name, data = src.name, src.read_bytes()
    return atomic_write(p, report_html(design, evaluation, source_name=name, source_bytes=data), force=force)
