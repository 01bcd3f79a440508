"""Living design records: design files, formula export, recorded results, reports.

- :func:`load_design`, :func:`save_design`, :func:`design_to_toml`, :func:`design_from_toml` —
  the ``pwmkit-design`` TOML format (:mod:`pwmkit.record.designfile`, ``docs/design-file.md``);
- :func:`formula`, :func:`symbol_table`, :func:`worked`, :func:`formula_sheet` — the derived
  timing expressions as LaTeX, Markdown, Unicode, Python or C, with a design's numbers worked in
  (:mod:`pwmkit.record.formulas`);
- :func:`bom_rows`, :func:`bom_csv` — the bill of materials of a design (:mod:`pwmkit.record.bom`);
- :func:`record_results` — store a notebook's key results in its saved outputs, so that
  ``pwmkit rerun`` can detect drift (:mod:`pwmkit.record.results`, :mod:`pwmkit.record.rerun`);
- :func:`report_html`, :func:`write_report` — one self-contained HTML review document
  (:mod:`pwmkit.record.report`; needs bokeh from the ``lab`` extra).

Everything is imported on first use, so ``import pwmkit.record`` stays light.
"""

from __future__ import annotations

from .._lazy import lazy_exports

_EXPORTS = {
    "load_design": "designfile",
    "save_design": "designfile",
    "design_to_toml": "designfile",
    "design_from_toml": "designfile",
    "formula": "formulas",
    "symbol_table": "formulas",
    "worked": "formulas",
    "formula_sheet": "formulas",
    "QUANTITIES": "formulas",
    "FORMATS": "formulas",
    "bom_rows": "bom",
    "bom_csv": "bom",
    "BomRow": "bom",
    "record_results": "results",
    "RESULTS_MIME": "results",
    "results_payload": "results",
    "compare_results": "results",
    "read_recorded": "results",
    "Drift": "results",
    "rerun_notebook": "rerun",
    "RerunOutcome": "rerun",
    "report_html": "report",
    "write_report": "report",
}

__all__ = sorted(_EXPORTS)


__getattr__, __dir__ = lazy_exports(__name__, _EXPORTS, namespace=globals())
