"""Exact sensitivities of the astable timing and first-order (GUM) tolerance propagation.

The partial derivatives of ``t_high`` and ``t_low`` with respect to every parameter are taken by
sympy from the derived closed forms (:func:`pwmkit.timing.expressions`, general discharge model,
external control voltage), lambdified once per topology and cached; sympy is imported on first use
only. Frequency and duty derivatives follow exactly from

.. math::
    \\frac{\\partial \\ln f}{\\partial x} = -\\frac{\\partial_x t_{high} + \\partial_x t_{low}}{T},\\qquad
    \\frac{\\partial D}{\\partial x} = \\frac{t_{low}\\,\\partial_x t_{high} - t_{high}\\,\\partial_x t_{low}}{T^2}.

With the internal divider (``vctl`` not given) the control voltage follows the supply,
``vctl = 2·vcc/3``, so the ``vcc`` row is the total derivative
``∂/∂vcc + (vctl/vcc)·∂/∂vctl`` and the ``vctl`` row is the partial at fixed supply — the effect of
the threshold *ratio* of the timer.

References
----------
.. [1] JCGM 100:2008, *Evaluation of measurement data — Guide to the expression of uncertainty in
   measurement* (GUM), §5.1.2 (law of propagation of uncertainty, uncorrelated inputs) and §4.3.7
   (rectangular distribution: u = a/√3).
"""

from __future__ import annotations

import math
from collections.abc import Mapping
from dataclasses import dataclass
from typing import Any

import numpy as np

from .errors import DesignError

__all__ = ["PARAMETERS", "SensitivityRow", "SensitivityResult", "sensitivities", "parameters_of"]

#: Parameters of :func:`pwmkit.timing.astable` that have a sensitivity (and may carry a tolerance).
PARAMETERS: tuple[str, ...] = ("ra", "rb", "pot", "wiper", "c", "vcc", "vd", "vsat", "r_on", "vctl")

_UNITS = {"ra": "Ω", "rb": "Ω", "pot": "Ω", "wiper": "1", "c": "F", "vcc": "V", "vd": "V", "vsat": "V",
          "r_on": "Ω", "vctl": "V"}
_DISTRIBUTIONS = ("uniform", "normal")


def parameters_of(topology: str) -> tuple[str, ...]:
    """The timing parameters a topology uses (``vd`` only with diodes; ``pot``, ``wiper`` only for "pot")."""
    from .timing.paths import TOPOLOGIES

    if topology not in TOPOLOGIES:
        raise DesignError(f"topology: {topology!r} is not known; allowed: {', '.join(TOPOLOGIES)}")
    skip = set()
    if topology == "classic":
        skip.add("vd")
    if topology != "pot":
        skip |= {"pot", "wiper"}
    return tuple(p for p in PARAMETERS if p not in skip)


# -- shared helpers (also used by pwmkit.tolerance) -----------------------------------------------

def tolerance_band(name: str, value: Any) -> tuple[float, float]:
    """Read one tolerance: a fraction, a percentage string or a (low, high) pair → (low, high) [1].

    ``0.05`` and ``"5%"`` give (−0.05, 0.05); ``(-0.2, 0.8)`` is taken as it is.
    """
    from .values import parse_tolerance

    if isinstance(value, (tuple, list)):
        if len(value) != 2:
            raise DesignError(f"tolerances[{name!r}]: {value!r} is not allowed; give a fraction or a (low, high) pair")
        lo, hi = (float(_finite(v, name)) for v in value)
        if not (-1.0 < lo <= hi < 10.0):
            raise DesignError(f"tolerances[{name!r}]: ({lo:g}, {hi:g}) is out of range; allowed -1 < low <= high")
        return lo, hi
    try:
        tol = parse_tolerance(value)
    except DesignError as exc:
        raise DesignError(f"tolerances[{name!r}]: {exc}") from None
    return -tol, tol


def _finite(v: Any, name: str) -> float:
    try:
        x = float(v)
    except (TypeError, ValueError):
        raise DesignError(f"tolerances[{name!r}]: {v!r} is not a number") from None
    if not math.isfinite(x):
        raise DesignError(f"tolerances[{name!r}]: {v!r} is not a finite number")
    return x


