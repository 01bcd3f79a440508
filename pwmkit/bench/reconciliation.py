"""Reconcile bench readings with the design: inside the spread? which part most likely differs?

For each reading, the predicted spread is a Monte Carlo run of :func:`pwmkit.tolerance.monte_carlo`
at the reading's conditions: the design's part tolerances (resistors, capacitor with its
dielectric, pot track), a part-to-part band on the steering-diode drop (:data:`VD_BAND`), the
timer family's own timing error, the supply as read (within :data:`SUPPLY_READING_BAND`, or the
design's supply range when the reading gives none), the ambient as read (or the design's range)
and the wiper as read. The reading's percentile in that distribution says how unusual it is; it
is *inside* when its stated uncertainty interval meets the 0.135 … 99.865 % band (the ±3σ
equivalent).

The most likely part values given all readings are a maximum a-posteriori (MAP) fit: each spread
dimension ``x`` gets a Gaussian prior with the mean and standard uncertainty of its band
(rectangular band: half-width/√3, GUM §4.3.7), each measured value a Gaussian likelihood with its
stated uncertainty, and :func:`scipy.optimize.least_squares` minimises

.. math::
    \\sum_k \\Big(\\frac{y_k(x) - y_k^{meas}}{u_k}\\Big)^2 + \\sum_i \\Big(\\frac{x_i - \\mu_i}{\\sigma_i}\\Big)^2

over the shared parts (capacitor, resistors, pot track, diode drop, timer error) and each
reading's own conditions (supply, ambient, capacitor temperature drift). The posterior standard
uncertainties come from the Gauss–Newton approximation ``(JᵀJ)⁻¹`` at the optimum; a part whose
posterior uncertainty stays close to its prior is not resolved by these readings (for example a
capacitor and a pot track that scale the period together cannot be told apart by frequency and
duty alone).

The *closest explanation* asks of each part alone: how far must it move to reproduce the
readings (a one-parameter least-squares fit, the other parts at their nominal values)? Parts that
reproduce the readings are ranked by that move in multiples of their tolerance; the first is the
likely culprit.

References
----------
.. [1] JCGM 100:2008 (GUM), §4.3.7 (rectangular distributions) and §5.1 (propagation).
.. [2] JCGM 101:2008, Monte Carlo propagation of distributions, §7 (coverage intervals).
.. [3] A. Tarantola, *Inverse Problem Theory and Methods for Model Parameter Estimation*,
   SIAM 2005, §3.2 (least squares with Gaussian priors; posterior covariance); from memory.
"""

from __future__ import annotations

import html
import math
from collections.abc import Mapping
from dataclasses import dataclass
from typing import Any

import numpy as np

from ..errors import DesignError

__all__ = ["VD_BAND", "SUPPLY_READING_BAND", "DEFAULT_FREQUENCY_ACCURACY", "DEFAULT_DUTY_RESOLUTION",
           "PART_NAMES", "ReadingVerdict", "Explanation", "Reconciliation", "reconcile", "reconcile_design"]

#: Part-to-part band of the steering-diode drop at a fixed current [1, relative] (±5 %, about
#: ±30 mV at 0.6 V; common practice for small-signal silicon diodes of one type).
VD_BAND = 0.05
#: Band of a supply voltage read with a hand-held meter [1, relative] (±0.5 %; typical value —
#: check your meter's data sheet).
SUPPLY_READING_BAND = 0.005
#: Frequency uncertainty assumed when a reading states none [1, relative] (typical counter or
#: scope measurement; check your instrument's data sheet).
DEFAULT_FREQUENCY_ACCURACY = 1e-4
#: Duty uncertainty assumed when a reading states none [1, absolute] (0.1 percentage point).
DEFAULT_DUTY_RESOLUTION = 1e-3
#: Coverage of the "inside" band [%] (the ±3σ equivalent of a normal distribution).
COVERAGE = (0.135, 99.865)

#: Spread dimension → what it is, in words.
PART_NAMES: Mapping[str, str] = {
    "ra": "charge resistor R_A", "rb": "discharge resistor R_B", "c": "timing capacitor", "pot": "pot track",
    "vd": "steering-diode drop", "vcc": "supply", "timer": "timer's own timing error", "vctl": "control voltage",
    "t_ambient_c": "ambient temperature", "c_temperature": "capacitor temperature drift",
    "vsat": "discharge saturation voltage", "r_on": "discharge on-resistance",
}
_UNITS = {"ra": "Ω", "rb": "Ω", "c": "F", "pot": "Ω", "vd": "V", "vcc": "V", "timer": "1", "vctl": "V",
          "vsat": "V", "r_on": "Ω", "t_ambient_c": "°C", "c_temperature": "1"}
