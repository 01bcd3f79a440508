"""Inverse design: preferred-value parts for a target frequency and duty.

:func:`find` searches every combination of preferred values — resistors from an IEC 60063 series,
capacitors from another over six decades, potentiometers from the usual decade values — for the
sets whose exact timing (:mod:`pwmkit.timing`) meets the targets, vectorised with numpy
broadcasting in bounded-memory chunks. The best sets are ranked by their target error, then by
their Monte Carlo yield against the target window (computed for the best twenty only, seeded),
then by part count and number of distinct values.

Design rules applied to every combination (common practice; documented so they can be checked):

* **discharge-pin current** — when the discharge switch closes it sinks the current from ``ra``
  and the capacitor's initial discharge current together:
  ``(vcc − vsat)/ra + (v_upper − v_discharge)/r_discharge ≤ i_discharge_max`` of the timer
  family (for the pot topology at the wiper end that gives the smallest discharge resistance);
* **threshold bias current** — the comparator input current flowing through the timing resistance
  must not shift the timing noticeably:
  ``i_threshold_max·r_charge ≤ 1 % of (v_charge − v_upper)`` and
  ``i_threshold_max·r_discharge ≤ 1 % of (v_lower − v_discharge)`` (largest resistances of the
  pot topology's travel);
* resistors between ``r_min`` and ``r_max`` (default 1 kΩ … 1 MΩ), capacitors between ``c_min``
  and ``c_max`` (default 100 pF … 100 µF), each capacitor value only in a dielectric whose usable
  range holds it (:mod:`pwmkit.parts.capacitors`; electrolytics only for large values).

References
----------
.. [1] IEC 60063:2015, *Preferred number series for resistors and capacitors*.
.. [2] Data sheets of the bipolar and CMOS 555-type timer families (threshold current, discharge
   current; typical published datasheet values, generic).
"""

from __future__ import annotations

import math
import time
from collections.abc import Callable, Mapping
from dataclasses import dataclass
from typing import Any

import numpy as np

from .errors import DesignError

__all__ = ["POT_VALUES", "POT_TOLERANCE", "Candidate", "Candidates", "find"]

#: Usual potentiometer values [Ω] (common practice).
POT_VALUES: tuple[float, ...] = (1e3, 2e3, 5e3, 10e3, 20e3, 25e3, 47e3, 50e3, 100e3, 220e3, 250e3, 470e3,
                                 500e3, 1e6)
#: End-to-end tolerance of an ordinary potentiometer (±20 %, common practice).
POT_TOLERANCE = 0.20

_PART_COUNT = {"classic": 3, "bypass": 4, "steered": 5, "pot": 6}
_BIAS_SHARE = 0.01
_OPTIONS = ("timer", "vd", "vsat", "r_on", "vctl", "frequency_tolerance", "duty_tolerance", "dielectric", "r_min",
            "r_max", "c_min", "c_max", "pot_values", "n_candidates", "n_yield", "yield_samples", "seed",
            "t_ambient_c", "progress", "progress_after", "chunk_elements")


@dataclass(frozen=True)
class Candidate:
    """One set of preferred-value parts.

    ``astable(c.topology, **c.params, vcc=c.vcc, timer=c.timer)`` reproduces ``frequency`` and
    ``duty`` exactly.

    Attributes
    ----------
    topology : str
    params : dict
        Part values under the keyword names of :func:`pwmkit.timing.astable` (ra, rb, c; pot and
        the wiper position for the mid duty of the pot topology) [Ω, F, 1], plus any of vd, vsat,
        r_on, vctl that were given to :func:`find`.
    vcc : supply [V]
    timer : timer family name
    frequency : achieved frequency (pot: at ``params["wiper"]``) [Hz]
    duty : achieved duty (pot: at ``params["wiper"]``) [1]
    duty_min, duty_max : duty range over the pot travel (other topologies: both = duty) [1]
    frequency_min, frequency_max : frequency range over the pot travel (others: = frequency) [Hz]
    frequency_error : frequency / target − 1 [1]
    duty_error : duty − target duty; pot: shortfall of the covered range (0 when covered) [1]
    yield_ : Monte Carlo share inside the target window (None if not computed) [1]
    part_count : timing parts (resistors, pot, capacitor, diodes)
    bom_lines : distinct part values
    r_series, c_series : the preferred-number series used
    dielectric : dielectric of the capacitor
    notes : cautions for this set
    """

    topology: str
    params: dict[str, float]
    vcc: float
    timer: str
    frequency: float
    duty: float
    duty_min: float
    duty_max: float
    frequency_min: float
    frequency_max: float
    frequency_error: float
    duty_error: float
    yield_: float | None
    part_count: int
    bom_lines: int
    r_series: str
    c_series: str
    dielectric: str
    notes: tuple[str, ...] = ()

    def describe(self) -> str:
        """The parts in engineering notation, e.g. ``"ra 4.7 kΩ, rb 10 kΩ, c 100 nF (C0G)"``."""
        from .values import format_value

        units = {"ra": "Ω", "rb": "Ω", "pot": "Ω", "c": "F", "vd": "V", "vsat": "V", "r_on": "Ω", "vctl": "V"}
        parts = []
        for k, v in self.params.items():
            if k == "wiper":
                parts.append(f"wiper {v:.3f}")
            else:
                parts.append(f"{k} {format_value(v, units[k])}" + (f" ({self.dielectric})" if k == "c" else ""))
        return ", ".join(parts)

    def __repr__(self) -> str:
        y = "" if self.yield_ is None else f", yield {100 * self.yield_:.1f} %"
        d = (f"duty {100 * self.duty_min:.2f}…{100 * self.duty_max:.2f} %" if self.topology == "pot"
             else f"duty {100 * self.duty:.3f} % ({100 * self.duty_error:+.3f} pts)")
        return (f"Candidate({self.topology}: {self.describe()}; f {self.frequency:.6g} Hz "
                f"({100 * self.frequency_error:+.3f} %), {d}{y})")

    def _repr_html_(self) -> str:
        return f"<p>{self.__repr__()}</p>"