def read_tolerances(topology: str, tolerances: Mapping[str, Any] | None) -> dict[str, tuple[float, float]]:
    """Check a ``{parameter: tolerance}`` mapping against a topology → {name: (low, high)}."""
    if tolerances is None:
        return {}
    if not isinstance(tolerances, Mapping):
        raise DesignError(f"tolerances: {tolerances!r} is not a mapping; give e.g. {{'ra': 0.05, 'c': 0.1}}")
    allowed = parameters_of(topology)
    out = {}
    for name, value in tolerances.items():
        if name not in PARAMETERS:
            raise DesignError(f"tolerances: {name!r} is not a timing parameter; allowed: {', '.join(PARAMETERS)}")
        if name not in allowed:
            raise DesignError(f"tolerances: {name!r} is not used by the {topology!r} topology; "
                              f"allowed: {', '.join(allowed)}")
        out[name] = tolerance_band(name, value)
    return out


def read_distributions(names: Any, distribution: Any) -> dict[str, str]:
    """Distribution per name: one string for all, or a mapping (missing names → "uniform")."""
    if isinstance(distribution, str):
        if distribution not in _DISTRIBUTIONS:
            raise DesignError(f"distribution: {distribution!r} is not known; allowed: {', '.join(_DISTRIBUTIONS)}")
        return dict.fromkeys(names, distribution)
    if isinstance(distribution, Mapping):
        out = dict.fromkeys(names, "uniform")
        for key, val in distribution.items():
            if val not in _DISTRIBUTIONS:
                raise DesignError(f"distribution[{key!r}]: {val!r} is not known; allowed: {', '.join(_DISTRIBUTIONS)}")
            out[key] = val
        return out
    raise DesignError(f"distribution: {distribution!r} is not allowed; give 'uniform', 'normal' or a mapping")


def standard_uncertainty(low: float, high: float, distribution: str) -> float:
    """Standard uncertainty of a band: half-width/√3 (rectangular, GUM §4.3.7) or half-width/3 (normal, 3σ)."""
    half = 0.5 * (high - low)
    return half / math.sqrt(3.0) if distribution == "uniform" else half / 3.0


# -- exact partial derivatives --------------------------------------------------------------------

def _partials_function(topology: str) -> Any:
    """``(t_high, t_low, ∂t_high/∂p…, ∂t_low/∂p…)`` in the order of ``_ARG_ORDER``.

    The sympy derivatives written out as numpy code (:mod:`pwmkit.timing._derived`, generated by
    :mod:`pwmkit.timing.generate` and checked against sympy by the test suite).
    """
    from .timing._derived import PARTIALS

    return PARTIALS[topology]


@dataclass(frozen=True)
class _Partials:
    t_high: Any
    t_low: Any
    d_frequency: dict[str, Any]   # ∂f/∂x [Hz/unit]
    d_duty: dict[str, Any]        # ∂D/∂x [1/unit]

    @property
    def frequency(self) -> Any:
        return 1.0 / (self.t_high + self.t_low)

    @property
    def duty(self) -> Any:
        return self.t_high / (self.t_high + self.t_low)


def partials(topology: str, values: Mapping[str, Any], internal_vctl: bool) -> _Partials:
    """Exact ∂f/∂x and ∂D/∂x at resolved values (floats or broadcastable arrays).

    ``values`` holds every name of :data:`PARAMETERS` (as from ``pwmkit.timing.astable._inputs``);
    with ``internal_vctl`` the ``vcc`` derivative is the total one (vctl follows the supply).
    """
    from .timing.symbolic import _ARG_ORDER

    fn = _partials_function(topology)
    args = [values[name] for name in _ARG_ORDER]
    with np.errstate(all="ignore"):
        out = fn(*args)
        shape = np.broadcast(*[np.asarray(a) for a in args]).shape
        out = [np.broadcast_to(np.asarray(o, dtype=float), shape) for o in out]
        t_high, t_low = out[0], out[1]
        k = len(_ARG_ORDER)
        dth = dict(zip(_ARG_ORDER, out[2:2 + k]))
        dtl = dict(zip(_ARG_ORDER, out[2 + k:2 + 2 * k]))
        if internal_vctl:
            ratio = np.asarray(values["vctl"]) / np.asarray(values["vcc"])
            dth["vcc"] = dth["vcc"] + ratio * dth["vctl"]
            dtl["vcc"] = dtl["vcc"] + ratio * dtl["vctl"]
        period = t_high + t_low
        d_frequency = {n: -(dth[n] + dtl[n]) / period**2 for n in _ARG_ORDER}
        d_duty = {n: (t_low * dth[n] - t_high * dtl[n]) / period**2 for n in _ARG_ORDER}
    return _Partials(t_high=t_high, t_low=t_low, d_frequency=d_frequency, d_duty=d_duty)


