"""An executed notebook as one HTML page that needs no network (presentation layer).

nbconvert's page loads require.js, MathJax and the Jupyter widget manager from public servers:
offline, its dashboard outputs stay blank and formulas show as raw ``$$…$$``. This module makes a
page that carries everything itself:

- **widgets** — every widget output is replaced by a static snapshot built from the widget state
  the run saved (boxes and tabs as nested blocks, text fields and sliders as disabled controls
  showing their values, HTML as it was); bokeh plots inside it are embedded with BokehJS inlined
  from the installed bokeh, so their canvases draw with no server;
- **formulas** — LaTeX in Markdown cells and in Markdown, LaTeX and HTMLMath outputs is converted
  to MathML (which browsers render natively) with ``latex2mathml``; a formula it cannot convert is
  shown as its LaTeX source in a code element;
- **no remote resources** — every ``<script src>`` and stylesheet ``<link>`` that points off the
  page is removed; nothing is fetched.

The page is a snapshot: moving its sliders does nothing (there is no kernel). Open the notebook in
JupyterLab (``pwmkit lab``) for the live dashboard.
"""

from __future__ import annotations

import copy
import html
import json
import re
from typing import Any

__all__ = ["offline_notebook_html", "latex_to_mathml", "convert_math"]

VIEW_MIME = "application/vnd.jupyter.widget-view+json"
STATE_MIME = "application/vnd.jupyter.widget-state+json"
_BOKEH_LOAD_MIME = "application/vnd.bokehjs_load.v0+json"

_CSS = """<style>
.pwmkit-snapshot-note {font-size:11px;color:#5a6270;margin:2px 0 6px 0}
.pwmkit-w-vbox {display:flex;flex-direction:column;gap:4px}
.pwmkit-w-hbox {display:flex;flex-direction:row;flex-wrap:wrap;gap:6px;align-items:center}
.pwmkit-w-tab > section > h4 {margin:10px 0 4px 0;font-size:13px;border-bottom:1px solid #d0d7de}
.pwmkit-w-control {display:inline-flex;gap:6px;align-items:center;font-size:13px}
.pwmkit-w-control input[type=text], .pwmkit-w-control textarea {font-family:ui-monospace,monospace}
code.pwmkit-tex {white-space:pre-wrap}
math[display=block] {margin:.45em 0}
</style>"""


# ------------------------------------------------------------------------------------------------
# formulas
# ------------------------------------------------------------------------------------------------
_MATH_RE = re.compile(r"\$\$(.+?)\$\$|\\\[(.+?)\\\]|\\\((.+?)\\\)|(?<![\\$\w])\$(?!\s)([^$\n]+?)(?<!\s)\$(?![\w$])",
                      re.S)
_CODE_RE = re.compile(r"(```.*?```|~~~.*?~~~|`[^`\n]+`)", re.S)


def latex_to_mathml(tex: str, display: bool = False) -> str:
    """MathML for a LaTeX formula (``<code>`` with the source when it cannot be converted)."""
    tex = tex.strip()
    inner = tex
    for env in ("aligned", "align", "align*"):  # keep the rows, drop the alignment environment
        inner = inner.replace(f"\\begin{{{env}}}", "").replace(f"\\end{{{env}}}", "")
    try:
        from latex2mathml.converter import convert

        rows = [r for r in re.split(r"\\\\", inner)] if display else [inner]
        parts = [convert(r.replace("&", ""), display="block" if display else "inline") for r in rows if r.strip()]
        if not parts:
            raise ValueError("empty formula")
        return "".join(parts)
    except Exception:  # latex2mathml missing, or LaTeX it does not know: show the source, readable
        return f"<code class='pwmkit-tex'>{html.escape(tex)}</code>"


def convert_math(text: str) -> str:
    """Text (Markdown or HTML) with ``$$…$$``, ``\\[…\\]``, ``\\(…\\)`` and ``$…$`` turned into MathML.

    Code spans and fenced code blocks are left alone.
    """
    out = []
    for i, piece in enumerate(_CODE_RE.split(text)):
        if i % 2 == 1:
            out.append(piece)
            continue

        def repl(m: re.Match[str]) -> str:
            display_tex = m.group(1) if m.group(1) is not None else m.group(2)
            if display_tex is not None:
                return "\n\n<div class='pwmkit-math'>" + latex_to_mathml(display_tex, display=True) + "</div>\n\n"
            return latex_to_mathml(m.group(3) if m.group(3) is not None else m.group(4))

        out.append(_MATH_RE.sub(repl, piece))
    return "".join(out)


