"""The verdict judges the tolerance spread by the stated criterion, never the nominal value alone.

Sources named beside each check:
- the oracle corners are evaluated directly with pwmkit.timing.astable at part values built from the
  design's own tolerances (not from the worst-case search under test);
- facts of the trade (common practice): a worst-case criterion accepts a design only when every corner
  of the tolerance box meets the requirement; a yield criterion when the share of builds that meet it
  reaches the stated figure.
"""

from __future__ import annotations

import dataclasses as dc

import pytest

from pwmkit import DesignError
from pwmkit.design import Requirements, demo_designs
from pwmkit.evaluate import evaluate, timing_kwargs
from pwmkit.record import design_from_toml, design_to_toml
from pwmkit.requirement_spread import corner_text, requirement_spread
from pwmkit.timing import astable

GROW = demo_designs()["grow-bar"]
# the grow-bar against the narrower window it was once given: 6 kHz ± 25 % = 4.5 … 7.5 kHz
NARROW = GROW.replace(requirements=dc.replace(GROW.requirements, frequency_tolerance=0.25))


@pytest.fixture(scope="module")
def narrow_full():
    return evaluate(NARROW, n_mc=4000, seed=1)


def test_nominal_inside_but_a_corner_outside_fails_and_names_the_corner(narrow_full) -> None:
    ev = narrow_full
    f0 = float(ev.timing.frequency)
    assert 4500.0 < f0 < 7500.0  # the nominal point alone would pass
    # oracle: one corner of the stated box, evaluated directly — all resistors and the capacitor at
    # +tolerance, pot +20 %, lowest supply, wiper at the slow end of the travel (no temperature, no
    # timer error: the true worst case can only be further out)
    t = NARROW.timing
    kw = timing_kwargs(NARROW)
    kw.update(ra=t.ra * 1.05, rb=t.rb * 1.05, pot=t.pot * 1.2, c=t.c * 1.05, vcc=NARROW.vcc_min, wiper=0.0)
    f_corner = float(astable("pot", **kw).frequency)
    assert f_corner < 4500.0  # this corner leaves the required window
    f = ev.findings.by_id("frequency.target")
    assert f.severity == "fail"
    assert ev.requirement_spread.frequency_low <= f_corner * (1 + 1e-9)
    assert "wiper 0 %" in f.explanation and "pot +20 %" in f.explanation and "vcc 11.4 V" in f.explanation


def test_quick_mode_lists_the_spread_checks_as_not_run() -> None:
    quick = evaluate(NARROW, spread=False)
    full = evaluate(NARROW, n_mc=1000, seed=1)
    assert [f.id for f in quick.findings] == [f.id for f in full.findings]  # the same checks, never dropped
    not_run = {f.id for f in quick.findings if f.severity == "not-run"}
    assert not_run == {"tolerance.analysis", "frequency.target", "duty.range"}
    assert quick.findings.not_run_count == 3 and quick.findings.worst in ("ok", "warn", "fail")
    assert all("not run" in quick.findings.by_id(i).explanation for i in not_run)


def test_yield_criterion_passes_or_fails_at_the_stated_share(narrow_full) -> None:
    y = narrow_full.requirement_spread.frequency_yield
    assert 0.5 < y < 1.0  # some builds miss, most meet
    lenient = NARROW.replace(requirements=dc.replace(NARROW.requirements, criterion="yield", min_yield=y - 0.02))
    strict = NARROW.replace(requirements=dc.replace(NARROW.requirements, criterion="yield", min_yield=min(y + 0.005,
                                                                                                         1.0)))
    ok = evaluate(lenient, n_mc=4000, seed=1).findings.by_id("frequency.target")
    bad = evaluate(strict, n_mc=4000, seed=1).findings.by_id("frequency.target")
    assert ok.severity == "ok" and "meets the criterion" in ok.explanation and "corners leave it" in ok.explanation
    assert bad.severity == "fail" and "of the Monte Carlo builds" in bad.explanation


def test_demo_designs_meet_their_requirements_at_every_corner() -> None:
    for design in demo_designs().values():
        rs = requirement_spread(design, timing_kwargs(design), n=2000, seed=1)
        lo, hi = design.requirements.frequency_window
        assert lo <= rs.frequency_low and rs.frequency_high <= hi, design.name
        assert rs.duty_inside(), design.name


def test_pot_duty_reach_is_judged_at_both_ends_of_the_travel() -> None:
    # the fan's nominal travel reaches 1.9 … 98 % duty; asked for 2 … 97.5 % the corners cannot keep it
    fan = demo_designs()["fan"]
    d = fan.replace(requirements=dc.replace(fan.requirements, duty_min=0.02, duty_max=0.975))
    ev = evaluate(d, n_mc=2000, seed=1)
    rs = ev.requirement_spread
    assert rs.duty_kind == "reach" and not rs.duty_inside()
    f = ev.findings.by_id("duty.range")
    assert f.severity == "fail" and ("bottom end stops" in f.explanation or "top end stops" in f.explanation)


def test_requirements_criterion_validation_and_file_round_trip() -> None:
    with pytest.raises(DesignError, match="requirements.criterion"):
        Requirements(criterion="median")
    with pytest.raises(DesignError, match="requirements.min_yield"):
        Requirements(criterion="yield", min_yield=0.0)
    d = GROW.replace(requirements=dc.replace(GROW.requirements, criterion="yield", min_yield=0.995))
    assert design_from_toml(design_to_toml(d)) == d
    text = design_to_toml(GROW).replace('criterion = "worst-case"\n', 'criterion = "yield"\n').replace(
        "min_yield = 0.99  # 99 %", 'min_yield = "97.5 %"')
    back = design_from_toml(text)
    assert back.requirements.criterion == "yield" and back.requirements.min_yield == pytest.approx(0.975)
    # files written before the criterion existed still load, judged worst-case
    old = "\n".join(line for line in design_to_toml(GROW).splitlines()
                    if not line.startswith(("criterion", "min_yield")))
    assert design_from_toml(old).requirements.criterion == "worst-case"
    with pytest.raises(DesignError, match="requirements.criterion"):
        design_from_toml(design_to_toml(GROW).replace('"worst-case"', '"best-case"'))


def test_corner_text_reads_like_a_bench_note() -> None:
    assert corner_text({"ra": 0.05, "vcc": 11.4, "ambient": 40.0}, 0.0) == "wiper 0 %, ra +5 %, vcc 11.4 V, ambient 40 °C"
