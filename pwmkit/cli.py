"""Command line ``pwmkit`` (presentation layer).

Subcommands:

``demo``
    print the demo designs' exact timing next to the textbook ``ln 2`` (0.693) estimate.
``check DESIGN.toml…``
    evaluate design files and print the design-rule findings (``--json`` for a JSON document).
``rerun NOTEBOOK.ipynb…``
    execute saved design notebooks again and report drift of their recorded key results.
``export DESIGN.toml --formulas/--bom/--report/--netlist [FILE]``
    write the formula sheet, the bill of materials, the HTML report or the SPICE netlist, inside
    ``--out-dir`` only.
``verify DESIGN.toml…``
    simulate each design's circuit in ngspice and print model vs circuit (:mod:`pwmkit.cli_verify`).
``bench add DESIGN.toml CAPTURE.csv`` / ``bench show DESIGN.toml``
    keep bench readings and scope captures with a design file and compare them with the design
    (:mod:`pwmkit.cli_bench`).
``find``, ``new NAME``
    ranked part sets for a target; a design file and record notebook of your own
    (:mod:`pwmkit.cli_design`).
``lab``
    copy the notebooks into a working folder and open JupyterLab on the design notebook (or, with
    no display, run it headless and write an HTML copy).

Exit status: 0 — fine; 1 — a design fails a rule, results drifted, or a notebook failed to run;
2 — bad input (missing file, invalid design, bad option); 3 — an internal error (set
``PWMKIT_DEBUG=1`` for the traceback). Errors are printed as one line (``pwmkit: error: …``);
progress goes to standard error, results to standard output.
"""

from __future__ import annotations

import argparse
import json
import os
import shutil
import sys
import textwrap
from collections.abc import Sequence
from pathlib import Path
from typing import Any

from .errors import DesignError

__all__ = ["main", "build_parser", "FORMULA_SUFFIXES"]

#: File suffix → formula-sheet format of ``pwmkit export --formulas``.
FORMULA_SUFFIXES = {".md": "markdown", ".tex": "latex", ".txt": "unicode", ".py": "python", ".c": "c"}


def _terminal_safe(text: str) -> str:
    """``text`` with control characters (ANSI escapes, bidi overrides …) written as visible escapes.

    File names on the command line and in messages come from the user's disk; printing them raw
    could move the cursor, recolour the terminal or reorder the text.
    """
    out = []
    for ch in str(text):
        code = ord(ch)
        if code < 0x20 and ch != "\n" or 0x7F <= code < 0xA0 or 0x202A <= code <= 0x202E or 0x2066 <= code <= 0x2069 \
                or code in (0x061C, 0x200E, 0x200F, 0x2028, 0x2029):
            out.append(f"\\x{code:02x}" if code < 0x100 else f"\\u{code:04x}")
        else:
            out.append(ch)
    return "".join(out)


def _progress(text: str) -> None:
    print(_terminal_safe(text), file=sys.stderr, flush=True)


