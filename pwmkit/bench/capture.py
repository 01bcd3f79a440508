"""Scope captures: read a CSV capture and measure the PWM waveform in it (design layer).

:func:`read_capture` reads the CSV files oscilloscopes and data loggers save — comment lines,
preamble lines (``Sample interval,2e-07``), a header row with the column names and units
(``Time (s)``, ``t [ms]``, ``CH1/mV``, or a separate row of units), comma, semicolon, tab or
blank separators (a decimal comma with semicolons or tabs), one or several channels — into
time and value arrays in SI units.

:func:`capture_timing` measures one channel: its low and high levels, the threshold crossings
with hysteresis, and from the *whole* periods between the first and the last rising edge the
frequency, the duty, the high and low times, and the 10–90 % rise and fall times.
:func:`reading_from_capture` does both and returns a :class:`~pwmkit.bench.BenchReading`.

References
----------
.. [1] IEEE Std 181-2011, *IEEE Standard for Transitions, Pulses, and Related Waveforms*:
   state levels from the histogram of the waveform, the 50 % reference level for the pulse
   duration, the 10 % and 90 % reference levels for the transition duration (for the terms and
   the method; from memory).
"""

from __future__ import annotations

import math
import os
import re
from collections.abc import Mapping
from dataclasses import dataclass
from pathlib import Path
from typing import Any

import numpy as np

from ..errors import DesignError

__all__ = ["MAX_CAPTURE_BYTES", "Capture", "CaptureTiming", "read_capture", "capture_timing",
           "reading_from_capture"]

#: Largest capture file read [bytes].
MAX_CAPTURE_BYTES = 64 << 20

#: Unit text (lower case) → (SI unit, factor).
_UNITS: Mapping[str, tuple[str, float]] = {
    "s": ("s", 1.0), "sec": ("s", 1.0), "second": ("s", 1.0), "seconds": ("s", 1.0),
    "ms": ("s", 1e-3), "us": ("s", 1e-6), "µs": ("s", 1e-6), "μs": ("s", 1e-6), "ns": ("s", 1e-9),
    "v": ("V", 1.0), "volt": ("V", 1.0), "volts": ("V", 1.0), "mv": ("V", 1e-3), "uv": ("V", 1e-6),
    "µv": ("V", 1e-6), "μv": ("V", 1e-6), "kv": ("V", 1e3),
    "a": ("A", 1.0), "amp": ("A", 1.0), "ampere": ("A", 1.0), "ma": ("A", 1e-3),
}
_COMMENT = ("#", "//", "%", "!")
_TIME_NAMES = ("time", "t", "x-axis", "x", "second", "seconds", "s")
_CELL_UNIT = re.compile(r"^(?P<name>.*?)\s*[\(\[]\s*(?P<unit>[^\)\]]*?)\s*[\)\]]\s*$")
_DATA_START = re.compile(r"^\s*\"?[-+]?(\d|\.\d)")
_SLASH_UNIT = re.compile(r"^(?P<name>[^/]*?)\s*/\s*(?P<unit>[A-Za-zµμ]+)\s*$")


# --------------------------------------------------------------------------------------------
# reading
# --------------------------------------------------------------------------------------------
@dataclass(frozen=True, eq=False)
class Capture:
    """A capture read from a file.

    Attributes
    ----------
    time : sample times [s]
    channels : channel name → samples, in the file's order [V] (or [A] for a current channel)
    units : channel name → SI unit ("V" or "A")
    source : the file read
    header : comment and preamble lines before the data (text)
    """

    time: np.ndarray
    channels: Mapping[str, np.ndarray]
    units: Mapping[str, str]
    source: str
    header: tuple[str, ...]

    @property
    def names(self) -> tuple[str, ...]:
        """Channel names in file order."""
        return tuple(self.channels)

    def channel(self, which: str | int = 0) -> np.ndarray:
        """Samples of one channel, by name (case-insensitive) or position from 0."""
        names = self.names
        if isinstance(which, (int, np.integer)) and not isinstance(which, bool):
            if not 0 <= int(which) < len(names):
                raise DesignError(f"channel: {which} is not allowed; this capture has channels 0 … {len(names) - 1} "
                                  f"({', '.join(names)})")
            return self.channels[names[int(which)]]
        if isinstance(which, str):
            for n in names:
                if n.lower() == which.strip().lower():
                    return self.channels[n]
        raise DesignError(f"channel: {which!r} is not in the capture; channels: {', '.join(names)}")

    def channel_name(self, which: str | int = 0) -> str:
        """The file's name of a channel given by name or position."""
        arr = self.channel(which)
        return next(n for n in self.names if self.channels[n] is arr)

    @property
    def voltage(self) -> np.ndarray:
        """The first channel [V]."""
        return self.channel(0)

    def __repr__(self) -> str:
        span = float(self.time[-1] - self.time[0]) if len(self.time) > 1 else 0.0
        return (f"Capture({Path(self.source).name}: {len(self.time)} samples over {span:.6g} s, channels "
                f"{', '.join(f'{n} [{self.units[n]}]' for n in self.names)})")


