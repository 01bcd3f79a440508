"""Tests for pwmkit.eseries: IEC 60063 preferred-number series."""

from __future__ import annotations

import math
from decimal import ROUND_HALF_UP, Decimal, localcontext

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from reach import reached, reaching

from pwmkit import eseries
from pwmkit.errors import DesignError

# ---------------------------------------------------------------------------------------------------
# Published tables
# ---------------------------------------------------------------------------------------------------

# published: IEC 60063:2015 Table 1 (IEC 60063:2015 Table 1)
IEC_60063_E3 = (1.0, 2.2, 4.7)
IEC_60063_E6 = (1.0, 1.5, 2.2, 3.3, 4.7, 6.8)
IEC_60063_E12 = (1.0, 1.2, 1.5, 1.8, 2.2, 2.7, 3.3, 3.9, 4.7, 5.6, 6.8, 8.2)
IEC_60063_E24 = (1.0, 1.1, 1.2, 1.3, 1.5, 1.6, 1.8, 2.0, 2.2, 2.4, 2.7, 3.0, 3.3, 3.6, 3.9, 4.3, 4.7, 5.1,
                 5.6, 6.2, 6.8, 7.5, 8.2, 9.1)  # fmt: skip

# published: IEC 60063:2015 Table 2, E96 (IEC 60063:2015 Table 2, three-digit values ×100)
IEC_60063_E96_X100 = """
100 102 105 107 110 113 115 118 121 124 127 130 133 137 140 143 147 150 154 158 162 165 169 174
178 182 187 191 196 200 205 210 215 221 226 232 237 243 249 255 261 267 274 280 287 294 301 309
316 324 332 340 348 357 365 374 383 392 402 412 422 432 442 453 464 475 487 499 511 523 536 549
562 576 590 604 619 634 649 665 681 698 715 732 750 768 787 806 825 845 866 887 909 931 953 976
"""
IEC_60063_E96 = tuple(int(t) / 100 for t in IEC_60063_E96_X100.split())


def test_e3_e6_e12_e24_iec60063_table1():
    # published: IEC 60063:2015 Table 1
    assert eseries.values("E3") == IEC_60063_E3
    assert eseries.values("E6") == IEC_60063_E6
    assert eseries.values("E12") == IEC_60063_E12
    assert eseries.values("E24") == IEC_60063_E24


def test_e96_iec60063_table2():
    # published: IEC 60063:2015 Table 2 (E96)
    assert len(IEC_60063_E96) == 96
    assert eseries.values("E96") == IEC_60063_E96


def test_e24_values_that_break_the_rounding_rule_iec60063():
    # published: IEC 60063:2015 Table 1 has 2.7 … 8.2 where rounding 10**(i/24) to 2 figures gives
    # 2.6 … 8.3 (IEC 60063:2015 Table 2, recomputed here in decimal arithmetic)
    published = {10: 2.7, 11: 3.0, 12: 3.3, 13: 3.6, 14: 3.9, 15: 4.3, 16: 4.7, 22: 8.2}
    rule_gives = {10: 2.6, 11: 2.9, 12: 3.2, 13: 3.5, 14: 3.8, 15: 4.2, 16: 4.6, 22: 8.3}
    e24 = eseries.values("E24")
    for i in range(24):
        with localcontext() as ctx:
            ctx.prec = 30
            rounded = float((Decimal(10) ** (Decimal(i) / 24)).quantize(Decimal("0.1"), ROUND_HALF_UP))
        if i in published:
            assert e24[i] == published[i] and rounded == rule_gives[i]
        else:
            assert e24[i] == rounded  # all other E24 values follow the rule


def test_e192_exception_iec60063():
    # published: IEC 60063:2015 Table 2 — E192 has 9.20 at i = 185, the rule gives 9.19
    e192 = eseries.values("E192")
    assert e192[185] == 9.20
    assert 9.19 not in e192
    assert e192[184] == 9.09 and e192[186] == 9.31  # neighbours follow the rule (regression pin): 10**(184/192)=9.0878…


def test_e48_and_e96_are_subsets_iec60063():
    # published: IEC 60063:2015 — E48 is every 2nd E96 value, E96 every 2nd E192 value
    assert eseries.values("E48") == eseries.values("E96")[::2]
    assert eseries.values("E96") == eseries.values("E192")[::2]
    # E3 ⊂ E6 ⊂ E12 ⊂ E24 by the same step-of-two relation (published: IEC 60063:2015 Table 1)
    assert eseries.values("E3") == eseries.values("E6")[::2]
    assert eseries.values("E6") == eseries.values("E12")[::2]
    assert eseries.values("E12") == eseries.values("E24")[::2]


@pytest.mark.parametrize("name", eseries.SERIES)
def test_counts_order_and_range(name):
    # published: IEC 60063:2015 — series EN has N values per decade
    vals = eseries.values(name)
    assert len(vals) == int(name[1:])
    assert all(1.0 <= v < 10.0 for v in vals)
    assert list(vals) == sorted(set(vals))


