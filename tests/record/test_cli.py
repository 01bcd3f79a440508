"""The `pwmkit` command line: exit codes, one-line errors, output containment, the notebook launcher."""

from __future__ import annotations

import csv
import dataclasses
import io
import json
import os
import subprocess
import sys
from pathlib import Path

import pytest

from pwmkit.cli import main
from pwmkit.design import demo_designs
from pwmkit.record import save_design

ROOT = Path(__file__).resolve().parents[2]
FAN = ROOT / "examples" / "greenhouse-fan.toml"
GROW = ROOT / "examples" / "greenhouse-grow-bar.toml"


@pytest.fixture()
def failing_design(tmp_path: Path) -> Path:
    """The fan with a 50 kHz ± 5 % target it cannot meet (it runs near 24.5 kHz)."""
    fan = demo_designs()["fan"]
    bad = fan.replace(name="fan-50k", requirements=dataclasses.replace(fan.requirements, frequency=50e3,
                                                                       frequency_tolerance=0.05))
    from pwmkit.evaluate import evaluate

    assert evaluate(bad, spread=False).findings.by_id("frequency.target").severity == "fail"
    return save_design(bad, tmp_path / "fan-50k.toml")


# ------------------------------------------------------------------------------------------------
# check
# ------------------------------------------------------------------------------------------------
def test_check_sound_demo_file_exits_0(capsys: pytest.CaptureFixture[str]) -> None:
    assert main(["check", str(FAN)]) == 0
    cap = capsys.readouterr()
    assert "fan passes the design-rule checks" in cap.out
    assert "frequency.target" in cap.out and "severity" in cap.out
    assert f"pwmkit check: {FAN} …" in cap.err


def test_check_failing_design_exits_1(failing_design: Path, capsys: pytest.CaptureFixture[str]) -> None:
    assert main(["check", "--quick", "--brief", str(GROW), str(failing_design)]) == 1
    out = capsys.readouterr().out
    assert "FAIL      frequency.target" in out and "fan-50k FAILS" in out
    assert "grow-bar passes" in out


def test_check_missing_file_exits_2_with_one_line(capsys: pytest.CaptureFixture[str], tmp_path: Path) -> None:
    assert main(["check", str(tmp_path / "missing.toml")]) == 2
    err = capsys.readouterr().err.strip().splitlines()
    assert err[-1] == f"pwmkit: error: {tmp_path / 'missing.toml'}: no such design file"