_SHARED = ("ra", "rb", "c", "pot", "vd", "vsat", "r_on", "vctl", "timer")
_PER_READING = ("vcc", "t_ambient_c", "c_temperature")
_BIG = 1e6
_TIMER_BOUND = 0.5                     # largest timer error the fits consider [1]
_PART_LOW, _PART_HIGH = -0.999, 999.0  # relative deviations the fits consider (a wrong part fitted)


@dataclass(frozen=True, eq=False)
class ReadingVerdict:
    """One reading against its predicted spread.

    Attributes
    ----------
    index : position among the readings reconciled
    label : which reading (``bench[i]`` and its date for a design's readings)
    frequency, duty : measured values (None if not measured) [Hz], [1]
    u_frequency, u_duty : their uncertainties [Hz], [1]
    wiper, vcc, t_ambient_c : conditions used (vcc/ambient None = the design's range) [1], [V], [°C]
    predicted_frequency, predicted_duty : Monte Carlo medians at those conditions [Hz], [1]
    band : quantity → (0.135 %, 99.865 %) percentiles of the predicted spread
    percentile : quantity → the reading's percentile in the predicted spread [%]
    inside : every measured quantity's uncertainty interval meets its band
    fitted : quantity → the value the MAP fit reproduces
    spread : the :class:`pwmkit.tolerance.SpreadResult` at these conditions
    """

    index: int
    label: str
    frequency: float | None
    duty: float | None
    u_frequency: float
    u_duty: float
    wiper: float | None
    vcc: float | None
    t_ambient_c: float | None
    predicted_frequency: float
    predicted_duty: float
    band: Mapping[str, tuple[float, float]]
    percentile: Mapping[str, float]
    inside: bool
    fitted: Mapping[str, float]
    spread: Any

    def __repr__(self) -> str:
        parts = [f"{k} at {p:.3g} %" for k, p in self.percentile.items()]
        return f"ReadingVerdict({self.index}: {'inside' if self.inside else 'OUTSIDE'}; {', '.join(parts)})"


@dataclass(frozen=True)
class Explanation:
    """How one part alone would explain the readings.

    Attributes
    ----------
    part : spread dimension (``"c"``, ``"ra"``, ``"pot"``, ``"vd"``, ``"vcc"``, ``"timer"`` …)
    name : in words
    deviation : the move needed: relative to nominal [1] (absolute [V] for the supply)
    value : the part value it implies [SI unit of the part; 1 for the timer error]
    tolerance : the band's extreme on the side of the move [1] (absolute [V] for the supply)
    within_tolerance : the move stays inside the part's band
    chi2 : remaining sum of squared normalised residuals [1]
    explains : the residuals are all within 2 uncertainties
    suggestion : e.g. the nearest preferred value, or ""
    """

    part: str
    name: str
    deviation: float
    value: float
    tolerance: float
    within_tolerance: bool
    chi2: float
    explains: bool
    suggestion: str

    @property
    def tolerance_multiple(self) -> float:
        """|deviation| / |tolerance| (∞ for a part without a band)."""
        return abs(self.deviation) / abs(self.tolerance) if self.tolerance else math.inf

    def text(self) -> str:
        """One line for people."""
        if self.part == "vcc":
            move = f"{self.deviation:+.3g} V (at {self.value:.4g} V)"
            band = f"±{abs(self.tolerance):.3g} V"
        elif self.part == "timer":
            move = f"{100 * self.deviation:+.3g} %"
            band = f"±{100 * abs(self.tolerance):.3g} %"
        else:
            from ..values import format_value

            move = f"{100 * self.deviation:+.3g} % ({format_value(self.value, _UNITS.get(self.part, ''), 4)})"
            band = f"{100 * self.tolerance:+.3g} %"
        verdict = "within" if self.within_tolerance else "beyond"
        fit = "" if self.explains else "; even so it does not reproduce every reading"
        sug = f" — {self.suggestion}" if self.suggestion else ""
        return f"{self.name} off by {move}, {verdict} its tolerance {band}{fit}{sug}"


