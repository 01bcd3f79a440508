"""The as-built views: `pwmkit bench add/show`, the bench.match finding in `pwmkit check`, the key
results kept by `pwmkit rerun`, the HTML report section and the dashboard's As built tab."""

from __future__ import annotations

import os
import sys
from pathlib import Path

import numpy as np
import pytest
from bench_synthetic import pwm
from test_reconcile import VD, VSAT, _design, simulate_steered

from pwmkit.bench import BenchConditions, BenchReading, Measured
from pwmkit.cli import main
from pwmkit.design import demo_designs
from pwmkit.record import design_to_toml, load_design, save_design

ROOT = Path(__file__).resolve().parents[2]


def _capture_of(frequency: float, duty: float, path: Path, seed: int = 1) -> Path:
    """A CSV capture with noise of a PWM signal of the given frequency and duty (synthetic)."""
    syn = pwm(frequency, duty, periods=30, noise=0.03, ringing=0.1, seed=seed)
    rows = "\n".join(f"{t * 1e6:.6f},{v:.5f}" for t, v in zip(syn.t, syn.v))
    path.write_text(f"# synthetic test capture\nTime (us),OUT (V)\n{rows}\n", encoding="utf-8")
    return path


@pytest.fixture()
def built_file(tmp_path: Path) -> tuple[Path, Path]:
    """A design file with a comment of the user's, and a capture of its build with C at +8 % (simulated)."""
    design_path = save_design(_design(), tmp_path / "timer.toml")
    design_path.write_text(design_path.read_text(encoding="utf-8") + "# my own note: built 2026-11-30\n",
                           encoding="utf-8")
    f, d = simulate_steered(10e3, 4.7e3, 1.08 * 47e-9, 12.0, VD, VSAT)
    return design_path, _capture_of(f, d, tmp_path / "bench.csv")


def test_bench_add_appends_keeps_comments_and_reconciles(built_file, capsys):
    design_path, capture = built_file
    before = design_path.read_text(encoding="utf-8")
    code = main(["bench", "add", str(design_path), str(capture), "--vcc", "12", "--ambient", "25",
                 "--date", "2026-11-30", "--note", "first light"])
    out = capsys.readouterr().out
    assert code == 0, out
    after = design_path.read_text(encoding="utf-8")
    assert after.startswith(before)                          # nothing lost: the old text is kept as it was
    assert "# my own note: built 2026-11-30" in after
    design = load_design(design_path)
    assert design.replace(bench=()) == _design()
    (reading,) = design.bench
    assert reading.conditions == BenchConditions(vcc=12.0, t_ambient_c=25.0)
    assert reading.date == "2026-11-30" and reading.note == "first light" and "bench.csv" in reading.source
    assert "all inside the predicted spread" in out
    assert "timing capacitor" in out
    leftovers = [p for p in design_path.parent.iterdir() if p.name.startswith(".timer.toml")]
    assert leftovers == []                                     # the atomic write left no temporary file


def test_bench_add_dry_run_writes_nothing(built_file, capsys):
    design_path, capture = built_file
    before = design_path.read_bytes()
    assert main(["bench", "add", str(design_path), str(capture), "--dry-run", "--no-check"]) == 0
    assert "would append (dry run)" in capsys.readouterr().out
    assert design_path.read_bytes() == before


def test_bench_add_refuses_bad_input_and_leaves_the_file(built_file, capsys, tmp_path):
    design_path, capture = built_file
    before = design_path.read_bytes()
    assert main(["bench", "add", str(design_path), str(capture), "--wiper", "0.5"]) == 2
    assert "bench[0].conditions.wiper: 0.5 given, but the 'steered' topology has no potentiometer" in \
        capsys.readouterr().err
    assert main(["bench", "add", str(design_path), str(capture), "--vcc", "-1"]) == 2
    assert "conditions.vcc: -1 V is out of range" in capsys.readouterr().err
    syn = pwm(1e3, 0.5, periods=1.6, phase=0.2, noise=0.02)
    short = tmp_path / "short.csv"
    short.write_text("t,v\n" + "".join(f"{t:.9g},{v:.6g}\n" for t, v in zip(syn.t, syn.v)))
    assert main(["bench", "add", str(design_path), str(short)]) == 2
    assert "at least two whole periods" in capsys.readouterr().err
    assert design_path.read_bytes() == before