def _unit_of(text: str) -> tuple[str, float] | None:
    key = text.strip().strip("()[]").strip().lower()
    return _UNITS.get(key)


def _name_and_unit(cell: str) -> tuple[str, tuple[str, float] | None]:
    text = cell.strip().strip('"').strip()
    for pattern in (_CELL_UNIT, _SLASH_UNIT):
        m = pattern.match(text)
        if m and _unit_of(m.group("unit")) is not None:
            return m.group("name").strip(), _unit_of(m.group("unit"))
    if _unit_of(text) is not None:  # the cell is a unit word: "s", "V", "Volt"
        return "", _unit_of(text)
    return text, None


def _split(line: str, sep: str | None) -> list[str]:
    cells = line.split(sep) if sep is not None else line.split()
    return [c.strip() for c in cells]


def _is_number(cell: str, decimal_comma: bool) -> bool:
    text = cell.strip().strip('"')
    if decimal_comma:
        text = text.replace(",", ".")
    if not text:
        return False
    try:
        float(text)
    except ValueError:
        return False
    return True


def _number(cell: str, decimal_comma: bool) -> float:
    text = cell.strip().strip('"')
    if decimal_comma:
        text = text.replace(",", ".")
    return float(text) if text else math.nan


def _choose_separator(lines: list[str]) -> tuple[str | None, bool]:
    """(separator, decimal comma) from the last lines of the file (the data rows)."""
    numeric = [ln for ln in lines[-200:] if _DATA_START.match(ln)]
    tail = (numeric or lines)[-20:]
    for sep in (";", "\t", ","):
        counts = [ln.count(sep) for ln in tail]
        last = counts[-1]
        if last >= 1 and sum(c == last for c in counts) >= 0.8 * len(counts):
            decimal_comma = sep != "," and any("," in ln for ln in tail)
            return sep, decimal_comma
    return None, any("," in ln for ln in tail)  # blanks; a comma then can only be a decimal comma


