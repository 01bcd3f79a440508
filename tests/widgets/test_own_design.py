"""The dashboard on the user's own design file: requirements → search → adopt → save → reopen.

Without a running event loop the candidates search runs in the calling thread, so each assertion
follows the click directly. Oracles: the values read back from the saved file with the design-file
reader; pwmkit.timing.astable for the adopted set; facts of the trade (common practice) for the
criterion (a worst-case criterion is met only when every corner meets the requirement).
"""

from __future__ import annotations

import dataclasses as dc
from pathlib import Path

import pytest

from pwmkit.design import demo_designs
from pwmkit.record import load_design, save_design
from pwmkit.timing import astable


@pytest.fixture
def fan_file(tmp_path: Path) -> Path:
    return save_design(demo_designs()["fan"], tmp_path / "vent.toml")


def test_requirements_search_adopt_save_reopen(fan_file: Path) -> None:
    from pwmkit.widgets import dashboard

    dash = dashboard(fan_file)
    assert dash.file.state.path == fan_file and not dash.file.dirty
    assert "saved" in dash.file.mark.value
    # type the requirements
    assert dash.requirements.set_values(frequency="25k", tolerance="35 %", duty_min="20 %", duty_max="90 %") is None
    req = dash.design.requirements
    assert (req.frequency, req.frequency_tolerance, req.duty_min, req.duty_max) == (25e3, 0.35, 0.2, 0.9)
    assert dash.file.dirty and "unsaved changes" in dash.file.mark.value
    # run the search
    c = dash.candidates
    c.start()
    assert c.result is not None and c.result.found and not c.running
    assert c.progress.value == 1.0 and "meet the criterion" in c.status.value
    assert len(c.plot_source.data["yield"]) == len(c.result) and len(c.current_source.data["yield"]) == 1
    assert "data-rank='1'" in c.table.value
    c.sort.value = "yield"
    assert "data-rank" in c.table.value
    # adopt set 1: every panel follows
    best = c.result[0]
    c.pick.value = best.rank
    c.use_selected()
    t = dash.design.timing
    assert (t.ra, t.rb, t.c, t.pot) == (best.design.timing.ra, best.design.timing.rb, best.design.timing.c,
                                        best.design.timing.pot)
    exact = astable("pot", ra=t.ra, rb=t.rb, c=t.c, pot=t.pot, wiper=t.wiper, vcc=dash.design.vcc, vd=t.steering_vd())
    assert float(dash.evaluation.timing.frequency) == pytest.approx(float(exact.frequency), rel=1e-12)
    assert dash.design.load == demo_designs()["fan"].load  # the load stays
    # save, reopen: the same values
    dash.file.do_save()
    assert not dash.file.dirty and "saved" in dash.file.message_text
    again = load_design(fan_file)
    assert again == dash.design
    dash2 = dashboard(fan_file)
    assert dash2.design == dash.design and dash2.requirements.fields["frequency"].value == "25 kHz"


def test_save_refuses_a_file_changed_on_disk_and_revert_reloads(fan_file: Path) -> None:
    from pwmkit.widgets import dashboard

    dash = dashboard(fan_file)
    dash.timing.set_value("c", "1n")
    assert dash.file.dirty
    other = load_design(fan_file).with_timing(c=1.2e-9)
    save_design(other, fan_file, force=True)  # someone else saves meanwhile
    dash.file.do_save()
    assert "changed on disk" in dash.file.message_text and load_design(fan_file) == other  # nothing lost
    dash.file.do_revert()
    assert dash.design == other and not dash.file.dirty
    # save as: a new name works, an existing other file is refused
    dash.timing.set_value("c", "1.5n")
    dash.file.do_save_as(str(fan_file.with_name("vent-2.toml")))
    assert load_design(fan_file.with_name("vent-2.toml")).timing.c == 1.5e-9
    save_design(other, fan_file.with_name("taken.toml"))
    dash.file.do_save_as(str(fan_file.with_name("taken.toml")))
    assert "already exists" in dash.file.message_text


def test_save_keeps_the_comment_lines_at_the_end_of_the_file(fan_file: Path) -> None:
    # `pwmkit new` writes the other part sets it found as comments after the settings
    from pwmkit.widgets import dashboard

    block = "# Part sets found by `pwmkit new`\n# * 1 pot 1 kΩ | meets\n#   2 steered 2.2 kΩ | misses: duty\n"
    fan_file.write_text(fan_file.read_text(encoding="utf-8") + "\n" + block, encoding="utf-8")
    dash = dashboard(fan_file)
    dash.timing.set_value("c", "1n")
    dash.file.do_save()
    text = fan_file.read_text(encoding="utf-8")
    assert "saved" in dash.file.message_text and load_design(fan_file).timing.c == 1e-9
    assert text.endswith("\n\n" + block) and text.count("Part sets found") == 1
    dash.timing.set_value("c", "1.2n")
    dash.file.do_save()  # again: the block is not doubled
    assert fan_file.read_text(encoding="utf-8").count("Part sets found") == 1
    with pytest.raises(Exception, match="only comment lines"):
        save_design(dash.design, fan_file, force=True, trailer="r = 5\n")


