"""pwmkit — exact design models for 555-type astable PWM drivers.

The top-level import is light: numpy only. Submodules (``timing``,
``eseries``, ``loads``, ``tolerance``, ``synthesis``, ``checks``, ``record``…)
are imported on first attribute access; sympy is imported only when a
symbolic derivation is first needed, and ipywidgets/bokeh only by
``pwmkit.widgets``.

Layers (arrows only downwards):

1. models — ``values``, ``eseries``, ``parts``, ``timing``, ``loads``;
2. design — ``tolerance``, ``sensitivity``, ``synthesis``, ``checks``, ``design``, ``record``, ``bench``;
3. presentation — ``widgets``, ``plots``, ``report``, ``schematic``, ``cli``.
"""

from __future__ import annotations

import importlib
from typing import Any

from .errors import DesignError, DesignWarning, ModelLimit
from .values import format_value, parse_value

__version__ = "0.1.0"

__all__ = ["DesignError", "DesignWarning", "ModelLimit", "parse_value", "format_value", "__version__"]

_LAZY = {
    "values",
    "eseries",
    "parts",
    "timing",
    "loads",
    "tolerance",
    "sensitivity",
    "synthesis",
    "checks",
    "design",
    "evaluate",
    "cautions",
    "record",
    "bench",
    "plots",
    "schematic",
    "widgets",
    "cli",
    "two_timer_design",
    "synthesis_two_timer",
    "evaluate_two_timer",
    "evaluate_heater",
}


def __getattr__(name: str) -> Any:
    if name in _LAZY:
        return importlib.import_module(f".{name}", __name__)
    raise AttributeError(f"module 'pwmkit' has no attribute {name!r}")


def __dir__() -> list[str]:
    return sorted(set(globals()) | _LAZY)
