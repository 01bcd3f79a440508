"""Name lookup shared by the part-family registries (internal)."""

from __future__ import annotations

from collections.abc import Mapping
from typing import Any, TypeVar

from ..errors import DesignError

T = TypeVar("T")


def lookup(value: Any, registry: Mapping[str, T], cls: type, what: str, noun: str | None = None) -> T:
    """Return ``value`` if it is already a ``cls``, else the registry entry named by it.

    Names are matched case-insensitively with ``_`` and spaces read as ``-``. An unknown name is a
    :class:`DesignError` that lists the known names.
    """
    if isinstance(value, cls):
        return value  # type: ignore[return-value]
    if isinstance(value, str):
        key = value.strip().lower().replace("_", "-").replace(" ", "-")
        if key in registry:
            return registry[key]
    raise DesignError(f"{what}: {value!r} is not a known {noun or what} family; choose one of "
                      f"{', '.join(registry)} or pass a {cls.__name__}")