def test_open_asks_before_discarding_edits(fan_file: Path, tmp_path: Path) -> None:
    from pwmkit.widgets import dashboard

    grow = save_design(demo_designs()["grow-bar"], tmp_path / "bar.toml")
    dash = dashboard(fan_file)
    dash.timing.set_value("c", "1n")
    dash.file.do_open(str(grow))
    assert dash.design.name == "fan" and "press Open again" in dash.file.message_text
    dash.file.do_open(str(grow))
    assert dash.design == demo_designs()["grow-bar"] and dash.file.state.path == grow


def test_dashboard_lists_exactly_the_record_checks(fan_file: Path) -> None:
    from pwmkit.evaluate import evaluate
    from pwmkit.widgets import dashboard

    dash = dashboard(fan_file)
    record = evaluate(dash.design, n_mc=dash.session.n_mc, seed=dash.session.seed).findings
    dash.show_tab("Checks")
    shown = dash.findings.html.value
    for f in record:
        assert f"data-id='{f.id}'" in shown or f.severity == "ok"  # ok ones are folded by default
    assert shown.count("pwmkit-sev-not-run") == 3  # spread checks before the Monte Carlo run
    dash.spread._run_safely()
    shown = dash.findings.html.value
    assert "pwmkit-sev-not-run" not in shown
    assert [f.id for f in dash.session.findings] == [f.id for f in record]
    assert [f.severity for f in dash.session.findings] == [f.severity for f in record]


def test_parts_controls_and_requirement_drawings(fan_file: Path) -> None:
    from pwmkit.widgets import dashboard

    dash = dashboard(fan_file)
    dash.parts.dielectric.value = "film"
    assert dash.design.timing.c_dielectric == "film"
    dash.parts.r_series.value = "E96"
    assert dash.design.timing.r_series == "E96" and dash.design.timing.r_tolerance == 0.01  # IEC 60063 association
    dash.parts.c_tolerance.value = "2 %"
    assert dash.design.timing.c_tolerance == pytest.approx(0.02)
    dash.parts.c_tolerance.value = "lots"
    assert "not applied" in dash.parts.message.value.lower() and dash.design.timing.c_tolerance == pytest.approx(0.02)
    # supply range from the requirements panel
    dash.requirements.set_values(vcc_min="11", vcc_max="14")
    assert dash.design.supply_range == (11.0, 14.0)
    assert dash.requirements.set_values(vcc_min="12.5") is not None  # must hold the nominal 12 V
    # the window on the pot-travel plot, the readout band and the conditions plots
    lo, hi = dash.design.requirements.frequency_window
    box = dash.pot_travel.plot.windows["frequency"]
    assert dash.pot_travel.plot.frequency_figure.yaxis.axis_label == "frequency [kHz]"  # the box is in axis units
    assert box.visible and (box.bottom, box.top) == (pytest.approx(lo / 1e3), pytest.approx(hi / 1e3))
    legend = [item.label.value for item in dash.pot_travel.plot.frequency_figure.legend[0].items]
    assert "requirement window" in legend  # every drawn band is named in the legend
    assert "required" in dash.requirement_band.value and "data-q='frequency'" in dash.requirement_band.value
    dash.show_tab("Supply & ambient")
    data = dash.conditions.plot.sources["supply"].data
    assert data["x"][0] == 11.0 and data["x"][-1] == 14.0 and len(data["frequency"]) == 41
    assert dash.conditions.plot.windows[("supply", "frequency")].visible
    # axis prefix follows the text's numbers (kHz here), and the box is in axis units
    assert dash.conditions.plot.figures[("supply", "frequency")].yaxis.axis_label == "frequency [kHz]"
    f_box = dash.conditions.plot.windows[("supply", "frequency")]
    assert (f_box.bottom, f_box.top) == (pytest.approx(lo / 1e3), pytest.approx(hi / 1e3))
    # the spread histograms draw the same window
    dash.spread._run_safely()
    assert dash.design.requirements.frequency_window == dash.session.spread_evaluation.spread.frequency_window


def test_search_cancel_leaves_the_design(fan_file: Path) -> None:
    from pwmkit.widgets import dashboard

    dash = dashboard(fan_file)
    before = dash.design
    c = dash.candidates
    c._cancel.set()
    c.stop()
    # a cancel requested before the first progress point stops the (synchronous) search at once
    c._cancel = type(c._cancel)()
    original = c._cancel.is_set
    c._cancel.is_set = lambda: True  # type: ignore[method-assign]
    c.start()
    c._cancel.is_set = original  # type: ignore[method-assign]
    assert "cancelled" in c.status.value and c.result is None and dash.design == before
    assert not c.find.disabled and c.cancel.disabled


def test_dashboard_refuses_a_bad_source(tmp_path: Path) -> None:
    from pwmkit import DesignError
    from pwmkit.widgets import dashboard

    bad = tmp_path / "bad.toml"
    bad.write_text('format = "pwmkit-design"\nversion = 1\n[timing]\nra = "10q"\n', encoding="utf-8")
    with pytest.raises(DesignError, match="timing.ra"):
        dashboard(bad)
    with pytest.raises(DesignError, match="design file path"):
        dashboard(42)
    grow = demo_designs()["grow-bar"]
    dash = dashboard(dc.replace(grow))
    assert dash.file.state.path is None and not dash.file.dirty
    dash.file.do_save()
    assert "Save as" in dash.file.message_text
