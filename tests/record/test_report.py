"""The HTML design report (pwmkit.record.report): content, self-containment, a real browser."""

from __future__ import annotations

import html
import re
import shutil
from pathlib import Path
from typing import Any

import pytest

from pwmkit import DesignError
from pwmkit.cli import main
from pwmkit.design import demo_designs
from pwmkit.values import format_value

pytest.importorskip("bokeh")

ROOT = Path(__file__).resolve().parents[2]
ARTIFACTS = ROOT / "test-artifacts"


@pytest.fixture(scope="module")
def fan_report() -> tuple[Any, str]:
    from pwmkit.evaluate import evaluate
    from pwmkit.record.report import report_html

    design = demo_designs()["fan"]
    ev = evaluate(design, n_mc=2000)
    return ev, report_html(design, ev)


def test_report_has_every_section_and_the_computed_numbers(fan_report: tuple[Any, str]) -> None:
    ev, page = fan_report
    for sid in ("summary", "requirements", "circuit", "parts", "timing", "spread", "findings", "formulas",
                "cautions"):
        assert f"<section id='{sid}'>" in page
    text = html.unescape(page)
    # exact timing and the 0.693 estimate, as computed (the screen rule: 4 significant figures)
    assert format_value(float(ev.timing.frequency), "Hz", 4) in text
    assert format_value(float(ev.ideal.frequency), "Hz", 4) in text
    assert "0.693 estimate" in text and "textbook ln 2" not in text
    assert "pt</td>" in text  # the duty difference in percentage points
    assert f"{ev.findings.fail_count} failures · {ev.findings.warn_count} warnings · {ev.findings.ok_count} passed" in text
    for f in ev.findings:
        assert f.id in text
    # cautions: a short summary at the top and the full texts at the end
    summary_at, section_at = text.index("caution-summary"), text.index("<section id='cautions'>")
    assert summary_at < text.index("<section id='requirements'>") < section_at
    for c in ev.cautions:
        assert c.title in text[summary_at:text.index("<section id='requirements'>")]
        assert c.text in text[section_at:]
    assert "<svg" in page  # the schematic
    assert "<math" in page and "LaTeX source" in page  # formulas, MathML and LaTeX source
    assert "R1" in text and "E24" in text and "C0G/NP0 ceramic" in text  # parts with their series
    assert "yield inside the requirement window" in text


def test_report_header_names_source_hash_date_version_and_revision(tmp_path: Path) -> None:
    import hashlib

    import pwmkit
    from pwmkit.evaluate import evaluate
    from pwmkit.record.designfile import design_to_toml
    from pwmkit.record.report import report_html

    design = demo_designs()["fan"].replace(revision="rev B: R2 4k7 → 3k9 after the bench test")
    data = design_to_toml(design).encode("utf-8")
    page = html.unescape(report_html(design, evaluate(design, spread=False), source_name="fan.toml",
                                     source_bytes=data, date="2026-12-02 03:30 UTC"))
    header = page[page.index("record-header"):page.index("</header>")]
    # SHA-256 (FIPS 180-4) of the file's bytes, computed here by hashlib
    for expected in ("fan.toml", hashlib.sha256(data).hexdigest(), "2026-12-02 03:30 UTC", pwmkit.__version__,
                     "rev B: R2 4k7 → 3k9 after the bench test", design.name):
        assert expected in header


def test_report_is_self_contained(fan_report: tuple[Any, str]) -> None:
    _, page = fan_report
    # no external scripts, styles or images: everything is inline
    assert not re.search(r"<script[^>]+src=", page)
    assert not re.search(r"<link[^>]+href=", page)
    assert not re.search(r"<img[^>]+src=[\"']?https?:", page)
    assert "Bokeh" in page and "embed_items" in page  # BokehJS inline plus the plot documents


