"""Formulas panel: the derived timing expressions rendered (LaTeX) and as text to copy.

Rendering uses :class:`ipywidgets.HTMLMath` (MathJax in the front end); the expression is broken
at its factors and the design's numbers stand in a table beside it
(:func:`pwmkit.record.formula_display.worked_screen`), so it fits a dashboard column. The text
area holds the whole formula sheet of the design (:func:`pwmkit.record.formula_sheet`, full
precision) in the chosen format, and a copy button per format puts that sheet on the clipboard.
Building the sheets takes tens of milliseconds, so the panel refreshes after edits have settled
(debounced).
"""

from __future__ import annotations

import html
from typing import Any

import ipywidgets as w

from ..design import Design
from ._base import Debouncer, Panel, safe_callback
from .session import DesignSession, as_session

__all__ = ["FormulasPanel", "copy_buttons_html"]

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
                                        value="t_high", style={"button_width": "auto"})
        self.quantity.add_class("pwmkit-formula-quantity")
        self.format = w.ToggleButtons(options=_FORMATS, value="latex", style={"button_width": "auto"})
        self.format.add_class("pwmkit-formula-format")
        self.math = w.HTMLMath(layout=w.Layout(max_width="100%"))
        self.math.add_class("pwmkit-formula")
        self.copy = w.HTML()
        self.copy.add_class("pwmkit-copy-buttons")
        self.text = w.Textarea(layout=w.Layout(width="calc(100% - 6px)", height="220px"))  # 2 px margins
        self.text.add_class("pwmkit-formula-text")
        hint = w.HTML("<span style='font-size:11px;color:#5a6270'>Each copy button puts the whole formula sheet of "
                      "this design (every timing quantity, full precision) on the clipboard; the box shows the "
                      "chosen format.</span>")
        self._debounced = Debouncer(self._refresh_now, debounce)
        self.set_body([self.quantity, self.math, self.copy, w.HBox([w.HTML("show as&nbsp;"), self.format],
                                                                   layout=w.Layout(flex_flow="row wrap")),
                       self.text, hint])
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
        from ..record.formula_display import worked_screen
        from ..record.formulas import formula_sheet

        design = self.session.design
        self.math.value = worked_screen(design, self.quantity.value)
        sheets = {key: formula_sheet(design, key) for _label, key in _FORMATS}
        self.sheets = sheets
        self.text.value = sheets[self.format.value]
        self.copy.value = copy_buttons_html(sheets)
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
            self.copy.send_state()


#: The click handler of a copy button: the clipboard API, with the older select-and-copy as fallback.
_COPY_JS = ("var t=this.parentNode.querySelector('textarea[data-format=&quot;'+this.dataset.format+'&quot;]').value;"
            "var b=this;function ok(){b.dataset.copied='1';b.textContent='✔ copied '+b.dataset.label;}"
            "if(navigator.clipboard&&window.isSecureContext){navigator.clipboard.writeText(t).then(ok);}"
            "else{var a=document.createElement('textarea');a.value=t;document.body.appendChild(a);a.select();"
            "document.execCommand('copy');a.remove();ok();}")


def copy_buttons_html(sheets: dict[str, str]) -> str:
    """One copy-to-clipboard button per format; each copies the whole formula sheet in that format."""
    buttons = "".join(
        f"<button type='button' class='pwmkit-copy' data-format='{key}' data-label='{html.escape(label)}' "
        f"onclick=\"{_COPY_JS}\" style='margin:0 6px 4px 0;padding:2px 10px;cursor:pointer'>Copy "
        f"{html.escape(label)}</button>" for label, key in _FORMATS)
    stores = "".join(f"<textarea data-format='{key}' hidden aria-hidden='true'>{html.escape(sheets[key])}</textarea>"
                     for _label, key in _FORMATS)
    return f"<div class='pwmkit-copy-row' style='display:flex;flex-wrap:wrap'>{buttons}{stores}</div>"
