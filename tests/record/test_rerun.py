"""Recorded results and `pwmkit rerun`: drift of a design notebook's key results is detected."""

from __future__ import annotations

import json
import math
from pathlib import Path
from typing import Any

import pytest

from pwmkit import DesignError
from pwmkit.cli import main
from pwmkit.record.results import (
    RESULTS_MIME,
    compare_results,
    payloads_in_notebook,
    read_recorded,
    record_results,
    results_payload,
)

nbformat = pytest.importorskip("nbformat")
pytest.importorskip("nbclient")

SETUP = ("from pwmkit.design import demo_designs\n"
         "from pwmkit.evaluate import evaluate\n"
         "from pwmkit.record import record_results")
DESIGN = 'design = demo_designs()["fan"].with_timing(c=1.0e-9, rb=1000.0)\nev = evaluate(design, spread=False)'
RECORD = 'record_results(ev, name="fan")'


def _notebook(*sources: str) -> Any:
    nb = nbformat.v4.new_notebook()
    nb.metadata["kernelspec"] = {"name": "python3", "display_name": "Python 3", "language": "python"}
    nb.cells = [nbformat.v4.new_code_cell(s) for s in sources]
    return nb


def _execute_and_save(nb: Any, path: Path) -> None:
    from nbclient import NotebookClient

    NotebookClient(nb, timeout=120, kernel_name="python3", resources={"metadata": {"path": str(path.parent)}}).execute()
    path.write_text(nbformat.writes(nb), encoding="utf-8")


@pytest.fixture(scope="module")
def saved_notebook(tmp_path_factory: pytest.TempPathFactory) -> bytes:
    """A design notebook executed once and saved with its recorded results (bytes of the file)."""
    path = tmp_path_factory.mktemp("nb") / "design.ipynb"
    _execute_and_save(_notebook(SETUP, DESIGN, RECORD), path)
    return path.read_bytes()


# ------------------------------------------------------------------------------------------------
# payloads and comparison (no kernel)
# ------------------------------------------------------------------------------------------------
def test_payload_of_a_dict_and_of_an_evaluation() -> None:
    from pwmkit.design import demo_designs
    from pwmkit.evaluate import evaluate

    p = results_payload({"timing.frequency": 1000, "findings.worst": "ok"}, name="x")
    assert p["format"] == "pwmkit-results" and p["results"] == {"timing.frequency": 1000.0, "findings.worst": "ok"}
    ev = evaluate(demo_designs()["fan"], spread=False)
    p = results_payload(ev, name="fan")
    assert p["results"]["timing.frequency"] == pytest.approx(float(ev.timing.frequency), rel=0)
    json.dumps(p, allow_nan=False)  # JSON-ready


def test_payload_refuses_what_is_not_results() -> None:
    with pytest.raises(DesignError, match="expected an Evaluation"):
        results_payload([1, 2], name="x")
    with pytest.raises(DesignError, match=r"results\.a: list is not a number or text"):
        results_payload({"a": [1]}, name="x")
    with pytest.raises(DesignError, match="name: '' is not allowed"):
        results_payload({}, name="")


def test_non_finite_numbers_are_recorded_as_text() -> None:
    assert results_payload({"a": math.inf}, name="x")["results"] == {"a": "inf"}


def test_record_results_outside_ipython_prints_a_line(capsys: pytest.CaptureFixture[str]) -> None:
    record_results({"a": 1.0}, name="bench")
    assert "recorded 1 key result of 'bench'" in capsys.readouterr().out


def test_compare_results_reports_changed_missing_and_new_keys() -> None:
    rec = {"fan": {"f": 1000.0, "mode": "continuous", "gone": 1.0, "zero": 0.0}, "old": {"x": 1.0}}
    now = {"fan": {"f": 1000.0 * (1 + 5e-7), "mode": "discontinuous", "added": 2.0, "zero": 0.0}}
    drifts = {(d.name, d.key, d.kind) for d in compare_results(rec, now, rtol=1e-6)}
    assert drifts == {("fan", "mode", "changed"), ("fan", "gone", "missing"), ("fan", "added", "new"),
                      ("old", "", "missing")}
    tight = compare_results({"a": {"f": 1.0}}, {"a": {"f": 1.0 + 2e-6}}, rtol=1e-6)
    assert len(tight) == 1 and tight[0].rel == pytest.approx(2e-6)
    assert compare_results({"a": {"f": 0.0}}, {"a": {"f": 1e-20}}, atol=1e-15) == []
    assert compare_results({"a": {"f": 1.0}}, {"a": {"f": "1.0"}})[0].kind == "changed"  # number became text
    with pytest.raises(DesignError, match="rtol, atol"):
        compare_results({}, {}, rtol=-1.0)


def test_malformed_payloads_are_design_errors() -> None:
    nb = _notebook("1")
    nb.cells[0].outputs = [nbformat.v4.new_output("display_data", data={RESULTS_MIME: {"format": "other"}})]
    with pytest.raises(DesignError, match="cell 1: the recorded results are not a pwmkit-results payload"):
        payloads_in_notebook(nb)