def test_report_escapes_text_from_the_design_file() -> None:
    from pwmkit.evaluate import evaluate
    from pwmkit.record.report import report_html

    evil = demo_designs()["fan"].replace(name="<script>alert(1)</script>", notes="<img src=x onerror=alert(2)>")
    page = report_html(evil, evaluate(evil, spread=False))
    assert "<script>alert(1)</script>" not in page and "&lt;script&gt;alert(1)&lt;/script&gt;" in page
    assert "<img src=x" not in page
    assert "No tolerance analysis in this report" in page  # quick evaluation: said in words


def test_report_for_a_led_design_without_spread(tmp_path: Path) -> None:
    from pwmkit.evaluate import evaluate
    from pwmkit.record.report import write_report

    design = demo_designs()["grow-bar"]
    ev = evaluate(design, spread=False)
    path = write_report(design, tmp_path / "bar.html", evaluation=ev)
    page = path.read_text(encoding="utf-8")
    assert "LED" in page and "Eye safety" in page and "Pot travel" in page
    with pytest.raises(DesignError, match="already exists"):
        write_report(design, path, evaluation=ev)
    with pytest.raises(DesignError, match="belongs to another design"):
        write_report(demo_designs()["fan"], tmp_path / "x.html", evaluation=ev)


def test_export_report_from_the_command_line(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    fan = ROOT / "examples" / "greenhouse-fan.toml"
    assert main(["export", str(fan), "--report", "fan.html", "--out-dir", str(tmp_path), "--quick"]) == 0
    assert (tmp_path / "fan.html").read_text(encoding="utf-8").startswith("<!DOCTYPE html>")
    capsys.readouterr()


_BROWSER_ARGS = ["--headless", "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run",
                 "--disable-background-networking", "--disable-component-update", "--disable-sync"]


@pytest.mark.browser
def test_report_renders_in_chromium_without_errors(fan_report: tuple[Any, str], tmp_path: Path) -> None:
    chromium = shutil.which("chromium")
    if chromium is None:
        pytest.skip("Debian's chromium is not installed")
    sync_api = pytest.importorskip("playwright.sync_api")
    from pwmkit.design import Design, Timing
    from pwmkit.evaluate import evaluate
    from pwmkit.record.report import report_html

    bare = Design(name="bare", timing=Timing(topology="classic", ra="4k7", rb="10k", c="10n"))  # no load
    pages = {"fan": fan_report[1], "bare": report_html(bare, evaluate(bare, spread=False))}
    with sync_api.sync_playwright() as p:
        browser = p.chromium.launch(executable_path=chromium, headless=True, args=_BROWSER_ARGS)
        try:
            for key, page_html in pages.items():
                path = tmp_path / f"{key}.html"
                path.write_text(page_html, encoding="utf-8")
                problems: list[str] = []
                requests: list[str] = []
                page = browser.new_page(viewport={"width": 1280, "height": 900})
                page.on("console", lambda m, out=problems: out.append(f"console {m.type}: {m.text}")
                        if m.type in ("error", "warning") else None)
                page.on("pageerror", lambda e, out=problems: out.append(f"page error: {e}"))
                page.on("request", lambda r, out=requests: out.append(r.url))
                page.goto(path.as_uri())
                page.locator("canvas").first.wait_for(state="visible", timeout=30_000)
                page.wait_for_timeout(500)
                n_canvas = page.locator("canvas").count()
                rendered = set(page.evaluate("() => Object.values(window.Bokeh.index).map(v => v.model.id)"))
                math_box = page.locator("math").first.bounding_box()
                if key == "fan":
                    ARTIFACTS.mkdir(exist_ok=True)
                    page.screenshot(path=str(ARTIFACTS / "report.png"), full_page=True)
                page.close()
                assert problems == [], key
                assert [u for u in requests if not u.startswith("file:")] == []  # nothing from the network
                # every embedded plot got a rendered view (fan: waveform, pot travel, spread, MOSFET losses)
                roots = set(re.findall(r'data-root-id="([^"]+)"', page_html))
                assert len(roots) == (4 if key == "fan" else 1) and roots <= rendered and n_canvas >= len(roots)
                assert math_box is not None and math_box["height"] > 10  # MathML laid out by the browser
        finally:
            browser.close()