def test_check_bad_design_exits_2_naming_the_field(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    p = tmp_path / "greenhouse.toml"
    p.write_text('format = "pwmkit-design"\nversion = 1\n[timing]\nra = "10q"\n', encoding="utf-8")
    assert main(["check", str(p), str(FAN), "--quick"]) == 2  # bad input wins over the sound second file
    err = capsys.readouterr().err
    assert f"pwmkit: error: {p}: timing.ra: value '10q' cannot be read" in err
    assert "Traceback" not in err


def test_check_json_document(failing_design: Path, tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    missing = tmp_path / "gone.toml"
    assert main(["check", "--json", "--quick", str(FAN), str(failing_design), str(missing)]) == 2
    doc = json.loads(capsys.readouterr().out)
    assert doc["format"] == "pwmkit-check" and doc["exit_status"] == 2
    fan, bad, gone = doc["designs"]
    assert fan["fail_count"] == 0 and fan["key_results"]["design.name"] == "fan"
    assert bad["fail_count"] == 1
    assert any(f["id"] == "frequency.target" and f["severity"] == "fail" for f in bad["findings"])
    assert "no such design file" in gone["error"]


def test_usage_errors_exit_2(capsys: pytest.CaptureFixture[str]) -> None:
    assert main([]) == 2
    assert main(["frobnicate"]) == 2
    assert main(["check"]) == 2
    assert main(["--help"]) == 0
    capsys.readouterr()


def test_subprocess_python_dash_m_pwmkit(tmp_path: Path) -> None:
    env = {**os.environ, "PYTHONPATH": str(ROOT) + os.pathsep + os.environ.get("PYTHONPATH", "")}
    ok = subprocess.run([sys.executable, "-m", "pwmkit", "check", "--quick", str(FAN)], capture_output=True,
                        text=True, env=env, timeout=300)
    assert ok.returncode == 0, ok.stderr
    assert "fan passes" in ok.stdout
    missing = subprocess.run([sys.executable, "-m", "pwmkit", "check", str(tmp_path / "x.toml")], capture_output=True,
                             text=True, env=env, timeout=300)
    assert missing.returncode == 2
    assert missing.stderr.strip().splitlines()[-1].startswith("pwmkit: error: ")
    assert "Traceback" not in missing.stderr


# ------------------------------------------------------------------------------------------------
# export
# ------------------------------------------------------------------------------------------------
@pytest.mark.parametrize(("name", "start"), [
    ("sheet.md", "# Timing formulas — fan"),
    ("sheet.tex", r"\documentclass{article}"),
    ("sheet.txt", "Timing formulas — fan"),
    ("sheet.py", "# Timing formulas of the pwmkit design 'fan'."),
    ("sheet.c", "/* Timing formulas of the pwmkit design 'fan'."),
])
def test_export_formulas_by_suffix(name: str, start: str, tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    assert main(["export", str(FAN), "--formulas", name, "--out-dir", str(tmp_path)]) == 0
    assert (tmp_path / name).read_text(encoding="utf-8").startswith(start)
    assert capsys.readouterr().out.strip() == str((tmp_path / name).resolve())


def test_export_bom_csv(tmp_path: Path) -> None:
    assert main(["export", str(GROW), "--bom", "parts.csv", "--out-dir", str(tmp_path), "--quick"]) == 0
    rows = list(csv.DictReader(io.StringIO((tmp_path / "parts.csv").read_text(encoding="utf-8"))))
    by_ref = {r["ref"]: r for r in rows}
    assert list(rows[0]) == ["ref", "qty", "part", "value", "series", "tolerance", "notes"]
    assert by_ref["R1"]["value"] == "1 kΩ" and by_ref["R1"]["series"] == "E24" and by_ref["R1"]["tolerance"] == "±5 %"
    assert by_ref["C1"]["value"] == "2.2 nF" and "C0G" in by_ref["C1"]["notes"]
    assert by_ref["P1"]["value"] == "100 kΩ"
    assert by_ref["R5"]["qty"] == "3" and "W" in by_ref["R5"]["notes"]  # power from the evaluation
    assert by_ref["LED1…LED9"]["qty"] == "9"
    assert {"U1", "Q1", "D1, D2", "R4", "C2"} <= set(by_ref)


def test_export_default_names_come_from_the_design_name_and_stay_inside(tmp_path: Path) -> None:
    hostile = demo_designs()["fan"].replace(name="../../etc/evil name")
    design_file = save_design(hostile, tmp_path / "hostile.toml")
    out = tmp_path / "out"
    assert main(["export", str(design_file), "--formulas", "--bom", "--out-dir", str(out), "--quick"]) == 0
    assert sorted(p.name for p in out.iterdir()) == ["etc-evil-name-bom.csv", "etc-evil-name-formulas.md"]
    assert not (tmp_path.parent / "etc").exists()


@pytest.mark.parametrize("name", ["../escape.md", "sub/../../escape.md", "/tmp/pwmkit-escape-test.md", ".."])
def test_export_refuses_names_outside_the_out_dir(name: str, tmp_path: Path, capsys: pytest.CaptureFixture[str]
                                                  ) -> None:
    out = tmp_path / "out"
    out.mkdir()
    assert main(["export", str(FAN), "--formulas", name, "--out-dir", str(out)]) == 2
    err = capsys.readouterr().err
    assert "pwmkit: error: --formulas:" in err and ("'..'" in err or "outside the output folder" in err)
    assert not Path("/tmp/pwmkit-escape-test.md").exists()
    assert not (tmp_path / "escape.md").exists()


def test_export_follows_no_symlink_out_of_the_folder(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    out, elsewhere = tmp_path / "out", tmp_path / "elsewhere"
    out.mkdir()
    elsewhere.mkdir()
    (out / "link").symlink_to(elsewhere, target_is_directory=True)
    assert main(["export", str(FAN), "--formulas", "link/sheet.md", "--out-dir", str(out)]) == 2
    assert "outside the output folder" in capsys.readouterr().err
    assert list(elsewhere.iterdir()) == []


def test_export_absolute_name_inside_the_out_dir_is_fine(tmp_path: Path) -> None:
    target = tmp_path / "sub" / "sheet.md"
    assert main(["export", str(FAN), "--formulas", str(target), "--out-dir", str(tmp_path)]) == 0
    assert target.is_file()


def test_export_never_overwrites_without_force(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    target = tmp_path / "sheet.md"
    target.write_text("my notes", encoding="utf-8")
    assert main(["export", str(FAN), "--formulas", "sheet.md", "--out-dir", str(tmp_path)]) == 2
    assert "already exists; use --force" in capsys.readouterr().err
    assert target.read_text(encoding="utf-8") == "my notes"
    assert main(["export", str(FAN), "--formulas", "sheet.md", "--out-dir", str(tmp_path), "--force"]) == 0
    assert target.read_text(encoding="utf-8").startswith("# Timing formulas")


@pytest.mark.parametrize(("args", "match"), [
    (["--formulas", "sheet.docx"], "has no known suffix"),
    (["--bom", "parts.xlsx"], "give a .csv file name"),
    (["--report", "r.pdf"], "give a .html file name"),
    ([], "nothing to do"),
])
def test_export_bad_requests(args: list[str], match: str, tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    assert main(["export", str(FAN), *args, "--out-dir", str(tmp_path)]) == 2
    assert match in capsys.readouterr().err


# ------------------------------------------------------------------------------------------------
# lab
# ------------------------------------------------------------------------------------------------
def _tiny_notebooks(folder: Path) -> Path:
    nbformat = pytest.importorskip("nbformat")
    folder.mkdir()
    main_nb = nbformat.v4.new_notebook()
    main_nb.metadata["kernelspec"] = {"name": "python3", "display_name": "Python 3", "language": "python"}
    main_nb.cells = [nbformat.v4.new_code_cell(
        "from pwmkit.record import record_results\n"
        "record_results({'timing.frequency': 1234.5, 'findings.worst': 'ok'}, name='bench')")]
    (folder / "greenhouse_design.ipynb").write_text(nbformat.writes(main_nb), encoding="utf-8")
    (folder / "start_here.ipynb").write_text(nbformat.writes(nbformat.v4.new_notebook()), encoding="utf-8")
    return folder


@pytest.mark.notebook
def test_lab_headless_runs_the_design_notebook_and_writes_html(tmp_path: Path,
                                                               capsys: pytest.CaptureFixture[str]) -> None:
    src = _tiny_notebooks(tmp_path / "src")
    work = tmp_path / "work"
    assert main(["lab", "--dir", str(work), "--source", str(src), "--headless"]) == 0
    cap = capsys.readouterr()
    html_file = work / "greenhouse_design.html"
    assert html_file.is_file() and "<html" in html_file.read_text(encoding="utf-8").lower()
    assert str(html_file.resolve()) in cap.out
    assert "timing.frequency" in cap.out and "1234.5" in cap.out
    assert "copied" in cap.err


def test_lab_keeps_edited_copies_unless_forced(tmp_path: Path, monkeypatch: pytest.MonkeyPatch,
                                               capsys: pytest.CaptureFixture[str]) -> None:
    src = _tiny_notebooks(tmp_path / "src")
    work = tmp_path / "work"
    calls: list[list[str]] = []

    def fake_call(cmd: list[str]) -> int:
        calls.append(cmd)
        return 0

    monkeypatch.setattr(subprocess, "call", fake_call)
    assert main(["lab", "--dir", str(work), "--source", str(src), "--browser"]) == 0
    edited = work / "start_here.ipynb"
    edited.write_text(edited.read_text(encoding="utf-8").replace('"cells": []', '"cells": [ ]'), encoding="utf-8")
    mine = edited.read_bytes()
    assert main(["lab", "--dir", str(work), "--source", str(src), "--browser"]) == 0
    assert edited.read_bytes() == mine
    assert "kept your edited copy" in capsys.readouterr().err
    assert main(["lab", "--dir", str(work), "--source", str(src), "--browser", "--force"]) == 0
    assert edited.read_bytes() == (src / "start_here.ipynb").read_bytes()
    cmd = calls[-1]
    assert "--ServerApp.ip=127.0.0.1" in cmd and cmd[-1] == str((work / "greenhouse_design.ipynb").resolve())


def test_lab_decides_headless_from_the_environment(monkeypatch: pytest.MonkeyPatch) -> None:
    from pwmkit.record import notebooks

    monkeypatch.setattr(notebooks.sys, "platform", "linux")
    for key in ("DISPLAY", "WAYLAND_DISPLAY", "BROWSER"):
        monkeypatch.delenv(key, raising=False)
    assert notebooks.display_available() is False
    monkeypatch.setenv("DISPLAY", ":0")
    assert notebooks.display_available() is True
    monkeypatch.setenv("DISPLAY", "")
    monkeypatch.setenv("BROWSER", "firefox")
    assert notebooks.display_available() is True


def test_lab_copies_the_project_notebooks(tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    from pwmkit.record.notebooks import MAIN_NOTEBOOK, copy_notebooks, notebook_source_dir

    try:
        source = notebook_source_dir()
    except Exception as exc:  # pragma: no cover - notebooks not written yet
        pytest.skip(f"no notebooks: {exc}")
    actions = copy_notebooks(tmp_path / "nb")
    names = {a.name for a in actions}
    assert MAIN_NOTEBOOK in names and {a.action for a in actions} == {"copied"}
    assert {p.name for p in source.glob("*.ipynb")} == names


def test_lab_refuses_a_file_as_working_folder(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    src = _tiny_notebooks(tmp_path / "src")
    f = tmp_path / "file"
    f.write_text("x", encoding="utf-8")
    assert main(["lab", "--dir", str(f), "--source", str(src), "--headless"]) == 2
    assert "is not a folder" in capsys.readouterr().err