# -- public result --------------------------------------------------------------------------------

@dataclass(frozen=True)
class SensitivityRow:
    """Sensitivity of frequency and duty to one parameter at the design point.

    Attributes
    ----------
    name : parameter name (keyword of :func:`pwmkit.timing.astable`)
    value : its value at the design point [unit]
    unit : its unit
    s_frequency : normalised sensitivity ∂ln f/∂ln x [1]
    d_frequency : ∂f/∂x [Hz/unit]
    d_duty : ∂D/∂x [1/unit]
    s_duty : normalised sensitivity ∂ln D/∂ln x [1]
    duty_per_relative : x·∂D/∂x, duty change per unit relative change of x [1]
    tolerance : (low, high) band, relative (wiper: fraction of travel), or None [1]
    distribution : "uniform" or "normal" (tolerance = 3σ), or None
    u_relative : standard uncertainty of x, relative (wiper: absolute) [1]
    frequency_contribution : |∂ln f/∂ln x|·u, its share of σ_f/f [1]
    duty_contribution : |x·∂D/∂x|·u, its share of σ_D [1]
    """

    name: str
    value: float
    unit: str
    s_frequency: float
    d_frequency: float
    d_duty: float
    s_duty: float
    duty_per_relative: float
    tolerance: tuple[float, float] | None = None
    distribution: str | None = None
    u_relative: float = 0.0
    frequency_contribution: float = 0.0
    duty_contribution: float = 0.0


@dataclass(frozen=True)
class SensitivityResult:
    """Exact sensitivities at a design point and the first-order tolerance propagation.

    Attributes
    ----------
    topology, timer : str
    frequency : nominal frequency [Hz]
    duty : nominal duty [1]
    rows : tuple of SensitivityRow, one per parameter the topology uses
    timer_accuracy : relative frequency error of the timer itself included in the totals, or 0 [1]
    frequency_rel_std : σ_f/f by the GUM law of propagation, sqrt(Σ (S·u)²) [1]
    frequency_rel_worst : linear worst-case bound Σ|S|·tol (+ timer accuracy) [1]
    frequency_rel_rss : root-sum-square of the tolerance bands sqrt(Σ (S·tol)²) [1]
    frequency_rel_shift : first-order shift of the mean from asymmetric bands Σ S·mid [1]
    duty_std : σ_D by the same law [1]
    duty_worst : linear worst-case bound Σ|x·∂D/∂x|·tol [1]
    duty_rss : root-sum-square of the bands [1]
    """

    topology: str
    timer: str
    frequency: float
    duty: float
    rows: tuple[SensitivityRow, ...]
    timer_accuracy: float
    frequency_rel_std: float
    frequency_rel_worst: float
    frequency_rel_rss: float
    frequency_rel_shift: float
    duty_std: float
    duty_worst: float
    duty_rss: float

    def row(self, name: str) -> SensitivityRow:
        """The row of one parameter."""
        for r in self.rows:
            if r.name == name:
                return r
        raise DesignError(f"row: {name!r} is not a parameter of this result; allowed: "
                          f"{', '.join(r.name for r in self.rows)}")

    def __repr__(self) -> str:
        s = ", ".join(f"{r.name}: {r.s_frequency:+.4g}" for r in self.rows if r.s_frequency != 0.0)
        return (f"SensitivityResult({self.topology}, f={self.frequency:.6g} Hz, duty={self.duty:.5g}; "
                f"∂ln f/∂ln x = {{{s}}}; σ_f/f={self.frequency_rel_std:.4g}, "
                f"worst ±{self.frequency_rel_worst:.4g})")

    def _repr_html_(self) -> str:
        head = ("<tr><th>parameter</th><th>value</th><th>∂ln f/∂ln x</th><th>∂D/∂ln x</th>"
                "<th>∂ln D/∂ln x</th><th>tolerance</th><th>share of σ_f/f</th><th>share of σ_D</th></tr>")
        body = []
        for r in self.rows:
            tol = "—" if r.tolerance is None else f"{100 * r.tolerance[0]:+.3g}/{100 * r.tolerance[1]:+.3g} %"
            body.append(f"<tr><td>{r.name}</td><td>{r.value:.5g} {r.unit}</td><td>{r.s_frequency:+.5f}</td>"
                        f"<td>{r.duty_per_relative:+.5f}</td><td>{r.s_duty:+.5f}</td><td>{tol}</td>"
                        f"<td>{100 * r.frequency_contribution:.3g} %</td>"
                        f"<td>{100 * r.duty_contribution:.3g} pts</td></tr>")
        foot = (f"<tr><td colspan='8'>σ_f/f = {100 * self.frequency_rel_std:.4g} % (GUM, first order); "
                f"worst case ±{100 * self.frequency_rel_worst:.4g} %; RSS of bands ±{100 * self.frequency_rel_rss:.4g} %; "
                f"σ_D = {100 * self.duty_std:.4g} pts; duty worst case ±{100 * self.duty_worst:.4g} pts"
                + (f"; timer accuracy ±{100 * self.timer_accuracy:.3g} % included" if self.timer_accuracy else "")
                + "</td></tr>")
        return (f"<table class='pwmkit-result'><caption>sensitivities — {self.topology}, f = {self.frequency:.6g} Hz, "
                f"duty = {100 * self.duty:.3f} %</caption>{head}{''.join(body)}{foot}</table>")


