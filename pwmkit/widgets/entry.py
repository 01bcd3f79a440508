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


class ValueEntry(w.VBox):
    """One named quantity: label, text field, slider and unit, with its own message line.

    A value that cannot be read or is refused marks the field invalid (CSS class
    ``pwmkit-invalid`` on the entry; the page helper of :func:`pwmkit.widgets.dashboard` also sets
    ``aria-invalid`` on the input) and shows the reason right under the field, naming the field,
    its unit and valid examples. The last good value stays in the design.

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
    report : callable, optional
        Also called with the message text when a value is refused (e.g. to log it).

    Notes
    -----
    Values are snapped (when :attr:`snap` is a series and the value is positive) *before* they
    reach the handler, so the design only ever holds series values in snapping mode.
    """

    def __init__(self, name: str, label: str, unit: str, value: float, *, handler: Handler,
                 report: Callable[[str], None] | None = None,
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
        self.label_html = label
        self.label = w.HTML(f"<span title='{tooltip}'>{label}</span>", layout=w.Layout(width="112px"))
        self.text = w.Text(value=self._text_of(self.value), continuous_update=False,
                           layout=w.Layout(width="96px"), tooltip=tooltip)
        self.text.add_class("pwmkit-entry-text")
        if linear is not None:
            lo, hi, step = linear
            self.slider: Any = w.FloatSlider(value=min(max(self.value, lo), hi), min=lo, max=hi, step=step,
                                             readout=False, continuous_update=True,
                                             layout=w.Layout(width="176px"))
            self._log = False
        else:
            lo, hi = log_range if log_range is not None else (self.value / 100, self.value * 100)
            self.slider = w.FloatLogSlider(value=self.value, base=10, min=math.log10(lo), max=math.log10(hi),
                                           step=0.005, readout=False, continuous_update=True,
                                           layout=w.Layout(width="176px"))
            self._log = True
            self._fit_range(self.value)
        self._anchor = float(self.slider.value)
        self.slider.add_class("pwmkit-entry-slider")
        self.unit_label = w.HTML(f"<span style='color:#5a6270'>{unit}</span>", layout=w.Layout(width="24px"))
        self.row = w.HBox([self.label, self.text, self.slider, self.unit_label], layout=w.Layout(align_items="center"))
        self.note = w.HTML(value="", layout=w.Layout(display="none"))
        self.note.add_class("pwmkit-msg")
        self.note.add_class("pwmkit-field-msg")
        super().__init__([self.row, self.note])
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

    @property
    def field_name(self) -> str:
        """The field as the message names it: label and unit, e.g. "C (timing) [F]"."""
        import re

        plain = re.sub(r"<sub>(.*?)</sub>", r"_\1", self.label_html)
        plain = re.sub(r"<[^>]+>", "", plain)
        return f"{plain} [{self.unit}]"

    @property
    def message_text(self) -> str:
        """The field's message as plain text ("" when the value is fine)."""
        import html
        import re

        return html.unescape(re.sub(r"<[^>]+>", "", self.note.value)).strip()

    @property
    def invalid(self) -> bool:
        return "pwmkit-invalid" in self._dom_classes

    def mark_invalid(self, text: str) -> None:
        """Show ``text`` under the field and mark the field invalid."""
        import html

        self.note.value = (f"<div class='pwmkit-msg-error' role='alert' id='pwmkit-msg-{self.name}'>"
                           f"<b>✖ Not applied:</b> {html.escape(text)}</div>")
        self.note.layout.display = None
        self.add_class("pwmkit-invalid")
        self.text.add_class("pwmkit-invalid")
        if self._report is not None:
            self._report(text)

    def mark_valid(self) -> None:
        """Clear the field's message and invalid mark."""
        if self.note.value:
            self.note.value = ""
            self.note.layout.display = "none"
        self.remove_class("pwmkit-invalid")
        self.text.remove_class("pwmkit-invalid")

    def _refused(self, reason: str) -> str:
        """The design's reason for refusing a value, in the words of this field."""
        import re

        from ..glossary import field_examples

        text = reason.strip()
        text = re.sub(r"^(?:design\.|timing\.)*" + re.escape(self.name) + r"\s*:\s*", "", text)
        text = re.sub(r"\b(?:design\.|timing\.)+" + re.escape(self.name) + r"\b", "the value", text)
        text = text if text.endswith(".") else text + "."
        if "range" in text or "allowed" in text:  # a bound was broken: say what to type instead
            text += f" Type for example {field_examples(self.unit)}."
        return f"{self.field_name}: {text}"

    def submit(self, value: float) -> str | None:
        """Snap ``value`` and hand it to the handler; on success show it. Returns the handler's verdict."""
        value = self.snapped(value)
        verdict = self._handler(self.name, value)
        if verdict is None:
            self.set_value(value)
            self.mark_valid()
        else:
            self.mark_invalid(self._refused(verdict))
        return verdict

    # -- callbacks (the owner's handler is a safe callback; these only translate) ----------------
    def _on_text(self, change: dict[str, Any]) -> None:
        if self._syncing:
            return
        from ..values import parse_value

        try:
            text = str(change["new"]).strip()
            try:
                value = parse_value(text, self.unit, name=self.name)  # "10 kF" for Ω: refused
            except DesignError as exc:
                from ..glossary import field_examples

                reason = str(exc)
                if "is given in" in reason:  # a unit for another quantity: say which, in this field's words
                    why = reason.split(": ", 1)[-1].split(";")[0]
                    self.mark_invalid(f"{self.field_name}: {why}. Type for example {field_examples(self.unit)}.")
                else:
                    self.mark_invalid(f"{self.field_name}: {text!r} is not a value. "
                                      f"Type for example {field_examples(self.unit)}.")
                return
            self.submit(value)
        except Exception:  # never raise into the widget machinery
            log.exception("pwmkit: entry %s failed", self.name)
            self.mark_invalid(GENERIC_MESSAGE)

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
            self.mark_invalid(GENERIC_MESSAGE)
