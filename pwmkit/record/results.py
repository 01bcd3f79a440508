"""Recorded results: key figures stored in a notebook's saved outputs, compared on a re-run.

A design notebook calls :func:`record_results` in a cell. The call displays a small JSON
document under the MIME type :data:`RESULTS_MIME` (plus a one-line ``text/plain`` summary);
Jupyter keeps it in the cell's outputs when the notebook is saved. ``pwmkit rerun`` reads those
recorded figures from the saved file, executes a copy of the notebook, reads the fresh figures
and reports every key that drifted (:func:`compare_results`).

Payload (``application/vnd.pwmkit.results+json``)::

    {"format": "pwmkit-results", "version": 1, "name": "grow-bar",
     "pwmkit": "0.1.0", "results": {"timing.frequency": 5624.4, "findings.worst": "ok", ...}}

Values are numbers or text; the keys are the flat dotted names of
:meth:`pwmkit.evaluate.Evaluation.key_results`.
"""

from __future__ import annotations

import json
import math
from collections.abc import Iterable, Mapping
from dataclasses import dataclass
from typing import Any

from ..errors import DesignError

__all__ = ["RESULTS_MIME", "PAYLOAD_FORMAT", "record_results", "results_payload", "payloads_in_notebook",
           "read_recorded", "compare_results", "Drift"]

#: MIME type of the recorded-results payload.
RESULTS_MIME = "application/vnd.pwmkit.results+json"
PAYLOAD_FORMAT = "pwmkit-results"
_MAX_KEYS = 10_000
_MAX_TEXT = 10_000


def _clean_results(results: Mapping[str, Any]) -> dict[str, float | str | bool | None]:
    out: dict[str, float | str | bool | None] = {}
    if len(results) > _MAX_KEYS:
        raise DesignError(f"results: {len(results)} keys is too many; allowed up to {_MAX_KEYS}")
    for key, value in results.items():
        if not isinstance(key, str) or not key:
            raise DesignError(f"results: key {key!r} is not a non-empty text")
        if value is None or isinstance(value, (bool, str)):
            if isinstance(value, str) and len(value) > _MAX_TEXT:
                raise DesignError(f"results.{key}: text of {len(value)} characters is too long")
            out[key] = value
            continue
        try:
            number = float(value)
        except (TypeError, ValueError):
            raise DesignError(f"results.{key}: {type(value).__name__} is not a number or text") from None
        if not math.isfinite(number):
            # keep non-finite numbers visible, as text (JSON has no inf/NaN)
            out[key] = repr(number)
        else:
            out[key] = number
    return out


def results_payload(results: Any, *, name: str = "design") -> dict[str, Any]:
    """The JSON payload for an evaluation (anything with ``key_results()``) or a plain dict.

    Raises
    ------
    DesignError
        Not an evaluation or mapping; keys that are not text; values that are not numbers/text.
    """
    import pwmkit

    if not isinstance(name, str) or not name.strip() or len(name) > 200:
        raise DesignError(f"name: {name!r} is not allowed; give 1–200 characters")
    if hasattr(results, "key_results"):
        data = results.key_results()
    elif isinstance(results, Mapping):
        data = results
    else:
        raise DesignError(f"results: expected an Evaluation (with key_results()) or a dict, got "
                          f"{type(results).__name__}")
    return {"format": PAYLOAD_FORMAT, "version": 1, "name": name, "pwmkit": pwmkit.__version__,
            "results": _clean_results(data)}


def record_results(results: Any, *, name: str = "design") -> None:
    """Display the key results so that the saved notebook records them (for ``pwmkit rerun``).

    Parameters
    ----------
    results : pwmkit.evaluate.Evaluation or dict
        An evaluation (its :meth:`key_results` are recorded) or a mapping of flat names to
        numbers/text.
    name : str
        Which design these results belong to (one notebook may record several).

    Notes
    -----
    Outside IPython the one-line summary is printed instead.
    """
    payload = results_payload(results, name=name)
    n = len(payload["results"])
    text = f"pwmkit: recorded {n} key result{'s' if n != 1 else ''} of {name!r} (checked by `pwmkit rerun`)"
    try:
        from IPython import get_ipython
        from IPython.display import display
    except ImportError:  # pragma: no cover - IPython comes with the lab extra
        print(text)
        return
    if get_ipython() is None:
        print(text)
        return
    display({RESULTS_MIME: payload, "text/plain": text}, raw=True)


def _payload_ok(data: Any) -> bool:
    return (isinstance(data, dict) and data.get("format") == PAYLOAD_FORMAT and isinstance(data.get("name"), str)
            and isinstance(data.get("results"), dict))


