"""One design being edited: the last good :class:`~pwmkit.design.Design`, its evaluation, listeners.

Panels share a :class:`DesignSession`. A panel that edits the design *proposes* a new design; the
session evaluates it (``evaluate(design, spread=False)``) and only when that succeeds does it
become the current design and every listener is told. A proposal that fails leaves everything as
it was and hands the reason back to the proposing panel, which shows it inline.

The Monte Carlo spread is slower and runs on demand (:meth:`DesignSession.run_spread`).
"""

from __future__ import annotations

from collections.abc import Callable
from typing import Any

from ..design import Design
from ..errors import DesignError
from ._base import GENERIC_MESSAGE, log

__all__ = ["DesignSession", "as_session"]

Listener = Callable[[Any], None]


class DesignSession:
    """The design under edit and its latest evaluation.

    Parameters
    ----------
    design : Design
        Starting design; it must evaluate (otherwise :class:`~pwmkit.errors.DesignError` is
        raised here, at construction, where a traceback is appropriate).
    n_mc : int
        Monte Carlo samples for :meth:`run_spread`.
    seed : int
        Random seed of the Monte Carlo run (repeatable figures).

    Attributes
    ----------
    design : Design
        Last good design.
    evaluation : pwmkit.evaluate.Evaluation
        Its evaluation without spread.
    spread_evaluation : Evaluation or None
        Evaluation with spread of :attr:`spread_design` (None until :meth:`run_spread`).
    revision : int
        Increases by one on every accepted design.
    """

    def __init__(self, design: Design, *, n_mc: int = 20_000, seed: int = 1) -> None:
        if not isinstance(design, Design):
            raise DesignError(f"design: expected a pwmkit.design.Design, got {type(design).__name__}")
        self.n_mc = int(n_mc)
        self.seed = int(seed)
        self.design = design
        self.evaluation = self._evaluate(design)
        self.spread_evaluation: Any = None
        self.spread_design: Design | None = None
        self.revision = 0
        self._listeners: list[Listener] = []
        self._spread_listeners: list[Listener] = []

    @staticmethod
    def _evaluate(design: Design, **kwargs: Any) -> Any:
        from ..evaluate import evaluate

        kwargs.setdefault("spread", False)
        return evaluate(design, **kwargs)

    # -- listeners --------------------------------------------------------------------------
    def subscribe(self, fn: Listener) -> None:
        """Call ``fn(evaluation)`` after every accepted design."""
        self._listeners.append(fn)

    def subscribe_spread(self, fn: Listener) -> None:
        """Call ``fn(evaluation_with_spread)`` after every spread run."""
        self._spread_listeners.append(fn)

    # -- edits ------------------------------------------------------------------------------
    def propose(self, design: Design) -> str | None:
        """Evaluate ``design``; on success make it current and notify listeners.

        Returns
        -------
        str or None
            None when accepted, else the reason (the design and evaluation stay as they were).
            Never raises.
        """
        try:
            evaluation = self._evaluate(design)
        except DesignError as exc:
            return str(exc)
        except Exception:  # a widget edit must never raise
            log.exception("pwmkit: evaluating a proposed design failed")
            return GENERIC_MESSAGE
        self.design = design
        self.evaluation = evaluation
        self.revision += 1
        self._notify(self._listeners, evaluation)
        return None

    def edit(self, make: Callable[[Design], Design]) -> str | None:
        """Build a new design from the current one with ``make`` and :meth:`propose` it.

        Validation errors raised by ``make`` (e.g. a negative resistor) are returned as text too.
        """
        try:
            candidate = make(self.design)
        except DesignError as exc:
            return str(exc)
        except Exception:
            log.exception("pwmkit: building a proposed design failed")
            return GENERIC_MESSAGE
        return self.propose(candidate)

    @property
    def findings(self) -> Any:
        """The checks as the record shows them: those of the spread run when it belongs to the current
        design, else the quick evaluation's (spread checks listed as not run)."""
        return (self.spread_evaluation if self.spread_is_current else self.evaluation).findings

    @property
    def spread_is_current(self) -> bool:
        """True when the spread figures belong to the current design."""
        return self.spread_evaluation is not None and self.spread_design == self.design

    def run_spread(self) -> str | None:
        """Evaluate the current design with Monte Carlo spread and worst case; notify spread listeners.

        Returns None on success, else the reason. Never raises.
        """
        design = self.design
        try:
            evaluation = self._evaluate(design, spread=True, n_mc=self.n_mc, seed=self.seed)
        except DesignError as exc:
            return str(exc)
        except Exception:
            log.exception("pwmkit: spread evaluation failed")
            return GENERIC_MESSAGE
        self.spread_evaluation = evaluation
        self.spread_design = design
        self._notify(self._spread_listeners, evaluation)
        return None

    def _notify(self, listeners: list[Listener], evaluation: Any) -> None:
        for fn in list(listeners):
            try:
                fn(evaluation)
            except Exception:  # listeners are safe callbacks; this is a last guard
                log.exception("pwmkit: a panel failed to follow the design")


def as_session(design_or_session: Design | DesignSession) -> DesignSession:
    """A session for a design (new) or the session itself (shared by several panels)."""
    if isinstance(design_or_session, DesignSession):
        return design_or_session
    return DesignSession(design_or_session)
