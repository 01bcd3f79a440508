"""Exact timing of 555-type astable PWM generators.

- :func:`astable` — closed-form timing (sympy-derived, lambdified, vectorised);
- :func:`astable_ideal` — the textbook ``ln 2`` forms, for comparison;
- :func:`expressions` — the derived sympy expressions (LaTeX/code export);
- :func:`diode_law_timing` — an independent model with Shockley-law diodes;
- :func:`waveform` — capacitor and output waveforms for plots;
- :func:`monostable` — the monostable pulse (sympy-derived), :func:`two_timer_pwm` and
  :func:`control_range` — the two-timer fixed-frequency PWM set by the control pin,
  :func:`control_pin_drive` and :func:`control_pin_sweep` — the control pin driven from a source.

Topology semantics are in :mod:`pwmkit.timing.paths`.
"""

from __future__ import annotations

from typing import Any

from .astable import AstableResult, astable, astable_ideal, control_voltage_from_divider, default_vd
from .monostable import (
    ControlPinDrive,
    ControlPinSweep,
    MonostableResult,
    control_pin_drive,
    control_pin_sweep,
    monostable,
)
from .paths import TOPOLOGIES, Paths, paths
from .two_timer import ControlRange, TwoTimerPwm, control_range, two_timer_pwm
from .waveform import Waveform, waveform

__all__ = [
    "TOPOLOGIES", "AstableResult", "Paths", "astable", "astable_ideal", "control_voltage_from_divider",
    "default_vd", "diode_law_timing", "expressions", "paths", "waveform", "Waveform",
    "MonostableResult", "monostable", "ControlPinDrive", "control_pin_drive", "ControlPinSweep", "control_pin_sweep",
    "TwoTimerPwm", "two_timer_pwm", "ControlRange", "control_range", "monostable_expressions",
]


def monostable_expressions() -> Any:
    """Derived sympy expressions of the monostable and two-timer PWM; see
    :func:`pwmkit.timing.monostable_symbolic.monostable_expressions`."""
    from .monostable_symbolic import monostable_expressions as _e

    return _e()


def expressions(topology: str, discharge: str = "general", control: str = "external", ideal: bool = False) -> Any:
    """Derived sympy expressions of a topology; see :func:`pwmkit.timing.symbolic.expressions`."""
    from .symbolic import expressions as _expressions

    return _expressions(topology, discharge, control, ideal)  # type: ignore[arg-type]


def diode_law_timing(*args: Any, **kwargs: Any) -> Any:
    """Diode-law timing model; see :func:`pwmkit.timing.diode_law.diode_law_timing`."""
    from .diode_law import diode_law_timing as _f

    return _f(*args, **kwargs)
