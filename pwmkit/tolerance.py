"""Spread of frequency and duty: Monte Carlo and worst case over a tolerance box.

A *spread model* turns the caller's tolerances and conditions into a list of dimensions, each a band
on one quantity:

* a relative band on a timing parameter of :func:`pwmkit.timing.astable` (``ra``, ``rb``, ``c``,
  ``pot`` end to end, ``vd``, ``vsat``, ``r_on``, ``vctl`` …); ``wiper`` takes its band in fraction of
  the travel (the wiper position is exact unless given). With the internal divider, a ``vctl`` band
  moves the threshold *ratio*: ``vctl = 2·vcc/3·(1 + δ)``;
* the capacitor's initial tolerance from its dielectric (:mod:`pwmkit.parts.capacitors`) when no
  ``c`` tolerance is given;
* the supply range ``vcc_range`` (uniform, volts);
* the ambient range ``t_ambient_c``: it moves the diode drop by ``vd_tempco·(T − 25 °C)`` (≈ −2 mV/K
  for silicon, common practice; Shockley law with series resistance: Sze & Ng, Physics of Semiconductor Devices, 3rd ed., ch. 2, from memory derives −1.8 mV/K at 0.65 V from the diode law) and
  the capacitor within its dielectric's temperature envelope;
* ``timer_errors``: the timer family's own initial accuracy, temperature drift and supply
  sensitivity (:mod:`pwmkit.parts.timers`), applied as a multiplicative frequency error
  ``f·(1 + e)``. Data sheets give magnitudes, not signs, so each is a symmetric band:
  ``e = a·u₁ + drift·|T − 25 °C|·u₂ + s·|vcc − vcc_nom|·u₃`` with ``u`` uniform in [−1, 1]; the
  duty is taken as unaffected. Do not also give a ``vctl`` band from the family's threshold
  spread: the initial accuracy already contains it (it is measured in the timing circuit).

Monte Carlo draws every band independently (uniform, or normal with tolerance = 3σ) with a seeded
:class:`numpy.random.Generator` and evaluates all samples in one vectorised :func:`astable` call.
The worst case evaluates every corner of the box (2^k points, vectorised), checks the signs of the
exact sensitivities (:mod:`pwmkit.sensitivity`) at the nominal point and at every corner, and when a
sign changes inside the box searches the interior too (grid or random sampling plus a compass
refinement).

References
----------
.. [1] JCGM 101:2008, *Propagation of distributions using a Monte Carlo method* (supplement 1 to
   the GUM), §5–§7 (the method), for the approach; from memory.
.. [2] JCGM 100:2008 (GUM) §4.3.7 (rectangular distributions).
"""

from __future__ import annotations

import math
from collections.abc import Mapping
from dataclasses import dataclass, field
from typing import Any

import numpy as np

from ._spread import (
    DEFAULT_VD_TEMPCO,
    Dim,
    Model,
    build_model,
    evaluate,
    generator,
    pair,
    reason_text,
    sample,
    values,
)
from .errors import DesignError, ModelLimit
from .sensitivity import parameters_of, partials

__all__ = ["Histogram", "SpreadPercentiles", "SpreadResult", "ExtremePoint", "WorstCaseResult", "monte_carlo",
           "worst_case", "DEFAULT_VD_TEMPCO"]

_MAX_SAMPLES = 20_000_000


# -- Monte Carlo ----------------------------------------------------------------------------------

@dataclass(frozen=True, eq=False)
class Histogram:
    """Histogram data for plotting: ``counts[i]`` samples in ``[edges[i], edges[i+1])`` [1, unit]."""

    counts: np.ndarray
    edges: np.ndarray

    def __repr__(self) -> str:
        return f"Histogram({len(self.counts)} bins, {self.edges[0]:.6g} … {self.edges[-1]:.6g})"


@dataclass(frozen=True)
class SpreadPercentiles:
    """Percentiles of a Monte Carlo run: ``q`` [%], ``frequency`` [Hz], ``duty`` [1] (floats or arrays)."""

    q: Any
    frequency: Any
    duty: Any


def _window(value: Any, name: str, unit: str) -> tuple[float, float] | None:
    return None if value is None else pair(value, name, unit)


