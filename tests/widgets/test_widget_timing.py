"""Timing panel callbacks without a browser: value entry, sliders, snapping, topology, bad input.

Each test sets a widget value as the front end would and checks that the design, the readouts
and the plot data (ColumnDataSource.data) followed — or, for bad input, that the inline message
appeared and the last good design stayed.
"""

from __future__ import annotations

import math
import re

import numpy as np
import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st
from reach import reached, reaching

from pwmkit import format_value
from pwmkit.design import Design
from pwmkit.widgets import DesignSession, TimingPanel, WaveformPanel


def cells(html: str) -> dict[tuple[str, str], str]:
    """Readout cells of the timing table: (quantity, kind) → text."""
    return {(q, k): v for q, k, v in re.findall(r"data-q='(\w+)' data-kind='(\w+)'>([^<]*)<", html)}


@pytest.fixture
def pair(grow):
    """A timing panel and a waveform panel sharing one session (the cheap way to test callbacks)."""
    session = DesignSession(grow)
    return TimingPanel(session), WaveformPanel(session)


def test_wiper_slider_changes_design_readout_and_plot(pair):
    timing, waves = pair
    readout = timing.readout.value
    v_cap = np.array(waves.plot.source.data["v_cap"])
    timing.wiper.value = 30.0  # percent of the travel on screen
    assert timing.session.design.timing.wiper == 0.3
    assert timing.readout.value != readout
    assert not np.array_equal(np.array(waves.plot.source.data["v_cap"]), v_cap)
    assert timing.message_text == ""


def test_readout_shows_the_evaluated_timing(pair):
    timing, _ = pair
    ev = timing.session.evaluation
    table = cells(timing.readout.value)
    # one rule on screen: 4 significant figures (pwmkit.numstyle)
    assert table[("frequency", "exact")] == format_value(ev.timing.frequency, "Hz", 4)
    assert table[("frequency", "ideal")] == format_value(ev.ideal.frequency, "Hz", 4)
    assert table[("t_high", "exact")] == format_value(ev.timing.t_high, "s", 4)
    # textbook form: t_high = ln 2 · (ra + wiper·pot)·C (common practice: 0.693·R·C), recomputed here
    t = timing.session.design.timing
    assert ev.ideal.t_high == pytest.approx(math.log(2) * (t.ra + t.wiper * t.pot) * t.c, rel=1e-12)


def test_thresholds_in_the_waveform_are_two_thirds_and_one_third_of_the_supply(pair):
    # 555-type data sheets (internal divider): upper threshold 2/3·Vcc, lower 1/3·Vcc (common practice)
    _, waves = pair
    data = waves.plot.source.data
    assert np.allclose(data["v_upper"], 8.0) and np.allclose(data["v_lower"], 4.0)
    inside = (np.array(data["v_cap"]) >= 4.0 - 1e-9) & (np.array(data["v_cap"]) <= 8.0 + 1e-9)
    assert inside.all()


def test_led_current_trace_follows_the_output(pair):
    _, waves = pair
    ev = waves.session.evaluation
    i = np.array(waves.plot.current.data["i"])  # mA (peak below 1 A)
    assert i.max() == pytest.approx(1e3 * ev.led.i_peak_total)
    assert i.min() == 0.0
    assert waves.plot.bottom.visible


def test_text_entry_accepts_engineering_notation(pair):
    timing, waves = pair
    before = np.array(waves.plot.source.data["t"])
    assert timing.set_value("c", "3n3") is None
    assert timing.session.design.timing.c == pytest.approx(3.3e-9)
    assert timing.entries["c"].text.value == "3.3 nF"
    assert timing.entries["c"].slider.value == pytest.approx(3.3e-9)
    assert not np.array_equal(np.array(waves.plot.source.data["t"]), before)  # longer period, new time base


@pytest.mark.parametrize(
    ("field", "text", "words"),
    [
        # the message names the field with its label and unit, and offers examples valid for it
        ("c", "10q", ["C (timing) [F]", "'10q'", "is not a value", "2n2, 100 nF"]),
        ("ra", "-4k7", ["R_A (charge) [Ω]", "-4700", "1 Ω ≤ the value ≤ 1 GΩ", "4k7, 10 kΩ"]),
        ("ra", "10 kF", ["R_A (charge) [Ω]", "'10 kF'", "F", "takes Ω", "4k7, 10 kΩ"]),
        ("vcc", "1.5", ["supply V_CC [V]", "cannot reach the upper threshold"]),
        ("pot", "", ["pot (end to end) [Ω]", "4k7"]),
    ],
)
def test_bad_input_shows_message_and_keeps_last_good_design(pair, field, text, words):
    timing, waves = pair
    design, readout = timing.session.design, timing.readout.value
    data = {k: np.array(v) for k, v in waves.plot.source.data.items()}
    message = timing.set_value(field, text)
    assert message is not None and all(w in message for w in words), message
    assert "-1.5" not in message and "timing." not in message  # no code names, no examples for other fields
    entry = timing.entries[field]
    # the message sits with the field (its own line under it), and the field is marked invalid
    assert entry.note.layout.display is None and "pwmkit-msg" in entry.note._dom_classes
    assert entry.invalid and "pwmkit-invalid" in entry.text._dom_classes
    assert timing.session.design is design
    assert timing.readout.value == readout
    assert all(np.array_equal(np.array(waves.plot.source.data[k]), v) for k, v in data.items())
    assert "nan" not in timing.readout.value.lower()


