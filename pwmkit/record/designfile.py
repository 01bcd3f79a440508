"""Design files: a small versioned TOML format for :class:`pwmkit.design.Design` (design layer).

A design file is plain TOML (``format = "pwmkit-design"``, ``version = 1``) whose sections mirror
the design objects::

    format = "pwmkit-design"
    version = 1

    [design]          # name, vcc, vcc_min, vcc_max, v_load, t_ambient_c …, notes
    [requirements]    # frequency, frequency_tolerance, duty, duty_min, duty_max, flicker, criterion, min_yield
    [timing]          # topology, ra, rb, c, pot, wiper, … timer, series and tolerances
    [load]            # kind = "led", "motor" or "heater", then that load's fields (section absent = no load)
    [switch]          # mosfet, r_gate
    [freewheel]       # diode, clamp, v_zener

Numbers are SI units (Ω, F, V, Hz, H, °C where the key says ``_c``); engineering text such as
``"4k7"`` or ``"100n"`` is accepted wherever a number is, and fractions (duty, wiper,
tolerances) may be written as percentages (``"5%"``; tolerances also as IEC 60062 letters). A missing key takes the design
object's default; an optional part that is left out on purpose is written ``"none"``. The full
description is in ``docs/design-file.md``.

Reading is strict and safe: the text goes through the standard library's TOML parser
(:mod:`tomllib`, or :mod:`tomli` on Python 3.10) — no code is ever run — and every problem
becomes one :class:`~pwmkit.errors.DesignError` naming the file, the field as a dotted path and
the reason, e.g. ``greenhouse.toml: timing.ra: value '10q' cannot be read; allowed: …``.
Unknown keys are rejected with the list of known ones. Files over 1 MiB, text that is not
UTF-8, truncated or nested-too-deep TOML, wrong types and non-finite or huge numbers are all
refused the same way.

Writing uses a small emitter of our own (the schema is flat, so no TOML library is needed) and
an atomic replace (:func:`pwmkit.record.files.atomic_write`); ``save`` then ``load`` gives back an
equal :class:`~pwmkit.design.Design`.
"""

from __future__ import annotations

import dataclasses
import difflib
import math
import os
import re
import sys
from collections.abc import Mapping
from pathlib import Path
from typing import Any

from ..design import Design, Freewheel, HeaterLoad, LedLoad, MotorLoad, Requirements, Switch, Timing
from ..errors import DesignError
from .files import MAX_DESIGN_BYTES, atomic_write, read_limited

if sys.version_info >= (3, 11):
    import tomllib
else:  # pragma: no cover - Python 3.10
    import tomli as tomllib

__all__ = ["FORMAT", "VERSION", "load_design", "save_design", "design_to_toml", "design_from_toml",
           "section_fields"]

FORMAT = "pwmkit-design"
VERSION = 1

#: Section name → dataclass (the load section picks its class by ``kind``).
_SECTIONS: dict[str, Any] = {
    "requirements": Requirements,
    "timing": Timing,
    "switch": Switch,
    "freewheel": Freewheel,
}
_LOADS: dict[str, Any] = {"led": LedLoad, "motor": MotorLoad, "heater": HeaterLoad}
_SECTION_ORDER = ("design", "requirements", "timing", "load", "switch", "freewheel")
_TOP_KEYS = ("format", "version", *_SECTION_ORDER, "bench")

#: Numeric fields that accept ``"none"`` although their default is a value.
_NULLABLE_EXTRA = {"timing.cv_bypass"}
#: Text fields whose default is None (so their kind cannot be read off the default).
_TEXT_EXTRA = {"requirements.flicker"}
#: Words that mean "no value" for an optional field.
_NONE_WORDS = ("none",)

