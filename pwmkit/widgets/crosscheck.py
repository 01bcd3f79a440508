"""Dashboard button: cross-check the design under edit with an ngspice circuit simulation.

Shown only where ngspice is installed (:func:`crosscheck_box` returns None otherwise). One click
runs :func:`pwmkit.netlist.verify` on the session's current design and shows model vs circuit;
a failure is shown as one line of text, never a traceback.
"""

from __future__ import annotations

from typing import Any

import ipywidgets as w

from ._base import esc, log
from .session import DesignSession

__all__ = ["CrossCheckBox", "crosscheck_box"]


class CrossCheckBox(w.VBox):
    """A button and the model-vs-circuit table of the last run."""

    def __init__(self, session: DesignSession) -> None:
        self.session = session
        self.button = w.Button(description="Cross-check in ngspice", icon="check",
                               tooltip="simulate this design's circuit in ngspice and compare it with the figures")
        self.result = w.HTML("<span style='color:#5a6270'>Simulates the circuit of the design as it is now "
                             "(a few seconds).</span>")
        self.button.on_click(self._run)
        super().__init__([self.button, self.result])
        self.add_class("pwmkit-crosscheck")

    def _run(self, _button: Any = None) -> None:
        from ..errors import DesignError
        from ..netlist import verify

        self.button.disabled = True
        try:
            res = verify(self.session.design)
            verdict = "passes" if res.passed else "<b>does not pass</b>"
            self.result.value = (f"<div>{esc(res.design)} {verdict} the cross-check ({esc(res.what)} netlist).</div>"
                                 + res._repr_html_())
        except DesignError as exc:
            self.result.value = f"<div style='color:#a33'>cross-check not run: {esc(exc)}</div>"
        except Exception:  # never raise into the widget machinery
            log.exception("pwmkit: cross-check failed")
            self.result.value = "<div style='color:#a33'>cross-check failed (see the log)</div>"
        finally:
            self.button.disabled = False


def crosscheck_box(session: DesignSession) -> CrossCheckBox | None:
    """The cross-check box, or None where ngspice is not installed."""
    from ..netlist import find_ngspice

    return CrossCheckBox(session) if find_ngspice() is not None else None
