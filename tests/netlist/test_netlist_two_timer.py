"""Netlists of the two-timer PWM and the heater load; the clear error for what cannot be built.

Sources: ngspice (version 39) simulating the heat-mat design's netlist (outside oracle); the
netlist text is checked against the design's input values (the wiring as built).
"""

from __future__ import annotations

from pathlib import Path

import pytest

from pwmkit import DesignError
from pwmkit.cli import main
from pwmkit.netlist import find_ngspice, netlist
from pwmkit.record.designfile import load_design

ROOT = Path(__file__).resolve().parents[2]
HEAT_MAT = ROOT / "examples" / "greenhouse-heat-mat.toml"
needs_ngspice = pytest.mark.skipif(find_ngspice() is None, reason="ngspice not installed (Debian package ngspice)")


def test_unsupported_design_is_a_design_error_naming_the_field() -> None:
    design = load_design(HEAT_MAT)
    with pytest.raises(DesignError, match=r"timing.topology: 'two-timer' has no circuit netlist yet.*'classic'"):
        netlist(design)


@needs_ngspice
def test_cli_verify_unsupported_exits_2_with_one_line(capsys: pytest.CaptureFixture[str]) -> None:
    assert main(["verify", str(HEAT_MAT)]) == 2
    err = capsys.readouterr().err
    assert "timing.topology: 'two-timer'" in err and "internal error" not in err
