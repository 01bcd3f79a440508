"""Scope captures: parser cases and timing extraction from synthetic waveforms of known edges."""

from __future__ import annotations

import numpy as np
import pytest
from bench_synthetic import pwm

from pwmkit import DesignError
from pwmkit.bench import capture_timing, read_capture, reading_from_capture


# -- timing from synthetic captures -------------------------------------------------------------
@pytest.mark.parametrize("seed", [1, 2, 3])
@pytest.mark.parametrize("case", [
    dict(),                                                                    # clean
    dict(noise=0.08),                                                          # noise ≈ 0.8 % of the swing
    dict(noise=0.05, offset=-0.7),                                             # noise and a DC offset
    dict(ringing=0.25, noise=0.03),                                            # 25 % ringing after each edge
    dict(jitter=0.002, noise=0.05, ringing=0.15, offset=0.3),                  # everything at once
])
def test_frequency_and_duty_within_1e3_of_the_generated_waveform(case, seed):
    f0, d0 = 29.7e3, 0.613
    syn = pwm(f0, d0, periods=45, seed=seed, **case)
    m = capture_timing(syn.t, syn.v)
    f_true, d_true, n_true = syn.whole_periods()
    assert m.n_periods == n_true
    # the generator's nominal frequency and duty (its inputs): within 1e-3 relative
    assert m.frequency == pytest.approx(f0, rel=1e-3)
    assert m.duty == pytest.approx(d0, rel=1e-3)
    # the whole periods actually generated (jitter included): within the stated sampling limit
    assert abs(m.frequency / f_true - 1) <= m.frequency_limit
    assert abs(m.duty - d_true) <= m.duty_limit
    assert m.v_high == pytest.approx(10.6 + case.get("offset", 0.0), abs=0.05)
    assert m.v_low == pytest.approx(0.1 + case.get("offset", 0.0), abs=0.05)


def test_rise_time_of_a_tanh_edge():
    # 10–90 % of 0.5·(1 + tanh(x/τ)) lasts 2·atanh(0.8)·τ = 2.1972·τ (analytic)
    syn = pwm(10e3, 0.4, periods=10, samples_per_period=4000, edge=0.004)
    m = capture_timing(syn.t, syn.v)
    tau = 0.004 / 10e3
    assert m.rise_time == pytest.approx(2 * np.arctanh(0.8) * tau, rel=0.01)
    assert m.fall_time == pytest.approx(2 * np.arctanh(0.8) * tau, rel=0.01)


def test_a_given_threshold_and_a_low_threshold_give_the_same_period():
    syn = pwm(5e3, 0.3, periods=20, noise=0.02, seed=4)
    a = capture_timing(syn.t, syn.v)
    b = capture_timing(syn.t, syn.v, threshold=2.0)
    assert b.threshold == 2.0
    assert b.frequency == pytest.approx(a.frequency, rel=1e-4)


def test_sampling_limit_shrinks_with_more_periods():
    short = capture_timing(*_tv(pwm(1e3, 0.5, periods=5)))
    long = capture_timing(*_tv(pwm(1e3, 0.5, periods=50)))
    assert long.frequency_limit < short.frequency_limit / 5


def _tv(s):
    return s.t, s.v


# -- refusals ---------------------------------------------------------------------------------------
def test_fewer_than_two_whole_periods_is_refused():
    syn = pwm(1e3, 0.5, periods=1.8, phase=0.2)
    with pytest.raises(DesignError, match=r"capture: 1 whole period\(s\) found .* at least two whole periods"):
        capture_timing(syn.t, syn.v)


def test_non_monotonic_time_is_refused():
    syn = pwm(1e3, 0.5, periods=5)
    t = syn.t.copy()
    t[100] = t[99]
    with pytest.raises(DesignError, match=r"t: time is not increasing at sample 100"):
        capture_timing(t, syn.v)


def test_nan_samples_are_refused():
    syn = pwm(1e3, 0.5, periods=5)
    v = syn.v.copy()
    v[[7, 9]] = np.nan
    with pytest.raises(DesignError, match=r"v: sample 7 \(t = .*\) is nan \(2 non-finite sample\(s\) in all\)"):
        capture_timing(syn.t, v)