def read_capture(path: str | os.PathLike[str]) -> Capture:
    """Read a CSV capture of time and voltage (one or several channels).

    Parameters
    ----------
    path : path-like
        A text file of at most 64 MiB: optional comment lines (starting with ``#``, ``//``,
        ``%`` or ``!``) and preamble lines, an optional header row naming the columns with their
        units — ``Time (s)``, ``time [ms]``, ``t/us``, ``CH1 (mV)``, or unit words in a row of
        their own (``s, V, V``) — then one row per sample. Separators: comma, semicolon, tab or
        blanks; with semicolons, tabs or blanks a comma is a decimal comma. The time column is the
        one named or unit-marked as time, else the first. Units: s, ms, us/µs, ns; V, mV, µV, kV;
        A, mA. Without units, seconds and volts.

    Returns
    -------
    Capture
        Times in seconds, channel samples in volts (amperes); empty cells read as NaN
        (:func:`capture_timing` refuses them).

    Raises
    ------
    DesignError
        Missing or oversized file, no numeric data rows, a row with another number of columns
        or with text where a number belongs (the message gives the line number), two time
        columns.
    """
    from ..record.files import read_limited

    p = Path(path)
    data = read_limited(p, MAX_CAPTURE_BYTES, what="capture file")
    try:
        text = data.decode("utf-8-sig")
    except UnicodeDecodeError:
        text = data.decode("latin-1")
    raw = text.splitlines()
    numbered = [(i + 1, ln) for i, ln in enumerate(raw) if ln.strip()]
    body = [(n, ln) for n, ln in numbered if not ln.lstrip().startswith(_COMMENT)]
    comments = tuple(ln.strip() for _n, ln in numbered if ln.lstrip().startswith(_COMMENT))
    if not body:
        raise DesignError(f"{p}: no data rows; a capture holds one row of time and voltage per sample")
    sep, decimal_comma = _choose_separator([ln for _n, ln in body])
    rows = [(n, _split(ln, sep)) for n, ln in body]
    first = next((i for i, (_n, cells) in enumerate(rows)
                  if len(cells) >= 2 and all(_is_number(c, decimal_comma) or not c for c in cells)
                  and _is_number(cells[0], decimal_comma)), None)
    if first is None:
        raise DesignError(f"{p}: no numeric data rows with two or more columns (time and at least one channel); "
                          f"separator taken as {sep or 'blanks'!r}")
    if all(len(cells) > 2 and cells[-1] == "" for _n, cells in rows[first:]):  # a separator ends every row
        rows = [(n, cells[:-1] if cells and cells[-1] == "" else cells) for n, cells in rows]
    width = len(rows[first][1])
    pre = rows[:first]
    names: list[str] = [""] * width
    units: list[tuple[str, float] | None] = [None] * width
    header_rows = [cells for _n, cells in pre if len(cells) == width]
    if header_rows:
        last = header_rows[-1]
        parsed = [_name_and_unit(c) for c in last]
        if len(header_rows) >= 2 and all(u is not None and not nm for nm, u in parsed):  # a row of units
            names = [_name_and_unit(c)[0] for c in header_rows[-2]]
            units = [u for _nm, u in parsed]
        else:
            names = [nm for nm, _u in parsed]
            units = [u for _nm, u in parsed]
    preamble = comments + tuple((sep or " ").join(cells) for _n, cells in pre)
    # the time column
    time_cols = [i for i in range(width) if (units[i] is not None and units[i][0] == "s")
                 or names[i].strip().lower() in _TIME_NAMES]
    if len(time_cols) > 1 and sum(1 for i in time_cols if units[i] is not None and units[i][0] == "s") > 1:
        raise DesignError(f"{p}: columns {', '.join(str(i + 1) for i in time_cols)} are all marked as time; "
                          "give one time column")
    tcol = time_cols[0] if time_cols else 0
    tunit = units[tcol] if units[tcol] is not None else ("s", 1.0)
    if tunit[0] != "s":
        raise DesignError(f"{p}: the time column {names[tcol] or tcol + 1!r} has the unit {tunit[0]!r}; "
                          "allowed s, ms, us, ns")
    values = np.empty((len(rows) - first, width))
    for k, (n, cells) in enumerate(rows[first:]):
        if len(cells) != width:
            raise DesignError(f"{p}: line {n}: {len(cells)} columns where the data rows have {width}")
        try:
            values[k] = [_number(c, decimal_comma) for c in cells]
        except ValueError:
            bad = next(c for c in cells if c and not _is_number(c, decimal_comma))
            raise DesignError(f"{p}: line {n}: {bad!r} is not a number") from None
    t = values[:, tcol] * tunit[1]
    channels: dict[str, np.ndarray] = {}
    chan_units: dict[str, str] = {}
    k = 0
    for i in range(width):
        if i == tcol:
            continue
        k += 1
        unit = units[i] if units[i] is not None else ("V", 1.0)
        if unit[0] == "s":
            raise DesignError(f"{p}: column {i + 1} ({names[i] or 'unnamed'}) is in seconds but is not the time "
                              "column; give one time column")
        name = names[i] or f"CH{k}"
        if name in channels:
            name = f"{name}_{i + 1}"
        channels[name] = values[:, i] * unit[1]
        chan_units[name] = unit[0]
    return Capture(time=t, channels=channels, units=chan_units, source=str(p), header=preamble)


