"""The greenhouse notebook in JupyterLab, driven in headless chromium: live widgets and bokeh plots.

Opens greenhouse_design.ipynb, runs all cells, waits for the notebook's own self-check marker,
then moves the wiper slider with the keyboard and types values into the capacitor field, and
checks that the timing readout and the plot's data in the page (read through ``Bokeh.index``)
followed. A bad value ("10q") must show the inline message and leave the readout as it was.
Screenshots go to test-artifacts/.
"""

from __future__ import annotations

import os

import pytest
from lab_page import open_notebook, run_all

pytestmark = pytest.mark.browser

NOTEBOOK = "greenhouse_design.ipynb"
DASH = ".pwmkit-dashboard"

# Reads a named ColumnDataSource of the plots inside the first dashboard on the page.
READ_SOURCE = """([name, column]) => {
  if (typeof Bokeh === "undefined" || !Bokeh.index) { return null; }
  const host = document.querySelector(".pwmkit-dashboard");
  const views = typeof Bokeh.index.values === "function" ? Array.from(Bokeh.index.values())
                                                          : Object.values(Bokeh.index);
  for (const view of views) {
    const model = view.model.document.get_model_by_name(name);
    if (model === null) { continue; }
    if (host !== null && !host.contains(view.el)) { continue; }
    const data = model.data instanceof Map ? model.data.get(column) : model.data[column];
    return Array.from(data);
  }
  return null;
}"""


# Records when each kernel websocket message leaves or reaches the page, with its message type
# (JSON text frames and JupyterLab's binary v1 frames), so a slider step can be split into its
# legs: key press -> message sent, -> first reply, -> last plot message, -> data in BokehJS.
WS_TRACE = """(() => {
  const log = [];
  window.__pwmkitWsLog = log;
  const Native = window.WebSocket;
  const decoder = new TextDecoder();
  function kind(data) {
    try {
      if (typeof data === "string") { const m = JSON.parse(data); return (m.header && m.header.msg_type) || "?"; }
      const buf = data instanceof ArrayBuffer ? data : (ArrayBuffer.isView(data) ? data.buffer : null);
      if (buf === null) { return "?"; }
      const dv = new DataView(buf);
      const n = Number(dv.getBigUint64(0, true));
      const offsets = [];
      for (let i = 0; i < n; i++) { offsets.push(Number(dv.getBigUint64(8 * (i + 1), true))); }
      const header = JSON.parse(decoder.decode(new Uint8Array(buf, offsets[1], offsets[2] - offsets[1])));
      return header.msg_type || "?";
    } catch (e) { return "?"; }
  }
  function content(data) {
    try {
      if (typeof data === "string") { return data.slice(0, 600); }
      const buf = data instanceof ArrayBuffer ? data : data.buffer;
      const dv = new DataView(buf);
      const n = Number(dv.getBigUint64(0, true));
      const offsets = [];
      for (let i = 0; i < n; i++) { offsets.push(Number(dv.getBigUint64(8 * (i + 1), true))); }
      const end = offsets.length > 5 ? offsets[5] : buf.byteLength;
      return decoder.decode(new Uint8Array(buf, offsets[4], end - offsets[4])).slice(0, 600);
    } catch (e) { return "?"; }
  }
  const size = (d) => (typeof d === "string" ? d.length : (d.byteLength || 0));
  class Traced extends Native {
    constructor(...args) {
      super(...args);
      this.addEventListener("message", (ev) => {
        const entry = ["in", performance.now(), kind(ev.data), size(ev.data)];
        if (window.__pwmkitWsContent) { entry.push(content(ev.data)); }
        log.push(entry);
      });
    }
    send(data) {
      const entry = ["out", performance.now(), kind(data), size(data)];
      if (window.__pwmkitWsContent) { entry.push(content(data)); }
      log.push(entry);
      return super.send(data);
    }
  }
  window.WebSocket = Traced;
})();"""


def _legs(log: list, start: float, t_readout: float, t_plot: float) -> tuple[float, float, float, float] | None:
    """(press -> comm sent, sent -> first comm reply, -> last comm message before the data changed,
    that message -> data in BokehJS) [ms] from a websocket trace, or None when it holds no comm message."""
    sent = [t for d, t, k, *_n in log if d == "out" and k == "comm_msg" and t >= start]
    if not sent:
        return None
    replies = [t for d, t, k, *_n in log if d == "in" and k == "comm_msg" and sent[0] <= t <= t_plot + start]
    if not replies:
        return None
    return sent[0] - start, replies[0] - sent[0], replies[-1] - replies[0], t_plot + start - replies[-1]


@pytest.fixture
def shot_on_failure(page, artifacts, request):
    """Save a screenshot of the page when the test fails (for the CI artefacts)."""
    yield
    report = getattr(request.node, "rep_call", None)
    if report is None or report.failed:
        page.screenshot(path=str(artifacts / f"FAILED_{request.node.name}.png"), full_page=False)


