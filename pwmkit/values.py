"""Strict reading and writing of component values in engineering notation.

Grammar accepted by :func:`parse_value` (leading/trailing blanks are ignored; each form is one
regular expression matched against the *whole* text, nothing is ever evaluated)::

    sign     := "+" | "-"
    digits   := "0".."9" { "0".."9" }
    decimal  := digits [ "." { digit } ] | "." digits
    exponent := ("e" | "E") [ sign ] digits
    prefix   := "f" | "p" | "n" | "u" | "µ" | "μ" | "m" | "k" | "K" | "M" | "G" | "T"
    unit     := "Ω" | "Ω" | "ohm" | "ohms" | "Ohm" | "Ohms" | "F" | "V" | "A" | "Hz" | "s" | "W" | "H"
    gap      := at most one blank (space, no-break space or narrow no-break space)

    scientific := [ sign ] decimal exponent [ gap unit ]                 "4.7e3", "1e-7 F"
    prefixed   := [ sign ] decimal [ gap ] [ prefix ] [ unit ]           "4700", "4.7 kΩ", "100nF", "12 V"
    rkm        := [ sign ] { digit } letter { digit } [ gap ] [ unit ]   "4k7", "R47", "470R", "p68", "1µ0"
    letter     := "L" (1e-3) | "R" (1) | "k" | "K" (1e3) | "M" (1e6) | "G" (1e9) | "T" (1e12)
                | "p" (1e-12) | "n" (1e-9) | "u" | "µ" | "μ" (1e-6) | "m" (1e-3) | "F" (1)

In the RKM (letter-and-digit) code of IEC 60062 the multiplier letter takes the place of the decimal
point, and at least one digit must be present.  Case matters where the trade makes it matter:
``"1M"`` is mega, ``"1m"`` is milli, ``"f"`` is femto and ``"F"`` is farad, ``"1H"`` is one henry.
A prefix is not combined with an exponent (``"1e3k"`` is refused), and a prefix needs a number
(``"k"`` and ``"R"`` alone are refused).  Results must be finite: ``"1e999"`` is refused.

Both micro signs are accepted (U+00B5 MICRO SIGN and U+03BC GREEK SMALL LETTER MU), as are both
ohm signs (U+03A9 GREEK CAPITAL LETTER OMEGA and U+2126 OHM SIGN); :func:`format_value` writes
U+00B5 and whatever unit text it is given.

The PyPI package *quantiphy* reads SI-prefixed quantities well, but it does not read IEC 60062 RKM
codes such as ``"4k7"`` or ``"R47"`` and is more lenient than a design tool's input edge should be,
so this module keeps a few small regular expressions instead of adding a dependency.

References
----------
IEC 60062:2016+A1:2019, *Marking codes for resistors and capacitors* (RKM code, tolerance letters).
BIPM, *The International System of Units (SI)*, 9th ed. 2019, §3 (SI prefixes).
"""

from __future__ import annotations

import math
import re
from decimal import Decimal
from typing import Any, Literal

import numpy as np

from .errors import DesignError

__all__ = ["parse_value", "format_value", "format_rkm", "parse_tolerance", "UNIT_SPELLINGS"]

_MICRO = "µ"  # U+00B5, the one format_value writes

_PREFIX_EXP = {
    "f": -15,
    "p": -12,
    "n": -9,
    "u": -6,
    "\u00b5": -6,
    "\u03bc": -6,
    "m": -3,
    "k": 3,
    "K": 3,
    "M": 6,
    "G": 9,
    "T": 12,
}
_RKM_EXP = {
    "L": -3,
    "R": 0,
    "k": 3,
    "K": 3,
    "M": 6,
    "G": 9,
    "T": 12,
    "p": -12,
    "n": -9,
    "u": -6,
    "\u00b5": -6,
    "\u03bc": -6,
    "m": -3,
    "F": 0,
}

_SIGN = r"(?P<sign>[+-])?"
_DECIMAL = r"(?P<num>[0-9]+(?:\.[0-9]*)?|\.[0-9]+)"
_GAP = "[ \u00a0\u202f]?"
_UNIT = r"(?P<unit>\u03a9|\u2126|[Oo]hms?|Hz|F|V|A|s|W|H|\u00b0C|\u2103|%)"
_PREFIX = "(?P<prefix>[fpnu\u00b5\u03bcmkKMGT])"