@dataclass(frozen=True, eq=False)
class SpreadResult:
    """Monte Carlo spread of frequency and duty.

    Attributes
    ----------
    topology, timer : str
    n : number of samples drawn
    n_failed : samples that do not oscillate (counted as failures in the yield)
    failure_reasons : mapping reason → count
    seed : the seed given
    frequency, duty : arrays of the oscillating samples (length n when n_failed = 0) [Hz], [1]
    nominal_frequency, nominal_duty : values at the nominal design [Hz], [1]
    frequency_mean, frequency_std, duty_mean, duty_std : sample statistics [Hz], [1]
    frequency_histogram, duty_histogram : Histogram
    frequency_window, duty_window : spec windows (low, high) or None [Hz], [1]
    yield_ : share of all n samples that oscillate and lie in the windows, or None [1]
    sources : the spread dimensions, as text
    """

    topology: str
    timer: str
    n: int
    n_failed: int
    failure_reasons: Mapping[str, int]
    seed: Any
    frequency: np.ndarray
    duty: np.ndarray
    nominal_frequency: float
    nominal_duty: float
    frequency_mean: float
    frequency_std: float
    duty_mean: float
    duty_std: float
    frequency_histogram: Histogram
    duty_histogram: Histogram
    frequency_window: tuple[float, float] | None
    duty_window: tuple[float, float] | None
    yield_: float | None
    sources: tuple[str, ...] = field(default=())

    def percentile(self, q: Any) -> SpreadPercentiles:
        """Percentiles ``q`` (0–100) of frequency and duty over the oscillating samples."""
        from ._validate import quantity

        qq = quantity(q, "q", unit="%", minimum=0.0, maximum=100.0)
        f = np.percentile(self.frequency, qq)
        d = np.percentile(self.duty, qq)
        if np.ndim(qq) == 0:
            return SpreadPercentiles(float(qq), float(f), float(d))
        return SpreadPercentiles(qq, f, d)

    def yield_for(self, frequency_window: Any = None, duty_window: Any = None) -> float:
        """Share of all n samples that oscillate and lie inside the given windows [1]."""
        fw = _window(frequency_window, "frequency_window", "Hz")
        dw = _window(duty_window, "duty_window", "1")
        inside = np.ones(self.frequency.shape, dtype=bool)
        if fw is not None:
            inside &= (self.frequency >= fw[0]) & (self.frequency <= fw[1])
        if dw is not None:
            inside &= (self.duty >= dw[0]) & (self.duty <= dw[1])
        return float(inside.sum()) / self.n

    def __repr__(self) -> str:
        y = "" if self.yield_ is None else f", yield {100 * self.yield_:.2f} %"
        fail = f", {self.n_failed} not oscillating" if self.n_failed else ""
        return (f"SpreadResult({self.topology}, n={self.n}{fail}: f = {self.frequency_mean:.6g} ± "
                f"{self.frequency_std:.3g} Hz, duty = {100 * self.duty_mean:.3f} ± {100 * self.duty_std:.3g} %{y})")

    def _repr_html_(self) -> str:
        from .glossary import plural
        from .numstyle import screen

        p = self.percentile(np.array([0.135, 50.0, 99.865]))
        rows = [
            ("samples", screen(self.n, "count") + (f" ({plural(self.n_failed, 'sample')} do not oscillate)"
                                                   if self.n_failed else "")),
            ("nominal", f"{screen(self.nominal_frequency, 'Hz')}, {screen(self.nominal_duty, 'duty')}"),
            ("frequency mean ± σ", f"{screen(self.frequency_mean, 'Hz')} ± {screen(self.frequency_std, 'Hz', 3)}"),
            ("frequency 0.135 / 50 / 99.865 %", " / ".join(screen(x, "Hz") for x in p.frequency)),
            ("duty mean ± σ", f"{screen(self.duty_mean, 'duty')} ± {screen(self.duty_std, 'points').lstrip('+')}"),
            ("duty 0.135 / 50 / 99.865 %", " / ".join(screen(x, "duty") for x in p.duty)),
        ]
        if self.yield_ is not None:
            rows.append(("yield", screen(self.yield_, "duty")))
        rows += [("spread", s) for s in self.sources]
        body = "".join(f"<tr><th style='text-align:left'>{a}</th><td>{b}</td></tr>" for a, b in rows)
        return f"<table class='pwmkit-result'><caption>Monte Carlo spread — {self.topology}</caption>{body}</table>"


