"""Command line ``pwmkit`` (presentation layer).

Subcommands:

``demo``
    print the demo designs' exact timing next to the textbook ``ln 2``
    (0.693) estimate.

Other subcommands are registered by :func:`build_parser`; each handler
returns a process exit code. Errors in user input are printed as one line
(``pwmkit: error: …``), never as a traceback.
"""

from __future__ import annotations

import argparse
import sys
from collections.abc import Sequence

from .errors import DesignError

__all__ = ["main", "build_parser"]


def _demo(args: argparse.Namespace) -> int:
    from .design import demo_designs
    from .timing import astable_ideal
    from .values import format_value

    designs = demo_designs()
    print("pwmkit demo — 12 V greenhouse propagator (demo values)\n")
    for name, d in designs.items():
        t = d.timing
        exact = d.astable()
        kw = dict(ra=t.ra, rb=t.rb, c=t.c, vcc=d.vcc)
        if t.topology == "pot":
            kw.update(pot=t.pot, wiper=t.wiper)
        ideal = astable_ideal(t.topology, **kw)
        parts = f"ra {format_value(t.ra, 'Ω')}, rb {format_value(t.rb, 'Ω')}, c {format_value(t.c, 'F')}"
        if t.topology == "pot":
            parts += f", pot {format_value(t.pot, 'Ω')} at wiper {t.wiper:.2f}"
        print(f"[{name}] {t.topology} topology, {t.timer} timer, vcc {format_value(d.vcc, 'V')}: {parts}")
        print(f"  {'':14}{'exact':>14}{'0.693 estimate':>18}{'difference':>12}")
        rows = [
            ("t_high", exact.t_high, ideal.t_high, "s"),
            ("t_low", exact.t_low, ideal.t_low, "s"),
            ("frequency", exact.frequency, ideal.frequency, "Hz"),
        ]
        for label, a, b, unit in rows:
            print(f"  {label:14}{format_value(a, unit, 5):>14}{format_value(b, unit, 5):>18}{100 * (a / b - 1):>+11.2f}%")
        print(f"  {'duty':14}{100 * exact.duty:>12.2f} %{100 * ideal.duty:>16.2f} %"
              f"{100 * (exact.duty - ideal.duty):>+10.2f} pt\n")
    print("Exact = sympy-derived closed form with the steering-diode drop, the discharge switch and the\n"
          "control pin; estimate = the textbook 0.693·R·C forms. Verify every design on the bench.")
    return 0


def build_parser() -> argparse.ArgumentParser:
    parser = argparse.ArgumentParser(prog="pwmkit", description="Design aid for 555-type astable PWM drivers.")
    sub = parser.add_subparsers(dest="command", metavar="COMMAND")
    p = sub.add_parser("demo", help="print the demo designs' exact timing next to the 0.693 estimate")
    p.set_defaults(handler=_demo)
    return parser


def main(argv: Sequence[str] | None = None) -> int:
    parser = build_parser()
    args = parser.parse_args(argv)
    handler = getattr(args, "handler", None)
    if handler is None:
        parser.print_help()
        return 2
    try:
        return int(handler(args))
    except DesignError as exc:
        print(f"pwmkit: error: {exc}", file=sys.stderr)
        return 2


if __name__ == "__main__":  # pragma: no cover
    sys.exit(main())