_SCIENTIFIC_RE = re.compile(_SIGN + _DECIMAL + r"(?P<exp>[eE][+-]?[0-9]+)" + f"(?:{_GAP}{_UNIT})?")
_PREFIXED_RE = re.compile(_SIGN + _DECIMAL + f"(?:{_GAP}{_PREFIX}?{_UNIT}?)")
_RKM_RE = re.compile(
    _SIGN + r"(?P<int>[0-9]*)(?P<letter>[LRkKMGTpnu\u00b5\u03bcmF])(?P<frac>[0-9]*)" + f"(?:{_GAP}{_UNIT}?)"
)

_ALLOWED = (
    "a number such as 4700, 4.7e3 or -1.5; a number with an SI prefix (f p n u µ m k K M G T) such as "
    "4.7k or 100n; or an IEC 60062 code such as 4k7, R47, 470R, 4n7 or p68; optionally followed by a "
    "unit (Ω, ohm, F, V, A, Hz, s, W, H, °C, %)"
)

#: Unit symbol of a quantity → the spellings that mean it (U+03A9 and U+2126 are both ohm signs).
UNIT_SPELLINGS: dict[str, tuple[str, ...]] = {
    "Ω": ("\u03a9", "\u2126", "ohm", "ohms", "Ohm", "Ohms"),
    "F": ("F",), "V": ("V",), "A": ("A",), "Hz": ("Hz",), "s": ("s",), "W": ("W",), "H": ("H",),
    "°C": ("\u00b0C", "\u2103"),
    "%": ("%",), "": ("%",),
}
_UNIT_OF = {spelling: unit for unit, spellings in UNIT_SPELLINGS.items() if unit for spelling in spellings}
#: RKM letters that carry a unit of their own (IEC 60062: R for ohm, F for farad).
_RKM_UNIT = {"R": "Ω", "F": "F"}
_UNIT_NAMES = {"Ω": "Ω (ohm)", "F": "F (farad)", "V": "V (volt)", "A": "A (ampere)", "Hz": "Hz (hertz)",
               "s": "s (second)", "W": "W (watt)", "H": "H (henry)", "°C": "°C", "%": "% or a fraction",
               "": "a plain number (no unit)"}
_MAX_TEXT = 100


def _quote(value: Any) -> str:
    text = repr(value)
    return text if len(text) <= 60 else text[:57] + "..."


def _finite(value: float, text: Any, what: str = "value", allowed: str = _ALLOWED) -> float:
    if not math.isfinite(value):
        raise DesignError(f"{what} {_quote(text)} is not a finite number; allowed: {allowed}")
    return value


def _number_in(value: Any, what: str, allowed: str = _ALLOWED) -> float:
    """A Python/numpy real number (not bool) as a finite float, else DesignError."""
    if isinstance(value, (bool, np.bool_)) or not isinstance(value, (int, float, np.integer, np.floating)):
        raise DesignError(f"{what} {_quote(value)} is not a number; allowed: {allowed}")
    try:
        number = float(value)
    except OverflowError:
        raise DesignError(
            f"{what} {_quote(value)} is too large to be a finite number; allowed: {allowed}"
        ) from None
    return _finite(number, value, what, allowed)


def _what(name: str) -> str:
    return "value" if name == "value" else f"{name}: value"


def _check_unit(written: str | None, unit: str | None, text: Any, name: str) -> float:
    """The scale of the written unit (0.01 for %, else 1) once it is allowed for ``unit``."""
    if written is None or unit is None:
        return 0.01 if written == "%" else 1.0
    allowed = UNIT_SPELLINGS.get(unit, ())
    if written not in allowed:
        kind = _UNIT_OF.get(written, written)
        expected = _UNIT_NAMES.get(unit, f"{unit} (write the number without a unit)")
        raise DesignError(f"{_what(name)} {_quote(text)} is given in {kind}, but {name} takes {expected}; "
                          f"write e.g. '4.7k'" + (f" or '4.7 k{unit}'" if unit in _UNIT_NAMES and unit not in ("", "%")
                                                  else ""))
    return 0.01 if written == "%" else 1.0