def _histogram(x: np.ndarray, bins: int) -> tuple[np.ndarray, np.ndarray]:
    """np.histogram over the data range, widened when the spread is below float resolution."""
    lo, hi = float(x.min()), float(x.max())
    least = 1e-9 * bins * max(abs(lo), abs(hi), 1e-300)
    if hi - lo < least:
        mid = 0.5 * (lo + hi)
        lo, hi = mid - least, mid + least
    return np.histogram(x, bins=bins, range=(lo, hi))


def monte_carlo(topology: str, *, n: int, seed: Any, tolerances: Mapping[str, Any] | None,
                distribution: Any = "uniform", distributions: Mapping[str, str] | None = None,
                dielectric: Any = None, t_ambient_c: Any = None, vcc_range: Any = None, timer_errors: bool = False,
                vd_tempco: float = DEFAULT_VD_TEMPCO, frequency_window: Any = None, duty_window: Any = None,
                bins: int = 50, allow_failures: bool = False, **params: Any) -> SpreadResult:
    """Monte Carlo spread of the astable frequency and duty.

    Draws ``n`` samples of every spread dimension (see the module docstring), evaluates them in
    one vectorised :func:`pwmkit.timing.astable` call and summarises them.

    Parameters
    ----------
    topology : {"classic", "bypass", "steered", "pot"}
    n : int
        Number of samples (1 … 2e7).
    seed : int, None or numpy.random.Generator
        Seed of the random generator (results are reproducible for an integer seed).
    tolerances : mapping or None
        Parameter of astable() → relative tolerance: a fraction, a string such as ``"5%"`` or a
        (low, high) pair, e.g. ``{"ra": 0.05, "c": 0.2}``; ``wiper`` in fraction of travel.
    distribution : "uniform" or "normal" or mapping
        Distribution of every band ("normal": tolerance = 3σ, centred on the middle of an
        asymmetric band); a mapping gives it per parameter. Supply range, ambient, capacitor
        temperature envelope and timer errors are always uniform.
    distributions : mapping, optional
        Per-parameter override of ``distribution``.
    dielectric : str or Dielectric, optional
        Capacitor dielectric: its initial tolerance (when ``c`` has none in ``tolerances``) and,
        with ``t_ambient_c``, its temperature envelope.
    t_ambient_c : (float, float), optional
        Ambient temperature range, uniform [°C].
    vcc_range : (float, float), optional
        Supply range, uniform [V] (instead of a ``vcc`` tolerance).
    timer_errors : bool
        Add the timer family's initial accuracy, drift and supply sensitivity.
    vd_tempco : float
        Diode-drop temperature coefficient [V/K].
    frequency_window, duty_window : (float, float), optional
        Spec windows for the yield [Hz], [1].
    bins : int
        Histogram bins.
    allow_failures : bool
        If False (default) a run in which some samples do not oscillate raises DesignError; if
        True the arrays hold only the oscillating samples and ``n_failed`` counts the others
        (they count as failures in the yield).
    **params
        The nominal design as keywords of :func:`pwmkit.timing.astable` (strings accepted).

    Returns
    -------
    SpreadResult

    Raises
    ------
    DesignError
        Bad input, a nominal design that does not oscillate, or (without ``allow_failures``)
        samples that do not oscillate — the message says how many and why.

    Examples
    --------
    >>> r = monte_carlo("classic", n=20000, seed=1, tolerances={"ra": 0.01, "rb": 0.01, "c": 0.05},
    ...                 ra="10k", rb="10k", c="100n", vcc=12, vsat=0)
    >>> round(r.nominal_frequency, 2), r.frequency.shape
    (480.9, (20000,))
    """
    n_ok = isinstance(n, (int, np.integer)) and not isinstance(n, bool) and 1 <= n <= _MAX_SAMPLES
    if not n_ok:
        raise DesignError(f"n: {n!r} is not allowed; give an integer 1 … {_MAX_SAMPLES}")
    if not isinstance(bins, (int, np.integer)) or isinstance(bins, bool) or not 1 <= bins <= 10_000:
        raise DesignError(f"bins: {bins!r} is not allowed; give an integer 1 … 10000")
    rng = generator(seed)
    model = build_model(topology, tolerances, distribution, distributions, dielectric, t_ambient_c, vcc_range,
                         timer_errors, vd_tempco, params)
    fw = _window(frequency_window, "frequency_window", "Hz")
    dw = _window(duty_window, "duty_window", "1")
    dev = sample(model, int(n), rng)
    freq, duty, ok, reasons = evaluate(model, dev, int(n))
    n_failed = int(n - ok.sum())
    if n_failed and not allow_failures:
        raise ModelLimit(f"monte_carlo: {n_failed} of {n} samples do not oscillate ({reason_text(reasons)}); "
                          "narrow the tolerances or move the design away from the limit, or pass "
                          "allow_failures=True to count them as failures in the yield")
    if n_failed == n:
        raise ModelLimit(f"monte_carlo: none of the {n} samples oscillates ({reason_text(reasons)})")
    if n_failed:
        freq, duty = freq[ok], duty[ok]
    yield_ = None
    if fw is not None or dw is not None:
        inside = np.ones(freq.shape, dtype=bool)
        if fw is not None:
            inside &= (freq >= fw[0]) & (freq <= fw[1])
        if dw is not None:
            inside &= (duty >= dw[0]) & (duty <= dw[1])
        yield_ = float(inside.sum()) / n
    fc, fe = _histogram(freq, int(bins))
    dc, de = _histogram(duty, int(bins))
    return SpreadResult(
        topology=topology, timer=model.nominal.timer, n=int(n), n_failed=n_failed, failure_reasons=dict(reasons),
        seed=seed, frequency=freq, duty=duty, nominal_frequency=float(model.nominal.frequency),
        nominal_duty=float(model.nominal.duty), frequency_mean=float(freq.mean()), frequency_std=float(freq.std()),
        duty_mean=float(duty.mean()), duty_std=float(duty.std()), frequency_histogram=Histogram(fc, fe),
        duty_histogram=Histogram(dc, de), frequency_window=fw, duty_window=dw, yield_=yield_,
        sources=model.sources(),
    )