#: Units written as comments beside numbers (and used in docs).
UNITS: Mapping[str, str] = {
    "design.vcc": "V", "design.v_load": "V", "design.vcc_min": "V", "design.vcc_max": "V",
    "design.t_ambient_c": "°C", "design.t_ambient_min_c": "°C", "design.t_ambient_max_c": "°C",
    "requirements.frequency": "Hz", "requirements.frequency_tolerance": "%", "requirements.duty": "%",
    "requirements.duty_min": "%", "requirements.duty_max": "%", "requirements.min_yield": "%",
    "timing.ra": "Ω", "timing.rb": "Ω", "timing.c": "F", "timing.pot": "Ω", "timing.wiper": "%",
    "timing.vd": "V", "timing.vsat": "V", "timing.r_on": "Ω", "timing.vctl": "V", "timing.r_cv": "Ω",
    "timing.cv_bypass": "F", "timing.r_tolerance": "%", "timing.c_tolerance": "%", "timing.pot_tolerance": "%",
    "load.vf": "V", "load.vf_spread": "V", "load.r_series": "Ω", "load.r_power_rating": "W",
    "load.r": "Ω", "load.l": "H", "load.ke": "V·s/rad", "load.b": "N·m·s/rad", "load.t_load": "N·m",
    "load.j": "kg·m²",
    "switch.r_gate": "Ω", "freewheel.v_zener": "V",
    "timing.r_mono": "Ω", "timing.c_mono": "F", "timing.vctl_min": "V", "timing.vctl_max": "V",
    "timing.r_ctl_source": "Ω",
    "load.r_cold": "Ω", "load.alpha": "1/K", "load.t_ref_c": "°C", "load.r_th": "K/W", "load.c_th": "J/K",
    "load.t_surface_max_c": "°C", "load.ntc_r25": "Ω", "load.ntc_beta": "K", "load.r_set": "Ω",
    "load.tau_sensor": "s", "load.ntc_tolerance": "%", "load.r_tolerance": "%",
}

#: Longest text accepted for a text field [characters].
_MAX_TEXT = 100_000


@dataclasses.dataclass(frozen=True)
class _Field:
    name: str
    kind: str  # "number", "integer" or "text"
    nullable: bool
    default: Any


def _fields_of(cls: Any, section: str, skip: tuple[str, ...] = ()) -> dict[str, _Field]:
    out: dict[str, _Field] = {}
    for f in dataclasses.fields(cls):
        if not f.init or f.name in skip:
            continue
        if f.default is not dataclasses.MISSING:
            default = f.default
        elif f.default_factory is not dataclasses.MISSING:  # pragma: no cover - sub-objects are skipped
            default = f.default_factory()
        else:  # pragma: no cover - every design field has a default
            default = None
        path = f"{section}.{f.name}"
        if isinstance(default, str) or path in _TEXT_EXTRA:
            kind = "text"
        elif isinstance(default, int) and not isinstance(default, bool):
            kind = "integer"
        else:
            kind = "number"
        out[f.name] = _Field(f.name, kind, default is None or path in _NULLABLE_EXTRA, default)
    return out


_SUBOBJECTS = ("timing", "load", "switch", "freewheel", "requirements", "bench")


def section_fields(section: str, kind: str | None = None) -> dict[str, _Field]:
    """The keys of one section (``kind`` picks the load class), in file order."""
    if section == "design":
        return _fields_of(Design, "design", _SUBOBJECTS)
    if section == "load":
        if kind is None:
            raise DesignError("load: give kind = 'led', 'motor' or 'heater'")
        return {"kind": _Field("kind", "text", False, None), **_fields_of(_LOADS[kind], "load")}
    return _fields_of(_SECTIONS[section], section)


# --------------------------------------------------------------------------------------------
# writing
# --------------------------------------------------------------------------------------------

def _toml_string(text: str, *, multiline: bool = False) -> str:
    """A TOML basic string (or multi-line basic string) that reads back exactly as ``text``."""
    out = []
    for ch in text:
        code = ord(ch)
        if ch == "\\":
            out.append("\\\\")
        elif ch == '"':
            out.append('\\"')
        elif ch == "\n" and multiline:
            out.append("\n")
        elif ch == "\n":
            out.append("\\n")
        elif ch == "\t":
            out.append("\\t")
        elif ch == "\r":
            out.append("\\r")
        elif code < 0x20 or code == 0x7F:
            out.append(f"\\u{code:04X}")
        else:
            out.append(ch)
    body = "".join(out)
    if multiline:
        # the newline right after the opening quotes is dropped by TOML readers
        return '"""\n' + body + '"""'
    return '"' + body + '"'