class Candidates(list):
    """The candidates of :func:`find`, best first (a list), with facts about the search.

    Attributes
    ----------
    search_size : number of part combinations evaluated
    in_window : number of combinations inside the target window
    elapsed : search time [s]
    target : description of the target
    """

    search_size: int = 0
    in_window: int = 0
    elapsed: float = 0.0
    target: str = ""

    def _repr_html_(self) -> str:
        head = "<tr><th>#</th><th>parts</th><th>frequency</th><th>duty</th><th>yield</th><th>notes</th></tr>"
        rows = []
        for i, c in enumerate(self, 1):
            d = (f"{100 * c.duty_min:.2f} … {100 * c.duty_max:.2f} %" if c.topology == "pot"
                 else f"{100 * c.duty:.3f} % ({100 * c.duty_error:+.2f} pts)")
            y = "—" if c.yield_ is None else f"{100 * c.yield_:.1f} %"
            rows.append(f"<tr><td>{i}</td><td>{c.describe()}</td><td>{c.frequency:.6g} Hz "
                        f"({100 * c.frequency_error:+.2f} %)</td><td>{d}</td><td>{y}</td>"
                        f"<td>{'; '.join(c.notes)}</td></tr>")
        return (f"<table class='pwmkit-result'><caption>{self.target} — {self.search_size:,} combinations, "
                f"{self.in_window:,} in the window</caption>{head}{''.join(rows)}</table>")


# -- inputs ---------------------------------------------------------------------------------------

def _positive(value: Any, name: str, unit: str) -> float:
    from ._validate import quantity

    x = quantity(value, name, unit=unit, minimum=0.0, min_inclusive=False)
    if np.ndim(x) != 0:
        raise DesignError(f"{name}: give a single value, not an array")
    return float(x)


def _fraction(value: Any, name: str, low: float = 0.0, high: float = 1.0) -> float:
    from ._validate import quantity

    x = quantity(value, name, minimum=low, maximum=high, min_inclusive=False, max_inclusive=False)
    if np.ndim(x) != 0:
        raise DesignError(f"{name}: give a single value, not an array")
    return float(x)


def _frequency_window(frequency: Any, tol: float) -> tuple[float, float, float]:
    if isinstance(frequency, (tuple, list)):
        if len(frequency) != 2:
            raise DesignError(f"frequency: {frequency!r} is not allowed; give a value or a (low, high) window [Hz]")
        lo, hi = _positive(frequency[0], "frequency", "Hz"), _positive(frequency[1], "frequency", "Hz")
        if not lo < hi:
            raise DesignError(f"frequency: window ({lo:g}, {hi:g}) Hz; the low end must be below the high end")
        return math.sqrt(lo * hi), lo, hi
    f = _positive(frequency, "frequency", "Hz")
    return f, f * (1.0 - tol), f * (1.0 + tol)


def _score(e: np.ndarray, e_lo: float, e_hi: float) -> np.ndarray:
    """Error e normalised by the window half on its side (e_lo < 0 < e_hi): 0 on target, 1 at the edge."""
    return np.where(e >= 0, e / e_hi, e / e_lo)


# -- search ---------------------------------------------------------------------------------------

