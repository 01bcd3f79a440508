"""Command line ``pwmkit bench`` (presentation layer): keep bench readings with a design file.

``bench add DESIGN.toml CAPTURE.csv [--wiper W] [--vcc V] [--ambient T] [--measure NAME=VALUE …]``
    measure a scope capture (:func:`pwmkit.bench.reading_from_capture`) and/or take instrument
    readings given as ``--measure``, append them to the design file as one ``[[bench]]`` entry and
    say whether it lies inside the predicted spread.
``bench show DESIGN.toml``
    reconcile every frequency/duty reading the design file holds (:func:`pwmkit.bench.reconcile_design`).

The design file is extended, never rewritten: the new entry is appended to the file's own text
(your comments and layout stay), the result is read back and must equal the design plus the new
reading, and only then does it replace the file atomically (:func:`pwmkit.record.files.atomic_write`).
If the file changed on disk meanwhile, nothing is written.
"""

from __future__ import annotations

import argparse
import datetime as _dt
import sys
from pathlib import Path
from typing import Any

from .errors import DesignError

__all__ = ["register_bench", "append_reading"]


def _progress(text: str) -> None:
    print(text, file=sys.stderr, flush=True)


def _read_text(path: Path) -> tuple[bytes, str]:
    from .record.files import read_limited

    data = read_limited(path, what="design file")
    try:
        text = data.decode("utf-8")
    except UnicodeDecodeError as exc:
        raise DesignError(f"{path}: not UTF-8 text (offset {exc.start}); a design file is a TOML text file") from None
    return data, text[1:] if text.startswith("\ufeff") else text


def append_reading(path: str | Path, reading: Any, *, dry_run: bool = False) -> tuple[Any, str]:
    """Append one reading to a design file without touching the rest of its text.

    Returns ``(design with the reading, the appended TOML text)``. Raises DesignError when the file
    is not a valid design, when the reading does not fit the design (e.g. a wiper on a fixed
    network), when the appended text would not read back to exactly the design plus the reading,
    or when the file changed on disk during the call.
    """
    from .bench.readings import check_conditions, reading_to_toml
    from .record.designfile import design_from_toml
    from .record.files import atomic_write

    p = Path(path)
    data, text = _read_text(p)
    design = design_from_toml(text, source=str(p))
    updated = design.with_reading(reading)
    check_conditions(updated)
    entry = reading_to_toml(updated.bench[-1])
    new_text = text + ("" if text.endswith("\n") else "\n") + "\n" + entry
    try:
        check = design_from_toml(new_text, source=str(p))
    except DesignError as exc:
        raise DesignError(f"{p}: the reading cannot be appended to this file's text ({exc}); write it with "
                          "pwmkit.record.save_design instead") from None
    if check != updated:
        raise DesignError(f"{p}: appending the reading would not read back as written; the file was left as it was")
    if not dry_run:
        again, _ = _read_text(p)
        if again != data:
            raise DesignError(f"{p}: the file changed on disk while the reading was added; nothing was written — "
                              "run the command again")
        atomic_write(p, new_text, force=True)
    return updated, entry


def _measured_options(items: list[str] | None) -> list[Any]:
    """``--measure NAME=VALUE`` options → Measured values (checked like the design file's)."""
    from .bench.readings import QUANTITIES, Measured

    out = []
    for item in items or ():
        name, sep, value = item.partition("=")
        if not sep or not name.strip() or not value.strip():
            raise DesignError(f"--measure: {item!r} is not allowed; give NAME=VALUE, e.g. frequency=31.6k, duty=30.4%, "
                              f"i_load=110m; names: {', '.join(QUANTITIES)}")
        out.append(Measured(name.strip(), value.strip()))
    return out