@dataclass(frozen=True, eq=False)
class Reconciliation:
    """Readings against the design: inside the spread, most likely part values, closest explanation.

    Attributes
    ----------
    design_name : str
    readings : tuple of ReadingVerdict
    inside : every reading lies inside its predicted spread
    percentile : quantity → percentile [%] of the reading furthest from the median (for one
        reading: that reading's)
    estimates : part → most likely value (MAP) [SI unit; ``timer``: relative error 1]
    nominal : part → design value [same units]
    uncertainty : part → posterior standard uncertainty [same units]
    prior_uncertainty : part → prior standard uncertainty [same units]
    explanations : single-part explanations, closest first
    culprit : the part of the closest explanation
    chi2 : sum of squared normalised measurement residuals at the MAP [1]
    n_measured : measured values fitted
    n, seed : Monte Carlo samples per reading and seed
    design : the design the readings were compared with
    """

    design_name: str
    readings: tuple[ReadingVerdict, ...]
    inside: bool
    percentile: Mapping[str, float]
    estimates: Mapping[str, float]
    nominal: Mapping[str, float]
    uncertainty: Mapping[str, float]
    prior_uncertainty: Mapping[str, float]
    explanations: tuple[Explanation, ...]
    culprit: str
    chi2: float
    n_measured: int
    n: int
    seed: int
    design: Any = None

    def as_built_timing(self, wiper: Any = None, vcc: Any = None) -> tuple[Any, Any]:
        """(frequency, duty) of the design with the most likely part values [Hz], [1].

        ``wiper`` (pot designs; default the design's, arrays allowed) and ``vcc`` (default the
        design's nominal supply) choose the operating point; the fitted timer error scales the
        frequency.
        """
        from ..evaluate import timing_kwargs
        from ..timing import astable

        d = self.design
        kw = timing_kwargs(d)
        for key in ("ra", "rb", "c", "pot", "vd"):
            if key in self.estimates and key in kw:
                kw[key] = self.estimates[key]
        if wiper is not None:
            kw["wiper"] = wiper
        if vcc is not None:
            kw["vcc"] = vcc
        r = astable(d.timing.topology, **kw)
        return r.frequency * (1.0 + self.estimates.get("timer", 0.0)), r.duty

    @property
    def deviations(self) -> dict[str, float]:
        """part → relative deviation of the estimate from nominal (absolute for ``timer``) [1]."""
        out = {}
        for k, v in self.estimates.items():
            base = self.nominal[k]
            out[k] = v - base if k == "timer" or base == 0 else v / base - 1.0
        return out

    def resolved(self, part: str) -> bool:
        """True when the readings narrow the part's uncertainty to under 70 % of its prior."""
        return self.uncertainty[part] < 0.7 * self.prior_uncertainty[part]

    @property
    def closest(self) -> Explanation:
        """The closest single-part explanation."""
        return self.explanations[0]

    def summary(self) -> str:
        """A few lines for people."""
        n = len(self.readings)
        head = (f"{n} reading(s) of {self.design_name!r}: " +
                ("all inside the predicted spread" if self.inside else
                 f"{sum(not r.inside for r in self.readings)} OUTSIDE the predicted spread"))
        lines = [head]
        for r in self.readings:
            got = []
            if r.frequency is not None:
                lo, hi = r.band["frequency"]
                got.append(f"f {r.frequency:.6g} Hz at {r.percentile['frequency']:.3g} % (spread {lo:.5g} … {hi:.5g} Hz)")
            if r.duty is not None:
                lo, hi = r.band["duty"]
                got.append(f"duty {100 * r.duty:.4g} % at {r.percentile['duty']:.3g} % "
                           f"(spread {100 * lo:.4g} … {100 * hi:.4g} %)")
            lines.append(f"  {r.label}: {'inside ' if r.inside else 'OUTSIDE'} " + "; ".join(got))
        lines.append(f"  closest explanation: {self.closest.text()}")
        dev = self.deviations
        shown = [k for k in ("c", "ra", "rb", "pot", "vd", "timer") if k in dev]
        lines.append("  most likely: " + ", ".join(f"{k} {100 * dev[k]:+.2f} %" + ("" if self.resolved(k) else " (not resolved)")
                                               for k in shown))
        return "\n".join(lines)

    def __repr__(self) -> str:
        verdict = "inside" if self.inside else "OUTSIDE"
        pc = ", ".join(f"{k} at {v:.3g} %" for k, v in self.percentile.items())
        return f"Reconciliation({self.design_name!r}, {len(self.readings)} reading(s) {verdict}: {pc}; culprit {self.culprit})"

    def _repr_html_(self) -> str:
        """Notebook display: the as-built tables (:func:`pwmkit.record.asbuilt.as_built_html`)."""
        try:
            from ..record.asbuilt import as_built_html

            body = as_built_html(self.design, self)
        except Exception:  # noqa: BLE001 - a display hook never raises; fall back to the text summary
            body = "<pre>" + html.escape(self.summary()) + "</pre>"
        return f"<div class='pwmkit-reconcile'>{body}</div>"


# ------------------------------------------------------------------------------------------------
# inputs
# ------------------------------------------------------------------------------------------------
@dataclass(frozen=True)
class _Obs:
    frequency: float | None
    duty: float | None
    u_f: float
    u_d: float
    wiper: float | None
    vcc: float | None
    t_ambient_c: float | None
    label: str = ""