def parse_value(text: Any, unit: str | None = None, *, name: str = "value") -> float:
    """Read a component value written in engineering notation.

    Accepts plain numbers, SI prefixes, IEC 60062 RKM codes and an optional unit (grammar in the
    module docstring).  Python ``int``/``float`` are passed through as floats; ``bool`` is refused.

    Parameters
    ----------
    text : str or float
        The value as typed, e.g. ``"4k7"``, ``"100 nF"``, ``"20 kHz"``, ``4700``.
    unit : str, optional
        The unit of the quantity being read (``"Ω"``, ``"F"``, ``"V"``, ``"Hz"``, ``"H"``, ``"A"``,
        ``"W"``, ``"s"``, ``"°C"``, ``"%"`` or ``""`` for a fraction). A unit written in the text must
        be one of its spellings (``Ω``, ``ohm``, ``ohms``, an RKM ``R`` for ohm), else
        :class:`DesignError`; ``"50 %"`` reads as 0.5. Any other unit (e.g. ``"K/W"``) takes plain or
        prefixed numbers only. None (default) accepts any unit and does not check it.
    name : str
        Field name used in error messages.

    Returns
    -------
    float
        The value in the SI base unit [unit]; a per cent sign divides by 100.

    Raises
    ------
    DesignError
        For anything outside the grammar, text longer than 100 characters, non-finite results, and
        non-text, non-number input;
        the message quotes the text and says what is allowed.

    Notes
    -----
    No range check is done here (``"-1.5"`` is read as -1.5): ranges belong to the caller, normally
    through :func:`pwmkit._validate.quantity` and :mod:`pwmkit.ranges`.  Give ``unit`` to refuse a
    unit slip: ``parse_value("10 kF", "Ω", name="ra")`` raises instead of returning 10000.0.

    Examples
    --------
    >>> parse_value("4k7"), parse_value("100 nF"), parse_value("R47"), parse_value("1M"), parse_value("1m")
    (4700.0, 1e-07, 0.47, 1000000.0, 0.001)
    >>> parse_value("4.7 kohm", "Ω"), parse_value("25 %", "%")
    (4700.0, 0.25)

    References
    ----------
    IEC 60062:2016+A1:2019, *Marking codes for resistors and capacitors*, RKM code.
    """
    if not isinstance(text, str):
        return _number_in(text, name)
    stripped = text.strip()
    if not stripped or len(stripped) > _MAX_TEXT:
        raise DesignError(f"{_what(name)} {_quote(text)} cannot be read; allowed: {_ALLOWED}")

    match = _SCIENTIFIC_RE.fullmatch(stripped)
    if match:
        scale = _check_unit(match["unit"], unit, text, name)
        literal = (match["sign"] or "") + match["num"] + match["exp"]
        return _finite(float(literal) * scale, text, _what(name))

    match = _PREFIXED_RE.fullmatch(stripped)
    if match:
        scale = _check_unit(match["unit"], unit, text, name)
        exp = _PREFIX_EXP[match["prefix"]] if match["prefix"] else 0
        if scale != 1.0:
            exp -= 2
        # Build a decimal literal and let float() round once: "2.2µ" -> float("2.2e-6"), no binary noise.
        literal = f"{match['sign'] or ''}{match['num']}e{exp}"
        return _finite(float(literal), text, _what(name))

    match = _RKM_RE.fullmatch(stripped)
    if match and (match["int"] or match["frac"]):
        implied = _RKM_UNIT.get(match["letter"])
        if implied is not None and match["unit"] is None:
            _check_unit(UNIT_SPELLINGS[implied][0], unit, text, name)
        scale = _check_unit(match["unit"], unit, text, name)
        exp = _RKM_EXP[match["letter"]] + (-2 if scale != 1.0 else 0)
        literal = f"{match['sign'] or ''}{match['int'] or '0'}.{match['frac'] or '0'}e{exp}"
        return _finite(float(literal), text, _what(name))

    raise DesignError(f"{_what(name)} {_quote(text)} cannot be read; allowed: {_ALLOWED}")


_FORMAT_PREFIXES = {-15: "f", -12: "p", -9: "n", -6: _MICRO, -3: "m", 0: "", 3: "k", 6: "M", 9: "G", 12: "T"}


def _plain(d: Decimal) -> str:
    """Fixed-point text of a Decimal without trailing zeros ('1.50' -> '1.5', '100' -> '100')."""
    text = format(d, "f")
    if "." in text:
        text = text.rstrip("0").rstrip(".")
    return text


