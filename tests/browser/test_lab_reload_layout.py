"""The dashboard in JupyterLab after a page reload, at two window sizes, and against reference screenshots.

1. Reload: run the greenhouse notebook, change the design in the browser (C → 3n3), save, reload the
   page with the kernel still running; every tab must switch when clicked and show its content,
   and the waveform the page draws must be the *current* design's (computed here from the design
   values), not the one the plot was created with. Before the fix, the reloaded tab bar ignored
   clicks (ipywidgets' Lumino tab bar got no attach message; see pwmkit.widgets.tabs) and the
   plots showed the design of before the reload.
2. Fit: at 1280×900 and 1600×1000 no visible element of the dashboard is wider than its box
   (scrollWidth > clientWidth) or sticks out of the dashboard, and at 1280×900 the main readout
   and the waveforms are in view together.
3. Visual regression: a screenshot of each tab is compared with the committed reference in
   tests/browser/references/ (grey-level thumbnails, mean absolute difference). Regenerate the
   references after an intended change of the look with

       PWMKIT_UPDATE_SCREENSHOTS=1 .venv/bin/python -m pytest tests/browser/test_lab_reload_layout.py

   and look at them (test-artifacts/ holds the full-size screenshots) before committing.
"""

from __future__ import annotations

import json
import os
import re
from pathlib import Path

import numpy as np
import pytest
from lab_page import accept_dialog as _accept_dialog  # noqa: I001 - sibling modules
from lab_page import run_all as _run_all
from test_lab_dashboard import READ_SOURCE

pytestmark = pytest.mark.browser

REFERENCES = Path(__file__).resolve().parent / "references"
UPDATE = os.environ.get("PWMKIT_UPDATE_SCREENSHOTS") == "1"
#: Thumbnail width of the comparison [px] and the largest mean absolute grey difference (0–255).
THUMB_WIDTH = 240
TOLERANCE = 6.0
#: Content checks of the tabs that draw something (every other tab: its page is visible and not empty).
PLOT_TABS = ("Pot travel", "Load & switch", "Flicker", "Supply & ambient")

# Elements of the dashboard that are wider than their box or stick out of the dashboard. Form
# controls (text fields, the formula text box, selects) scroll their own text by design.
OVERFLOW_JS = """() => {
  const dash = document.querySelector('.pwmkit-dashboard');
  const edge = dash.getBoundingClientRect();
  const bad = [];
  for (const el of dash.querySelectorAll('*')) {
    if (el.closest('textarea, select, input, .noUi-target, svg, math, mjx-container, .MathJax')) { continue; }
    if (el.closest('[hidden]') || el.getClientRects().length === 0) { continue; }
    const style = getComputedStyle(el);
    if (style.visibility === 'hidden' || style.display === 'none') { continue; }
    const r = el.getBoundingClientRect();
    if (r.width === 0 || r.height === 0) { continue; }
    const name = el.tagName.toLowerCase() + '.' + String(el.className).split(' ').slice(0, 3).join('.') +
                 ' "' + (el.innerText || '').slice(0, 40).replace(/\\n/g, ' ') + '"';
    if (el.scrollWidth > el.clientWidth + 1 && el.clientWidth > 0) { bad.push('overflows ' + el.scrollWidth + '>' +
        el.clientWidth + ': ' + name); }
    if (r.right > edge.right + 1) { bad.push('sticks out ' + Math.round(r.right - edge.right) + 'px: ' + name); }
  }
  return bad;
}"""

NOTEBOOK = {
    "cells": [
        {"cell_type": "code", "metadata": {}, "execution_count": None, "outputs": [],
         "source": "from pwmkit.design import demo_designs\nfrom pwmkit.widgets import dashboard\n\n"
                   "dash = dashboard(demo_designs()['grow-bar'])\ndash"},
        {"cell_type": "code", "metadata": {}, "execution_count": None, "outputs": [],
         "source": "print('PWMKIT-' + 'LAYOUT-READY')"},
    ],
    "metadata": {"kernelspec": {"name": "python3", "display_name": "Python 3", "language": "python"}},
    "nbformat": 4, "nbformat_minor": 5,
}


def _open_and_run(page, lab, notebook: str, marker: str) -> None:
    page.goto(lab.page_url(notebook))
    page.wait_for_selector(".jp-Notebook", timeout=90_000)
    page.wait_for_timeout(1000)
    _accept_dialog(page)
    page.wait_for_selector(".jp-Notebook-ExecutionIndicator[data-status='idle']", timeout=90_000)
    page.locator(".jp-StatusBar-TextItem", has_text="| Idle").first.wait_for(timeout=60_000)
    _run_all(page)
    done = page.locator(".jp-OutputArea-output", has_text=marker)
    error = page.locator(".jp-OutputArea-output[data-mime-type='application/vnd.jupyter.stderr']")
    done.or_(error).first.wait_for(state="attached", timeout=180_000)
    assert error.count() == 0, f"a cell failed or warned: {error.first.inner_text()[:1500]}"


