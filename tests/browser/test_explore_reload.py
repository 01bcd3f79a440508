import json, re
import pytest
from test_lab_dashboard import _run_all, _accept_dialog, READ_SOURCE

pytestmark = pytest.mark.browser

NB = {"cells": [
  {"cell_type": "code", "metadata": {}, "execution_count": None, "outputs": [], "source":
   "from pwmkit.design import demo_designs\nfrom pwmkit.widgets import dashboard\ndash = dashboard(demo_designs()['grow-bar'])\ndash"},
  {"cell_type": "code", "metadata": {}, "execution_count": None, "outputs": [], "source": "print('PWMKIT-' + 'READY')"},
  {"cell_type": "code", "metadata": {}, "execution_count": None, "outputs": [], "source": "print('SEL', dash.tabs.selected_index, [p.active for p in dash._pages])"},
 ], "metadata": {"kernelspec": {"name": "python3", "display_name": "Python 3", "language": "python"}}, "nbformat": 4, "nbformat_minor": 5}

def test_explore(lab, page):
    (lab.root / "reload.ipynb").write_text(json.dumps(NB))
    logs = []
    page.on("console", lambda m: logs.append(f"{m.type}: {m.text}"))
    page.on("pageerror", lambda e: logs.append(f"PAGEERROR: {e}"))
    page.goto(lab.page_url("reload.ipynb"))
    page.wait_for_selector(".jp-Notebook", timeout=90_000)
    page.wait_for_timeout(1000); _accept_dialog(page)
    page.wait_for_selector(".jp-Notebook-ExecutionIndicator[data-status='idle']", timeout=90_000)
    page.locator(".jp-StatusBar-TextItem", has_text="| Idle").first.wait_for(timeout=60_000)
    _run_all(page)
    page.locator(".jp-OutputArea-output", has_text="PWMKIT-READY").first.wait_for(timeout=120_000)
    page.wait_for_timeout(3000)
    tabs = page.locator(".pwmkit-dashboard .lm-TabBar-tab")
    print("tabs before", tabs.count())
    tabs.nth(2).click(); page.wait_for_timeout(1500)
    page.locator(".jp-Cell").nth(2).click(); page.keyboard.press("Shift+Enter"); page.wait_for_timeout(3000)
    print(page.locator(".jp-OutputArea-output", has_text="SEL").all_inner_texts())
    print("current before", page.locator(".pwmkit-dashboard .lm-TabBar-tab.lm-mod-current").inner_text())
    page.screenshot(path="/tmp/i13x/before.png")
    page.keyboard.press("Control+s"); page.wait_for_timeout(3000)
    logs.append("=========== RELOAD")
    page.reload()
    page.wait_for_timeout(5000); page.screenshot(path="/tmp/i13x/mid.png"); page.wait_for_selector(".pwmkit-dashboard", timeout=90_000)
    page.wait_for_timeout(6000)
    tabs = page.locator(".pwmkit-dashboard .lm-TabBar-tab")
    print("tabs after", tabs.count())
    print("current after", page.locator(".pwmkit-dashboard .lm-TabBar-tab.lm-mod-current").inner_text())
    tabs.nth(4).click(); page.wait_for_timeout(2000)
    print("current after click", page.locator(".pwmkit-dashboard .lm-TabBar-tab.lm-mod-current").inner_text())
    page.screenshot(path="/tmp/i13x/after.png")
    page.locator(".jp-Cell").nth(2).click(); page.keyboard.press("Shift+Enter"); page.wait_for_timeout(3000)
    print(page.locator(".jp-OutputArea-output", has_text="SEL").all_inner_texts())
    print("\n".join(l for l in logs if "favicon" not in l)[-6000:])
