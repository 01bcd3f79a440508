"""`pwmkit find`, `pwmkit new` and the README flow (lab --headless → rerun) end to end.

Sources named beside each check:
- pwmkit.timing.astable evaluated independently on every printed set;
- IEC 60063:2015 preferred-number series (membership through pwmkit.eseries);
- facts of the trade (common practice): the classic astable's duty exceeds 50 %.
"""

from __future__ import annotations

import csv
import io
import json
import math
import shutil
from pathlib import Path

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from reach import mostly, reached, reaching

from pwmkit import DesignError, eseries
from pwmkit.cli import main
from pwmkit.cli_design import parse_range
from pwmkit.record import load_design
from pwmkit.timing import astable

ROOT = Path(__file__).resolve().parents[2]
FAN_ARGS = ["--frequency", "25k", "--tolerance", "30%", "--duty", "20..90%", "--vcc", "12"]


def _recheck(row: dict) -> None:
    kw = dict(ra=row["ra"], rb=row["rb"], c=row["c"], vcc=row["vcc"], timer=row["timer"])
    if row["topology"] == "pot":
        kw.update(pot=row["pot"], wiper=row["wiper"])
    a = astable(row["topology"], **kw)  # vd: the default small-signal silicon diode at 1 mA
    assert float(a.frequency) == pytest.approx(row["frequency"], rel=1e-6)
    for key in ("ra", "rb"):
        assert eseries.nearest(row[key], row["r_series"]) == row[key]  # IEC 60063 membership
    assert eseries.nearest(row["c"], row["c_series"]) == row["c"]


@pytest.mark.parametrize("args", [
    FAN_ARGS,
    ["--frequency", "800..1200", "--duty", "25..35%", "--vcc", "12", "--topology", "steered", "--series", "E96"],
    ["--frequency", "2k", "--tolerance", "20%", "--duty", "60..75%", "--vcc", "9", "--topology", "classic"],
])
def test_find_json_sets_reproduce_with_astable(args: list[str], capsys: pytest.CaptureFixture[str]) -> None:
    assert main(["find", *args, "--json", "--top", "4", "--samples", "500"]) == 0
    doc = json.loads(capsys.readouterr().out)
    assert doc["format"] == "pwmkit-find" and doc["found"] and 1 <= len(doc["sets"]) <= 4
    assert doc["sets"][0]["meets"]
    for row in doc["sets"]:
        _recheck(row)


def test_find_table_and_csv(capsys: pytest.CaptureFixture[str]) -> None:
    assert main(["find", *FAN_ARGS, "--top", "3", "--samples", "500"]) == 0
    out = capsys.readouterr().out
    assert "criterion worst case" in out and "DIS peak" in out and "pot" in out
    assert main(["find", *FAN_ARGS, "--top", "3", "--samples", "500", "--csv"]) == 0
    rows = list(csv.DictReader(io.StringIO(capsys.readouterr().out)))
    assert len(rows) == 3 and {"frequency_low", "frequency_high", "yield", "part_count", "discharge_current"} <= set(rows[0])


def test_find_impossible_target_exits_1_with_the_nearest_miss(capsys: pytest.CaptureFixture[str]) -> None:
    # classic astable duty > 50 % always (textbook: D = (RA+RB)/(RA+2RB))
    assert main(["find", "--frequency", "1k", "--duty", "30%", "--vcc", "12", "--topology", "classic"]) == 1
    assert "below 50 %" in capsys.readouterr().err
    # a ±5 % window against a ±20 % pot: every set found misses at a corner, the closest is named
    assert main(["find", "--frequency", "25k", "--tolerance", "5%", "--duty", "20..90%", "--vcc", "12", "--top", "2",
                 "--samples", "200"]) == 1
    err = capsys.readouterr().err
    assert "closest set" in err and "pot +20 %" in err