# --------------------------------------------------------------------------------------------
# measuring
# --------------------------------------------------------------------------------------------
@dataclass(frozen=True)
class CaptureTiming:
    """Timing measured from a captured PWM waveform.

    Attributes
    ----------
    frequency : whole periods / their time span [Hz]
    duty : total high time / total time of the whole periods [1]
    period, t_high, t_low : mean period, high and low time [s]
    rise_time, fall_time : median 10–90 % and 90–10 % transition times [s]
    v_high, v_low : high and low state levels (medians of the samples above / below the
        mid-level) [V]
    threshold : the level whose crossings time the edges [V]
    hysteresis : half-width of the band a trace must cross to count as an edge [V]
    n_periods : whole periods used; n_samples : samples in the capture
    sample_interval : largest step between samples [s]
    frequency_limit : sampling limit of the relative frequency error, ``2·dt/(n·T)`` [1]
    duty_limit : sampling limit of the duty error, ``2·dt/T`` [1]
    """

    frequency: float
    duty: float
    period: float
    t_high: float
    t_low: float
    rise_time: float
    fall_time: float
    v_high: float
    v_low: float
    threshold: float
    hysteresis: float
    n_periods: int
    n_samples: int
    sample_interval: float
    frequency_limit: float
    duty_limit: float

    def __repr__(self) -> str:
        return (f"CaptureTiming(f = {self.frequency:.6g} Hz, duty = {100 * self.duty:.4f} %, "
                f"{self.n_periods} whole periods, levels {self.v_low:.4g} / {self.v_high:.4g} V)")

    def _repr_html_(self) -> str:
        from ..values import format_value as fv

        def t(x: float) -> str:
            return fv(x, "s", 4) if math.isfinite(x) else "—"

        rows = [("frequency", f"{fv(self.frequency, 'Hz', 6)} (sampling limit ±{100 * self.frequency_limit:.2g} %)"),
                ("duty", f"{100 * self.duty:.4f} % (sampling limit ±{100 * self.duty_limit:.2g} points)"),
                ("t_high / t_low", f"{t(self.t_high)} / {t(self.t_low)}"),
                ("rise / fall (10–90 %)", f"{t(self.rise_time)} / {t(self.fall_time)}"),
                ("levels low / high", f"{fv(self.v_low, 'V', 4)} / {fv(self.v_high, 'V', 4)}"),
                ("threshold ± hysteresis", f"{fv(self.threshold, 'V', 4)} ± {fv(self.hysteresis, 'V', 3)}"),
                ("whole periods / samples", f"{self.n_periods} / {self.n_samples}")]
        body = "".join(f"<tr><th style='text-align:left'>{a}</th><td>{b}</td></tr>" for a, b in rows)
        return f"<table class='pwmkit-result'><caption>capture timing</caption>{body}</table>"


def _arrays(t: Any, v: Any) -> tuple[np.ndarray, np.ndarray]:
    try:
        tt = np.asarray(t, dtype=float)
        vv = np.asarray(v, dtype=float)
    except (TypeError, ValueError) as exc:
        raise DesignError(f"t, v: not arrays of numbers ({exc})") from None
    if tt.ndim != 1 or vv.ndim != 1 or tt.shape != vv.shape:
        raise DesignError(f"t, v: give two one-dimensional arrays of the same length; got shapes {tt.shape} and "
                          f"{vv.shape}")
    if tt.size < 16:
        raise DesignError(f"t: {tt.size} samples; a capture needs at least 16 (and at least two whole periods)")
    for name, arr, unit in (("t", tt, "s"), ("v", vv, "V")):
        if math.isfinite(float(arr.min())) and math.isfinite(float(arr.max())):  # NaN and ±inf show in min/max
            continue
        bad = ~np.isfinite(arr)
        if bad.any():
            i = int(np.argmax(bad))
            count = int(bad.sum())
            at = f" (t = {tt[i]:.6g} s)" if name == "v" and math.isfinite(tt[i]) else ""
            raise DesignError(f"{name}: sample {i}{at} is {float(arr[i])!r} ({count} non-finite sample(s) in all); a capture "
                              f"must hold finite numbers in {unit} — an over-range or missing sample? Trim or "
                              "re-capture")
    step = np.diff(tt)
    if not (step > 0).all():
        i = int(np.argmax(~(step > 0)))
        raise DesignError(f"t: time is not increasing at sample {i + 1} ({tt[i]:.9g} s then {tt[i + 1]:.9g} s); "
                          "the time column must rise strictly from row to row")
    return tt, vv