def _toml_number(value: Any, kind: str) -> str:
    if kind == "integer":
        return str(int(value))
    v = float(value)
    if not math.isfinite(v):  # pragma: no cover - designs hold finite numbers only
        raise DesignError(f"cannot write the non-finite number {v!r}")
    return repr(v)  # shortest text that reads back to the same float


def _comment(path: str, value: Any) -> str:
    unit = UNITS.get(path)
    if unit is None or not isinstance(value, float):
        return ""
    if unit == "%":
        return f"  # {100 * value:.6g} %"
    if unit in ("°C", "V·s/rad", "N·m·s/rad", "N·m", "kg·m²", "1/K", "K/W", "J/K", "K"):
        return ""
    from ..values import format_value

    try:
        return f"  # {format_value(value, unit, 4)}"
    except DesignError:  # pragma: no cover - formatting never fails on finite numbers
        return ""


def _emit_section(lines: list[str], section: str, obj: Any, fields: dict[str, _Field]) -> None:
    lines.append(f"[{section}]")
    for name, fd in fields.items():
        path = f"{section}.{name}"
        value = getattr(obj, name) if name != "kind" else obj.kind
        if value is None:
            if fd.default is not None:  # an optional part left out on purpose
                lines.append(f'{name} = "none"')
            continue
        if fd.kind == "text":
            text = str(value)
            lines.append(f"{name} = {_toml_string(text, multiline=name == 'notes' and chr(10) in text)}")
        else:
            lines.append(f"{name} = {_toml_number(value, fd.kind)}{_comment(path, value)}")
    lines.append("")


def design_to_toml(design: Design) -> str:
    """The design as the text of a design file (format ``pwmkit-design``, version 1).

    Parameters
    ----------
    design : Design

    Returns
    -------
    str
        TOML text; every field is written, numbers as plain SI floats with the engineering value
        as a comment.

    Examples
    --------
    >>> from pwmkit.design import demo_designs
    >>> text = design_to_toml(demo_designs()["fan"])
    >>> design_from_toml(text) == demo_designs()["fan"]
    True
    """
    if not isinstance(design, Design):
        raise DesignError(f"design: expected a pwmkit.design.Design, got {type(design).__name__}")
    lines = [
        "# pwmkit design record. Numbers are SI units (Ω, F, V, Hz, H; °C where the key ends in _c);",
        '# engineering text such as "4k7" or "100n" is accepted too. Format: docs/design-file.md',
        f'format = "{FORMAT}"',
        f"version = {VERSION}",
        "",
    ]
    _emit_section(lines, "design", design, section_fields("design"))
    _emit_section(lines, "requirements", design.requirements, section_fields("requirements"))
    _emit_section(lines, "timing", design.timing, section_fields("timing"))
    if design.load is not None:
        _emit_section(lines, "load", design.load, section_fields("load", design.load.kind))
    _emit_section(lines, "switch", design.switch, section_fields("switch"))
    _emit_section(lines, "freewheel", design.freewheel, section_fields("freewheel"))
    if design.bench:  # [[bench]] readings of the built driver (pwmkit.bench.readings)
        from ..bench.readings import readings_to_toml

        lines += ["# bench readings of the built driver", readings_to_toml(design.bench)]
    return "\n".join(lines)


def save_design(design: Design, path: str | os.PathLike[str], *, force: bool = False, trailer: str = "") -> Path:
    """Write a design file atomically.

    Parameters
    ----------
    design : Design
    path : path-like
        Destination (``.toml``); its folder must exist.
    force : bool
        Replace an existing file; without it an existing file raises :class:`DesignError`.
    trailer : str
        Comment lines written after the design (see :func:`trailing_comments`); every non-blank
        line must start with ``#``.

    Returns
    -------
    pathlib.Path
        The file written.

    Notes
    -----
    The text goes to a temporary file in the same folder, is flushed and synced to disk, and
    replaces the destination in one :func:`os.replace`; an error midway leaves the old file intact.
    """
    text = design_to_toml(design)
    if trailer.strip():
        if any(line.strip() and not line.lstrip().startswith("#") for line in trailer.splitlines()):
            raise DesignError("trailer: only comment lines (starting with #) may follow the design")
        text = text.rstrip("\n") + "\n" + ("" if trailer.startswith("\n") else "\n") + trailer.rstrip("\n") + "\n"
    return atomic_write(path, text, force=force)


