"""Make the greenhouse fan's demo bench session: a scope capture CSV and an as-built design file.

DEMO DATA, invented for pwmkit's 12 V greenhouse propagator scenario — not a measurement. The
story and the waveform model are in :mod:`pwmkit.bench.demo` (the built capacitor at +3 %, the
pot track at −9 %, seeded noise, ringing, jitter and 8-bit samples).

Run from the repository root::

    python examples/make_demo_capture.py

It writes, next to this script, ``fan-bench-demo.csv`` (the capture) and
``greenhouse-fan-as-built.toml``: a copy of ``greenhouse-fan.toml`` named "fan-as-built" with
the session's three ``[[bench]]`` readings appended the way ``pwmkit bench add`` appends them
(the capture at wiper 60 %, a counter reading at 30 %, a load-current and MOSFET-temperature
reading).
"""

from __future__ import annotations

import argparse
from pathlib import Path

HERE = Path(__file__).resolve().parent


def main() -> None:
    parser = argparse.ArgumentParser(description="Write the greenhouse fan's demo bench session (demo data).")
    parser.add_argument("--out-dir", default=str(HERE), help="folder for the two files (default: examples/)")
    args = parser.parse_args()
    out = Path(args.out_dir)

    from pwmkit.bench.demo import demo_readings, write_demo_capture
    from pwmkit.cli_bench import append_reading
    from pwmkit.record.files import atomic_write

    capture = write_demo_capture(out / "fan-bench-demo.csv", force=True)
    design_path = out / "greenhouse-fan-as-built.toml"
    text = (HERE / "greenhouse-fan.toml").read_text(encoding="utf-8")
    text = text.replace('name = "fan"', 'name = "fan-as-built"', 1).replace(
        "(demo values).", "(demo values), as built: bench readings below are DEMO DATA.", 1)
    atomic_write(design_path, text, force=True)
    for reading in demo_readings(capture):
        append_reading(design_path, reading)
    print(capture)
    print(design_path)


if __name__ == "__main__":
    main()