# ------------------------------------------------------------------------------------------------
# executing notebooks
# ------------------------------------------------------------------------------------------------
@pytest.mark.notebook
def test_saved_notebook_holds_the_recorded_payload(saved_notebook: bytes, tmp_path: Path) -> None:
    path = tmp_path / "design.ipynb"
    path.write_bytes(saved_notebook)
    recorded = read_recorded(path)
    assert set(recorded) == {"fan"}
    assert recorded["fan"]["design.name"] == "fan"
    # the same design evaluated here gives the recorded figure (same code, same process-independent result)
    from pwmkit.design import demo_designs
    from pwmkit.evaluate import evaluate

    ev = evaluate(demo_designs()["fan"].with_timing(c=1.0e-9, rb=1000.0), spread=False)
    assert recorded["fan"]["timing.frequency"] == pytest.approx(float(ev.timing.frequency), rel=1e-12)


@pytest.mark.notebook
def test_rerun_unchanged_notebook_exits_0_and_writes_nothing(saved_notebook: bytes, tmp_path: Path,
                                                             capsys: pytest.CaptureFixture[str]) -> None:
    path = tmp_path / "design.ipynb"
    path.write_bytes(saved_notebook)
    assert main(["rerun", str(path)]) == 0
    out = capsys.readouterr()
    assert "ok —" in out.out and "recorded key results reproduced" in out.out
    assert f"pwmkit rerun: {path} …" in out.err  # progress line on stderr
    assert path.read_bytes() == saved_notebook


@pytest.mark.notebook
def test_rerun_detects_drift_when_a_part_value_changes(saved_notebook: bytes, tmp_path: Path,
                                                       capsys: pytest.CaptureFixture[str]) -> None:
    path = tmp_path / "design.ipynb"
    nb = nbformat.reads(saved_notebook.decode("utf-8"), as_version=4)
    nb.cells[1].source = nb.cells[1].source.replace("c=1.0e-9", "c=1.2e-9")  # the timing capacitor changes
    path.write_text(nbformat.writes(nb), encoding="utf-8")
    before = path.read_bytes()
    assert main(["rerun", str(path)]) == 1
    out = capsys.readouterr().out
    assert "DRIFT" in out
    assert "[fan] timing.frequency: recorded" in out and "[fan] timing.period" in out
    # 1.0 nF → 1.2 nF: the period grows by the capacitance ratio (t ∝ C in every closed form)
    line = next(x for x in out.splitlines() if "[fan] timing.period" in x)
    assert "relative change +0.2" in line
    assert path.read_bytes() == before  # nothing written without --update

    # --update writes the fresh run back; afterwards the notebook reruns clean
    assert main(["rerun", "--update", str(path)]) == 0
    assert "updated" in capsys.readouterr().out
    assert read_recorded(path)["fan"]["timing.period"] == pytest.approx(
        1.2 * read_recorded_from_bytes(saved_notebook)["fan"]["timing.period"], rel=1e-9)
    assert main(["rerun", str(path)]) == 0


def read_recorded_from_bytes(data: bytes) -> dict[str, dict[str, Any]]:
    return payloads_in_notebook(nbformat.reads(data.decode("utf-8"), as_version=4))


@pytest.mark.notebook
def test_rerun_without_recorded_results_says_so(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    path = tmp_path / "plain.ipynb"
    path.write_text(nbformat.writes(_notebook("x = 1")), encoding="utf-8")
    assert main(["rerun", str(path)]) == 1
    err = capsys.readouterr().err
    assert "no recorded results to compare with" in err and "--update" in err


@pytest.mark.notebook
def test_rerun_reports_a_failing_cell(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    path = tmp_path / "broken.ipynb"
    nb = _notebook("raise ValueError('bench supply missing')")
    nb.cells[0].outputs = [nbformat.v4.new_output("display_data", data={
        RESULTS_MIME: results_payload({"a": 1.0}, name="x"), "text/plain": "recorded"})]
    path.write_text(nbformat.writes(nb), encoding="utf-8")
    assert main(["rerun", "--timeout", "60", str(path)]) == 1
    err = capsys.readouterr().err
    assert "code cell 1: ValueError: bench supply missing" in err


def test_rerun_of_missing_or_broken_files(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    # bad input is exit status 2, as documented (cli module docstring), and the message is printed once,
    # on standard error
    assert main(["rerun", str(tmp_path / "none.ipynb")]) == 2
    cap = capsys.readouterr()
    assert "no such notebook" in cap.err and "no such notebook" not in cap.out
    bad = tmp_path / "bad.ipynb"
    bad.write_text("{not json", encoding="utf-8")
    assert main(["rerun", str(bad)]) == 2
    assert "not a readable notebook" in capsys.readouterr().err
    listed = tmp_path / "list.ipynb"
    listed.write_text("[1, 2]", encoding="utf-8")
    assert main(["rerun", str(listed)]) == 2
    err = capsys.readouterr().err
    assert "not a notebook; expected a JSON object with 'cells'" in err and "got a JSON list" in err
    assert "AttributeError" not in err
    assert main(["rerun", "--rtol", "-1", str(bad)]) == 2