def _read(page, name: str, column: str):
    return page.evaluate(f"({READ_SOURCE})([{json.dumps(name)}, {json.dumps(column)}])")


def _expected_waveform(design):
    """The voltage columns the dashboard must draw for ``design``, computed here from the design."""
    from pwmkit.evaluate import evaluate
    from pwmkit.plots.style import time_scale
    from pwmkit.plots.waveforms import waveform_data
    from pwmkit.widgets.views import output_high_level

    ev = evaluate(design, spread=False)
    data, _wave = waveform_data(ev.timing, cycles=3.0, v_out_high=output_high_level(design, ev))
    factor, _unit = time_scale(float(data["t"][-1]))
    return {"t": data["t"] / factor, "v_cap": data["v_cap"], "v_out": data["v_out"]}


def _tab_titles(dash) -> list[str]:
    return [t.strip() for t in dash.locator(".pwmkit-tabbar button").all_inner_texts()]


def _page(dash, index: int):
    return dash.locator(".pwmkit-tabpages > .pwmkit-tabpage").nth(index)


def _click_every_tab(page, dash, artifacts, tag: str) -> None:
    from playwright.sync_api import expect

    titles = _tab_titles(dash)
    assert len(titles) >= 7, titles
    for i, title in enumerate(titles):
        button = dash.locator(".pwmkit-tabbar button").nth(i)
        button.scroll_into_view_if_needed()
        button.click()
        content = _page(dash, i)
        # the page is shown by the kernel (display toggled there): visible means the click reached it
        expect(content).to_be_visible(timeout=20_000)
        assert content.inner_text().strip(), title
        for j in range(len(titles)):
            if j != i:
                expect(_page(dash, j)).to_be_hidden()
        if title in PLOT_TABS:
            expect(content.locator("canvas >> visible=true").first).to_be_visible(timeout=20_000)
        if title == "Schematic":
            expect(content.locator("svg").first).to_be_visible(timeout=20_000)
        if title == "Checks":
            expect(content).to_contain_text("passed")
    page.screenshot(path=str(artifacts / f"reload_{tag}.png"), full_page=False)


def test_dashboard_survives_a_page_reload(lab, page, artifacts):
    from playwright.sync_api import expect

    from pwmkit.design import demo_designs

    _open_and_run(page, lab, "greenhouse_design.ipynb", "PWMKIT-NOTEBOOK-OK")
    dash = page.locator(".pwmkit-dashboard").first
    readout = dash.locator(".pwmkit-readout td[data-q='frequency'][data-kind='exact']")
    expect(readout).not_to_be_empty(timeout=30_000)
    # change the design in the browser, after the plots were made
    c_field = dash.locator(".pwmkit-entry-c input").first
    c_field.scroll_into_view_if_needed()
    before = readout.inner_text()
    c_field.fill("3n3")
    c_field.press("Enter")
    expect(readout).not_to_have_text(before, timeout=20_000)
    _click_every_tab(page, dash, artifacts, "before_reload")
    page.keyboard.press("Control+s")
    page.wait_for_timeout(2000)

    current = demo_designs()["grow-bar"].with_timing(c=3.3e-9)
    created = demo_designs()["grow-bar"]
    want, old = _expected_waveform(current), _expected_waveform(created)
    assert not np.allclose(want["t"][-1], old["t"][-1])  # the edit changed the time base

    for attempt in range(2):  # twice: the second reload starts from a tab other than the first
        page.reload()
        page.wait_for_selector(".pwmkit-dashboard .pwmkit-tabbar", timeout=180_000)  # slow when the machine is busy
        dash = page.locator(".pwmkit-dashboard").first
        waves = dash.locator(".pwmkit-plot-waveforms").first
        waves.wait_for(state="attached", timeout=120_000)  # a loaded machine restores the views slowly
        waves.scroll_into_view_if_needed(timeout=60_000)
        page.wait_for_function(f"() => ({READ_SOURCE})(['pwmkit-waveform', 't']) !== null", timeout=90_000)
        # the waveform drawn after the reload is the current design's
        for column in ("t", "v_cap", "v_out"):
            got = np.asarray(_read(page, "pwmkit-waveform", column), dtype=float)
            assert got.shape == want[column].shape, column
            assert np.allclose(got, want[column], rtol=1e-9, atol=1e-12), f"{column} after reload {attempt}"
        expect(dash.locator(".pwmkit-entry-c input").first).to_have_value("3.3 nF")
        _click_every_tab(page, dash, artifacts, f"after_reload_{attempt}")
        # the tab chosen last stays chosen in the kernel: a hidden plot tab catches up on the edit
        dash.locator(".pwmkit-tabbar button", has_text="Pot travel").first.click()
        marker = page.wait_for_function(f"() => ({READ_SOURCE})(['pwmkit-pot-marker', 'frequency'])",
                                        timeout=20_000).json_value()
        from pwmkit.evaluate import evaluate

        f_now = float(evaluate(current, spread=False).timing.frequency)
        assert marker[0] == pytest.approx(f_now / 1e3, rel=1e-9)  # the pot-travel axis is in kHz here