def format_value(x: Any, unit: str = "", digits: int = 3) -> str:
    """Write a value in engineering notation with an SI prefix.

    The value is rounded to ``digits`` significant digits first, then the exponent is brought to a
    multiple of three and written as a prefix, so rounding across a prefix boundary comes out right
    (999.96 → ``"1 k"``).  Trailing zeros are dropped.

    Parameters
    ----------
    x : float
        The value [SI unit].
    unit : str
        Unit symbol appended after the prefix, e.g. ``"Ω"``, ``"F"``, ``"Hz"``.
    digits : int
        Significant digits, at least 1.

    Returns
    -------
    str
        E.g. ``"4.7 kΩ"``; ``"0"`` (or ``"0 Ω"``) for zero.  Outside f…T (1e-15 … 1e15) the value is
        written as ``"1e-18 F"`` so that :func:`parse_value` can read it back.

    Raises
    ------
    DesignError
        For non-finite or non-numeric ``x``, a non-text ``unit`` or ``digits`` < 1.

    Examples
    --------
    >>> format_value(4700, "Ω"), format_value(1e-7, "F"), format_value(480.898, "Hz"), format_value(999.96)
    ('4.7 kΩ', '100 nF', '481 Hz', '1 k')
    """
    value = _number_in(x, "value to format", "a finite int or float")
    if not isinstance(unit, str):
        raise DesignError(f"unit {_quote(unit)} must be text such as 'Ω' or 'Hz'")
    if isinstance(digits, bool) or not isinstance(digits, (int, np.integer)) or digits < 1:
        raise DesignError(f"digits {_quote(digits)} must be a whole number >= 1")
    if value == 0.0:
        return f"0 {unit}" if unit else "0"
    sign = "-" if value < 0 else ""
    rounded = f"{abs(value):.{int(digits) - 1}e}"  # correctly rounded: '9.9996e2' -> '1.00e+03'
    exponent = int(rounded.split("e")[1])
    eng = exponent - exponent % 3
    if eng in _FORMAT_PREFIXES:
        mantissa = _plain(Decimal(rounded).scaleb(-eng))
        prefix = _FORMAT_PREFIXES[eng]
        tail = f" {prefix}{unit}" if (prefix or unit) else ""
        return f"{sign}{mantissa}{tail}"
    mantissa = _plain(Decimal(rounded).scaleb(-exponent))
    return f"{sign}{mantissa}e{exponent}" + (f" {unit}" if unit else "")


_RKM_LETTERS = {
    "resistor": {0: "R", 3: "K", 6: "M", 9: "G", 12: "T"},
    "capacitor": {-12: "p", -9: "n", -6: _MICRO, -3: "m", 0: "F"},
}


def format_rkm(x: Any, kind: Literal["resistor", "capacitor"] = "resistor") -> str:
    """Write a resistance or capacitance as an IEC 60062 letter-and-digit (RKM) code.

    The value is rounded to 3 significant digits; the multiplier letter takes the place of the
    decimal point.  Resistors use R K M G T, capacitors p n µ m F.  A single-digit code gets a
    trailing 0 (``"1K0"``, ``"1µ0"``, as in the standard's example ``1µ0``).

    Parameters
    ----------
    x : float
        Resistance [Ω] or capacitance [F], positive and finite.
    kind : {"resistor", "capacitor"}
        Which letter set to use.

    Returns
    -------
    str
        E.g. ``"4K7"``, ``"R47"``, ``"470R"``, ``"4n7"``, ``"100n"``, ``"p68"``.

    Raises
    ------
    DesignError
        For non-positive or non-finite ``x``, values of 1000 T Ω / 1000 F and above, or an unknown
        ``kind``.

    Examples
    --------
    >>> format_rkm(4700), format_rkm(0.47), format_rkm(470), format_rkm(4.7e-9, "capacitor")
    ('4K7', 'R47', '470R', '4n7')

    References
    ----------
    IEC 60062:2016+A1:2019, *Marking codes for resistors and capacitors*, RKM code.
    """
    if kind not in _RKM_LETTERS:
        raise DesignError(f"kind {_quote(kind)} is not known; allowed: 'resistor', 'capacitor'")
    value = _number_in(x, kind, f"a positive finite {kind} value in SI units")
    if value <= 0.0:
        raise DesignError(f"{kind} value {value!r} must be > 0 for a marking code")
    letters = _RKM_LETTERS[kind]
    rounded = f"{value:.2e}"
    exponent = int(rounded.split("e")[1])
    eng = min(max(exponent - exponent % 3, min(letters)), max(letters))
    mantissa = Decimal(rounded).scaleb(-eng)
    if mantissa >= 1000:
        top = 1000 * 10 ** max(letters)
        raise DesignError(f"{kind} value {value:g} is too large for a marking code; allowed < {top:g}")
    whole, _, frac = _plain(mantissa).partition(".")
    whole = "" if whole == "0" else whole
    if len(whole) == 1 and not frac:
        frac = "0"
    return f"{whole}{letters[eng]}{frac}"