def test_clipping_is_refused():
    syn = pwm(1e3, 0.5, periods=8, noise=0.05, seed=3)
    clipped = np.minimum(syn.v, 10.55)       # the scope's screen ends just below the high level
    with pytest.raises(DesignError, match=r"v: the trace is clipped: \d+ samples sit at exactly the highest value 10\.55 V"):
        capture_timing(syn.t, clipped)
    with pytest.raises(DesignError, match=r"lowest value 0\.2 V"):
        capture_timing(syn.t, np.maximum(syn.v, 0.2))
    capture_timing(syn.t, syn.v)   # the same trace unclipped is fine


def test_noisy_8_bit_quantised_trace_is_not_taken_for_clipping():
    syn = pwm(1e3, 0.5, periods=8, noise=0.15, seed=5)
    lsb = 12.0 / 256                                  # an 8-bit scope, 1.5 V/div over 8 divisions
    v = np.round(syn.v / lsb) * lsb
    m = capture_timing(syn.t, v)
    assert m.duty == pytest.approx(0.5, rel=2e-3)


def test_flat_trace_and_bad_threshold_are_refused():
    t = np.arange(100) * 1e-6
    with pytest.raises(DesignError, match=r"v: the trace is flat"):
        capture_timing(t, np.full(100, 3.3))
    syn = pwm(1e3, 0.5, periods=5)
    with pytest.raises(DesignError, match=r"threshold: 11 V is out of range; allowed between the low level"):
        capture_timing(syn.t, syn.v, threshold=11.0)
    with pytest.raises(DesignError, match=r"t, v: give two one-dimensional arrays of the same length"):
        capture_timing(syn.t, syn.v[:-1])


# -- parser cases -----------------------------------------------------------------------------------
def _write(tmp_path, name, text):
    p = tmp_path / name
    p.write_text(text, encoding="utf-8")
    return p


def _rows(t, v, fmt="{:.9g},{:.6g}"):
    return "\n".join(fmt.format(a, b) for a, b in zip(t, v))


def test_header_with_units_in_parentheses(tmp_path):
    p = _write(tmp_path, "a.csv", "Time (s),CH1 (V)\n0,0.1\n1e-6,0.2\n2e-6,5\n")
    c = read_capture(p)
    assert c.names == ("CH1",)
    np.testing.assert_allclose(c.time, [0, 1e-6, 2e-6])
    np.testing.assert_allclose(c.voltage, [0.1, 0.2, 5.0])


def test_preamble_semicolons_decimal_comma_milli_units_two_channels(tmp_path):
    text = ("Model;demo scope\nSample interval;1,0E-06\n\n"
            "time [ms];CH1 [mV];CH2 [V]\n0,000;100,0;0,5\n0,001;200,0;0,6\n0,002;5000,0;0,7\n")
    c = read_capture(_write(tmp_path, "b.csv", text))
    assert c.names == ("CH1", "CH2")
    np.testing.assert_allclose(c.time, [0, 1e-6, 2e-6])
    np.testing.assert_allclose(c.channel("ch1"), [0.1, 0.2, 5.0])
    np.testing.assert_allclose(c.channel(1), [0.5, 0.6, 0.7])
    assert any("Sample interval" in h for h in c.header)


def test_comment_lines_no_header_tabs(tmp_path):
    c = read_capture(_write(tmp_path, "c.tsv", "# exported\n# demo\n0\t1\n1e-3\t2\n2e-3\t3\n"))
    assert c.names == ("CH1",)
    assert c.units["CH1"] == "V"
    np.testing.assert_allclose(c.time, [0, 1e-3, 2e-3])
    assert c.header == ("# exported", "# demo")


def test_names_row_then_units_row(tmp_path):
    c = read_capture(_write(tmp_path, "d.csv", "X,OUT,GATE\ns,V,mV\n0,1,100\n1,2,200\n"))
    assert c.names == ("OUT", "GATE")
    np.testing.assert_allclose(c.channel("GATE"), [0.1, 0.2])