def trailing_comments(text: str) -> str:
    """The comment lines at the end of a design file's text (after the last setting), or "".

    ``pwmkit new`` writes the other part sets it found there; the dashboard keeps them when it
    saves the file again. Comments between the settings are not kept (the file is rewritten from
    the design), nor is a comment block that the writer itself puts at the end.
    """
    lines = text.rstrip().splitlines()
    start = len(lines)
    while start > 0 and (not lines[start - 1].strip() or lines[start - 1].lstrip().startswith("#")):
        start -= 1
    block = [ln for ln in lines[start:]]
    while block and not block[0].strip():
        block.pop(0)
    return "\n".join(block) + "\n" if any(ln.strip() for ln in block) else ""


# --------------------------------------------------------------------------------------------
# reading
# --------------------------------------------------------------------------------------------

def _kind_name(value: Any) -> str:
    if isinstance(value, bool):
        return "true/false"
    if isinstance(value, dict):
        return "a table"
    if isinstance(value, list):
        return "an array"
    if isinstance(value, str):
        return "text"
    if isinstance(value, (int, float)):
        return "a number"
    return f"a {type(value).__name__}"  # dates and times


def _short(value: Any) -> str:
    text = repr(value)
    return text if len(text) <= 60 else text[:57] + "..."


def _unknown(path: str, key: str, known: Any) -> DesignError:
    known = list(known)
    hint = difflib.get_close_matches(key, known, n=1)
    did = f" (did you mean {hint[0]!r}?)" if hint else ""
    where = f"{path}.{key}" if path else key
    return DesignError(f"{where}: unknown key{did}; known keys{' in [' + path + ']' if path else ''}: "
                       f"{', '.join(known)}")


def _convert(path: str, fd: _Field, value: Any) -> Any:
    if fd.nullable and isinstance(value, str) and value.strip().lower() in _NONE_WORDS:
        return None
    if fd.kind == "text":
        if not isinstance(value, str):
            raise DesignError(f"{path}: expected text, got {_kind_name(value)} {_short(value)}")
        if len(value) > _MAX_TEXT:
            raise DesignError(f"{path}: text of {len(value)} characters is too long; allowed up to {_MAX_TEXT}")
        return value
    if fd.kind == "integer":
        if isinstance(value, bool) or not isinstance(value, int):
            raise DesignError(f"{path}: expected a whole number, got {_kind_name(value)} {_short(value)}")
        if abs(value) > 10**9:
            raise DesignError(f"{path}: {_short(value)} is far out of range; give a whole number such as 3")
        return value
    if isinstance(value, bool) or not isinstance(value, (int, float, str)):
        extra = ' or "none"' if fd.nullable else ""
        raise DesignError(f"{path}: expected a number or engineering text such as \"4k7\"{extra}, "
                          f"got {_kind_name(value)} {_short(value)}")
    if isinstance(value, str):
        from ..values import parse_tolerance, parse_value

        try:
            if path.endswith("_tolerance"):
                return parse_tolerance(value)
            unit = UNITS.get(path)
            number = parse_value(value, unit if unit is not None else "", name=path)
        except DesignError as exc:
            extra = '; "none" leaves it out' if fd.nullable else ""
            msg = str(exc)
            raise DesignError(f"{msg if msg.startswith(path) else f'{path}: {msg}'}{extra}") from None
        if UNITS.get(path) == "%" and value.strip().endswith("%") and not 0.0 <= number <= 1.0:
            raise DesignError(f"{path}: {value.strip()!r} is out of range; allowed 0 % … 100 %")
        return number
    try:
        number = float(value)
    except OverflowError:
        raise DesignError(f"{path}: {_short(value)} is too large to be a number in double precision") from None
    if not math.isfinite(number):
        raise DesignError(f"{path}: {value!r} is not a finite number; give a finite value in SI units")
    return number


_CLASS_PREFIX = {"led.": "load.", "motor.": "load."}


