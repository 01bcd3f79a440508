"""A JupyterLab server for the browser tests (one per test session) and a headless chromium page.

The server listens on 127.0.0.1 only, on a free port, with a random token, temporary config,
runtime and workspace folders and a temporary root folder holding fresh copies of the notebooks.
JupyterLab is told to start the default kernel on its own (``overrides.json`` in the
environment's ``share/jupyter/lab/settings``; the file is restored afterwards). Chromium is
Debian's, launched by path; no browser is ever downloaded.
"""

from __future__ import annotations

import json
import os
import secrets
import shutil
import socket
import subprocess
import sys
import time
import urllib.request
from dataclasses import dataclass
from pathlib import Path

import pytest

REPO = Path(__file__).resolve().parents[2]
ARTIFACTS = REPO / "test-artifacts"
CHROMIUM_ARGS = ["--headless", "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run",
                 "--disable-background-networking", "--disable-component-update", "--disable-sync"]
_OVERRIDES = {"@jupyterlab/notebook-extension:tracker": {"autoStartDefaultKernel": True}}


def chromium_path() -> str | None:
    for name in ("chromium", "chromium-browser"):
        path = shutil.which(name)
        if path:
            return path
    return None


@dataclass
class Lab:
    url: str
    token: str
    root: Path

    def page_url(self, notebook: str) -> str:
        return f"{self.url}/lab/tree/{notebook}?token={self.token}&reset"


def _free_port() -> int:
    with socket.socket(socket.AF_INET, socket.SOCK_STREAM) as s:
        s.bind(("127.0.0.1", 0))
        return s.getsockname()[1]


def _write_overrides() -> tuple[Path, str | None]:
    settings = Path(sys.prefix) / "share" / "jupyter" / "lab" / "settings"
    settings.mkdir(parents=True, exist_ok=True)
    path = settings / "overrides.json"
    original = path.read_text(encoding="utf-8") if path.exists() else None
    data = json.loads(original) if original else {}
    for key, value in _OVERRIDES.items():
        data.setdefault(key, {}).update(value)
    path.write_text(json.dumps(data, indent=2), encoding="utf-8")
    return path, original


@pytest.fixture(scope="session")
def lab(tmp_path_factory):
    """A running JupyterLab server on copies of the notebooks; stopped (by its PID) at the end."""
    pytest.importorskip("jupyterlab")
    pytest.importorskip("playwright.sync_api")  # no browser, no server: skip before starting one
    if chromium_path() is None:
        pytest.skip("chromium is not installed (apt-get install chromium)")
    base = tmp_path_factory.mktemp("lab")
    root, config, runtime, workspaces = (base / n for n in ("root", "config", "runtime", "workspaces"))
    for folder in (config, runtime, workspaces):
        folder.mkdir()
    shutil.copytree(REPO / "notebooks", root)
    for example in (REPO / "examples").glob("*.toml"):  # the design files the notebooks read (as `pwmkit lab`)
        shutil.copy(example, root / example.name)
    token = secrets.token_hex(16)
    port = _free_port()
    env = dict(os.environ, JUPYTER_CONFIG_DIR=str(config), JUPYTER_RUNTIME_DIR=str(runtime),
               JUPYTER_PLATFORM_DIRS="1", PYTHONWARNINGS="ignore::DeprecationWarning")
    env.pop("JUPYTER_TOKEN", None)
    overrides, original = _write_overrides()
    subprocess.run([sys.executable, "-m", "jupyter", "labextension", "disable",
                    "@jupyterlab/apputils-extension:announcements"], env=env, check=False,
                   capture_output=True, timeout=120)
    log = open(base / "lab.log", "w", encoding="utf-8")  # noqa: SIM115 - closed at teardown
    proc = subprocess.Popen(
        [sys.executable, "-m", "jupyter", "lab", "--no-browser", "--ip=127.0.0.1", f"--port={port}",
         f"--ServerApp.token={token}", "--allow-root", f"--ServerApp.root_dir={root}",
         f"--LabApp.workspaces_dir={workspaces}", "--LabApp.check_for_updates_class=jupyterlab.NeverCheckForUpdate"],
        env=env, stdout=log, stderr=subprocess.STDOUT,
    )
    url = f"http://127.0.0.1:{port}"
    try:
        deadline = time.time() + 90
        while True:
            try:
                with urllib.request.urlopen(f"{url}/api/status?token={token}", timeout=2) as resp:
                    if resp.status == 200:
                        break
            except OSError:
                pass
            if proc.poll() is not None or time.time() > deadline:
                log.flush()
                raise RuntimeError("JupyterLab did not start:\n" + (base / "lab.log").read_text()[-3000:])
            time.sleep(0.5)
        yield Lab(url=url, token=token, root=root)
    finally:
        proc.terminate()
        try:
            proc.wait(timeout=20)
        except subprocess.TimeoutExpired:
            proc.kill()
            proc.wait(timeout=10)
        log.close()
        if original is None:
            overrides.unlink(missing_ok=True)
        else:
            overrides.write_text(original, encoding="utf-8")


@pytest.fixture(scope="module")
def browser():
    """Debian's chromium driven by Playwright (skips cleanly when either is missing).

    Module scope: Playwright's sync API keeps an asyncio loop running in this thread while it is
    open, which other test modules (that expect no running loop) must not see.
    """
    sync_api = pytest.importorskip("playwright.sync_api")
    path = chromium_path()
    if path is None:
        pytest.skip("chromium is not installed (apt-get install chromium)")
    with sync_api.sync_playwright() as p:
        b = p.chromium.launch(executable_path=path, headless=True, args=CHROMIUM_ARGS)
        try:
            yield b
        finally:
            b.close()


@pytest.fixture
def page(browser):
    context = browser.new_context(viewport={"width": 1280, "height": 900})
    pg = context.new_page()
    try:
        yield pg
    finally:
        context.close()


@pytest.fixture(scope="session")
def artifacts() -> Path:
    ARTIFACTS.mkdir(exist_ok=True)
    return ARTIFACTS


@pytest.hookimpl(hookwrapper=True)
def pytest_runtest_makereport(item, call):
    """Keep each phase's report on the test item (lets a fixture see whether the test failed)."""
    outcome = yield
    report = outcome.get_result()
    setattr(item, f"rep_{report.when}", report)