def test_slash_units_blank_separated_microseconds(tmp_path):
    c = read_capture(_write(tmp_path, "e.txt", "t/us   out/V\n0   0\n0.5   1\n1.0   2\n"))
    np.testing.assert_allclose(c.time, [0, 0.5e-6, 1e-6])


def test_time_column_found_by_its_unit_when_not_first(tmp_path):
    c = read_capture(_write(tmp_path, "f.csv", "CH1(V),Time(s),\n1,0,\n2,0.001,\n3,0.002,\n"))  # trailing commas
    np.testing.assert_allclose(c.time, [0, 1e-3, 2e-3])
    np.testing.assert_allclose(c.voltage, [1, 2, 3])


def test_current_channel_in_milliamperes(tmp_path):
    c = read_capture(_write(tmp_path, "g.csv", "time(s),I_motor(mA)\n0,400\n1e-6,420\n"))
    assert c.units["I_motor"] == "A"
    np.testing.assert_allclose(c.channel("I_motor"), [0.4, 0.42])


def test_parser_errors_give_the_line(tmp_path):
    with pytest.raises(DesignError, match=r"h\.csv: line 4: 1 columns where the data rows have 2"):
        read_capture(_write(tmp_path, "h.csv", "t,v\n0,1\n1,2\n3\n4,5\n5,6\n"))
    with pytest.raises(DesignError, match=r"i\.csv: line 3: 'abc' is not a number"):
        read_capture(_write(tmp_path, "i.csv", "t,v\n0,1\n1,abc\n2,3\n"))
    with pytest.raises(DesignError, match=r"j\.csv: no data rows"):
        read_capture(_write(tmp_path, "j.csv", "# only a comment\n"))
    with pytest.raises(DesignError, match=r"k\.csv: no such capture file"):
        read_capture(tmp_path / "k.csv")


def test_empty_cells_read_as_nan_then_timing_refuses(tmp_path):
    syn = pwm(2e3, 0.25, periods=6)
    body = _rows(syn.t, syn.v).split("\n")
    body[40] = body[40].split(",")[0] + ","
    c = read_capture(_write(tmp_path, "l.csv", "Time (s),CH1 (V)\n" + "\n".join(body) + "\n"))
    assert np.isnan(c.voltage[40])
    with pytest.raises(DesignError, match=r"v: sample 40"):
        capture_timing(c.time, c.voltage)


def test_csv_round_trip_to_a_reading(tmp_path):
    syn = pwm(30e3, 0.6, periods=30, noise=0.03, seed=8)
    text = "# synthetic test capture\nTime (us),OUT (V)\n" + _rows(syn.t * 1e6, syn.v) + "\n"
    r = reading_from_capture(_write(tmp_path, "m.csv", text), vcc=12.0, wiper=0.6)
    assert r.value("frequency") == pytest.approx(30e3, rel=1e-3)
    assert r.value("duty") == pytest.approx(0.6, rel=1e-3)
    assert r.conditions.vcc == 12.0
    assert "m.csv" in r.source and "whole periods" in r.source


def test_channel_by_name_or_number_and_current_channels_refused(tmp_path):
    syn = pwm(20e3, 0.4, periods=12, noise=0.02, seed=9)
    rows = "\n".join(f"{t:.9g},{0.5 * v:.6g},{v:.6g},{400 + v:.6g}" for t, v in zip(syn.t, syn.v))
    p = _write(tmp_path, "n.csv", "Time (s),GATE (V),OUT (V),I_fan (mA)\n" + rows + "\n")
    by_name = reading_from_capture(p, channel="out")
    by_number = reading_from_capture(p, channel=1)
    assert by_name.value("v_high") == pytest.approx(10.6, abs=0.05)
    assert by_number == by_name and "channel OUT" in by_name.source
    with pytest.raises(DesignError, match=r"channel: 'I_fan' is in A, not volts"):
        reading_from_capture(p, channel="I_fan")
    with pytest.raises(DesignError, match=r"channel: 'CH7' is not in the capture; channels: GATE, OUT, I_fan"):
        reading_from_capture(p, channel="CH7")
    m = capture_timing(syn.t, syn.v)
    assert "capture timing" in m._repr_html_()