# ------------------------------------------------------------------------------------------------
# widget snapshot
# ------------------------------------------------------------------------------------------------
class _Snapshot:
    """Static HTML of widget models from a saved widget state."""

    def __init__(self, state: dict[str, Any]) -> None:
        self.state = state
        self.bokeh = 0

    def _ref(self, value: Any) -> str | None:
        if isinstance(value, str) and value.startswith("IPY_MODEL_"):
            return value[len("IPY_MODEL_"):]
        return None

    def render(self, model_id: str, depth: int = 0) -> str:
        entry = self.state.get(model_id)
        if entry is None or depth > 60:
            return ""
        name = entry.get("model_name", "")
        s = entry.get("state", {})
        classes = " ".join(["pwmkit-w", f"pwmkit-w-{name.removesuffix('Model').lower()}",
                            *[str(c) for c in s.get("_dom_classes", [])]])
        cls = html.escape(classes, quote=True)
        desc = html.escape(str(s.get("description", "") or ""))
        label = f"<span class='pwmkit-w-label'>{desc}</span>" if desc else ""
        children = [self._ref(c) for c in s.get("children", []) or []]
        kids = [self.render(c, depth + 1) for c in children if c]
        if name in ("VBoxModel", "BoxModel", "GridBoxModel", "OutputModel"):
            return f"<div class='{cls} pwmkit-w-vbox'>{''.join(kids)}</div>"
        if name == "HBoxModel":
            return f"<div class='{cls} pwmkit-w-hbox'>{''.join(kids)}</div>"
        if name in ("TabModel", "AccordionModel", "StackModel"):
            titles = list(s.get("titles", []) or [])
            sections = [f"<section><h4>{html.escape(str(titles[i]) if i < len(titles) else '')}</h4>{k}</section>"
                        for i, k in enumerate(kids)]
            return f"<div class='{cls}'>{''.join(sections)}</div>"
        if name in ("HTMLModel", "LabelModel"):
            value = str(s.get("value", ""))
            return f"<div class='{cls}'>{label}{value if name == 'HTMLModel' else html.escape(value)}</div>"
        if name == "HTMLMathModel":
            return f"<div class='{cls}'>{label}{convert_math(str(s.get('value', '')))}</div>"
        if name in ("TextModel", "FloatTextModel", "IntTextModel", "BoundedFloatTextModel", "BoundedIntTextModel"):
            value = html.escape(str(s.get("value", "")), quote=True)
            return f"<span class='{cls} pwmkit-w-control'>{label}<input type='text' value='{value}' disabled></span>"
        if name == "TextareaModel":
            return (f"<span class='{cls} pwmkit-w-control'>{label}<textarea rows='8' cols='80' readonly>"
                    f"{html.escape(str(s.get('value', '')))}</textarea></span>")
        if name in ("FloatSliderModel", "IntSliderModel", "FloatLogSliderModel", "FloatRangeSliderModel",
                    "IntRangeSliderModel"):
            value = s.get("value")
            if name == "FloatLogSliderModel":
                lo, hi, pos = float(s.get("min", 0)), float(s.get("max", 1)), _log10(value)
            else:
                lo, hi, pos = s.get("min", 0), s.get("max", 1), value
            shown = _short_number(value)
            return (f"<span class='{cls} pwmkit-w-control'>{label}<input type='range' min='{lo}' max='{hi}' "
                    f"step='any' value='{pos}' disabled><span class='pwmkit-w-readout'>{html.escape(shown)}</span>"
                    "</span>")
        if name in ("DropdownModel", "ToggleButtonsModel", "RadioButtonsModel", "SelectModel"):
            labels = list(s.get("_options_labels", []) or [])
            index = s.get("index")
            chosen = labels[index] if isinstance(index, int) and 0 <= index < len(labels) else ""
            opts = " · ".join(f"<b>{html.escape(str(o))}</b>" if o == chosen else html.escape(str(o)) for o in labels)
            return f"<span class='{cls} pwmkit-w-control'>{label}<span class='pwmkit-w-choice'>{opts}</span></span>"
        if name == "CheckboxModel":
            checked = " checked" if s.get("value") else ""
            return f"<label class='{cls} pwmkit-w-control'><input type='checkbox' disabled{checked}>{desc}</label>"
        if name == "ButtonModel":
            return f"<button class='{cls}' disabled>{desc}</button>"
        if name == "BokehModel":
            return f"<div class='{cls}'>{self._bokeh(s.get('render_bundle'))}</div>"
        if kids:
            return f"<div class='{cls}'>{''.join(kids)}</div>"
        return ""

    def _bokeh(self, bundle: Any) -> str:
        if isinstance(bundle, str):
            try:
                bundle = json.loads(bundle)
            except ValueError:
                return ""
        if not isinstance(bundle, dict) or "docs_json" not in bundle:
            return ""
        self.bokeh += 1
        docs = json.dumps(bundle["docs_json"]).replace("</", "<\\/")
        items = json.dumps(bundle.get("render_items", [])).replace("</", "<\\/")
        return (f"{bundle.get('div', '')}<script type='text/javascript'>(function() {{"
                f"const docs = {docs}; const items = {items};"
                "function draw() { if (window.Bokeh && Bokeh.embed) { Bokeh.embed.embed_items(docs, items); } "
                "else { setTimeout(draw, 20); } }"
                "if (document.readyState === 'loading') { document.addEventListener('DOMContentLoaded', draw); }"
                " else { draw(); } })();</script>")


