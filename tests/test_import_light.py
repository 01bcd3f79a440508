"""`import pwmkit` must stay light (STYLE.md; scikit-rf's test of the same kind)."""

from __future__ import annotations

import subprocess
import sys


def test_import_pwmkit_pulls_in_no_heavy_modules() -> None:
    code = (
        "import sys, pwmkit, pwmkit.timing, pwmkit.loads, pwmkit.eseries, pwmkit.values;"
        "heavy = [m for m in ('sympy', 'ipywidgets', 'bokeh', 'scipy', 'matplotlib', 'schemdraw', 'IPython')"
        " if m in sys.modules];"
        "print(','.join(heavy))"
    )
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    assert out.stdout.strip() == ""


def test_no_output_notebook_side_effect_on_import() -> None:
    code = "import pwmkit, sys; print('bokeh.io' in sys.modules)"
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    assert out.stdout.strip() == "False"


def test_every_lazy_submodule_exists() -> None:
    import importlib

    import pwmkit

    for name in sorted(pwmkit._LAZY):
        importlib.import_module(f"pwmkit.{name}")


def test_design_layer_imports_no_schematic_code() -> None:
    # the presentation layer registers the Design's schematic display (pwmkit._display); the design
    # layer itself must not reach up into it
    code = ("import sys, pwmkit.design as d; page = d.demo_designs()['fan']._repr_html_();"
            "print('pwmkit.schematic' in sys.modules, '<svg' in page)")
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    assert out.stdout.split() == ["False", "False"]
    code = ("import pwmkit.design as d, pwmkit.schematic; print('<svg' in d.demo_designs()['fan']._repr_html_())")
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    assert out.stdout.strip() == "True"
