import json, re
import pytest
from test_lab_dashboard import _run_all, _accept_dialog, READ_SOURCE

pytestmark = pytest.mark.browser
HOOK = """() => { window._pd = []; const bar = document.querySelector('.pwmkit-dashboard .lm-TabBar-content'); new MutationObserver(ms => { for (const m of ms) { if (m.target.classList && m.target.classList.contains('lm-TabBar-tab')) window._pd.push('class ' + m.target.innerText + ' ' + m.target.className + ' @' + performance.now().toFixed(0)); } }).observe(bar, {attributes: true, subtree: true, attributeFilter: ['class']}); for (const t of ['pointerdown','pointerup','click']) document.addEventListener(t, e => window._pd.push(t + ' ' + e.clientX.toFixed(0) + ',' + e.clientY.toFixed(0) + ' ' + (e.target.className||e.target.tagName) + ' dash#' + Array.from(document.querySelectorAll('.pwmkit-dashboard')).indexOf(e.target.closest('.pwmkit-dashboard')) + ' ' + e.defaultPrevented), true); }"""

def _patch(root):
    import json
    nb = json.loads((root / "greenhouse_design.ipynb").read_text())
    for c in nb["cells"]:
        if c["cell_type"] == "code" and "dash = dashboard(grow)" in "".join(c["source"]):
            c["source"] = "import ipywidgets as widgets\nfrom pwmkit.widgets import dashboard\n\ndash = dashboard(grow)\nwidgets.VBox([dash, widgets.Tab([widgets.HTML('a'), widgets.HTML('b')], titles=('INNER-A', 'INNER-B'))])"
            idx = nb["cells"].index(c)
    nb["cells"].insert(idx + 1, {"cell_type": "code", "metadata": {}, "execution_count": None, "outputs": [], "source": "widgets.Tab([widgets.HTML('c'), widgets.HTML('d')], titles=('OUTER-C', 'OUTER-D'))"})
    (root / "greenhouse_design.ipynb").write_text(json.dumps(nb))

def test_explore2(lab, page):
    _patch(lab.root)
    logs = []
    page.on("console", lambda m: logs.append(f"{m.type}: {m.text} @{m.location}"))
    page.on("pageerror", lambda e: logs.append(f"PAGEERROR: {e}"))
    page.add_init_script("""(() => { const a = EventTarget.prototype.addEventListener, r = EventTarget.prototype.removeEventListener;
      EventTarget.prototype.addEventListener = function(t, l, o) { if (t === 'pointerdown' && this.classList && this.classList.contains('lm-TabBar')) { this.__pd = (this.__pd || 0) + 1; } return a.call(this, t, l, o); };
      EventTarget.prototype.removeEventListener = function(t, l, o) { if (t === 'pointerdown' && this.classList && this.classList.contains('lm-TabBar')) { this.__pd = (this.__pd || 0) - 1; } return r.call(this, t, l, o); }; })()""")
    page.goto(lab.page_url("greenhouse_design.ipynb"))
    page.wait_for_selector(".jp-Notebook", timeout=90_000)
    page.wait_for_timeout(1000); _accept_dialog(page)
    page.wait_for_selector(".jp-Notebook-ExecutionIndicator[data-status='idle']", timeout=90_000)
    page.locator(".jp-StatusBar-TextItem", has_text="| Idle").first.wait_for(timeout=60_000)
    _run_all(page)
    page.locator(".jp-OutputArea-output", has_text="PWMKIT-NOTEBOOK-OK").first.wait_for(timeout=180_000)
    page.wait_for_timeout(2000)
    page.keyboard.press("Control+s"); page.wait_for_timeout(3000)
    for rep in range(3):
        logs.append(f"=========== RELOAD {rep}")
        page.reload()
        page.wait_for_selector(".pwmkit-dashboard", timeout=90_000)
        page.wait_for_timeout(3000 + 2000 * rep)
        page.evaluate(HOOK)
        dash = page.locator(".pwmkit-dashboard").first
        tabs = dash.locator(".lm-TabBar-tab")
        res = []
        for i in (1, 4, 6):
            tabs.nth(i).click(); page.wait_for_timeout(1500)
            res.append((i, dash.locator(".lm-TabBar-tab.lm-mod-current").inner_text(), page.evaluate("() => window._pd.splice(0)")))
        print(rep, res)
        print("LOGS", [l for l in logs if l.startswith("error") or "PAGEERR" in l or "RELOAD" in l])
        print("PDL", page.evaluate("() => Array.from(document.querySelectorAll('.lm-TabBar')).map(e => e.innerText.replace(/\\n/g, ' ').slice(0, 30) + ': ' + e.__pd)"))
        print("APP", page.evaluate("() => [typeof window.jupyterapp, typeof window.jupyterlab, typeof window.lab, Object.keys(window).filter(k => k.toLowerCase().includes('jupyter') || k.toLowerCase().includes('lumino') || k.startsWith('webpack')).join(',')]"))
        print("styles", page.evaluate("() => { const t = document.querySelector('.pwmkit-dashboard .jupyter-widget-tab'); return [t.getAttribute('style'), t.className, t.querySelector('.lm-TabBar').getAttribute('style'), t.querySelector('.widget-tab-contents').getAttribute('style'), Array.from(t.querySelector('.widget-tab-contents').children).map(c => c.className.replace('lm-Widget lm-Panel jupyter-widgets widget-container widget-box widget-vbox ', '') + '|' + (c.getAttribute('style')||''))]; }"))
        print("dashboards", page.evaluate("() => Array.from(document.querySelectorAll('.pwmkit-dashboard')).map(d => [d.getBoundingClientRect().y, d.offsetParent !== null, d.querySelectorAll('.lm-TabBar').length, d.closest('.jp-Cell') ? Array.from(document.querySelectorAll('.jp-Cell')).indexOf(d.closest('.jp-Cell')) : -1])"))
        page.screenshot(path=f"/tmp/i13x/rep{rep}.png")
    print("\n".join(l for l in logs if "favicon" not in l and "bokeh" not in l.lower())[-8000:])