@dataclass
class _Search:
    """Running state of a chunked search: best in-window combinations and the closest miss."""

    keep: int
    best_score: np.ndarray
    best_index: np.ndarray
    in_window: int = 0
    closest_score: float = math.inf
    closest_index: int = -1

    def closest(self, score: np.ndarray, index: np.ndarray | int) -> None:
        """Track the combination with the smallest score, inside the window or not.

        ``index`` holds the global flat index of every score, or is the flat index of the first
        one when the scores are a contiguous block.
        """
        if score.size:
            j = int(np.argmin(score))
            if score.flat[j] < self.closest_score:
                self.closest_score = float(score.flat[j])
                self.closest_index = index + j if isinstance(index, int) else int(index.flat[j])

    def add(self, score: np.ndarray, index: np.ndarray) -> None:
        """Keep the best ``keep`` of the in-window combinations given (flat score and global index)."""
        if not score.size:
            return
        self.in_window += score.size
        if score.size > self.keep:
            part = np.argpartition(score, self.keep)[: self.keep]
            index, score = index[part], score[part]
        allscore = np.concatenate([self.best_score, score])
        allidx = np.concatenate([self.best_index, index])
        if allscore.size > self.keep:
            part = np.argpartition(allscore, self.keep)[: self.keep]
            allscore, allidx = allscore[part], allidx[part]
        self.best_score, self.best_index = allscore, allidx


def _discharge_pin_ok(vcc: float, vsat: float, ra: np.ndarray, v_upper: float, v_discharge: np.ndarray,
                      r_discharge_min: np.ndarray, i_max: float) -> np.ndarray:
    return (vcc - vsat) / ra + (v_upper - v_discharge) / r_discharge_min <= i_max