def _clipped(v: np.ndarray, top: bool) -> tuple[bool, float, int]:
    """A pile-up of samples at exactly the extreme value (a flat, clipped top or bottom)."""
    ext = float(v.max() if top else v.min())
    n_at = int(np.count_nonzero(v == ext))
    if n_at < max(5, int(0.002 * v.size)):  # no pile-up (the common case: no second pass)
        return False, ext, n_at
    rest = v[v != ext]
    n_next = int(np.count_nonzero(rest == (rest.max() if top else rest.min()))) if rest.size else 0
    return n_at > 3 * n_next, ext, n_at


def _crossings(t: np.ndarray, v: np.ndarray, level: float) -> np.ndarray:
    """Linearly interpolated times where v crosses ``level`` (either way)."""
    s = v - level
    k = np.nonzero((s[:-1] < 0) != (s[1:] < 0))[0]
    frac = s[k] / (s[k] - s[k + 1])
    return t[k] + frac * (t[k + 1] - t[k])


def capture_timing(t: Any, v: Any, *, threshold: Any = None) -> CaptureTiming:
    """Frequency, duty, edges and levels of a captured PWM waveform.

    Method: the state levels are the medians of the samples below and above the mid-level of the
    2nd and 98th percentiles (order statistics) (IEEE Std 181 uses the histogram modes; the medians are their
    robust stand-in for two-level waveforms). An edge counts only when the trace crosses the
    whole hysteresis band ``threshold ± h`` with ``h`` = 20 % of the amplitude (less if the
    threshold is given close to a level), so noise and ringing that stay inside the band never
    add edges. Each edge's time is the mean of the first and the last linearly interpolated
    crossing of ``threshold`` while the trace passes through the band. Only whole periods count:
    from the first to the last rising edge, ``n`` periods give

    .. math::
        f = \\frac{n}{t_{rise,n} - t_{rise,0}},\\qquad
        D = \\frac{\\sum_i (t_{fall,i} - t_{rise,i})}{t_{rise,n} - t_{rise,0}}

    Parameters
    ----------
    t : array_like
        Sample times, strictly increasing [s].
    v : array_like
        Samples [V].
    threshold : float, optional
        Timing level [V]; default the mid-level ``(v_low + v_high)/2``. Must lie between the levels.

    Returns
    -------
    CaptureTiming

    Raises
    ------
    DesignError
        Fewer than 16 samples, NaN or infinite samples, time that does not rise strictly, a flat
        trace, a clipped trace, a threshold outside the levels, or fewer than two whole periods.
        Clipped means: at one level, samples pile up at exactly the capture's extreme value (more
        than three times as many as at the next value, and at least 0.2 % of the samples) while
        the other level shows noise — the signal left the scope's vertical range. A trace flat at
        *both* levels is taken as noise-free (simulated) data, not as clipped.

    Notes
    -----
    Sampling limit: when each edge's noise-induced timing error is below one sample interval
    ``dt`` (the largest step in ``t``), each edge time is within ``dt`` of the true crossing, so
    the frequency is within ``2·dt/(n·T)`` (relative) and the duty within ``2·dt/T`` (absolute)
    of the true values; :attr:`CaptureTiming.frequency_limit` and ``duty_limit`` give these
    bounds. Linear interpolation makes the actual error much smaller on clean edges. Jitter
    averages out: the result is the mean over the whole periods in the capture.

    Examples
    --------
    >>> import numpy as np
    >>> i = np.arange(10000)                     # 1 ms at 10 MS/s: a 10 kHz, 30 % square wave
    >>> t = i * 1e-7
    >>> v = np.where((i + 250) % 1000 < 300, 5.0, 0.0) + 0.01 * np.sin(2e6 * t)
    >>> m = capture_timing(t, v)
    >>> round(m.frequency, 1), round(m.duty, 5), m.n_periods
    (10000.0, 0.3, 9)

    References
    ----------
    .. [1] IEEE Std 181-2011, clauses on state levels, reference levels and pulse duration
       (method; from memory).
    """
    tt, vv = _arrays(t, v)
    n = vv.size
    lo0, hi0 = (float(x) for x in np.partition(vv, [int(0.02 * (n - 1)), int(0.98 * (n - 1))])[
        [int(0.02 * (n - 1)), int(0.98 * (n - 1))]])
    scale = max(abs(lo0), abs(hi0), 1e-300)
    if hi0 - lo0 <= 1e-9 * scale:
        raise DesignError(f"v: the trace is flat ({lo0:.6g} … {hi0:.6g} V between the 2nd and 98th percentile); "
                          "no edges to time — is this the right channel?")
    mid0 = 0.5 * (lo0 + hi0)
    # medians of the samples below and above the mid-level, as order statistics of the whole trace
    n_low = int(np.count_nonzero(vv < mid0))
    n_high = n - n_low
    ranks = [(n_low - 1) // 2, n_low // 2, n_low + (n_high - 1) // 2, n_low + n_high // 2]
    part = np.partition(vv, sorted(set(ranks)))
    v_low = 0.5 * (float(part[ranks[0]]) + float(part[ranks[1]]))
    v_high = 0.5 * (float(part[ranks[2]]) + float(part[ranks[3]]))
    amp = v_high - v_low
    piles = [_clipped(vv, top) for top in (True, False)]
    if piles[0][0] != piles[1][0]:   # one level piles up at the extreme while the other shows noise
        top = piles[0][0]
        _c, level, count = piles[0] if top else piles[1]
        side = "highest" if top else "lowest"
        raise DesignError(f"v: the trace is clipped: {count} samples sit at exactly the {side} value {level:.6g} V "
                          f"(a flat {'top' if top else 'bottom'} where the signal left the scope's vertical range); "
                          "re-capture with more volts per division or another offset")
    if threshold is None:
        th = 0.5 * (v_low + v_high)
    else:
        from .._validate import quantity

        th = float(quantity(threshold, "threshold", unit="V"))
        if not v_low < th < v_high:
            raise DesignError(f"threshold: {th:.6g} V is out of range; allowed between the low level {v_low:.6g} V "
                              f"and the high level {v_high:.6g} V of this trace")
    h = min(0.2 * amp, 0.8 * (th - v_low), 0.8 * (v_high - th))
    high = vv > th + h
    known = np.flatnonzero(high | (vv < th - h))           # samples outside the hysteresis band
    if known.size == 0:
        raise DesignError("v: the trace never leaves the band around the threshold; no edges to time")
    ks = high[known]
    flips = np.flatnonzero(ks[1:] != ks[:-1]) + 1
    change = known[flips]                                  # first sample beyond the far band edge
    near = known[flips - 1]                                # last sample on the near side
    edge_time = np.empty(change.size)
    rising = ks[flips]
    for e, (j, k) in enumerate(zip(near, change)):
        seg_t, seg_v = tt[j:k + 1], vv[j:k + 1]
        cr = _crossings(seg_t, seg_v, th)
        edge_time[e] = 0.5 * (cr[0] + cr[-1])
    r_times, f_times = edge_time[rising], edge_time[~rising]
    n = r_times.size - 1
    if n < 2:
        raise DesignError(f"capture: {max(n, 0)} whole period(s) found ({r_times.size} rising and {f_times.size} "
                          "falling edges); at least two whole periods are needed — capture a longer time span "
                          "or check the threshold")
    span = float(r_times[-1] - r_times[0])
    period = span / n
    # the falling edge inside each whole period (the states alternate, so there is exactly one)
    pos = np.searchsorted(f_times, r_times[:-1])
    falls = f_times[pos]
    highs = falls - r_times[:-1]
    duty = float(highs.sum() / span)
    rise, fall = _transition_times(tt, vv, change, rising, v_low + 0.1 * amp, v_low + 0.9 * amp)
    dt = float(np.max(np.diff(tt)))
    return CaptureTiming(
        frequency=1.0 / period, duty=duty, period=period, t_high=float(highs.mean()),
        t_low=period - float(highs.mean()), rise_time=rise, fall_time=fall, v_high=v_high, v_low=v_low,
        threshold=th, hysteresis=h, n_periods=int(n), n_samples=int(tt.size), sample_interval=dt,
        frequency_limit=2.0 * dt / span, duty_limit=2.0 * dt / period,
    )


def _transition_times(t: np.ndarray, v: np.ndarray, change: np.ndarray, rising: np.ndarray, l10: float,
                      l90: float) -> tuple[float, float]:
    """Median 10–90 % rise and 90–10 % fall times (interpolated level crossings around each edge)."""
    out: dict[bool, list[float]] = {True: [], False: []}
    bounds = np.concatenate([[0], change, [v.size - 1]])
    for e, k in enumerate(change):
        lo_i, hi_i = int(bounds[e]), int(bounds[e + 2])
        up = bool(rising[e])
        before = v[lo_i:k + 1] <= l10 if up else v[lo_i:k + 1] >= l90
        after = v[k:hi_i + 1] >= l90 if up else v[k:hi_i + 1] <= l10
        if not before.any() or not after.any():
            continue
        a = lo_i + int(np.nonzero(before)[0][-1])            # last sample beyond the start level
        b = k + int(np.nonzero(after)[0][0])                 # first sample beyond the end level
        start, end = (l10, l90) if up else (l90, l10)
        t0 = _level_time(t, v, a, start)
        t1 = _level_time(t, v, b - 1, end)
        out[up].append(t1 - t0)
    rise = float(np.median(out[True])) if out[True] else math.nan
    fall = float(np.median(out[False])) if out[False] else math.nan
    return rise, fall


def _level_time(t: np.ndarray, v: np.ndarray, i: int, level: float) -> float:
    """Interpolated time of ``level`` between samples i and i+1."""
    dv = v[i + 1] - v[i]
    frac = 0.0 if dv == 0 else min(max((level - v[i]) / dv, 0.0), 1.0)
    return float(t[i] + frac * (t[i + 1] - t[i]))


def reading_from_capture(capture: Capture | str | os.PathLike[str], *, channel: str | int = 0,
                         threshold: Any = None, vcc: Any = None, t_ambient_c: Any = None, wiper: Any = None,
                         date: Any = None, note: str = "", sampling_limits: bool = True) -> Any:
    """A :class:`~pwmkit.bench.BenchReading` of frequency, duty and edges measured from a capture.

    The frequency and duty carry their sampling limits as the stated accuracy
    (``frequency_limit`` as ``accuracy``, ``duty_limit`` as ``resolution``); the levels, edge
    and high/low times are stored as measured. ``source`` names the file, the channel and the
    number of whole periods.

    Parameters
    ----------
    capture : Capture or path-like
        A capture, or a CSV file for :func:`read_capture`.
    channel : str or int
        Channel name or position from 0 (default the first).
    threshold : float, optional
        Timing level [V] (default mid-level).
    vcc, t_ambient_c, wiper : float, optional
        Conditions of the reading [V], [°C], [1].
    date : str or date, optional
        When the capture was taken (ISO text).
    note : str
        Free text.
    sampling_limits : bool
        Store the sampling limits as the stated accuracy (default True).
    """
    from .readings import BenchConditions, BenchReading, Measured

    cap = capture if isinstance(capture, Capture) else read_capture(capture)
    name = cap.channel_name(channel)
    if cap.units[name] != "V":
        raise DesignError(f"channel: {name!r} is in {cap.units[name]}, not volts; give the output-voltage channel")
    m = capture_timing(cap.time, cap.channel(channel), threshold=threshold)
    acc = m.frequency_limit if sampling_limits else None
    res = m.duty_limit if sampling_limits else None
    measured = [Measured("frequency", m.frequency, accuracy=acc), Measured("duty", m.duty, resolution=res),
                Measured("t_high", m.t_high), Measured("t_low", m.t_low)]
    for key in ("rise_time", "fall_time"):
        value = getattr(m, key)
        if math.isfinite(value):
            measured.append(Measured(key, value))
    measured += [Measured("v_high", m.v_high), Measured("v_low", m.v_low)]
    src = f"capture {Path(cap.source).name}, channel {name}, {m.n_periods} whole periods"
    return BenchReading(measured=tuple(measured), conditions=BenchConditions(vcc=vcc, t_ambient_c=t_ambient_c,
                                                                             wiper=wiper),
                        date=date, note=note, source=src)
