"""Edges a new user hits: units, plausible ranges, odd files, hostile text, options and exit codes.

Each bad input must end in one clear `DesignError` (API) or one `pwmkit: error:` line with the
documented exit status (command line: 0 fine, 1 check failed / drift, 2 bad input, 3 internal
error) — never a hang, a raw numpy or Python message, or NaN.
"""

from __future__ import annotations

import os
import subprocess
import sys
import tempfile
from pathlib import Path

import numpy as np
import pytest

from pwmkit import DesignError, ModelLimit
from pwmkit.cli import main
from pwmkit.design import Timing, demo_designs
from pwmkit.evaluate import evaluate
from pwmkit.ranges import RANGES, checked
from pwmkit.record.designfile import design_from_toml, design_to_toml, load_design
from pwmkit.timing import astable
from pwmkit.values import parse_value

REPO = Path(__file__).resolve().parents[2]
FAN = REPO / "examples" / "greenhouse-fan.toml"
HEAD = 'format = "pwmkit-design"\nversion = 1\n'


# -- units ---------------------------------------------------------------------------------------
@pytest.mark.parametrize(("text", "unit", "value"), [
    ("4k7", "Ω", 4700.0), ("4.7 kΩ", "Ω", 4700.0), ("4.7 k\u2126", "Ω", 4700.0), ("10 kohm", "Ω", 1e4),
    ("470 ohms", "Ω", 470.0), ("470R", "Ω", 470.0), ("R47", "Ω", 0.47), ("100nF", "F", 1e-7), ("2n2", "F", 2.2e-9),
    ("12 V", "V", 12.0), ("20 kHz", "Hz", 2e4), ("1.5 mH", "H", 1.5e-3), ("300 mA", "A", 0.3), ("0.5 W", "W", 0.5),
    ("25 °C", "°C", 25.0), ("-20 \u2103", "°C", -20.0), ("50 %", "%", 0.5), ("0.05", "%", 0.05),
])
def test_each_quantity_keeps_its_spellings(text: str, unit: str, value: float) -> None:
    # SI symbols (BIPM SI Brochure 9th ed., tables 2 and 4) and IEC 60062 RKM letters R and F
    assert parse_value(text, unit) == pytest.approx(value, rel=1e-15)


@pytest.mark.parametrize(("text", "unit", "written"), [
    ("10 kF", "Ω", "F"), ("12 A", "V", "A"), ("4R7", "F", "Ω"), ("2F2", "Ω", "F"), ("5 %", "Ω", "%"),
    ("1 V", "Hz", "V"), ("3 Hz", "", "Hz"),
])
def test_a_unit_that_does_not_match_is_refused_naming_field_and_unit(text: str, unit: str, written: str) -> None:
    with pytest.raises(DesignError, match=rf"^ra: value '{text}' is given in {written}, but ra takes "):
        parse_value(text, unit, name="ra")


def test_units_are_checked_by_the_api_files_and_designs() -> None:
    with pytest.raises(DesignError, match=r"^ra: value '10 kF' is given in F, but ra takes Ω"):
        astable("classic", ra="10 kF", rb="10k", c="100n", vcc=12)
    with pytest.raises(DesignError, match=r"timing\.ra: value '10 kF' is given in F, but timing\.ra takes Ω"):
        Timing(ra="10 kF")
    with pytest.raises(DesignError, match=r"^<string>: timing\.ra: value '10 kF' is given in F"):
        design_from_toml(HEAD + '[timing]\nra = "10 kF"')
    with pytest.raises(DesignError, match=r"design\.vcc: value '12 A' is given in A, but design\.vcc takes V"):
        design_from_toml(HEAD + '[design]\nvcc = "12 A"')
    d = design_from_toml(HEAD + '[design]\nvcc = "12 V"\nt_ambient_c = "30 °C"\n[timing]\nra = "4.7 kΩ"\nc = "2n2"')
    assert (d.vcc, d.t_ambient_c, d.timing.ra, d.timing.c) == (12.0, 30.0, 4700.0, 2.2e-9)


# -- one table of plausible ranges ---------------------------------------------------------------------
@pytest.mark.parametrize(("field", "value"), [("ra", 1e-300), ("ra", 1e300), ("c", 1e-300), ("rb", -1.0),
                                              ("vcc", 1000.0), ("pot", 1e12)])
