"""Download links for the design file and the HTML report, and the small page helpers of the dashboard.

The links are plain ``<a download>`` elements with the file inside a ``data:`` URL, so they work
in JupyterLab, Notebook and Voila without a server extension. The design file follows every
accepted edit (debounced); the report needs the Monte Carlo run and takes seconds, so it is built
when asked for.
"""

from __future__ import annotations

import base64
import hashlib
import re
from typing import Any

import ipywidgets as w

from ._base import Debouncer, Panel, esc, safe_callback
from .session import DesignSession

__all__ = ["DownloadsBar", "data_link", "file_stem", "PAGE_HELPERS_JS", "load_page_helpers"]


def file_stem(name: str) -> str:
    """A safe file-name stem for a design name: ``"grow-bar"`` → ``"grow-bar"``, ``"A/B c"`` → ``"A-B-c"``.

    >>> file_stem("grow bar / v2")
    'grow-bar-v2'
    """
    stem = re.sub(r"[^A-Za-z0-9._-]+", "-", name).strip("-.")
    return stem or "design"


def data_link(data: bytes, filename: str, mime: str, label: str, css: str) -> str:
    """HTML of a download link carrying ``data`` (base64 ``data:`` URL)."""
    url = f"data:{mime};base64,{base64.b64encode(data).decode('ascii')}"
    digest = hashlib.sha256(data).hexdigest()[:12]
    return (f"<a class='{esc(css)} pwmkit-download' download='{esc(filename)}' href='{url}' "
            f"data-sha256='{digest}' style='display:inline-block;padding:2px 10px;border:1px solid #0072B2;"
            f"border-radius:3px;color:#0072B2;text-decoration:none;white-space:nowrap'>⬇ {esc(label)}</a>")


class DownloadsBar(Panel):
    """Download the design file (always current) and the HTML report (built on request).

    Attributes
    ----------
    design_link : ipywidgets.HTML — link to ``<name>.toml``
    build_report : ipywidgets.Button; report_link : ipywidgets.HTML — link to ``<name>-report.html``
    """

    title = ""
    css_name = "downloads"

    def __init__(self, session: DesignSession, *, debounce: float = 0.3) -> None:
        super().__init__()
        self.session = session
        self.design_link = w.HTML()
        self.design_link.add_class("pwmkit-download-design")
        self.build_report = w.Button(description="Prepare the HTML report", icon="file",
                                     tooltip="evaluate with the Monte Carlo spread and offer the report to download",
                                     layout=w.Layout(width="auto"))
        self.build_report.add_class("pwmkit-build-report")
        self.report_link = w.HTML()
        self.report_link.add_class("pwmkit-download-report")
        self._report_revision: int | None = None
        self._debounced = Debouncer(self._refresh_design, debounce)
        self.set_body([w.HBox([w.HTML("<b>Files:</b>"), self.design_link, self.build_report, self.report_link],
                              layout=w.Layout(align_items="center", flex_flow="row wrap", grid_gap="4px 12px"))])
        self.build_report.on_click(lambda _b: self._build_report())
        session.subscribe(self._on_design)
        self._refresh_design()

    def _on_design(self, _evaluation: Any) -> None:
        self._debounced()
        if self._report_revision is not None and self._report_revision != self.session.revision:
            self.report_link.value = ("<span class='pwmkit-stale' style='color:#8a2d00'>report of an earlier "
                                      "design — prepare it again</span>")

    @safe_callback
    def _refresh_design(self) -> None:
        from ..record.designfile import design_to_toml

        design = self.session.design
        text = design_to_toml(design)
        self.design_link.value = data_link(text.encode("utf-8"), f"{file_stem(design.name)}.toml",
                                           "application/toml", f"design file {file_stem(design.name)}.toml",
                                           "pwmkit-design-file")
        self.clear_message()

    @safe_callback
    def _build_report(self) -> None:
        from ..evaluate import evaluate
        from ..record.designfile import design_to_toml
        from ..record.report import report_html

        design = self.session.design
        revision = self.session.revision
        self.report_link.value = "<i>building the report…</i>"
        evaluation = evaluate(design, n_mc=self.session.n_mc, seed=self.session.seed)
        source = design_to_toml(design).encode("utf-8")
        page = report_html(design, evaluation, source_name=f"{file_stem(design.name)}.toml (from the dashboard)",
                           source_bytes=source)
        self.report_link.value = data_link(page.encode("utf-8"), f"{file_stem(design.name)}-report.html",
                                           "text/html", f"report {file_stem(design.name)}-report.html",
                                           "pwmkit-report-file")
        self._report_revision = revision
        self.clear_message()

    def flush(self) -> None:
        self._debounced.flush()


#: Page helpers: ``aria-invalid`` on inputs of fields marked invalid, and the copy buttons.
PAGE_HELPERS_JS = r"""
(function () {
  if (window.__pwmkitHelpers) { return; }
  window.__pwmkitHelpers = true;
  var queued = false;
  function sync() {
    queued = false;
    document.querySelectorAll('.pwmkit-entry').forEach(function (entry) {
      var bad = entry.classList.contains('pwmkit-invalid');
      entry.querySelectorAll('input[type="text"], input:not([type])').forEach(function (input) {
        if (bad) {
          input.setAttribute('aria-invalid', 'true');
          var msg = entry.querySelector('.pwmkit-msg-error');
          if (msg && msg.id) { input.setAttribute('aria-describedby', msg.id); }
        } else if (input.hasAttribute('aria-invalid')) {
          input.removeAttribute('aria-invalid');
          input.removeAttribute('aria-describedby');
        }
      });
    });
  }
  new MutationObserver(function () {
    if (!queued) { queued = true; window.requestAnimationFrame(sync); }
  }).observe(document.body, {subtree: true, childList: true, attributes: true, attributeFilter: ['class']});
  sync();
})();
"""


def load_page_helpers() -> bool:
    """Send :data:`PAGE_HELPERS_JS` to the notebook page (IPython kernels only); True when sent."""
    try:
        from IPython import get_ipython
    except ImportError:  # pragma: no cover - IPython comes with ipywidgets
        return False
    shell = get_ipython()
    if shell is None or not hasattr(shell, "kernel"):
        return False
    from IPython.display import Javascript, display

    display(Javascript(PAGE_HELPERS_JS))
    return True
