"""Exception and warning classes shared by every pwmkit layer.

One family: :class:`DesignError` for input or physics that cannot give a
result, :class:`DesignWarning` for results that are computable but outside a
model's validity range.
"""

from __future__ import annotations

__all__ = ["DesignError", "DesignWarning"]


class DesignError(ValueError):
    """A design input or design point that pwmkit cannot evaluate.

    The message always names the parameter (or field), the offending value and
    what is allowed, and for impossible physics it says why in numbers.
    """


class DesignWarning(UserWarning):
    """A result that is computable but lies outside a model's validity range."""
