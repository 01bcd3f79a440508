"""Steps on a JupyterLab notebook page shared by the browser tests (Playwright's sync API).

Plain functions, not fixtures: each takes the Playwright ``page`` the test already holds.
"""

from __future__ import annotations

import re

__all__ = ["accept_dialog", "open_notebook", "run_all"]


def accept_dialog(page) -> None:
    """Accept JupyterLab's dialog (e.g. the kernel choice) when one is showing."""
    dialog = page.locator(".jp-Dialog .jp-mod-accept")
    if dialog.count():
        dialog.first.click()


def open_notebook(page, url: str) -> None:
    """Open a notebook and wait until its kernel is idle (the dialog, if any, accepted)."""
    page.goto(url)
    page.wait_for_selector(".jp-Notebook", timeout=90_000)
    page.wait_for_timeout(1000)
    accept_dialog(page)
    page.wait_for_selector(".jp-Notebook-ExecutionIndicator[data-status='idle']", timeout=90_000)
    page.locator(".jp-StatusBar-TextItem", has_text="| Idle").first.wait_for(timeout=60_000)


def run_all(page) -> None:
    """Run ▸ Run All Cells; repeated if no cell started (a kernel still connecting drops it)."""
    for _attempt in range(3):
        page.locator(".lm-MenuBar-itemLabel", has_text="Run").first.click()
        page.locator(".lm-Menu-itemLabel", has_text="Run All Cells").first.click()
        accept_dialog(page)
        started = page.locator(".jp-InputPrompt", has_text=re.compile(r"\[(\*|\d+)\]"))
        try:
            started.first.wait_for(state="attached", timeout=15_000)
            return
        except Exception:  # noqa: BLE001 - playwright's TimeoutError; try again
            page.wait_for_timeout(2000)
    raise AssertionError("Run All Cells did not start any cell")
