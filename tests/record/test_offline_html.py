"""Pieces of the offline headless page: formulas to MathML and the static widget snapshot."""

from __future__ import annotations

import json
import xml.etree.ElementTree as ET

import nbformat

from pwmkit.record.offline_html import VIEW_MIME, convert_math, latex_to_mathml, offline_notebook_html


def test_tex_delimiters_become_mathml_and_code_is_left_alone() -> None:
    text = "Inline $t = R C \\ln 2$, display $$f = \\frac{1}{T}$$ and `$x$` in code; costs $5 and $6."
    out = convert_math(text)
    assert out.count("<math") == 2 and "$$" not in out
    assert "`$x$`" in out and "costs $5 and $6" in out
    ET.fromstring(latex_to_mathml("\\frac{1}{T}", display=True))  # well-formed MathML (W3C MathML Core)


def test_unknown_tex_is_shown_as_source_not_raw_delimiters() -> None:
    out = convert_math("$$\\notacommand{x}$$")
    assert "$$" not in out and ("<math" in out or "pwmkit-tex" in out)


def test_widget_outputs_become_a_static_snapshot_without_remote_resources() -> None:
    nb = nbformat.v4.new_notebook()
    state = {
        "box": {"model_name": "VBoxModel", "state": {"children": ["IPY_MODEL_txt", "IPY_MODEL_sl"],
                                                     "_dom_classes": ["pwmkit-dashboard"]}},
        "txt": {"model_name": "TextModel", "state": {"value": "2.2 nF", "description": "C",
                                                     "_dom_classes": ["pwmkit-entry-text"]}},
        "sl": {"model_name": "FloatSliderModel", "state": {"value": 0.25, "min": 0, "max": 1,
                                                           "description": "wiper"}},
    }
    nb.metadata["widgets"] = {"application/vnd.jupyter.widget-state+json": {"state": state, "version_major": 2,
                                                                           "version_minor": 0}}
    cell = nbformat.v4.new_code_cell("dash")
    cell.outputs = [nbformat.v4.new_output("display_data", data={VIEW_MIME: {"model_id": "box"},
                                                                 "text/plain": "Dashboard(...)"})]
    nb.cells = [nbformat.v4.new_markdown_cell("$$t_{high} = R C \\ln 2$$"), cell]
    page = offline_notebook_html(nb)
    assert "pwmkit-snapshot" in page and "2.2 nF" in page and "0.25" in page
    assert "<math" in page and "$$" not in page.split("<body", 1)[1]
    assert "cdnjs" not in page and "unpkg" not in page and "require.min.js" not in page
    assert json.dumps(state) not in page