def find(topology: str, *, frequency: Any, vcc: Any, duty: Any = None, duty_range: Any = None,
         r_series: str = "E24", c_series: str = "E6", **options: Any) -> Candidates:
    """Preferred-value parts that give a target frequency and duty (or duty range).

    Parameters
    ----------
    topology : {"classic", "bypass", "steered", "pot"}
    frequency : float or (float, float)
        Target frequency [Hz] (window ``± frequency_tolerance``), or a (low, high) window [Hz].
    vcc : float
        Supply [V], inside the timer family's recommended range.
    duty : float, optional
        Target duty for classic, bypass and steered (window ``± duty_tolerance``) [1].
    duty_range : (float, float), optional
        Pot topology: duty range the pot travel must cover [1].
    r_series, c_series : str
        Preferred-number series of resistors (E12/E24/E48/E96/E192) and capacitors (E3/E6/E12 …).
    **options
        ``timer`` ("bipolar"), ``vd``, ``vsat``, ``r_on``, ``vctl`` (as for astable);
        ``frequency_tolerance`` (0.05, relative), ``duty_tolerance`` (0.02, absolute);
        ``dielectric`` (None: the most stable one per value); ``r_min``/``r_max`` (1 kΩ/1 MΩ);
        ``c_min``/``c_max`` (100 pF/100 µF); ``pot_values`` (:data:`POT_VALUES`);
        ``n_candidates`` (10); ``n_yield`` (20 best get a Monte Carlo yield); ``yield_samples``
        (2000); ``seed`` (0); ``t_ambient_c`` (None, or a range for the yield);
        ``progress`` (callable taking the fraction done, called once the search has run
        ``progress_after`` seconds, default 1 s; nothing is printed); ``chunk_elements``
        (2 000 000 combinations per chunk, which bounds memory to about 200 MB).

    Returns
    -------
    Candidates
        A list of :class:`Candidate`, best first, all inside the target window.

    Raises
    ------
    DesignError
        Bad input, or targets that no combination meets — the message says why and gives the
        closest combination.

    Notes
    -----
    The yield model: resistors at the customary tolerance of their series (IEC 60063 association,
    common practice), the pot at ±20 %, the capacitor at its dielectric's initial tolerance, the
    timer family's initial accuracy; uniform bands; non-oscillating samples count as failures.
    For the pot topology a sample passes when its duty range covers ``duty_range`` and its
    frequency stays in the window at both ends of the travel.

    Examples
    --------
    >>> best = find("bypass", frequency=1000, duty=0.3, vcc=12)[0]
    >>> abs(best.frequency_error) <= 0.05 and abs(best.duty_error) <= 0.02
    True
    """
    from . import eseries
    from .parts.capacitors import get_dielectric, suggest_dielectric
    from .parts.timers import get_timer
    from .timing.astable import _inputs, astable
    from .timing.paths import TOPOLOGIES

    t0 = time.perf_counter()
    for key in options:
        if key not in _OPTIONS:
            raise DesignError(f"{key}: not an option of find(); allowed: {', '.join(_OPTIONS)}")
    if topology not in TOPOLOGIES:
        raise DesignError(f"topology: {topology!r} is not known; allowed: {', '.join(TOPOLOGIES)}")
    fam = get_timer(options.get("timer", "bipolar"))
    vcc_v = _positive(vcc, "vcc", "V")
    if not fam.vcc_min <= vcc_v <= fam.vcc_max:
        raise DesignError(f"vcc: {vcc_v:g} V is outside the {fam.description}'s recommended supply range; "
                          f"allowed {fam.vcc_min:g} … {fam.vcc_max:g} V")
    f_tol = _fraction(options.get("frequency_tolerance", 0.05), "frequency_tolerance")
    d_tol = _fraction(options.get("duty_tolerance", 0.02), "duty_tolerance", 0.0, 0.5)
    f_t, f_lo, f_hi = _frequency_window(frequency, f_tol)
    if f_t > fam.f_max_practical:
        raise DesignError(f"frequency: {f_t:g} Hz is above the practical maximum of the {fam.description} "
                          f"({fam.f_max_practical:g} Hz)")
    if topology == "pot":
        if duty is not None or duty_range is None:
            raise DesignError("duty_range: the 'pot' topology needs duty_range=(low, high), the duty range the "
                              "pot travel must cover (not duty)")
        if not isinstance(duty_range, (tuple, list)) or len(duty_range) != 2:
            raise DesignError(f"duty_range: {duty_range!r} is not allowed; give (low, high), fractions 0–1")
        d_lo, d_hi = _fraction(duty_range[0], "duty_range"), _fraction(duty_range[1], "duty_range")
        if not d_lo < d_hi:
            raise DesignError(f"duty_range: ({d_lo:g}, {d_hi:g}); the low end must be below the high end")
        d_t = 0.5 * (d_lo + d_hi)
    else:
        if duty_range is not None:
            raise DesignError(f"duty_range: only the 'pot' topology has a duty range; give duty for {topology!r}")
        if duty is None:
            raise DesignError(f"duty: missing; the {topology!r} topology needs a target duty (0–1)")
        d_t = _fraction(duty, "duty")
        d_lo, d_hi = max(d_t - d_tol, 0.0), min(d_t + d_tol, 1.0)
    r_min = _positive(options.get("r_min", 1e3), "r_min", "Ω")
    r_max = _positive(options.get("r_max", 1e6), "r_max", "Ω")
    c_min = _positive(options.get("c_min", 100e-12), "c_min", "F")
    c_max = _positive(options.get("c_max", 100e-6), "c_max", "F")
    r_vals = np.asarray(eseries.in_range(r_min, r_max, r_series))
    c_all = np.asarray(eseries.in_range(c_min, c_max, c_series))
    r_series_name, c_series_name = r_series.strip().upper(), c_series.strip().upper()
    if options.get("dielectric") is not None:
        diel = get_dielectric(options["dielectric"])
        c_vals = c_all[np.asarray(diel.covers(c_all), dtype=bool)]
        diel_names = [diel.name] * c_vals.size
    else:
        c_vals = np.asarray([c for c in c_all if _covered(c)])
        diel_names = [suggest_dielectric(c).name for c in c_vals]
    if r_vals.size == 0 or c_vals.size == 0:
        raise DesignError(f"r_min, r_max, c_min, c_max: no {r_series_name} resistor in {r_min:g} … {r_max:g} Ω or no "
                          f"{c_series_name} capacitor in {c_min:g} … {c_max:g} F (for the dielectric asked)")
    pots = np.asarray([_positive(p, "pot_values", "Ω") for p in options.get("pot_values", POT_VALUES)])
    extras = {k: options[k] for k in ("vd", "vsat", "r_on", "vctl") if options.get(k) is not None}
    # resolved electrical values (and the oscillation check with astable's own message)
    probe = dict(ra=10e3, rb=10e3, c=10e-9, vcc=vcc_v, timer=fam, **extras)
    if topology == "pot":
        probe.update(pot=10e3, wiper=0.5)
    astable(topology, **probe)
    q = _inputs(topology, 10e3, 10e3, 10e-9, vcc_v, probe.get("pot"), probe.get("wiper"), extras.get("vd"),
                extras.get("vsat"), extras.get("r_on"), extras.get("vctl"), fam)
    for k in ("vd", "vsat", "r_on", "vctl"):
        if np.ndim(q[k]) != 0:
            raise DesignError(f"{k}: give a single value, not an array")
    vd, vsat, r_on, v_up = float(q["vd"]), float(q["vsat"]), float(q["r_on"]), float(q["vctl"])
    v_low = v_up / 2.0

    progress = options.get("progress")
    if progress is not None and not callable(progress):
        raise DesignError(f"progress: {progress!r} is not callable; give a function taking the fraction done")
    after = float(options.get("progress_after", 1.0))
    chunk = int(options.get("chunk_elements", 2_000_000))
    if chunk < 1000:
        raise DesignError(f"chunk_elements: {chunk} is too small; allowed >= 1000")

    def report(fraction: float) -> None:
        if progress is not None and time.perf_counter() - t0 >= after:
            progress(min(max(fraction, 0.0), 1.0))

    keep = max(int(options.get("n_yield", 20)), int(options.get("n_candidates", 10)), 1) * 5
    search = _Search(keep=keep, best_score=np.empty(0), best_index=np.empty(0, dtype=np.int64))
    args = dict(vcc=vcc_v, vd=vd, vsat=vsat, r_on=r_on, v_up=v_up, v_low=v_low, fam=fam, f=(f_t, f_lo, f_hi),
                d=(d_t, d_lo, d_hi))
    if topology == "pot":
        shape = (r_vals.size, r_vals.size, pots.size, c_vals.size)
        _search_pot(topology, r_vals, pots, c_vals, args, search, chunk, report)
    else:
        shape = (r_vals.size, r_vals.size, c_vals.size)
        _search_fixed(topology, r_vals, c_vals, args, search, chunk, report)
    size = int(np.prod(shape))
    target = (f"{topology}: {f_t:.6g} Hz ({f_lo:.6g} … {f_hi:.6g}), duty "
              + (f"range {100 * d_lo:.4g} … {100 * d_hi:.4g} %" if topology == "pot"
                 else f"{100 * d_t:.4g} % ({100 * d_lo:.4g} … {100 * d_hi:.4g})"))
    if search.in_window == 0:
        raise DesignError(_no_solution(topology, target, search, shape, r_vals, pots, c_vals, args, extras,
                                       r_series_name, c_series_name, r_min, r_max, c_min, c_max))
    order = np.argsort(search.best_score, kind="stable")
    chosen = [tuple(int(j) for j in np.unravel_index(int(search.best_index[i]), shape)) for i in order]
    n_cand = int(options.get("n_candidates", 10))
    n_yield = int(options.get("n_yield", 20))
    if n_cand < 1 or n_yield < 0:
        raise DesignError("n_candidates, n_yield: need n_candidates >= 1 and n_yield >= 0")
    out = []
    for rank, idx in enumerate(chosen[: max(n_cand, n_yield)]):
        cand = _candidate(topology, idx, r_vals, pots, c_vals, diel_names, vcc_v, fam, extras, args,
                          r_series_name, c_series_name)
        if cand is not None:
            out.append((float(search.best_score[order[rank]]), cand))
    scored = []
    samples = options.get("yield_samples", 2000)
    if not isinstance(samples, (int, np.integer)) or isinstance(samples, bool) or not 10 <= samples <= 1_000_000:
        raise DesignError(f"yield_samples: {samples!r} is not allowed; give an integer 10 … 1000000")
    seed = options.get("seed", 0)
    if not (isinstance(seed, (int, np.integer)) and not isinstance(seed, bool) and seed >= 0):
        raise DesignError(f"seed: {seed!r} is not allowed; give a non-negative integer")
    for i, (score, cand) in enumerate(out):
        y = None
        if i < n_yield:
            y = _yield(cand, args, r_series_name, options.get("t_ambient_c"), int(samples), int(seed))
            report(0.9 + 0.1 * (i + 1) / max(min(n_yield, len(out)), 1))
        scored.append((score, _replace_yield(cand, y)))
    scored.sort(key=lambda sc: (math.floor(sc[0] / 0.25), -(sc[1].yield_ if sc[1].yield_ is not None else -1.0),
                                sc[1].part_count, sc[1].bom_lines, sc[0]))
    result = Candidates(c for _, c in scored[:n_cand])
    result.search_size = size
    result.in_window = search.in_window
    result.elapsed = time.perf_counter() - t0
    result.target = target
    report(1.0)
    return result


