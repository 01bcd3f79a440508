"""One number-formatting rule per quantity kind: 4 significant figures on screen, full precision in exports.

Every view formats a number through :func:`screen` with the *kind* of the quantity, so a duty reads
the same in the dashboard, the report and the command line:

=========================  ==========================================  ==================
kind                       rule                                        example
=========================  ==========================================  ==================
SI unit ("s", "Hz", "V" …)  engineering prefix, 4 significant figures   ``5.624 kHz``
``"duty"``, ``"wiper"``    fraction shown in percent, 4 sig. figures   ``49.13 %``
``"%"``                    value already in percent, 4 sig. figures    ``15.79 %``
``"relative"``             fraction as a signed percent, 3 sig. fig.   ``-12.5 %``
``"points"``               difference of two fractions, signed, in     ``-0.871 pt``
                           percentage points, 3 sig. figures
``"°C"``, ``"K"``          plain with 3 significant figures            ``45.1 °C``
``"ratio"``                plain with 3 significant figures and ×      ``2.05 ×``
``"count"``                whole number with thin grouping             ``20 000``
=========================  ==========================================  ==================

Exports (design files, JSON, Python/C formula sheets) keep full precision with :func:`export`
(``repr`` of the float: 17 significant digits round-trip exactly).
"""

from __future__ import annotations

import math
from typing import Any

__all__ = ["SCREEN_DIGITS", "screen", "export", "screen_range", "KINDS"]

#: Significant figures on screen.
SCREEN_DIGITS = 4
_DASH = "—"
#: Kinds that are not SI units.
KINDS = ("duty", "wiper", "%", "relative", "points", "°C", "K", "ratio", "count", "rpm")


def _finite(x: Any) -> float | None:
    try:
        v = float(x)
    except (TypeError, ValueError):
        return None
    return v if math.isfinite(v) else None


def _sig(v: float, digits: int) -> str:
    """``v`` with ``digits`` significant figures, no exponent for everyday magnitudes, no trailing zeros."""
    if v == 0:
        return "0"
    text = f"{v:.{digits}g}"
    if "e" in text:
        mantissa, exp = text.split("e")
        e = int(exp)
        if -4 <= e < digits + 2:
            decimals = max(0, digits - 1 - e)
            text = f"{v:.{decimals}f}"
    if "." in text and "e" not in text:
        text = text.rstrip("0").rstrip(".")
    return text


def screen(x: Any, kind: str, digits: int | None = None) -> str:
    """Screen text of a number of the given kind (an em dash for None or non-finite values).

    Parameters
    ----------
    x : float
        The value in SI units; a fraction for "duty", "wiper", "relative" and "points" [1].
    kind : str
        An SI unit symbol ("s", "Hz", "V", "A", "W", "Ω", "F", "H", "J") or one of :data:`KINDS`.
    digits : int, optional
        Significant figures (default :data:`SCREEN_DIGITS`; 3 for relative/points/°C/ratio).

    Examples
    --------
    >>> screen(5624.369, "Hz"), screen(0.49129, "duty"), screen(-0.00871, "points")
    ('5.624 kHz', '49.13 %', '-0.871 pt')
    >>> screen(-0.1252, "relative"), screen(45.119, "°C"), screen(20000, "count"), screen(None, "V")
    ('-12.5 %', '45.1 °C', '20 000', '—')
    >>> screen(0.0004988, "%"), screen(0.5, "wiper")
    ('< 0.001 %', '50 %')
    """
    v = _finite(x)
    if v is None:
        return _DASH
    if kind in ("duty", "wiper", "%"):
        pct = 100.0 * v if kind != "%" else v
        if 0 < abs(pct) < 0.001:  # below a thousandth of a percent the digits say nothing on screen
            return f"{'-' if pct < 0 else ''}< 0.001 %"
        return f"{_sig(pct, digits or SCREEN_DIGITS)} %"
    if kind == "relative":
        text = _sig(100.0 * v, digits or 3)
        return f"{'+' if v > 0 else ''}{text} %"
    if kind == "points":
        text = _sig(100.0 * v, digits or 3)
        return f"{'+' if v > 0 else ''}{text} pt"
    if kind in ("°C", "K"):
        return f"{_sig(v, digits or 3)} {kind}"
    if kind == "ratio":
        return f"{_sig(v, digits or 3)} ×"
    if kind == "rpm":
        return f"{_sig(v, digits or SCREEN_DIGITS)} rpm"
    if kind == "count":
        return f"{int(round(v)):,}".replace(",", " ")
    from .values import format_value

    return format_value(v, kind, digits or SCREEN_DIGITS)


def screen_range(lo: Any, hi: Any, kind: str, digits: int | None = None) -> str:
    """``"5.1 … 7.2 kHz"``-style range text: both ends with the same rule.

    >>> screen_range(0.05, 0.95, "duty")
    '5 % … 95 %'
    """
    return f"{screen(lo, kind, digits)} … {screen(hi, kind, digits)}"


def export(x: Any) -> str:
    """Full-precision text of a number for files and code (``repr`` of the float; "nan" never written).

    >>> export(0.6051752331410428), export(2.2e-9)
    ('0.6051752331410428', '2.2e-09')
    """
    v = _finite(x)
    if v is None:
        raise ValueError(f"export: {x!r} is not a finite number")
    return repr(v)