def _column(value: Any, name: str, n: int) -> list[Any]:
    if value is None or isinstance(value, (int, float, str, np.floating, np.integer)):
        return [value] * n
    items = list(value)
    if len(items) != n:
        raise DesignError(f"{name}: {len(items)} values given for {n} readings; give one value or one per reading")
    return items


def _count(*values: Any) -> int:
    n = 1
    for v in values:
        if v is not None and not isinstance(v, (int, float, str, np.floating, np.integer)):
            try:
                n = max(n, len(v))
            except TypeError:
                raise DesignError(f"{v!r} is not a number or a sequence of numbers") from None
    return n


def _q(value: Any, name: str, unit: str, lo: float, hi: float, *, min_inclusive: bool = True) -> float | None:
    from .._validate import quantity

    if value is None:
        return None
    return float(quantity(value, name, unit="" if unit == "1" else unit, minimum=lo, maximum=hi,
                          min_inclusive=min_inclusive))


def _check_design(design: Any) -> None:
    from ..design import Design

    if not isinstance(design, Design):
        raise DesignError(f"design: expected a pwmkit.design.Design, got {type(design).__name__}")


# ------------------------------------------------------------------------------------------------
# models at each reading's conditions
# ------------------------------------------------------------------------------------------------
def _setup(design: Any, obs: _Obs) -> tuple[dict[str, Any], dict[str, Any]]:
    """(astable keywords, tolerance keywords) of the spread at a reading's conditions."""
    from ..evaluate import timing_kwargs, tolerance_kwargs

    kw = timing_kwargs(design)
    common = tolerance_kwargs(design)
    tol = dict(common["tolerances"])
    topo = design.timing.topology
    if topo != "classic":
        tol["vd"] = VD_BAND
    common["tolerances"] = tol
    if obs.wiper is not None:
        kw["wiper"] = obs.wiper
    if obs.vcc is not None:
        kw["vcc"] = obs.vcc
        common["vcc_range"] = (obs.vcc * (1 - SUPPLY_READING_BAND), obs.vcc * (1 + SUPPLY_READING_BAND))
        if design.timing.r_cv is not None:
            from ..timing import control_voltage_from_divider

            kw["vctl"] = control_voltage_from_divider(obs.vcc, design.timing.r_cv, design.timing.timer)
    if obs.t_ambient_c is not None:
        common["t_ambient_c"] = (obs.t_ambient_c, obs.t_ambient_c)
    return kw, common


def _percentile(samples: np.ndarray, x: float) -> float:
    below = np.count_nonzero(samples < x)
    ties = np.count_nonzero(samples == x)
    return float(100.0 * (below + 0.5 * ties) / samples.size)


# ------------------------------------------------------------------------------------------------
# the fit
# ------------------------------------------------------------------------------------------------
@dataclass
class _Var:
    key: str            # dimension key
    reading: int | None  # None = shared
    mean: float
    sigma: float
    low: float          # band
    high: float
    kind: str


