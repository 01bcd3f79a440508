"""The other panels and the dashboard without a browser: plot data follows the session, spread on
demand, lazy tabs, debounced extras, contained failures, light imports."""

from __future__ import annotations

import asyncio
import html
import subprocess
import sys

import numpy as np
import pytest

from pwmkit.widgets import (
    Dashboard,
    DesignSession,
    FindingsPanel,
    FlickerPanel,
    FormulasPanel,
    LoadsPanel,
    SchematicPanel,
    SpreadPanel,
    TimingPanel,
    WaveformPanel,
    dashboard,
)
from pwmkit.widgets._base import GENERIC_MESSAGE, PLOT_DELAY, Coalescer, Debouncer


def test_dashboard_is_a_widget_with_every_panel(shared_dash):
    dash = shared_dash
    import ipywidgets

    assert isinstance(dash, Dashboard) and isinstance(dash, ipywidgets.VBox)
    assert dash.tabs.titles == ("Pot travel", "Spread", "Load & switch", "Flicker", "Checks", "Formulas",
                                "Schematic", "Requirements", "Parts", "Candidates", "Supply & ambient")
    for panel in (dash.timing, dash.waveforms, dash.pot_travel, dash.spread, dash.loads, dash.flicker,
                  dash.findings, dash.formulas, dash.schematic, dash.requirements, dash.parts, dash.candidates,
                  dash.conditions, dash.file):
        assert panel.session is dash.session
        assert panel.message_text == ""
    assert "pwmkit-cautions" in dash.cautions.value and "Verify on the bench" in dash.cautions.value


def test_figures_are_updated_in_place_never_rebuilt(dash):
    figures = (dash.waveforms.plot.top, dash.pot_travel.plot.duty_figure)
    sources = (dash.waveforms.plot.source, dash.pot_travel.plot.marker)
    models = (dash.waveforms.bokeh, dash.pot_travel.bokeh)
    before = [dict(s.data) for s in sources]
    dash.timing.wiper.value = 70.0  # the slider reads percent of the travel
    assert (dash.waveforms.plot.top, dash.pot_travel.plot.duty_figure) == figures
    assert (dash.waveforms.plot.source, dash.pot_travel.plot.marker) == sources
    assert (dash.waveforms.bokeh, dash.pot_travel.bokeh) == models
    assert dash.pot_travel.plot.marker.data["wiper"] == [70.0] != before[1]["wiper"]


def test_plots_carry_their_first_data_when_the_widget_is_made(grow):
    # jupyter_bokeh renders a new view from the state serialised at creation: it must hold the data
    import json

    from pwmkit.widgets import WaveformPanel

    panel = WaveformPanel(grow)
    bundle = json.dumps(panel.bokeh.render_bundle, ensure_ascii=False)
    assert "current [mA]" in bundle and "time [µs]" in bundle
    assert len(panel.plot.source.data["v_cap"]) > 100


def test_resync_reserialises_every_plot(dash):
    before = dash.waveforms.bokeh.render_bundle
    dash.timing.wiper.value = 65.0
    assert dash.resync() == 2  # only built pages have plots: the waveforms and the first tab (pot travel)
    dash.build_pages()
    # waveforms, pot travel, spread, motor current, MOSFET losses, flicker map, candidates, supply & ambient
    assert dash.resync() == 8
    assert dash.waveforms.bokeh.render_bundle != before


def test_hidden_pages_are_built_when_shown_or_asked_for(grow):
    from pwmkit.widgets.tabs import LazyPage

    dash = Dashboard(grow)
    pages = dict(zip(dash.tabs.titles, dash.tabs.pages))
    assert all(isinstance(p, LazyPage) for p in pages.values())
    assert [t for t, p in pages.items() if p.built] == ["Pot travel"]  # the page shown
    dash.timing.wiper.value = 30.0  # a change while Spread is hidden and not built
    dash.show_tab("Flicker")
    assert pages["Flicker"].built and pages["Flicker"].children == (dash.flicker,)
    assert dash.flicker.session.design.timing.wiper == pytest.approx(0.30)  # built from the current design
    assert not pages["Spread"].built
    spread = dash.spread  # reading the attribute builds the page
    assert pages["Spread"].built and pages["Spread"].children == (spread,)
    assert dash.build_pages() == len(pages) - 3 and dash.build_pages() == 0


def test_in_a_kernel_the_shown_page_is_drawn_after_the_dashboard_and_the_rest_when_idle(grow):
    async def run() -> tuple[list[bool], list[bool], list[bool]]:
        dash = Dashboard(grow)
        made = [p.built for p in dash.tabs.pages]
        await asyncio.sleep(0)  # the loop runs the callback scheduled with call_soon
        first = [p.built for p in dash.tabs.pages]
        for _ in range(200):  # the prefetch starts after 1 s idle, one page per 50 ms
            if all(p.built for p in dash.tabs.pages):
                break
            await asyncio.sleep(0.05)
        assert [p.layout.display for p in dash.tabs.pages].count(None) == 1  # still one page shown
        return made, first, [p.built for p in dash.tabs.pages]

    made, first, later = asyncio.run(run())
    assert not any(made) and first == [True] + [False] * (len(first) - 1) and all(later)