def _field_message(msg: str, section: str) -> str:
    """Bring a design-object error to the file's dotted paths ('ledload.vf: …' → 'load.vf: …')."""
    msg = msg.replace("ledload.", "load.").replace("motorload.", "load.")
    for prefix, repl in _CLASS_PREFIX.items():
        if msg.startswith(prefix):
            return repl + msg[len(prefix):]
    head = msg.split(":", 1)[0]
    if head.startswith("bench"):  # bench readings carry their own path, e.g. bench[2].conditions.vcc
        return msg
    if "." in head and head.split(".", 1)[0] in _SECTION_ORDER:
        return msg
    return f"{section}: {msg}"


def _table(path: str, value: Any) -> dict[str, Any]:
    if not isinstance(value, dict):
        raise DesignError(f"{path}: expected a table [{path}], got {_kind_name(value)}")
    return value


def _build(section: str, cls: Any, table: Mapping[str, Any], fields: dict[str, _Field]) -> Any:
    kwargs: dict[str, Any] = {}
    for key, value in table.items():
        if key not in fields:
            raise _unknown(section, key, fields)
        if key == "kind":
            continue
        kwargs[key] = _convert(f"{section}.{key}", fields[key], value)
    try:
        return cls(**kwargs)
    except DesignError as exc:
        raise DesignError(_field_message(str(exc), section)) from None


def _check_names(design: Design) -> None:
    """Part-family names must be known to the parts data (the message lists the known ones)."""
    from ..parts.diodes import DIODES, get_diode
    from ..parts.mosfets import MOSFETS, get_mosfet

    checks = [("timing.diode", get_diode, design.timing.diode, "diode", DIODES),
              ("freewheel.diode", get_diode, design.freewheel.diode, "diode", DIODES),
              ("switch.mosfet", get_mosfet, design.switch.mosfet, "MOSFET", MOSFETS)]
    for path, getter, name, what, known in checks:
        try:
            getter(name)
        except DesignError:
            raise DesignError(f"{path}: {_short(name)} is not a known {what} family; allowed: "
                              f"{', '.join(known)}") from None
    if isinstance(design.load, LedLoad):
        from ..loads.led import TYPICAL_VF

        if design.load.colour not in TYPICAL_VF:
            raise DesignError(f"load.colour: {design.load.colour!r} is not a known LED colour; "
                              f"allowed: {', '.join(TYPICAL_VF)}")


def _from_data(data: dict[str, Any]) -> Design:
    for key in data:
        if key not in _TOP_KEYS:
            raise _unknown("", key, _TOP_KEYS)
    fmt = data.get("format")
    if fmt is None:
        raise DesignError(f'format: missing; a pwmkit design file starts with format = "{FORMAT}" and '
                          f"version = {VERSION}")
    if fmt != FORMAT:
        raise DesignError(f"format: {_short(fmt)} is not a pwmkit design file; expected {FORMAT!r}")
    version = data.get("version")
    if version is None:
        raise DesignError(f"version: missing; a pwmkit design file starts with format = \"{FORMAT}\" and "
                          f"version = {VERSION}")
    if isinstance(version, bool) or not isinstance(version, int):
        raise DesignError(f"version: expected the whole number {VERSION}, got {_kind_name(version)} "
                          f"{_short(version)}")
    if version > VERSION:
        raise DesignError(f"version: {version} was written by a newer pwmkit; this one reads version "
                          f"{VERSION} — upgrade pwmkit")
    if version < 1:
        raise DesignError(f"version: {version} is not allowed; allowed: {VERSION}")

    sections: dict[str, Any] = {}
    for name, cls in _SECTIONS.items():
        if name in data:
            sections[name] = _build(name, cls, _table(name, data[name]), section_fields(name))
    if "load" in data:
        table = _table("load", data["load"])
        kind = table.get("kind")
        if kind is None:
            raise DesignError(f"load.kind: missing; give kind = \"led\", \"motor\" or \"heater\" (or leave out [load] "
                              f"for a timer without a load); keys given: {', '.join(table) or 'none'}")
        if not isinstance(kind, str) or kind.strip().lower() not in _LOADS:
            raise DesignError(f"load.kind: {_short(kind)} is not allowed; allowed: {', '.join(_LOADS)}")
        kind = kind.strip().lower()
        sections["load"] = _build("load", _LOADS[kind], table, section_fields("load", kind))
    top = _table("design", data.get("design", {}))
    fields = section_fields("design")
    kwargs: dict[str, Any] = {}
    for key, value in top.items():
        if key not in fields:
            raise _unknown("design", key, fields)
        kwargs[key] = _convert(f"design.{key}", fields[key], value)
    if "bench" in data:
        from ..bench.readings import readings_from_data

        kwargs["bench"] = readings_from_data(data["bench"])
    try:
        design = Design(**kwargs, **sections)
    except DesignError as exc:
        raise DesignError(_field_message(str(exc), "design")) from None
    _check_names(design)
    if design.bench:
        from ..bench.readings import check_conditions

        check_conditions(design)
    return design


