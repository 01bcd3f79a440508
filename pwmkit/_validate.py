"""Conversion and checking of inputs at the public edge (internal helper).

Every public model function funnels its numeric arguments through
:func:`quantity`, so that engineering strings, floats and numpy arrays are
accepted uniformly and bad input becomes a :class:`~pwmkit.errors.DesignError`
that names the parameter, the value and the allowed range.
"""

from __future__ import annotations

import math
from typing import Any

import numpy as np

from .errors import DesignError

__all__ = ["quantity", "scalar", "is_scalar_input"]


def _describe(value: Any) -> str:
    if isinstance(value, np.ndarray):
        return f"array of shape {value.shape}"
    text = repr(value)
    return text if len(text) <= 60 else text[:57] + "..."


def quantity(
    value: Any,
    name: str,
    *,
    unit: str = "",
    minimum: float | None = None,
    maximum: float | None = None,
    min_inclusive: bool = True,
    max_inclusive: bool = True,
    allowed: str | None = None,
) -> float | np.ndarray:
    """Turn a float, an engineering string or an array into float(s) and check the range.

    Parameters
    ----------
    value : float, str or array_like
        The input. Strings go through :func:`pwmkit.values.parse_value`.
    name : str
        Parameter name used in error messages.
    unit : str
        Unit symbol used in error messages.
    minimum, maximum : float, optional
        Allowed range; ``min_inclusive``/``max_inclusive`` choose the bounds' kind.
    allowed : str, optional
        The range as the message should state it (e.g. ``"1 Ω ≤ ra ≤ 1 GΩ"``, from
        :mod:`pwmkit.ranges`); default: the violated bound.

    Returns
    -------
    float or numpy.ndarray
        A Python float for scalar input, a float64 array otherwise.

    Raises
    ------
    DesignError
        Text that does not parse or carries another unit, non-finite numbers, booleans (also
        boolean arrays), or values out of range.
    """
    if isinstance(value, bool) or value is None:
        raise DesignError(f"{name}: {_describe(value)} is not a number; give a value in {unit or 'SI units'}")
    if isinstance(value, str):
        from .values import parse_value

        try:
            arr: Any = parse_value(value, unit, name=name)
        except DesignError as exc:
            msg = str(exc)
            raise DesignError(msg if msg.startswith(name) else f"{name}: {msg}") from None
    elif isinstance(value, (int, float, np.integer, np.floating)) and not isinstance(value, np.bool_):
        try:
            arr = float(value)
        except OverflowError:
            raise DesignError(f"{name}: a number of about {int(int(value).bit_length() * 0.30103) + 1} digits is far out of range; give "
                              f"a value in {unit or 'SI units'}") from None
    else:
        try:
            if isinstance(value, (list, tuple)) and any(isinstance(v, str) for v in value):
                from .values import parse_value

                value = [parse_value(v, unit, name=name) if isinstance(v, str) else v for v in value]
            raw = np.asarray(value)
            if isinstance(value, (list, tuple)) and raw.dtype.kind not in "bc":  # [True, 1.0] becomes floats
                if any(isinstance(v, (bool, np.bool_)) for v in np.asarray(value, dtype=object).ravel()):
                    raw = np.asarray(value, dtype=object)
            if raw.dtype.kind in "bc" or raw.dtype == object and any(isinstance(v, (bool, np.bool_)) for v in raw.flat):
                what = "true/false values" if raw.dtype.kind in "bO" else "complex numbers"
                raise DesignError(f"{name}: {_describe(value)} holds {what}; give numbers in {unit or 'SI units'}")
            arr = np.asarray(raw, dtype=float)
        except (TypeError, ValueError, OverflowError) as exc:
            if isinstance(exc, DesignError):
                raise
            raise DesignError(f"{name}: {_describe(value)} is not a number or array of numbers ({exc})") from None
        if arr.ndim == 0:
            arr = float(arr)
    if isinstance(arr, float):  # a scalar: no numpy round trip
        lowest = highest = arr
        size = 1
    else:
        a = np.asarray(arr)
        size = a.size
        # two reductions (min and max propagate NaN and show ±inf, so both finite means every
        # element is finite); the element-wise masks are built only to report an error
        lowest, highest = (float(a.min()), float(a.max())) if size else (0.0, 0.0)
    if not (math.isfinite(lowest) and math.isfinite(highest)):
        first = arr if isinstance(arr, float) else float(a.ravel()[np.argmax(~np.isfinite(a).ravel())])
        raise DesignError(f"{name}: {first!r} is not a finite number; give a finite value in {unit or 'SI units'}")
    u = f" {unit}" if unit else ""
    if minimum is not None and size and (lowest < minimum or (not min_inclusive and lowest <= minimum)):
        rel = ">=" if min_inclusive else ">"
        raise DesignError(f"{name}: {lowest:g}{u} is out of range; allowed {allowed or f'{name} {rel} {minimum:g}{u}'}")
    if maximum is not None and size and (highest > maximum or (not max_inclusive and highest >= maximum)):
        rel = "<=" if max_inclusive else "<"
        raise DesignError(f"{name}: {highest:g}{u} is out of range; allowed {allowed or f'{name} {rel} {maximum:g}{u}'}")
    return arr


def is_scalar_input(*values: Any) -> bool:
    """True when every value is a Python/numpy scalar (so results should be floats)."""
    return all(np.ndim(v) == 0 for v in values)


def scalar(x: Any) -> Any:
    """Return a Python float for 0-d input, else the array unchanged."""
    if np.ndim(x) == 0:
        v = float(x)
        if not math.isfinite(v):  # pragma: no cover - guarded by callers
            raise DesignError(f"internal: non-finite result {v!r}")
        return v
    return x
