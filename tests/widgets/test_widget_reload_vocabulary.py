"""Reload-proof tabs and plots, one caution box per view, downloads, and the dashboard's words (no browser)."""

from __future__ import annotations

import base64
import html
import json
import re

import ipywidgets as w
import numpy as np

from pwmkit.widgets import DesignSession, LoadsPanel, WaveformPanel, dashboard
from pwmkit.widgets.tabs import PageTabs


def _bundle_column(state: dict, source_name: str, column: str) -> list[float]:
    """A column of a named ColumnDataSource in a serialised render bundle."""
    bundle = json.loads(state["render_bundle"])
    doc = next(iter(bundle["docs_json"].values()))
    stack = list(doc["roots"])
    while stack:
        node = stack.pop()
        if isinstance(node, dict):
            if node.get("name") == "ColumnDataSource" or node.get("type") == "object":
                attrs = node.get("attributes", {})
                if attrs.get("name") == source_name:
                    data = attrs["data"]
                    entries = dict(data["entries"]) if isinstance(data, dict) and "entries" in data else data
                    col = entries[column]
                    if isinstance(col, dict) and col.get("type") == "ndarray":  # bokeh: base64 bytes, maybe gzip
                        import gzip

                        raw = base64.b64decode(col["array"]["data"])
                        if raw[:2] == b"\x1f\x8b":
                            raw = gzip.decompress(raw)
                        return np.frombuffer(raw, dtype=col.get("dtype", "float64")).tolist()
                    return list(col)
            stack.extend(node.values())
        elif isinstance(node, list):
            stack.extend(node)
    raise KeyError(source_name)


def test_a_reconnecting_front_end_gets_the_current_plot(grow):
    # a front end that connects later asks for the full state (request_state / request_states):
    # it must get the plot as it is now, not as it was when the widget was made
    session = DesignSession(grow)
    panel = WaveformPanel(session)
    first = _bundle_column(panel.bokeh.get_state(), "pwmkit-waveform", "t")
    assert session.edit(lambda d: d.with_timing(c=3.3e-9)) is None
    now = np.asarray(panel.plot.source.data["t"], dtype=float)
    again = _bundle_column(panel.bokeh.get_state(), "pwmkit-waveform", "t")
    assert np.allclose(again, now) and not np.allclose(again[-1], first[-1])
    # a partial state (one changed key) is not re-serialised
    assert "render_bundle" not in panel.bokeh.get_state(key="layout")


def test_page_tabs_are_kernel_owned_buttons():
    pages = [("A", w.HTML("a")), ("B", w.HTML("b")), ("C", w.HTML("c"))]
    tabs = PageTabs(pages)
    assert tabs.titles == ("A", "B", "C") and isinstance(tabs.bar, w.ToggleButtons)
    seen = []
    tabs.observe(lambda ch: seen.append(ch["new"]), names="selected_index")
    tabs.bar.value = 2  # a click in the front end
    assert tabs.selected_index == 2 and seen == [2]
    assert [p.layout.display for p in tabs.pages] == ["none", "none", None]
    tabs.selected_index = 0  # a choice made in code shows in the bar
    assert tabs.bar.value == 0 and [p.layout.display for p in tabs.pages] == [None, "none", "none"]


def test_cautions_once_per_view_and_open(grow):
    session = DesignSession(grow)
    box = w.VBox([WaveformPanel(session), LoadsPanel(session)])
    shown = [c for c in _walk(box) if "pwmkit-cautions-box" in getattr(c, "_dom_classes", ())
             and c.layout.display != "none" and c.value]
    assert len(shown) == 1 and "<details open>" in shown[0].value
    assert "Verify on the bench; follow" not in shown[0].value  # the titles line says it once


def test_dashboard_words_and_numbers(grow):
    dash = dashboard(grow)
    text = html.unescape(re.sub(r"<[^>]+>", " ", dash.header.value))
    assert "CMOS timer" in text and "LED load" in text and "0 warnings" in text and "0 failures" in text
    assert "cmos" not in text and "string(s)" not in html.unescape(dash.waveforms.plot.bottom.title.text)
    readout = html.unescape(re.sub(r"<[^>]+>", " ", dash.timing.readout.value))  # the visible text
    assert "0.693 estimate" in readout and "textbook" not in readout and re.search(r"[-+]\d\.\d+ pt", readout)
    findings = html.unescape(dash.findings.html.value)
    assert "basis:" not in findings and "origin:" not in findings
    dash.findings.show_ok.value = True
    findings = html.unescape(dash.findings.html.value)
    # "limit" only for a part's limit; other bounds say maximum / minimum / target
    assert "(maximum 1.2 MHz)" in findings and "(limit 1.2 MHz)" not in findings and "source:" in findings
    assert "(limit 150 °C)" in findings and "(minimum 4.5 V)" in findings
    assert "0.0004988" not in findings and "< 0.001 %" in findings


def test_downloads_carry_the_current_design_and_the_report(grow):
    from pwmkit.record.designfile import design_from_toml, design_to_toml

    session = DesignSession(grow, n_mc=2000)
    dash = dashboard(session)
    assert session.edit(lambda d: d.with_timing(c=3.3e-9)) is None
    dash.flush()
    href = re.search(r"href='data:application/toml;base64,([^']+)'", dash.downloads.design_link.value).group(1)
    text = base64.b64decode(href).decode("utf-8")
    assert text == design_to_toml(session.design) and design_from_toml(text) == session.design
    dash.downloads.build_report.click()
    link = dash.downloads.report_link.value
    page = base64.b64decode(re.search(r"href='data:text/html;base64,([^']+)'", link).group(1)).decode("utf-8")
    assert "<!DOCTYPE html>" in page and "Design record — grow-bar" in page and "content hash" in page


def _walk(widget):
    stack = [widget]
    while stack:
        x = stack.pop()
        yield x
        stack.extend(getattr(x, "children", ()) or ())

