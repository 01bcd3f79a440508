"""As built: bench readings and scope captures reconciled with the design (design layer).

- :class:`BenchReading`, :class:`Measured`, :class:`BenchConditions` — readings kept with a
  design (:attr:`pwmkit.design.Design.bench`, ``[[bench]]`` in the design file;
  :mod:`pwmkit.bench.readings`);
- :func:`read_capture` — a scope capture saved as CSV → time and voltage arrays;
  :func:`capture_timing` — frequency, duty, edges and levels of a captured PWM waveform;
  :func:`reading_from_capture` — both, as a reading (:mod:`pwmkit.bench.capture`);
- :func:`reconcile` — is a reading inside the predicted spread at its conditions, and which part
  most likely differs (a maximum a-posteriori fit with the parts' tolerances as priors);
  :func:`reconcile_design` — the same for the readings a design holds
  (:mod:`pwmkit.bench.reconciliation`).

Nothing here imports widgets or plotting libraries; scipy is imported only by :func:`reconcile`.
"""

from __future__ import annotations

from .._lazy import lazy_exports

_EXPORTS = {
    "QUANTITIES": "readings",
    "Measured": "readings",
    "BenchConditions": "readings",
    "BenchReading": "readings",
    "Capture": "capture",
    "CaptureTiming": "capture",
    "read_capture": "capture",
    "capture_timing": "capture",
    "reading_from_capture": "capture",
    "Reconciliation": "reconciliation",
    "ReadingVerdict": "reconciliation",
    "Explanation": "reconciliation",
    "reconcile": "reconciliation",
    "reconcile_design": "reconciliation",
    "demo_readings": "demo",
    "write_demo_capture": "demo",
}

__all__ = sorted(_EXPORTS)


__getattr__, __dir__ = lazy_exports(__name__, _EXPORTS, namespace=globals())