def _log10(value: Any) -> float:
    import math

    try:
        v = float(value)
        return math.log10(v) if v > 0 else 0.0
    except (TypeError, ValueError):
        return 0.0


def _short_number(value: Any) -> str:
    try:
        return f"{float(value):.4g}"
    except (TypeError, ValueError):
        return str(value)


# ------------------------------------------------------------------------------------------------
# the page
# ------------------------------------------------------------------------------------------------
_REMOTE_SCRIPT_RE = re.compile(r"<script\b[^>]*\bsrc\s*=\s*[\"']?(?:https?:)?//[^>]*>\s*</script>", re.I)
_REMOTE_LINK_RE = re.compile(r"<link\b[^>]*\bhref\s*=\s*[\"']?(?:https?:)?//[^>]*>", re.I)
_MATHJAX_CONFIG_RE = re.compile(r"<script type=\"text/x-mathjax-config\">.*?</script>", re.S)
# inline module scripts that import code from a CDN when needed (nbconvert's Mermaid loader)
_REMOTE_IMPORT_RE = re.compile(r"<script type=\"module\">(?:(?!</script>).)*?import\(\s*[\"']https?://.*?</script>", re.S)


def _bokeh_js() -> str:
    from bokeh.resources import INLINE

    return INLINE.render_js()


def offline_notebook_html(nb: Any) -> str:
    """The executed notebook as a self-contained HTML page (no network needed; see the module docstring).

    Parameters
    ----------
    nb : nbformat.NotebookNode
        An executed notebook (widget state saved in its metadata, as nbclient does).

    Returns
    -------
    str
        The page.
    """
    from nbconvert import HTMLExporter

    work = copy.deepcopy(nb)
    widgets = work.get("metadata", {}).pop("widgets", None) or {}
    state = (widgets.get(STATE_MIME) or {}).get("state", {})
    snap = _Snapshot(state)
    for cell in work.get("cells", []):
        if cell.get("cell_type") == "markdown":
            cell["source"] = convert_math(cell.get("source", ""))
        kept = []
        for out in cell.get("outputs", []):
            data = out.get("data")
            if not data:
                kept.append(out)
                continue
            if _BOKEH_LOAD_MIME in data:  # BokehJS loader: the page carries BokehJS itself
                continue
            if VIEW_MIME in data:
                model_id = str(data.pop(VIEW_MIME).get("model_id", ""))
                static = snap.render(model_id) if model_id in state else ""
                if static:
                    data["text/html"] = ("<div class='pwmkit-snapshot'><div class='pwmkit-snapshot-note'>static snapshot "
                                         "of the widgets (open the notebook in JupyterLab for the live version)</div>"
                                         f"{static}</div>")
                data.pop("text/plain", None) if "text/html" in data else None
            if "text/markdown" in data:
                data["text/markdown"] = convert_math(str(data["text/markdown"]))
            if "text/latex" in data and "text/html" not in data:
                data["text/html"] = convert_math(str(data.pop("text/latex")))
            elif "text/latex" in data:
                data.pop("text/latex")
            if "text/html" in data:
                data["text/html"] = convert_math(str(data["text/html"]))
            kept.append(out)
        if "outputs" in cell:
            cell["outputs"] = kept
    exporter = HTMLExporter(template_name="lab")
    body, _ = exporter.from_notebook_node(work)
    body = _REMOTE_SCRIPT_RE.sub("", body)
    body = _REMOTE_LINK_RE.sub("", body)
    body = _MATHJAX_CONFIG_RE.sub("", body)
    body = _REMOTE_IMPORT_RE.sub("", body)
    head = _CSS + (_bokeh_js() if snap.bokeh else "")
    return body.replace("</head>", head + "\n</head>", 1) if "</head>" in body else head + body
