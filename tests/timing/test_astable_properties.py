"""Property-based tests (hypothesis): random inputs give finite positive timing or a DesignError.

The strategies build mostly valid, oscillating designs (component values over the decades the API
accepts, supplies 2–18 V, control voltages between the limits that let the network oscillate);
about one example in ten draws wide, often invalid values instead. Each test requires at least
80 % of its examples to reach the assertions (tests/reach.py).
"""

from __future__ import annotations

import math

from hypothesis import given, settings
from hypothesis import strategies as st
from reach import mostly, reached, reaching

from pwmkit import DesignError
from pwmkit.timing import astable

wide_r = st.one_of(st.floats(min_value=-1e3, max_value=1e9), st.sampled_from([float("nan"), float("inf"), 0.0]))
wide_v = st.floats(min_value=-5, max_value=40, allow_nan=False, allow_infinity=False)


def _decades(lo: float, hi: float) -> st.SearchStrategy[float]:
    return st.floats(min_value=math.log10(lo), max_value=math.log10(hi)).map(lambda x: 10.0**x)


valid = st.fixed_dictionaries({
    "topology": st.sampled_from(["classic", "bypass", "steered", "pot"]),
    "ra": _decades(470.0, 1e6), "rb": _decades(470.0, 1e6), "pot": _decades(1e3, 1e6),
    "c": _decades(1e-10, 1e-4), "vcc": st.floats(min_value=4.5, max_value=18.0),
    "vd": st.floats(min_value=0.2, max_value=0.8), "vsat": st.floats(min_value=0.0, max_value=0.3),
    "wiper": st.floats(min_value=0.0, max_value=1.0),
    "vctl_share": st.one_of(st.none(), st.floats(min_value=0.35, max_value=0.75)),
    "timer": st.sampled_from(["bipolar", "cmos"]),
})
wild = st.fixed_dictionaries({
    "topology": st.sampled_from(["classic", "bypass", "steered", "pot"]),
    "ra": wide_r, "rb": wide_r, "pot": wide_r, "c": st.floats(min_value=-1e-9, max_value=1.0, allow_nan=False),
    "vcc": wide_v, "vd": st.floats(min_value=-0.5, max_value=3), "vsat": st.floats(min_value=-0.5, max_value=3),
    "wiper": st.floats(min_value=-0.2, max_value=1.2), "vctl": st.one_of(st.none(), wide_v),
    "timer": st.sampled_from(["bipolar", "cmos"]),
})


@reaching()
@settings(max_examples=300, deadline=None)
@given(case=mostly(valid, wild))
def test_finite_positive_or_design_error(case: dict) -> None:
    case = dict(case)
    share = case.pop("vctl_share", None)
    if "vctl" not in case:
        case["vctl"] = None if share is None else share * case["vcc"]
    topology, pot, wiper = case.pop("topology"), case.pop("pot"), case.pop("wiper")
    if topology == "pot":
        case.update(pot=pot, wiper=wiper)
    try:
        r = astable(topology, **case)
    except DesignError:
        return
    reached()
    for x in (r.t_high, r.t_low, r.period, r.frequency):
        assert math.isfinite(x) and x >= 0
    assert r.period > 0 and r.frequency > 0
    assert 0.0 <= r.duty <= 1.0


engineering = st.builds(lambda x, p, u: f"{x:.3g}{p}{u}", st.floats(min_value=1.0, max_value=999.0),
                        st.sampled_from(["", "k", "M"]), st.sampled_from(["", "Ω", " Ω", "ohm"]))


@reaching()
@settings(max_examples=100, deadline=None)
@given(text=mostly(engineering, st.text(max_size=12)))
def test_arbitrary_text_for_a_value_is_design_error_or_works(text: str) -> None:
    try:
        r = astable("steered", ra=text, rb=10e3, c=1e-8, vcc=12)
    except DesignError:
        return
    reached()
    assert math.isfinite(r.frequency)
