"""Lazy re-export of names from a package's submodules (internal).

A package lists ``{name: submodule}`` and gets module-level ``__getattr__`` and ``__dir__``
that import the submodule on first access, so importing the package stays cheap.
"""

from __future__ import annotations

import importlib
from collections.abc import Callable, Iterable, Mapping
from typing import Any


def lazy_exports(package: str, exports: Mapping[str, str], submodules: Iterable[str] = (),
                 namespace: Mapping[str, Any] | None = None) -> tuple[Callable[[str], Any], Callable[[], list[str]]]:
    """Return ``(__getattr__, __dir__)`` for ``package``.

    Parameters
    ----------
    package : the package's ``__name__``
    exports : public name → submodule that defines it
    submodules : submodule names that may be reached as attributes themselves
    namespace : the package's ``globals()`` (for ``__dir__``)
    """
    subs = frozenset(submodules)

    def __getattr__(name: str) -> Any:
        module = exports.get(name)
        if module is not None:
            return getattr(importlib.import_module(f".{module}", package), name)
        if name in subs:
            return importlib.import_module(f".{name}", package)
        raise AttributeError(f"module {package!r} has no attribute {name!r}")

    def __dir__() -> list[str]:
        return sorted(set(namespace or ()) | set(exports) | subs)

    return __getattr__, __dir__
