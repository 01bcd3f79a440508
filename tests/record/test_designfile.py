"""Design files: round trips, hostile input, atomic saves (pwmkit.record.designfile)."""

from __future__ import annotations

import dataclasses
import json
import os
import sys
from pathlib import Path

import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st
from reach import reached, reaching

from pwmkit import DesignError
from pwmkit.design import Design, Freewheel, LedLoad, MotorLoad, Requirements, Switch, Timing, demo_designs
from pwmkit.loads.led import TYPICAL_VF
from pwmkit.parts.diodes import DIODES
from pwmkit.parts.mosfets import MOSFETS
from pwmkit.record import design_from_toml, design_to_toml, load_design, save_design
from pwmkit.record import files as record_files

if sys.version_info >= (3, 11):
    import tomllib
else:  # pragma: no cover
    import tomli as tomllib

ROOT = Path(__file__).resolve().parents[2]
EXAMPLES = {"grow-bar": ROOT / "examples" / "greenhouse-grow-bar.toml", "fan": ROOT / "examples" / "greenhouse-fan.toml",
            "heat-mat": ROOT / "examples" / "greenhouse-heat-mat.toml"}
HEAD = 'format = "pwmkit-design"\nversion = 1\n'


# ------------------------------------------------------------------------------------------------
# round trips
# ------------------------------------------------------------------------------------------------
@pytest.mark.parametrize("name", ["grow-bar", "fan", "heat-mat"])
def test_demo_designs_round_trip_through_text_and_file(name: str, tmp_path: Path) -> None:
    design = demo_designs()[name]
    assert design_from_toml(design_to_toml(design)) == design
    path = save_design(design, tmp_path / f"{name}.toml")
    assert load_design(path) == design


@pytest.mark.parametrize("name", ["grow-bar", "fan", "heat-mat"])
def test_example_files_hold_the_demo_designs(name: str) -> None:
    # the shipped examples must stay in step with pwmkit.design.demo_designs()
    assert load_design(EXAMPLES[name]) == demo_designs()[name]
    assert EXAMPLES[name].read_text(encoding="utf-8") == design_to_toml(demo_designs()[name])


def _without_none(d: dict) -> dict:
    return {k: (_without_none(v) if isinstance(v, dict) else v) for k, v in d.items() if v is not None}


@pytest.mark.parametrize("name", ["grow-bar", "fan", "heat-mat"])
def test_emitted_toml_reads_back_with_the_standard_library_parser(name: str) -> None:
    # independent reader: Python's tomllib sees exactly the design's fields (TOML v1.0.0 syntax)
    design = demo_designs()[name]
    data = tomllib.loads(design_to_toml(design))
    assert data.pop("format") == "pwmkit-design" and data.pop("version") == 1
    expected = _without_none(design.to_dict())
    top = {k: expected.pop(k) for k in list(expected) if not isinstance(expected[k], dict)}
    assert data["design"] == top
    for section in ("requirements", "timing", "switch", "freewheel", "load"):
        assert data[section] == expected[section]


_text = st.text(max_size=40)
# names are printable one-line text (control and bidi-override characters are refused, see test below)
_name = st.text(st.characters(blacklist_categories=("Cc", "Cf", "Cs", "Zl", "Zp")), min_size=1,
                max_size=60).filter(lambda s: s.strip() != "")


def _pos(lo: float, hi: float) -> st.SearchStrategy[float]:
    return st.floats(lo, hi, allow_nan=False, allow_infinity=False)


