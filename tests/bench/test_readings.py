"""Bench readings in the design file: lossless round trip, errors with the field path."""

from __future__ import annotations

import datetime as dt

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from pwmkit import DesignError
from pwmkit.bench import BenchConditions, BenchReading, Measured
from pwmkit.design import demo_designs
from pwmkit.record.designfile import design_from_toml, design_to_toml, load_design, save_design


def _reading(**kw):
    base = dict(measured=(Measured("frequency", 29876.5, accuracy=1e-4), Measured("duty", 0.5931, resolution=1e-3),
                          Measured("i_load", 0.41)),
                conditions=BenchConditions(vcc=12.05, t_ambient_c=21.0, wiper=0.6), date="2026-11-30",
                note='first "power-up"\nsecond line', source="capture fan.csv")
    base.update(kw)
    return BenchReading(**base)


def test_round_trip_is_lossless_text_and_object(tmp_path):
    d = demo_designs()["fan"].with_reading(_reading()).with_reading(BenchReading(measured={"frequency": "30k"}))
    text = design_to_toml(d)
    back = design_from_toml(text)
    assert back == d
    assert design_to_toml(back) == text
    path = save_design(d, tmp_path / "fan.toml")
    assert load_design(path) == d


def test_toml_dates_and_datetimes_read_back():
    base = design_to_toml(demo_designs()["fan"])
    text = base + "\n[[bench]]\ndate = 2026-11-30T14:05:00\n[bench.measured]\nduty = \"59.3 %\"\n"
    d = design_from_toml(text)
    assert d.bench[0].date == "2026-11-30T14:05:00"
    assert d.bench[0].value("duty") == pytest.approx(0.593)
    assert design_from_toml(design_to_toml(d)) == d
    r = BenchReading(measured={"frequency": 1e3}, date=dt.date(2026, 12, 1))
    assert r.date == "2026-12-01"
    assert BenchReading(measured={"frequency": 1e3}, date="2026-12-01 09:30").date == "2026-12-01T09:30:00"


@pytest.mark.parametrize("old, new, match", [
    ("vcc = 12.05", "vcc = -3", r"f\.toml: bench\[0\]\.conditions\.vcc: -3 V is out of range"),
    ("vcc = 12.05", "vcc = \"12q\"", r"bench\[0\]\.conditions\.vcc: .*12q"),
    ("wiper = 0.6", "wiper = 1.5", r"bench\[0\]\.conditions\.wiper: 1\.5 is out of range"),
    ("wiper = 0.6", "knob = 0.6", r"bench\[0\]\.conditions\.knob: unknown key"),
    ("i_load = 0.41", "i_lod = 0.41", r"bench\[0\]\.measured\.i_lod: unknown key \(did you mean 'i_load'\?\)"),
    ("duty = { value", "duty = { valu", r"bench\[0\]\.measured\.duty\.valu: unknown key"),
    ("accuracy = 0.0001", "accuracy = 2.0", r"bench\[0\]\.measured\.frequency\.accuracy: 2 is out of range"),
    ("date = 2026-11-30", "date = \"last tuesday\"", r"bench\[0\]\.date: 'last tuesday' is not a date"),
    ("note = ", "colour = ", r"bench\[0\]\.colour: unknown key"),
    ("frequency = { value = 29876.5, accuracy = 0.0001 }", "frequency = [1, 2]",
     r"bench\[0\]\.measured\.frequency: expected a number"),
    ("frequency = { value = 29876.5, accuracy = 0.0001 }", "frequency = { accuracy = 0.0001 }",
     r"bench\[0\]\.measured\.frequency\.value: missing"),
])
def test_bad_entries_name_the_field_path(old, new, match):
    d = demo_designs()["fan"].with_reading(_reading())
    text = design_to_toml(d)
    head, sep, tail = text.rpartition(old)   # the last occurrence: inside [[bench]]
    assert sep and "[[bench]]" in head
    with pytest.raises(DesignError, match=match):
        design_from_toml(head + new + tail, source="f.toml")


def test_second_entry_is_counted_from_zero():
    d = demo_designs()["fan"].with_reading(_reading()).with_reading(_reading())
    text = design_to_toml(d)
    head, sep, tail = text.rpartition("vcc = 12.05")
    with pytest.raises(DesignError, match=r"bench\[1\]\.conditions\.vcc: 0 V is out of range"):
        design_from_toml(head + "vcc = 0" + tail)


def test_bench_as_a_table_not_an_array_is_refused():
    text = design_to_toml(demo_designs()["fan"]) + "\n[bench]\nnote = 'x'\n"
    with pytest.raises(DesignError, match=r"bench: expected an array of tables written \[\[bench\]\]"):
        design_from_toml(text)


def test_wiper_on_a_fixed_network_is_refused_in_a_file():
    from pwmkit.design import Design

    reading = BenchReading(measured={"frequency": 1e3}, conditions=BenchConditions(wiper=0.5))
    design = Design(bench=(reading,))      # allowed in code: a dashboard may switch the topology while exploring
    with pytest.raises(DesignError, match=r"f\.toml: bench\[0\]\.conditions\.wiper: 0\.5 given, but the 'steered' "
                                          r"topology has no potentiometer"):
        design_from_toml(design_to_toml(design), source="f.toml")


def test_api_errors_name_the_field():
    with pytest.raises(DesignError, match=r"measured\.speed: not a known measured quantity"):
        Measured("speed", 3.0)
    with pytest.raises(DesignError, match=r"measured\.duty: 1\.2 is out of range; allowed 0 … 1"):
        Measured("duty", 1.2)
    with pytest.raises(DesignError, match=r"measured\.frequency: given twice"):
        BenchReading(measured=(Measured("frequency", 1.0), Measured("frequency", 2.0)))
    with pytest.raises(DesignError, match=r"bench\[0\]: expected a BenchReading"):
        demo_designs()["fan"].replace(bench=({"frequency": 1.0},))


def test_uncertainty_is_accuracy_of_reading_plus_resolution():
    # the usual instrument statement ±(a % of reading + b) — common practice
    m = Measured("frequency", 20e3, accuracy="0.01 %", resolution=1.0)
    assert m.uncertainty == pytest.approx(20e3 * 1e-4 + 1.0)
    assert Measured("duty", 0.5).uncertainty is None


_finite = st.floats(min_value=1e-3, max_value=1e6, allow_nan=False)


@settings(max_examples=40, deadline=None)
@given(f=_finite, d=st.floats(0.0, 1.0), acc=st.none() | st.floats(0.0, 1.0), vcc=st.none() | st.floats(0.5, 99.0),
       note=st.text(max_size=60))
def test_round_trip_property(f, d, acc, vcc, note):
    r = BenchReading(measured=(Measured("frequency", f, accuracy=acc), Measured("duty", d)),
                     conditions=BenchConditions(vcc=vcc), note=note)
    design = demo_designs()["grow-bar"].with_reading(r)
    assert design_from_toml(design_to_toml(design)) == design
