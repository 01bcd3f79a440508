"""Monte Carlo and worst-case spread against outside references.

Sources named beside each check:
- JCGM 100:2008 (GUM) §5.1.2: for small tolerances the Monte Carlo standard deviation converges to the
  first-order propagation from the sensitivities (JCGM 101:2008 makes the same comparison);
- the definition of a worst case: no sample inside the box may fall outside the bounds;
- RC-timing facts of the trade (common practice): ideal classic f ∝ 1/((RA + 2RB)·C), duty
  (RA + RB)/(RA + 2RB);
- brute-force scans of pwmkit.timing.astable over the box (an independent route for the interior search);
- probability of a uniform band (elementary): P(a ≤ x) for x ~ U(lo, hi);
- typical published datasheet values, generic: bipolar 555-type initial accuracy 2.25 %;
- C0G temperature characteristic 0 ± 30 ppm/K (EIA code, from memory); silicon diode −2 mV/K (common practice).
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from pwmkit import DesignError
from pwmkit.sensitivity import sensitivities
from pwmkit.timing import astable
from pwmkit.tolerance import monte_carlo, worst_case

BOXES = [
    ("classic", {"ra": 0.05, "rb": 0.05, "c": 0.1, "vsat": 0.3}, dict(ra=4.7e3, rb=22e3, c=47e-9, vcc=12.0)),
    ("bypass", {"ra": 0.05, "rb": 0.01, "c": (-0.2, 0.1), "vd": 0.1, "vctl": 0.05},
     dict(ra=10e3, rb=3.3e3, c=100e-9, vcc=12.0)),
    ("steered", {"ra": 0.02, "rb": 0.02, "c": 0.05, "vd": 0.1, "vcc": 0.1}, dict(ra=10e3, rb=3.3e3, c=1e-7, vcc=5.0,
                                                                            timer="cmos")),
    ("pot", {"ra": 0.05, "rb": 0.05, "pot": 0.2, "c": 0.05, "wiper": 0.02},
     dict(ra=1e3, rb=1e3, pot=47e3, wiper=0.3, c=10e-9, vcc=12.0)),
]


@pytest.mark.parametrize("topology,tol,kw", BOXES)
def test_worst_case_bounds_enclose_monte_carlo_extremes(topology: str, tol: dict, kw: dict) -> None:
    w = worst_case(topology, tolerances=tol, **kw)
    mc = monte_carlo(topology, n=50_000, seed=7, tolerances=tol, distribution="uniform", **kw)
    # definition of a worst case over the same box: every Monte Carlo sample lies inside the bounds
    eps = 1e-12
    assert w.frequency_min * (1 - eps) <= mc.frequency.min() and mc.frequency.max() <= w.frequency_max * (1 + eps)
    assert w.duty_min - eps <= mc.duty.min() and mc.duty.max() <= w.duty_max + eps
    # and the bounds are not loose: uniform sampling comes within a few per cent of the band
    assert mc.frequency.max() - mc.frequency.min() > 0.8 * (w.frequency_max - w.frequency_min)


def test_worst_case_with_conditions_encloses_monte_carlo() -> None:
    kw = dict(ra=10e3, rb=4.7e3, c=22e-9, vcc=12.0, vd=0.6)
    opts = dict(tolerances={"ra": 0.01, "rb": 0.01}, dielectric="X7R", t_ambient_c=(-20, 70), vcc_range=(10.5, 13.5),
                timer_errors=True)
    w = worst_case("steered", **opts, **kw)
    mc = monte_carlo("steered", n=50_000, seed=3, **opts, **kw)
    # definition of a worst case (temperature-coupled shifts taken independently can only widen the box)
    assert w.frequency_min <= mc.frequency.min() and mc.frequency.max() <= w.frequency_max
    assert w.duty_min <= mc.duty.min() and mc.duty.max() <= w.duty_max
    assert any("ambient" in s for s in w.sources) and any("X7R" in s for s in mc.sources)


def test_classic_ideal_corners_common_practice() -> None:
    ra, rb, c = 10e3, 10e3, 100e-9
    w = worst_case("classic", tolerances={"ra": 0.01, "rb": 0.01, "c": 0.1}, ra=ra, rb=rb, c=c, vcc=12, vsat=0,
                   r_on=0)

    def f(a: float, b: float, cc: float) -> float:  # common practice: f = 1/(ln2·(RA+2RB)·C)
        return 1.0 / (math.log(2) * (a + 2 * b) * cc)

    assert w.method == "corners" and not w.non_monotonic
    assert w.frequency_max == pytest.approx(f(0.99 * ra, 0.99 * rb, 0.9 * c), rel=1e-12)
    assert w.frequency_min == pytest.approx(f(1.01 * ra, 1.01 * rb, 1.1 * c), rel=1e-12)
    # duty (RA+RB)/(RA+2RB) (common practice) is largest with RA high and RB low
    assert w.duty_max == pytest.approx((1.01 * ra + 0.99 * rb) / (1.01 * ra + 2 * 0.99 * rb), rel=1e-12)
    assert w.duty_min == pytest.approx((0.99 * ra + 1.01 * rb) / (0.99 * ra + 2 * 1.01 * rb), rel=1e-12)
    assert w.frequency_max_at.deviations == {"ra": -0.01, "rb": -0.01, "c": -0.1} and w.frequency_max_at.corner


def test_extreme_point_reproduces_the_extreme_with_astable() -> None:
    topology, tol, kw = BOXES[1]
    w = worst_case(topology, tolerances=tol, timer_errors=True, **kw)
    p = dict(w.frequency_max_at.params)
    factor = p.pop("frequency_factor")
    # independent evaluation of the reported point with astable()
    assert astable(topology, **p).frequency * factor == pytest.approx(w.frequency_max, rel=1e-12)


def test_non_monotonic_response_triggers_interior_search() -> None:
    # classic with a driven control pin near 2·vsat: t_low falls and t_high rises with vctl, so the
    # frequency peaks inside the band
    kw = dict(ra=1e3, rb=100e3, c=10e-9, vcc=12.0, vsat=0.1, vctl=1.7)
    tol = {"vctl": 0.2, "ra": 0.01}
    w = worst_case("classic", tolerances=tol, **kw)
    assert w.method == "corners+interior" and "frequency: vctl" in w.non_monotonic
    corners = [astable("classic", **{**kw, "ra": kw["ra"] * (1 + a), "vctl": kw["vctl"] * (1 + b)}).frequency
               for a in (-0.01, 0.01) for b in (-0.2, 0.2)]
    assert w.frequency_max > max(corners) * (1 + 1e-4)
    assert not w.frequency_max_at.corner
    # brute-force scan with astable() over a fine grid (independent route): the search finds the peak
    vctl = np.linspace(0.8 * 1.7, 1.2 * 1.7, 40001)
    scan = max(astable("classic", **{**kw, "ra": kw["ra"] * (1 + a), "vctl": vctl}).frequency.max()
               for a in (-0.01, 0.0, 0.01))
    assert w.frequency_max == pytest.approx(scan, rel=1e-7)
    assert w.frequency_max >= scan * (1 - 1e-12)
    never = worst_case("classic", tolerances=tol, interior="never", **kw)
    assert never.method == "corners" and never.frequency_max < w.frequency_max


def test_monotonic_case_many_dimensions_random_interior_when_forced() -> None:
    topology, tol, kw = BOXES[1]
    auto = worst_case(topology, tolerances=tol, **kw)
    forced = worst_case(topology, tolerances={**tol, "vsat": 0.2, "rb": 0.02, "ra": 0.03}, interior="always", seed=1,
                        **kw)
    assert auto.method == "corners"
    assert forced.method == "corners+interior" and forced.n_evaluated > 2**6


@pytest.mark.parametrize("distribution,divisor", [("uniform", math.sqrt(3.0)), ("normal", 3.0)])
def test_monte_carlo_std_converges_to_gum_jcgm100(distribution: str, divisor: float) -> None:
    tol = {"ra": 0.005, "rb": 0.005, "c": 0.005, "vd": 0.01, "vcc": 0.01}
    kw = dict(ra=10e3, rb=4.7e3, c=22e-9, vcc=12.0, vd=0.6)
    s = sensitivities("steered", tolerances=tol, distribution=distribution, **kw)
    mc = monte_carlo("steered", n=400_000, seed=11, tolerances=tol, distribution=distribution, **kw)
    # JCGM 100:2008 §5.1.2 (first-order law of propagation) vs Monte Carlo: agree within a few per cent
    assert mc.frequency_std / mc.nominal_frequency == pytest.approx(s.frequency_rel_std, rel=0.02)
    assert mc.duty_std == pytest.approx(s.duty_std, rel=0.02)
    # the GUM figure is itself Σ (S·tol/divisor)² (JCGM 100:2008 §4.3.7 / 3σ normal)
    manual = math.sqrt(sum((s.row(n).s_frequency * t / divisor) ** 2 for n, t in tol.items()))
    assert s.frequency_rel_std == pytest.approx(manual, rel=1e-12)


def test_timer_initial_accuracy_band_datasheet_generic() -> None:
    mc = monte_carlo("classic", n=200_000, seed=2, tolerances={}, timer_errors=True, ra=10e3, rb=10e3, c=1e-7,
                     vcc=12)
    ratio = mc.frequency / mc.nominal_frequency - 1
    # bipolar 555-type initial accuracy 2.25 % (typical published datasheet value, generic), uniform band
    assert ratio.min() >= -0.0225 and ratio.max() <= 0.0225
    assert ratio.std() == pytest.approx(0.0225 / math.sqrt(3), rel=0.01)
    assert np.all(mc.duty == mc.nominal_duty)


def test_c0g_temperature_band_eia_code() -> None:
    kw = dict(ra=10e3, rb=10e3, c=10e-9, vcc=12, vsat=0, r_on=0)
    w = worst_case("classic", tolerances={"c": 0.0}, dielectric="C0G", t_ambient_c=(-55, 125), **kw)
    # C0G: 0 ± 30 ppm/K (EIA code, from memory); 100 K above 25 °C → ±0.3 %, and f ∝ 1/C
    assert w.frequency_max / w.frequency_nominal == pytest.approx(1 / (1 - 0.003), rel=1e-12)
    assert w.frequency_min / w.frequency_nominal == pytest.approx(1 / (1 + 0.003), rel=1e-12)


def test_diode_tempco_moves_the_frequency_common_practice() -> None:
    kw = dict(ra=10e3, rb=10e3, c=100e-9, vcc=12, vd=0.65, vsat=0.1)
    w = worst_case("steered", tolerances={}, t_ambient_c=(-20, 80), **kw)
    # silicon junction −2 mV/K (common practice): warm → lower drop → faster; evaluated with astable()
    hot = astable("steered", **{**kw, "vd": 0.65 - 2e-3 * 55}).frequency
    cold = astable("steered", **{**kw, "vd": 0.65 + 2e-3 * 45}).frequency
    assert w.frequency_max == pytest.approx(hot, rel=1e-12)
    assert w.frequency_min == pytest.approx(cold, rel=1e-12)


def test_non_oscillating_samples_are_counted_not_fatal_when_allowed() -> None:
    kw = dict(ra=10e3, rb=10e3, c=1e-7, vcc=5.0, vd=1.2, vctl=3.5)
    tol = {"vd": 0.5}
    # one diode in series with the charge path (steered), 5 V supply, upper threshold 3.5 V: the charge
    # stalls once vcc − vd ≤ 3.5 V, i.e. vd ≥ 1.5 V (RC law: the asymptote must lie above the threshold;
    # Alexander & Sadiku, Fundamentals of Electric Circuits, 6th ed., ch. 7), i.e. δ ≥ 0.25 of U(−0.5, 0.5).
    # (A diode across rb — the bypass topology — does not stall: rb carries the rest of the charge.)
    with pytest.raises(DesignError, match=r"of 20000 samples do not oscillate .*latches high"):
        monte_carlo("steered", n=20_000, seed=5, tolerances=tol, **kw)
    mc = monte_carlo("steered", n=100_000, seed=5, tolerances=tol, allow_failures=True,
                     frequency_window=(0, 1e9), **kw)
    p = 0.5 - (1.5 / 1.2 - 1.0)   # elementary probability of the uniform band
    assert mc.n_failed / mc.n == pytest.approx(p, abs=0.005)
    assert mc.frequency.size == mc.n - mc.n_failed and mc.failure_reasons == {"latch_high": mc.n_failed}
    assert mc.yield_ == pytest.approx(1 - mc.n_failed / mc.n, abs=1e-12)   # failures count against the yield
    assert np.all(np.isfinite(mc.frequency)) and np.all(np.isfinite(mc.duty))
    with pytest.raises(DesignError, match="does not oscillate"):
        worst_case("steered", tolerances=tol, **kw)


def test_results_percentiles_histogram_yield_and_seed() -> None:
    kw = dict(ra="4k7", rb="10k", c="22n", vcc=12, vd=0.6)
    tol = {"ra": "5%", "rb": "5%", "c": 0.1}
    a = monte_carlo("bypass", n=30_000, seed=42, tolerances=tol, frequency_window=(1800, 2300),
                    duty_window=(0.3, 0.5), bins=40, **kw)
    b = monte_carlo("bypass", n=30_000, seed=42, tolerances=tol, **kw)
    c = monte_carlo("bypass", n=30_000, seed=43, tolerances=tol, **kw)
    assert np.array_equal(a.frequency, b.frequency) and not np.array_equal(a.frequency, c.frequency)
    assert a.frequency.shape == (30_000,) and a.n_failed == 0
    p = a.percentile([5, 50, 95])
    assert np.all(np.diff(p.frequency) > 0)
    assert a.percentile(50).frequency == pytest.approx(float(np.median(a.frequency)), rel=1e-12)
    assert a.frequency_histogram.counts.sum() == 30_000 and a.duty_histogram.edges.size == 41
    inside = ((a.frequency >= 1800) & (a.frequency <= 2300) & (a.duty >= 0.3) & (a.duty <= 0.5)).mean()
    assert a.yield_ == pytest.approx(inside, abs=1e-12)
    assert a.yield_for(frequency_window=(0, 1e9)) == 1.0
    assert b.yield_ is None
    assert a._repr_html_().startswith("<table") and "yield" in a._repr_html_()
    assert "SpreadResult(bypass" in repr(a)


def test_per_parameter_distribution_override() -> None:
    kw = dict(ra=10e3, rb=10e3, c=1e-7, vcc=12, vsat=0, r_on=0)
    mc = monte_carlo("classic", n=200_000, seed=9, tolerances={"c": 0.09}, distribution="uniform",
                     distributions={"c": "normal"}, **kw)
    # f ∝ 1/C (common practice) with C normal, tolerance = 3σ = 9 % → σ_f/f ≈ 3 % (first order)
    assert (mc.frequency / mc.nominal_frequency).std() == pytest.approx(0.03, rel=0.03)
    assert any("normal" in s for s in mc.sources)


@pytest.mark.parametrize("kw,match", [
    (dict(n=0, seed=1, tolerances={"ra": 0.1}), "n:"),
    (dict(n=10, seed=-1, tolerances={"ra": 0.1}), "seed"),
    (dict(n=10, seed=1, tolerances={"bogus": 0.1}), "not a timing parameter"),
    (dict(n=10, seed=1, tolerances={"vd": 0.1}), "not used by the 'classic'"),
    (dict(n=10, seed=1, tolerances={"vcc": 0.1}, vcc_range=(10, 14)), "not both"),
    (dict(n=10, seed=1, tolerances={"ra": 0.1}, distribution="triangle"), "distribution"),
    (dict(n=10, seed=1, tolerances={"ra": 0.1}, t_ambient_c=(50, 0)), "low end"),
    (dict(n=10, seed=1, tolerances={"ra": 0.1}, dielectric="C0G", t_ambient_c=(-60, 20)), "t_ambient_c"),
    (dict(n=10, seed=1, tolerances={"ra": 0.1}, dielectric="paper"), "dielectric"),
    (dict(n=10, seed=1, tolerances={"ra": 0.1}, bogus=3), "bogus"),
    (dict(n=10, seed=1, tolerances={"ra": 0.1}, distributions={"pot": "normal"}), "distributions: 'pot'"),
    (dict(n=10, seed=1, tolerances={"ra": 0.1}, distributions={"ra": "lognormal"}), "lognormal"),
])
def test_bad_input_is_design_error(kw: dict, match: str) -> None:
    with pytest.raises(DesignError, match=match):
        monte_carlo("classic", ra=10e3, rb=10e3, c=1e-7, vcc=12, **kw)


def test_worst_case_bad_input() -> None:
    with pytest.raises(DesignError, match="interior"):
        worst_case("classic", tolerances={"ra": 0.1}, interior="sometimes", ra=1e3, rb=1e3, c=1e-8, vcc=12)
    with pytest.raises(DesignError, match="upper threshold"):
        worst_case("classic", tolerances={"ra": 0.1}, ra=1e3, rb=1e3, c=1e-8, vcc=12, vctl=13)


def test_dielectric_data_eia_codes_and_lookup() -> None:
    from pwmkit.parts.capacitors import get_dielectric, suggest_dielectric

    x7r = get_dielectric("x7r")
    # X7R: ±15 % over −55 … +125 °C (EIA code, from memory) — reached at the ends of the rated range
    assert x7r.temperature_band(-55, 125) == pytest.approx((-0.15, 0.15))
    assert get_dielectric("NP0").name == "C0G" and get_dielectric("polyester").name == "film-PET"
    # aluminium electrolytic ±20 % (common practice) and only for large values
    alu = get_dielectric("electrolytic")
    assert alu.tolerance_asym == (-0.2, 0.2) and alu.c_range[0] >= 1e-6
    assert suggest_dielectric(1e-9).name == "C0G" and suggest_dielectric(100e-6).name == "electrolytic"
    lo, hi = get_dielectric("film-PET").temperature_envelope(np.array([25.0, 75.0]))
    assert lo[0] == hi[0] == 0.0 and 0.0 < lo[1] < hi[1]   # polyester: positive coefficient (from memory)
    with pytest.raises(DesignError, match="t_ambient_c"):
        x7r.temperature_envelope(150.0)
    with pytest.raises(DesignError, match="dielectric"):
        get_dielectric("mica")
    assert "X7R" in repr(x7r) and x7r._repr_html_().startswith("<table")
