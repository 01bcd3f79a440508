"""Running notebooks headless, exporting them to HTML, and the ``pwmkit lab`` working folder.

Where the notebooks come from: a source checkout (``pip install -e .``) has them in the
repository's ``notebooks/`` folder next to the package; a wheel installs them (and the example
design files) as data files into ``<prefix>/share/pwmkit/``. :func:`data_source_dir` looks in
that order and uses the first folder that holds matching files.

``pwmkit lab`` copies them into a working folder (default ``./pwmkit-notebooks``) and never
replaces a copy the user has edited unless asked to (``force``).
"""

from __future__ import annotations

import filecmp
import os
import shutil
import subprocess
import sys
import time
from dataclasses import dataclass
from pathlib import Path
from typing import Any

from ..errors import DesignError
from .files import atomic_write, read_limited

__all__ = ["notebook_source_dir", "data_source_dir", "root_flags", "copy_notebooks", "example_source_dir", "copy_examples",
           "find_design_file", "CopyAction", "read_notebook", "execute_notebook",
           "notebook_html", "display_available", "lab_command", "MAIN_NOTEBOOK"]

#: The notebook ``pwmkit lab`` opens (and runs with ``--headless``).
MAIN_NOTEBOOK = "greenhouse_design.ipynb"
_MAX_NOTEBOOK_BYTES = 256 << 20


def data_source_dir(kind: str = "notebooks", pattern: str = "*.ipynb") -> Path:
    """The folder holding pwmkit's ``notebooks`` or ``examples`` (source checkout first, then the wheel's).

    A source checkout (``pip install -e .``) keeps them beside the package (``<checkout>/notebooks``);
    a wheel installs them as data files into ``<prefix>/share/pwmkit/<kind>``. The first folder
    holding files that match ``pattern`` wins.

    Raises
    ------
    DesignError
        No such folder was found (a broken installation).
    """
    package = Path(__file__).resolve().parent.parent
    candidates = [package / kind]
    if (package.parent / "pyproject.toml").is_file():  # a source checkout
        candidates.append(package.parent / kind)
    for prefix in dict.fromkeys((sys.prefix, sys.base_prefix, os.path.join(os.path.expanduser("~"), ".local"))):
        candidates.append(Path(prefix) / "share" / "pwmkit" / kind)
    for candidate in candidates:
        if candidate.is_dir() and any(candidate.glob(pattern)):
            return candidate
    raise DesignError(f"{kind}: none found in {', '.join(str(c) for c in candidates)}; reinstall pwmkit "
                      "(pip install -e '.[lab]' from a source checkout, or the wheel)")


def notebook_source_dir() -> Path:
    """The folder holding pwmkit's notebooks; see :func:`data_source_dir`."""
    return data_source_dir("notebooks", "*.ipynb")


@dataclass(frozen=True)
class CopyAction:
    """What :func:`copy_notebooks` did with one notebook.

    ``action`` is ``"copied"`` (new), ``"unchanged"`` (the copy equals the original),
    ``"kept"`` (the user's copy differs and was left alone) or ``"replaced"`` (``force``).
    """

    name: str
    path: Path
    action: str


def _copy_each(files: list[Path], out: Path, force: bool) -> list[CopyAction]:
    """Copy each file into ``out`` unless an edited copy is there (replaced only with ``force``)."""
    actions: list[CopyAction] = []
    for f in files:
        target = out / f.name
        if target.is_symlink() or (target.exists() and not target.is_file()):
            raise DesignError(f"{target}: is not a regular file; move it away first")
        if not target.exists():
            atomic_write(target, f.read_bytes())
            actions.append(CopyAction(f.name, target, "copied"))
        elif filecmp.cmp(f, target, shallow=False):
            actions.append(CopyAction(f.name, target, "unchanged"))
        elif force:
            atomic_write(target, f.read_bytes(), force=True)
            actions.append(CopyAction(f.name, target, "replaced"))
        else:
            actions.append(CopyAction(f.name, target, "kept"))
    return actions


