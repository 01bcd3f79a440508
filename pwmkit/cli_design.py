"""Command line ``pwmkit find`` and ``pwmkit new``: your own driver without Python (presentation layer).

``find``
    print ranked preferred-value part sets for a target (values, frequency band over the
    tolerance corners, duty reach, yield, part count, discharge-pin current), best first.
    Exit 0 — a set meets the criterion; 1 — none does (the nearest miss and why are printed);
    2 — bad input.
``new NAME``
    run the same search and write ``NAME.toml`` (the chosen set, the requirements, the load and,
    as comments, every other set found) and ``NAME.ipynb`` (a record notebook that loads
    ``NAME.toml``). Existing files are replaced only with ``--force``.

Both build a starting :class:`~pwmkit.design.Design` from the options and call
:func:`pwmkit.shortlist.shortlist`; progress goes to standard error once a search runs longer
than half a second.
"""

from __future__ import annotations

import argparse
import csv
import io
import json
import re
import sys
import time
from pathlib import Path
from typing import Any

from .errors import DesignError

__all__ = ["add_commands", "parse_range", "design_from_options"]

_NAME = re.compile(r"^[A-Za-z0-9][A-Za-z0-9._-]{0,99}$")


def parse_range(text: str, option: str, unit: str) -> tuple[float, float | None]:
    """``"20..90%"`` → (0.2, 0.9); ``"25k"`` → (25000, None). Percent applies to both ends."""
    from .values import parse_value

    if not isinstance(text, str) or not text.strip():
        raise DesignError(f"{option}: a value is required")
    raw = text.strip()
    percent = raw.endswith("%")
    if percent:
        raw = raw[:-1].strip()
    parts = [p.strip() for p in raw.split("..")]
    if len(parts) > 2 or not all(parts):
        raise DesignError(f"{option}: {text!r} is not allowed; give a value or a range LOW..HIGH, e.g. "
                          + ("20..90%" if unit == "%" else "25k or 20k..30k"))
    try:
        values = [parse_value(p, "" if unit == "%" else unit, name=option) for p in parts]  # unit checked
    except DesignError as exc:
        msg = str(exc)
        raise DesignError(msg if msg.startswith(option) else f"{option}: {msg}") from None
    if percent or unit == "%":
        values = [v / 100.0 if percent else v for v in values]
    lo = float(values[0])
    hi = float(values[1]) if len(values) == 2 else None
    if hi is not None and not lo < hi:
        raise DesignError(f"{option}: {text!r}; the low end must be below the high end")
    return lo, hi


def _criterion(text: str) -> tuple[str, float]:
    t = text.strip().lower()
    if t in ("worst-case", "worst", "corners"):
        return "worst-case", 0.99
    m = re.fullmatch(r"yield(?::|=)?\s*([0-9.]+)\s*%?", t)
    if m:
        y = float(m.group(1)) / 100.0
        if 0.0 < y <= 1.0:
            return "yield", y
    raise DesignError(f"--criterion: {text!r} is not allowed; give worst-case or yield:PERCENT, e.g. yield:99")