def test_new_bad_load_options_exit_2_before_searching(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    base = ["new", "x", *FAN_ARGS, "--dir", str(tmp_path)]
    assert main([*base, "--load", "led", "--colour", "purple"]) == 2
    assert "--colour" in capsys.readouterr().err
    assert main([*base]) == 2  # no load given
    assert "--load" in capsys.readouterr().err
    assert main(["new", "../x", *FAN_ARGS, "--load", "led"]) == 2
    assert "NAME" in capsys.readouterr().err
    assert not list(tmp_path.iterdir())


_ranges = st.one_of(st.builds(lambda a, b: f"{a}..{b}%", st.integers(1, 49), st.integers(50, 99)),
                    st.builds(lambda a: f"{a}%", st.integers(1, 99)))


@reaching()
@settings(max_examples=60, deadline=None)
@given(text=mostly(_ranges, st.text(max_size=24)))
def test_parse_range_gives_numbers_or_a_design_error(text: str) -> None:
    try:
        lo, hi = parse_range(text, "--duty", "%")
    except DesignError as exc:
        assert "--duty" in str(exc)
    else:
        reached()
        assert math.isfinite(lo) and (hi is None or (math.isfinite(hi) and lo < hi))


@pytest.mark.parametrize(("args", "match"), [
    (["--frequency", "fast", "--duty", "50%", "--vcc", "12"], "--frequency"),
    (["--frequency", "1k", "--duty", "90..20%", "--vcc", "12"], "--duty"),
    (["--frequency", "1k", "--duty", "30%", "--vcc", "12", "--criterion", "median"], "--criterion"),
    (["--frequency", "1k", "--duty", "30%", "--vcc", "12", "--top", "0"], "top"),
])
def test_find_bad_input_exits_2(args: list[str], match: str, capsys: pytest.CaptureFixture[str]) -> None:
    assert main(["find", *args]) == 2
    assert match in capsys.readouterr().err


def test_new_writes_design_file_and_record_notebook(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    nbformat = pytest.importorskip("nbformat")
    args = ["new", "vent", *FAN_ARGS, "--load", "motor", "--motor-r", "6", "--dir", str(tmp_path), "--top", "4",
            "--samples", "500"]
    assert main(args) == 0
    toml, ipynb = tmp_path / "vent.toml", tmp_path / "vent.ipynb"
    d = load_design(toml)
    assert d.name == "vent" and d.load.kind == "motor" and d.load.r == 6.0
    assert d.requirements.frequency == 25e3 and d.requirements.duty_min == 0.2 and d.requirements.criterion == "worst-case"
    text = toml.read_text(encoding="utf-8")
    assert text.count("\n# ") >= 4 and "# * 1 pot" in text  # the other sets, for the record
    nb = nbformat.read(ipynb, as_version=4)
    code = "\n".join(c.source for c in nb.cells if c.cell_type == "code")
    assert 'Path("vent.toml")' in code and "demo_designs" not in code and "record_results" in code
    # refuses to overwrite, then replaces with --force
    assert main(args) == 2
    assert "already exists" in capsys.readouterr().err
    assert main([*args, "--force", "--pick", "2"]) == 0
    assert load_design(toml).timing != d.timing or "chose set 2" in capsys.readouterr().out


@pytest.mark.notebook
@pytest.mark.slow
def test_new_record_notebook_runs_records_and_reruns(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    pytest.importorskip("nbclient")
    assert main(["new", "bar", "--frequency", "6k", "--tolerance", "30%", "--duty", "5..95%", "--vcc", "12",
                 "--timer", "cmos", "--load", "led", "--leds", "3", "--vf", "2.1", "--led-resistor", "270",
                 "--colour", "red", "--dir", str(tmp_path), "--top", "3", "--samples", "500"]) == 0
    nb = tmp_path / "bar.ipynb"
    assert main(["rerun", str(nb)]) == 1  # nothing recorded yet
    assert main(["rerun", "--update", str(nb)]) == 0  # first record
    assert main(["rerun", str(nb)]) == 0
    # an edit saved to the design file shows as drift until it is recorded again
    d = load_design(tmp_path / "bar.toml")
    from pwmkit.record import save_design

    save_design(d.with_timing(c=d.timing.c * 1.5), tmp_path / "bar.toml", force=True)
    capsys.readouterr()
    assert main(["rerun", str(nb)]) == 1
    assert "timing.frequency" in capsys.readouterr().out


@pytest.mark.notebook
@pytest.mark.slow
def test_readme_flow_lab_headless_then_rerun(tmp_path: Path, capsys: pytest.CaptureFixture[str],
                                             monkeypatch: pytest.MonkeyPatch) -> None:
    pytest.importorskip("nbclient")
    monkeypatch.chdir(tmp_path)
    src = tmp_path / "src"
    shutil.copytree(ROOT / "notebooks", src)
    assert main(["lab", "--headless", "--source", str(src)]) == 0  # working folder ./pwmkit-notebooks
    work = tmp_path / "pwmkit-notebooks"
    assert (work / "greenhouse-fan.toml").is_file() and (work / "greenhouse_design.html").is_file()
    main_nb = work / "greenhouse_design.ipynb"
    capsys.readouterr()
    assert main(["rerun", "pwmkit-notebooks/greenhouse_design.ipynb"]) == 0  # exactly as the README says
    assert "reproduced" in capsys.readouterr().out
    # tamper one recorded value: rerun exits 1 and names the key
    nb = json.loads(main_nb.read_text(encoding="utf-8"))
    done = False
    for cell in nb["cells"]:
        for out in cell.get("outputs", []):
            data = out.get("data", {})
            payload = data.get("application/vnd.pwmkit.results+json")
            if payload and not done:
                results = payload["results"] if "results" in payload else payload
                key = "timing.frequency"
                results[key] = results[key] * 1.01
                done = True
    assert done
    main_nb.write_text(json.dumps(nb), encoding="utf-8")
    assert main(["rerun", str(main_nb)]) == 1
    assert "timing.frequency" in capsys.readouterr().out