@pytest.mark.parametrize("name", ["E48", "E96", "E192"])
def test_three_figure_series_within_half_a_step_of_ideal(name):
    # published: IEC 60063:2015 — values approximate 10**(i/N); 3-figure rounding error ≤ 0.5 % (common practice)
    n = int(name[1:])
    for i, v in enumerate(eseries.values(name)):
        assert abs(v / 10 ** (i / n) - 1) < 0.006


def test_names_case_insensitive_and_unknown():
    assert eseries.values("e24") == eseries.values("E24")
    assert eseries.values(" E12 ") == eseries.values("E12")
    for bad in ["E5", "E", "", "24", None, 24]:
        with pytest.raises(DesignError, match="allowed: E3, E6, E12, E24, E48, E96, E192"):
            eseries.values(bad)


def test_series_tuple():
    assert eseries.SERIES == ("E3", "E6", "E12", "E24", "E48", "E96", "E192")


def test_tolerance_common_practice():
    # common practice (tolerance associated with a series, common practice); E3 is associated with > ±20 % by IEC 60063 — 0.20 used
    expected = {"E3": 0.20, "E6": 0.20, "E12": 0.10, "E24": 0.05, "E48": 0.02, "E96": 0.01, "E192": 0.005}
    for name, tol in expected.items():
        assert eseries.tolerance(name) == tol
        assert eseries.tolerance(name.lower()) == tol
    with pytest.raises(DesignError, match="'E7'"):
        eseries.tolerance("E7")


# ---------------------------------------------------------------------------------------------------
# nearest / bracket / in_range
# ---------------------------------------------------------------------------------------------------


def test_nearest_examples():
    # IEC 60063 E24 values (published); log-distance choice computed by hand (regression pin)
    assert eseries.nearest(4600, "E24") == 4700.0  # ln(4700/4600)=0.0215 < ln(4600/4300)=0.0674
    assert (
        eseries.nearest(9.6e3, "E24") == 10000.0
    )  # across the decade edge: ln(10/9.6)=0.041 < ln(9.6/9.1)=0.053
    assert eseries.nearest(0.95, "E24") == 0.91  # ln(0.95/0.91)=0.0430 < ln(1/0.95)=0.0513
    assert eseries.nearest(0.97, "E24") == 1.0  # ln(1/0.97)=0.0305 < ln(0.97/0.91)=0.0638
    assert eseries.nearest(0.97, "E3") == 1.0
    assert eseries.nearest(134.95, "E24") == 130.0  # series-resistor law, common practice LED resistor example (regression pin): 130 Ω
    assert eseries.nearest(1.234e-9, "E96") == 1.24e-9
    assert eseries.nearest("4k6", "E12") == 4700.0


def test_nearest_has_no_binary_noise():
    # the result is the decimal series value as the closest float (Python float semantics)
    assert eseries.nearest(4.69e3, "E24") == 4700.0
    assert eseries.nearest(2.19e-6, "E12") == 2.2e-6
    assert eseries.nearest(3.31e-9, "E6") == 3.3e-9
    assert eseries.nearest(9.2e-12, "E192") == 9.2e-12


def test_nearest_switches_at_geometric_midpoint():
    # log-scale nearest (IEC 60063 series are geometric): the switch point between 4.7 and 10 (next
    # decade's 1.0) in E3 is their geometric mean sqrt(47) = 6.856 (regression pin), not the arithmetic mean 7.35
    mid = math.sqrt(4.7 * 10.0)
    assert eseries.nearest(mid * (1 - 1e-9), "E3") == 4.7
    assert eseries.nearest(mid * (1 + 1e-9), "E3") == 10.0
    assert (
        eseries.nearest(7.0, "E3") == 10.0
    )  # arithmetically nearer 4.7 (2.3 vs 3.0), on a log scale nearer 10


def test_nearest_vector_equals_scalar():
    xs = np.array([[4600.0, 9.6e3], [0.95, 1.234e-9]])
    out = eseries.nearest(xs, "E24")
    assert isinstance(out, np.ndarray) and out.shape == xs.shape
    for pos in np.ndindex(xs.shape):
        assert out[pos] == eseries.nearest(float(xs[pos]), "E24")
    assert isinstance(eseries.nearest(4600, "E24"), float)
    assert list(eseries.nearest(["4k6", 9600], "E24")) == [4700.0, 10000.0]


@pytest.mark.parametrize("bad", [0, -1, float("nan"), float("inf"), "abc", None, True, "-4k7", [1.0, -1.0]])
def test_nearest_rejects_bad_x(bad):
    with pytest.raises(DesignError, match="x"):
        eseries.nearest(bad, "E24")


def test_nearest_float_extremes_finite_or_error():
    assert eseries.nearest(1e-300, "E24") == 1e-300
    assert math.isfinite(eseries.nearest(5e-324, "E3"))
    with pytest.raises(DesignError, match="float range"):
        eseries.nearest(1.7e308, "E24")  # nearest E24 value 1.8e308 is not a float