@st.composite
def designs(draw: st.DrawFn) -> Design:
    topology = draw(st.sampled_from(["classic", "bypass", "steered", "pot"]))
    pot = draw(_pos(1.0, 1e7)) if topology == "pot" else None
    wiper = draw(_pos(0.0, 1.0)) if topology == "pot" else None
    control = draw(st.sampled_from(["internal", "vctl", "r_cv"]))
    timing = Timing(
        topology=topology, ra=draw(_pos(1.0, 1e9)), rb=draw(_pos(0.0, 1e9)), c=draw(_pos(1e-12, 1.0)), pot=pot,
        wiper=wiper, vd=draw(st.none() | _pos(0.0, 5.0)), vsat=draw(st.none() | _pos(0.0, 5.0)),
        r_on=draw(st.none() | _pos(0.0, 1e3)), vctl=draw(_pos(0.1, 50.0)) if control == "vctl" else None,
        r_cv=draw(_pos(1.0, 1e6)) if control == "r_cv" else None, cv_bypass=draw(st.none() | _pos(1e-12, 1e-6)),
        timer=draw(st.sampled_from(["bipolar", "cmos"])), diode=draw(st.sampled_from(sorted(DIODES))),
        c_dielectric=draw(st.sampled_from(["c0g", "x7r", "film", "electrolytic"])),
        r_series=draw(st.sampled_from(["E12", "E24", "E96"])), c_series=draw(st.sampled_from(["E6", "E12"])),
        r_tolerance=draw(_pos(0.0, 0.9)), c_tolerance=draw(_pos(0.0, 0.9)), pot_tolerance=draw(_pos(0.0, 0.9)),
    )
    kind = draw(st.sampled_from(["none", "led", "motor"]))
    load: LedLoad | MotorLoad | None = None
    if kind == "led":
        vf = draw(_pos(0.5, 10.0))
        load = LedLoad(n_series=draw(st.integers(1, 1000)), n_parallel=draw(st.integers(1, 1000)),
                       vf=vf, vf_spread=draw(_pos(0.0, min(2.0, 0.99 * vf))), r_series=draw(_pos(1e-3, 1e6)),
                       r_power_rating=draw(_pos(1e-3, 100.0)), colour=draw(st.sampled_from(sorted(TYPICAL_VF))))
    elif kind == "motor":
        load = MotorLoad(r=draw(_pos(1e-3, 1e3)), l=draw(_pos(1e-9, 1.0)), ke=draw(_pos(1e-6, 10.0)),
                         b=draw(_pos(0.0, 1.0)), t_load=draw(_pos(0.0, 10.0)), j=draw(_pos(1e-12, 1.0)))
    zener = draw(st.booleans())
    dmin = draw(st.none() | _pos(0.0, 1.0))
    dmax = draw(st.none() | _pos(0.0, 1.0))
    if dmin is not None and dmax is not None and dmin > dmax:
        dmin, dmax = dmax, dmin
    requirements = Requirements(frequency=draw(st.none() | _pos(1e-3, 1e7)),
                                frequency_tolerance=draw(_pos(0.0, 1.0)), duty=draw(st.none() | _pos(0.0, 1.0)),
                                duty_min=dmin, duty_max=dmax,
                                flicker=draw(st.sampled_from([None, "no-effect", "low-risk"])))
    vcc = draw(_pos(0.5, 60.0))
    t_amb = draw(_pos(-40.0, 85.0))
    return Design(
        name=draw(_name), vcc=vcc, timing=timing, load=load, v_load=draw(st.none() | _pos(0.5, 100.0)),
        switch=Switch(mosfet=draw(st.sampled_from(sorted(MOSFETS))), r_gate=draw(_pos(0.0, 1e4))),
        freewheel=Freewheel(diode=draw(st.sampled_from(sorted(DIODES))), clamp="zener" if zener else "diode",
                            v_zener=draw(_pos(1.0, 200.0)) if zener else None),
        vcc_min=None if draw(st.booleans()) else vcc * 0.9,
        vcc_max=None if draw(st.booleans()) else vcc * 1.1, t_ambient_c=t_amb,
        t_ambient_min_c=t_amb - draw(_pos(0.0, 20.0)), t_ambient_max_c=t_amb + draw(_pos(0.0, 60.0)),
        requirements=requirements, notes=draw(_text),
    )