def copy_notebooks(dest: str | os.PathLike[str], *, force: bool = False,
                   source: str | os.PathLike[str] | None = None) -> list[CopyAction]:
    """Copy the packaged notebooks into a working folder without clobbering edited copies.

    Parameters
    ----------
    dest : path-like
        Working folder; created if missing.
    force : bool
        Replace copies that differ from the packaged notebooks.
    source : path-like, optional
        Folder to copy from (default :func:`notebook_source_dir`).

    Returns
    -------
    list of CopyAction
    """
    src = Path(source) if source is not None else notebook_source_dir()
    out = Path(dest)
    if out.exists() and not out.is_dir():
        raise DesignError(f"{out}: exists and is not a folder; choose another working folder")
    out.mkdir(parents=True, exist_ok=True)
    actions = _copy_each(sorted(src.glob("*.ipynb")), out, force)
    if not actions:
        raise DesignError(f"{src}: holds no notebooks")
    return actions


def example_source_dir() -> Path | None:
    """The folder holding pwmkit's example design files (see :func:`data_source_dir`), or None."""
    try:
        return data_source_dir("examples", "*.toml")
    except DesignError:
        return None


def copy_examples(dest: str | os.PathLike[str], *, force: bool = False,
                  source: str | os.PathLike[str] | None = None) -> list[CopyAction]:
    """Copy the example design files (``*.toml``) beside the notebooks, keeping edited copies.

    The design notebook reads them from its own folder, so edits saved from the dashboard are
    what the record evaluates. Same rules as :func:`copy_notebooks`; no examples → no actions.
    """
    src = Path(source) if source is not None else example_source_dir()
    out = Path(dest)
    actions: list[CopyAction] = []
    if src is None:
        return actions
    out.mkdir(parents=True, exist_ok=True)
    return _copy_each(sorted(src.glob("*.toml")), out, force)


def find_design_file(name: str, folder: str | os.PathLike[str] | None = None) -> Path:
    """The design file ``name`` beside the notebook (``folder``, default the working folder).

    When it is not there but pwmkit ships an example of that name, the example is first copied
    beside the notebook (as ``pwmkit lab`` does), so that edits saved from the dashboard go to
    the user's copy and never into pwmkit's own files.

    Raises
    ------
    DesignError
        Neither exists, or ``name`` is not a plain file name.
    """
    if Path(name).name != name or not name.endswith(".toml"):
        raise DesignError(f"{name!r}: give the plain file name of a .toml design file")
    here = Path.cwd() if folder is None else Path(folder)
    path = here / name
    if path.is_file():
        return path
    examples = example_source_dir()
    if examples is not None and (examples / name).is_file():
        atomic_write(path, (examples / name).read_bytes())
        return path
    raise DesignError(f"{name}: no such design file in {here} or in pwmkit's examples; run `pwmkit lab`, which "
                      "copies the examples beside the notebooks")


def read_notebook(path: str | os.PathLike[str]) -> Any:
    """Read a notebook file (nbformat v4) with a size limit; errors become :class:`DesignError`."""
    import nbformat

    p = Path(path)
    data = read_limited(p, limit=_MAX_NOTEBOOK_BYTES, what="notebook")
    try:
        text = data.decode("utf-8")
    except UnicodeDecodeError:
        raise DesignError(f"{p}: not UTF-8 text; a notebook is a JSON text file") from None
    import json

    try:
        doc = json.loads(text)
    except ValueError as exc:
        raise DesignError(f"{p}: not a readable notebook (not JSON: {_first_line(exc)})") from None
    except RecursionError:
        raise DesignError(f"{p}: not a readable notebook (JSON nested too deeply)") from None
    if not isinstance(doc, dict) or not isinstance(doc.get("cells"), list):
        got = {list: "a JSON list", str: "a JSON string", dict: "a JSON object without a 'cells' list"}.get(
            type(doc), f"a JSON {type(doc).__name__}")
        raise DesignError(f"{p}: not a notebook; expected a JSON object with 'cells' and 'metadata' (nbformat 4), "
                          f"got {got}")
    try:
        return nbformat.reads(text, as_version=4)
    except Exception as exc:  # nbformat raises several kinds (JSON, validation, version)
        raise DesignError(f"{p}: not a readable notebook ({type(exc).__name__}: {_first_line(exc)})") from None


