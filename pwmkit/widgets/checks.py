"""Findings panel (design-rule checks with severities and remedies) and the cautions box."""

from __future__ import annotations

from typing import Any

import ipywidgets as w

from ..design import Design
from ..origins import origin_text
from ._base import Panel, esc, safe_callback
from .session import DesignSession, as_session

__all__ = ["FindingsPanel", "CautionsBox", "findings_html", "cautions_html"]

_ORDER = {"fail": 0, "warn": 1, "ok": 2}


def _number(x: Any, unit: str) -> str:
    """A finding's value or bound with the one screen rule of :mod:`pwmkit.numstyle`."""
    from ..numstyle import screen

    if x is None:
        return ""
    if unit == "points":
        return screen(float(x) / 100.0, "points")
    if unit in ("", "1"):
        return screen(x, "ratio")
    if unit in ("%", "°C", "K", "rpm"):
        return screen(x, unit)
    return screen(x, unit)


def findings_html(findings: Any, *, show_ok: bool = True) -> str:
    """Cards for the findings, worst first; severity as colour bar + symbol + word.

    Each card names what the value is compared with in the glossary's words ("limit" only for a
    part's limit; "target", "minimum", "maximum" otherwise) and the check's source.
    """
    from .. import glossary as g
    from ..checks.findings import severity_style

    items = sorted(findings, key=lambda f: _ORDER.get(f.severity, 3))
    counts = {s: sum(1 for f in items if f.severity == s) for s in ("fail", "warn", "ok", "not-run")}
    summary = " · ".join(
        f"<span class='pwmkit-count-{s}'>{severity_style(s)[1]} {esc(g.severity_count(s, n))}</span>"
        for s, n in counts.items()
    )
    cards = []
    for f in items:
        if f.severity == "ok" and not show_ok:
            continue  # "not run" entries are always listed
        colour, symbol, word = severity_style(f.severity)
        value = _number(f.value, f.unit)
        bound = _number(f.limit, f.unit)
        numbers = f"{esc(value)}" + (f" <span style='color:#5a6270'>({esc(g.bound_word(f.id))} {esc(bound)})</span>"
                                     if bound else "")
        remedy = (f"<div class='pwmkit-remedy'><b>What to change:</b> {esc(f.remedy)}</div>"
                  if f.remedy and f.severity != "ok" else "")
        cards.append(
            f"<div class='pwmkit-finding pwmkit-sev-{esc(f.severity)}' data-id='{esc(f.id)}' "
            f"style='border-left:6px solid {colour};padding:4px 8px;margin:4px 0;background:#fbfbfa'>"
            f"<div style='display:flex;flex-wrap:wrap;gap:0 12px;align-items:baseline'>"
            f"<b style='min-width:6.5em'>{symbol} {esc(word).upper()}</b> "
            f"<b style='flex:1 1 auto'>{esc(f.title)}</b>"
            f"<span class='pwmkit-q' style='white-space:nowrap'>{numbers}</span></div>"
            f"<div>{esc(f.explanation)}</div>{remedy}"
            f"<div style='font-size:11px;color:#5a6270'>{esc(g.SOURCE)}: {esc(origin_text(f.origin))} · "
            f"rule <code style='font-size:11px'>{esc(f.id)}</code></div></div>"
        )
    if not cards:
        cards.append("<div style='color:#5a6270'>No warnings and no failures.</div>")
    return (f"<div class='pwmkit-findings'><div class='pwmkit-findings-summary' style='margin:2px 0 6px 0'>"
            f"{summary}</div>{''.join(cards)}</div>")


def cautions_html(cautions: Any, *, collapsed: bool = False) -> str:
    """The safety cautions as a bordered box (empty text when there are none).

    The titles of all cautions always show; with ``collapsed`` their texts open on a click.
    """
    items = list(cautions or ())
    if not items:
        return ""
    lis = "".join(f"<li data-id='{esc(c.id)}'><b>{esc(c.title)}.</b> {esc(c.text)}</li>" for c in items)
    titles = " · ".join(esc(c.title) for c in items)
    return ("<div class='pwmkit-cautions' role='note' style='border:1px solid #E69F00;border-left:6px solid "
            "#E69F00;padding:4px 10px;background:#fffaf0;font-size:12px'>"
            f"<details{'' if collapsed else ' open'}><summary style='cursor:pointer'><b>⚠ Cautions</b> — "
            f"{titles}</summary>"
            f"<ul style='margin:2px 0 2px 16px;padding:0'>{lis}</ul></details></div>")


class CautionsBox(w.HTML):
    """The cautions of the session's current evaluation; follows the session.

    Once per view: the first box made for a session shows the cautions; later boxes on the same
    session (panels put side by side) stay empty, so the cautions never appear twice.
    ``collapsed`` shows only the caution titles until clicked.
    """

    def __init__(self, session: DesignSession, *, collapsed: bool = False) -> None:
        super().__init__()
        self.add_class("pwmkit-cautions-box")
        self.collapsed = collapsed
        self.session = session
        self.shown = not getattr(session, "_cautions_shown", False)
        session._cautions_shown = True  # type: ignore[attr-defined]
        if not self.shown:
            self.layout.display = "none"
            return
        session.subscribe(self.refresh)
        self.refresh(session.evaluation)

    def refresh(self, evaluation: Any) -> None:
        try:
            self.value = cautions_html(getattr(evaluation, "cautions", ()), collapsed=self.collapsed)
        except Exception:  # a display helper must never raise into a callback
            from ._base import log

            log.exception("pwmkit: cautions box failed")


class FindingsPanel(Panel):
    """Design-rule findings of the current design, worst first, with remedies.

    A checkbox hides the rules that passed.
    """

    title = "Design checks"
    css_name = "findings"

    def __init__(self, design: Design | DesignSession) -> None:
        super().__init__()
        self.session = as_session(design)
        self.show_ok = w.Checkbox(value=False, description="also list the checks that passed", indent=False)
        self.html = w.HTML()
        self.set_body([self.show_ok, self.html])
        self.show_ok.observe(lambda _change: self.refresh(self.session.evaluation), names="value")
        self.session.subscribe(self.follow)
        self.session.subscribe_spread(self.follow)
        self.refresh(self.session.evaluation)

    @safe_callback
    def refresh(self, evaluation: Any) -> None:
        # the checks the record shows: with the spread run when it is current, else "not run" entries
        self.html.value = findings_html(self.session.findings, show_ok=self.show_ok.value)
        self.clear_message()