class _Problem:
    """The stacked residuals of all readings as a function of the normalised variables z."""

    def __init__(self, models: list[Any], obs: list[_Obs]) -> None:
        from ..sensitivity import standard_uncertainty

        self.models, self.obs = models, obs
        self.vars: list[_Var] = []
        shared: dict[str, _Var] = {}
        for i, m in enumerate(models):
            for d in m.dims:
                if d.high <= d.low:
                    continue
                sigma = standard_uncertainty(d.low, d.high, d.distribution)
                mean = 0.5 * (d.low + d.high)
                if d.key in _PER_READING:
                    self.vars.append(_Var(d.key, i, mean, sigma, d.low, d.high, d.kind))
                elif d.key in shared:   # the widest band of a shared part over the readings
                    v = shared[d.key]
                    if d.high - d.low > v.high - v.low:
                        v.mean, v.sigma, v.low, v.high = mean, sigma, d.low, d.high
                else:
                    shared[d.key] = _Var(d.key, None, mean, sigma, d.low, d.high, d.kind)
                    self.vars.append(shared[d.key])
        self.n_meas = sum((o.frequency is not None) + (o.duty is not None) for o in obs)

    def devs(self, zs: np.ndarray) -> list[dict[str, np.ndarray]]:
        """Deviations of every reading's model at the rows of ``zs`` (m × k normalised points)."""
        m = zs.shape[0]
        out: list[dict[str, np.ndarray]] = [dict() for _ in self.models]
        for j, v in enumerate(self.vars):
            x = v.mean + v.sigma * zs[:, j]
            for i in (range(len(self.models)) if v.reading is None else (v.reading,)):
                if v.reading is not None or any(d.key == v.key for d in self.models[i].dims):
                    out[i][v.key] = x
        for i, model in enumerate(self.models):  # dimensions held fixed (zero-width bands)
            for d in model.dims:
                out[i].setdefault(d.key, np.full(m, 0.5 * (d.low + d.high)))
        return out

    def predict_many(self, zs: np.ndarray) -> list[tuple[np.ndarray, np.ndarray]]:
        """(frequency, duty) arrays per reading at the rows of ``zs`` (NaN where it does not oscillate)."""
        from .._spread import evaluate

        m = zs.shape[0]
        return [evaluate(model, dev, m)[:2] for model, dev in zip(self.models, self.devs(zs))]

    def predict(self, z: np.ndarray) -> list[tuple[float, float]]:
        return [(float(f[0]), float(d[0])) for f, d in self.predict_many(np.asarray(z, dtype=float)[None, :])]

    def residuals_many(self, zs: np.ndarray) -> np.ndarray:
        """Normalised measurement residuals, one row per point of ``zs`` (m × n_measured)."""
        cols = []
        for (f, d), o in zip(self.predict_many(zs), self.obs):
            with np.errstate(invalid="ignore"):
                if o.frequency is not None:
                    cols.append(np.where(np.isfinite(f), (f - o.frequency) / o.u_f, _BIG))
                if o.duty is not None:
                    cols.append(np.where(np.isfinite(d), (d - o.duty) / o.u_d, _BIG))
        return np.stack(cols, axis=1)

    def measurement_residuals(self, z: np.ndarray) -> np.ndarray:
        return self.residuals_many(np.asarray(z, dtype=float)[None, :])[0]

    def residuals(self, z: np.ndarray) -> np.ndarray:
        return np.concatenate([self.measurement_residuals(z), np.asarray(z, dtype=float)])

    def jacobian(self, z: np.ndarray) -> np.ndarray:
        """Forward-difference Jacobian of :meth:`residuals`, all k steps in one vectorised evaluation."""
        k = len(self.vars)
        lo, hi = self.bounds()
        step = 1e-6 * np.maximum(1.0, np.abs(z))
        step = np.where(z + step > hi, -step, step)          # stay inside the bounds
        zs = np.vstack([z[None, :], z[None, :] + np.diag(step)])
        r = self.residuals_many(zs)
        jm = ((r[1:] - r[0]) / step[:, None]).T              # n_measured × k
        return np.vstack([jm, np.eye(k)])

    def bounds(self) -> tuple[np.ndarray, np.ndarray]:
        lo = np.full(len(self.vars), -np.inf)
        hi = np.full(len(self.vars), np.inf)
        for i, v in enumerate(self.vars):
            if v.key == "timer":              # a timer's own error stays within ±50 % (our bound)
                lo[i], hi[i] = (-_TIMER_BOUND - v.mean) / v.sigma, (_TIMER_BOUND - v.mean) / v.sigma
            elif v.kind == "relative":        # a part value stays positive: 1/1000 … 1000 × nominal
                lo[i], hi[i] = (_PART_LOW - v.mean) / v.sigma, (_PART_HIGH - v.mean) / v.sigma
            elif v.kind == "absolute" and v.key == "vcc":
                lo[i] = (0.05 * v.mean - v.mean) / v.sigma
        return lo, hi


def _fit(problem: _Problem) -> tuple[np.ndarray, np.ndarray]:
    """MAP point (normalised) and its posterior standard deviations (normalised)."""
    from scipy.optimize import least_squares

    k = len(problem.vars)
    if k == 0:
        return np.zeros(0), np.zeros(0)
    lo, hi = problem.bounds()
    sol = least_squares(problem.residuals, np.zeros(k), jac=problem.jacobian, bounds=(lo, hi), method="trf",
                        x_scale=1.0, xtol=1e-12, ftol=1e-12, gtol=1e-12, max_nfev=200 * k)
    jac = np.asarray(sol.jac)
    try:
        cov = np.linalg.inv(jac.T @ jac)
        sd = np.sqrt(np.clip(np.diag(cov), 0.0, None))
    except np.linalg.LinAlgError:  # pragma: no cover - the prior rows keep JᵀJ invertible
        sd = np.ones(k)
    return np.asarray(sol.x), sd