# ------------------------------------------------------------------------------------------------
# demo
# ------------------------------------------------------------------------------------------------
def _demo(args: argparse.Namespace) -> int:
    from .design import demo_designs
    from .glossary import ESTIMATE, EXACT, timer_label, topology_label
    from .numstyle import screen
    from .timing import astable_ideal
    from .values import format_value

    designs = demo_designs()
    print("pwmkit demo — 12 V greenhouse propagator (demo values)\n")
    for name, d in designs.items():
        t = d.timing
        if t.topology == "two-timer":
            from .cli_two_timer import demo_lines

            print("\n".join(demo_lines(name, d)))
            continue
        exact = d.astable()
        kw = dict(ra=t.ra, rb=t.rb, c=t.c, vcc=d.vcc)
        if t.topology == "pot":
            kw.update(pot=t.pot, wiper=t.wiper)
        ideal = astable_ideal(t.topology, **kw)
        parts = f"ra {format_value(t.ra, 'Ω')}, rb {format_value(t.rb, 'Ω')}, c {format_value(t.c, 'F')}"
        if t.topology == "pot":
            parts += f", pot {format_value(t.pot, 'Ω')} at wiper {screen(t.wiper, 'wiper')}"
        print(f"[{name}] {topology_label(t.topology)} topology, {timer_label(t.timer)} timer, "
              f"supply {format_value(d.vcc, 'V')}: {parts}")
        print(f"  {'':14}{EXACT:>14}{ESTIMATE:>18}{'difference':>12}")
        rows = [
            ("t_high", exact.t_high, ideal.t_high, "s"),
            ("t_low", exact.t_low, ideal.t_low, "s"),
            ("frequency", exact.frequency, ideal.frequency, "Hz"),
        ]
        for label, a, b, unit in rows:
            print(f"  {label:14}{screen(a, unit):>14}{screen(b, unit):>18}{screen(a / b - 1, 'relative'):>12}")
        print(f"  {'duty':14}{screen(exact.duty, 'duty'):>14}{screen(ideal.duty, 'duty'):>18}"
              f"{screen(exact.duty - ideal.duty, 'points'):>12}\n")
    from .glossary import ESTIMATE_NOTE, EXACT_NOTE, POINTS, POINTS_LONG

    print(f"{EXACT}: {EXACT_NOTE};\n{ESTIMATE}: {ESTIMATE_NOTE}.\nDuty differences in {POINTS_LONG} ({POINTS}). "
          "Verify every design on the bench.")
    return 0


# ------------------------------------------------------------------------------------------------
# check
# ------------------------------------------------------------------------------------------------
_SEVERITY_WORD = {"fail": "FAIL", "warn": "WARN", "ok": "ok"}


def findings_table(findings: Any, width: int | None = None) -> str:
    """Plain-text, aligned table of findings (fail first, then warn, then ok; rule order within)."""
    from .record.report import finding_value_text as _finding_number

    order = {"fail": 0, "warn": 1, "ok": 2}
    items = sorted(findings, key=lambda f: order.get(f.severity, 3))
    from .glossary import bound_word

    rows = [(_SEVERITY_WORD.get(f.severity, f.severity), f.id, _finding_number(f.value, f.unit),
             "—" if f.limit is None else f"{bound_word(f.id)} {_finding_number(f.limit, f.unit)}",
             f.explanation + (f" Remedy: {f.remedy}" if f.remedy and f.severity != "ok" else "")) for f in items]
    head = ("severity", "rule", "value", "compared with", "explanation")
    widths = [max(len(r[i]) for r in [head, *rows]) for i in range(4)]
    total = width or shutil.get_terminal_size((110, 24)).columns
    indent = sum(widths) + 2 * 4 + 2
    text_width = max(30, total - indent)
    lines = []
    for i, r in enumerate([head, *rows]):
        cells = "  ".join(c.ljust(w) for c, w in zip(r[:4], widths))
        wrapped = textwrap.wrap(r[4], text_width) or [""]
        lines.append(f"  {cells}  {wrapped[0]}")
        lines += [" " * indent + w for w in wrapped[1:]]
        if i == 0:
            lines.append("  " + "  ".join("-" * w for w in widths) + "  " + "-" * min(text_width, 40))
    return "\n".join(lines)


