"""Run ngspice in batch mode and read its measurements (optional tool, found at run time).

ngspice is a general-purpose open-source SPICE engine (Debian package ``ngspice``). Nothing
else in pwmkit needs it; :func:`find_ngspice` returns None when it is absent and
:data:`INSTALL_HINT` says how to get it.

A simulation is a netlist whose ``.control`` block runs the transient analysis and issues
``meas`` commands; each result line ``name = value`` is read back. A measurement that ngspice
cannot make (e.g. a threshold never crossed) is reported as missing, never as a number.

References
----------
.. [1] ngspice manual (version 39), §13.5 batch mode (``ngspice -b``), ch. 15 ``.meas`` /
   ``meas`` (``WHEN``, ``AVG``, ``MAX``, ``MIN``, ``PP`` with ``FROM``/``TO``).
"""

from __future__ import annotations

import os
import re
import shutil
import subprocess
import tempfile
from dataclasses import dataclass

from ..errors import DesignError

__all__ = ["find_ngspice", "run_ngspice", "Simulation", "INSTALL_HINT", "NgspiceMissing"]

#: The one line printed where ngspice is missing.
INSTALL_HINT = ("ngspice not found: install it to cross-check designs with a circuit simulation "
                "(Debian/Ubuntu: sudo apt-get install ngspice; other systems: see ngspice.sourceforge.io); "
                "nothing else in pwmkit needs it")

_LINE = re.compile(r"^\s*([A-Za-z_][A-Za-z0-9_]*)\s*=\s*([-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?)")


class NgspiceMissing(DesignError):
    """ngspice is not installed (the message is :data:`INSTALL_HINT`)."""


def find_ngspice() -> str | None:
    """Path of the ngspice executable (``$PWMKIT_NGSPICE`` or the ``PATH``), or None."""
    override = os.environ.get("PWMKIT_NGSPICE")
    if override:
        return override if os.path.isfile(override) and os.access(override, os.X_OK) else None
    return shutil.which("ngspice")


@dataclass(frozen=True)
class Simulation:
    """Measurements of one ngspice run.

    Attributes
    ----------
    values : measurement name (lower case) → value, in SI units
    failed : names of measurements ngspice could not make
    log : ngspice's standard output and error (for diagnosis)
    """

    values: dict[str, float]
    failed: tuple[str, ...]
    log: str

    def get(self, name: str) -> float:
        """A measurement; DesignError naming it when ngspice could not make it."""
        key = name.lower()
        if key not in self.values:
            raise DesignError(f"ngspice: measurement {name!r} was not made (the circuit did not reach it in the "
                              "simulated time); see the log")
        return self.values[key]


def run_ngspice(text: str, *, timeout: float = 120.0) -> Simulation:
    """Run one netlist through ``ngspice -b`` and collect the ``name = value`` result lines.

    Raises
    ------
    NgspiceMissing
        ngspice is not installed.
    DesignError
        ngspice failed (the message quotes its first error line) or ran past ``timeout`` seconds.
    """
    exe = find_ngspice()
    if exe is None:
        raise NgspiceMissing(INSTALL_HINT)
    with tempfile.TemporaryDirectory(prefix="pwmkit-ngspice-") as tmp:
        path = os.path.join(tmp, "circuit.cir")
        with open(path, "w", encoding="ascii") as fh:
            fh.write(text)
        try:
            proc = subprocess.run([exe, "-b", path], capture_output=True, text=True, timeout=timeout, cwd=tmp,
                                  env={**os.environ, "SPICE_ASCIIRAWFILE": "0"})
        except subprocess.TimeoutExpired as exc:
            raise DesignError(f"ngspice: the simulation ran longer than {timeout:g} s and was stopped") from exc
    log = proc.stdout + proc.stderr
    values: dict[str, float] = {}
    for line in proc.stdout.splitlines():
        m = _LINE.match(line)
        if m:
            values[m.group(1).lower()] = float(m.group(2))
    failed = tuple(sorted({m.group(1).lower() for m in re.finditer(r"meas \w+ (\w+) .*failed", log)}))
    fatal = [ln for ln in log.splitlines() if re.search(r"(?i)\b(fatal|singular matrix|timestep too small)", ln)]
    if proc.returncode != 0 or fatal:
        first = (fatal or [ln for ln in log.splitlines() if "rror" in ln] or [f"exit status {proc.returncode}"])[0]
        raise DesignError(f"ngspice: the simulation failed: {first.strip()}")
    return Simulation(values=values, failed=failed, log=log)