def _explain(problem: _Problem, design: Any) -> list[Explanation]:
    """One-part fits: each shared part alone, and the supply of all readings moved together."""
    from scipy.optimize import least_squares

    groups: dict[str, list[int]] = {}
    for i, v in enumerate(problem.vars):
        if v.reading is None and v.key in PART_NAMES:
            groups.setdefault(v.key, []).append(i)
        elif v.key == "vcc":
            groups.setdefault("vcc", []).append(i)
    out = []
    k = len(problem.vars)
    lo_all, hi_all = problem.bounds()
    for key, idx in groups.items():
        def resid(s: np.ndarray, idx: list[int] = idx) -> np.ndarray:
            z = np.zeros(k)
            z[idx] = s[0]
            return problem.measurement_residuals(z)

        lo, hi = float(max(lo_all[idx])), float(min(hi_all[idx]))
        v0 = problem.vars[idx[0]]
        # a coarse vectorised scan over the whole allowed range (a wrong part is a factor away, so the
        # scan is logarithmic for part values), then a least-squares refinement from its best point
        if key == "timer":
            devs = np.linspace(-_TIMER_BOUND, _TIMER_BOUND, 201)
        elif key == "vcc":
            devs = v0.mean * np.geomspace(0.3, 3.0, 201)
        else:
            devs = np.geomspace(1.0 + _PART_LOW, 1.0 + _PART_HIGH, 361) - 1.0
        grid = np.clip((devs - v0.mean) / v0.sigma, lo, hi)
        zs = np.zeros((grid.size, k))
        zs[:, idx] = grid[:, None]
        chi2_grid = np.sum(problem.residuals_many(zs) ** 2, axis=1)
        start = float(grid[int(np.argmin(chi2_grid))])
        s0 = min(max(start, lo + 1e-9 * max(1.0, abs(lo))), hi - 1e-9 * max(1.0, abs(hi)))
        sol = least_squares(resid, np.array([s0]), bounds=([lo], [hi]), method="trf", diff_step=1e-7,
                            xtol=1e-12, ftol=1e-12, gtol=1e-12, max_nfev=100)
        s, chi2, fun = float(sol.x[0]), float(np.sum(sol.fun**2)), sol.fun
        v = problem.vars[idx[0]]
        dev = v.mean + v.sigma * s
        explains = bool(np.all(np.abs(fun) <= 2.0))
        within = v.low - 1e-12 <= dev <= v.high + 1e-12
        tol = v.high if dev >= 0 else v.low
        if key == "vcc":
            value = dev
            nominal = 0.5 * (v.low + v.high)
            deviation, tol = dev - nominal, (v.high - v.low) / 2.0
        elif key == "timer":
            value, deviation = dev, dev
        else:
            value, deviation = problem.models[0].q[key] * (1.0 + dev), dev
        out.append(Explanation(part=key, name=PART_NAMES.get(key, key), deviation=float(deviation),
                               value=float(value), tolerance=float(tol), within_tolerance=bool(within), chi2=chi2,
                               explains=explains, suggestion=_suggest(design, key, float(value), within)))
    out.sort(key=lambda e: (not e.explains, e.tolerance_multiple if e.explains else e.chi2))
    return out


def _suggest(design: Any, key: str, value: float, within: bool) -> str:
    """Nearest preferred value for a part far beyond its tolerance (a wrong part fitted?)."""
    if within or key not in ("c", "ra", "rb", "pot") or not value > 0:
        return ""
    from .. import eseries
    from ..values import format_value

    # potentiometers come in the coarse E6 steps (common practice)
    series = design.timing.c_series if key == "c" else "E6" if key == "pot" else design.timing.r_series
    unit = "F" if key == "c" else "Ω"
    near = float(eseries.nearest(value, series))
    return f"is a {format_value(near, unit, 3)} part ({series}) fitted? measure it out of circuit"