def test_append_refuses_when_the_file_changed_meanwhile(built_file, monkeypatch):
    from pwmkit import DesignError, cli_bench

    design_path, _capture = built_file
    real = cli_bench._read_text
    calls = []

    def changing(path):
        calls.append(path)
        if len(calls) == 2:   # someone saves the file between our read and our write
            path.write_text(path.read_text(encoding="utf-8") + "# edited elsewhere\n", encoding="utf-8")
        return real(path)

    monkeypatch.setattr(cli_bench, "_read_text", changing)
    reading = BenchReading(measured={"frequency": 1e3})
    with pytest.raises(DesignError, match="changed on disk while the reading was added; nothing was written"):
        cli_bench.append_reading(design_path, reading)
    assert "[[bench]]" not in design_path.read_text(encoding="utf-8")


def test_check_names_the_culprit_of_a_reading_outside_the_spread(tmp_path, capsys):
    f, d = simulate_steered(10e3, 4.7e3, 2.2 * 47e-9, 12.0, VD, VSAT)   # a 100 nF part in place of 47 nF
    reading = BenchReading(measured=(Measured("frequency", f), Measured("duty", d)),
                           conditions=BenchConditions(vcc=12.0, t_ambient_c=25.0))
    path = save_design(_design().with_reading(reading), tmp_path / "wrong-c.toml")
    assert main(["check", str(path), "--brief"]) == 1
    out = capsys.readouterr().out
    assert "bench.match" in out and "FAIL" in out
    assert "Likely culprit: timing capacitor" in out and "100 nF" in out
    assert main(["check", str(path), "--quick", "--brief"]) == 0     # quick mode: no tolerance analysis, no rule
    assert "bench.match" not in capsys.readouterr().out
    assert main(["bench", "show", str(path)]) == 1
    assert "OUTSIDE" in capsys.readouterr().out


def test_key_results_carry_the_bench_verdict():
    from pwmkit.evaluate import evaluate

    f, d = simulate_steered(10e3, 4.7e3, 1.08 * 47e-9, 12.0, VD, VSAT)
    reading = BenchReading(measured=(Measured("frequency", f), Measured("duty", d)),
                           conditions=BenchConditions(vcc=12.0, t_ambient_c=25.0))
    ev = evaluate(_design().with_reading(reading), n_mc=20_000)
    k = ev.key_results()
    assert k["bench.inside"] == 1.0 and k["bench.culprit"] == "c"
    assert k["bench.estimate.c"] == pytest.approx(1.08 * 47e-9, rel=0.02)
    assert ev.findings.by_id("bench.match").severity == "ok"
    assert "bench.inside" not in evaluate(_design(), n_mc=2000).key_results()


def test_report_has_the_as_built_section():
    from pwmkit.record.report import report_html

    design = load_design(ROOT / "examples" / "greenhouse-fan-as-built.toml")
    page = report_html(design)
    assert "<section id='as-built'><h2>As designed vs as built</h2>" in page
    assert "bench[1] 2026-11-28" in page and "pwmkit-asbuilt-travel" in page
    assert "DEMO DATA" in page
    assert "id='as-built'" not in report_html(demo_designs()["fan"])


def test_dashboard_gets_an_as_built_tab_only_with_readings():
    pytest.importorskip("ipywidgets")
    from pwmkit.widgets import dashboard

    plain = dashboard(demo_designs()["fan"])
    assert "As built" not in plain.tabs.titles and plain.as_built is None
    design = load_design(ROOT / "examples" / "greenhouse-fan-as-built.toml")
    dash = dashboard(design)
    assert dash.tabs.titles[-1] == "As built"
    panel = dash.as_built
    assert panel.reconciliation is not None and panel.reconciliation.inside
    travel = panel.plot.readings.data
    assert list(travel["wiper"]) == [0.6, 0.3]                      # readings marked at their wiper
    assert travel["duty"][0] == pytest.approx(100 * design.bench[0].value("duty"))
    assert panel.plot._hist_rows[0].visible and not panel.plot._hist_rows[2].visible
    line = panel.plot._marks[0]["frequency"][1]
    assert line.location == pytest.approx(design.bench[0].value("frequency"))
    # an edit of the design re-runs the comparison; the readings stay with the design
    dash.show_tab("As built")
    dash.session.edit(lambda d: d.with_timing(c=1.5e-9))
    dash.flush()
    assert dash.design.bench == design.bench
    assert not panel.reconciliation.inside and panel.reconciliation.culprit == "c"
    assert "OUTSIDE" in panel.summary.value


