"""The headless `pwmkit lab` page opened in chromium with every network request blocked.

`pwmkit lab --headless` writes an HTML copy of the executed design notebook. Offline (no CDN) it
must still show its bokeh plots (canvases), a static snapshot of the dashboard widgets with their
values, and rendered formulas (MathML, no raw `$$`). Playwright's route interception aborts every
request that is not for the page file itself and records it; none may be a script or stylesheet.
"""

from __future__ import annotations

from pathlib import Path

import pytest

from pwmkit.cli import main

pytestmark = [pytest.mark.browser, pytest.mark.notebook]

REPO = Path(__file__).resolve().parents[2]


@pytest.fixture(scope="module")
def offline_page(tmp_path_factory) -> Path:
    work = tmp_path_factory.mktemp("offline")
    assert main(["lab", "--dir", str(work / "nb"), "--source", str(REPO / "notebooks"), "--headless"]) == 0
    return work / "nb" / "greenhouse_design.html"


def test_headless_html_needs_no_network(offline_page: Path) -> None:
    text = offline_page.read_text(encoding="utf-8")
    import re

    assert not re.search(r"<script[^>]*\ssrc=[\"']?(https?:)?//", text, re.I)
    assert not re.search(r"<link[^>]*\shref=[\"']?(https?:)?//", text, re.I)
    assert "application/vnd.jupyter.widget-state+json" not in text  # replaced by the static snapshot


def test_offline_page_shows_plots_widgets_and_formulas(offline_page: Path, page, artifacts) -> None:
    from playwright.sync_api import expect

    blocked: list[tuple[str, str]] = []

    def route(r) -> None:  # noqa: ANN001 - playwright Route
        if r.request.url.startswith(("file:", "data:", "blob:", "about:")):
            r.continue_()
        else:
            blocked.append((r.request.resource_type, r.request.url))
            r.abort()

    page.route("**/*", route)
    page.goto(offline_page.as_uri())
    page.wait_for_load_state("load")
    # bokeh plots drew onto canvases (inside bokeh's shadow roots; playwright's CSS pierces them)
    expect(page.locator(".pwmkit-snapshot .pwmkit-plot canvas").first).to_be_visible(timeout=30_000)
    assert page.locator(".pwmkit-snapshot .pwmkit-plot canvas").count() >= 3
    # the static widget snapshot carries the dashboard's values
    c_field = page.locator(".pwmkit-snapshot .pwmkit-entry-c input").first
    expect(c_field).to_have_value("2.2 nF")
    expect(page.locator(".pwmkit-snapshot .pwmkit-readout td[data-q='frequency']").first).not_to_be_empty()
    # formulas rendered as MathML, no raw TeX delimiters left in the visible text
    assert page.locator("math").count() >= 5
    visible = page.locator("body").inner_text()
    assert "$$" not in visible and "\\frac" not in visible
    page.screenshot(path=str(artifacts / "offline_html.png"), full_page=False)
    assert not [u for kind, u in blocked if kind in ("script", "stylesheet")], blocked