def _add(args: argparse.Namespace) -> int:
    from .bench import reading_from_capture
    from .bench.readings import BenchConditions, BenchReading

    channel: Any = args.channel
    if channel is not None and channel.isdigit():
        channel = int(channel)
    date = args.date if args.date is not None else _dt.date.today().isoformat()
    cond = BenchConditions(vcc=args.vcc, t_ambient_c=args.ambient, wiper=args.wiper)  # checks the options
    extra = _measured_options(args.measure)
    if args.capture is None and not extra:
        raise DesignError("bench add: nothing to add; give a CAPTURE.csv and/or --measure NAME=VALUE readings")
    if args.capture is not None:
        _progress(f"pwmkit bench: measuring {args.capture} …")
        reading = reading_from_capture(args.capture, channel=0 if channel is None else channel,
                                       threshold=args.threshold, vcc=cond.vcc, t_ambient_c=cond.t_ambient_c,
                                       wiper=cond.wiper, date=date, note=args.note or "")
        reading = BenchReading(measured=(*reading.measured, *extra), conditions=reading.conditions, date=reading.date,
                               note=reading.note, source=reading.source)
    else:
        reading = BenchReading(measured=tuple(extra), conditions=cond, date=date, note=args.note or "",
                               source=args.source or "")
    design, entry = append_reading(args.design, reading, dry_run=args.dry_run)
    print(("would append (dry run):\n" if args.dry_run else f"{args.design}: reading {len(design.bench) - 1} added\n")
          + entry)
    if args.no_check:
        return 0
    return _show_reconciliation(design, args.n_mc, index=len(design.bench) - 1)


def _show_reconciliation(design: Any, n_mc: int, index: int | None = None) -> int:
    from .bench import reconcile_design

    _progress("pwmkit bench: comparing with the predicted spread …")
    rec = reconcile_design(design, n=n_mc)
    if rec is None:
        print("no frequency or duty readings to compare")
        return 0
    print(rec.summary())
    return 0 if rec.inside else 1


def _show(args: argparse.Namespace) -> int:
    from .record.designfile import load_design

    design = load_design(args.design)
    if not design.bench:
        print(f"{args.design}: no [[bench]] readings")
        return 0
    return _show_reconciliation(design, args.n_mc)


def register_bench(sub: Any) -> None:
    """Add the ``bench`` subcommand to the ``pwmkit`` parser's subparsers."""
    p = sub.add_parser("bench", help="keep bench readings and scope captures with a design file",
                       description="Bench readings of the built driver, kept in the design file as [[bench]] "
                                   "entries and compared with the design's predicted spread. Exit 1 when a "
                                   "reading lies outside the spread.")
    bsub = p.add_subparsers(dest="bench_command", metavar="ACTION")
    a = bsub.add_parser("add", help="measure a scope capture and append the reading to the design file",
                        description="Measure frequency, duty, edges and levels of a CSV scope capture and append "
                                    "them as a [[bench]] entry (the rest of the file is kept as it is).")
    a.add_argument("design", metavar="DESIGN.toml")
    a.add_argument("capture", metavar="CAPTURE.csv", nargs="?", default=None,
                   help="CSV scope capture to measure (optional with --measure)")
    a.add_argument("--measure", action="append", metavar="NAME=VALUE",
                   help="a reading of an instrument, e.g. frequency=31.6k, duty=30.4%%, i_load=110m, t_mosfet_c=27 "
                        "(repeatable; the accuracy can be added in the file)")
    a.add_argument("--source", default=None, help="where hand readings come from (e.g. the instrument)")
    a.add_argument("--wiper", default=None, help="wiper position of the reading, 0–1 or a percentage (pot designs)")
    a.add_argument("--vcc", default=None, help="supply measured during the capture [V]")
    a.add_argument("--ambient", default=None, help="ambient temperature during the capture [°C]")
    a.add_argument("--channel", default=None, help="channel name or number from 0 (default the first)")
    a.add_argument("--threshold", default=None, help="timing level [V] (default the mid-level)")
    a.add_argument("--date", default=None, help="date of the capture, ISO (default today)")
    a.add_argument("--note", default=None, help="free text kept with the reading")
    a.add_argument("--dry-run", action="store_true", help="print the entry, do not write the file")
    a.add_argument("--no-check", action="store_true", help="do not compare with the predicted spread")
    a.add_argument("--n-mc", type=int, default=20_000, metavar="N", help="Monte Carlo samples (default 20000)")
    a.set_defaults(handler=_add)
    s = bsub.add_parser("show", help="compare the design file's readings with the predicted spread")
    s.add_argument("design", metavar="DESIGN.toml")
    s.add_argument("--n-mc", type=int, default=20_000, metavar="N", help="Monte Carlo samples (default 20000)")
    s.set_defaults(handler=_show)

    def _usage(_args: argparse.Namespace) -> int:
        p.print_help()
        return 2

    p.set_defaults(handler=_usage)
