"""The command line on the two-timer heat-mat example: check, export, demo."""

from __future__ import annotations

import json
import runpy
from pathlib import Path

import pytest

from pwmkit.cli import main
from pwmkit.evaluate import evaluate
from pwmkit.record import load_design

MAT = Path(__file__).resolve().parents[2] / "examples" / "greenhouse-heat-mat.toml"


def test_check_heat_mat_json(capsys: pytest.CaptureFixture[str]) -> None:
    assert main(["check", "--json", "--n-mc", "2000", str(MAT)]) == 0
    doc = json.loads(capsys.readouterr().out)
    keys = doc["designs"][0]["key_results"]
    assert keys["design.topology"] == "two-timer" and keys["design.load"] == "heater"
    ev = evaluate(load_design(MAT), n_mc=2000)
    assert keys["heater.loop_t_c"] == pytest.approx(ev.heater.loop.t_element_c)
    assert keys["timing.duty"] == pytest.approx(float(ev.timing.duty))


def test_export_formulas_python_reproduces_the_timing(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    assert main(["export", str(MAT), "--out-dir", str(tmp_path), "--formulas", "sheet.py", "--bom", "parts.csv"]) == 0
    ns = runpy.run_path(str(tmp_path / "sheet.py"))
    ev = evaluate(load_design(MAT), spread=False)
    values = ns["VALUES"]
    duty = ns["duty"]
    args = duty.__code__.co_varnames[: duty.__code__.co_argcount]
    assert duty(*(values[a] for a in args)) == pytest.approx(float(ev.timing.duty), rel=1e-12)
    bom = (tmp_path / "parts.csv").read_text(encoding="utf-8")
    assert "TH1" in bom and "thermal cut-out" in bom


def test_demo_lists_the_heat_mat(capsys: pytest.CaptureFixture[str]) -> None:
    assert main(["demo"]) == 0
    out = capsys.readouterr().out
    assert "[heat-mat] two-timer PWM" in out and "heater held at" in out