def _grey(img, height: int | None = None) -> np.ndarray:
    """Grey levels of an image scaled to THUMB_WIDTH (and ``height``, default: keep the aspect)."""
    from PIL import Image

    h = height or max(1, round(img.height * THUMB_WIDTH / img.width))
    return np.asarray(img.convert("L").resize((THUMB_WIDTH, h), Image.Resampling.BILINEAR), dtype=float)


def _compare_with_reference(png: bytes, name: str) -> None:
    """Mean absolute grey difference of thumbnails ≤ TOLERANCE; write the reference when asked to."""
    import io

    from PIL import Image

    ref = REFERENCES / f"{name}.png"
    with Image.open(io.BytesIO(png)) as shot:
        shot.load()
        if UPDATE or not ref.exists():
            REFERENCES.mkdir(exist_ok=True)
            small = shot.resize((480, max(1, round(shot.height * 480 / shot.width))), Image.Resampling.LANCZOS)
            small.convert("P", palette=Image.Palette.ADAPTIVE, colors=64).save(ref, optimize=True)
            if not UPDATE:
                pytest.fail(f"no reference screenshot {ref.name}: written now; look at it and commit it")
            return
        got = _grey(shot)
    with Image.open(ref) as reference:
        reference.load()
        ref_h = reference.height * THUMB_WIDTH / reference.width
        assert abs(ref_h - got.shape[0]) <= 0.03 * ref_h + 2, (
            f"{name}: the tab's height changed ({got.shape[0]} vs {ref_h:.0f} thumbnail rows)")
        want = _grey(reference, got.shape[0])
    diff = float(np.mean(np.abs(got - want)))
    assert diff <= TOLERANCE, f"{name}: differs from its reference by {diff:.2f} grey levels (limit {TOLERANCE})"


def _bad_value_is_marked_at_the_field(page, dash) -> None:
    """A value that cannot be read: message right under its field, field styled and aria-invalid."""
    from playwright.sync_api import expect

    entry = dash.locator(".pwmkit-entry-c").first
    field = entry.locator("input").first
    field.scroll_into_view_if_needed()
    readout = dash.locator(".pwmkit-readout td[data-q='frequency'][data-kind='exact']")
    good = readout.inner_text()
    field.fill("10q")
    field.press("Enter")
    message = entry.locator(".pwmkit-field-msg")
    expect(message).to_be_visible(timeout=20_000)
    expect(message).to_contain_text("C (timing) [F]")
    expect(message).to_contain_text("2n2, 100 nF")
    expect(field).to_have_attribute("aria-invalid", "true", timeout=10_000)
    assert field.get_attribute("aria-describedby") == "pwmkit-msg-c"
    colour = field.evaluate("e => getComputedStyle(e).borderTopColor")
    assert colour == "rgb(213, 94, 0)", colour  # the invalid style (Okabe–Ito vermillion border)
    f_box, m_box = field.bounding_box(), message.bounding_box()
    assert 0 <= m_box["y"] - (f_box["y"] + f_box["height"]) <= 12  # right under the field
    # the other fields did not move: the message sits inside this entry, not at the top of the panel
    assert readout.inner_text() == good
    field.fill("2n2")
    field.press("Enter")
    expect(message).to_be_hidden(timeout=20_000)
    expect(field).not_to_have_attribute("aria-invalid", "true", timeout=10_000)


