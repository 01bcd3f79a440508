"""Requirements panel, parts-choice panel and the requirement band under the timing readout.

- :class:`RequirementsPanel` — frequency and its window, the duty range to reach (or duty window),
  the acceptance criterion and minimum yield, the supply range, the ambient range, the flicker
  region wanted;
- :class:`PartsPanel` — the controls of the timing parts that the timing panel has not: capacitor
  dielectric and tolerance, resistor tolerance and series, capacitor series, pot tolerance;
- :class:`RequirementBand` — the required frequency window and duty drawn as bars with the
  design's nominal point (and, once the tolerance analysis ran, its worst-case span).

Text fields take engineering text ("6k", "11.4", "5 %") and apply on Enter; a value the design
objects refuse shows its reason in the panel and the last good design stays.
"""

from __future__ import annotations

import dataclasses
from typing import Any

import ipywidgets as w

from ..errors import DesignError
from ._base import Panel, esc, fmt, fmt_pct, safe_callback
from .session import DesignSession

__all__ = ["RequirementsPanel", "PartsPanel", "RequirementBand", "requirement_band_html"]


def _text(value: str, label: str, css: str, width: str = "250px") -> w.Text:
    t = w.Text(value=value, description=label, continuous_update=False, layout=w.Layout(width=width),
               style={"description_width": "130px"})
    t.add_class("pwmkit-req-field")
    t.add_class(f"pwmkit-req-{css}")
    return t


def _pct_text(x: Any) -> str:
    return "" if x is None else f"{100 * float(x):.6g} %"


def _read(text: str, field: str, *, percent: bool = False, optional: bool = False) -> float | None:
    from ..values import parse_value

    t = text.strip()
    if not t:
        if optional:
            return None
        raise DesignError(f"{field}: a value is required")
    from ..record.designfile import UNITS

    unit = "" if percent else UNITS.get(field, "")  # the field's own unit: "10 kF" for a frequency is refused
    try:
        if t.endswith("%"):
            return float(parse_value(t[:-1].strip(), "", name=field)) / 100.0
        v = float(parse_value(t, unit, name=field))
    except DesignError as exc:
        msg = str(exc)
        raise DesignError(msg if msg.startswith(field) else f"{field}: {msg}") from None
    return v / 100.0 if percent and v > 1.0 else v


