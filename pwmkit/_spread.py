"""The spread model behind :mod:`pwmkit.tolerance` (internal).

Turns tolerances and conditions into box dimensions (:class:`Dim`), draws seeded samples, and
evaluates many design points at once: oscillation check with :func:`pwmkit.timing.paths` (no
exception per sample), then one vectorised :func:`pwmkit.timing.astable` call on the points that
oscillate. See :mod:`pwmkit.tolerance` for the meaning of every dimension. Also used by
:mod:`pwmkit.synthesis` for the yield of candidates.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass
from typing import Any

import numpy as np

from .errors import DesignError
from .sensitivity import PARAMETERS, parameters_of, read_distributions, read_tolerances

__all__ = ["DEFAULT_VD_TEMPCO", "Dim", "Model", "build_model", "sample", "values", "feasible", "evaluate",
           "reason_text", "generator", "pair"]

#: Temperature coefficient of a silicon diode's forward drop [V/K] (≈ −2 mV/K, common practice).
DEFAULT_VD_TEMPCO = -2e-3
T_REF_C = 25.0


@dataclass(frozen=True)
class Dim:
    key: str            # parameter name, or "t_ambient_c", "c_temperature", "timer"
    label: str          # for reports
    low: float          # band (relative deviation, or absolute value for vcc range / temperature)
    high: float
    distribution: str
    kind: str           # "relative", "additive" (wiper), "absolute" (vcc range, temperature)


@dataclass(frozen=True)
class Model:
    topology: str
    params: dict[str, Any]          # caller's astable keywords
    q: dict[str, Any]               # resolved nominal values (floats)
    internal_vctl: bool
    dims: tuple[Dim, ...]
    vd_tempco: float
    dielectric: Any                 # Dielectric or None
    timer_parts: tuple[float, float, float]   # initial accuracy, drift [1/K], supply [1/V] (0 when off)
    t_range: tuple[float, float] | None
    vcc_range: tuple[float, float] | None
    nominal: Any                    # AstableResult at the nominal point

    def sources(self) -> tuple[str, ...]:
        out = []
        for d in self.dims:
            unit = {"absolute": " V" if d.key == "vcc" else " °C"}.get(d.kind, "")
            if d.kind == "absolute":
                out.append(f"{d.label}: {d.low:g} … {d.high:g}{unit} uniform")
            else:
                span = "fraction of travel" if d.kind == "additive" else "relative"
                out.append(f"{d.label}: {100 * d.low:+.4g} … {100 * d.high:+.4g} % ({span}), {d.distribution}")
        return tuple(out)


def pair(value: Any, name: str, unit: str) -> tuple[float, float]:
    from ._validate import quantity

    if not isinstance(value, (tuple, list)) or len(value) != 2:
        raise DesignError(f"{name}: {value!r} is not allowed; give a (low, high) pair in {unit}")
    lo = float(quantity(value[0], name, unit=unit))
    hi = float(quantity(value[1], name, unit=unit))
    if lo > hi:
        raise DesignError(f"{name}: ({lo:g}, {hi:g}) {unit}; the low end must not exceed the high end")
    return lo, hi


def build_model(topology: str, tolerances: Any, distribution: Any, distributions: Any, dielectric: Any,
                 t_ambient_c: Any, vcc_range: Any, timer_errors: bool, vd_tempco: Any,
                 params: dict[str, Any]) -> Model:
    from ._validate import quantity
    from .parts.capacitors import get_dielectric
    from .parts.timers import get_timer
    from .timing.astable import _inputs, astable

    for key in params:
        if key not in PARAMETERS and key != "timer":
            raise DesignError(f"{key}: not a keyword of astable() nor an option; allowed astable keywords: "
                              f"{', '.join(PARAMETERS)}, timer")
    for key in ("ra", "rb", "c", "vcc"):
        if params.get(key) is None:
            raise DesignError(f"{key}: missing; give the nominal design (ra, rb, c, vcc …)")
    nominal = astable(topology, **params)
    timer = params.get("timer", "bipolar")
    q = _inputs(topology, params["ra"], params["rb"], params["c"], params["vcc"], params.get("pot"),
                params.get("wiper"), params.get("vd"), params.get("vsat"), params.get("r_on"), params.get("vctl"),
                timer)
    for name in PARAMETERS:
        if np.ndim(q[name]) != 0:
            raise DesignError(f"{name}: give one nominal design point (scalars), got an array")
        q[name] = float(q[name])
    bands = read_tolerances(topology, tolerances)
    names = list(parameters_of(topology))
    dists = read_distributions(names, distribution)
    for key in distribution if isinstance(distribution, Mapping) else ():
        if key not in names:
            raise DesignError(f"distribution: {key!r} is not a parameter of the {topology!r} topology; "
                              f"allowed: {', '.join(parameters_of(topology))}")
    if distributions is not None:
        if not isinstance(distributions, Mapping):
            raise DesignError(f"distributions: {distributions!r} is not a mapping of parameter → distribution")
        for key in distributions:
            if key not in names:
                raise DesignError(f"distributions: {key!r} is not a parameter of the {topology!r} topology; "
                                  f"allowed: {', '.join(parameters_of(topology))}")
        dists.update(read_distributions(list(distributions), dict(distributions)))
    diel = None if dielectric is None else get_dielectric(dielectric)
    if topology == "pot" and "wiper" in bands:
        lo, hi = bands["wiper"]
        if not (-1.0 <= lo <= hi <= 1.0):
            raise DesignError(f"tolerances['wiper']: ({lo:g}, {hi:g}) is out of range; in fraction of travel, "
                              "allowed -1 … 1")
    vrange = None
    if vcc_range is not None:
        if "vcc" in bands:
            raise DesignError("vcc_range, tolerances['vcc']: give the supply spread one way, not both")
        vrange = pair(vcc_range, "vcc_range", "V")
        if vrange[0] <= 0:
            raise DesignError(f"vcc_range: {vrange[0]:g} V is out of range; allowed vcc > 0 V")
    trange = None
    if t_ambient_c is not None:
        trange = pair(t_ambient_c, "t_ambient_c", "°C")
        if not (-100.0 <= trange[0] and trange[1] <= 200.0):
            raise DesignError(f"t_ambient_c: {trange} °C is out of range; allowed -100 … 200 °C")
    tempco = float(quantity(vd_tempco, "vd_tempco", unit="V/K", minimum=-0.1, maximum=0.1))

    dims: list[Dim] = []
    for name in parameters_of(topology):
        band = bands.get(name)
        if band is None and name == "c" and diel is not None:
            band = diel.tolerance_asym
        if name == "vcc" and vrange is not None:
            dims.append(Dim("vcc", "vcc", vrange[0], vrange[1], "uniform", "absolute"))
            continue
        if band is None:
            continue
        kind = "additive" if name == "wiper" else "relative"
        label = f"c ({diel.name})" if (name == "c" and "c" not in bands and diel is not None) else name
        dims.append(Dim(name, label, band[0], band[1], dists.get(name, "uniform"), kind))
    if trange is not None:
        dims.append(Dim("t_ambient_c", "ambient", trange[0], trange[1], "uniform", "absolute"))
        if diel is not None:
            lo, hi = diel.temperature_band(*trange)   # DesignError outside the rated range
            dims.append(Dim("c_temperature", f"c temperature ({diel.name})", lo, hi, "uniform", "relative"))
    parts = (0.0, 0.0, 0.0)
    if timer_errors:
        fam = get_timer(timer)
        parts = (fam.initial_accuracy, fam.drift_ppm_per_k * 1e-6, fam.supply_sensitivity_per_v)
        span = parts[0]
        if trange is not None:
            span += parts[1] * max(abs(trange[0] - T_REF_C), abs(trange[1] - T_REF_C))
        vnom = q["vcc"]
        if vrange is not None:
            span += parts[2] * max(abs(vrange[0] - vnom), abs(vrange[1] - vnom))
        elif "vcc" in bands:
            span += parts[2] * vnom * max(abs(bands["vcc"][0]), abs(bands["vcc"][1]))
        dims.append(Dim("timer", f"timer ({fam.name})", -span, span, "uniform", "relative"))
    return Model(topology=topology, params=dict(params), q=q, internal_vctl=params.get("vctl") is None,
                  dims=tuple(dims), vd_tempco=tempco, dielectric=diel, timer_parts=parts, t_range=trange,
                  vcc_range=vrange, nominal=nominal)


def draw(rng: np.random.Generator, dim: Dim, n: int) -> np.ndarray:
    if dim.distribution == "normal" and dim.kind != "absolute":
        mid, half = 0.5 * (dim.low + dim.high), 0.5 * (dim.high - dim.low)
        return rng.normal(mid, half / 3.0, n)
    return rng.uniform(dim.low, dim.high, n)


def sample(model: Model, n: int, rng: np.random.Generator) -> dict[str, np.ndarray]:
    """Draw n samples of every dimension (temperature-coupled ones conditionally on the ambient)."""
    out: dict[str, np.ndarray] = {}
    for dim in model.dims:
        if dim.key == "c_temperature":
            low, high = model.dielectric.temperature_envelope(out["t_ambient_c"])
            out[dim.key] = low + (high - low) * rng.uniform(0.0, 1.0, n)
        elif dim.key == "timer":
            acc, drift, supply = model.timer_parts
            e = acc * rng.uniform(-1.0, 1.0, n)
            if "t_ambient_c" in out:
                e = e + drift * np.abs(out["t_ambient_c"] - T_REF_C) * rng.uniform(-1.0, 1.0, n)
            if "vcc" in out:
                vcc = out["vcc"] if model.vcc_range is not None else model.q["vcc"] * (1.0 + out["vcc"])
                e = e + supply * np.abs(vcc - model.q["vcc"]) * rng.uniform(-1.0, 1.0, n)
            out[dim.key] = e
        else:
            out[dim.key] = draw(rng, dim, n)
    return out


def values(model: Model, dev: Mapping[str, Any]) -> tuple[dict[str, Any], Any]:
    """Timing values at the given deviations → (values for every PARAMETER, frequency multiplier)."""
    q = model.q
    v: dict[str, Any] = {}
    for name in PARAMETERS:
        x: Any = q[name]
        if name in dev and name != "vcc":
            x = np.clip(x + dev[name], 0.0, 1.0) if name == "wiper" else x * (1.0 + dev[name])
        v[name] = x
    if "vcc" in dev:
        v["vcc"] = dev["vcc"] if model.vcc_range is not None else q["vcc"] * (1.0 + dev["vcc"])
    if "c_temperature" in dev:
        v["c"] = v["c"] * (1.0 + dev["c_temperature"])
    if "t_ambient_c" in dev and model.topology != "classic":
        v["vd"] = v["vd"] + model.vd_tempco * (dev["t_ambient_c"] - T_REF_C)
    if model.internal_vctl:
        v["vctl"] = 2.0 * v["vcc"] / 3.0 * (1.0 + dev["vctl"]) if "vctl" in dev else 2.0 * v["vcc"] / 3.0
    mult = 1.0 + dev["timer"] if "timer" in dev else 1.0
    return v, mult


REASONS = {
    "latch_high": "the charge path heads for a voltage at or below the upper threshold (output latches high)",
    "latch_low": "the discharge path heads for a voltage at or above the lower threshold (output latches low)",
    "short": "the discharge path resistance is zero",
    "non_physical": "a drawn component value is zero or negative (normal band too wide)",
    "out_of_range": "a drawn component value lies outside the plausible range of pwmkit.ranges",
}


def feasible(model: Model, v: Mapping[str, Any], m: int) -> tuple[np.ndarray, dict[str, int]]:
    """Oscillation check of every sample with :func:`pwmkit.timing.paths` (no exception)."""
    from .timing.paths import paths

    def b(x: Any) -> np.ndarray:
        return np.broadcast_to(np.asarray(x, dtype=float), (m,))

    phys = ((b(v["ra"]) > 0) & (b(v["rb"]) >= 0) & (b(v["c"]) > 0) & (b(v["vcc"]) > 0) & (b(v["vctl"]) > 0)
            & (b(v["vd"]) >= 0) & (b(v["vsat"]) >= 0) & (b(v["r_on"]) >= 0)
            & ((b(v["pot"]) > 0) if model.topology == "pot" else True))
    with np.errstate(all="ignore"):
        p = paths(model.topology, ra=v["ra"], rb=v["rb"], pot=v["pot"], wiper=v["wiper"], vcc=v["vcc"],
                  vd=v["vd"], vsat=v["vsat"], r_on=v["r_on"])
        v_charge = p.v_charge
        if model.topology == "bypass":  # the diode across rb stops conducting: the charge then heads for vcc
            from .timing.astable import _bypass_turn_off

            v_off = _bypass_turn_off({"ra": v["ra"], "rb": v["rb"], "vcc": v["vcc"], "vd": v["vd"]})
            v_charge = np.where(b(v_off) < b(v["vctl"]), b(v["vcc"]), b(p.v_charge))
        high = ~(b(v_charge) > b(v["vctl"]))
        low = ~(b(p.v_discharge) < b(v["vctl"]) / 2.0)
        short = ~(b(p.r_discharge) > 0)
    from .ranges import RANGES

    inside = np.ones(m, dtype=bool)
    names = ("ra", "rb", "c", "vcc", "vd", "vsat", "r_on") + (("pot",) if model.topology == "pot" else ())
    for name in names:
        rg = RANGES[name]
        x = b(v[name])
        with np.errstate(invalid="ignore"):
            inside &= (x >= rg.low) if rg.low_inclusive else (x > rg.low)
            inside &= (x <= rg.high) if rg.high_inclusive else (x < rg.high)
    out_of_range = phys & ~inside
    phys = phys & inside
    bad_phys = ~phys & ~out_of_range
    high &= phys
    low &= phys & ~high
    short &= phys & ~high & ~low
    ok = ~(bad_phys | out_of_range | high | low | short)
    counts = {"non_physical": int(bad_phys.sum()), "out_of_range": int(out_of_range.sum()), "latch_high": int(high.sum()), "latch_low": int(low.sum()),
              "short": int(short.sum())}
    return ok, {k: c for k, c in counts.items() if c}


def evaluate(model: Model, dev: Mapping[str, Any], m: int) -> tuple[np.ndarray, np.ndarray, np.ndarray,
                                                                      dict[str, int]]:
    """Frequency and duty of m points (NaN where the sample does not oscillate), the ok mask, reasons.

    All points go to one :func:`astable` call; only if that call refuses (some point does not
    oscillate) are the points sorted with :func:`feasible` and the oscillating ones evaluated.
    """
    from .timing.astable import astable

    v, mult = values(model, dev)
    varied_vctl = (not model.internal_vctl) or ("vctl" in dev)
    timer = model.params.get("timer", "bipolar")

    def run(sel: Any) -> Any:
        kw = {name: sel(v[name]) for name in ("ra", "rb", "c", "vcc", "vsat", "r_on")}
        if model.topology != "classic":
            kw["vd"] = sel(v["vd"])
        if model.topology == "pot":
            kw["pot"], kw["wiper"] = sel(v["pot"]), sel(v["wiper"])
        kw["vctl"] = sel(v["vctl"]) if varied_vctl else None
        return astable(model.topology, timer=timer, **kw)

    try:
        r = run(lambda x: x)
        ok, reasons = np.ones(m, dtype=bool), {}
    except DesignError:
        ok, reasons = feasible(model, v, m)
        if not ok.any():
            return np.full(m, np.nan), np.full(m, np.nan), ok, reasons
        r = run(lambda x: x if np.ndim(x) == 0 else np.asarray(x)[ok])
    freq = np.full(m, np.nan)
    duty = np.full(m, np.nan)
    k = int(ok.sum())
    factor = mult if np.ndim(mult) == 0 else np.asarray(mult)[ok]
    freq[ok] = np.broadcast_to(np.asarray(r.frequency) * factor, (k,))
    duty[ok] = np.broadcast_to(r.duty, (k,))
    return freq, duty, ok, reasons


def reason_text(reasons: Mapping[str, int]) -> str:
    return "; ".join(f"{c} because {REASONS[k]}" for k, c in reasons.items())


def generator(seed: Any) -> np.random.Generator:
    if isinstance(seed, np.random.Generator):
        return seed
    if seed is None or (isinstance(seed, (int, np.integer)) and not isinstance(seed, bool) and seed >= 0):
        return np.random.default_rng(seed)
    raise DesignError(f"seed: {seed!r} is not allowed; give a non-negative integer, None or a numpy Generator")
