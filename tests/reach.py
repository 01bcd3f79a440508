"""Property tests that must reach their assertions (helper of the test suite).

A property test (hypothesis) that returns early — a :class:`pwmkit.DesignError` for an input
that is rightly refused — checks nothing for that example. :func:`reaching` wraps the test
(put it above ``@settings``/``@given``), counts the examples and those that got past the early
returns (the body calls :func:`reached` just before its assertions) and fails when fewer than
``minimum`` of them did: the strategies must build mostly valid inputs.
"""

from __future__ import annotations

import functools
from collections.abc import Callable
from typing import Any

__all__ = ["reaching", "reached", "mostly", "MINIMUM"]

#: Share of the examples that must reach the assertions.
MINIMUM = 0.8

_stack: list[list[int]] = []  # [tried, reached] of the running property test
#: test name → (reached, tried) of its last run (for inspection).
RATES: dict[str, tuple[int, int]] = {}


def reached() -> None:
    """Mark the running example as having reached the assertions."""
    if _stack:
        _stack[-1][1] += 1


def reaching(minimum: float = MINIMUM) -> Callable[[Callable[..., Any]], Callable[..., Any]]:
    """Decorator: run the hypothesis test, then require reached/tried ≥ ``minimum``."""

    def deco(test: Callable[..., Any]) -> Callable[..., Any]:
        inner = test.hypothesis.inner_test  # type: ignore[attr-defined]

        @functools.wraps(inner)
        def counted(*args: Any, **kwargs: Any) -> Any:
            if _stack:
                _stack[-1][0] += 1
            return inner(*args, **kwargs)

        test.hypothesis.inner_test = counted  # type: ignore[attr-defined]

        @functools.wraps(test)
        def wrapper(*args: Any, **kwargs: Any) -> None:
            _stack.append([0, 0])
            try:
                test(*args, **kwargs)
                tried, got = _stack[-1]
            finally:
                _stack.pop()
            RATES[test.__name__] = (got, tried)
            assert tried > 0, "the property test ran no examples"
            assert got / tried >= minimum, (f"only {got} of {tried} examples ({100 * got / tried:.0f} %) reached "
                                            f"the assertions; at least {100 * minimum:.0f} % must")

        return wrapper

    return deco


def mostly(valid: Any, wild: Any, wild_share: int = 20) -> Any:
    """A strategy drawing from ``valid`` most of the time and from ``wild`` about 1 in ``wild_share``.

    The wide, often invalid inputs keep checking that bad input gives a DesignError (never NaN),
    while most examples are built to pass validation and reach the assertions.
    """
    from hypothesis import strategies as st

    # a middle value picks the wild branch: hypothesis favours the ends of an integer range
    return st.integers(min_value=1, max_value=wild_share).flatmap(lambda k: wild if k == wild_share // 2 else valid)