def test_greenhouse_dashboard_follows_slider_and_text(lab, page, artifacts, shot_on_failure):
    from playwright.sync_api import expect

    page.add_init_script(WS_TRACE)
    open_notebook(page, lab.page_url(NOTEBOOK))
    run_all(page)
    # the marker printed by the last cell (not the same text in its source code), or an error
    marker = page.locator(".jp-OutputArea-output", has_text="PWMKIT-NOTEBOOK-OK")
    error = page.locator(".jp-OutputArea-output[data-mime-type='application/vnd.jupyter.stderr']")
    marker.or_(error).first.wait_for(state="attached", timeout=180_000)
    assert error.count() == 0, f"a cell failed or warned: {error.first.inner_text()[:1500]}"

    dash = page.locator(DASH).first
    dash.scroll_into_view_if_needed()
    readout = dash.locator(".pwmkit-readout td[data-q='frequency'][data-kind='exact']")
    duty = dash.locator(".pwmkit-readout td[data-q='duty'][data-kind='exact']")
    expect(readout).not_to_be_empty(timeout=30_000)
    # the plot rendered (BokehJS loaded from the installed bokeh, no "javascript error" box)
    expect(dash.locator(".pwmkit-plot-waveforms canvas").first).to_be_visible(timeout=30_000)
    v_cap = page.wait_for_function(f"() => ({READ_SOURCE})(['pwmkit-waveform', 'v_cap'])", timeout=30_000)
    v_cap_0 = v_cap.json_value()
    assert v_cap_0 and len(v_cap_0) > 100
    page.screenshot(path=str(artifacts / "lab_dashboard_after_run_all.png"), full_page=False)

    # 1 — the wiper slider, by keyboard on its handle
    duty_0, freq_0 = duty.inner_text(), readout.inner_text()
    handle = dash.locator(".pwmkit-wiper .noUi-handle").first
    handle.scroll_into_view_if_needed()
    handle.focus()
    for _ in range(12):
        page.keyboard.press("ArrowRight")
    expect(duty).not_to_have_text(duty_0, timeout=20_000)
    page.wait_for_function(
        f"(old) => {{ const v = ({READ_SOURCE})(['pwmkit-waveform', 'v_cap']);"
        " return v !== null && JSON.stringify(v) !== JSON.stringify(old); }",
        arg=v_cap_0, timeout=20_000)
    # the pot-travel marker's update arrives in its own message, after the waveform's
    page.wait_for_function(f"() => {{ const m = ({READ_SOURCE})(['pwmkit-pot-marker', 'wiper']);"
                           " return m !== null && m[0] > 50.0; }", timeout=20_000)  # percent of the travel
    dash.locator(".pwmkit-plot-waveforms").first.screenshot(path=str(artifacts / "lab_waveforms_after_slider.png"))

    # 1b — how long one slider step takes to reach the readout and the plot data (printed, not asserted:
    # the suite holds no timed assertions; issue 12 aims at <= 150 ms and <= 300 ms)
    timings, legs = [], []
    page.evaluate("() => { window.__pwmkitWsLog.length = 0; }")
    dump = bool(os.environ.get("PWMKIT_TRACE_DUMP"))  # print every message of each step (diagnosis)
    if dump:
        page.evaluate("() => { window.__pwmkitWsContent = true; }")
    for step in range(6):  # left and right in turn: the wiper ends where it started
        page.wait_for_timeout(400)  # let the previous change settle
        text_before = duty.inner_text()
        data_before = page.evaluate(f"({READ_SOURCE})(['pwmkit-waveform', 'v_cap'])")
        handle.focus()
        start = page.evaluate("() => performance.now()")
        page.keyboard.press("ArrowLeft" if step % 2 == 0 else "ArrowRight")
        page.wait_for_function(
            "(old) => { const el = document.querySelector(\".pwmkit-dashboard .pwmkit-readout td[data-q='duty']"
            "[data-kind='exact']\"); return el !== null && el.textContent !== old; }",
            arg=text_before, polling="raf", timeout=20_000)
        t_readout = page.evaluate("() => performance.now()") - start
        page.wait_for_function(
            f"(old) => {{ const v = ({READ_SOURCE})(['pwmkit-waveform', 'v_cap']);"
            " return v !== null && JSON.stringify(v) !== JSON.stringify(old); }",
            arg=data_before, polling="raf", timeout=20_000)
        t_plot = page.evaluate("() => performance.now()") - start
        timings.append((t_readout, t_plot))
        raw = page.evaluate("() => window.__pwmkitWsLog.slice()")
        if dump:
            print("STEP", step, f"readout {t_readout:.0f} plot {t_plot:.0f}")
            for d, t, k, n, *c in raw:
                print(f"   {d:3} {t - start:8.1f} {k:24} {n} {c[0][:600] if c else ''}")
        trace = _legs(raw, start, t_readout, t_plot)
        if trace is not None:
            legs.append(trace)
        page.evaluate("() => { window.__pwmkitWsLog.length = 0; }")
    med_readout = sorted(t for t, _ in timings)[len(timings) // 2]
    med_plot = sorted(t for _, t in timings)[len(timings) // 2]
    line = (f"browser: slider step -> readout {med_readout:.0f} ms, -> plot data {med_plot:.0f} ms "
            f"(median of {len(timings)}; aim <= 150 ms and <= 300 ms)")
    if legs:
        med = [sorted(leg[i] for leg in legs)[len(legs) // 2] for i in range(4)]
        line += ("\nbrowser: legs (median): key press -> comm message sent {:.0f} ms, -> first reply {:.0f} ms, "
                 "-> last reply {:.0f} ms, -> data in BokehJS {:.0f} ms".format(*med))
    print(line)
    (artifacts / "browser_timings.txt").write_text(line + "\n", encoding="utf-8")

    # 2 — text entry in engineering notation
    c_field = dash.locator(".pwmkit-entry-c input").first
    c_field.scroll_into_view_if_needed()
    freq_1 = readout.inner_text()
    t_1 = page.evaluate(f"({READ_SOURCE})(['pwmkit-waveform', 't'])")
    c_field.fill("3n3")
    c_field.press("Enter")
    expect(readout).not_to_have_text(freq_1, timeout=20_000)
    expect(c_field).to_have_value("3.3 nF", timeout=10_000)
    page.wait_for_function(
        f"(old) => {{ const t = ({READ_SOURCE})(['pwmkit-waveform', 't']);"
        " return t !== null && t[t.length - 1] !== old[old.length - 1]; }",
        arg=t_1, timeout=20_000)
    assert freq_0 != readout.inner_text()

    # 3 — a bad value: inline message in the timing panel, readout and plot unchanged
    good = readout.inner_text()
    t_good = page.evaluate(f"({READ_SOURCE})(['pwmkit-waveform', 't'])")
    c_field.fill("10q")
    c_field.press("Enter")
    message = dash.locator(".pwmkit-timing .pwmkit-entry-c .pwmkit-field-msg")
    expect(message).to_contain_text("10q", timeout=20_000)
    expect(message).to_be_visible()
    page.wait_for_timeout(500)
    assert readout.inner_text() == good
    assert page.evaluate(f"({READ_SOURCE})(['pwmkit-waveform', 't'])") == t_good
    dash.locator(".pwmkit-timing").first.screenshot(path=str(artifacts / "lab_timing_bad_value.png"))

    # 4 — the schematic (debounced redraw on the kernel's event loop) follows a slider move
    dash.locator(".pwmkit-tabbar button", has_text="Schematic").first.click()
    svg = dash.locator(".pwmkit-schematic-svg svg").first
    expect(svg).to_be_visible(timeout=20_000)
    wiper_text = dash.locator(".pwmkit-wiper .widget-readout").first.inner_text()
    label = f"wiper {round(float(wiper_text)):g} %"  # the slider reads percent of the travel
    expect(dash.locator(".pwmkit-schematic-svg")).to_contain_text(label, timeout=20_000)
    handle.focus()
    for _ in range(4):
        page.keyboard.press("ArrowLeft")
    expect(dash.locator(".pwmkit-schematic-svg")).not_to_contain_text(label, timeout=20_000)
    dash.locator(".pwmkit-schematic-svg").first.screenshot(path=str(artifacts / "lab_schematic.png"))
    page.screenshot(path=str(artifacts / "lab_dashboard_final.png"), full_page=False)

    # 5 — the heat-mat section: two-timer editor and the control/heater plots (section 8)
    heat_marker = page.locator(".jp-OutputArea-output", has_text="PWMKIT-HEAT-MAT-OK")
    heat_marker.first.wait_for(state="attached", timeout=120_000)
    panel = page.locator(".pwmkit-control-heater").first
    panel.scroll_into_view_if_needed()
    expect(panel.locator(".pwmkit-plot-control canvas").first).to_be_visible(timeout=30_000)
    expect(panel.locator(".pwmkit-plot-heater canvas").first).to_be_visible(timeout=30_000)
    read = READ_SOURCE.replace('".pwmkit-dashboard"', '".pwmkit-control-heater"')
    duty_0 = page.wait_for_function(f"() => ({read})(['pwmkit-control', 'duty'])", timeout=30_000).json_value()
    assert duty_0 and len(duty_0) == 201
    r_field = page.locator(".pwmkit-two-timer .pwmkit-entry-r_mono input").first
    r_field.scroll_into_view_if_needed()
    r_field.fill("33k")
    r_field.press("Enter")
    page.wait_for_function(
        f"(old) => {{ const d = ({read})(['pwmkit-control', 'duty']); return d !== null && d[100] > old[100]; }}",
        arg=duty_0, timeout=20_000)
    expect(page.locator(".pwmkit-two-timer .pwmkit-two-timer-box").first).to_contain_text("Two-timer PWM")
    panel.screenshot(path=str(artifacts / "lab_heat_mat_plots.png"))