def sensitivities(topology: str, *, tolerances: Mapping[str, Any] | None = None, distribution: Any = "uniform",
                  timer_accuracy: Any = None, **params: Any) -> SensitivityResult:
    """Exact normalised sensitivities of frequency and duty, and first-order tolerance propagation.

    .. math::
        S^f_x = \\frac{\\partial \\ln f}{\\partial \\ln x},\\qquad
        \\frac{\\sigma_f}{f} = \\sqrt{\\sum_x (S^f_x\\,u_x)^2},\\qquad
        \\left|\\frac{\\Delta f}{f}\\right|_{max} \\approx \\sum_x |S^f_x|\\,tol_x

    with ``u_x = tol/√3`` for a uniform (rectangular) band and ``tol/3`` for a normal one
    (tolerance = 3σ); for duty the same with ``x·∂D/∂x`` in place of ``S``.

    Parameters
    ----------
    topology : {"classic", "bypass", "steered", "pot"}
    tolerances : mapping, optional
        Parameter name → relative tolerance (fraction, "5%" or a (low, high) pair); ``wiper``
        in fraction of travel. Parameters: see :func:`parameters_of`.
    distribution : "uniform", "normal" or mapping
        Distribution of every band, or per parameter (missing → uniform).
    timer_accuracy : float or True, optional
        The timer's own relative frequency error (True: the family's ``initial_accuracy``),
        a uniform band with sensitivity 1 that does not move the duty [1].
    **params
        The keywords of :func:`pwmkit.timing.astable` (ra, rb, c, vcc, pot, wiper, vd, vsat, vctl,
        timer, r_on); scalars only; engineering strings accepted.

    Returns
    -------
    SensitivityResult

    Raises
    ------
    DesignError
        Bad input, array input, or a design that does not oscillate.

    Notes
    -----
    Exact at the design point (sympy derivatives of the closed forms); the propagation is first
    order, valid while the tolerances are small enough for the response to stay nearly linear
    over the band — :func:`pwmkit.tolerance.monte_carlo` checks that. Asymmetric bands propagate
    their half-width; their midpoint shifts the mean by ``frequency_rel_shift``. Inputs are
    taken as uncorrelated (resistors from one reel are in fact partly correlated).

    Examples
    --------
    >>> s = sensitivities("classic", ra=10e3, rb=10e3, c=100e-9, vcc=12, vsat=0)
    >>> round(s.row("c").s_frequency, 12), round(s.row("ra").s_frequency + s.row("rb").s_frequency, 12)
    (-1.0, -1.0)

    References
    ----------
    .. [1] JCGM 100:2008 (GUM), §5.1.2 eq. (10) and §4.3.7.
    """
    from .parts.timers import get_timer
    from .timing.astable import _inputs, astable

    for key in params:
        if key not in PARAMETERS and key != "timer":
            raise DesignError(f"{key}: not a keyword of astable(); allowed: {', '.join(PARAMETERS)}, timer")
    kw = {k: params.get(k) for k in ("ra", "rb", "c", "vcc")}
    for k, v in kw.items():
        if v is None:
            raise DesignError(f"{k}: missing; sensitivities need the design values ra, rb, c and vcc")
    timer = params.get("timer", "bipolar")
    q = _inputs(topology, params["ra"], params["rb"], params["c"], params["vcc"], params.get("pot"),
                params.get("wiper"), params.get("vd"), params.get("vsat"), params.get("r_on"), params.get("vctl"),
                timer)
    for name in PARAMETERS:
        if np.ndim(q[name]) != 0:
            raise DesignError(f"{name}: sensitivities take one design point (scalars), got an array")
    nominal = astable(topology, **{k: v for k, v in params.items()})  # oscillation check with its message
    bands = read_tolerances(topology, tolerances)
    dists = read_distributions(parameters_of(topology), distribution)
    internal = params.get("vctl") is None
    p = partials(topology, q, internal)
    f, d = float(p.frequency), float(p.duty)
    rows = []
    sum_u_f = sum_u_d = worst_f = worst_d = rss_f = rss_d = shift_f = 0.0
    for name in parameters_of(topology):
        x = float(q[name])
        df, dd = float(p.d_frequency[name]), float(p.d_duty[name])
        s_f = x * df / f
        dpr = x * dd
        s_d = dpr / d if d > 0 else 0.0
        band = bands.get(name)
        dist = dists.get(name, "uniform") if band else None
        u = c_f = c_d = 0.0
        if band is not None:
            lo, hi = band
            u = standard_uncertainty(lo, hi, dist or "uniform")
            # wiper: band in fraction of travel (absolute), so use the plain derivatives
            g_f = df / f if name == "wiper" else s_f
            g_d = dd if name == "wiper" else dpr
            c_f, c_d = abs(g_f) * u, abs(g_d) * u
            sum_u_f += c_f**2
            sum_u_d += c_d**2
            half = 0.5 * (hi - lo)
            worst_f += abs(g_f) * half
            worst_d += abs(g_d) * half
            rss_f += (g_f * half) ** 2
            rss_d += (g_d * half) ** 2
            shift_f += g_f * 0.5 * (hi + lo)
        rows.append(SensitivityRow(name=name, value=x, unit=_UNITS[name], s_frequency=s_f, d_frequency=df,
                                   d_duty=dd, s_duty=s_d, duty_per_relative=dpr, tolerance=band,
                                   distribution=dist, u_relative=u, frequency_contribution=c_f,
                                   duty_contribution=c_d))
    acc = 0.0
    if timer_accuracy is not None and timer_accuracy is not False:
        if timer_accuracy is True:
            acc = get_timer(timer).initial_accuracy
        else:
            acc = tolerance_band("timer_accuracy", timer_accuracy)[1]
        sum_u_f += (acc / math.sqrt(3.0)) ** 2
        worst_f += acc
        rss_f += acc**2
    return SensitivityResult(
        topology=topology, timer=nominal.timer, frequency=f, duty=d, rows=tuple(rows), timer_accuracy=acc,
        frequency_rel_std=math.sqrt(sum_u_f), frequency_rel_worst=worst_f, frequency_rel_rss=math.sqrt(rss_f),
        frequency_rel_shift=shift_f, duty_std=math.sqrt(sum_u_d), duty_worst=worst_d, duty_rss=math.sqrt(rss_d),
    )