def test_headless_runs_build_every_page(grow, monkeypatch):
    monkeypatch.setenv("PWMKIT_BUILD_ALL_PAGES", "1")
    assert all(p.built for p in Dashboard(grow).tabs.pages)


def test_pot_travel_marker_sits_on_the_exact_curve(shared_dash):
    dash = shared_dash
    ev = dash.evaluation
    data, marker = dash.pot_travel.plot.source.data, dash.pot_travel.plot.marker.data
    duty_at_wiper = np.interp(marker["wiper"][0], data["wiper"], data["duty"])
    assert marker["duty"][0] == pytest.approx(100 * ev.timing.duty)
    assert duty_at_wiper == pytest.approx(marker["duty"][0], rel=2e-3)
    # textbook curve: duty = (ra + w·P)/(ra + rb + P) for the pot topology (common practice, ln 2 cancels)
    t = dash.design.timing
    w = np.asarray(data["wiper"]) / 100.0  # the plot draws the wiper in percent of the travel
    expected = 100 * (t.ra + w * t.pot) / (t.ra + t.rb + t.pot)
    assert np.allclose(data["duty_ideal"], expected, rtol=1e-9)


def test_hidden_tabs_catch_up_when_shown(dash):
    dash.show_tab("Checks")
    point = dict(dash.flicker.plot.point.data)
    dash.timing.wiper.value = 20.0
    assert dash.flicker.plot.point.data == point  # hidden: not refreshed yet
    dash.show_tab("Flicker")
    assert dash.flicker.plot.point.data["frequency"] == [pytest.approx(dash.evaluation.timing.frequency)]


def test_flicker_point_uses_the_ieee1789_classification(shared_dash):
    dash = shared_dash
    dash.show_tab("Flicker")
    fl = dash.evaluation.flicker
    assert dash.flicker.plot.point.data["modulation"] == [pytest.approx(100.0)]  # full on/off PWM: 100 %
    # IEEE Std 1789-2015 RP2: above 3 kHz no observable effect at any modulation
    assert fl.frequency > 3000 and fl.classification == "no-effect"
    assert "no observable effect" in dash.flicker.summary.value and "✔ met" in dash.flicker.summary.value


def test_spread_runs_on_demand_and_marks_itself_stale(dash):
    dash.show_tab("Spread")
    panel = dash.spread
    assert panel.plot.sources["frequency"].data["top"] == []
    dash.session.n_mc = 2000
    panel.run.click()
    data = panel.plot.sources["frequency"].data
    spread = dash.session.spread_evaluation.spread
    assert sum(data["top"]) == spread.n - spread.n_failed
    # the axis is in kHz, as the texts beside it (6 kHz demo design)
    assert panel.plot.figures["frequency"].xaxis.axis_label == "frequency [kHz]"
    assert data["left"][0] == pytest.approx(spread.frequency_histogram.edges[0] / 1e3)
    worst = dash.session.spread_evaluation.worst_case
    assert panel.plot.bands["frequency"].data["x0"] == [pytest.approx(worst.frequency_min / 1e3)]
    assert panel.plot.windows["frequency"].data["x"] == [pytest.approx(x / 1e3) for x in spread.frequency_window]
    # every drawn band and line is named in the legend
    labels = [item.label.value for item in panel.plot.figures["frequency"].legend[0].items]
    assert labels == ["Monte Carlo samples", "worst case", "requirement window", "nominal"]
    # each histogram's title quotes its own window's share, never the other's
    assert "frequency window" in panel.plot.figures["frequency"].title.text
    assert "frequency window" not in panel.plot.figures["duty"].title.text
    assert "yield" in panel.summary.value and "pwmkit-fresh" in panel.status.value
    dash.timing.wiper.value = 45.0
    assert "stale" in panel.status.value


def test_spread_follow_changes_reruns(grow):
    session = DesignSession(grow, n_mc=2000)
    panel = SpreadPanel(session)
    panel.follow.value = True
    panel.run.click()
    first = session.spread_evaluation
    session.edit(lambda d: d.with_timing(wiper=0.4))
    assert session.spread_evaluation is not first and session.spread_is_current  # no loop: at once


def test_ticking_follow_runs_the_spread(grow):
    panel = SpreadPanel(DesignSession(grow, n_mc=2000))
    assert panel.session.spread_evaluation is None
    panel.follow.value = True
    assert panel.session.spread_is_current and sum(panel.plot.sources["duty"].data["top"]) > 0


