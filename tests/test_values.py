"""Tests for pwmkit.values: engineering-notation parsing/formatting, RKM codes, tolerances."""

from __future__ import annotations

import math
import re

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from reach import mostly, reached, reaching

from pwmkit.errors import DesignError
from pwmkit.values import format_rkm, format_value, parse_tolerance, parse_value

# ---------------------------------------------------------------------------------------------------
# parse_value: published IEC 60062 RKM examples
# ---------------------------------------------------------------------------------------------------

# published: IEC 60062:2016, RKM code examples (IEC 60062:2016, letter and RKM codes)
IEC_60062_RKM = [
    ("R47", 0.47),
    ("4R7", 4.7),
    ("470R", 470.0),
    ("4K7", 4.7e3),
    ("47K3", 47.3e3),
    ("4M7", 4.7e6),
    ("4n7", 4.7e-9),
    ("10p", 10e-12),
    ("1µ0", 1e-6),
    ("100n", 100e-9),
    ("p68", 0.68e-12),
    ("2R2", 2.2),
]


@pytest.mark.parametrize(("text", "expected"), IEC_60062_RKM)
def test_parse_rkm_iec60062_examples(text, expected):
    # published: IEC 60062:2016 (multiplier letter replaces the decimal point)
    assert parse_value(text) == pytest.approx(expected, rel=1e-15)


# SI prefixes: BIPM SI Brochure 9th ed. §3 (published); RKM lower-case k, u for µ: common practice.
OTHER_ACCEPTED = [
    ("4700", 4700.0),
    ("4.7e3", 4700.0),
    ("4.7E3", 4700.0),
    ("-1.5", -1.5),
    ("+2", 2.0),
    (".5", 0.5),
    ("4k7", 4700.0),
    ("1n5", 1.5e-9),
    ("1u0", 1e-6),
    ("1\u03bc0", 1e-6),  # Greek mu as micro
    ("220p", 220e-12),
    ("1M", 1e6),  # mega, published: SI Brochure §3
    ("1m", 1e-3),  # milli
    ("1f", 1e-15),  # femto
    ("1G", 1e9),
    ("1T", 1e12),
    ("1K", 1e3),
    ("1 k", 1e3),
    ("1H", 1.0),  # one henry, not a prefix
    ("1 mH", 1e-3),
    ("10 kΩ", 10e3),
    ("10kΩ", 10e3),
    ("10 k\u2126", 10e3),  # OHM SIGN U+2126
    ("10 kohm", 10e3),
    ("0.1 uF", 0.1e-6),
    ("2.2µF", 2.2e-6),
    ("2.2\u03bcF", 2.2e-6),
    ("100nF", 100e-9),
    ("12 V", 12.0),
    ("12V", 12.0),
    ("20 kHz", 20e3),
    ("5 mA", 5e-3),
    ("1 W", 1.0),
    ("3.3 Ω", 3.3),
    ("4.7 ohm", 4.7),
    ("47 ohms", 47.0),
    ("2 s", 2.0),
    ("1 F", 1.0),
    ("1 fF", 1e-15),
    ("1e-7 F", 1e-7),
    ("4k7Ω", 4700.0),
    ("  4k7  ", 4700.0),
    ("0R", 0.0),  # zero-ohm link, common practice
    ("1L5", 1.5e-3),  # milliohm letter, IEC 60062:2016 per a secondary source
]


@pytest.mark.parametrize(("text", "expected"), OTHER_ACCEPTED)
def test_parse_accepted_forms(text, expected):
    # SI prefixes: published, BIPM SI Brochure 9th ed. §3; unit/letter usage: common practice
    assert parse_value(text) == pytest.approx(expected, rel=1e-15)


def test_parse_has_no_binary_noise():
    # decimal literal is rounded once by float(): 2.2µ is the float nearest 2.2e-6 (Python float semantics)
    assert parse_value("2.2µ") == 2.2e-6
    assert parse_value("4k7") == 4700.0
    assert parse_value("p68") == 6.8e-13


def test_parse_python_numbers_pass_through():
    assert parse_value(4700) == 4700.0 and isinstance(parse_value(4700), float)
    assert parse_value(2.5) == 2.5
    assert parse_value(np.float64(1e-9)) == 1e-9
    assert parse_value(np.int64(3)) == 3.0


JUNK = ["10q", "4k7k", "1..2", "", "   ", "nan", "inf", "1e999", "2+2", "__import__('os')", "1/3", "k",
        "R", "4k7Ω extra", "-inf", "1e3k", "10 k Ω", "4r7", "1.5k7", "1 mm", "0x10", "1_000", "٣"]  # fmt: skip


@pytest.mark.parametrize("text", JUNK)
def test_parse_junk_raises_design_error_quoting_text(text):
    with pytest.raises(DesignError, match=re.escape(repr(text))) as info:
        parse_value(text)
    assert "allowed" in str(info.value)


@pytest.mark.parametrize("value", [None, [1.0], (4.7,), {"r": 1}, True, False, float("nan"), float("inf"),
                                   10**400])  # fmt: skip