def design_from_options(args: argparse.Namespace, name: str = "design") -> Any:
    """The starting design of ``find``/``new`` built from the command-line options (validated)."""
    from dataclasses import replace

    from .design import Design, Freewheel, LedLoad, MotorLoad, Requirements, Switch, Timing
    from .values import parse_value

    f_lo, f_hi = parse_range(args.frequency, "--frequency", "Hz")
    tol = parse_range(args.tolerance, "--tolerance", "%")[0] if args.tolerance else 0.1
    if f_hi is not None:
        frequency, tol = 0.5 * (f_lo + f_hi), (f_hi - f_lo) / (f_hi + f_lo)
    else:
        frequency = f_lo
    d_lo, d_hi = parse_range(args.duty, "--duty", "%")
    duty: dict[str, Any] = {"duty": d_lo} if d_hi is None else {"duty_min": d_lo, "duty_max": d_hi}
    criterion, min_yield = _criterion(args.criterion)
    try:
        req = Requirements(frequency=frequency, frequency_tolerance=tol, criterion=criterion, min_yield=min_yield,
                           flicker=args.flicker, **duty)
    except DesignError as exc:
        raise DesignError(f"{exc} (from --frequency/--tolerance/--duty/--criterion)") from None
    vcc = float(parse_value(args.vcc, "V", name="--vcc"))
    v_lo, v_hi = (parse_range(args.vcc_range, "--vcc-range", "V") if args.vcc_range else (vcc, vcc))
    t_lo, t_hi = parse_range(args.ambient, "--ambient", "°C") if args.ambient else (0.0, 40.0)
    if t_hi is None:
        t_hi = t_lo
    topology = args.topology if args.topology != "any" else ("pot" if d_hi is not None else "steered")
    timing = Timing(topology=topology, pot=50e3 if topology == "pot" else None, wiper=0.5 if topology == "pot" else None,
                    timer=args.timer, r_series=args.series, c_series=args.c_series,
                    pot_tolerance=parse_range(args.pot_tolerance, "--pot-tolerance", "%")[0])
    load = None
    kind = getattr(args, "load", None)
    if kind == "led":
        from .loads.led import TYPICAL_VF

        if args.colour not in TYPICAL_VF:
            raise DesignError(f"--colour: {args.colour!r} is not a known LED colour; allowed: {', '.join(TYPICAL_VF)}")
        load = LedLoad(n_series=args.leds, n_parallel=args.strings, vf=parse_value(args.vf, "V", name="--vf"),
                       r_series=parse_value(args.led_resistor, "Ω", name="--led-resistor"), colour=args.colour)
    elif kind == "motor":
        load = MotorLoad(r=parse_value(args.motor_r, "Ω", name="--motor-r"), l=parse_value(args.motor_l, "H", name="--motor-l"),
                         ke=parse_value(args.motor_ke, "V·s/rad", name="--motor-ke"),
                         j=parse_value(args.motor_j, "kg·m²", name="--motor-j"),
                         t_load=parse_value(args.motor_torque, "N·m", name="--motor-torque"))
    t_nom = min(max(25.0, t_lo), t_hi)
    v_min, v_max = v_lo, (v_hi if v_hi is not None else v_lo)
    d = Design(name=name, vcc=vcc, vcc_min=v_min, vcc_max=v_max, timing=timing, load=load, switch=Switch(),
               freewheel=Freewheel(), t_ambient_c=t_nom, t_ambient_min_c=t_lo, t_ambient_max_c=t_hi, requirements=req,
               notes=getattr(args, "notes", "") or "")
    return replace(d)


def _progress_printer(label: str) -> Any:
    start = time.perf_counter()
    last = [0.0]

    def show(fraction: float, stage: str) -> None:
        now = time.perf_counter()
        if now - start >= 0.5 and (now - last[0] >= 0.5 or fraction >= 1.0):
            last[0] = now
            print(f"pwmkit {label}: {100 * fraction:5.1f} % — {stage}", file=sys.stderr, flush=True)

    return show


def _run_search(args: argparse.Namespace, name: str = "design") -> tuple[Any, Any]:
    from .shortlist import shortlist

    design = design_from_options(args, name)
    result = shortlist(design, topology=args.topology, top=args.top, n_yield=args.samples, seed=args.seed,
                       progress=_progress_printer(args.command))
    return design, result


def _table(result: Any) -> str:
    from .values import format_value

    head = ("#", "ok", "topology", "parts", "frequency (corners)", "duty (corners)", "yield", "n", "DIS peak")
    rows = []
    for r in result:
        s = r.spread
        duty = (f"reach {100 * s.duty_low:.3g}…{100 * s.duty_high:.3g} %" if s.duty_kind == "reach"
                else f"{100 * s.duty_low:.4g}…{100 * s.duty_high:.4g} %")
        rows.append((str(r.rank), "yes" if r.meets else "no", r.design.timing.topology, r.values_text(),
                     f"{format_value(s.frequency_low, 'Hz', 3)}…{format_value(s.frequency_high, 'Hz', 3)}", duty,
                     f"{100 * r.yield_:.1f} %", str(r.part_count), format_value(r.discharge_current, "A", 3)))
    widths = [max(len(x[i]) for x in [head, *rows]) for i in range(len(head))]
    lines = ["  ".join(c.ljust(w) for c, w in zip(row, widths)).rstrip() for row in [head, *rows]]
    lines.insert(1, "  ".join("-" * w for w in widths))
    return "\n".join(lines)