# IEC 60062 tolerance letters, symmetric ones only (from memory, widely used; see IEC 60062:2016, letter and RKM codes).
TOLERANCE_LETTERS = {
    "L": 0.0001,
    "P": 0.0002,
    "W": 0.0005,
    "B": 0.001,
    "C": 0.0025,
    "D": 0.005,
    "F": 0.01,
    "G": 0.02,
    "J": 0.05,
    "K": 0.10,
    "M": 0.20,
    "N": 0.30,
}
_ASYMMETRIC_LETTERS = {"Q": "-10/+30 %", "T": "-10/+50 %", "S": "-20/+50 %", "Z": "-20/+80 %"}
_PERCENT_RE = re.compile(r"(?:±|\+/?-)?[ ]?(?P<num>[0-9]+(?:\.[0-9]*)?|\.[0-9]+)[ ]?%")
_FRACTION_RE = re.compile(r"(?:±|\+/?-)?[ ]?(?P<num>[0-9]+(?:\.[0-9]*)?|\.[0-9]+)")
_TOL_ALLOWED = (
    "a percentage such as '5%' or '±5 %' (0 to below 100 %), a fraction such as 0.05 (0 to below 1), "
    "or an IEC 60062 letter (" + ", ".join(f"{k} ±{v * 100:g} %" for k, v in TOLERANCE_LETTERS.items()) + ")"
)


def parse_tolerance(text: Any) -> float:
    """Read a symmetric component tolerance and return it as a fraction.

    Parameters
    ----------
    text : str or float
        ``"5%"``, ``"±5 %"``, ``"+/-1%"``, ``"0.05"``, an IEC 60062 letter such as ``"J"``, or a
        number (taken as a fraction).

    Returns
    -------
    float
        The half-width of the tolerance band as a fraction of nominal, in [0, 1) [1].

    Raises
    ------
    DesignError
        For junk, asymmetric letters (Q, T, S, Z), a bare number of 1 or more (write ``"5%"`` for
        5 per cent), or a percentage of 100 % or more.

    Examples
    --------
    >>> parse_tolerance("5%"), parse_tolerance("±1 %"), parse_tolerance("J"), parse_tolerance("0.02")
    (0.05, 0.01, 0.05, 0.02)

    References
    ----------
    IEC 60062:2016+A1:2019, *Marking codes for resistors and capacitors*, tolerance letter code
    (letter values from memory, widely used).
    """
    if not isinstance(text, str):
        fraction = _number_in(text, "tolerance", _TOL_ALLOWED)
        percent = False
    else:
        stripped = text.strip()
        if stripped in TOLERANCE_LETTERS:
            return TOLERANCE_LETTERS[stripped]
        if stripped in _ASYMMETRIC_LETTERS:
            raise DesignError(
                f"tolerance {_quote(text)} is asymmetric ({_ASYMMETRIC_LETTERS[stripped]}); "
                f"only symmetric tolerances are handled; allowed: {_TOL_ALLOWED}"
            )
        m_pct = _PERCENT_RE.fullmatch(stripped)
        m_frac = None if m_pct else _FRACTION_RE.fullmatch(stripped)
        if m_pct is None and m_frac is None:
            raise DesignError(f"tolerance {_quote(text)} cannot be read; allowed: {_TOL_ALLOWED}")
        percent = m_pct is not None
        digits = (m_pct or m_frac)["num"]  # type: ignore[index]
        # Shift the decimal literal rather than divide, so "5%" gives exactly float("0.05").
        fraction = float(f"{digits}e-2") if percent else float(digits)
    if not (0.0 <= fraction < 1.0):
        hint = " (for per cent write e.g. '5%')" if not percent and fraction >= 1.0 else ""
        raise DesignError(f"tolerance {_quote(text)} is out of range{hint}; allowed: {_TOL_ALLOWED}")
    return fraction