def test_parse_non_text_junk(value):
    with pytest.raises(DesignError):
        parse_value(value)


def test_parse_never_evaluates(monkeypatch):
    import builtins

    def forbidden(*args, **kwargs):  # pragma: no cover - must not be called
        raise AssertionError("eval/exec called")

    monkeypatch.setattr(builtins, "eval", forbidden)
    monkeypatch.setattr(builtins, "exec", forbidden)
    with pytest.raises(DesignError):
        parse_value("__import__('os').system('true')")
    assert parse_value("4k7") == 4700.0


_value_text = st.builds(lambda x, p, u, sp: f"{x:.4g}{sp}{p}{u}",
                        st.one_of(st.floats(min_value=0.1, max_value=999.0), st.floats(min_value=-999.0, max_value=-0.1)),
                        st.sampled_from(["", "p", "n", "u", "µ", "m", "k", "M", "G"]),
                        st.sampled_from(["", "Ω", "F", "Hz", "V", "H"]), st.sampled_from(["", " "]))


@reaching()
@settings(max_examples=300, deadline=None)
@given(mostly(_value_text, st.text(max_size=20)))
def test_parse_arbitrary_text_is_finite_or_design_error(text):
    try:
        result = parse_value(text)
    except DesignError:
        return
    reached()
    assert isinstance(result, float) and math.isfinite(result)


@reaching()
@settings(max_examples=200, deadline=None)
@given(mostly(
    st.from_regex(r"\A[+-]?[1-9][0-9]{0,2}(\.[0-9]{1,3})?([eE][+-]?[0-9]{1,2}| ?[pnuµmkMG])?(Ω|F|Hz)?\Z"),
    st.from_regex(
        r"\A[+-]?[0-9]{0,4}(\.[0-9]{0,4})?([eE][+-]?[0-9]{1,4})? ?[fpnuµmkKMGTRL]?[0-9]{0,3}(Ω|F|Hz)?\Z"
    ),
))
def test_parse_near_grammar_text_is_finite_or_design_error(text):
    # text built from the grammar's own alphabet hits the boundaries much more often than random text;
    # most examples follow the plain "number, prefix, unit" form that must parse
    try:
        result = parse_value(text)
    except DesignError:
        return
    reached()
    assert isinstance(result, float) and math.isfinite(result)


# ---------------------------------------------------------------------------------------------------
# format_value
# ---------------------------------------------------------------------------------------------------

# SI prefixes: published, BIPM SI Brochure 9th ed. §3; values from the brief and RC step response: Alexander & Sadiku, Fundamentals of Electric Circuits, 6th ed., ch. 7 (regression pin)
FORMAT_CASES = [
    ((4700, "Ω"), "4.7 kΩ"),
    ((1e-7, "F"), "100 nF"),
    ((0.0022, "s"), "2.2 ms"),
    ((480.898, "Hz"), "481 Hz"),  # RC step response: Alexander & Sadiku, Fundamentals of Electric Circuits, 6th ed., ch. 7 ideal frequency (regression pin), 3 significant digits
    ((0,), "0"),
    ((0, "Ω"), "0 Ω"),
    ((1.5e6, "Ω"), "1.5 MΩ"),
    ((999.96,), "1 k"),  # rounds across the prefix boundary
    ((999.4,), "999"),
    ((2.2e-6, "F"), "2.2 µF"),
    ((-4700, "Ω"), "-4.7 kΩ"),
    ((1e-15, "F"), "1 fF"),
    ((999e12,), "999 T"),
    ((12,), "12"),
    ((12, "V"), "12 V"),
    ((0.5,), "500 m"),
    ((1e-18, "F"), "1e-18 F"),  # below femto: scientific form, still readable by parse_value
    ((2e15,), "2e15"),
]


@pytest.mark.parametrize(("args", "expected"), FORMAT_CASES)
def test_format_value_examples(args, expected):
    assert format_value(*args) == expected


def test_format_value_digits():
    assert format_value(4712.3, "Ω", digits=5) == "4.7123 kΩ"
    assert format_value(4712.3, "Ω", digits=1) == "5 kΩ"
    assert format_value(1.0, digits=6) == "1"  # trailing zeros stripped


def test_format_value_uses_micro_sign_u00b5():
    assert format_value(1e-6, "F") == "1 \u00b5F"


@pytest.mark.parametrize("bad", [float("nan"), float("inf"), -float("inf"), "4k7", None, True])
def test_format_value_rejects_non_finite_and_non_numbers(bad):
    with pytest.raises(DesignError, match="value to format"):
        format_value(bad)


@pytest.mark.parametrize("digits", [0, -1, 2.5, True])
def test_format_value_rejects_bad_digits(digits):
    with pytest.raises(DesignError, match="digits"):
        format_value(1.0, digits=digits)


def _close_3sig(a: float, b: float) -> bool:
    # 3 significant digits → half a unit in the 3rd digit is at most 0.5 % relative
    return math.isclose(a, b, rel_tol=5e-3 + 1e-12)