def _covered(c: float) -> bool:
    from .parts.capacitors import DIELECTRICS

    return any(d.covers(c) for d in DIELECTRICS.values())


def _ln_factors(v_charge: Any, v_discharge: Any, v_up: float, v_low: float) -> tuple[Any, Any]:
    with np.errstate(all="ignore"):
        l1 = np.log((v_charge - v_low) / (v_charge - v_up))
        l2 = np.log((v_up - v_discharge) / (v_low - v_discharge))
    return l1, l2


def _search_fixed(topology: str, r_vals: np.ndarray, c_vals: np.ndarray, a: dict[str, Any], search: _Search,
                  chunk: int, report: Callable[[float], None]) -> None:
    """classic / bypass / steered: ra × rb × c, chunked over ra."""
    from .timing.paths import paths

    f_t, f_lo, f_hi = a["f"]
    d_t, d_lo, d_hi = a["d"]
    nr, nc = r_vals.size, c_vals.size
    log_c = np.log(c_vals)
    e_lo, e_hi = math.log(f_lo / f_t), math.log(f_hi / f_t)
    rows = max(1, chunk // (nr * nc))
    for start in range(0, nr, rows):
        ra = r_vals[start:start + rows, None]
        rb = r_vals[None, :]
        p = paths(topology, ra=ra, rb=rb, pot=0.0, wiper=0.0, vcc=a["vcc"], vd=a["vd"], vsat=a["vsat"],
                  r_on=a["r_on"])
        l1, l2 = _ln_factors(p.v_charge, p.v_discharge, a["v_up"], a["v_low"])
        th = p.r_charge * l1          # t_high per farad [s/F]
        if topology == "bypass":  # where the diode across rb stops conducting, the charge finishes via ra + rb
            from .timing.astable import _bypass_t_high

            th = _bypass_t_high({"ra": ra, "rb": rb, "c": 1.0, "vcc": a["vcc"], "vd": a["vd"], "vctl": a["v_up"]},
                                np.broadcast_to(th, np.broadcast(ra, rb).shape))
        tl = p.r_discharge * l2
        duty = th / (th + tl)
        ok = _discharge_pin_ok(a["vcc"], a["vsat"], ra, a["v_up"], p.v_discharge, p.r_discharge,
                               a["fam"].i_discharge_max)
        ok &= a["fam"].i_threshold_max * p.r_charge <= _BIAS_SHARE * (p.v_charge - a["v_up"])
        ok &= a["fam"].i_threshold_max * p.r_discharge <= _BIAS_SHARE * (a["v_low"] - p.v_discharge)
        ok &= np.isfinite(duty)
        ok = np.broadcast_to(ok, duty.shape)
        with np.errstate(all="ignore"):
            # ln(f/f_t) = −ln(t_high + t_low per farad) − ln c − ln f_t, summed by broadcasting
            e_f = (-np.log(th + tl) - math.log(f_t))[:, :, None] - log_c[None, None, :]
            score = _score(e_f, e_lo, e_hi) + _score(duty - d_t, d_lo - d_t, d_hi - d_t)[:, :, None]
        score = np.where(ok[:, :, None], score, np.inf)
        inside = (e_f >= e_lo) & (e_f <= e_hi) & ((duty >= d_lo) & (duty <= d_hi) & ok)[:, :, None]
        base = start * nr * nc
        search.closest(score, base)
        flat = np.flatnonzero(inside)
        search.add(score.ravel()[flat], base + flat)
        report(0.9 * min(start + rows, nr) / nr)


def _search_pot(topology: str, r_vals: np.ndarray, pots: np.ndarray, c_vals: np.ndarray, a: dict[str, Any],
                search: _Search, chunk: int, report: Callable[[float], None]) -> None:
    """pot: ra × rb × pot × c, chunked over ra; duty and frequency at both ends of the travel.

    The duty range and the design rules do not depend on c, so they are decided on the
    ra × rb × pot grid first; only the triples that pass are crossed with every capacitor.
    """
    from .timing.paths import paths

    f_t, f_lo, f_hi = a["f"]
    d_t, d_lo, d_hi = a["d"]
    nr, npot, nc = r_vals.size, pots.size, c_vals.size
    log_c = np.log(c_vals)
    e_lo, e_hi = math.log(f_lo / f_t), math.log(f_hi / f_t)
    rows = max(1, chunk // (nr * npot * 8))
    span_need = d_hi - d_lo
    for start in range(0, nr, rows):
        ra = r_vals[start:start + rows, None, None]
        rb = r_vals[None, :, None]
        pot = pots[None, None, :]
        ends = []
        for w in (0.0, 1.0):
            p = paths(topology, ra=ra, rb=rb, pot=pot, wiper=w, vcc=a["vcc"], vd=a["vd"], vsat=a["vsat"],
                      r_on=a["r_on"])
            l1, l2 = _ln_factors(p.v_charge, p.v_discharge, a["v_up"], a["v_low"])
            th, tl = p.r_charge * l1, p.r_discharge * l2
            ends.append((p, th / (th + tl), th + tl))
        (p0, d0, s0), (p1, d1, s1) = ends
        shape3 = np.broadcast(d0, d1, s0, s1).shape
        rules = _discharge_pin_ok(a["vcc"], a["vsat"], ra, a["v_up"], p1.v_discharge, p1.r_discharge,
                                  a["fam"].i_discharge_max)
        rules = rules & (a["fam"].i_threshold_max * p1.r_charge <= _BIAS_SHARE * (p1.v_charge - a["v_up"]))
        rules = rules & (a["fam"].i_threshold_max * p0.r_discharge <= _BIAS_SHARE * (a["v_low"] - p0.v_discharge))
        rules = np.broadcast_to(rules & np.isfinite(d0) & np.isfinite(d1), shape3)
        d0, d1 = np.broadcast_to(d0, shape3), np.broadcast_to(d1, shape3)
        covered = rules & (d0 <= d_lo) & (d1 >= d_hi)
        base = start * nr * npot   # flat index of the first triple of this chunk
        with np.errstate(all="ignore"):
            ls0 = np.broadcast_to(-np.log(s0) - math.log(f_t), shape3)
            ls1 = np.broadcast_to(-np.log(s1) - math.log(f_t), shape3)
            # closest miss: duty shortfall plus the frequency error with the nearest capacitor
            short = np.maximum(np.maximum(d0 - d_lo, d_hi - d1), 0.0) / max(span_need, 1e-9)
            mid = 0.5 * (ls0 + ls1)
            ic = np.clip(np.searchsorted(log_c, mid), 1, nc - 1) if nc > 1 else np.zeros(shape3, dtype=int)
            ic = np.where(np.abs(mid - log_c[ic - 1]) < np.abs(mid - log_c[ic]), ic - 1, ic) if nc > 1 else ic
            miss = np.abs(mid - log_c[ic]) / e_hi + 10.0 * short
        miss = np.where(rules, miss, np.inf)
        search.closest(miss, (base + np.arange(miss.size).reshape(shape3)) * nc + ic)
        t = np.flatnonzero(covered)
        if t.size:
            e0 = ls0.ravel()[t][:, None] - log_c
            e1 = ls1.ravel()[t][:, None] - log_c
            excess = np.clip(((d1.ravel()[t] - d0.ravel()[t]) - span_need) / max(1.0 - span_need, 1e-9), 0.0, 1.0)
            with np.errstate(all="ignore"):
                score = np.maximum(_score(e0, e_lo, e_hi), _score(e1, e_lo, e_hi)) + 0.5 * excess[:, None]
            inside = (e0 >= e_lo) & (e0 <= e_hi) & (e1 >= e_lo) & (e1 <= e_hi)
            index = (base + t)[:, None] * nc + np.arange(nc)[None, :]
            search.add(score[inside], index[inside])
        report(0.9 * min(start + rows, nr) / nr)


def _mid_wiper(ra: float, rb_eff: float, pot: float, l1: float, l2: float, d: float) -> float:
    """Wiper position giving duty d: L1(ra + wP)(1 − d) = d·L2(rb' + (1 − w)P), solved for w."""
    w = (d * l2 * (rb_eff + pot) - (1.0 - d) * l1 * ra) / (pot * ((1.0 - d) * l1 + d * l2))
    return float(min(max(w, 0.0), 1.0))


def _candidate(topology: str, idx: tuple[int, ...], r_vals: np.ndarray, pots: np.ndarray, c_vals: np.ndarray,
               diel_names: list[str], vcc: float, fam: Any, extras: dict[str, Any], a: dict[str, Any],
               r_series: str, c_series: str) -> Candidate | None:
    from .errors import DesignError as _DE
    from .timing.astable import astable
    from .timing.paths import paths

    f_t, f_lo, f_hi = a["f"]
    d_t, d_lo, d_hi = a["d"]
    ra, rb = float(r_vals[idx[0]]), float(r_vals[idx[1]])
    ci = idx[-1]
    c = float(c_vals[ci])
    params: dict[str, float] = {"ra": ra, "rb": rb, "c": c}
    if topology == "pot":
        pot = float(pots[idx[2]])
        p = paths("pot", ra=ra, rb=rb, pot=pot, wiper=0.0, vcc=vcc, vd=a["vd"], vsat=a["vsat"], r_on=a["r_on"])
        l1, l2 = _ln_factors(p.v_charge, p.v_discharge, a["v_up"], a["v_low"])
        rb_eff = float(p.r_discharge) - pot
        params.update(pot=pot, wiper=_mid_wiper(ra, rb_eff, pot, float(l1), float(l2), d_t))
    params.update({k: float(v) for k, v in extras.items()})
    try:
        r = astable(topology, vcc=vcc, timer=fam, **params)
        if topology == "pot":
            ends = [astable(topology, vcc=vcc, timer=fam, **{**params, "wiper": w}) for w in (0.0, 1.0)]
        else:
            ends = [r, r]
    except _DE:  # pragma: no cover - the search only keeps oscillating combinations
        return None
    f_ends = [e.frequency for e in ends]
    if topology == "pot":
        duty_error = max(ends[0].duty - d_lo, d_hi - ends[1].duty, 0.0)
        inside = f_lo <= min(f_ends) and max(f_ends) <= f_hi and duty_error == 0.0
    else:
        duty_error = r.duty - d_t
        inside = f_lo <= r.frequency <= f_hi and d_lo <= r.duty <= d_hi
    if not inside:  # pragma: no cover - guards against rounding at the window edge
        return None
    diel = diel_names[ci]
    notes = []
    if diel == "electrolytic":
        notes.append("aluminium electrolytic timing capacitor: ±20 % and strong temperature dependence, "
                     "high leakage — expect poor accuracy")
    elif diel == "X7R":
        notes.append("X7R timing capacitor: ±15 % over temperature plus DC-bias and ageing loss")
    if r.frequency > 0.1 * fam.f_max_practical:
        notes.append("high frequency: the timer's internal delays (≈0.1–0.3 µs bipolar, typical value — check your part's data sheet) "
                     "lengthen each half-period; trim on the bench")
    resistors = [ra, rb]
    lines = len(set(resistors)) + 1 + (1 if topology == "pot" else 0) + (1 if topology != "classic" else 0)
    return Candidate(
        topology=topology, params=params, vcc=vcc, timer=fam.name, frequency=float(r.frequency),
        duty=float(r.duty), duty_min=float(ends[0].duty), duty_max=float(ends[1].duty),
        frequency_min=float(min(f_ends)), frequency_max=float(max(f_ends)),
        frequency_error=float(r.frequency / f_t - 1.0), duty_error=float(duty_error), yield_=None,
        part_count=_PART_COUNT[topology], bom_lines=lines, r_series=r_series, c_series=c_series,
        dielectric=diel, notes=tuple(notes),
    )


def _replace_yield(cand: Candidate, y: float | None) -> Candidate:
    from dataclasses import replace

    return replace(cand, yield_=y)


def _yield(cand: Candidate, a: dict[str, Any], r_series: str, t_ambient_c: Any, n: int, seed: int) -> float:
    """Monte Carlo share of builds inside the target window (tolerance model of :func:`find`)."""
    from . import eseries
    from ._spread import build_model, evaluate, generator, sample

    f_t, f_lo, f_hi = a["f"]
    d_t, d_lo, d_hi = a["d"]
    r_tol = eseries.tolerance(r_series)
    tol: dict[str, Any] = {"ra": r_tol, "rb": r_tol}
    if cand.topology == "pot":
        tol["pot"] = POT_TOLERANCE
    base = {**cand.params, "vcc": cand.vcc, "timer": cand.timer}
    wipers = (0.0, 1.0) if cand.topology == "pot" else (None,)
    passed = None
    for w in wipers:
        params = dict(base) if w is None else {**base, "wiper": w}
        model = build_model(cand.topology, tol, "uniform", None, cand.dielectric, t_ambient_c, None, True,
                             -2e-3, params)
        dev = sample(model, n, generator(seed))   # same seed at both wiper ends: the same builds
        f, d, ok, _ = evaluate(model, dev, n)
        with np.errstate(invalid="ignore"):
            good = ok & (f >= f_lo) & (f <= f_hi)
            if w is None:
                good &= (d >= d_lo) & (d <= d_hi)
            elif w == 0.0:
                good &= d <= d_lo
            else:
                good &= d >= d_hi
        passed = good if passed is None else passed & good
    assert passed is not None
    return float(passed.sum()) / n


def _no_solution(topology: str, target: str, search: _Search, shape: tuple[int, ...], r_vals: np.ndarray,
                 pots: np.ndarray, c_vals: np.ndarray, a: dict[str, Any], extras: Mapping[str, Any],
                 r_series: str, c_series: str, r_min: float, r_max: float, c_min: float, c_max: float) -> str:
    """Why no combination meets the target, with the closest one."""
    from .timing.astable import astable
    from .values import format_value

    d_t, d_lo, d_hi = a["d"]
    space = (f"{r_series} resistors {format_value(r_min, 'Ω')} … {format_value(r_max, 'Ω')}, {c_series} capacitors "
             f"{format_value(c_min, 'F')} … {format_value(c_max, 'F')}")
    if topology == "classic" and d_hi < 0.5:
        return (f"duty: {100 * d_t:.4g} % is out of reach — classic topology cannot give duty below 50 %: t_high "
                "includes rb (the capacitor charges through ra + rb and discharges through rb only); use the "
                "'bypass' or 'steered' topology")
    head = f"no combination of {space} meets the target ({target})"
    if not math.isfinite(search.closest_score):
        fam = a["fam"]
        r_bias = _BIAS_SHARE * (a["vcc"] - a["vd"] - a["v_up"]) / fam.i_threshold_max
        r_pin = (a["vcc"] - a["vsat"]) / fam.i_discharge_max
        return (f"{head}: every combination breaks a design rule at vcc = {a['vcc']:g} V — the threshold "
                f"bias current ({format_value(fam.i_threshold_max, 'A')} max) allows a charge resistance up to "
                f"about {format_value(r_bias, 'Ω')}, the discharge-pin current "
                f"({format_value(fam.i_discharge_max, 'A')}) needs ra above about {format_value(r_pin, 'Ω')}; "
                "widen r_min … r_max")
    idx = np.unravel_index(search.closest_index, shape)
    kw: dict[str, Any] = {"ra": float(r_vals[idx[0]]), "rb": float(r_vals[idx[1]]), "c": float(c_vals[idx[-1]])}
    if topology == "pot":
        kw.update(pot=float(pots[idx[2]]))
        e0 = astable(topology, vcc=a["vcc"], timer=a["fam"], wiper=0.0, **kw, **extras)
        e1 = astable(topology, vcc=a["vcc"], timer=a["fam"], wiper=1.0, **kw, **extras)
        got = (f"f {e0.frequency:.5g} … {e1.frequency:.5g} Hz, duty range {100 * e0.duty:.4g} … "
               f"{100 * e1.duty:.4g} %")
    else:
        e = astable(topology, vcc=a["vcc"], timer=a["fam"], **kw, **extras)
        got = f"f {e.frequency:.5g} Hz, duty {100 * e.duty:.4g} %"
    parts = ", ".join(f"{k} {format_value(v, 'F' if k == 'c' else 'Ω')}" for k, v in kw.items())
    why = ""
    if topology == "pot":
        why = (" (a wide duty range needs end resistors ra, rb that are small next to the pot; r_min and the "
               "discharge-pin current rule bound them from below, and the pot and capacitor values are coarse)")
    return f"{head}; closest: {parts} → {got}{why}. Widen the tolerances, the value ranges or the series"