def _check(args: argparse.Namespace) -> int:
    from .evaluate import evaluate
    from .record.designfile import load_design

    code = 0
    report: list[dict[str, Any]] = []
    for name in args.designs:
        _progress(f"pwmkit check: {name} …")
        try:
            design = load_design(name)
            ev = evaluate(design, spread=not args.quick, n_mc=args.n_mc, seed=args.seed)
        except DesignError as exc:
            msg = str(exc) if str(exc).startswith(str(name)) else f"{name}: {exc}"
            print(f"pwmkit: error: {_terminal_safe(msg)}", file=sys.stderr)
            report.append({"file": str(name), "error": msg})
            code = max(code, 2)
            continue
        fs = ev.findings
        if fs.fail_count:
            code = max(code, 1)
        if args.json:
            report.append({"file": str(name), "name": design.name, "fail_count": fs.fail_count,
                           "warn_count": fs.warn_count, "ok_count": fs.ok_count, "not_run_count": fs.not_run_count,
                           "worst": fs.worst,
                           "key_results": ev.key_results(), "findings": fs.as_rows()})
            continue
        t = ev.timing
        from .glossary import plural, severity_count, topology_label
        from .numstyle import screen

        print(f"{_terminal_safe(name)} — {design.name}: {topology_label(design.timing.topology)} topology, "
              f"{screen(t.frequency, 'Hz')}, duty {screen(t.duty, 'duty')}; {severity_count('fail', fs.fail_count)}, "
              f"{severity_count('warn', fs.warn_count)}, {severity_count('ok', fs.ok_count)}"
              + (f", {plural(fs.not_run_count, 'check')} not run (--quick)" if fs.not_run_count else ""))
        shown = [f for f in fs if f.severity != "ok"] if args.brief else list(fs)
        if shown:
            print(findings_table(shown))
        verdict = "FAILS" if fs.fail_count else "passes"
        print(f"  → {design.name} {verdict} the design-rule checks.\n")
    if args.json:
        doc = {"format": "pwmkit-check", "version": 1, "exit_status": code, "designs": report}
        print(json.dumps(doc, indent=2, ensure_ascii=False, allow_nan=False))
    return code


# ------------------------------------------------------------------------------------------------
# rerun
# ------------------------------------------------------------------------------------------------
def _rerun(args: argparse.Namespace) -> int:
    from .record.rerun import rerun_notebook

    if not (args.rtol >= 0 and args.atol >= 0):
        raise DesignError(f"--rtol/--atol: {args.rtol!r}/{args.atol!r} are not allowed; give numbers >= 0")
    code = 0
    for name in args.notebooks:
        _progress(f"pwmkit rerun: {name} …")
        outcome = rerun_notebook(name, rtol=args.rtol, atol=args.atol, timeout=args.timeout, update=args.update,
                                 kernel=args.kernel)
        if outcome.status in ("error", "unrecorded", "unreadable"):  # errors on stderr only, once
            print(f"pwmkit: error: {_terminal_safe(outcome.message)}", file=sys.stderr)
        else:
            print(_terminal_safe(outcome.message) + (f" [{outcome.seconds:.1f} s]" if outcome.seconds else ""))
        for drift in outcome.drifts:
            print(f"  {drift.describe()}")
        code = max(code, outcome.exit_status)
    return code


# ------------------------------------------------------------------------------------------------
# export
# ------------------------------------------------------------------------------------------------
def _export(args: argparse.Namespace) -> int:
    from .record.designfile import load_design
    from .record.files import atomic_write, contained_path, slug

    if args.formulas is None and args.bom is None and args.report is None and args.netlist is None:
        raise DesignError("export: nothing to do; give --formulas, --bom, --report and/or --netlist")
    out_dir = Path(args.out_dir)
    if out_dir.exists() and not out_dir.is_dir():
        raise DesignError(f"--out-dir: {out_dir} is not a folder")
    design = load_design(args.design)
    stem = slug(design.name)
    jobs: list[tuple[str, Path]] = []
    for kind, given, suffix in (("formulas", args.formulas, ".md"), ("bom", args.bom, ".csv"),
                                ("report", args.report, ".html"), ("netlist", args.netlist, ".cir")):
        if given is None:
            continue
        name = given if given else f"{stem}-{kind}{suffix}"
        out_dir.mkdir(parents=True, exist_ok=True)
        target = contained_path(name, out_dir, what=f"--{kind}")
        if kind == "formulas" and target.suffix.lower() not in FORMULA_SUFFIXES:
            raise DesignError(f"--formulas: {name!r} has no known suffix; allowed: {', '.join(FORMULA_SUFFIXES)}")
        if kind == "bom" and target.suffix.lower() != ".csv":
            raise DesignError(f"--bom: {name!r} is not allowed; give a .csv file name")
        if kind == "report" and target.suffix.lower() not in (".html", ".htm"):
            raise DesignError(f"--report: {name!r} is not allowed; give a .html file name")
        if kind == "netlist" and target.suffix.lower() not in (".cir", ".sp", ".net"):
            raise DesignError(f"--netlist: {name!r} is not allowed; give a .cir, .sp or .net file name")
        if target.exists() and not args.force:
            raise DesignError(f"{target}: already exists; use --force to replace it")
        jobs.append((kind, target))
    evaluation = None
    if any(kind in ("bom", "report") for kind, _ in jobs):
        from .evaluate import evaluate

        _progress(f"pwmkit export: evaluating {design.name} …")
        evaluation = evaluate(design, spread=not args.quick)
    for kind, target in jobs:
        _progress(f"pwmkit export: writing {target} …")
        if kind == "formulas":
            from .record.formulas import formula_sheet

            atomic_write(target, formula_sheet(design, FORMULA_SUFFIXES[target.suffix.lower()]), force=args.force)
        elif kind == "netlist":
            from .cli_verify import write_netlist

            write_netlist(design, target, force=args.force)
        elif kind == "bom":
            from .record.bom import bom_csv

            atomic_write(target, bom_csv(design, evaluation), force=args.force)
        else:
            from .record.report import write_report

            write_report(design, target, evaluation=evaluation, force=args.force, source=args.design)
        print(target)
    return 0