_SECTION_RE = re.compile(r"^\s*\[\s*([A-Za-z0-9_.-]+)\s*\]")
_LONG_NUMBER_RE = re.compile(r"^\s*([A-Za-z0-9_-]+)\s*=\s*[+-]?([0-9_]{300,})")


def _long_number_field(text: str) -> tuple[str, int] | None:
    """(dotted field, digits) of the first number too long for Python's int reader, or None."""
    section = ""
    for line in text.splitlines():
        m = _SECTION_RE.match(line)
        if m:
            section = m.group(1)
            continue
        m = _LONG_NUMBER_RE.match(line)
        if m:
            return (f"{section}.{m.group(1)}" if section else m.group(1)), len(m.group(2).replace("_", ""))
    return None


def design_from_toml(text: str, *, source: str = "<string>") -> Design:
    """Read a design from the text of a design file.

    Parameters
    ----------
    text : str
        TOML text (format ``pwmkit-design``, version 1).
    source : str
        Name used at the start of error messages (normally the file name).

    Returns
    -------
    Design

    Raises
    ------
    DesignError
        ``"{source}: {field}: {reason}"`` for anything that is not a valid design.
    """
    if not isinstance(text, str):
        raise DesignError(f"{source}: expected the text of a design file, got {type(text).__name__}")
    if len(text) > MAX_DESIGN_BYTES:
        raise DesignError(f"{source}: the text is larger than {MAX_DESIGN_BYTES // 1024} KiB; a pwmkit design "
                          "file is a few kilobytes")
    try:
        data = tomllib.loads(text)
    except tomllib.TOMLDecodeError as exc:
        raise DesignError(f"{source}: not valid TOML ({exc}); is the file complete?") from None
    except RecursionError:
        raise DesignError(f"{source}: arrays or tables nested too deeply; a design file is flat") from None
    except ValueError as exc:  # e.g. integers with thousands of digits
        where = _long_number_field(text)
        if where is not None:
            raise DesignError(f"{source}: {where[0]}: a number of {where[1]} digits is not allowed; give a value "
                              "in SI units such as 4700 or \"4k7\"") from None
        raise DesignError(f"{source}: not a readable design file ({exc})") from None
    try:
        return _from_data(data)
    except DesignError as exc:
        raise DesignError(f"{source}: {exc}") from None


def load_design(path: str | os.PathLike[str]) -> Design:
    """Read a design file.

    Parameters
    ----------
    path : path-like
        A ``.toml`` design file (UTF-8, at most 1 MiB).

    Returns
    -------
    Design

    Raises
    ------
    DesignError
        Missing or unreadable file, a file over 1 MiB, text that is not UTF-8, invalid TOML, or any
        field that does not describe a valid design; the message starts with the file name.
    """
    p = Path(path)
    data = read_limited(p, what="design file")
    try:
        text = data.decode("utf-8")
    except UnicodeDecodeError as exc:
        raise DesignError(f"{p}: not UTF-8 text (byte 0x{data[exc.start]:02x} at offset {exc.start}); a design "
                          "file is a TOML text file") from None
    if text.startswith("\ufeff"):
        text = text[1:]
    if "\x00" in text:
        raise DesignError(f"{p}: contains NUL bytes; a design file is a TOML text file")
    return design_from_toml(text, source=str(p))
