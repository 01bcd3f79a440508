"""The As built panel in JupyterLab, in headless chromium: the readings reach the page's plots.

Writes a small notebook next to the served copies of the notebooks (the greenhouse fan with its
demo bench session), runs it, and checks in the page that the panel's table says where the
readings lie, that its plots rendered (canvas, no BokehJS error) and that the readings' wiper
positions and duties reached the pot-travel plot's data (read through ``Bokeh.index``).
"""

from __future__ import annotations

import pytest
from lab_page import open_notebook, run_all

pytestmark = pytest.mark.browser

NOTEBOOK = "as_built_check.ipynb"
CELLS = [
    "from pwmkit.bench.demo import demo_readings, write_demo_capture\n"
    "from pwmkit.design import demo_designs\n"
    "from pwmkit.widgets import AsBuiltPanel, load_bokehjs\n"
    "load_bokehjs()\n"
    "built = demo_designs()['fan'].replace(name='fan-as-built', "
    "bench=demo_readings(write_demo_capture('bench.csv', force=True)))",
    "panel = AsBuiltPanel(built)\npanel",
    "assert panel.reconciliation.inside\nprint('PWMKIT-AS-BUILT-' + 'OK')",
]
READ_SOURCE = """([name, column]) => {
  if (typeof Bokeh === "undefined" || !Bokeh.index) { return null; }
  const views = typeof Bokeh.index.values === "function" ? Array.from(Bokeh.index.values())
                                                          : Object.values(Bokeh.index);
  for (const view of views) {
    const model = view.model.document.get_model_by_name(name);
    if (model === null) { continue; }
    const data = model.data instanceof Map ? model.data.get(column) : model.data[column];
    return Array.from(data);
  }
  return null;
}"""


def _write_notebook(root) -> None:
    import nbformat

    nb = nbformat.v4.new_notebook()
    nb.metadata["kernelspec"] = {"name": "python3", "display_name": "Python 3", "language": "python"}
    nb.cells = [nbformat.v4.new_code_cell(c) for c in CELLS]
    nbformat.write(nb, str(root / NOTEBOOK))


def test_as_built_panel_renders_the_readings(lab, page, artifacts):
    from playwright.sync_api import expect

    _write_notebook(lab.root)
    open_notebook(page, lab.page_url(NOTEBOOK))
    marker = page.locator(".jp-OutputArea-output", has_text="PWMKIT-AS-BUILT-OK")
    error = page.locator(".jp-OutputArea-output[data-mime-type='application/vnd.jupyter.stderr']")
    panel = page.locator(".pwmkit-as-built").first
    for _attempt in range(2):
        run_all(page)
        marker.or_(error).first.wait_for(state="attached", timeout=180_000)
        try:  # a kernel that answers before the page's widget manager is ready leaves "model not found"
            panel.wait_for(state="attached", timeout=20_000)
            break
        except Exception:  # noqa: BLE001 - playwright's TimeoutError: run the cells once more
            page.wait_for_timeout(2000)
    try:
        assert error.count() == 0, f"a cell failed or warned: {error.first.inner_text()[:1500]}"
        panel.scroll_into_view_if_needed()
        expect(panel.locator(".pwmkit-asbuilt-summary")).to_contain_text("every reading lies inside", timeout=30_000)
        expect(panel.locator(".pwmkit-plot-asbuilt canvas").first).to_be_visible(timeout=30_000)
        wiper = page.wait_for_function(f"() => ({READ_SOURCE})(['pwmkit-asbuilt-readings', 'wiper'])",
                                       timeout=30_000).json_value()
        assert wiper == [0.6, 0.3]
        duty = page.evaluate(f"({READ_SOURCE})(['pwmkit-asbuilt-readings', 'duty'])")
        assert 55.0 < duty[0] < 65.0 and 25.0 < duty[1] < 35.0
    finally:
        page.screenshot(path=str(artifacts / "lab_as_built_panel.png"), full_page=True)