class RequirementsPanel(Panel):
    """Edit what the driver must achieve (see the module docstring).

    Attributes
    ----------
    fields : dict of ipywidgets.Text — "frequency", "tolerance", "duty_min", "duty_max", "min_yield",
        "vcc_min", "vcc_max", "t_min", "t_max"
    criterion, flicker : ipywidgets.Dropdown
    """

    title = "Requirements"
    css_name = "requirements"
    message_lead = "Not applied"

    def __init__(self, session: DesignSession) -> None:
        super().__init__()
        self.session = session
        self._syncing = False
        self.fields = {
            "frequency": _text("", "frequency", "frequency"),
            "tolerance": _text("", "window ±", "tolerance"),
            "duty_min": _text("", "duty from", "duty-min"),
            "duty_max": _text("", "duty to", "duty-max"),
            "min_yield": _text("", "minimum yield", "min-yield"),
            "vcc_min": _text("", "supply from [V]", "vcc-min"),
            "vcc_max": _text("", "supply to [V]", "vcc-max"),
            "t_min": _text("", "ambient from [°C]", "t-min"),
            "t_max": _text("", "ambient to [°C]", "t-max"),
        }
        self.criterion = w.Dropdown(options=(("worst case (every corner)", "worst-case"),
                                             ("yield (Monte Carlo)", "yield")), description="criterion",
                                    layout=w.Layout(width="330px"), style={"description_width": "130px"})
        self.criterion.add_class("pwmkit-req-criterion")
        self.flicker = w.Dropdown(options=(("—", None), ("no observable effect", "no-effect"),
                                           ("low risk", "low-risk")), description="flicker (LED)",
                                  layout=w.Layout(width="330px"), style={"description_width": "130px"})
        for f in self.fields.values():
            f.observe(self._on_change, names="value")
        self.criterion.observe(self._on_change, names="value")
        self.flicker.observe(self._on_change, names="value")
        f = self.fields
        self.set_body([
            w.HTML("<div style='font-size:12px;color:#5a6270'>The window and duty hold over the supply and ambient "
                   "ranges by the criterion; the duty range is what the pot must reach (pot topology) or the window "
                   "a fixed duty must stay in.</div>"),
            w.HBox([f["frequency"], f["tolerance"]]), w.HBox([f["duty_min"], f["duty_max"]]),
            w.HBox([self.criterion, f["min_yield"]]), w.HBox([f["vcc_min"], f["vcc_max"]]),
            w.HBox([f["t_min"], f["t_max"]]), self.flicker,
        ])
        session.subscribe(self.refresh)
        self.refresh(session.evaluation)

    @safe_callback
    def refresh(self, _evaluation: Any) -> None:
        d = self.session.design
        r = d.requirements
        lo, hi = d.supply_range
        values = {
            "frequency": "" if r.frequency is None else fmt(r.frequency, "Hz", 6),
            "tolerance": _pct_text(r.frequency_tolerance),
            "duty_min": _pct_text(r.duty_min if r.duty_min is not None else r.duty),
            "duty_max": _pct_text(r.duty_max if r.duty_max is not None else r.duty),
            "min_yield": _pct_text(r.min_yield), "vcc_min": f"{lo:g}", "vcc_max": f"{hi:g}",
            "t_min": f"{d.t_ambient_min_c:g}", "t_max": f"{d.t_ambient_max_c:g}",
        }
        self._syncing = True
        try:
            with self.hold_sync():
                for k, v in values.items():
                    self.fields[k].value = v
                self.criterion.value = r.criterion
                self.flicker.value = r.flicker
                self.fields["min_yield"].disabled = r.criterion != "yield"
        finally:
            self._syncing = False

    def _build(self, design: Any) -> Any:
        f = self.fields
        freq = _read(f["frequency"].value, "requirements.frequency", optional=True)
        tol = _read(f["tolerance"].value, "requirements.frequency_tolerance", percent=True)
        d_lo = _read(f["duty_min"].value, "requirements.duty_min", percent=True, optional=True)
        d_hi = _read(f["duty_max"].value, "requirements.duty_max", percent=True, optional=True)
        y = _read(f["min_yield"].value, "requirements.min_yield", percent=True)
        if d_lo is not None and d_hi is not None and d_lo == d_hi and design.timing.topology != "pot":
            duty = {"duty": d_lo, "duty_min": None, "duty_max": None}
        else:
            duty = {"duty": None, "duty_min": d_lo, "duty_max": d_hi}
        req = dataclasses.replace(design.requirements, frequency=freq, frequency_tolerance=tol, criterion=self.criterion.value,
                                  min_yield=y, flicker=self.flicker.value, **duty)
        v_lo = _read(f["vcc_min"].value, "design.vcc_min")
        v_hi = _read(f["vcc_max"].value, "design.vcc_max")
        t_lo = _read(f["t_min"].value, "design.t_ambient_min_c")
        t_hi = _read(f["t_max"].value, "design.t_ambient_max_c")
        if v_lo is not None and v_hi is not None and not v_lo <= design.vcc <= v_hi:
            raise DesignError(f"design.vcc_min, vcc_max: the range {v_lo:g} … {v_hi:g} V must hold the nominal supply "
                              f"{design.vcc:g} V (set the nominal in the timing panel)")
        t_nom = min(max(design.t_ambient_c, t_lo), t_hi) if t_lo is not None and t_hi is not None else design.t_ambient_c
        return design.replace(requirements=req, vcc_min=v_lo, vcc_max=v_hi, t_ambient_min_c=t_lo, t_ambient_max_c=t_hi,
                              t_ambient_c=t_nom)

    @safe_callback
    def _on_change(self, _change: Any) -> None:
        if self._syncing:
            return
        verdict = self.session.edit(self._build)
        if verdict is None:
            self.clear_message()
        else:
            self.show_message(verdict)

    def set_values(self, **values: str) -> str | None:
        """Type into several fields at once (one edit), e.g. ``set_values(frequency="25k", duty_min="20 %")``.

        Returns the rejection reason or None.
        """
        self._syncing = True
        try:
            for k, v in values.items():
                if k == "criterion":
                    self.criterion.value = v
                elif k == "flicker":
                    self.flicker.value = v
                else:
                    self.fields[k].value = v
        finally:
            self._syncing = False
        self._on_change(None)
        return self.message_text or None