# -- worst case -----------------------------------------------------------------------------------

@dataclass(frozen=True)
class ExtremePoint:
    """Where an extreme is reached.

    Attributes
    ----------
    deviations : mapping dimension label → deviation (relative for bands, V for the supply range,
        °C for the ambient)
    params : the astable() keyword values there (``frequency_factor``: the timer's multiplier)
    corner : True if the point is a corner of the box
    """

    deviations: Mapping[str, float]
    params: Mapping[str, float]
    corner: bool


@dataclass(frozen=True)
class WorstCaseResult:
    """Extremes of frequency and duty over a tolerance box.

    Attributes
    ----------
    topology, timer : str
    frequency_nominal, duty_nominal : [Hz], [1]
    frequency_min, frequency_max : [Hz]
    duty_min, duty_max : [1]
    frequency_min_at, frequency_max_at, duty_min_at, duty_max_at : ExtremePoint
    method : "corners" or "corners+interior"
    non_monotonic : sign changes found, e.g. ("frequency: vctl",)
    n_evaluated : design points evaluated
    sources : the box dimensions, as text
    """

    topology: str
    timer: str
    frequency_nominal: float
    duty_nominal: float
    frequency_min: float
    frequency_max: float
    duty_min: float
    duty_max: float
    frequency_min_at: ExtremePoint
    frequency_max_at: ExtremePoint
    duty_min_at: ExtremePoint
    duty_max_at: ExtremePoint
    method: str
    non_monotonic: tuple[str, ...]
    n_evaluated: int
    sources: tuple[str, ...]

    @property
    def frequency_rel_low(self) -> float:
        """frequency_min / frequency_nominal − 1 [1]."""
        return self.frequency_min / self.frequency_nominal - 1.0

    @property
    def frequency_rel_high(self) -> float:
        """frequency_max / frequency_nominal − 1 [1]."""
        return self.frequency_max / self.frequency_nominal - 1.0

    def __repr__(self) -> str:
        return (f"WorstCaseResult({self.topology}, {self.method}: f {self.frequency_min:.6g} … "
                f"{self.frequency_max:.6g} Hz ({100 * self.frequency_rel_low:+.3f} / "
                f"{100 * self.frequency_rel_high:+.3f} %), duty {100 * self.duty_min:.4f} … "
                f"{100 * self.duty_max:.4f} %)")

    def _repr_html_(self) -> str:
        from .numstyle import screen

        def deviation(label: str, v: float) -> str:
            # supply and ambient are absolute values; every other dimension is a relative deviation
            if label == "vcc":
                return f"supply {screen(v, 'V')}"
            if label == "ambient":
                return f"ambient {screen(v, '°C')}"
            return f"{label} {screen(v, 'relative')}"

        def at(p: ExtremePoint) -> str:
            where = ", ".join(deviation(k, v) for k, v in p.deviations.items())
            return ("corner: " if p.corner else "interior: ") + where

        rows = [
            ("nominal", f"{screen(self.frequency_nominal, 'Hz')}, {screen(self.duty_nominal, 'duty')}", ""),
            ("frequency min", f"{screen(self.frequency_min, 'Hz')} ({screen(self.frequency_rel_low, 'relative')})",
             at(self.frequency_min_at)),
            ("frequency max", f"{screen(self.frequency_max, 'Hz')} ({screen(self.frequency_rel_high, 'relative')})",
             at(self.frequency_max_at)),
            ("duty min", screen(self.duty_min, "duty"), at(self.duty_min_at)),
            ("duty max", screen(self.duty_max, "duty"), at(self.duty_max_at)),
            ("method", f"{self.method} ({self.n_evaluated} points)", "; ".join(self.non_monotonic)),
        ]
        body = "".join(f"<tr><th style='text-align:left'>{a}</th><td>{b}</td><td>{c}</td></tr>" for a, b, c in rows)
        return f"<table class='pwmkit-result'><caption>worst case — {self.topology}</caption>{body}</table>"