def _copy_and_download(page, lab, dash) -> None:
    """The copy buttons put each format's sheet on the clipboard; the design-file link holds the design."""
    import base64

    from playwright.sync_api import expect

    from pwmkit.design import demo_designs
    from pwmkit.record.designfile import design_to_toml
    from pwmkit.record.formulas import formula_sheet

    page.context.grant_permissions(["clipboard-read", "clipboard-write"], origin=lab.url)
    dash.locator(".pwmkit-tabbar button", has_text="Formulas").first.click()
    design = demo_designs()["grow-bar"]
    for key, label in (("latex", "LaTeX"), ("python", "Python")):
        button = dash.locator(f".pwmkit-copy[data-format='{key}']").first
        button.scroll_into_view_if_needed()
        button.click()
        expect(button).to_contain_text("copied", timeout=10_000)
        pasted = page.evaluate("() => navigator.clipboard.readText()")
        assert pasted == formula_sheet(design, key), label
    link = dash.locator(".pwmkit-design-file").first
    href = link.get_attribute("href")
    assert link.get_attribute("download") == "grow-bar.toml"
    assert base64.b64decode(href.split(",", 1)[1]).decode("utf-8") == design_to_toml(design)
    dash.locator(".pwmkit-build-report").first.click()
    report = dash.locator(".pwmkit-report-file").first
    expect(report).to_be_visible(timeout=120_000)
    assert report.get_attribute("download") == "grow-bar-report.html"
    page_html = base64.b64decode(report.get_attribute("href").split(",", 1)[1]).decode("utf-8")
    assert "Design record — grow-bar" in page_html and "grow-bar.toml" in page_html


def test_dashboard_text_fits_and_matches_the_reference_screenshots(lab, page, artifacts):
    from playwright.sync_api import expect

    (lab.root / "dashboard_layout.ipynb").write_text(json.dumps(NOTEBOOK), encoding="utf-8")
    bokeh_errors: list[str] = []
    page.on("console", lambda m: bokeh_errors.append(m.text) if m.type == "error" and "bokeh" in m.text.lower()
            else None)
    page.set_viewport_size({"width": 1280, "height": 900})
    _open_and_run(page, lab, "dashboard_layout.ipynb", "PWMKIT-LAYOUT-READY")
    dash = page.locator(".pwmkit-dashboard").first
    expect(dash.locator(".pwmkit-plot-waveforms canvas").first).to_be_visible(timeout=30_000)
    # run the Monte Carlo once (seeded: the same figures every run) so the spread tab has its plot
    dash.locator(".pwmkit-tabbar button", has_text="Spread").first.click()
    dash.locator(".pwmkit-run-spread").first.click()
    expect(dash.locator(".pwmkit-spread-status")).to_contain_text("current design", timeout=60_000)

    _bad_value_is_marked_at_the_field(page, dash)
    _copy_and_download(page, lab, dash)

    for width, height in ((1280, 900), (1600, 1000)):
        page.set_viewport_size({"width": width, "height": height})
        page.wait_for_timeout(800)
        # the main readout and the waveforms in view together, without scrolling (1280×900)
        readout = dash.locator(".pwmkit-readout").first
        waves = dash.locator(".pwmkit-plot-waveforms").first
        readout.evaluate("e => e.scrollIntoView({block: 'start'})")
        page.wait_for_timeout(400)
        r, wv = readout.bounding_box(), waves.bounding_box()
        top = page.locator(".jp-NotebookPanel-toolbar").first.bounding_box()
        bottom = page.locator(".jp-StatusBar-Widget, #jp-main-statusbar").first.bounding_box()
        assert r["y"] >= top["y"] + top["height"] - 1 and wv["y"] + wv["height"] <= bottom["y"] + 1, (
            f"{width}×{height}: readout at {r}, waveforms at {wv}: not in view together")
        for i, title in enumerate(_tab_titles(dash)):
            dash.locator(".pwmkit-tabbar button").nth(i).click()
            content = _page(dash, i)
            expect(content).to_be_visible(timeout=20_000)
            page.wait_for_timeout(600 if title in ("Formulas", "Schematic") else 300)
            problems = page.evaluate(OVERFLOW_JS)
            assert problems == [], f"{width}×{height}, tab {title}: {problems[:8]}"
        page.screenshot(path=str(artifacts / f"dashboard_{width}x{height}.png"), full_page=False)

    # screenshots of each tab, whole: a window tall enough for the longest tab, 1280 px wide
    page.set_viewport_size({"width": 1280, "height": 2400})
    page.wait_for_timeout(800)
    for i, title in enumerate(_tab_titles(dash)):
        dash.locator(".pwmkit-tabbar button").nth(i).click()
        expect(_page(dash, i)).to_be_visible(timeout=20_000)
        tabs = dash.locator(".pwmkit-tabs").first
        tabs.evaluate("e => e.scrollIntoView({block: 'start'})")
        page.wait_for_timeout(900 if title in ("Formulas", "Schematic") else 500)
        slug = re.sub(r"[^a-z]+", "-", title.lower()).strip("-")
        png = tabs.screenshot(path=str(artifacts / f"tab_{slug}_1280.png"), animations="disabled")
        _compare_with_reference(png, f"tab-{slug}-1280")
    assert bokeh_errors == [], bokeh_errors[:5]  # every plot rendered (no bokeh error in the page)