# ------------------------------------------------------------------------------------------------
# lab
# ------------------------------------------------------------------------------------------------
def _note_root(cmd: list[str]) -> None:
    """Say so when JupyterLab is started with ``--allow-root`` (the effective user is root)."""
    if "--allow-root" in cmd:
        _progress("pwmkit lab: running as root, so JupyterLab gets --allow-root (it refuses root otherwise)")


def _lab(args: argparse.Namespace) -> int:
    import subprocess

    from .record import notebooks as nbs

    folder = Path(args.dir)
    actions = nbs.copy_notebooks(folder, force=args.force, source=args.source)
    actions += nbs.copy_examples(folder, force=args.force)  # the design files the notebook reads
    for a in actions:
        note = {"copied": "copied", "unchanged": "up to date", "replaced": "replaced (--force)",
                "kept": "kept your edited copy (--force replaces it)"}[a.action]
        _progress(f"pwmkit lab: {a.path}: {note}")
    main_nb = folder / nbs.MAIN_NOTEBOOK
    if not main_nb.is_file():
        raise DesignError(f"{main_nb}: the design notebook is missing from the notebooks folder")
    headless = args.headless if args.headless is not None else not nbs.display_available()
    if not headless:
        cmd = nbs.lab_command(folder.resolve())
        _note_root(cmd)
        _progress("pwmkit lab: starting JupyterLab (stop it with Ctrl-C): " + " ".join(cmd))
        try:
            return subprocess.call(cmd)
        except FileNotFoundError:
            raise DesignError("jupyter lab: not installed; pip install 'pwmkit[lab]'") from None
        except KeyboardInterrupt:  # pragma: no cover - interactive
            return 0
    _progress(f"pwmkit lab: no display — running {main_nb} headless …")
    run = nbs.execute_notebook(nbs.read_notebook(main_nb), cwd=folder.resolve(), timeout=args.timeout)
    if run.error is not None:
        print(f"pwmkit: error: {main_nb}: {run.error}", file=sys.stderr)
        return 1
    from .record.files import atomic_write
    from .record.results import payloads_in_notebook

    html_path = main_nb.with_suffix(".html")
    atomic_write(html_path, nbs.notebook_html(run.notebook), force=True)
    print(f"HTML copy of the executed notebook: {html_path.resolve()}  [{run.seconds:.1f} s]")
    import nbformat  # the executed notebook, with its recorded results, for `pwmkit rerun`

    atomic_write(main_nb, nbformat.writes(run.notebook), force=True)
    print(f"executed notebook with its recorded results: {main_nb.resolve()} (check it with: pwmkit rerun {main_nb})")
    for design_name, results in payloads_in_notebook(run.notebook).items():
        print(f"\nkey results of {design_name!r}:")
        width = max((len(k) for k in results), default=0)
        for key, value in results.items():
            shown = f"{value + 0.0:.6g}" if isinstance(value, float) else str(value)  # no "-0"
            print(f"  {key:<{width}}  {shown}")
    return 0


