"""Timing panel: topology, component values (text + slider, optional E-series snap), supply, timer
family, steering diode; the readout of the exact model beside the 0.693 estimate."""

from __future__ import annotations

import dataclasses
import math
from typing import Any

import ipywidgets as w

from ..design import Design
from ._base import DASH, GENERIC_MESSAGE, Panel, esc, log, safe_callback
from .entry import SNAP_CHOICES, ValueEntry
from .session import DesignSession, as_session

__all__ = ["TimingPanel", "timing_readout_html"]

_TOPOLOGY_LABELS = (
    ("classic", "classic"),
    ("bypass diode", "bypass"),
    ("two diodes", "steered"),
    ("pot-steered", "pot"),
)


def _diff(name: str, a: Any, b: Any) -> str:
    """Exact vs estimate: relative percent for times and frequency, percentage points for the duty."""
    from ..numstyle import screen

    try:
        a, b = float(a), float(b)
    except (TypeError, ValueError):
        return DASH
    if not (math.isfinite(a) and math.isfinite(b)):
        return DASH
    if name == "duty":
        return screen(a - b, "points")
    if b == 0:
        return DASH
    return screen(a / b - 1.0, "relative")


def timing_readout_html(exact: Any, ideal: Any) -> str:
    """HTML table: t_high, t_low, frequency, duty — exact model, 0.693 estimate and their difference.

    Times and frequency differ in relative percent, the duty in percentage points
    (:mod:`pwmkit.glossary`). Each value cell carries ``data-q`` (quantity name) and ``data-kind``
    ("exact"/"ideal") so notebooks and browser tests can read it.
    """
    from .. import glossary as g
    from ..numstyle import screen

    rows = (
        ("t_high", "output high (charge)", "s"),
        ("t_low", "output low (discharge)", "s"),
        ("frequency", "frequency", "Hz"),
        ("duty", "duty", "duty"),
    )

    def cell(result: Any, name: str, kind_of: str, kind: str) -> str:
        value = getattr(result, name, None) if result is not None else None
        return f"<td class='pwmkit-q' data-q='{name}' data-kind='{kind}'>{esc(screen(value, kind_of))}</td>"

    body = "".join(
        f"<tr><th>{esc(label)}</th>{cell(exact, name, unit, 'exact')}{cell(ideal, name, unit, 'ideal')}"
        f"<td class='pwmkit-diff' data-q='{name}'>"
        f"{esc(_diff(name, getattr(exact, name, None), getattr(ideal, name, None)) if ideal is not None else DASH)}</td></tr>"
        for name, label, unit in rows
    )
    return (
        "<table class='pwmkit-readout' style='border-collapse:collapse;font-size:13px'>"
        f"<thead><tr><th></th><th title='{esc(g.EXACT_NOTE)}'>{esc(g.EXACT)}</th>"
        f"<th title='{esc(g.ESTIMATE_NOTE)}'>{esc(g.ESTIMATE)}</th>"
        f"<th title='times and frequency: relative difference; duty: {esc(g.POINTS_LONG)}'>{esc(g.DIFFERENCE)}</th>"
        f"</tr></thead><tbody>{body}</tbody></table>"
    )


_READOUT_CSS = """<style>
.pwmkit-readout th, .pwmkit-readout td {padding:3px 10px; text-align:right; border-bottom:1px solid #e6e8eb;
  white-space:nowrap; font-variant-numeric:tabular-nums}
.pwmkit-readout tbody th {text-align:left; font-weight:normal; color:#5a6270}
.pwmkit-readout thead th {font-weight:600; color:#1f2328}
.pwmkit-heading {font-weight:700; font-size:14px; color:#1f2328; margin:4px 0 2px 0;
                 border-bottom:2px solid #0072B2; padding-bottom:2px}
.pwmkit-entry .widget-text input {font-family: ui-monospace, monospace}
.pwmkit-entry.pwmkit-invalid .widget-text input {border:2px solid #D55E00; background:#fff3e8}
.pwmkit-field-msg {font-size:12px; color:#8a2d00; margin:0 0 4px 112px; max-width:330px; white-space:normal}
.pwmkit-timing .widget-toggle-buttons .widget-toggle-button {width:auto; padding:0 8px}
.pwmkit-timing .widget-dropdown select {min-width:0}
</style>"""


