"""Every notebook in notebooks/ runs headless with no error and no warning output.

Each notebook is executed by nbclient in a fresh ``python3`` kernel, in a temporary copy of the
folder (the committed files stay untouched). A cell fails the test when it produces an error, any
stream on stderr (except known harmless kernel noise below), or text that looks like a Python
warning. The committed notebooks must carry no outputs, so diffs stay readable.
"""

from __future__ import annotations

import re
import shutil
from pathlib import Path

import pytest

nbformat = pytest.importorskip("nbformat")
nbclient = pytest.importorskip("nbclient")

NOTEBOOKS = Path(__file__).resolve().parents[2] / "notebooks"
PATHS = sorted(NOTEBOOKS.glob("*.ipynb"))

# stderr lines that are not about the notebook's code (be strict: add only what was seen and understood)
HARMLESS_STDERR = (
    re.compile(r"^\s*$"),
    re.compile(r"Kernel is running over TCP without encryption"),  # jupyter_client, local kernel
)
WARNING_TEXT = re.compile(r"\b[A-Z]\w*Warning\b")


def _outputs(nb):
    for index, cell in enumerate(nb.cells):
        for out in cell.get("outputs", []):
            yield index, out


def test_notebooks_are_present():
    names = {p.name for p in PATHS}
    assert {"start_here.ipynb", "greenhouse_design.ipynb"} <= names


@pytest.mark.parametrize("path", PATHS, ids=[p.stem for p in PATHS])
def test_committed_without_outputs(path):
    nb = nbformat.read(path, as_version=4)
    nbformat.validate(nb)
    for cell in nb.cells:
        if cell.cell_type == "code":
            assert cell.outputs == [] and cell.execution_count is None, f"{path.name}: strip the outputs"
        assert not cell.metadata.get("execution"), f"{path.name}: execution metadata left in"


@pytest.mark.notebook
@pytest.mark.slow
@pytest.mark.parametrize("path", PATHS, ids=[p.stem for p in PATHS])
def test_notebook_executes_cleanly(path, tmp_path):
    work = tmp_path / "notebooks"
    shutil.copytree(NOTEBOOKS, work)
    nb = nbformat.read(work / path.name, as_version=4)
    client = nbclient.NotebookClient(nb, timeout=300, startup_timeout=90, kernel_name="python3",
                                     resources={"metadata": {"path": str(work)}})
    client.execute()
    problems = []
    for index, out in _outputs(nb):
        if out.output_type == "error":
            problems.append(f"cell {index}: {out.ename}: {out.evalue}")
        elif out.output_type == "stream" and out.name == "stderr":
            lines = [ln for ln in out.text.splitlines() if not any(p.search(ln) for p in HARMLESS_STDERR)]
            if lines:
                problems.append(f"cell {index} stderr: {' | '.join(lines)[:500]}")
        texts = [out.get("text", "")] + [str(v) for k, v in out.get("data", {}).items() if k.startswith("text/")]
        for text in texts:
            match = WARNING_TEXT.search(text)
            if match:
                problems.append(f"cell {index}: warning text {text[max(0, match.start() - 80):match.end() + 80]!r}")
    assert not problems, "\n".join(problems)
    if path.name == "greenhouse_design.ipynb":
        printed = "".join(out.get("text", "") for _i, out in _outputs(nb) if out.output_type == "stream")
        assert "PWMKIT-NOTEBOOK-OK" in printed
        assert "PWMKIT-HEAT-MAT-OK" in printed  # the heat-mat section's own self-check


@pytest.mark.notebook
def test_debounced_work_runs_on_the_kernel_event_loop(tmp_path):
    """In a real kernel, edits schedule the schematic redraw on the kernel's asyncio loop: nothing
    is drawn while a cell runs; one redraw follows once the edits have been quiet (awaited in the
    next cell with top-level await, which lets the loop run)."""
    from nbformat.v4 import new_code_cell, new_notebook

    cells = [
        new_code_cell(
            "from pwmkit.design import demo_designs\n"
            "from pwmkit.widgets import DesignSession, SchematicPanel\n"
            "session = DesignSession(demo_designs()['grow-bar'])\n"
            "panel = SchematicPanel(session, debounce=0.2)\n"
            "start = panel.redraws\n"
            "for w in (0.2, 0.3, 0.4):\n"
            "    assert session.edit(lambda d, w=w: d.with_timing(wiper=w)) is None\n"
            "assert panel.redraws == start, 'redrawn inside the cell: not debounced'\n"
        ),
        new_code_cell(
            "import asyncio\n"
            "await asyncio.sleep(0.8)\n"
            "assert panel.redraws == start + 1, (start, panel.redraws)\n"
            "assert 'wiper 40' in panel.svg.value\n"
            "print('DEBOUNCE-OK')\n"
        ),
    ]
    nb = new_notebook(cells=cells, metadata={"kernelspec": {"name": "python3", "language": "python",
                                                            "display_name": "Python 3"}})
    nbclient.NotebookClient(nb, timeout=120, startup_timeout=90, kernel_name="python3",
                            resources={"metadata": {"path": str(tmp_path)}}).execute()
    errors = [o for _i, o in _outputs(nb) if o.output_type == "error"]
    assert not errors, errors[0].evalue if errors else ""
    assert "DEBOUNCE-OK" in "".join(o.get("text", "") for _i, o in _outputs(nb))