def payloads_in_notebook(nb: Any) -> dict[str, dict[str, Any]]:
    """Recorded results found in a notebook's outputs: design name → results (last one wins).

    ``nb`` is an nbformat notebook node (or the equivalent dict). Payloads that are not well formed
    raise :class:`DesignError`; outputs of other MIME types are ignored.
    """
    found: dict[str, dict[str, Any]] = {}
    cells = nb.get("cells", []) if isinstance(nb, Mapping) else []
    for index, cell in enumerate(cells):
        if not isinstance(cell, Mapping) or cell.get("cell_type") != "code":
            continue
        for output in cell.get("outputs", []) or []:
            if not isinstance(output, Mapping):
                continue
            data = output.get("data")
            if not isinstance(data, Mapping) or RESULTS_MIME not in data:
                continue
            raw = data[RESULTS_MIME]
            if isinstance(raw, str):  # some writers store JSON as text
                try:
                    raw = json.loads(raw)
                except ValueError:
                    raise DesignError(f"cell {index + 1}: the recorded results are not valid JSON") from None
            if not _payload_ok(raw):
                raise DesignError(f"cell {index + 1}: the recorded results are not a {PAYLOAD_FORMAT} payload")
            found[raw["name"]] = _clean_results(raw["results"])
    return found


def read_recorded(path: Any) -> dict[str, dict[str, Any]]:
    """Recorded results of a saved notebook file (design name → results)."""
    from pathlib import Path

    import nbformat

    p = Path(path)
    from .files import read_limited

    data = read_limited(p, limit=256 << 20, what="notebook")
    try:
        nb = nbformat.reads(data.decode("utf-8"), as_version=4)
    except (ValueError, UnicodeDecodeError) as exc:
        raise DesignError(f"{p}: not a readable notebook ({exc})") from None
    try:
        return payloads_in_notebook(nb)
    except DesignError as exc:
        raise DesignError(f"{p}: {exc}") from None


@dataclass(frozen=True)
class Drift:
    """One difference between recorded and fresh results.

    Attributes
    ----------
    name : design name the results belong to
    key : flat result name ("" for a whole design that is missing or new)
    kind : "changed", "missing" (recorded, not produced now) or "new" (produced now, not recorded)
    recorded, fresh : the two values (None where absent)
    rel : relative difference of numbers (None otherwise)
    """

    name: str
    key: str
    kind: str
    recorded: Any
    fresh: Any
    rel: float | None = None

    def describe(self) -> str:
        where = f"[{self.name}] {self.key}" if self.key else f"[{self.name}]"
        if self.kind == "missing":
            return f"{where}: recorded {_show(self.recorded)}, not produced any more"
        if self.kind == "new":
            return f"{where}: new result {_show(self.fresh)}, not recorded"
        rel = f" (relative change {self.rel:+.3g})" if self.rel is not None else ""
        return f"{where}: recorded {_show(self.recorded)}, now {_show(self.fresh)}{rel}"


def _show(value: Any) -> str:
    if isinstance(value, dict):
        return f"{len(value)} results"
    if isinstance(value, float):
        return f"{value:.10g}"
    return repr(value)


def _is_number(v: Any) -> bool:
    return isinstance(v, (int, float)) and not isinstance(v, bool)


def compare_results(recorded: Mapping[str, Mapping[str, Any]], fresh: Mapping[str, Mapping[str, Any]], *,
                    rtol: float = 1e-6, atol: float = 0.0) -> list[Drift]:
    """Every difference between recorded and fresh results (design name → key → value).

    Numbers agree when ``|a − b| ≤ rtol·max(|a|, |b|) + atol``; text and true/false must be equal;
    a key present on one side only is reported as ``missing`` or ``new``.
    """
    if not (math.isfinite(rtol) and rtol >= 0) or not (math.isfinite(atol) and atol >= 0):
        raise DesignError(f"rtol, atol: {rtol!r}, {atol!r} are not allowed; give finite numbers >= 0")
    drifts: list[Drift] = []
    for name in _ordered(recorded, fresh):
        if name not in fresh:
            drifts.append(Drift(name, "", "missing", dict(recorded[name]), None))
            continue
        if name not in recorded:
            drifts.append(Drift(name, "", "new", None, dict(fresh[name])))
            continue
        rec, now = recorded[name], fresh[name]
        for key in _ordered(rec, now):
            if key not in now:
                drifts.append(Drift(name, key, "missing", rec[key], None))
            elif key not in rec:
                drifts.append(Drift(name, key, "new", None, now[key]))
            else:
                a, b = rec[key], now[key]
                if _is_number(a) and _is_number(b):
                    fa, fb = float(a), float(b)
                    if abs(fa - fb) > rtol * max(abs(fa), abs(fb)) + atol:
                        scale = max(abs(fa), abs(fb))
                        drifts.append(Drift(name, key, "changed", a, b, (fb - fa) / abs(fa) if fa else
                                            (math.copysign(math.inf, fb) if scale else 0.0)))
                elif a != b or type(a) is not type(b):  # text, true/false, or a number that became text
                    drifts.append(Drift(name, key, "changed", a, b))
    return drifts


def _ordered(a: Iterable[str], b: Iterable[str]) -> list[str]:
    seen: dict[str, None] = {}
    for k in list(a) + list(b):
        seen.setdefault(k, None)
    return list(seen)