def test_out_of_range_values_are_refused_the_same_way_everywhere(field: str, value: float) -> None:
    r = RANGES[field]
    kw = dict(ra=10e3, rb=10e3, c=100e-9, vcc=12.0)
    topology = "pot" if field == "pot" else "classic"
    extra = dict(pot=10e3, wiper=0.5) if topology == "pot" else {}
    kw.update(extra)
    kw[field] = value
    with pytest.raises(DesignError, match=rf"^{field}: .* is out of range; allowed .*{field}") as api:
        astable(topology, **kw)
    assert r.text(field) in str(api.value)
    section = "design" if field == "vcc" else "timing"
    body = f"[{section}]\n{field} = {value!r}" + ('\n[timing]\ntopology = "pot"\nwiper = 0.5' if field == "pot" else "")
    if field == "pot":
        body = f'[timing]\ntopology = "pot"\nwiper = 0.5\npot = {value!r}'
    with pytest.raises(DesignError, match=rf"{section}\.{field}: .* is out of range") as file:
        design_from_toml(HEAD + body)
    assert r.text(f"{section}.{field}") in str(file.value)


def test_the_range_table_names_a_reason_for_every_row() -> None:
    for name, r in RANGES.items():
        assert r.low < r.high and r.why, name
        assert checked(r.high, name) == r.high


def test_shape_mismatch_and_bool_arrays_are_design_errors() -> None:
    with pytest.raises(DesignError, match=r"^ra, c: array shapes ra \(3,\), c \(4,\) do not broadcast together"):
        astable("classic", ra=np.full(3, 1e4), rb=1e4, c=np.full(4, 1e-7), vcc=12)
    with pytest.raises(DesignError, match=r"^ra: array of shape \(2,\) holds true/false values"):
        astable("classic", ra=np.array([True, False]), rb=1e4, c=1e-7, vcc=12)
    with pytest.raises(DesignError, match=r"^rb: .* holds true/false values"):
        astable("classic", ra=1e4, rb=[True, 1.0], c=1e-7, vcc=12)
    with pytest.raises(DesignError, match=r"^vcc: a number of about 5000 digits is far out of range"):
        astable("classic", ra=1e4, rb=1e4, c=1e-7, vcc=10**4999)


def test_array_results_are_read_only_views_and_follow_the_scalar_path() -> None:
    ra = np.array([1e3, 1e4, 1e5])
    r = astable("steered", ra=ra, rb=1e4, c=1e-7, vcc=12)
    for name in ("t_high", "t_low", "frequency", "duty", "vcc", "c", "r_charge"):
        assert not getattr(r, name).flags.writeable, name
    assert not np.shares_memory(r.r_charge, ra) or not r.r_charge.flags.writeable
    ra[0] = 5.0  # the caller may go on using their array
    one = astable("steered", ra=1e4, rb=1e4, c=1e-7, vcc=12)
    assert r.frequency[1] == one.frequency and r.duty[1] == one.duty  # vector equals scalar


# -- files and text ------------------------------------------------------------------------------
def test_a_fifo_is_refused_at_once_by_check_and_rerun(tmp_path: Path) -> None:
    fifo_toml, fifo_nb = tmp_path / "pipe.toml", tmp_path / "pipe.ipynb"
    os.mkfifo(fifo_toml)
    os.mkfifo(fifo_nb)
    for args in (["check", "--quick", str(fifo_toml)], ["rerun", str(fifo_nb)]):
        out = subprocess.run([sys.executable, "-m", "pwmkit", *args], capture_output=True, text=True, timeout=120)
        assert out.returncode == 2, out.stderr
        assert "is a named pipe (FIFO), not a regular file" in out.stderr
        assert out.stdout.strip() == "" or "pipe" not in out.stdout


def test_device_files_are_refused(tmp_path: Path) -> None:
    with pytest.raises(DesignError, match=r"/dev/null: is a device, not a regular file"):
        load_design("/dev/null")


def test_terminal_control_characters_in_file_names_are_printed_escaped(tmp_path: Path,
                                                                       capsys: pytest.CaptureFixture[str]) -> None:
    name = str(tmp_path / "\x1b[31mred\u202e.toml")
    assert main(["check", "--quick", name]) == 2
    err = capsys.readouterr().err
    assert "\x1b" not in err and "\u202e" not in err and "\\x1b[31mred\\u202e.toml" in err