def test_opening_a_file_with_readings_adds_the_as_built_tab(tmp_path):
    pytest.importorskip("ipywidgets")
    import shutil

    from pwmkit.widgets import dashboard

    for name in ("greenhouse-fan.toml", "greenhouse-fan-as-built.toml", "fan-bench-demo.csv"):
        shutil.copy(ROOT / "examples" / name, tmp_path / name)
    dash = dashboard(tmp_path / "greenhouse-fan.toml")
    titles = dash.tabs.titles
    assert "As built" not in titles and dash.as_built is None
    dash.show_tab("Spread")
    dash.file.do_open(str(tmp_path / "greenhouse-fan-as-built.toml"))
    assert dash.file.message_text == "" and dash.design.bench
    assert dash.tabs.titles == (*titles, "As built")
    assert dash.tabs.titles[dash.tabs.selected_index] == "Spread"  # the page shown stays
    dash.show_tab("As built")
    assert dash.as_built.reconciliation is not None and dash.as_built.reconciliation.inside
    dash.file.do_open(str(tmp_path / "greenhouse-fan.toml"))  # back to a design without readings: tab stays
    assert dash.tabs.titles.count("As built") == 1 and dash.as_built.message_text == ""


def test_demo_files_are_made_by_the_script(tmp_path):
    import subprocess

    env = dict(os.environ)
    subprocess.run([sys.executable, str(ROOT / "examples" / "make_demo_capture.py"), "--out-dir", str(tmp_path)],
                   check=True, capture_output=True, env=env, cwd=ROOT)
    from pwmkit.bench import read_capture

    fresh, committed_cap = read_capture(tmp_path / "fan-bench-demo.csv"), read_capture(ROOT / "examples" /
                                                                                          "fan-bench-demo.csv")
    assert fresh.header == committed_cap.header and fresh.header[0].startswith("# DEMO DATA")
    np.testing.assert_allclose(fresh.time, committed_cap.time, rtol=0, atol=1e-12)
    # the same seeded samples (one 8-bit step of slack for last-digit differences between platforms)
    assert np.mean(np.abs(fresh.voltage - committed_cap.voltage) > 1e-9) < 1e-3
    made = load_design(tmp_path / "greenhouse-fan-as-built.toml")
    committed = load_design(ROOT / "examples" / "greenhouse-fan-as-built.toml")
    assert made.name == committed.name == "fan-as-built" and len(made.bench) == len(committed.bench) == 3
    for a, b in zip(made.bench, committed.bench):
        assert a.source == b.source and a.conditions == b.conditions and a.note == b.note
        for q in ("frequency", "duty"):
            if b.value(q) is not None:
                assert a.value(q) == pytest.approx(b.value(q), rel=1e-6)


@pytest.mark.notebook
@pytest.mark.slow
def test_rerun_keeps_the_readings_and_their_results(tmp_path, capsys):
    nbformat = pytest.importorskip("nbformat")
    pytest.importorskip("nbclient")
    from nbclient import NotebookClient

    design_path = tmp_path / "fan.toml"
    design_path.write_text((ROOT / "examples" / "greenhouse-fan-as-built.toml").read_text(encoding="utf-8"),
                           encoding="utf-8")
    nb = nbformat.v4.new_notebook()
    nb.metadata["kernelspec"] = {"name": "python3", "display_name": "Python 3", "language": "python"}
    nb.cells = [nbformat.v4.new_code_cell(
        "from pwmkit.record import load_design, record_results\nfrom pwmkit.evaluate import evaluate\n"
        "ev = evaluate(load_design('fan.toml'), n_mc=5000)\nrecord_results(ev, name='fan-as-built')")]
    NotebookClient(nb, timeout=120, kernel_name="python3", resources={"metadata": {"path": str(tmp_path)}}).execute()
    nb_path = tmp_path / "as-built.ipynb"
    nb_path.write_text(nbformat.writes(nb), encoding="utf-8")
    from pwmkit.record.results import read_recorded

    recorded = read_recorded(nb_path)["fan-as-built"]
    assert recorded["bench.inside"] == 1.0 and recorded["bench.culprit"] == "pot"
    before = design_path.read_bytes()
    assert main(["rerun", str(nb_path), "--update"]) == 0
    assert main(["rerun", str(nb_path)]) == 0
    assert "ok" in capsys.readouterr().out
    assert design_path.read_bytes() == before                     # the readings stay where they are
    assert read_recorded(nb_path)["fan-as-built"]["bench.readings"] == 2.0
    # a changed reading in the design file shows up as drift of the recorded bench results
    changed = before.decode("utf-8").replace("frequency = { value = 31597.1", "frequency = { value = 22000.0")
    design_path.write_text(changed, encoding="utf-8")
    assert main(["rerun", str(nb_path)]) == 1
    assert "bench.inside" in capsys.readouterr().out