def test_message_clears_after_a_good_value(pair):
    timing, _ = pair
    assert timing.set_value("c", "10q") is not None
    assert timing.set_value("c", "2n7") is None
    assert timing.message_text == "" and timing.entries["c"].note.layout.display == "none"
    assert not timing.entries["c"].invalid


def test_supply_too_low_for_the_led_string_is_refused(pair):
    timing, _ = pair
    # a string of n LEDs needs n·V_F before its resistor sees any voltage (common practice)
    led = timing.session.design.load
    below = 0.95 * led.n_series * led.vf
    message = timing.set_value("vcc", f"{below:.3f}")
    assert message is not None and f"{led.vf:g} V" in message, message
    assert timing.session.design.vcc == 12.0


def test_supply_edit_moves_the_supply_range_with_it(pair):
    timing, _ = pair
    lo0, hi0 = timing.session.design.supply_range
    assert timing.set_value("vcc", "12.5") is None
    lo, hi = timing.session.design.supply_range
    assert (lo, hi) == pytest.approx((lo0 * 12.5 / 12, hi0 * 12.5 / 12))


def test_topology_switch_and_back_remembers_the_pot(pair):
    timing, waves = pair
    data = np.array(waves.plot.source.data["v_cap"])
    timing.topology.value = "steered"
    d = timing.session.design.timing
    assert (d.topology, d.pot, d.wiper) == ("steered", None, None)
    assert timing.entries["pot"].layout.display == "none" and timing.wiper.layout.display == "none"
    assert not np.array_equal(np.array(waves.plot.source.data["v_cap"]), data)
    timing.topology.value = "classic"
    assert timing.session.evaluation.timing.topology == "classic"
    timing.topology.value = "pot"
    d = timing.session.design.timing
    assert (d.topology, d.pot, d.wiper) == ("pot", 100e3, 0.5)
    assert timing.entries["pot"].layout.display is None


def test_rejected_choice_is_put_back(grow):
    # 2 V: a bipolar timer cannot reach 2/3 of it through a 0.6 V diode; the CMOS one can
    # (1.33 V threshold vs 2 V − 0.6 V = 1.4 V) — the switch to bipolar must be refused and undone.
    design = Design(name="low", vcc=2.0, timing=grow.timing)
    timing = TimingPanel(design)
    timing.timer.value = "bipolar"
    assert timing.message_text != ""
    assert timing.session.design.timing.timer == "cmos" and timing.timer.value == "cmos"


@pytest.mark.parametrize(
    ("series", "ra", "c"),
    [
        # IEC 60063:2015 Table 1: E12 has 1.2 and 2.2 (2.2 vs 2.7: geometric midpoint 2.437);
        # E24 has 1.2 and 2.4; E6 has 1.5 (1.0 vs 1.5: midpoint 1.225 < 1.234) and 2.2.
        ("E12", 1200.0, 2.2e-9),
        ("E24", 1200.0, 2.4e-9),
        ("E6", 1500.0, 2.2e-9),
    ],
)
def test_snapping_to_a_series_moves_values_to_preferred_numbers(pair, series, ra, c):
    timing, _ = pair
    assert timing.entries["ra"].submit(1234.0) is None
    assert timing.entries["c"].submit(2.345e-9) is None
    readout = timing.readout.value
    timing.snap.value = series
    t = timing.session.design.timing
    assert t.ra == pytest.approx(ra) and t.c == pytest.approx(c)
    assert timing.readout.value != readout


def test_snapping_applies_to_later_slider_moves(pair):
    timing, _ = pair
    timing.snap.value = "E12"
    timing.entries["ra"].slider.value = 3456.0
    # IEC 60063 E12: 3.3 and 3.9; 3.456 lies below their geometric midpoint 3.587
    assert timing.session.design.timing.ra == pytest.approx(3300.0)
    assert timing.entries["ra"].text.value == "3.3 kΩ"


def test_exact_mode_keeps_the_typed_value(pair):
    timing, _ = pair
    assert timing.set_value("ra", "1234") is None
    assert timing.session.design.timing.ra == 1234.0


def test_unknown_field_in_set_value_is_a_key_error(pair):
    timing, _ = pair
    with pytest.raises(KeyError, match="unknown field 'rx'"):
        timing.set_value("rx", "1k")


_engineering = st.from_regex(r"-?[0-9]{0,4}(\.[0-9]{0,3})?[ ]?[fpnuµmkKMGTRLF]?[0-9]{0,2}[ ]?(Ω|F|V|Hz|q)?",
                             fullmatch=True)


@reaching()
@settings(max_examples=40, deadline=None, suppress_health_check=[HealthCheck.function_scoped_fixture])
@given(field=st.sampled_from(["ra", "rb", "c", "pot", "vcc"]),
       text=st.one_of(st.text(max_size=14), _engineering, st.sampled_from(["nan", "inf", "1e999", "-0", "0"])))
def test_random_text_never_escapes_a_callback(pair, field, text):
    reached()  # no early return: every example reaches the assertions
    timing, waves = pair
    before = timing.session.design
    message = timing.set_value(field, text)  # must not raise
    assert isinstance(timing.session.design, Design)
    if message is not None:
        assert timing.session.design is before
    html = timing.readout.value.lower()
    assert "nan" not in html and "inf" not in html
    assert all(np.isfinite(np.asarray(v, dtype=float)).all() for v in waves.plot.source.data.values())