def test_export_into_a_folder_it_cannot_write_names_the_destination(tmp_path: Path, monkeypatch: pytest.MonkeyPatch,
                                                                    capsys: pytest.CaptureFixture[str]) -> None:
    # simulated: the suite may run as root, which writes into read-only folders anyway
    def refuse(*args: object, **kwargs: object) -> None:
        raise PermissionError(13, "Permission denied", str(tmp_path / ".fan.html.x1y2.tmp"))

    monkeypatch.setattr(tempfile, "mkstemp", refuse)
    assert main(["export", str(FAN), "--formulas", "fan.md", "--out-dir", str(tmp_path)]) == 2
    err = capsys.readouterr().err
    assert f"{tmp_path / 'fan.md'}: cannot write into the folder {tmp_path} (Permission denied)" in err
    assert ".tmp" not in err


@pytest.mark.parametrize(("body", "match"), [
    ('[design]\nvcc_min = 13.0\nvcc_max = 12.0', r"design\.vcc_min: 13 V is above vcc_max 12 V"),
    ('[timing]\ntopology = "pot"\npot = "10k"\nwiper = "200 %"', r"timing\.wiper: '200 %' is out of range; "
                                                                 r"allowed 0 % … 100 %"),
    ('[requirements]\nduty = "150%"', r"requirements\.duty: '150%' is out of range"),
])
def test_messages_name_the_field_the_user_wrote(body: str, match: str) -> None:
    with pytest.raises(DesignError, match=match):
        design_from_toml(HEAD + body)


# -- options, evaluate and exit codes ------------------------------------------------------------------
@pytest.mark.parametrize("args", [["--seed", "-1"], ["--seed", "x"], ["--n-mc", "5"], ["--n-mc", "1e9"]])
def test_bad_check_options_are_usage_errors(args: list[str], capsys: pytest.CaptureFixture[str]) -> None:
    assert main(["check", *args, str(FAN)]) == 2
    err = capsys.readouterr().err
    assert "--seed" in err or "--n-mc" in err


def test_evaluate_refuses_a_negative_seed() -> None:
    with pytest.raises(DesignError, match=r"seed: -1 is not allowed; give a whole number >= 0"):
        evaluate(demo_designs()["fan"], seed=-1, n_mc=200)


def test_evaluate_turns_only_model_limits_into_notes(monkeypatch: pytest.MonkeyPatch) -> None:
    import pwmkit.tolerance as tol

    design = demo_designs()["fan"]
    monkeypatch.setattr(tol, "worst_case", lambda *a, **k: (_ for _ in ()).throw(ModelLimit("corner stops")))
    ev = evaluate(design, n_mc=200)
    assert "worst case: corner stops" in ev.conditions.spread_note
    monkeypatch.setattr(tol, "worst_case", lambda *a, **k: (_ for _ in ()).throw(DesignError("a real fault")))
    with pytest.raises(DesignError, match="a real fault"):
        evaluate(design, n_mc=200)


def test_non_oscillation_is_a_model_limit() -> None:
    with pytest.raises(ModelLimit, match="cannot reach the upper threshold"):
        astable("steered", ra=1e4, rb=1e4, c=1e-7, vcc=1.0)


def test_internal_errors_exit_3(monkeypatch: pytest.MonkeyPatch, capsys: pytest.CaptureFixture[str]) -> None:
    import pwmkit.evaluate as ev_module

    monkeypatch.delenv("PWMKIT_DEBUG", raising=False)
    monkeypatch.setattr(ev_module, "evaluate", lambda *a, **k: 1 / 0)
    assert main(["check", "--quick", str(FAN)]) == 3
    assert "pwmkit: internal error: ZeroDivisionError" in capsys.readouterr().err


def test_exit_status_0_1_2_as_documented(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    assert main(["check", "--quick", str(FAN)]) == 0
    bad = demo_designs()["fan"].replace(vcc_max=None, vcc_min=None, vcc=4.5)  # below the bipolar timer's range
    path = tmp_path / "low.toml"
    path.write_text(design_to_toml(bad), encoding="utf-8")
    assert main(["check", "--quick", str(path)]) == 1
    assert main(["check", str(tmp_path / "missing.toml")]) == 2
    capsys.readouterr()


@pytest.mark.parametrize(("args", "match"), [
    (["--frequency", "25 kF", "--duty", "30%", "--vcc", "12"], r"--frequency: value '25 kF' is given in F, but "
                                                                r"--frequency takes Hz"),
    (["--frequency", "25k", "--duty", "30%", "--vcc", "12 A"], r"--vcc: value '12 A' is given in A, but --vcc takes V"),
])
def test_the_command_line_checks_the_unit_of_each_option(args: list[str], match: str,
                                                          capsys: pytest.CaptureFixture[str]) -> None:
    import re

    assert main(["find", *args, "--top", "1", "--samples", "200"]) == 2
    assert re.search(match, capsys.readouterr().err)
