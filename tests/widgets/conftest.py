"""Fixtures of the widget tests: the demo designs and panels built without a browser or kernel.

Without a running event loop the panels' debounced work runs at once, so every assertion can
follow the widget change directly.
"""

from __future__ import annotations

import pytest

from pwmkit.design import demo_designs


@pytest.fixture(scope="session")
def designs():
    return demo_designs()


@pytest.fixture
def grow(designs):
    return designs["grow-bar"]


@pytest.fixture
def fan(designs):
    return designs["fan"]


@pytest.fixture(scope="session")
def shared_dash(designs):
    """One grow-bar dashboard for read-only tests (building one costs about a second of bokeh work)."""
    from pwmkit.widgets import dashboard

    return dashboard(designs["grow-bar"])


@pytest.fixture
def dash(shared_dash, grow):
    """A fresh dashboard of the grow-bar design."""
    from pwmkit.widgets import dashboard

    return dashboard(grow)
