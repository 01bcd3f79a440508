"""Property tests that must reach their assertions (helper of the test suite).

A property test (hypothesis) that returns early — a :class:`pwmkit.DesignError` for an input
that is rightly refused — checks nothing for that example. :func:`reaching` wraps the test
(put it above ``@settings``/``@given``), counts the examples and those that got past the early
returns (the body calls :func:`reached` just before its assertions) and fails when fewer than
``minimum`` of them did: the strategies must build mostly valid inputs.

Examples drawn from the wild branch of :func:`mostly` (wide, often invalid inputs that check the
DesignError path) are counted apart: the share is judged over the examples from the valid branch,
and the wild ones may not be more than half of all. (Hypothesis does not draw the branch with a
fixed probability, so a share over all examples would pass or fail with the random seed.)
"""

from __future__ import annotations

import functools
from collections.abc import Callable
from typing import Any

__all__ = ["reaching", "reached", "mostly", "MINIMUM"]

#: Share of the examples that must reach the assertions.
MINIMUM = 0.8

_stack: list[list[int]] = []  # [tried, reached, wild, current example is wild] of the running property test
_drawn_wild = False  # set while an example is drawn from the wild branch of mostly()
#: test name → (reached, tried) of its last run (for inspection).
RATES: dict[str, tuple[int, int]] = {}


def reached() -> None:
    """Mark the running example as having reached the assertions."""
    if _stack and not _stack[-1][3]:
        _stack[-1][1] += 1


def _mark_wild(value: Any) -> Any:
    global _drawn_wild
    _drawn_wild = True
    return value


def reaching(minimum: float = MINIMUM) -> Callable[[Callable[..., Any]], Callable[..., Any]]:
    """Decorator: run the hypothesis test, then require reached/tried ≥ ``minimum``."""

    def deco(test: Callable[..., Any]) -> Callable[..., Any]:
        inner = test.hypothesis.inner_test  # type: ignore[attr-defined]

        @functools.wraps(inner)
        def counted(*args: Any, **kwargs: Any) -> Any:
            global _drawn_wild
            wild, _drawn_wild = _drawn_wild, False
            if _stack:
                _stack[-1][0] += 1
                _stack[-1][2] += wild
                _stack[-1][3] = wild
            return inner(*args, **kwargs)

        test.hypothesis.inner_test = counted  # type: ignore[attr-defined]

        @functools.wraps(test)
        def wrapper(*args: Any, **kwargs: Any) -> None:
            global _drawn_wild
            _drawn_wild = False
            _stack.append([0, 0, 0, 0])
            try:
                test(*args, **kwargs)
                tried, got, wild, _current = _stack[-1]
            finally:
                _stack.pop()
            valid = tried - wild
            RATES[test.__name__] = (got, valid)
            assert tried > 0, "the property test ran no examples"
            assert wild <= tried / 2, f"{wild} of {tried} examples came from the wild branch; at most half may"
            assert got / valid >= minimum, (f"only {got} of {valid} examples ({100 * got / valid:.0f} %) from the "
                                            f"valid branch reached the assertions; at least {100 * minimum:.0f} % must")

        return wrapper

    return deco


def mostly(valid: Any, wild: Any, wild_share: int = 20) -> Any:
    """A strategy drawing from ``valid`` most of the time and from ``wild`` about 1 in ``wild_share``.

    The wide, often invalid inputs keep checking that bad input gives a DesignError (never NaN),
    while most examples are built to pass validation and reach the assertions.
    """
    from hypothesis import strategies as st

    # a middle value picks the wild branch: hypothesis favours the ends of an integer range
    wild = wild.map(_mark_wild)  # counted apart by reaching()
    return st.integers(min_value=1, max_value=wild_share).flatmap(lambda k: wild if k == wild_share // 2 else valid)
