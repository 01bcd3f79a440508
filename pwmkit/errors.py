"""Exception and warning classes shared by every pwmkit layer.

One family: :class:`DesignError` for input or physics that cannot give a
result (its subclass :class:`ModelLimit` for valid inputs at which the circuit
cannot work as modelled), :class:`DesignWarning` for results that are
computable but outside a model's validity range.
"""

from __future__ import annotations

__all__ = ["DesignError", "ModelLimit", "DesignWarning"]


class DesignError(ValueError):
    """A design input or design point that pwmkit cannot evaluate.

    The message always names the parameter (or field), the offending value and
    what is allowed, and for impossible physics it says why in numbers.
    """


class ModelLimit(DesignError):
    """A valid input at which the circuit cannot work as modelled — an expected limit of the model.

    The timer does not oscillate, the LED string is left no voltage, the gate drive cannot switch
    the MOSFET, a tolerance corner stops the oscillation. :func:`pwmkit.evaluate.evaluate` turns
    these (and only these) into findings and notes; any other :class:`DesignError` (bad input)
    propagates to the caller.
    """


class DesignWarning(UserWarning):
    """A result that is computable but lies outside a model's validity range."""