# ------------------------------------------------------------------------------------------------
# parser and entry point
# ------------------------------------------------------------------------------------------------
def _whole(low: int, high: int) -> Any:
    """argparse type: a whole number in low … high (else a usage error, exit status 2)."""
    def read(text: str) -> int:
        try:
            v = int(text.strip(), 10)
        except ValueError:
            raise argparse.ArgumentTypeError(f"{text[:40]!r} is not a whole number") from None
        if not low <= v <= high:
            raise argparse.ArgumentTypeError(f"{text[:40]!r} is out of range; allowed {low} … {high}")
        return v

    read.__name__ = "whole number"
    return read


def _positive_float(text: str) -> float:
    try:
        v = float(text)
    except ValueError:
        raise argparse.ArgumentTypeError(f"{text!r} is not a number") from None
    if not (v > 0 and v < float("inf")):
        raise argparse.ArgumentTypeError(f"{text!r} is not allowed; give a number > 0")
    return v


def _nonneg_float(text: str) -> float:
    try:
        v = float(text)
    except ValueError:
        raise argparse.ArgumentTypeError(f"{text!r} is not a number") from None
    if not (v >= 0 and v < float("inf")):
        raise argparse.ArgumentTypeError(f"{text!r} is not allowed; give a number >= 0")
    return v


def build_parser() -> argparse.ArgumentParser:
    parser = argparse.ArgumentParser(
        prog="pwmkit", description="Design aid for 555-type astable PWM drivers.",
        epilog="Exit status: 0 fine, 1 a check failed / results drifted / a notebook failed, 2 bad input "
               "(missing or unreadable file, invalid design, bad option), 3 internal error.")
    sub = parser.add_subparsers(dest="command", metavar="COMMAND")

    p = sub.add_parser("demo", help="print the demo designs' exact timing next to the 0.693 estimate")
    p.set_defaults(handler=_demo)

    p = sub.add_parser("check", help="evaluate design files and list the design-rule findings",
                       description="Evaluate each design file and print its design-rule findings. Exit 1 when a "
                                   "design fails a rule, 2 when a file cannot be read.")
    p.add_argument("designs", nargs="+", metavar="DESIGN.toml", help="design files (format pwmkit-design)")
    p.add_argument("--json", action="store_true", help="print one JSON document (key results and findings)")
    p.add_argument("--brief", action="store_true", help="list only failed and warning rules")
    p.add_argument("--quick", action="store_true", help="skip the tolerance analysis (Monte Carlo, worst case)")
    p.add_argument("--n-mc", type=_whole(100, 2_000_000), default=20_000, metavar="N",
                   help="Monte Carlo samples, 100 … 2000000 (default 20000)")
    p.add_argument("--seed", type=_whole(0, 2**63 - 1), default=1, help="Monte Carlo seed, a whole number >= 0 (default 1)")
    p.set_defaults(handler=_check)

    p = sub.add_parser("rerun", help="re-run saved design notebooks and report drift of their recorded results",
                       description="Execute each saved notebook headless and compare the key results it recorded "
                                   "(pwmkit.record.record_results) with fresh ones. Writes nothing unless --update.")
    p.add_argument("notebooks", nargs="+", metavar="NOTEBOOK.ipynb")
    p.add_argument("--rtol", type=_nonneg_float, default=1e-6, help="relative tolerance for numbers (default 1e-6)")
    p.add_argument("--atol", type=_nonneg_float, default=0.0, help="absolute tolerance for numbers (default 0)")
    p.add_argument("--timeout", type=_positive_float, default=600.0, help="seconds one cell may run (default 600)")
    p.add_argument("--kernel", default="python3", help="Jupyter kernel (default python3)")
    p.add_argument("--update", action="store_true",
                   help="write the freshly executed notebook back in place (records new results)")
    p.set_defaults(handler=_rerun)

    p = sub.add_parser("export", help="write a design's formula sheet, bill of materials or HTML report",
                       description="Write outputs for one design file. Output names are relative to --out-dir and "
                                   "may not leave it. Without a name, one is made from the design name. The "
                                   "formula format follows the suffix: " + ", ".join(
                                       f"{k} {v}" for k, v in FORMULA_SUFFIXES.items()) + ".")
    p.add_argument("design", metavar="DESIGN.toml")
    p.add_argument("--formulas", nargs="?", const="", metavar="FILE", help="formula sheet (.md .tex .txt .py .c)")
    p.add_argument("--bom", nargs="?", const="", metavar="FILE", help="bill of materials (.csv)")
    p.add_argument("--report", nargs="?", const="", metavar="FILE", help="self-contained HTML report (.html)")
    p.add_argument("--netlist", nargs="?", const="", metavar="FILE", help="SPICE netlist for ngspice (.cir)")
    p.add_argument("--out-dir", default=".", metavar="DIR", help="folder for the outputs (default: .)")
    p.add_argument("--force", action="store_true", help="replace existing output files")
    p.add_argument("--quick", action="store_true", help="skip the tolerance analysis in the report")
    p.set_defaults(handler=_export)

    p = sub.add_parser("lab", help="open the design notebooks in JupyterLab (or run them headless)",
                       description="Copy the notebooks into a working folder (your edited copies are kept unless "
                                   "--force) and start JupyterLab on the design notebook, listening on 127.0.0.1 "
                                   "only. With no display ($DISPLAY, $WAYLAND_DISPLAY and $BROWSER unset on Linux) "
                                   "or with --headless, run the notebook and write an HTML copy instead.")
    p.add_argument("--dir", default="pwmkit-notebooks", help="working folder (default ./pwmkit-notebooks)")
    p.add_argument("--force", action="store_true",
                   help="replace edited copies with the packaged notebooks and example design files")
    mode = p.add_mutually_exclusive_group()
    mode.add_argument("--headless", dest="headless", action="store_true", default=None,
                      help="run the design notebook and write HTML, do not start JupyterLab")
    mode.add_argument("--browser", dest="headless", action="store_false",
                      help="start JupyterLab even when no display is detected")
    p.add_argument("--timeout", type=_positive_float, default=600.0, help="seconds one cell may run (headless)")
    p.add_argument("--source", default=None, help=argparse.SUPPRESS)  # tests: another notebooks folder
    p.set_defaults(handler=_lab)

    from .cli_bench import register_bench

    register_bench(sub)

    from .cli_design import add_commands  # find, new

    add_commands(sub)

    from .cli_verify import add_verify_parser

    add_verify_parser(sub)
    return parser


