"""Ranked part sets for requirements (pwmkit.shortlist), checked against outside references.

Sources named beside each check:
- pwmkit.timing.astable evaluated independently on every chosen set;
- IEC 60063:2015 preferred-number series (membership through pwmkit.eseries, itself tested against
  the published tables);
- facts of the trade (common practice): the classic astable's duty exceeds 50 %; a worst-case
  criterion is met only when every corner meets the requirement.
"""

from __future__ import annotations

import pytest

from pwmkit import DesignError, eseries
from pwmkit.design import Design, LedLoad, MotorLoad, Requirements, Timing
from pwmkit.shortlist import Cancelled, shortlist
from pwmkit.timing import astable


def _start(topology: str, req: Requirements, **design: object) -> Design:
    t = Timing(topology=topology, pot=50e3, wiper=0.5) if topology == "pot" else Timing(topology=topology)
    return Design(name="target", timing=t, requirements=req, **design)


TARGETS = [
    ("pot", Requirements(frequency=25e3, frequency_tolerance=0.3, duty_min=0.2, duty_max=0.9),
     dict(vcc=12.0, load=MotorLoad())),
    ("steered", Requirements(frequency=1e3, frequency_tolerance=0.2, duty_min=0.25, duty_max=0.35),
     dict(vcc=12.0, vcc_min=11.0, vcc_max=13.0)),
    ("classic", Requirements(frequency=500.0, frequency_tolerance=0.25, duty_min=0.6, duty_max=0.75),
     dict(vcc=9.0, load=LedLoad())),
]


@pytest.mark.parametrize("topology,req,extra", TARGETS)
def test_chosen_sets_are_reproduced_by_astable_and_sit_on_their_series(topology, req, extra) -> None:
    result = shortlist(_start(topology, req, **extra), topology=topology, top=5, n_yield=500)
    assert result.found and 1 <= len(result) <= 5
    assert [r.rank for r in result] == list(range(1, len(result) + 1))
    for r in result:
        t = r.design.timing
        kw = dict(ra=t.ra, rb=t.rb, c=t.c, vcc=r.design.vcc, timer=t.timer)
        if topology == "pot":
            kw.update(pot=t.pot, wiper=t.wiper)
        if topology != "classic":
            kw["vd"] = t.steering_vd()
        a = astable(topology, **kw)
        # the nominal figures the search reports are astable's own
        assert float(a.frequency) == pytest.approx(r.candidate.frequency, rel=1e-9)
        lo, hi = req.frequency_window
        assert lo <= float(a.frequency) <= hi
        if topology != "pot":
            want_lo = req.duty_min if req.duty_min is not None else req.duty - 0.02
            want_hi = req.duty_max if req.duty_max is not None else req.duty + 0.02
            assert want_lo - 1e-9 <= float(a.duty) <= want_hi + 1e-9
        # IEC 60063 membership: the nearest series value is the value itself
        for key in ("ra", "rb"):
            assert eseries.nearest(getattr(t, key), t.r_series) == getattr(t, key)
        assert eseries.nearest(t.c, t.c_series) == t.c
        # a set that "meets" the worst-case criterion has every corner inside
        if r.meets:
            assert lo <= r.spread.frequency_low and r.spread.frequency_high <= hi
            assert r.spread.duty_inside()
        assert r.discharge_current > 0
    assert result[0].meets  # sets that meet the criterion come first


def test_impossible_target_gives_the_nearest_miss() -> None:
    # classic astable: duty is always above 50 % (charge through RA + RB, discharge through RB only)
    req = Requirements(frequency=1e3, frequency_tolerance=0.1, duty=0.3)
    result = shortlist(_start("classic", req), topology="classic", top=3, n_yield=200)
    assert not result.found and len(result) == 0
    assert "below 50 %" in result.nearest_miss()


def test_window_too_narrow_for_the_pot_tolerance_is_not_found_and_says_why() -> None:
    req = Requirements(frequency=25e3, frequency_tolerance=0.05, duty_min=0.2, duty_max=0.9)
    result = shortlist(_start("pot", req, vcc=12.0), top=3, n_yield=200)
    assert not result.found and len(result) == 3
    assert "pot +20 %" in result.nearest_miss() or "pot -20 %" in result.nearest_miss()


def test_progress_and_cancel() -> None:
    req = Requirements(frequency=25e3, frequency_tolerance=0.3, duty_min=0.2, duty_max=0.9)
    seen: list[float] = []
    shortlist(_start("pot", req), top=2, n_yield=200, progress=lambda f, _s: seen.append(f))
    assert seen[-1] == 1.0 and all(0.0 <= f <= 1.0 for f in seen) and len(seen) > 3
    with pytest.raises(Cancelled):
        shortlist(_start("pot", req), top=2, n_yield=200, cancel=lambda: len(seen) > 0)


@pytest.mark.parametrize(("kw", "match"), [
    (dict(top=0), "top"), (dict(n_yield=5), "n_yield"), (dict(seed=-1), "seed"), (dict(topology="ring"), "topology"),
])
def test_bad_options(kw: dict, match: str) -> None:
    req = Requirements(frequency=25e3, frequency_tolerance=0.3, duty_min=0.2, duty_max=0.9)
    with pytest.raises(DesignError, match=match):
        shortlist(_start("pot", req), **kw)
