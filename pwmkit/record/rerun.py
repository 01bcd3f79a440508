"""Re-run a saved design notebook and report drift of its recorded key results.

:func:`rerun_notebook` reads the results a notebook recorded when it was last run and saved
(:func:`pwmkit.record.record_results`), executes a copy headless, and compares the fresh results
key by key (:func:`pwmkit.record.results.compare_results`). Nothing is written unless
``update=True``, which replaces the notebook file — and only that file — with the freshly
executed copy, atomically.
"""

from __future__ import annotations

import os
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

from ..errors import DesignError
from .results import Drift, compare_results, payloads_in_notebook

__all__ = ["RerunOutcome", "rerun_notebook"]


@dataclass(frozen=True)
class RerunOutcome:
    """The result of re-running one notebook.

    Attributes
    ----------
    path : the notebook
    status : "ok" (no drift), "drift", "error" (could not run), "unreadable" (missing, not a
        notebook: bad input), "unrecorded" (nothing was recorded to compare with) or "updated"
        (``update=True`` wrote the fresh run back)
    message : one line for people
    drifts : every difference found
    recorded, fresh : design name → key → value
    seconds : execution time [s]
    """

    path: Path
    status: str
    message: str
    drifts: tuple[Drift, ...] = ()
    recorded: dict[str, dict[str, Any]] = field(default_factory=dict)
    fresh: dict[str, dict[str, Any]] = field(default_factory=dict)
    seconds: float = 0.0

    @property
    def failed(self) -> bool:
        """True when the command line should exit with a non-zero status (see :attr:`exit_status`)."""
        return self.status in ("drift", "error", "unrecorded", "unreadable")

    @property
    def exit_status(self) -> int:
        """0 fine, 1 drift / a failed run / nothing recorded, 2 bad input (missing or unreadable notebook)."""
        return 2 if self.status == "unreadable" else 1 if self.failed else 0

    @property
    def n_compared(self) -> int:
        return sum(len(v) for v in self.recorded.values())


def rerun_notebook(path: str | os.PathLike[str], *, rtol: float = 1e-6, atol: float = 0.0, timeout: float = 600.0,
                   update: bool = False, kernel: str = "python3") -> RerunOutcome:
    """Execute a saved notebook again and compare its recorded key results with fresh ones.

    Parameters
    ----------
    path : path-like
        A saved ``.ipynb`` that called :func:`pwmkit.record.record_results`.
    rtol, atol : float
        Numbers agree when ``|a − b| ≤ rtol·max(|a|, |b|) + atol``.
    timeout : float
        Longest time one cell may run [s].
    update : bool
        Write the freshly executed notebook back in place (atomically) after a successful run.
        Also records results for the first time in a notebook that has none.
    kernel : str
        Jupyter kernel name.

    Returns
    -------
    RerunOutcome
    """
    from .notebooks import execute_notebook, read_notebook

    p = Path(path)
    if not (timeout > 0):
        raise DesignError(f"timeout: {timeout!r} is not allowed; give a time > 0 s")
    try:
        nb = read_notebook(p)
        recorded = payloads_in_notebook(nb)
    except DesignError as exc:
        msg = str(exc)
        return RerunOutcome(p, "unreadable", msg if msg.startswith(str(p)) else f"{p}: {msg}")
    if not recorded and not update:
        return RerunOutcome(p, "unrecorded",
                            f"{p}: no recorded results to compare with — the notebook must call "
                            "pwmkit.record.record_results(...) and be run and saved once "
                            "(or use --update to record them now)")
    run = execute_notebook(nb, cwd=p.parent.resolve(), timeout=timeout, kernel=kernel)
    if run.error is not None:
        return RerunOutcome(p, "error", f"{p}: {run.error}", recorded=recorded, seconds=run.seconds)
    try:
        fresh = payloads_in_notebook(run.notebook)
    except DesignError as exc:
        return RerunOutcome(p, "error", f"{p}: after the run: {exc}", recorded=recorded, seconds=run.seconds)
    if not fresh:
        return RerunOutcome(p, "error", f"{p}: the fresh run recorded no results (is the record_results cell "
                                        "still there?)", recorded=recorded, seconds=run.seconds)
    drifts = tuple(compare_results(recorded, fresh, rtol=rtol, atol=atol))
    if update:
        import nbformat

        from .files import atomic_write

        atomic_write(p, nbformat.writes(run.notebook), force=True)
        n = sum(len(v) for v in fresh.values())
        what = f"{len(drifts)} difference(s) from the old record" if recorded else "first record"
        if not recorded:
            drifts = ()
        return RerunOutcome(p, "updated", f"{p}: updated — {n} key results recorded ({what})", drifts, recorded,
                            fresh, run.seconds)
    if drifts:
        return RerunOutcome(p, "drift", f"{p}: DRIFT in {len(drifts)} result(s) (rtol {rtol:g})", drifts, recorded,
                            fresh, run.seconds)
    n = sum(len(v) for v in recorded.values())
    return RerunOutcome(p, "ok", f"{p}: ok — {n} recorded key results reproduced (rtol {rtol:g})", (), recorded,
                        fresh, run.seconds)