@reaching()
@settings(max_examples=300, deadline=None)
@given(
    st.floats(min_value=1e-15, max_value=1e12, allow_nan=False, allow_infinity=False),
    st.booleans(),
    st.sampled_from(["", "Ω", "F", "Hz", "V", "s", "H"]),
)
def test_format_parse_round_trip(x, negative, unit):
    reached()  # no early return: every example reaches the assertions
    value = -x if negative else x
    text = format_value(value, unit)
    back = parse_value(text)
    assert _close_3sig(back, value), (value, text, back)
    # and formatting is idempotent at 3 digits
    assert format_value(back, unit) == text


# ---------------------------------------------------------------------------------------------------
# format_rkm
# ---------------------------------------------------------------------------------------------------


@pytest.mark.parametrize(
    ("value", "kind", "code"),
    [
        (0.47, "resistor", "R47"),  # published: IEC 60062:2016 example R47
        (4.7, "resistor", "4R7"),  # published: IEC 60062:2016 example 4R7
        (470, "resistor", "470R"),  # published: IEC 60062:2016 example 470R
        (4700, "resistor", "4K7"),  # published: IEC 60062:2016 example 4K7
        (47.3e3, "resistor", "47K3"),  # published: IEC 60062:2016 example 47K3
        (4.7e6, "resistor", "4M7"),  # published: IEC 60062:2016 example 4M7
        (2.2, "resistor", "2R2"),  # published: IEC 60062:2016 example 2R2
        (4.7e-9, "capacitor", "4n7"),  # published: IEC 60062:2016 example 4n7
        (10e-12, "capacitor", "10p"),  # published: IEC 60062:2016 example 10p
        (1e-6, "capacitor", "1µ0"),  # published: IEC 60062:2016 example 1µ0
        (100e-9, "capacitor", "100n"),  # published: IEC 60062:2016 example 100n
        (0.68e-12, "capacitor", "p68"),  # published: IEC 60062:2016 example p68
    ],
)
def test_format_rkm_iec60062_examples(value, kind, code):
    assert format_rkm(value, kind) == code


def test_format_rkm_rounding_and_padding():
    # 3 significant digits (brief); single-digit codes padded "1K0" like the IEC example 1µ0 (common practice)
    assert format_rkm(4749.9) == "4K75"
    assert format_rkm(999.6) == "1K0"  # rounds across the letter boundary
    assert format_rkm(1000) == "1K0"
    assert format_rkm(10e3) == "10K"
    assert format_rkm(0.047) == "R047"  # current-sense style code, common practice
    assert format_rkm(4.7e-3, "capacitor") == "4m7"
    assert format_rkm(1.0, "capacitor") == "1F0"


@pytest.mark.parametrize(
    ("value", "kind"), [(0, "resistor"), (-1, "resistor"), (float("nan"), "resistor"), (1e15, "resistor"),
                        (1000.0, "capacitor"), (1.0, "inductor"), ("4k7", "resistor")])  # fmt: skip
def test_format_rkm_rejects(value, kind):
    with pytest.raises(DesignError):
        format_rkm(value, kind)


@reaching()
@settings(max_examples=200, deadline=None)
@given(st.floats(min_value=1e-3, max_value=9.99e14), st.sampled_from(["resistor", "capacitor"]))
def test_format_rkm_round_trip(x, kind):
    reached()  # no early return: every example reaches the assertions
    value = x if kind == "resistor" else x * 1e-12
    code = format_rkm(value, kind)
    assert _close_3sig(parse_value(code), value), (value, code)


# ---------------------------------------------------------------------------------------------------
# parse_tolerance
# ---------------------------------------------------------------------------------------------------


@pytest.mark.parametrize(
    ("text", "fraction"),
    [
        ("5%", 0.05),
        ("±5 %", 0.05),
        ("+/-1%", 0.01),
        ("0.05", 0.05),
        (0.1, 0.1),
        ("0.5 %", 0.005),
        ("B", 0.001),  # IEC 60062 letter, from memory: B ±0.1 %
        ("C", 0.0025),  # from memory: C ±0.25 %
        ("D", 0.005),  # from memory: D ±0.5 %
        ("F", 0.01),  # from memory: F ±1 %
        ("G", 0.02),  # from memory: G ±2 %
        ("J", 0.05),  # from memory: J ±5 %
        ("K", 0.10),  # from memory: K ±10 %
        ("M", 0.20),  # from memory: M ±20 %
    ],
)
def test_parse_tolerance_forms(text, fraction):
    assert parse_tolerance(text) == fraction


@pytest.mark.parametrize("text", ["5", "100%", "abc", "", "Z", "j", "5%%", "-5%", "1e-2", "nan"])
def test_parse_tolerance_junk(text):
    with pytest.raises(DesignError, match=re.escape(repr(text))):
        parse_tolerance(text)


@pytest.mark.parametrize("value", [None, True, float("nan"), 1.5, -0.1])
def test_parse_tolerance_non_text_junk(value):
    with pytest.raises(DesignError, match="tolerance"):
        parse_tolerance(value)