# ------------------------------------------------------------------------------------------------
# public
# ------------------------------------------------------------------------------------------------
def _run(design: Any, obs: list[_Obs], n: int, seed: int) -> Reconciliation:
    from .._spread import build_model
    from ..tolerance import monte_carlo

    if isinstance(n, bool) or not isinstance(n, (int, np.integer)) or not 1000 <= n <= 2_000_000:
        raise DesignError(f"n: {n!r} is not allowed; give a whole number 1000 … 2000000")
    if isinstance(seed, bool) or not isinstance(seed, (int, np.integer)) or seed < 0:
        raise DesignError(f"seed: {seed!r} is not allowed; give a whole number >= 0")
    topo = design.timing.topology
    models, spreads = [], []
    for o in obs:
        kw, common = _setup(design, o)
        try:
            spreads.append(monte_carlo(topo, n=int(n), seed=int(seed), allow_failures=True, **common, **kw))
        except DesignError as exc:
            raise DesignError(f"reconcile: at the reading's conditions (vcc {o.vcc}, wiper {o.wiper}) {exc}") from None
        models.append(build_model(topo, common["tolerances"], "uniform", None, common["dielectric"],
                                  common["t_ambient_c"], common["vcc_range"], common["timer_errors"],
                                  common.get("vd_tempco", -2e-3), kw))
    problem = _Problem(models, obs)
    z, sd = _fit(problem)
    fitted = problem.predict(z)
    chi2 = float(np.sum(problem.measurement_residuals(z) ** 2))

    estimates: dict[str, float] = {}
    nominal: dict[str, float] = {}
    unc: dict[str, float] = {}
    prior: dict[str, float] = {}
    multi = len(obs) > 1
    for v, zi, si in zip(problem.vars, z, sd):
        if v.key not in PART_NAMES or v.key in ("t_ambient_c", "c_temperature"):
            continue
        name = f"{v.key}[{v.reading}]" if (v.reading is not None and multi) else v.key
        x = v.mean + v.sigma * float(zi)
        if v.key == "vcc":
            estimates[name], nominal[name] = x, 0.5 * (v.low + v.high)
            unc[name], prior[name] = v.sigma * float(si), v.sigma
        elif v.key == "timer":
            estimates[name], nominal[name], unc[name], prior[name] = x, 0.0, v.sigma * float(si), v.sigma
        else:
            q = models[0].q[v.key]
            estimates[name], nominal[name] = q * (1.0 + x), q
            unc[name], prior[name] = q * v.sigma * float(si), q * v.sigma

    verdicts = []
    for i, (o, sp, (ff, fd)) in enumerate(zip(obs, spreads, fitted)):
        band, pct, inside = {}, {}, True
        for key, x, u, samples in (("frequency", o.frequency, o.u_f, sp.frequency), ("duty", o.duty, o.u_d, sp.duty)):
            if x is None:
                continue
            lo, hi = (float(p) for p in np.percentile(samples, COVERAGE))
            band[key], pct[key] = (lo, hi), _percentile(samples, x)
            inside &= (x + u >= lo) and (x - u <= hi)
        verdicts.append(ReadingVerdict(
            index=i, label=o.label or str(i), frequency=o.frequency, duty=o.duty, u_frequency=o.u_f, u_duty=o.u_d, wiper=o.wiper, vcc=o.vcc,
            t_ambient_c=o.t_ambient_c, predicted_frequency=float(np.median(sp.frequency)),
            predicted_duty=float(np.median(sp.duty)), band=band, percentile=pct, inside=bool(inside),
            fitted={"frequency": ff, "duty": fd}, spread=sp))
    far = max(verdicts, key=lambda r: max((abs(p - 50.0) for p in r.percentile.values()), default=0.0))
    explanations = tuple(_explain(problem, design))
    return Reconciliation(
        design_name=design.name, readings=tuple(verdicts), inside=all(r.inside for r in verdicts),
        percentile=dict(far.percentile), estimates=estimates, nominal=nominal, uncertainty=unc,
        prior_uncertainty=prior, explanations=explanations,
        culprit=explanations[0].part if explanations else "", chi2=chi2, n_measured=problem.n_meas, n=int(n),
        seed=int(seed), design=design)