def _find(args: argparse.Namespace) -> int:
    design, result = _run_search(args)
    rows = [r.row() for r in result]
    if args.json:
        doc = {"format": "pwmkit-find", "version": 1, "found": result.found, "criterion": result.criterion,
               "searched": result.searched, "seconds": round(result.elapsed, 3), "sets": rows,
               "nearest_miss": None if result.found else result.nearest_miss()}
        print(json.dumps(doc, indent=2, ensure_ascii=False, allow_nan=False))
    elif args.csv:
        buf = io.StringIO()
        fields = list(rows[0]) if rows else ["rank"]
        writer = csv.DictWriter(buf, fieldnames=fields, lineterminator="\n")
        writer.writeheader()
        for row in rows:
            writer.writerow({k: ("" if v is None else v) for k, v in row.items()})
        sys.stdout.write(buf.getvalue())
    else:
        r = design.requirements
        print(f"target: {_target_text(design)}; criterion {r.criterion_text()} — {result.searched:,} combinations "
              f"searched in {result.elapsed:.2f} s")
        if result:
            print(_table(result))
    if not result.found:
        print(f"pwmkit find: no part set meets the requirement ({result.criterion}); {result.nearest_miss()}",
              file=sys.stderr)
        return 1
    return 0


def _target_text(design: Any) -> str:
    from .record.record_notebook import requirement_rows

    return "; ".join(f"{k} {v}" for k, v in requirement_rows(design) if k != "acceptance criterion")


def _other_sets_comment(result: Any, chosen: int) -> str:
    lines = ["", "# Part sets found by `pwmkit new` for these requirements (the chosen one is marked *).",
             f"# criterion: {result.criterion}; frequency and duty over the tolerance corners; yield = Monte Carlo."]
    for r in result:
        s = r.spread
        mark = "*" if r.rank == chosen else " "
        lines.append(f"# {mark}{r.rank:>2} {r.design.timing.topology:8} {r.values_text()} | f {s.frequency_low:.5g} … "
                     f"{s.frequency_high:.5g} Hz | duty {100 * s.duty_low:.4g} … {100 * s.duty_high:.4g} % | "
                     f"yield {100 * r.yield_:.1f} % | {'meets' if r.meets else 'misses: ' + r.why}")
    return "\n".join(line.replace("\n", " ") for line in lines) + "\n"


def _new(args: argparse.Namespace) -> int:
    import nbformat

    from .record.designfile import design_from_toml, design_to_toml
    from .record.files import atomic_write
    from .record.record_notebook import record_notebook

    if not _NAME.match(args.name or ""):
        raise DesignError(f"NAME: {args.name!r} is not allowed; use letters, digits, '.', '_' and '-' (up to 100, "
                          "starting with a letter or digit)")
    folder = Path(args.dir)
    if folder.exists() and not folder.is_dir():
        raise DesignError(f"--dir: {folder} is not a folder")
    toml_path, nb_path = folder / f"{args.name}.toml", folder / f"{args.name}.ipynb"
    for p in (toml_path, nb_path):
        if p.exists() and not args.force:
            raise DesignError(f"{p}: already exists; use --force to replace it")
    if args.load is None:
        raise DesignError("--load: give led or motor (the load the driver switches)")
    design, result = _run_search(args, args.name)
    if not result.found:
        print(f"pwmkit new: no part set meets the requirement ({result.criterion}); {result.nearest_miss()}; "
              "nothing written", file=sys.stderr)
        return 1
    if not 1 <= args.pick <= len(result):
        raise DesignError(f"--pick: {args.pick} is not allowed; the search found {len(result)} set(s)")
    chosen = result[args.pick - 1]
    if not chosen.meets:
        print(f"pwmkit new: note: set {args.pick} does not meet the requirement: {chosen.why}", file=sys.stderr)
    final = chosen.design.replace(notes=(design.notes or f"{args.name}: made by pwmkit new from the requirements "
                                         f"({result.criterion})."))
    text = design_to_toml(final) + _other_sets_comment(result, chosen.rank)
    design_from_toml(text, source=str(toml_path))  # the file must read back (part and colour names …)
    folder.mkdir(parents=True, exist_ok=True)
    atomic_write(toml_path, text, force=args.force)
    atomic_write(nb_path, nbformat.writes(record_notebook(toml_path.name, args.name)), force=args.force)
    print(f"chose set {chosen.rank}: {chosen.values_text()}")
    print(toml_path)
    print(nb_path)
    return 0