class TimingPanel(Panel):
    """Edit the astable timing network and read its timing.

    Controls: topology, snap-to-series, ``ra``, ``rb``, ``c``, ``pot`` and ``wiper`` (pot topology),
    supply ``vcc``, timer family, steering diode. Every accepted change goes to the shared
    :class:`~pwmkit.widgets.session.DesignSession`; a rejected one shows its reason here and the
    last good design stays.

    Parameters
    ----------
    design : Design or DesignSession
        The design to edit (a new session), or a session shared with other panels.

    Attributes
    ----------
    entries : dict[str, ValueEntry]
        "ra", "rb", "c", "pot", "vcc".
    wiper : ipywidgets.FloatSlider
    topology, snap, timer, diode : ipywidgets selection widgets
    readout : ipywidgets.HTML (CSS class ``pwmkit-readout``)
    """

    title = "Timing network"
    css_name = "timing"
    message_lead = "Not applied"

    def __init__(self, design: Design | DesignSession, *, show_readout: bool = True) -> None:
        super().__init__()
        self.session = as_session(design)
        d = self.session.design
        t = d.timing
        self._syncing = False
        self._pot_memory = float(t.pot) if t.pot is not None else self._pot_default(t.ra, t.rb)
        self._wiper_memory = float(t.wiper) if t.wiper is not None else 0.5

        self.topology = w.ToggleButtons(options=_TOPOLOGY_LABELS, value=t.topology, style={"button_width": "auto"},
                                        tooltips=["ra + rb charge, rb discharges", "a diode bypasses rb while charging",
                                                  "separate charge and discharge diodes",
                                                  "a pot splits its track between charge and discharge"])
        self.snap = w.Dropdown(options=SNAP_CHOICES, value="exact", description="snap to",
                               layout=w.Layout(width="150px"), style={"description_width": "52px"})
        from ..glossary import TIMER_LABELS

        self.timer = w.Dropdown(options=tuple((label, key) for key, label in TIMER_LABELS.items()), value=t.timer,
                                description="timer", layout=w.Layout(width="150px"),
                                style={"description_width": "40px"})
        from ..glossary import diode_label
        from ..parts.diodes import DIODES

        families = tuple(DIODES)
        if t.diode not in families:
            families = (t.diode, *families)
        diodes = tuple((diode_label(k), k) for k in families)
        self.diode = w.Dropdown(options=diodes, value=t.diode, description="diodes",
                                layout=w.Layout(width="236px"), style={"description_width": "48px"})
        for ctl in (self.topology, self.snap, self.timer, self.diode):
            ctl.add_class("pwmkit-choice")
        self.topology.add_class("pwmkit-topology")
        self.snap.add_class("pwmkit-snap")

        def entry(name: str, label: str, unit: str, value: float, **kw: Any) -> ValueEntry:
            return ValueEntry(name, label, unit, value, handler=self._on_entry, **kw)

        self.entries: dict[str, ValueEntry] = {
            "ra": entry("ra", "R<sub>A</sub> (charge)", "Ω", t.ra, log_range=(100.0, 1e6), snappable=True,
                        tooltip="charge resistor; R1 in the pot topology"),
            "rb": entry("rb", "R<sub>B</sub> (discharge)", "Ω", t.rb if t.rb > 0 else 1e3,
                        log_range=(100.0, 1e6), snappable=True,
                        tooltip="discharge resistor; the end resistor in the pot topology"),
            "pot": entry("pot", "pot (end to end)", "Ω", self._pot_memory, log_range=(1e3, 1e6), snappable=True,
                         tooltip="potentiometer track resistance"),
            "c": entry("c", "C (timing)", "F", t.c, log_range=(100e-12, 100e-6), snappable=True,
                       tooltip="timing capacitor"),
            "vcc": entry("vcc", "supply V<sub>CC</sub>", "V", d.vcc, linear=(1.0, 18.0, 0.1),
                         tooltip="timer supply; the supply range for the spread moves with it"),
        }
        if t.rb == 0:
            self.entries["rb"].set_value(0.0)
        # on screen the wiper is a percentage of the travel, like every duty; the design holds 0 … 1
        self.wiper = w.FloatSlider(value=100.0 * self._wiper_memory, min=0.0, max=100.0, step=0.5,
                                   description="wiper [%]", readout=True, readout_format=".1f",
                                   continuous_update=True, layout=w.Layout(width="420px"),
                                   style={"description_width": "108px"})
        self.wiper.add_class("pwmkit-wiper")
        self.readout = w.HTML(layout=w.Layout(margin="6px 0 0 0"))
        self.readout.add_class("pwmkit-readout-box")
        self._style = w.HTML(_READOUT_CSS)

        self.topology.observe(self._on_topology, names="value")
        self.snap.observe(self._on_snap, names="value")
        self.timer.observe(self._on_choice, names="value")
        self.diode.observe(self._on_choice, names="value")
        self.wiper.observe(self._on_wiper, names="value")

        choices = w.HBox([self.snap, self.timer, self.diode], layout=w.Layout(flex_flow="row wrap"))
        self.set_body([
            self._style,
            self.topology,
            choices,
            self.entries["ra"], self.entries["rb"], self.entries["pot"], self.wiper, self.entries["c"],
            self.entries["vcc"],
            *([self.readout] if show_readout else []),
        ])
        self._show_pot(t.topology == "pot")
        self.session.subscribe(self.refresh)
        self.refresh(self.session.evaluation)

    # -- helpers ------------------------------------------------------------------------------
    @staticmethod
    def _pot_default(ra: float, rb: float) -> float:
        from ..eseries import nearest

        return float(nearest(10.0 * (ra + rb), "E6"))

    def _show_pot(self, on: bool) -> None:
        for ctl in (self.entries["pot"], self.wiper):
            ctl.layout.display = None if on else "none"

    def _apply(self, make: Any) -> bool:
        verdict = self.session.edit(make)
        if verdict is None:
            self.clear_message()
            return True
        self.show_message(verdict)
        return False

    def _sync_controls(self, design: Design) -> None:
        """Put the controls on the values of ``design`` without triggering edits."""
        t = design.timing
        self._syncing = True
        try:
            with self.hold_sync():
                self.topology.value = t.topology
                self.timer.value = t.timer
                if t.diode in [key for _label, key in self.diode.options]:
                    self.diode.value = t.diode
                if t.topology == "pot":
                    self.wiper.value = 100.0 * float(t.wiper)
        finally:
            self._syncing = False
        for name in ("ra", "rb", "c"):
            if self.entries[name].value != getattr(t, name):
                self.entries[name].set_value(getattr(t, name))
        if t.topology == "pot" and self.entries["pot"].value != t.pot:
            self.entries["pot"].set_value(t.pot)
        if self.entries["vcc"].value != design.vcc:
            self.entries["vcc"].set_value(design.vcc)
        self._show_pot(t.topology == "pot")

    # -- edits --------------------------------------------------------------------------------
    @staticmethod
    def _with_supply(design: Design, vcc: float) -> Design:
        """The design at supply ``vcc``; the supply range keeps its proportions around it."""
        lo, hi = design.supply_range
        scale = vcc / design.vcc
        changes: dict[str, Any] = {"vcc": vcc}
        if design.vcc_min is not None:
            changes["vcc_min"] = lo * scale
        if design.vcc_max is not None:
            changes["vcc_max"] = hi * scale
        return design.replace(**changes)

    def _on_entry(self, name: str, value: float) -> str | None:
        """Handler of the value entries: None when accepted, else the reason (the entry shows it at the field)."""
        try:
            if name == "vcc":
                verdict = self.session.edit(lambda d: self._with_supply(d, value))
            elif name == "pot" and self.session.design.timing.topology != "pot":
                self._pot_memory = value  # remembered for the next switch to the pot topology
                return None
            else:
                verdict = self.session.edit(lambda d: d.with_timing(**{name: value}))
                if verdict is None and name == "pot":
                    self._pot_memory = value
        except Exception:  # never raise into the widget machinery
            log.exception("pwmkit: timing entry %s failed", name)
            return GENERIC_MESSAGE
        if verdict is None:
            self.clear_message()
        return verdict

    @safe_callback
    def _on_wiper(self, change: dict[str, Any]) -> None:
        t = self.session.design.timing
        if self._syncing or t.topology != "pot":
            return
        value = float(change["new"]) / 100.0
        if abs(value - float(t.wiper)) <= 0.5 * self.wiper.step / 100.0 + 1e-12:
            return  # the front end's rounding of the design's wiper to the slider grid, not a move
        if self._apply(lambda d: d.with_timing(wiper=value)):
            self._wiper_memory = value

    @safe_callback
    def _on_topology(self, change: dict[str, Any]) -> None:
        if self._syncing:
            return
        topology = change["new"]
        current = self.session.design.timing
        if current.topology == "pot":
            self._pot_memory, self._wiper_memory = float(current.pot), float(current.wiper)
        if topology == "pot":
            changes = dict(topology="pot", pot=self._pot_memory, wiper=self._wiper_memory)
        else:
            changes = dict(topology=topology, pot=None, wiper=None)
        if not self._apply(lambda d: d.with_timing(**changes)):
            self._sync_controls(self.session.design)

    @safe_callback
    def _on_choice(self, change: dict[str, Any]) -> None:
        if self._syncing:
            return
        field = "timer" if change["owner"] is self.timer else "diode"
        value = change["new"]
        if not self._apply(lambda d: d.with_timing(**{field: value})):
            self._sync_controls(self.session.design)

    @safe_callback
    def _on_snap(self, change: dict[str, Any]) -> None:
        series = change["new"]
        for entry in self.entries.values():
            entry.snap = series
        if series == "exact":
            return
        t = self.session.design.timing
        changes: dict[str, Any] = {}
        for name in ("ra", "rb", "c", "pot"):
            value = getattr(t, name)
            if value is not None and value > 0:
                snapped = self.entries[name].snapped(value)
                if snapped != value:
                    changes[name] = snapped
        if t.topology != "pot":
            changes.pop("pot", None)
            self._pot_memory = self.entries["pot"].snapped(self._pot_memory)
            self.entries["pot"].set_value(self._pot_memory)
        if changes and not self._apply(lambda d: d.with_timing(**changes)):
            return

    # -- follow the session ----------------------------------------------------------------------
    @safe_callback
    def refresh(self, evaluation: Any) -> None:
        """Show the session's current design and timing (called after every accepted change)."""
        self._sync_controls(self.session.design)
        self.readout.value = timing_readout_html(evaluation.timing, evaluation.ideal)

    def set_value(self, name: str, value: Any) -> str | None:
        """Programmatic edit, as if typed: ``panel.set_value("c", "3n3")``. Returns the rejection reason or None."""
        from ..values import parse_value

        if name == "wiper":  # a fraction of the travel, 0 … 1, as in the design
            self.wiper.value = 100.0 * float(value)
            return self.message_text or None
        if name not in self.entries:
            raise KeyError(f"unknown field {name!r}; known: {', '.join(self.entries)}, wiper")
        entry = self.entries[name]
        entry.text.value = value if isinstance(value, str) else format(float(parse_value(value)), "g")
        return entry.message_text or None

    @property
    def message_text(self) -> str:
        """The panel's message and the messages at its fields, as plain text ("" when none)."""
        texts = [super().message_text] + [e.message_text for e in self.entries.values()]
        return " ".join(t for t in texts if t)


def design_fields(design: Design) -> dict[str, Any]:
    """Flat view of the editable fields (for tests and the design record)."""
    t = dataclasses.asdict(design.timing)
    return {"vcc": design.vcc, **{k: t[k] for k in ("topology", "ra", "rb", "c", "pot", "wiper", "timer", "diode")}}