@reaching()
@settings(max_examples=60, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(designs())
def test_random_designs_round_trip_without_loss(design: Design) -> None:
    reached()  # no early return: every example reaches the assertions
    text = design_to_toml(design)
    back = design_from_toml(text)
    assert back == design
    # a second save is byte-identical (stable output for diffs)
    assert design_to_toml(back) == text


def test_random_design_file_round_trip_on_disk(tmp_path: Path) -> None:
    @reaching()
    @settings(max_examples=10, deadline=None)
    @given(designs())
    def check(design: Design) -> None:
        reached()  # no early return: every example reaches the assertions
        path = save_design(design, tmp_path / "d.toml", force=True)
        assert load_design(path) == design

    check()


def test_engineering_text_and_percentages_are_read() -> None:
    text = HEAD + ('[timing]\ntopology = "steered"\nra = "4k7"\nrb = "10 kΩ"\nc = "100n"\n'
                   'r_tolerance = "±1 %"\nc_tolerance = "J"\ncv_bypass = "none"\n'
                   '[requirements]\nduty = "25 %"\nfrequency = "1.2 kHz"\n')
    d = design_from_toml(text)
    assert (d.timing.ra, d.timing.rb, d.timing.c) == (4700.0, 10e3, 1e-7)
    # IEC 60062: letter J = ±5 % (from memory, widely used)
    assert (d.timing.r_tolerance, d.timing.c_tolerance) == (0.01, 0.05)
    assert d.timing.cv_bypass is None and d.requirements.duty == 0.25 and d.requirements.frequency == 1200.0


def test_missing_sections_take_the_design_defaults() -> None:
    assert design_from_toml(HEAD) == Design()


def test_cv_bypass_none_survives_a_round_trip() -> None:
    d = demo_designs()["fan"].with_timing(cv_bypass=None)
    text = design_to_toml(d)
    assert 'cv_bypass = "none"' in text
    assert design_from_toml(text).timing.cv_bypass is None


def test_text_with_quotes_backslashes_and_control_characters_round_trips() -> None:
    notes = 'line 1\n"quoted" \\ back\\slash """ triple\ttab\r\nend \x00\x1f\x7f ☀\n'
    d = dataclasses.replace(demo_designs()["fan"], name='fan "A"\\ [x] = 1', notes=notes)
    assert design_from_toml(design_to_toml(d)) == d


@pytest.mark.parametrize("name", ["fan\n[design]", "fan\x1b[31mred", "fan\u202eevil", "a\x00b", "x\x7f", "\u2066y"])
def test_control_and_bidi_characters_are_refused_in_names(name: str) -> None:
    # a name is printed raw to terminals, Markdown headings and code comments; ANSI escapes (ESC),
    # line breaks and Unicode bidi overrides/isolates (Unicode Standard Annex #9) would change what
    # the reader sees
    with pytest.raises(DesignError, match=r"design\.name: contains the control character U\+"):
        dataclasses.replace(demo_designs()["fan"], name=name)
    text = design_to_toml(demo_designs()["fan"]).replace('name = "fan"', f"name = {json.dumps(name)}")
    with pytest.raises(DesignError, match=r"design\.name: contains the control character"):
        design_from_toml(text)


# ------------------------------------------------------------------------------------------------
# hostile and broken files
# ------------------------------------------------------------------------------------------------
@pytest.mark.parametrize(("body", "match"), [
    ('[timing]\nra = "10q"', r"^greenhouse.toml: timing\.ra: value '10q' cannot be read"),
    ("[timing]\nra = [1]", r"timing\.ra: expected a number .* got an array"),
    ("[timing]\nra = {x = 1}", r"timing\.ra: expected a number .* got a table"),
    ("[timing]\nra = true", r"timing\.ra: expected a number .* got true/false"),
    ("[timing]\nra = 1979-05-27", r"timing\.ra: expected a number .* got a date"),
    ("[timing]\nra = 1e999", r"timing\.ra: inf is not a finite number"),
    ("[timing]\nra = nan", r"timing\.ra: nan is not a finite number"),
    ("[timing]\nra = -inf", r"timing\.ra: -inf is not a finite number"),
    ("[timing]\nra = 1" + "0" * 400, r"timing\.ra: .* too large"),
    ("[timing]\nra = " + "9" * 5000, r"greenhouse.toml: timing\.ra: a number of 5000 digits is not allowed"),
    ("[timing]\nra = -5", r"timing\.ra: -5 Ω is out of range"),
    ('[timing]\ntopology = "ring"', r"timing\.topology: 'ring' is not allowed; allowed: classic, bypass"),
    ("[timing]\ntopology = 3", r"timing\.topology: expected text, got a number"),
    ('[timing]\ntopology = "pot"', r"timing\.pot: a value is required"),
    ('[load]\nkind = "led"\nn_series = 3.5', r"load\.n_series: expected a whole number"),
    ('[load]\nkind = "led"\nn_series = "3"', r"load\.n_series: expected a whole number"),
    ('[load]\nkind = "led"\nvf = 99', r"load\.vf: 99 V is out of range; allowed load\.vf <= 10 V"),
    ('[load]\nkind = "led"\ncolour = "octarine"', r"load\.colour: 'octarine' is not a known LED colour"),
    ('[load]\nkind = "valve"', r"load\.kind: 'valve' is not allowed; allowed: led, motor, heater"),
    ("[load]\nr = 2", r"load\.kind: missing"),
    ('[load]\nkind = "motor"\nn_series = 3', r"load\.n_series: unknown key; known keys in \[load\]: kind, r, l"),
    ('[switch]\nmosfet = "unobtainium"', r"switch\.mosfet: 'unobtainium' is not a known MOSFET family; allowed:"),
    ('[freewheel]\ndiode = "x"', r"freewheel\.diode: 'x' is not a known diode family"),
    ('[freewheel]\nclamp = "zener"', r"freewheel\.v_zener: a value is required"),
    ("[design]\nvcc = 12\nvcc_min = 13", r"design\.vcc: 12.0 V lies outside the supply range"),
    ("[design]\nname = 5", r"design\.name: expected text, got a number"),
    ("[timing]\nrx = 1", r"timing\.rx: unknown key; known keys in \[timing\]: topology, ra, rb"),
    ("[timing]\nrb_ = 1", r"did you mean 'rb'\?"),
    ("[timng]\nra = 1", r"timng: unknown key \(did you mean 'timing'\?\); known keys: format, version, design"),
    ("timing = 5", r"timing: expected a table \[timing\], got a number"),
    ("[timing]\n[timing.deep]\nx = 1", r"timing\.deep: unknown key"),
    ("[timing.ra]\nx = 1", r"timing\.ra: expected a number .* got a table"),
])
def test_bad_fields_name_file_field_and_reason(body: str, match: str) -> None:
    with pytest.raises(DesignError, match=match):
        design_from_toml(HEAD + body, source="greenhouse.toml")


@pytest.mark.parametrize(("text", "match"), [
    ("", r"format: missing"),
    ('format = "something-else"\nversion = 1', r"format: 'something-else' is not a pwmkit design file"),
    ('format = "pwmkit-design"', r"version: missing; a pwmkit design file starts with format"),
    ('format = "pwmkit-design"\nversion = 2', r"version: 2 was written by a newer pwmkit"),
    ('format = "pwmkit-design"\nversion = "1"', r"version: expected the whole number 1"),
    ('format = "pwmkit-design"\nversion = 1\nversion = 1', r"not valid TOML"),
    ("format = ", r"not valid TOML"),
])
def test_header_problems(text: str, match: str) -> None:
    with pytest.raises(DesignError, match=match):
        design_from_toml(text)


@pytest.mark.parametrize("opener", ["[", "{a = "])
def test_deep_nesting_is_refused_cleanly(opener: str) -> None:
    closer = "]" if opener == "[" else "}"
    text = HEAD + "[design]\nnotes = " + opener * 50_000 + "1" + closer * 50_000 + "\n"
    with pytest.raises(DesignError, match="nested too deeply"):
        design_from_toml(text, source="deep.toml")


def test_truncated_files_give_a_design_or_a_design_error() -> None:
    text = EXAMPLES["fan"].read_text(encoding="utf-8")
    outcomes = {"design": 0, "error": 0}
    for cut in range(0, len(text), 3):
        try:
            result = design_from_toml(text[:cut], source="fan.toml")
        except DesignError as exc:
            assert str(exc).startswith("fan.toml: ")
            outcomes["error"] += 1
        else:
            assert isinstance(result, Design)
            outcomes["design"] += 1
    assert outcomes["error"] > 0 and outcomes["design"] > 0


def test_missing_file_and_folder(tmp_path: Path) -> None:
    with pytest.raises(DesignError, match=r"nothere\.toml: no such design file"):
        load_design(tmp_path / "nothere.toml")
    with pytest.raises(DesignError, match="is a folder"):
        load_design(tmp_path)


def test_binary_junk_is_refused(tmp_path: Path) -> None:
    p = tmp_path / "junk.toml"
    p.write_bytes(b"\x89PNG\r\n\x1a\n" + bytes(range(256)) * 8)
    with pytest.raises(DesignError, match=r"junk\.toml: not UTF-8 text \(byte 0x89 at offset 0\)"):
        load_design(p)


def test_nul_bytes_are_refused(tmp_path: Path) -> None:
    p = tmp_path / "nul.toml"
    p.write_bytes(HEAD.encode() + b"\x00\x00")
    with pytest.raises(DesignError, match="NUL bytes"):
        load_design(p)


def test_a_two_megabyte_file_is_refused_before_parsing(tmp_path: Path) -> None:
    p = tmp_path / "big.toml"
    p.write_text(HEAD + "# " + "x" * (2 << 20) + "\n", encoding="utf-8")
    with pytest.raises(DesignError, match=r"big\.toml: the design file is larger than 1024 KiB"):
        load_design(p)
    with pytest.raises(DesignError, match="larger than 1024 KiB"):
        design_from_toml(p.read_text(encoding="utf-8"))


def test_utf8_byte_order_mark_is_accepted(tmp_path: Path) -> None:
    p = tmp_path / "bom.toml"
    p.write_bytes("\ufeff".encode() + design_to_toml(demo_designs()["fan"]).encode())
    assert load_design(p) == demo_designs()["fan"]


# ------------------------------------------------------------------------------------------------
# atomic saves
# ------------------------------------------------------------------------------------------------
def test_save_refuses_to_overwrite_without_force(tmp_path: Path) -> None:
    p = tmp_path / "d.toml"
    save_design(demo_designs()["fan"], p)
    with pytest.raises(DesignError, match="already exists; use --force"):
        save_design(demo_designs()["grow-bar"], p)
    save_design(demo_designs()["grow-bar"], p, force=True)
    assert load_design(p) == demo_designs()["grow-bar"]


def test_save_into_a_missing_folder_is_refused(tmp_path: Path) -> None:
    with pytest.raises(DesignError, match="does not exist"):
        save_design(demo_designs()["fan"], tmp_path / "no" / "d.toml")


def _leftovers(folder: Path) -> list[str]:
    return sorted(p.name for p in folder.iterdir() if p.name.endswith(".tmp"))


def test_interrupted_save_leaves_the_old_file_intact(tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    p = tmp_path / "d.toml"
    save_design(demo_designs()["fan"], p)
    before = p.read_bytes()

    def half_then_fail(fh: object, data: bytes) -> None:
        fh.write(data[: len(data) // 2])  # type: ignore[attr-defined]
        raise RuntimeError("power cut while writing")

    monkeypatch.setattr(record_files, "_write_all", half_then_fail)
    with pytest.raises(RuntimeError, match="power cut"):
        save_design(demo_designs()["grow-bar"], p, force=True)
    assert p.read_bytes() == before
    assert _leftovers(tmp_path) == []


def test_failed_fsync_leaves_the_old_file_intact(tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    p = tmp_path / "d.toml"
    save_design(demo_designs()["fan"], p)
    before = p.read_bytes()

    def no_sync(fd: int) -> None:
        raise OSError(5, "Input/output error")

    monkeypatch.setattr(record_files.os, "fsync", no_sync)
    with pytest.raises(OSError, match="Input/output error"):
        save_design(demo_designs()["grow-bar"], p, force=True)
    monkeypatch.undo()
    assert p.read_bytes() == before
    assert _leftovers(tmp_path) == []


def test_saved_file_keeps_the_permissions_of_the_file_it_replaces(tmp_path: Path) -> None:
    if os.name != "posix":  # pragma: no cover
        pytest.skip("POSIX permissions")
    p = tmp_path / "d.toml"
    save_design(demo_designs()["fan"], p)
    p.chmod(0o640)
    save_design(demo_designs()["fan"], p, force=True)
    assert p.stat().st_mode & 0o777 == 0o640


def test_numbers_are_written_as_shortest_round_trip_floats() -> None:
    text = design_to_toml(demo_designs()["grow-bar"])
    assert "c = 2.2e-09  # 2.2 nF" in text
    assert "pot = 100000.0  # 100 kΩ" in text
    d = demo_designs()["grow-bar"].with_timing(c=0.1 + 0.2)  # 0.30000000000000004: every bit kept
    assert design_from_toml(design_to_toml(d)).timing.c == 0.1 + 0.2


def test_reading_design_files_stays_light() -> None:
    # STYLE.md: no sympy, bokeh or notebook machinery just to read or write a design file
    import subprocess

    code = ("import sys, pwmkit.record, pwmkit.cli; from pwmkit.record import load_design, design_to_toml;"
            "heavy = [m for m in ('sympy', 'bokeh', 'ipywidgets', 'nbclient', 'nbformat', 'scipy', 'IPython')"
            " if m in sys.modules]; print(','.join(heavy))")
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True, cwd=ROOT)
    assert out.stdout.strip() == ""