_DIELECTRIC_LABELS = (("C0G / NP0 ceramic", "c0g"), ("film", "film"), ("X7R ceramic", "x7r"),
                      ("aluminium electrolytic", "electrolytic"))
_SERIES = ("E6", "E12", "E24", "E48", "E96", "E192")


class PartsPanel(Panel):
    """Capacitor dielectric and tolerance, resistor tolerance and series, capacitor series, pot tolerance."""

    title = "Parts: dielectric, tolerances, series"
    css_name = "parts"
    message_lead = "Not applied"

    def __init__(self, session: DesignSession) -> None:
        super().__init__()
        self.session = session
        self._syncing = False
        style = {"description_width": "130px"}
        self.dielectric = w.Dropdown(options=_DIELECTRIC_LABELS, description="capacitor dielectric",
                                     layout=w.Layout(width="330px"), style=style)
        self.dielectric.add_class("pwmkit-parts-dielectric")
        self.c_tolerance = _text("", "capacitor ±", "c-tolerance")
        self.r_tolerance = _text("", "resistors ±", "r-tolerance")
        self.pot_tolerance = _text("", "pot ±", "pot-tolerance")
        self.r_series = w.Dropdown(options=_SERIES, description="resistor series", layout=w.Layout(width="250px"),
                                   style=style)
        self.c_series = w.Dropdown(options=_SERIES, description="capacitor series", layout=w.Layout(width="250px"),
                                   style=style)
        for ctl in (self.dielectric, self.c_tolerance, self.r_tolerance, self.pot_tolerance, self.r_series,
                    self.c_series):
            ctl.observe(self._on_change, names="value")
        self.set_body([w.HBox([self.dielectric, self.c_tolerance]), w.HBox([self.r_series, self.r_tolerance]),
                       w.HBox([self.c_series, self.pot_tolerance])])
        session.subscribe(self.refresh)
        self.refresh(session.evaluation)

    @safe_callback
    def refresh(self, _evaluation: Any) -> None:
        t = self.session.design.timing
        self._syncing = True
        try:
            with self.hold_sync():
                self.dielectric.value = t.c_dielectric
                self.c_tolerance.value = _pct_text(t.c_tolerance)
                self.r_tolerance.value = _pct_text(t.r_tolerance)
                self.pot_tolerance.value = _pct_text(t.pot_tolerance)
                self.r_series.value = t.r_series if t.r_series in _SERIES else "E24"
                self.c_series.value = t.c_series if t.c_series in _SERIES else "E12"
                self.pot_tolerance.disabled = t.topology != "pot"
        finally:
            self._syncing = False

    @safe_callback
    def _on_change(self, change: Any) -> None:
        if self._syncing:
            return
        changes: dict[str, Any] = {"c_dielectric": self.dielectric.value, "r_series": self.r_series.value,
                                   "c_series": self.c_series.value}
        for name, ctl in (("c_tolerance", self.c_tolerance), ("r_tolerance", self.r_tolerance),
                          ("pot_tolerance", self.pot_tolerance)):
            changes[name] = _read(ctl.value, f"timing.{name}", percent=True)
        if change is not None and change.get("owner") is self.r_series:
            from .. import eseries

            changes["r_tolerance"] = eseries.tolerance(self.r_series.value)  # the series' customary band
        verdict = self.session.edit(lambda d: d.with_timing(**changes))
        if verdict is None:
            self.clear_message()
        else:
            self.show_message(verdict)
            self.refresh(self.session.evaluation)


def _bar(lo: float, hi: float, x: float, span: tuple[float, float] | None, scale_lo: float, scale_hi: float) -> str:
    """An inline SVG bar: the required window (green), the spread span (orange) and the nominal (black)."""
    width, height = 260.0, 14.0

    def px(v: float) -> float:
        return max(0.0, min(width, (v - scale_lo) / (scale_hi - scale_lo) * width))

    parts = [f"<rect x='{px(lo):.1f}' y='2' width='{max(px(hi) - px(lo), 1):.1f}' height='10' fill='#009E73' "
             "fill-opacity='0.25' stroke='#009E73'/>"]
    if span is not None:
        parts.append(f"<rect x='{px(span[0]):.1f}' y='5' width='{max(px(span[1]) - px(span[0]), 1):.1f}' height='4' "
                     "fill='#E69F00'/>")
    parts.append(f"<rect x='{px(x) - 1:.1f}' y='0' width='2' height='{height:.0f}' fill='#000'/>")
    return (f"<svg width='{width:.0f}' height='{height:.0f}' style='vertical-align:middle' role='img' "
            f"aria-label='requirement window'>{''.join(parts)}</svg>")