def _search_options(p: argparse.ArgumentParser) -> None:
    from .shortlist import TOPOLOGY_CHOICES

    p.add_argument("--frequency", required=True, metavar="F", help="target frequency, e.g. 25k, or a window 20k..30k")
    p.add_argument("--tolerance", default=None, metavar="PCT", help="frequency window ± (default 10%%)")
    p.add_argument("--duty", required=True, metavar="D", help="duty target (30%%) or the range to reach (20..90%%)")
    p.add_argument("--vcc", required=True, metavar="V", help="nominal supply, e.g. 12")
    p.add_argument("--vcc-range", default=None, metavar="LO..HI", help="supply range (default: the nominal only)")
    p.add_argument("--ambient", default=None, metavar="LO..HI", help="ambient range in °C (default 0..40)")
    p.add_argument("--timer", default="bipolar", choices=("bipolar", "cmos"), help="timer family (default bipolar)")
    p.add_argument("--topology", default="any", choices=TOPOLOGY_CHOICES, help="topology (default any)")
    p.add_argument("--series", default="E24", help="resistor series (default E24)")
    p.add_argument("--c-series", default="E12", help="capacitor series (default E12)")
    p.add_argument("--pot-tolerance", default="20%", metavar="PCT", help="potentiometer tolerance (default 20%%)")
    p.add_argument("--criterion", default="worst-case", metavar="C",
                   help="worst-case (every corner inside, default) or yield:PERCENT, e.g. yield:99")
    p.add_argument("--flicker", default=None, choices=("no-effect", "low-risk"), help="IEEE 1789 region wanted (LED)")
    p.add_argument("--top", type=int, default=10, help="sets to list (default 10)")
    p.add_argument("--samples", type=int, default=2000, help="Monte Carlo samples per set (default 2000)")
    p.add_argument("--seed", type=int, default=1, help="Monte Carlo seed (default 1)")


def add_commands(sub: Any) -> None:
    """Register ``find`` and ``new`` on the ``pwmkit`` sub-command parser."""
    p = sub.add_parser("find", help="ranked preferred-value part sets for a frequency and duty",
                       description="Search preferred-value part sets for the target and judge each over the "
                                   "tolerance corners and by Monte Carlo. Exit 0 when a set meets the criterion, 1 "
                                   "when none does (the nearest miss is printed), 2 for bad input.")
    _search_options(p)
    fmt = p.add_mutually_exclusive_group()
    fmt.add_argument("--json", action="store_true", help="print one JSON document")
    fmt.add_argument("--csv", action="store_true", help="print CSV rows")
    p.set_defaults(handler=_find)

    p = sub.add_parser("new", help="make NAME.toml and its record notebook NAME.ipynb from requirements",
                       description="Run the part search and write the chosen set, the requirements and the load to "
                                   "NAME.toml (every other set as a comment) and a record notebook NAME.ipynb that "
                                   "loads it. Existing files are replaced only with --force.")
    p.add_argument("name", metavar="NAME", help="design name and file stem")
    _search_options(p)
    p.add_argument("--load", choices=("led", "motor"), default=None, help="the load the driver switches")
    p.add_argument("--leds", type=int, default=3, help="LED: LEDs per string (default 3)")
    p.add_argument("--strings", type=int, default=1, help="LED: strings in parallel (default 1)")
    p.add_argument("--vf", default="3.1", help="LED: forward voltage per LED (default 3.1 V)")
    p.add_argument("--led-resistor", default="130", help="LED: series resistor per string (default 130 Ω)")
    p.add_argument("--colour", default="white", help="LED: colour name (default white)")
    p.add_argument("--motor-r", default="1.5", help="motor: armature resistance (default 1.5 Ω)")
    p.add_argument("--motor-l", default="1m", help="motor: armature inductance (default 1 mH)")
    p.add_argument("--motor-ke", default="0.01", help="motor: back-EMF constant V·s/rad (default 0.01)")
    p.add_argument("--motor-j", default="10u", help="motor: inertia kg·m² (default 10 µ)")
    p.add_argument("--motor-torque", default="0", help="motor: load torque N·m (default 0)")
    p.add_argument("--notes", default="", help="notes for the record")
    p.add_argument("--dir", default=".", help="folder for NAME.toml and NAME.ipynb (default .)")
    p.add_argument("--pick", type=int, default=1, help="rank of the set to use (default 1, the best)")
    p.add_argument("--force", action="store_true", help="replace existing files")
    p.set_defaults(handler=_new)