def test_design_file_example_round_trips():
    design = load_design(ROOT / "examples" / "greenhouse-fan-as-built.toml")
    from pwmkit.record import design_from_toml

    assert design_from_toml(design_to_toml(design)) == design
    assert len(design.bench) == 3 and np.isfinite(design.bench[0].value("frequency"))


def test_a_reading_at_conditions_where_the_design_stops_is_a_warning_not_a_crash():
    from pwmkit.evaluate import evaluate
    from pwmkit.record.report import report_html

    reading = BenchReading(measured={"frequency": 1e3}, conditions=BenchConditions(vcc=1.0, t_ambient_c=25.0))
    design = _design().with_reading(reading)
    ev = evaluate(design, n_mc=2000)
    f = ev.findings.by_id("bench.match")
    assert f.severity == "warn" and "could not be compared" in f.explanation and "vcc" in f.explanation
    assert "bench.inside" not in ev.key_results()
    assert "could not be compared with the design" in report_html(design, ev)


def test_check_json_of_the_committed_as_built_example(capsys):
    import json

    path = ROOT / "examples" / "greenhouse-fan-as-built.toml"
    assert main(["check", str(path), "--json"]) == 0
    doc = json.loads(capsys.readouterr().out)
    (entry,) = doc["designs"]
    bench = [f for f in entry["findings"] if f["id"] == "bench.match"]
    assert bench and bench[0]["severity"] == "ok" and "Most likely difference: pot track" in bench[0]["explanation"]
    assert entry["key_results"]["bench.readings"] == 2.0


def test_dashboard_save_keeps_the_readings(tmp_path):
    pytest.importorskip("ipywidgets")
    from pwmkit.widgets import dashboard

    path = tmp_path / "fan.toml"
    path.write_text((ROOT / "examples" / "greenhouse-fan-as-built.toml").read_text(encoding="utf-8"), encoding="utf-8")
    before = load_design(path)
    dash = dashboard(path)
    assert dash.tabs.titles[-1] == "As built"
    dash.session.edit(lambda d: d.with_timing(c=1.0e-9))
    dash.file.do_save()
    after = load_design(path)
    assert after.bench == before.bench                     # the readings survive a save from the dashboard
    assert after.timing.c == 1.0e-9


def test_bench_add_hand_readings_without_a_capture(built_file, capsys):
    design_path, capture = built_file
    code = main(["bench", "add", str(design_path), "--measure", "frequency=1.6k", "--measure", "duty=66.3%",
                 "--vcc", "12", "--ambient", "25", "--source", "bench counter", "--no-check"])
    assert code == 0, capsys.readouterr().err
    (r,) = load_design(design_path).bench
    assert r.value("frequency") == 1600.0 and r.value("duty") == pytest.approx(0.663) and r.source == "bench counter"
    # with a capture, --measure adds what the scope does not see
    assert main(["bench", "add", str(design_path), str(capture), "--measure", "i_load=12m", "--no-check"]) == 0
    r2 = load_design(design_path).bench[1]
    assert r2.value("i_load") == pytest.approx(0.012) and r2.value("frequency") is not None
    capsys.readouterr()
    assert main(["bench", "add", str(design_path), "--measure", "speed=3"]) == 2
    assert "measured.speed: not a known measured quantity" in capsys.readouterr().err
    assert main(["bench", "add", str(design_path)]) == 2
    assert "nothing to add" in capsys.readouterr().err
    assert main(["bench", "add", str(design_path), str(capture), "--measure", "frequency=1k"]) == 2
    assert "given twice" in capsys.readouterr().err
