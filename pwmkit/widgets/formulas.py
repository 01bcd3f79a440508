"""Formulas panel: the derived timing expressions rendered (LaTeX) and as text to copy.

Rendering uses :class:`ipywidgets.HTMLMath` (MathJax in the front end). The text area holds the
whole formula sheet of the design (:func:`pwmkit.record.formula_sheet`) in the chosen format.
Building the sheet takes tens of milliseconds, so the panel refreshes after edits have settled
(debounced).
"""

from __future__ import annotations

from typing import Any

import ipywidgets as w

from ..design import Design
from ._base import Debouncer, Panel, safe_callback
from .session import DesignSession, as_session

__all__ = ["FormulasPanel"]

_FORMATS = (("LaTeX", "latex"), ("Markdown", "markdown"), ("Python", "python"), ("C", "c"), ("plain text", "unicode"))


class FormulasPanel(Panel):
    """Rendered formulas with the design's numbers worked in, and copyable text.

    Parameters
    ----------
    design : Design or DesignSession
    debounce : float
        Quiet time before a refresh [s].

    Attributes
    ----------
    quantity : ToggleButtons ("t_high", "t_low", "frequency", "duty", "period")
    format : ToggleButtons (latex, markdown, python, c, unicode)
    math : ipywidgets.HTMLMath — the rendered expression
    text : ipywidgets.Textarea — the formula sheet to copy
    """

    title = "Formulas"
    css_name = "formulas"

    def __init__(self, design: Design | DesignSession, *, debounce: float = 0.4) -> None:
        super().__init__()
        self.session = as_session(design)
        self.quantity = w.ToggleButtons(options=(("t_high", "t_high"), ("t_low", "t_low"), ("period", "period"),
                                                 ("frequency", "frequency"), ("duty", "duty")),
                                        value="t_high", style={"button_width": "84px"})
        self.format = w.ToggleButtons(options=_FORMATS, value="latex", style={"button_width": "84px"})
        self.math = w.HTMLMath(layout=w.Layout(overflow="auto", max_width="100%"))
        self.math.add_class("pwmkit-formula")
        self.text = w.Textarea(layout=w.Layout(width="100%", height="220px"))
        self.text.add_class("pwmkit-formula-text")
        hint = w.HTML("<span style='font-size:11px;color:#5a6270'>Select all in the box (Ctrl+A) and copy; the "
                      "sheet covers every timing quantity of this design.</span>")
        self._debounced = Debouncer(self._refresh_now, debounce)
        self.set_body([self.quantity, self.math, w.HBox([w.HTML("copy as&nbsp;"), self.format]), self.text, hint])
        self.quantity.observe(lambda _c: self._refresh_now(), names="value")
        self.format.observe(lambda _c: self._refresh_now(), names="value")
        self.session.subscribe(self.follow)
        # The first sheet needs the sympy derivation (about a second in a new process): inside a
        # kernel it is scheduled like every later refresh, so the dashboard shows at once.
        self.math.value = "<em>deriving the formulas…</em>"
        self._debounced()

    def refresh(self, evaluation: Any) -> None:
        """Schedule a refresh (debounced)."""
        self._debounced()

    @safe_callback
    def _refresh_now(self) -> None:
        from ..record.formulas import formula_sheet, worked

        design = self.session.design
        self.math.value = worked(design, self.quantity.value, "markdown")
        self.text.value = formula_sheet(design, self.format.value)
        self.clear_message()

    def flush(self) -> None:
        """Refresh now if a refresh is pending, else send the drawn sheet again.

        Sending again matters for a notebook run headless: a sheet drawn by the scheduler between
        two cells is not recorded in the saved widget state, one sent from a cell is.
        """
        if self._debounced.pending:
            self._debounced.flush()
        else:
            self.math.send_state()
            self.text.send_state()
