"""Your own design in JupyterLab, driven in headless chromium: requirements → search → adopt → save → reopen.

A design file and its record notebook (as ``pwmkit new`` writes them) are put in the server's root;
the notebook runs, then the test types requirements into the dashboard, runs the part search (in the
kernel's worker thread, with the progress bar), adopts a set, saves, checks the file on disk with the
design-file reader (the oracle), reverts from disk and sees the same values. Screenshots go to
test-artifacts/.
"""

from __future__ import annotations

import nbformat
import pytest
from lab_page import accept_dialog as _accept_dialog  # same folder (pytest puts it on sys.path)
from lab_page import run_all as _run_all

from pwmkit.design import demo_designs
from pwmkit.record import load_design, save_design
from pwmkit.record.record_notebook import TEMPLATE_MARKER, record_notebook

pytestmark = pytest.mark.browser

DASH = ".pwmkit-dashboard"


def test_own_design_requirements_search_adopt_save_reopen(lab, page, artifacts):
    from playwright.sync_api import expect

    design_file = lab.root / "vent.toml"
    save_design(demo_designs()["fan"].replace(name="vent"), design_file, force=True)
    (lab.root / "vent.ipynb").write_text(nbformat.writes(record_notebook("vent.toml", "vent")), encoding="utf-8")
    try:
        page.goto(lab.page_url("vent.ipynb"))
        page.wait_for_selector(".jp-Notebook", timeout=90_000)
        page.wait_for_timeout(1000)
        _accept_dialog(page)
        page.wait_for_selector(".jp-Notebook-ExecutionIndicator[data-status='idle']", timeout=90_000)
        page.locator(".jp-StatusBar-TextItem", has_text="| Idle").first.wait_for(timeout=60_000)
        _run_all(page)
        marker = page.locator(".jp-OutputArea-output", has_text=TEMPLATE_MARKER)
        error = page.locator(".jp-OutputArea-output[data-mime-type='application/vnd.jupyter.stderr']")
        marker.or_(error).first.wait_for(state="attached", timeout=240_000)
        assert error.count() == 0, f"a cell failed or warned: {error.first.inner_text()[:1500]}"

        dash = page.locator(DASH).first
        dash.scroll_into_view_if_needed()
        expect(dash.locator(".pwmkit-file-mark .pwmkit-saved")).to_be_visible(timeout=30_000)
        readout = dash.locator(".pwmkit-readout td[data-q='frequency'][data-kind='exact']")
        expect(readout).not_to_be_empty(timeout=30_000)

        # 1 — type the requirements
        dash.locator(".pwmkit-tabbar button", has_text="Requirements").first.click()
        for css, text in ((".pwmkit-req-frequency", "25k"), (".pwmkit-req-tolerance", "35 %")):
            field = dash.locator(f"{css} input").first
            field.scroll_into_view_if_needed()
            field.fill(text)
            field.press("Enter")
        expect(dash.locator(".pwmkit-req-frequency input").first).to_have_value("25 kHz", timeout=20_000)
        expect(dash.locator(".pwmkit-file-mark")).to_contain_text("unsaved changes", timeout=20_000)
        expect(dash.locator(".pwmkit-requirement-band")).to_contain_text("16.25 kHz", timeout=20_000)

        # 2 — run the search (worker thread; the page stays live)
        dash.locator(".pwmkit-tabbar button", has_text="Candidates").first.click()
        dash.locator(".pwmkit-find button, button.pwmkit-find").first.click()
        expect(dash.locator(".pwmkit-cand-status")).to_contain_text("meet the criterion", timeout=120_000)
        expect(dash.locator(".pwmkit-cand-table tr.pwmkit-cand").first).to_be_visible(timeout=20_000)
        expect(dash.locator(".pwmkit-plot-candidates canvas").first).to_be_visible(timeout=20_000)
        dash.locator(".pwmkit-candidates").first.screenshot(path=str(artifacts / "lab_own_design_candidates.png"))

        # 3 — adopt set 1
        freq_before = readout.inner_text()
        dash.locator(".pwmkit-use button, button.pwmkit-use").first.click()
        expect(dash.locator(".pwmkit-candidates .pwmkit-msg")).to_contain_text("using set #1", timeout=20_000)
        expect(readout).not_to_have_text(freq_before, timeout=20_000)
        adopted = readout.inner_text()

        # 4 — save: the file on disk holds the requirements and the adopted set
        dash.locator(".pwmkit-file-save button, button.pwmkit-file-save").first.click()
        expect(dash.locator(".pwmkit-file-mark .pwmkit-saved")).to_be_visible(timeout=20_000)
        saved = load_design(design_file)
        assert saved.requirements.frequency == 25e3 and saved.requirements.frequency_tolerance == 0.35
        assert saved.timing != demo_designs()["fan"].timing

        # 5 — reopen from disk (Revert reloads the file): the same values
        dash.locator(".pwmkit-file-revert button, button.pwmkit-file-revert").first.click()
        page.wait_for_timeout(1000)
        expect(readout).to_have_text(adopted, timeout=20_000)
        dash.locator(".pwmkit-tabbar button", has_text="Requirements").first.click()
        expect(dash.locator(".pwmkit-req-frequency input").first).to_have_value("25 kHz", timeout=20_000)
        expect(dash.locator(".pwmkit-file-mark .pwmkit-saved")).to_be_visible(timeout=20_000)
        page.screenshot(path=str(artifacts / "lab_own_design_final.png"), full_page=False)
    except Exception:
        page.screenshot(path=str(artifacts / "FAILED_lab_own_design.png"), full_page=False)
        raise
