"""Property-based tests (hypothesis): wide random inputs give finite positive timing or a DesignError."""

from __future__ import annotations

import math

from hypothesis import given, settings
from hypothesis import strategies as st

from pwmkit import DesignError
from pwmkit.timing import astable

wide_r = st.one_of(st.floats(min_value=-1e3, max_value=1e9), st.sampled_from([float("nan"), float("inf"), 0.0]))
wide_v = st.floats(min_value=-5, max_value=40, allow_nan=False, allow_infinity=False)


@settings(max_examples=300, deadline=None)
@given(
    topology=st.sampled_from(["classic", "bypass", "steered", "pot"]),
    ra=wide_r, rb=wide_r, pot=wide_r,
    c=st.floats(min_value=-1e-9, max_value=1.0, allow_nan=False),
    vcc=wide_v, vd=st.floats(min_value=-0.5, max_value=3), vsat=st.floats(min_value=-0.5, max_value=3),
    wiper=st.floats(min_value=-0.2, max_value=1.2),
    vctl=st.one_of(st.none(), wide_v),
    timer=st.sampled_from(["bipolar", "cmos"]),
)
def test_finite_positive_or_design_error(topology, ra, rb, pot, c, vcc, vd, vsat, wiper, vctl, timer) -> None:
    kw = dict(ra=ra, rb=rb, c=c, vcc=vcc, vd=vd, vsat=vsat, vctl=vctl, timer=timer)
    if topology == "pot":
        kw.update(pot=pot, wiper=wiper)
    try:
        r = astable(topology, **kw)
    except DesignError:
        return
    for x in (r.t_high, r.t_low, r.period, r.frequency):
        assert math.isfinite(x) and x >= 0
    assert r.period > 0 and r.frequency > 0
    assert 0.0 <= r.duty <= 1.0


@settings(max_examples=100, deadline=None)
@given(text=st.text(max_size=12))
def test_arbitrary_text_for_a_value_is_design_error_or_works(text: str) -> None:
    try:
        r = astable("steered", ra=text, rb=10e3, c=1e-8, vcc=12)
    except DesignError:
        return
    assert math.isfinite(r.frequency)