def _log_dist(a: float, b: float) -> float:
    return abs(math.log(a) - math.log(b))


@reaching()
@settings(max_examples=300, deadline=None)
@given(
    st.floats(min_value=1e-15, max_value=1e15, allow_nan=False, allow_infinity=False),
    st.sampled_from(eseries.SERIES),
)
def test_nearest_is_on_series_and_closest_in_log_distance(x, name):
    reached()  # no early return: every example reaches the assertions
    result = eseries.nearest(x, name)
    k = math.floor(math.log10(result) + 1e-12)
    mant = result / 10.0**k
    assert any(math.isclose(mant, v, rel_tol=1e-12) for v in eseries.values(name)), (x, result)
    # brute force over the decades around x: no series value is closer on a log scale
    k0 = math.floor(math.log10(x))
    candidates = [v * 10.0**kk for kk in (k0 - 1, k0, k0 + 1) for v in eseries.values(name)]
    best = min(_log_dist(x, c) for c in candidates)
    assert _log_dist(x, result) <= best + 1e-12


def test_bracket_examples():
    # IEC 60063 E24 / E12 values (published)
    b = eseries.bracket(4600, "E24")
    assert (b.below, b.above) == (4300.0, 4700.0) and not b.on_series
    b = eseries.bracket("4k7", "E12")
    assert (b.below, b.above) == (4700.0, 4700.0) and b.on_series
    b = eseries.bracket(9.6e3, "E24")
    assert (b.below, b.above) == (9100.0, 10000.0)  # across the decade edge
    b = eseries.bracket(0.0047 * (1 + 1e-13), "E6")  # binary noise still counts as on the series
    assert (b.below, b.above) == (0.0047, 0.0047)
    b = eseries.bracket(10e3, "E3")
    assert (b.below, b.above) == (10e3, 10e3)


def test_bracket_is_frozen_with_reprs():
    b = eseries.bracket(4600, "E24")
    with pytest.raises(AttributeError):
        b.below = 1.0  # type: ignore[misc]
    assert repr(b) == "Bracket(below=4300.0, above=4700.0)"
    assert "<table>" in b._repr_html_() and "4300.0" in b._repr_html_()


def test_bracket_vector_equals_scalar():
    xs = np.array([4600.0, 4700.0, 9.6e3, 1.1e-9])
    b = eseries.bracket(xs, "E24")
    for i, x in enumerate(xs):
        s = eseries.bracket(float(x), "E24")
        assert (b.below[i], b.above[i]) == (s.below, s.above)
    assert list(b.on_series) == [False, True, False, True]


@reaching()
@settings(max_examples=200, deadline=None)
@given(
    st.floats(min_value=1e-12, max_value=1e12, allow_nan=False, allow_infinity=False),
    st.sampled_from(eseries.SERIES),
)
def test_bracket_encloses_x_and_neighbours_are_adjacent(x, name):
    reached()  # no early return: every example reaches the assertions
    b = eseries.bracket(x, name)
    assert b.below <= x * (1 + 1e-9) and b.above >= x * (1 - 1e-9)
    if b.below != b.above:
        # nothing from the series lies strictly between (brute force over three decades)
        inside = eseries.in_range(b.below, b.above, name)
        assert inside == (b.below, b.above)
    # nearest is one of the two bracket values
    assert eseries.nearest(x, name) in (b.below, b.above)


def test_in_range_examples():
    # published: IEC 60063:2015 Table 1 values, scaled by decade
    assert eseries.in_range(1000, 2000, "E12") == (1000.0, 1200.0, 1500.0, 1800.0)
    assert eseries.in_range("8k", "12k", "E24") == (8200.0, 9100.0, 10000.0, 11000.0, 12000.0)
    assert eseries.in_range(4.7, 4.7, "E6") == (4.7,)
    assert eseries.in_range(4.8, 6.7, "E6") == ()
    assert eseries.in_range(1e-9, 1e-6, "E3") == tuple(
        float(f"{v}e{k}") for k in (-9, -8, -7) for v in ("1.0", "2.2", "4.7")
    ) + (1e-6,)
    assert len(eseries.in_range(1, 10, "E192")) == 193  # both decade ends included
    assert len(eseries.in_range(1, 1e6, "E96")) == 6 * 96 + 1


def test_in_range_rejects():
    with pytest.raises(DesignError, match="lo 2000 is above hi 1000"):
        eseries.in_range(2000, 1000, "E12")
    with pytest.raises(DesignError, match="lo"):
        eseries.in_range(0, 1000, "E12")
    with pytest.raises(DesignError, match="hi"):
        eseries.in_range(1, "nan", "E12")
    with pytest.raises(DesignError, match="decades"):
        eseries.in_range(1e-100, 1e100, "E12")
    with pytest.raises(DesignError, match="single values"):
        eseries.in_range([1, 2], 10, "E12")
    with pytest.raises(DesignError, match="allowed: E3"):
        eseries.in_range(1, 10, "E25")