def reconcile(design: Any, frequency: Any = None, duty: Any = None, *, wiper: Any = None, vcc: Any = None,
              t_ambient_c: Any = None, frequency_accuracy: Any = None, duty_accuracy: Any = None,
              n: int = 20_000, seed: int = 1) -> Reconciliation:
    """Compare measured frequency and duty with the design's predicted spread and fit the parts.

    Parameters
    ----------
    design : pwmkit.design.Design
        The design as built (its part values and tolerances are the priors).
    frequency : float, str or sequence, optional
        Measured frequency, one per reading [Hz].
    duty : float, str or sequence, optional
        Measured duty 0–1, one per reading [1]. At least one of frequency and duty is needed.
    wiper : float or sequence, optional
        Wiper position of each reading (pot designs; default the design's) [1].
    vcc : float or sequence, optional
        Supply of each reading as measured (default: the design's supply range) [V].
    t_ambient_c : float or sequence, optional
        Ambient of each reading (default: the design's ambient range) [°C].
    frequency_accuracy : float or sequence, optional
        Relative uncertainty of the frequency readings (default
        :data:`DEFAULT_FREQUENCY_ACCURACY`) [1].
    duty_accuracy : float or sequence, optional
        Absolute uncertainty of the duty readings (default :data:`DEFAULT_DUTY_RESOLUTION`) [1].
    n : int
        Monte Carlo samples per reading (1000 … 2e6).
    seed : int
        Seed of the Monte Carlo runs.

    Returns
    -------
    Reconciliation
        ``.inside``, ``.percentile``, ``.estimates`` (part → most likely value), ``.culprit``,
        ``.explanations``, ``.readings`` (per reading).

    Raises
    ------
    DesignError
        Bad input, or a reading whose conditions make the design stop oscillating.

    Examples
    --------
    >>> from pwmkit.design import Design, Timing
    >>> d = Design(timing=Timing(topology="classic", ra=10e3, rb=10e3, c=100e-9, r_tolerance=0.01,
    ...                          c_tolerance=0.1))
    >>> r = reconcile(d, frequency=445.0, vcc=12.0, t_ambient_c=25.0)
    >>> r.inside, r.culprit
    (True, 'c')
    """
    _check_design(design)
    if frequency is None and duty is None:
        raise DesignError("frequency, duty: give at least one measured value")
    m = _count(frequency, duty, wiper, vcc, t_ambient_c, frequency_accuracy, duty_accuracy)
    if design.timing.topology != "pot" and any(w is not None for w in _column(wiper, "wiper", m)):
        raise DesignError(f"wiper: the {design.timing.topology!r} topology has no potentiometer; leave wiper out")
    obs = []
    cols = [_column(x, name, m) for x, name in ((frequency, "frequency"), (duty, "duty"), (wiper, "wiper"),
                                                (vcc, "vcc"), (t_ambient_c, "t_ambient_c"),
                                                (frequency_accuracy, "frequency_accuracy"),
                                                (duty_accuracy, "duty_accuracy"))]
    for i, (f, d, w, v, t, fa, da) in enumerate(zip(*cols)):
        tag = f"[{i}]" if m > 1 else ""
        f = _q(f, f"frequency{tag}", "Hz", 0.0, 1e9, min_inclusive=False)
        d = _q(d, f"duty{tag}", "1", 0.0, 1.0)
        if f is None and d is None:
            raise DesignError(f"frequency{tag}, duty{tag}: give at least one measured value")
        fa = _q(fa, f"frequency_accuracy{tag}", "1", 0.0, 1.0)
        da = _q(da, f"duty_accuracy{tag}", "1", 0.0, 1.0)
        u_f = (DEFAULT_FREQUENCY_ACCURACY if fa is None else fa) * (f or 0.0)
        u_d = DEFAULT_DUTY_RESOLUTION if da is None else da
        obs.append(_Obs(f, d, max(u_f, 1e-9 * (f or 1.0)), max(u_d, 1e-9), _q(w, f"wiper{tag}", "1", 0.0, 1.0),
                        _q(v, f"vcc{tag}", "V", 0.0, 100.0, min_inclusive=False),
                        _q(t, f"t_ambient_c{tag}", "°C", -60.0, 150.0)))
    return _run(design, obs, n, seed)


_CACHE: dict[Any, Reconciliation | None] = {}
_CACHE_SIZE = 16


def reconcile_design(design: Any, *, n: int = 20_000, seed: int = 1) -> Reconciliation | None:
    """:func:`reconcile` of the frequency and duty readings a design holds (``design.bench``).

    Readings without frequency and duty are skipped; the stated accuracy of each reading is used
    (the defaults where none is stated). Returns None when no reading has frequency or duty.
    The last few results are kept (designs are immutable), so the check, the report and the
    dashboard of one design share one fit.
    """
    _check_design(design)
    key = (design, n, seed)
    try:
        if key in _CACHE:
            return _CACHE[key]
    except TypeError:  # pragma: no cover - every design field is hashable
        return _reconcile_design(design, n, seed)
    result = _reconcile_design(design, n, seed)
    if len(_CACHE) >= _CACHE_SIZE:
        _CACHE.pop(next(iter(_CACHE)))
    _CACHE[key] = result
    return result


def _reconcile_design(design: Any, n: int, seed: int) -> Reconciliation | None:
    obs = []
    for i, r in enumerate(design.bench):
        f, d = r.get("frequency"), r.get("duty")
        if f is None and d is None:
            continue
        uf = f.uncertainty if f is not None else None
        ud = d.uncertainty if d is not None else None
        fv = None if f is None else f.value
        if fv is not None and fv <= 0:
            continue
        u_f = DEFAULT_FREQUENCY_ACCURACY * fv if (fv is not None and not uf) else (uf or 0.0)
        u_d = DEFAULT_DUTY_RESOLUTION if not ud else ud
        c = r.conditions
        wiper = c.wiper if design.timing.topology == "pot" else None
        obs.append(_Obs(fv, None if d is None else d.value, max(u_f, 1e-9 * (fv or 1.0)), max(u_d, 1e-9), wiper,
                        c.vcc, c.t_ambient_c, f"bench[{i}]" + (f" {r.date}" if r.date else "")))
    if not obs:
        return None
    return _run(design, obs, n, seed)