def _box_points(model: Model, dims: tuple[Dim, ...], u: np.ndarray) -> dict[str, np.ndarray]:
    """Deviations at normalised box coordinates u (m × k, each in [0, 1])."""
    return {d.key: d.low + (d.high - d.low) * u[:, i] for i, d in enumerate(dims)}


def _slopes(model: Model, dims: tuple[Dim, ...], dev: Mapping[str, np.ndarray], m: int) -> tuple[np.ndarray,
                                                                                                    np.ndarray]:
    """Signs (−1, 0, +1) of ∂f/∂dim and ∂D/∂dim at m points (exact partials; tiny effects → 0)."""
    v, mult = values(model, dev)
    p = partials(model.topology, v, model.internal_vctl)
    f = np.asarray(p.frequency) * mult
    d = np.asarray(p.duty)
    sf = np.zeros((m, len(dims)))
    sd = np.zeros((m, len(dims)))
    for i, dim in enumerate(dims):
        half = 0.5 * (dim.high - dim.low)
        if dim.key == "timer":
            sf[:, i] = np.sign(half)
            continue
        if dim.key == "t_ambient_c":
            target, scale = "vd", model.vd_tempco * half
        elif dim.key == "c_temperature":
            target, scale = "c", np.asarray(v["c"]) * half
        elif dim.kind == "relative":
            target, scale = dim.key, np.asarray(model.q[dim.key]) * half
        else:   # vcc range, wiper
            target, scale = dim.key, half
        ef = np.asarray(p.d_frequency[target]) * mult * scale
        ed = np.asarray(p.d_duty[target]) * scale
        sf[:, i] = np.where(np.abs(ef) > 1e-9 * np.abs(f), np.sign(ef), 0.0)
        sd[:, i] = np.where(np.abs(ed) > 1e-9 * np.abs(d), np.sign(ed), 0.0)
    return sf, sd