def requirement_band_html(design: Any, evaluation: Any, spread: Any = None) -> str:
    """The requirement window next to the nominal point (and the worst-case span when ``spread`` is given)."""
    from ..requirement_spread import duty_requirement

    r = design.requirements
    rows = []
    if r.frequency is not None:
        lo, hi = r.frequency_window
        f0 = float(evaluation.timing.frequency)
        if evaluation.pot_travel is not None:
            t_lo, t_hi = evaluation.pot_travel.frequency_range
        else:
            t_lo = t_hi = f0
        span = None if spread is None else (spread.frequency_low, spread.frequency_high)
        lo_s = min(lo, t_lo, *(span or (lo,))) * 0.95
        hi_s = max(hi, t_hi, *(span or (hi,))) * 1.05
        inside = lo <= t_lo and t_hi <= hi
        rows.append(f"<tr data-q='frequency'><th>frequency</th><td>{_bar(lo, hi, f0, span, lo_s, hi_s)}</td>"
                    f"<td>required {esc(fmt(lo, 'Hz', 4))} … {esc(fmt(hi, 'Hz', 4))}; nominal {esc(fmt(f0, 'Hz', 4))} "
                    f"{'✓ inside' if inside else '✗ outside'}"
                    + ("" if span is None else f"; corners {esc(fmt(span[0], 'Hz', 4))} … {esc(fmt(span[1], 'Hz', 4))}")
                    + "</td></tr>")
    spec = duty_requirement(design)
    if spec is not None:
        kind, lo, hi = spec
        if evaluation.pot_travel is not None:
            d_lo, d_hi = evaluation.pot_travel.duty_range
        else:
            d_lo = d_hi = float(evaluation.timing.duty)
        ok = (d_lo <= lo and d_hi >= hi) if kind == "reach" else (lo <= d_lo and d_hi <= hi)
        span = None if spread is None else (spread.duty_low, spread.duty_high)
        word = "reach" if kind == "reach" else "window"
        got = f"travel {fmt_pct(d_lo, 3)} … {fmt_pct(d_hi, 3)}" if kind == "reach" else f"nominal {fmt_pct(d_lo, 4)}"
        rows.append(f"<tr data-q='duty'><th>duty</th><td>{_bar(lo, hi, float(evaluation.timing.duty), span, 0.0, 1.0)}"
                    f"</td><td>required {word} {fmt_pct(lo, 3)} … {fmt_pct(hi, 3)}; {got} {'✓' if ok else '✗'}"
                    + ("" if span is None else f"; corners {fmt_pct(span[0], 3)} … {fmt_pct(span[1], 3)}")
                    + "</td></tr>")
    if not rows:
        return "<div class='pwmkit-req-band' style='font-size:12px;color:#5a6270'>No frequency or duty requirement.</div>"
    return (f"<table class='pwmkit-req-band' style='font-size:12px;border-collapse:collapse'>{''.join(rows)}</table>"
            f"<div style='font-size:11px;color:#5a6270'>criterion: {esc(r.criterion_text())} — green: required, "
            "black: nominal, orange: worst-case corners (after “Run Monte Carlo”)</div>")


class RequirementBand(w.HTML):
    """The requirement window drawn under the timing readout; follows the session and its spread runs."""

    def __init__(self, session: DesignSession) -> None:
        super().__init__()
        self.add_class("pwmkit-requirement-band")
        self.session = session
        session.subscribe(lambda _ev: self.refresh())
        session.subscribe_spread(lambda _ev: self.refresh())
        self.refresh()

    def refresh(self) -> None:
        try:
            s = self.session
            spread = s.spread_evaluation.requirement_spread if s.spread_is_current else None
            self.value = requirement_band_html(s.design, s.evaluation, spread)
        except Exception:  # a display helper must never raise into a callback
            from ._base import log

            log.exception("pwmkit: requirement band failed")