def test_number_helpers_never_write_nan():
    from pwmkit.widgets._base import fmt, fmt_pct, num

    for bad in (float("nan"), float("inf"), None, "x"):
        assert fmt(bad, "Hz") == fmt_pct(bad) == num(bad) == "—"
    assert fmt(4700.0, "Ω") == "4.7 kΩ" and fmt_pct(0.25) == "25 %" and num(1.5, ".2f", " V") == "1.50 V"


def test_loads_panel_led(grow):
    panel = LoadsPanel(grow)
    ev = panel.session.evaluation
    assert "LED string" in panel.load_html.value
    assert f"{ev.led.n_parallel} strings × {ev.led.n_series} LEDs" in panel.load_html.value
    # the rating is the part's rating and the derated limit it is used to (IEC 60115-1 linear derating
    # from 70 °C to 155 °C; 40 °C upper ambient → full rating; 2× margin, common practice)
    assert f"{ev.led.resistor_rating:.3g} W part, derated limit {0.5 * ev.led.resistor_rating:.3g} W at 40 °C" \
        in panel.load_html.value
    # CIE 15 L*: 10 even steps from L* = 10 need Y = ((10 + 16)/116)³ = 1.126 % duty for the first
    assert "1.126 %" in panel.steps_html.value
    powers = panel.losses.source.data["power"]
    # the axis takes the prefix of the largest term (a few hundred µW here), as the total beside it
    assert panel.losses.figure.xaxis.axis_label == "power [µW]"
    assert powers[0] == pytest.approx(1e6 * ev.mosfet.p_cond)
    assert panel.motor_box.layout.display == "none"
    assert "pwmkit-cautions" in panel.children[-1].value


def test_loads_panel_motor_current_turning_points(fan):
    panel = LoadsPanel(fan)
    ev = panel.session.evaluation
    data = panel.motor_plot.source.data
    scale = 1e3 if ev.motor.i_max < 1 else 1.0
    assert max(data["i"]) == pytest.approx(scale * ev.motor.i_max)
    assert min(data["i"]) == pytest.approx(scale * (ev.motor.i_min if ev.motor.continuous else 0.0))
    assert "Freewheel diode" in panel.freewheel.value
    assert panel.led_box.layout.display == "none"


def test_findings_say_severity_in_words_and_symbols(grow):
    panel = FindingsPanel(grow)
    panel.show_ok.value = True
    findings = panel.session.evaluation.findings
    html = panel.html.value
    for f in findings:
        assert f"data-id='{f.id}'" in html
    assert html.count("pwmkit-finding ") == len(findings)
    if findings.warn_count:
        assert "! WARNING" in html and "What to change" in html


def test_formulas_render_and_copy(grow):
    panel = FormulasPanel(grow)
    assert "$$" in panel.math.value and "t_{\\mathrm{high}}" in panel.math.value
    assert "\\begin{aligned}" in panel.math.value  # broken at its factors, so it fits a column
    assert panel.text.value.startswith("\\documentclass")
    panel.format.value = "python"
    assert "def t_high(" in panel.text.value
    panel.quantity.value = "duty"
    assert "D = " in panel.math.value
    # one copy button per format, each carrying that format's whole sheet
    for key in ("latex", "markdown", "python", "c", "unicode"):
        assert f"data-format='{key}'" in panel.copy.value
    assert html.escape(panel.sheets["python"]) in panel.copy.value


def test_schematic_redraw_is_debounced_on_a_running_loop(grow):
    async def scenario() -> tuple[int, int, int]:
        session = DesignSession(grow)
        panel = SchematicPanel(session, debounce=0.05)
        start = panel.redraws
        for w in (0.2, 0.3, 0.4):
            session.edit(lambda d, w=w: d.with_timing(wiper=w))
        pending = panel.redraws
        await asyncio.sleep(0.2)
        return start, pending, panel.redraws

    start, pending, after = asyncio.run(scenario())
    assert pending == start and after == start + 1  # three edits, one redraw
    assert "<svg" in SchematicPanel(grow).svg.value


def test_debouncer_runs_at_once_without_a_loop_and_flushes_on_demand():
    calls = []
    deb = Debouncer(lambda: calls.append(1), delay=10.0)
    deb()
    assert calls == [1]

    async def scenario() -> list[int]:
        d = Debouncer(lambda: calls.append(2), delay=10.0)
        d()
        d()
        assert calls == [1]
        d.flush()
        return calls

    assert asyncio.run(scenario()) == [1, 2]


