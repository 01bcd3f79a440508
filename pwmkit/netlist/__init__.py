"""Circuit-level cross-check: SPICE netlists of a design and ngspice simulations of them.

- :func:`netlist` — a SPICE3-compatible netlist of a design (``what="timing"`` or ``"driver"``),
  built from its input values and wiring, never from computed results;
- :func:`verify` — run ngspice on the netlist and compare its measurements with pwmkit's figures;
- :func:`find_ngspice` — the simulator's path, or None (nothing else in pwmkit needs it).

Model and design layer: no widget or plotting imports. Names are re-exported lazily.
"""

from __future__ import annotations

from .._lazy import lazy_exports

_EXPORTS = {
    "netlist": "build",
    "verify": "crosscheck",
    "Verification": "crosscheck",
    "CheckRow": "crosscheck",
    "find_ngspice": "ngspice",
    "run_ngspice": "ngspice",
    "INSTALL_HINT": "ngspice",
    "NgspiceMissing": "ngspice",
    "TimingNetwork": "elements",
    "network": "simulate",
    "simulate_timing": "simulate",
}

__all__ = sorted(_EXPORTS)

__getattr__, __dir__ = lazy_exports(__name__, _EXPORTS, ("build", "crosscheck", "ngspice", "elements", "simulate"),
                                    globals())
