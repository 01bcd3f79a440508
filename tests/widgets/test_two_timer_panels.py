"""Two-timer and heater panels without a browser: the dashboard picks them, edits reach the session,
plot data follows the evaluation, bad input stays in the panel."""

from __future__ import annotations

import numpy as np
import pytest

from pwmkit.widgets import ControlHeaterPanel, Dashboard, TwoTimerPanel


@pytest.fixture(scope="module")
def mat_dash(designs):
    return Dashboard(designs["heat-mat"])


def test_dashboard_uses_the_two_timer_panels(mat_dash):
    assert isinstance(mat_dash.timing, TwoTimerPanel)
    assert isinstance(mat_dash.control_heater, ControlHeaterPanel)
    assert mat_dash.tabs.titles[0] == "Control & heater"
    assert "Two-timer PWM" in mat_dash.timing.readout.value and "thermistor loop" in mat_dash.timing.readout.value


def test_plots_follow_the_evaluation(designs):
    dash = Dashboard(designs["heat-mat"])
    ev = dash.session.evaluation
    data = dash.control_heater.control_plot.source.data
    assert np.allclose(data["duty"], 100 * ev.two_timer.control.duty)
    assert dash.control_heater.control_plot.marker.data["duty"] == [pytest.approx(100 * float(ev.timing.duty))]
    heat = dash.control_heater.heater_plot.source.data
    assert np.allclose(heat["t_element_c"], ev.heater.sweep.t_element_c)
    assert dash.timing.set_value("r_mono", "27k") is None
    ev2 = dash.session.evaluation
    assert dash.session.design.timing.r_mono == 27e3 and ev2.timing.duty > ev.timing.duty
    assert np.allclose(dash.control_heater.control_plot.source.data["duty"], 100 * ev2.two_timer.control.duty)


def test_bad_input_stays_in_the_panel(designs):
    panel = TwoTimerPanel(designs["heat-mat"])
    before = panel.session.design
    panel.set_value("c_mono", "10q")
    assert panel.session.design == before
    panel.set_value("vctl_min", "9")  # above vctl_max: the design object refuses it
    assert "vctl_min" in panel.message_text and panel.session.design == before


def test_loads_panel_shows_the_heater(mat_dash):
    mat_dash.show_tab("Load & switch")
    assert "Heater" in mat_dash.loads.load_html.value and "thermistor loop" in mat_dash.loads.load_html.value


def test_two_timer_part_search_and_use(designs):
    from pwmkit.widgets import TwoTimerCandidatesPanel

    dash = Dashboard(designs["heat-mat"])
    assert isinstance(dash.candidates, TwoTimerCandidatesPanel) and "Candidates" in dash.tabs.titles
    panel = dash.candidates
    targets = panel.targets()
    assert targets["duty_low"] == designs["heat-mat"].requirements.duty_min
    panel.search()
    assert panel.message_text == "" and panel.table.value.count("<tr>") == len(panel.result.candidates) + 1
    best = panel.result.best
    panel.use_selected(1)
    t = dash.session.design.timing
    assert (t.ra, t.rb, t.c, t.r_mono, t.c_mono) == (best.ra, best.rb, best.c, best.r_mono, best.c_mono)
    ctl = dash.session.evaluation.two_timer.control
    assert ctl.duty_low == pytest.approx(best.duty_low) and ctl.frequency == pytest.approx(best.frequency)


def test_warm_up_simulation_in_the_panel(designs):
    panel = ControlHeaterPanel(designs["heat-mat"])
    panel.run_step()
    assert panel.message_text == "" and panel.step is not None
    data = panel.step_plot.source.data
    assert np.allclose(data["t_element_c"], panel.step.t_element_c) and len(data["t"]) == len(panel.step.t)
    loop = panel.session.evaluation.heater.loop
    assert panel.step.t_final_c == pytest.approx(loop.t_element_c, abs=0.05)
    assert panel.step.t_element_c[0] == designs["heat-mat"].t_ambient_c  # from ambient