def test_coalescer_runs_at_once_without_a_loop_and_joins_a_burst_in_one_call():
    calls = []
    Coalescer(lambda: calls.append(1), delay=10.0)()
    assert calls == [1]

    async def scenario() -> list[int]:
        c = Coalescer(lambda: calls.append(2), delay=0.01)
        c()
        c()  # joins the scheduled call: not pushed back, not run twice
        assert calls == [1] and c.pending
        await asyncio.sleep(0.05)
        assert not c.pending
        c()
        c.flush()  # on demand
        c.flush()  # nothing pending: no-op
        return calls

    assert asyncio.run(scenario()) == [1, 2, 2]


def test_plots_follow_a_page_edit_after_the_readout_and_a_cell_edit_at_once(grow, monkeypatch):
    """In a kernel, an edit from the page redraws the waveform PLOT_DELAY later (the readout goes
    first; a burst of slider steps draws once, the latest design); code in a cell sees the plot at once."""
    import pwmkit.widgets._base as base

    session = DesignSession(grow)
    timing, waves = TimingPanel(session), WaveformPanel(session)
    drawn = []
    monkeypatch.setattr(waves.plot, "update", lambda timing, **_kw: drawn.append(float(timing.duty)))

    async def page_edits(from_page: bool) -> list[float]:
        monkeypatch.setattr(base, "_handling_page_message", lambda: from_page)
        drawn.clear()
        timing.wiper.value = 30.0
        timing.wiper.value = 35.0
        readout = timing.readout.value
        early = list(drawn)
        await asyncio.sleep(PLOT_DELAY + 0.1)
        assert timing.readout.value == readout  # the readout was already current
        return early

    assert asyncio.run(page_edits(True)) == [] and drawn == [pytest.approx(float(session.evaluation.timing.duty))]
    early = asyncio.run(page_edits(False))
    assert len(early) == 2 and early == drawn


def test_dashboard_flush_draws_pending_plot_redraws(grow, monkeypatch):
    import pwmkit.widgets._base as base

    async def scenario() -> tuple[int, int]:
        dash = dashboard(grow, debounce=0.0)
        await asyncio.sleep(0)
        monkeypatch.setattr(base, "_handling_page_message", lambda: True)
        before = list(dash.waveforms.plot.source.data["v_cap"])
        dash.timing.wiper.value = 20.0
        unchanged = list(dash.waveforms.plot.source.data["v_cap"]) == before
        pending = dash.flush_redraws()
        assert unchanged and list(dash.waveforms.plot.source.data["v_cap"]) != before
        return pending, dash.flush_redraws()

    pending, again = asyncio.run(scenario())
    assert pending >= 1 and again == 0


def test_page_message_probe_reads_the_kernels_current_shell_message(monkeypatch):
    import types

    from pwmkit.widgets._base import _handling_page_message

    assert _handling_page_message() is False  # no kernel here
    current = {"header": {"msg_type": "comm_msg"}}

    class FakeKernel:  # the part of ipykernel.kernelbase.Kernel the probe uses
        @classmethod
        def initialized(cls) -> bool:
            return True

        @classmethod
        def instance(cls) -> FakeKernel:
            return cls()

        def get_parent(self, channel: str) -> dict:
            assert channel == "shell"
            return current

    monkeypatch.setitem(sys.modules, "ipykernel.kernelbase", types.SimpleNamespace(Kernel=FakeKernel))
    assert _handling_page_message() is True  # a widget message from the page
    current = {"header": {"msg_type": "execute_request"}}
    assert _handling_page_message() is False  # a cell's code


def test_a_failing_view_shows_a_generic_message_and_others_carry_on(grow, monkeypatch, caplog):
    session = DesignSession(grow)
    flicker = FlickerPanel(session)
    findings = FindingsPanel(session)

    def boom(*_args, **_kwargs):
        raise RuntimeError("simulated plotting failure")

    monkeypatch.setattr(flicker.plot, "update", boom)
    assert session.edit(lambda d: d.with_timing(wiper=0.33)) is None
    assert flicker.message_text.endswith(GENERIC_MESSAGE)
    assert "simulated plotting failure" in caplog.text
    assert findings.message_text == ""


def test_session_refuses_a_design_that_does_not_evaluate(grow):
    session = DesignSession(grow)
    seen = []
    session.subscribe(seen.append)
    verdict = session.edit(lambda d: d.replace(vcc=1.0, vcc_min=None, vcc_max=None))
    assert verdict is not None and "vcc" in verdict
    assert session.design is grow and seen == []


def test_widgets_and_plots_import_no_bokeh_until_used():
    code = ("import sys, pwmkit.widgets, pwmkit.plots; "
            "print(any(m == 'bokeh' or m.startswith('bokeh.') for m in sys.modules))")
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    assert out.stdout.strip() == "False"


def test_dashboard_outside_a_kernel_sends_no_bokehjs():
    from pwmkit.widgets import load_bokehjs

    assert load_bokehjs() is False
