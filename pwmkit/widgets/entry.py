"""A value entry: engineering-notation text field + slider (log or linear) + optional E-series snap.

The text field reads ``"4k7"``, ``"100n"``, ``"2.2 nF"`` … through :func:`pwmkit.values.parse_value`
(a unit other than the field's own, such as ``"10 kF"`` for a resistor, is refused) and applies on Enter or when it loses focus (``continuous_update=False``). The slider applies
while it is dragged; the ipywidgets front end keeps at most one update in flight and sends the
latest position when the kernel is free, so a fast drag never queues stale work.
"""

from __future__ import annotations

import math
from collections.abc import Callable
from typing import Any

import ipywidgets as w

from ..errors import DesignError
from ._base import GENERIC_MESSAGE, fmt, log

__all__ = ["ValueEntry", "SNAP_CHOICES"]

#: Choices of the snapping dropdown: "exact" (no snapping) and IEC 60063 series.
SNAP_CHOICES = ("exact", "E6", "E12", "E24", "E48", "E96")

Handler = Callable[[str, float], "str | None"]


class ValueEntry(w.HBox):
    """One named quantity: label, text field, slider and unit.

    Parameters
    ----------
    name : str
        Field name handed to the handler (``"ra"``, ``"c"``, ``"vcc"`` …).
    label : str
        Text shown before the field.
    unit : str
        Unit symbol for formatting [Ω, F, V …].
    value : float
        Starting value [unit].
    log_range : (float, float), optional
        Slider span for a logarithmic slider [unit]; extended when a value falls outside.
    linear : (float, float, float), optional
        (min, max, step) of a linear slider instead [unit].
    snappable : bool
        Whether the E-series snap applies to this quantity.
    handler : callable
        ``handler(name, value) -> None | str``: None when the value was accepted, else the reason
        (the handler shows the reason itself).
    report : callable
        ``report(text)`` shows a message when the text does not parse.

    Notes
    -----
    Values are snapped (when :attr:`snap` is a series and the value is positive) *before* they
    reach the handler, so the design only ever holds series values in snapping mode.
    """

    def __init__(self, name: str, label: str, unit: str, value: float, *, handler: Handler,
                 report: Callable[[str], None],
                 log_range: tuple[float, float] | None = None, linear: tuple[float, float, float] | None = None,
                 snappable: bool = False, tooltip: str = "") -> None:
        self.name = name
        self.unit = unit
        self.snappable = snappable
        self.snap = "exact"
        self.value = float(value)
        self._handler = handler
        self._report = report
        self._syncing = False
        self.label = w.HTML(f"<span title='{tooltip}'>{label}</span>", layout=w.Layout(width="112px"))
        self.text = w.Text(value=self._text_of(self.value), continuous_update=False,
                           layout=w.Layout(width="104px"), tooltip=tooltip)
        self.text.add_class("pwmkit-entry-text")
        if linear is not None:
            lo, hi, step = linear
            self.slider: Any = w.FloatSlider(value=min(max(self.value, lo), hi), min=lo, max=hi, step=step,
                                             readout=False, continuous_update=True,
                                             layout=w.Layout(width="230px"))
            self._log = False
        else:
            lo, hi = log_range if log_range is not None else (self.value / 100, self.value * 100)
            self.slider = w.FloatLogSlider(value=self.value, base=10, min=math.log10(lo), max=math.log10(hi),
                                           step=0.005, readout=False, continuous_update=True,
                                           layout=w.Layout(width="230px"))
            self._log = True
            self._fit_range(self.value)
        self._anchor = float(self.slider.value)
        self.slider.add_class("pwmkit-entry-slider")
        self.unit_label = w.HTML(f"<span style='color:#5a6270'>{unit}</span>", layout=w.Layout(width="28px"))
        super().__init__([self.label, self.text, self.slider, self.unit_label],
                         layout=w.Layout(align_items="center"))
        self.add_class("pwmkit-entry")
        self.add_class(f"pwmkit-entry-{name}")
        self.text.observe(self._on_text, names="value")
        self.slider.observe(self._on_slider, names="value")

    # -- helpers ------------------------------------------------------------------------------
    def _text_of(self, value: float) -> str:
        return fmt(value, self.unit, 4)

    def _fit_range(self, value: float) -> None:
        if not self._log or not (value > 0 and math.isfinite(value)):
            return
        exp = math.log10(value)
        if exp < self.slider.min:
            self.slider.min = math.floor(exp)
        if exp > self.slider.max:
            self.slider.max = math.ceil(exp)

    def snapped(self, value: float) -> float:
        """``value`` moved to the nearest value of the chosen series (positive values only)."""
        if not self.snappable or self.snap == "exact" or not (value > 0 and math.isfinite(value)):
            return value
        from ..eseries import nearest

        return float(nearest(value, self.snap))

    def set_value(self, value: float) -> None:
        """Show ``value`` in both controls without calling the handler."""
        self.value = float(value)
        self._syncing = True
        try:
            with self.hold_sync():
                self.text.value = self._text_of(self.value)
                if self._log:
                    self._fit_range(self.value)
                    if self.value > 0:
                        self.slider.value = self.value
                else:
                    self.slider.value = min(max(self.value, self.slider.min), self.slider.max)
            self._anchor = float(self.slider.value)
        finally:
            self._syncing = False

    def is_echo(self, new: float) -> bool:
        """True when a slider value is only the front end's rounding of the value we set.

        The browser's slider snaps a value to its step grid and sends the snapped value back
        (2.2 nF on a log slider with 0.005-decade steps comes back as 2.188 nF). Anything within
        half a step of the last value put into the slider is that echo, not a user move (a user
        move is at least one step).
        """
        anchor = self._anchor
        half = 0.5 * float(self.slider.step) + 1e-9
        if self._log:
            if not (new > 0 and anchor > 0):
                return False
            return abs(math.log10(new) - math.log10(anchor)) <= half
        return abs(new - anchor) <= half

    def submit(self, value: float) -> str | None:
        """Snap ``value`` and hand it to the handler; on success show it. Returns the handler's verdict."""
        value = self.snapped(value)
        verdict = self._handler(self.name, value)
        if verdict is None:
            self.set_value(value)
        return verdict

    # -- callbacks (the owner's handler is a safe callback; these only translate) ----------------
    def _on_text(self, change: dict[str, Any]) -> None:
        if self._syncing:
            return
        from ..values import parse_value

        try:
            try:
                value = parse_value(str(change["new"]).strip(), self.unit, name=self.name)  # "10 kF" for Ω: refused
            except DesignError as exc:
                msg = str(exc)
                self._report(msg if msg.startswith(self.name) else f"{self.name}: {msg}")
                return
            self.submit(value)
        except Exception:  # never raise into the widget machinery
            log.exception("pwmkit: entry %s failed", self.name)
            self._report(GENERIC_MESSAGE)

    def _on_slider(self, change: dict[str, Any]) -> None:
        if self._syncing:
            return
        try:
            new = float(change["new"])
            if self.is_echo(new):
                return
            self._anchor = new
            self.submit(new)
        except Exception:  # never raise into the widget machinery
            log.exception("pwmkit: entry %s failed", self.name)
            self._report(GENERIC_MESSAGE)
