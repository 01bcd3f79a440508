"""``pwmkit verify`` and ``pwmkit export --netlist`` (presentation layer).

``verify DESIGN.toml… [--json] [--what timing|driver]``
    build each design's netlist, run it in ngspice and print model vs circuit with the relative
    differences and pass/fail against the stated tolerances (:func:`pwmkit.netlist.verify`).
    Exit 0 all pass, 1 a quantity is outside its tolerance, 2 bad input or ngspice missing (one
    line says how to install it).
"""

from __future__ import annotations

import argparse
import json
import sys
from pathlib import Path
from typing import Any

from .errors import DesignError

__all__ = ["add_verify_parser", "write_netlist"]


def _verify(args: argparse.Namespace) -> int:
    from .netlist import find_ngspice
    from .netlist.ngspice import INSTALL_HINT
    from .record.designfile import load_design

    if find_ngspice() is None:
        print(f"pwmkit: error: {INSTALL_HINT}", file=sys.stderr)
        return 2
    from .netlist import verify

    code = 0
    report: list[dict[str, Any]] = []
    for name in args.designs:
        print(f"pwmkit verify: {name} …", file=sys.stderr, flush=True)
        try:
            design = load_design(name)
            result = verify(design, what=args.what)
        except DesignError as exc:
            msg = str(exc) if str(exc).startswith(str(name)) else f"{name}: {exc}"
            print(f"pwmkit: error: {msg}", file=sys.stderr)
            report.append({"file": str(name), "error": msg})
            code = max(code, 2)
            continue
        if not result.passed:
            code = max(code, 1)
        if args.json:
            report.append({"file": str(name), **result.to_dict()})
            continue
        print(f"{name} — {design.name}: {result.what} netlist in ngspice")
        print(result.table() + "\n")
    if args.json:
        doc = {"format": "pwmkit-verify", "version": 1, "exit_status": code, "designs": report}
        print(json.dumps(doc, indent=2, ensure_ascii=False, allow_nan=False))
    return code


def add_verify_parser(sub: Any) -> None:
    """Register the ``verify`` subcommand."""
    p = sub.add_parser("verify", help="cross-check designs with an ngspice simulation of their circuit",
                       description="Build each design's SPICE netlist, simulate it in ngspice and print pwmkit's "
                                   "figures next to the circuit's, with relative differences and pass/fail against "
                                   "stated tolerances. Exit 1 when a quantity is outside its tolerance, 2 when a "
                                   "file cannot be read or ngspice is not installed.")
    p.add_argument("designs", nargs="+", metavar="DESIGN.toml", help="design files (format pwmkit-design)")
    p.add_argument("--json", action="store_true", help="print one JSON document")
    p.add_argument("--what", choices=("timing", "driver"), default=None,
                   help="simulate the timing network only, or the whole driver with its load (default: driver "
                        "when the design has a load)")
    p.set_defaults(handler=_verify)


def write_netlist(design: Any, target: Path, *, force: bool) -> None:
    """Write the design's netlist (the whole driver when it has a load) to ``target`` atomically."""
    from .netlist import netlist
    from .record.files import atomic_write

    what = "driver" if design.load is not None else "timing"
    atomic_write(target, netlist(design, what=what), force=force)