def _point(model: Model, dims: tuple[Dim, ...], dev: Mapping[str, np.ndarray], idx: int,
           corner: bool) -> ExtremePoint:
    one = {k: float(np.asarray(x)[idx]) for k, x in dev.items()}
    v, mult = values(model, one)
    names = parameters_of(model.topology)
    params = {k: float(v[k]) for k in names}
    params["frequency_factor"] = float(mult)
    return ExtremePoint(deviations={d.label: one[d.key] for d in dims}, params=params, corner=corner)


def worst_case(topology: str, *, tolerances: Mapping[str, Any] | None, dielectric: Any = None,
               t_ambient_c: Any = None, vcc_range: Any = None, timer_errors: bool = False,
               vd_tempco: float = DEFAULT_VD_TEMPCO, interior: str = "auto", seed: int = 0,
               **params: Any) -> WorstCaseResult:
    """Worst-case frequency and duty over the tolerance box (all 2^k corners, plus the interior if needed).

    The box has one dimension per band of the spread model (see the module docstring; every band
    at its limits, whatever its Monte Carlo distribution). The signs of the exact partial
    derivatives (:mod:`pwmkit.sensitivity`) are evaluated at the nominal point and at every
    corner; if a sign changes inside the box the response is not monotonic and an extreme may
    lie inside, so the interior is searched: a grid of 5 points per axis for up to 6 dimensions,
    otherwise 4000·k random points (seeded), each followed by a compass refinement of the best
    point of every extreme.

    Parameters
    ----------
    topology : {"classic", "bypass", "steered", "pot"}
    tolerances, dielectric, t_ambient_c, vcc_range, timer_errors, vd_tempco
        As for :func:`monte_carlo`; temperature-coupled shifts (capacitor envelope, diode drop,
        timer drift) are treated as independent dimensions, which can only widen the bounds.
    interior : {"auto", "always", "never"}
        Search the interior when a sensitivity sign changes (auto), always, or never.
    seed : int
        Seed for the random interior sampling (more than 6 dimensions).
    **params
        The nominal design as keywords of :func:`pwmkit.timing.astable`.

    Returns
    -------
    WorstCaseResult

    Raises
    ------
    DesignError
        Bad input, or a corner or interior point at which the circuit does not oscillate.

    Examples
    --------
    >>> w = worst_case("classic", tolerances={"ra": 0.01, "rb": 0.01, "c": 0.1}, ra=10e3, rb=10e3,
    ...                c=100e-9, vcc=12, vsat=0)
    >>> w.method, round(100 * w.frequency_rel_high, 3)
    ('corners', 12.233)
    """
    if interior not in ("auto", "always", "never"):
        raise DesignError(f"interior: {interior!r} is not known; allowed: auto, always, never")
    model = build_model(topology, tolerances, "uniform", None, dielectric, t_ambient_c, vcc_range, timer_errors,
                         vd_tempco, params)
    dims = tuple(d for d in model.dims if d.high > d.low)
    k = len(dims)
    bits = ((np.arange(2**k)[:, None] >> np.arange(k)) & 1).astype(float) if k else np.zeros((1, 0))
    u = np.vstack([np.full((1, k), 0.5), bits])   # nominal (box centre) first, then the corners
    dev = _box_points(model, dims, u)
    m = u.shape[0]
    freq, duty, ok, reasons = evaluate(model, dev, m)
    if not ok.all():
        bad = int(np.argmax(~ok))
        where = ", ".join(f"{d.label} {dev[d.key][bad]:+.4g}" for d in dims)
        raise ModelLimit(f"worst_case: at the point ({where}) the circuit does not oscillate "
                          f"({reason_text(reasons)}); narrow the tolerances or move the design away from the limit")
    notes: list[str] = []
    need = interior == "always"
    if k and interior != "never":
        sf, sd = _slopes(model, dims, dev, m)
        for label, s in (("frequency", sf), ("duty", sd)):
            for i, dim in enumerate(dims):
                if (s[:, i] > 0).any() and (s[:, i] < 0).any():
                    notes.append(f"{label}: {dim.label}")
        need = need or bool(notes)
    pts = {key: np.asarray(x) for key, x in dev.items()}
    corner = np.ones(m, dtype=bool)
    corner[0] = k == 0
    n_eval = m
    if need and k:
        rng = np.random.default_rng(seed)
        if k <= 6:
            axes = np.meshgrid(*([np.linspace(0.0, 1.0, 5)] * k), indexing="ij")
            ui = np.stack([a.ravel() for a in axes], axis=1)
        else:
            ui = rng.uniform(0.0, 1.0, (4000 * k, k))
        devi = _box_points(model, dims, ui)
        fi, di, oki, ri = evaluate(model, devi, ui.shape[0])
        if not oki.all():
            raise ModelLimit(f"worst_case: inside the box the circuit does not oscillate ({reason_text(ri)})")
        n_eval += ui.shape[0]
        extra_u = [ui]
        extra_f, extra_d = [fi], [di]
        for values, sign in ((fi, 1.0), (fi, -1.0), (di, 1.0), (di, -1.0)):
            start = ui[int(np.argmin(sign * values))]
            ur, fr, dr, count = _compass(model, dims, start, values is fi, sign)
            extra_u.append(ur)
            extra_f.append(fr)
            extra_d.append(dr)
            n_eval += count
        uu = np.vstack(extra_u)
        dev_extra = _box_points(model, dims, uu)
        pts = {key: np.concatenate([pts[key], dev_extra[key]]) for key in pts}
        freq = np.concatenate([freq] + extra_f)
        duty = np.concatenate([duty] + extra_d)
        on_corner = np.all((uu == 0.0) | (uu == 1.0), axis=1)
        corner = np.concatenate([corner, on_corner])
    i_fmin, i_fmax = int(np.argmin(freq)), int(np.argmax(freq))
    i_dmin, i_dmax = int(np.argmin(duty)), int(np.argmax(duty))
    method = "corners+interior" if need and k else "corners"
    return WorstCaseResult(
        topology=topology, timer=model.nominal.timer, frequency_nominal=float(model.nominal.frequency),
        duty_nominal=float(model.nominal.duty), frequency_min=float(freq[i_fmin]), frequency_max=float(freq[i_fmax]),
        duty_min=float(duty[i_dmin]), duty_max=float(duty[i_dmax]),
        frequency_min_at=_point(model, dims, pts, i_fmin, bool(corner[i_fmin])),
        frequency_max_at=_point(model, dims, pts, i_fmax, bool(corner[i_fmax])),
        duty_min_at=_point(model, dims, pts, i_dmin, bool(corner[i_dmin])),
        duty_max_at=_point(model, dims, pts, i_dmax, bool(corner[i_dmax])),
        method=method, non_monotonic=tuple(notes), n_evaluated=n_eval, sources=model.sources(),
    )


