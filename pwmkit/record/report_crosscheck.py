"""The report's "cross-check" section: pwmkit's figures vs an ngspice simulation of the circuit.

Present only where ngspice is installed (:func:`crosscheck_section` returns None otherwise).
Results are cached per design within a process (a design is immutable), so writing several
reports of one design simulates it once.
"""

from __future__ import annotations

import functools
import html
from typing import Any

__all__ = ["crosscheck_section"]


@functools.lru_cache(maxsize=16)
def _verified(design: Any) -> Any:
    from ..netlist import verify

    return verify(design)


def crosscheck_section(design: Any) -> str | None:
    """HTML of the cross-check section, or None where ngspice is not installed."""
    from ..errors import DesignError
    from ..netlist import find_ngspice

    if find_ngspice() is None:
        return None
    try:
        res = _verified(design)
    except DesignError as exc:
        return f"<p class='note'>The circuit simulation could not be run: {html.escape(str(exc))}</p>"
    verdict = "agrees with" if res.passed else "does <b>not</b> agree with"
    return (f"<p>ngspice simulated this design's {html.escape(res.what)} netlist (built from the design's values "
            f"and wiring; <code>pwmkit export --netlist</code> writes it). The circuit {verdict} the figures above "
            "within the stated tolerances.</p>" + res._repr_html_()
            + "<ul class='note'>" + "".join(f"<li>{html.escape(r.label)}: {100 * r.tolerance:.2g} % — "
                                            f"{html.escape(r.note)}</li>" for r in res.rows) + "</ul>")
