"""Rich-display hooks that the presentation layer registers for lower-layer objects (internal).

The design layer must not import presentation code, yet a :class:`~pwmkit.design.Design` shown in
a notebook should carry its annotated schematic. So the design object asks this registry for
extra HTML, and the presentation layer fills the registry when it is imported
(:mod:`pwmkit.schematic` registers the schematic drawing). Nothing here imports anything heavy.
"""

from __future__ import annotations

from collections.abc import Callable
from typing import Any

__all__ = ["register_html", "extra_html"]

#: (kind, key) → function(obj) -> HTML fragment; ``kind`` names the object type ("design").
_HOOKS: dict[tuple[str, str], Callable[[Any], str]] = {}


def register_html(kind: str, key: str, render: Callable[[Any], str]) -> None:
    """Add (or replace) the HTML fragment ``render(obj)`` shown after objects of ``kind``."""
    _HOOKS[(kind, key)] = render


def extra_html(kind: str, obj: Any) -> str:
    """Every registered fragment for ``obj``, in registration order."""
    return "".join(render(obj) for (k, _), render in list(_HOOKS.items()) if k == kind)