def _compass(model: Model, dims: tuple[Dim, ...], start: np.ndarray, frequency: bool,
             sign: float) -> tuple[np.ndarray, np.ndarray, np.ndarray, int]:
    """Compass (pattern) search in the unit box minimising sign·output from ``start``.

    Returns the points visited (as rows in u), their frequency and duty, and the count evaluated.
    """
    k = len(dims)
    x = start.copy()
    step = 0.25
    visited_u, visited_f, visited_d = [], [], []
    count = 0
    best = None
    eye = np.eye(k)
    for _ in range(400):
        trial = np.clip(np.vstack([x[None, :], x + step * eye, x - step * eye]), 0.0, 1.0)
        f, d, ok, reasons = evaluate(model, _box_points(model, dims, trial), trial.shape[0])
        if not ok.all():
            raise ModelLimit(f"worst_case: inside the box the circuit does not oscillate ({reason_text(reasons)})")
        count += trial.shape[0]
        visited_u.append(trial)
        visited_f.append(f)
        visited_d.append(d)
        obj = sign * (f if frequency else d)
        i = int(np.argmin(obj))
        if best is None or obj[i] < best - 1e-15 * abs(best):
            best = float(obj[i])
            if i == 0:
                step *= 0.5
            x = trial[i]
        else:
            step *= 0.5
        if step < 1e-6:
            break
    if not math.isfinite(best if best is not None else math.nan):  # pragma: no cover - guarded above
        raise ModelLimit("worst_case: the interior search produced a non-finite value")
    return np.vstack(visited_u), np.concatenate(visited_f), np.concatenate(visited_d), count
