"""A design's record notebook, made from a template that reads the design file (presentation layer).

:func:`record_notebook` returns an nbformat v4 notebook for one design file: it loads the file
(never demo code), shows the requirements, evaluates the design with the tolerance analysis,
lists the checks, the formulas and the cautions, opens the dashboard on the same file (edits are
saved back to it with the dashboard's Save button) and records the key results so that
``pwmkit rerun`` can report drift. ``pwmkit new`` writes it beside the design file.

:func:`requirement_rows` gives the requirements of a design as (label, text) rows for the
notebook, the dashboard and the command line.
"""

from __future__ import annotations

from typing import Any

__all__ = ["record_notebook", "requirement_rows", "TEMPLATE_MARKER"]

#: Printed by the last cell of a record notebook when it ran to the end.
TEMPLATE_MARKER = "PWMKIT-RECORD-OK"


def requirement_rows(design: Any) -> list[tuple[str, str]]:
    """The requirements of a design as (label, text) rows, in engineering notation."""
    from ..requirement_spread import duty_requirement
    from ..values import format_value

    r = design.requirements
    rows: list[tuple[str, str]] = []
    if r.frequency is not None:
        lo, hi = r.frequency_window
        rows.append(("PWM frequency", f"{format_value(r.frequency, 'Hz', 4)} ± {100 * r.frequency_tolerance:.3g} % "
                                      f"({format_value(lo, 'Hz', 4)} … {format_value(hi, 'Hz', 4)})"))
    spec = duty_requirement(design)
    if spec is not None:
        kind, lo, hi = spec
        rows.append(("duty the control must reach" if kind == "reach" else "duty window",
                     f"{100 * lo:.4g} … {100 * hi:.4g} %"))
    lo, hi = design.supply_range
    rows.append(("supply range", f"{format_value(lo, 'V', 4)} … {format_value(hi, 'V', 4)} "
                                 f"(nominal {format_value(design.vcc, 'V', 4)})"))
    rows.append(("ambient range", f"{design.t_ambient_min_c:g} … {design.t_ambient_max_c:g} °C"))
    rows.append(("load", "none" if design.load is None else {"led": "LED strings", "motor": "DC motor / fan"}
                 [design.load.kind]))
    if r.flicker is not None:
        rows.append(("flicker (IEEE Std 1789-2015)", r.flicker.replace("-", " ")))
    rows.append(("acceptance criterion", r.criterion_text()))
    return rows


def record_notebook(design_file: str, name: str) -> Any:
    """The record notebook of one design file.

    Parameters
    ----------
    design_file : str
        File name of the design, relative to the notebook's folder (e.g. ``"fan.toml"``).
    name : str
        Title of the record.

    Returns
    -------
    nbformat.NotebookNode
    """
    import json

    import nbformat

    from ..errors import DesignError

    if not isinstance(design_file, str) or "\n" in design_file or not design_file.endswith(".toml"):
        raise DesignError(f"design_file: {design_file!r} is not allowed; give a .toml file name")
    file_literal = json.dumps(design_file)  # a Python string literal of the name (no code from the user)
    title = name.replace("\n", " ")
    v4 = nbformat.v4
    cells = [
        v4.new_markdown_cell(
            f"# {title} — design record\n\n"
            f"This notebook is the record of the design in `{design_file}`: it reads that file, shows the "
            "requirements, evaluates the design (exact timing, loads, the tolerance spread judged by the "
            "acceptance criterion), lists the design-rule checks, the formulas and the cautions, and records the "
            "key results. Edit the design in the dashboard below and press **Save** — or edit the file — then run "
            "all cells again (or `pwmkit rerun --update` on this notebook) to record the saved design. "
            "`pwmkit rerun` on the saved notebook reports any result that no longer matches."),
        v4.new_code_cell(
            "from pathlib import Path\n\n"
            "from IPython.display import Markdown, display\n\n"
            "from pwmkit.record import load_design\n"
            "from pwmkit.record.record_notebook import requirement_rows\n\n"
            f"DESIGN_FILE = Path({file_literal})\n"
            "design = load_design(DESIGN_FILE)\n"
            "display(Markdown(f\"Design file: `{DESIGN_FILE}` — **{design.name}**\\n\\n| requirement | value |\\n|---|---|\\n\"\n"
            "                 + \"\\n\".join(f\"| {k} | {v} |\" for k, v in requirement_rows(design))))\n"
            "design"),
        v4.new_markdown_cell("## Evaluation, checks and tolerance spread"),
        v4.new_code_cell(
            "from pwmkit.evaluate import evaluate\n\n"
            "ev = evaluate(design, n_mc=20_000, seed=1)\n"
            "ev"),
        v4.new_code_cell("ev.findings"),
        v4.new_markdown_cell("## Formulas ready to paste"),
        v4.new_code_cell(
            "from pwmkit.record import formula_sheet\n\n"
            "Markdown(formula_sheet(design, \"markdown\"))"),
        v4.new_markdown_cell(
            "## Cautions\n\nVerify every figure on the bench; follow local codes and licensed practice."),
        v4.new_code_cell("Markdown(\"\\n\".join(f\"- **{c.title}.** {c.text}\" for c in ev.cautions))"),
        v4.new_markdown_cell(
            "## Dashboard\n\nThe dashboard works on the design file: **Save** writes your edits back to it "
            "(it refuses if the file changed on disk meanwhile), **Revert** goes back to the saved file."),
        v4.new_code_cell(
            "from pwmkit.widgets import dashboard\n\n"
            "dash = dashboard(DESIGN_FILE)\n"
            "dash"),
        v4.new_markdown_cell("## Recorded results\n\nStored in this notebook's outputs for `pwmkit rerun`."),
        v4.new_code_cell(
            "from pwmkit.record import record_results\n\n"
            "record_results(ev, name=design.name)\n"
            f"print({json.dumps(TEMPLATE_MARKER)})"),
    ]
    nb = v4.new_notebook(cells=cells)
    nb.metadata["kernelspec"] = {"name": "python3", "display_name": "Python 3", "language": "python"}
    nb.metadata["language_info"] = {"name": "python"}
    return nb