def _first_line(exc: BaseException) -> str:
    text = str(exc).strip()
    return text.splitlines()[0][:300] if text else type(exc).__name__


@dataclass(frozen=True)
class Execution:
    """The outcome of :func:`execute_notebook`: the executed notebook or the error, and the time taken."""

    notebook: Any
    error: str | None
    seconds: float


def execute_notebook(nb: Any, *, cwd: str | os.PathLike[str], timeout: float = 600.0,
                     kernel: str = "python3") -> Execution:
    """Execute a notebook (a copy; ``nb`` is not changed) with nbclient in folder ``cwd``.

    Returns
    -------
    Execution
        ``error`` is a one-line description (cell number, exception name and message) or None.
    """
    import copy

    from nbclient import NotebookClient
    from nbclient.exceptions import CellExecutionError, CellTimeoutError, DeadKernelError

    work = copy.deepcopy(nb)
    client = NotebookClient(work, timeout=timeout, startup_timeout=120, kernel_name=kernel,
                            resources={"metadata": {"path": str(cwd)}}, record_timing=False)
    start = time.perf_counter()
    error = None
    try:
        # the kernel's own log lines (e.g. its note about local TCP transport) would clutter the output
        # PWMKIT_BUILD_ALL_PAGES: a dashboard builds every tab page up front, so the record holds
        # them all (interactively, hidden pages are built when first shown)
        client.execute(stderr=subprocess.DEVNULL, env={**os.environ, "PWMKIT_BUILD_ALL_PAGES": "1"})
    except CellExecutionError as exc:
        error = f"a cell raised an error: {_cell_error(work) or _first_line(exc)}"
    except CellTimeoutError:
        error = f"a cell ran longer than the timeout ({timeout:g} s)"
    except DeadKernelError as exc:
        error = f"the kernel died ({_first_line(exc)})"
    except Exception as exc:  # kernel start-up problems: no such kernel, ports, …
        error = f"could not run the notebook ({type(exc).__name__}: {_first_line(exc)})"
    return Execution(work, error, time.perf_counter() - start)


def _cell_error(nb: Any) -> str | None:
    """'cell 3: ValueError: …' for the first cell with an error output."""
    code_index = 0
    for cell in nb.get("cells", []):
        if cell.get("cell_type") != "code":
            continue
        code_index += 1
        for out in cell.get("outputs", []):
            if out.get("output_type") == "error":
                return f"code cell {code_index}: {out.get('ename', 'Error')}: {str(out.get('evalue', ''))[:300]}"
    return None


def notebook_html(nb: Any) -> str:
    """The notebook as one self-contained HTML page that needs no network.

    Plots, a static snapshot of the widgets and the formulas (as MathML) are in the page itself;
    see :func:`pwmkit.record.offline_html.offline_notebook_html`.
    """
    from .offline_html import offline_notebook_html

    return offline_notebook_html(nb)


def display_available() -> bool:
    """Whether a browser can probably be opened.

    True on macOS and Windows; elsewhere when ``$DISPLAY`` or ``$WAYLAND_DISPLAY`` is set or
    ``$BROWSER`` names a browser. ``pwmkit lab`` runs headless otherwise.
    """
    if sys.platform == "darwin" or os.name == "nt":
        return True
    env = os.environ
    return bool(env.get("DISPLAY") or env.get("WAYLAND_DISPLAY") or env.get("BROWSER"))


def root_flags() -> list[str]:
    """Extra JupyterLab flags for the current user: ``--allow-root`` when the effective user is root.

    JupyterLab refuses to start as root without it (common in containers).
    """
    geteuid = getattr(os, "geteuid", None)
    return ["--allow-root"] if geteuid is not None and geteuid() == 0 else []


def lab_command(folder: Path, notebook: str = MAIN_NOTEBOOK, extra: list[str] | None = None) -> list[str]:
    """The command that starts JupyterLab on ``notebook`` in ``folder`` (local address only)."""
    exe = shutil.which("jupyter-lab")
    head = [exe] if exe else [sys.executable, "-m", "jupyterlab"]
    return [*head, "--ServerApp.ip=127.0.0.1", f"--ServerApp.root_dir={folder}", *root_flags(), *(extra or []),
            str(folder / notebook)]