def main(argv: Sequence[str] | None = None) -> int:
    """Run the command line; returns the exit status (never raises for user errors)."""
    parser = build_parser()
    try:
        args = parser.parse_args(argv)
    except SystemExit as exc:  # argparse: --help (0) or a usage error (2)
        return int(exc.code) if isinstance(exc.code, int) else 2
    handler = getattr(args, "handler", None)
    if handler is None:
        parser.print_help()
        return 2
    try:
        return int(handler(args))
    except DesignError as exc:
        print(f"pwmkit: error: {_terminal_safe(str(exc))}", file=sys.stderr)
        return 2
    except BrokenPipeError:  # output piped into e.g. `head`, which stopped reading: not an error
        try:
            devnull = os.open(os.devnull, os.O_WRONLY)
            os.dup2(devnull, sys.stdout.fileno())
        except (OSError, ValueError):  # pragma: no cover - stdout without a file descriptor
            pass
        return 0
    except OSError as exc:
        where = f"{exc.filename}: " if getattr(exc, "filename", None) else ""
        print(f"pwmkit: error: {_terminal_safe(where)}{exc.strerror or exc}", file=sys.stderr)
        return 2
    except KeyboardInterrupt:  # pragma: no cover - interactive
        print("pwmkit: interrupted", file=sys.stderr)
        return 130
    except Exception as exc:
        if os.environ.get("PWMKIT_DEBUG"):
            raise
        print(f"pwmkit: internal error: {type(exc).__name__}: {_terminal_safe(str(exc))} (set PWMKIT_DEBUG=1 for "
              "the traceback)",
              file=sys.stderr)
        return 3


if __name__ == "__main__":  # pragma: no cover
    sys.exit(main())
