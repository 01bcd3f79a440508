"""A newcomer's first hour: the README's set-up command (as root and as a normal user), a wheel install,
`pwmkit lab` as root.

The slow tests build and install pwmkit the way a new user does (fresh clone or wheel, a new
virtual environment, the package registry through pip) and run the headless `pwmkit lab`; they
check the HTML it writes and the key results it prints.
"""

from __future__ import annotations

import os
import re
import shutil
import subprocess
import sys
from pathlib import Path

import pytest

from pwmkit.cli import main
from pwmkit.record import notebooks

REPO = Path(__file__).resolve().parents[2]
DEBIAN_PYTHON = Path("/usr/bin/python3")


def _headless_env(tmp: Path) -> dict[str, str]:
    """A clean environment with no display (so `pwmkit lab` runs headless) and Debian's tools first."""
    env = {k: v for k, v in os.environ.items() if not k.startswith(("VIRTUAL_ENV", "PYTHON", "PYENV", "CONDA"))}
    for key in ("DISPLAY", "WAYLAND_DISPLAY", "BROWSER", "JUPYTER_CONFIG_DIR", "JUPYTER_DATA_DIR", "JUPYTER_PATH"):
        env.pop(key, None)
    env["PATH"] = "/usr/local/bin:/usr/bin:/bin"
    env["HOME"] = str(tmp / "home")
    env["JUPYTER_RUNTIME_DIR"] = str(tmp / "runtime")
    env["JUPYTER_PLATFORM_DIRS"] = "1"
    (tmp / "home").mkdir(exist_ok=True)
    # pip reads its configuration (index, cache) from the real user's files; keep the cache warm
    real_home = Path(os.environ.get("HOME", "/root"))
    env.setdefault("PIP_CACHE_DIR", str(real_home / ".cache" / "pip"))
    for conf in (real_home / ".config" / "pip" / "pip.conf", real_home / ".pip" / "pip.conf"):
        if conf.is_file():
            env.setdefault("PIP_CONFIG_FILE", str(conf))
    return env


def readme_setup_command() -> str:
    """The first command of the README's "Set up and run" section, verbatim."""
    text = (REPO / "README.md").read_text(encoding="utf-8")
    section = text.split("## Set up and run", 1)[1].split("\n## ", 1)[0]
    blocks = re.findall(r"```bash\n(.*?)```", section, flags=re.S)
    assert len(blocks) == 2, "the README's set-up section has exactly two commands"
    return blocks[0].strip()


def _check_headless_result(out: subprocess.CompletedProcess[str], work: Path) -> None:
    assert out.returncode == 0, out.stdout[-3000:] + out.stderr[-3000:]
    page = work / "pwmkit-notebooks" / notebooks.MAIN_NOTEBOOK.replace(".ipynb", ".html")
    assert page.is_file(), out.stdout + out.stderr
    html = page.read_text(encoding="utf-8")
    assert "<html" in html.lower() and "greenhouse" in html.lower()
    assert "key results of" in out.stdout and "timing.frequency" in out.stdout


def _need_debian_venv() -> None:
    probe = subprocess.run([str(DEBIAN_PYTHON), "-c", "import ensurepip, venv"], capture_output=True)
    if probe.returncode != 0:
        pytest.skip("Debian's python3-venv is not installed (.ci/run installs it)")


def _working_tree_clone(clone: Path) -> Path:
    """A git clone of the repository holding the working tree under test, not only its last commit."""
    subprocess.run(["git", "clone", "-q", "--no-hardlinks", str(REPO), str(clone)], check=True)
    tracked = subprocess.run(["git", "ls-files", "-z"], cwd=REPO, capture_output=True, check=True).stdout
    for name in filter(None, tracked.decode().split("\0")):
        src = REPO / name
        if src.is_file():
            (clone / name).parent.mkdir(parents=True, exist_ok=True)
            shutil.copy2(src, clone / name)
    return clone


def test_readme_has_two_commands_and_the_first_makes_its_own_venv() -> None:
    cmd = readme_setup_command()
    assert "-m venv" in cmd and "pwmkit lab" in cmd
    assert "python3 -m pip install" not in cmd  # refused by a stock Debian/Ubuntu python3 (PEP 668)


@pytest.mark.slow
@pytest.mark.skipif(not DEBIAN_PYTHON.is_file() or shutil.which("git") is None, reason="needs /usr/bin/python3, git")
def test_readme_setup_command_works_in_a_fresh_clone_with_debians_python(tmp_path: Path) -> None:
    _need_debian_venv()
    clone = _working_tree_clone(tmp_path / "clone")
    cmd = readme_setup_command()
    env = _headless_env(tmp_path)
    assert shutil.which("python3", path=env["PATH"]) == str(DEBIAN_PYTHON)
    out = subprocess.run(["bash", "-c", cmd], cwd=clone, env=env, capture_output=True, text=True, timeout=1500)
    _check_headless_result(out, clone)


NORMAL_USER = 65534  # "nobody": an account every Debian/Ubuntu system has, with no rights of its own


@pytest.mark.slow
@pytest.mark.skipif(not DEBIAN_PYTHON.is_file() or shutil.which("git") is None or shutil.which("setpriv") is None,
                    reason="needs /usr/bin/python3, git, setpriv (util-linux)")
def test_readme_setup_command_works_as_a_normal_user(tmp_path: Path) -> None:
    """The same command run by an unprivileged account (setpriv drops root to "nobody")."""
    if os.geteuid() != 0:
        pytest.skip("already a normal user: test_readme_setup_command_works_in_a_fresh_clone… is this case")
    _need_debian_venv()
    import tempfile

    # pytest's tmp_path is private to root: the account gets a folder of its own under /tmp
    top = Path(tempfile.mkdtemp(prefix="pwmkit-user-", dir="/tmp"))
    try:
        clone = _working_tree_clone(top / "clone")
        env = _headless_env(top)
        # the account cannot read root's pip configuration or cache: a copy of the configuration,
        # a cache of its own
        if "PIP_CONFIG_FILE" in env:
            shutil.copy(env["PIP_CONFIG_FILE"], top / "pip.conf")
            env["PIP_CONFIG_FILE"] = str(top / "pip.conf")
        env["PIP_CACHE_DIR"] = str(top / "pip-cache")
        subprocess.run(["chown", "-R", f"{NORMAL_USER}:{NORMAL_USER}", str(top)], check=True)
        top.chmod(0o755)
        drop = ["setpriv", f"--reuid={NORMAL_USER}", f"--regid={NORMAL_USER}", "--clear-groups", "--"]
        who = subprocess.run([*drop, "id", "-u"], env=env, capture_output=True, text=True, check=True).stdout
        assert who.strip() == str(NORMAL_USER)
        out = subprocess.run([*drop, "bash", "-c", readme_setup_command()], cwd=clone, env=env, capture_output=True,
                             text=True, timeout=1500)
        _check_headless_result(out, clone)
        assert "running as root" not in out.stderr
        assert (clone / ".venv").stat().st_uid == NORMAL_USER
    finally:
        shutil.rmtree(top, ignore_errors=True)


@pytest.mark.slow
def test_wheel_carries_notebooks_and_runs_lab_headless(tmp_path: Path) -> None:
    env = _headless_env(tmp_path)
    dist = tmp_path / "dist"
    build = subprocess.run([sys.executable, "-m", "pip", "wheel", "--no-deps", "-v", "-w", str(dist), str(REPO)],
                           env=env, capture_output=True, text=True, timeout=600)
    assert build.returncode == 0, build.stderr[-3000:]
    assert "deprecat" not in (build.stdout + build.stderr).lower()
    wheel = next(dist.glob("pwmkit-*.whl"))
    import zipfile

    names = zipfile.ZipFile(wheel).namelist()
    assert any(n.endswith(f"/data/share/pwmkit/notebooks/{notebooks.MAIN_NOTEBOOK}") for n in names)
    assert any(n.endswith("/data/share/pwmkit/examples/greenhouse-fan.toml") for n in names)
    meta = zipfile.ZipFile(wheel).read(next(n for n in names if n.endswith("METADATA"))).decode()
    assert "License-Expression: MIT" in meta
    venv = tmp_path / "venv"
    subprocess.run([sys.executable, "-m", "venv", str(venv)], check=True, env=env)
    vpy = venv / "bin" / "python"
    inst = subprocess.run([str(vpy), "-m", "pip", "install", "-q", f"{wheel}[lab]"], env=env,
                          capture_output=True, text=True, timeout=1200)
    assert inst.returncode == 0, inst.stderr[-3000:]
    work = tmp_path / "work"
    work.mkdir()
    where = subprocess.run([str(vpy), "-c", "import pwmkit; print(pwmkit.__file__)"], cwd=work, env=env,
                           capture_output=True, text=True, check=True).stdout
    assert str(venv) in where, where
    out = subprocess.run([str(venv / "bin" / "pwmkit"), "lab", "--headless"], cwd=work, env=env,
                         capture_output=True, text=True, timeout=900)
    _check_headless_result(out, work)


def test_lab_as_root_adds_allow_root_and_says_so(tmp_path: Path, monkeypatch: pytest.MonkeyPatch,
                                                  capsys: pytest.CaptureFixture[str]) -> None:
    calls: list[list[str]] = []
    monkeypatch.setattr(subprocess, "call", lambda cmd: calls.append(cmd) or 0)
    src = notebooks.notebook_source_dir()
    for euid, expect in ((0, True), (1000, False)):
        monkeypatch.setattr(notebooks.os, "geteuid", lambda euid=euid: euid, raising=False)
        assert main(["lab", "--dir", str(tmp_path / "work"), "--source", str(src), "--browser"]) == 0
        assert ("--allow-root" in calls[-1]) is expect
        assert ("running as root" in capsys.readouterr().err) is expect


def test_notebooks_are_found_in_a_wheel_install_layout(tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    # a wheel puts them into <prefix>/share/pwmkit/; no checkout beside the package
    share = tmp_path / "share" / "pwmkit" / "notebooks"
    share.mkdir(parents=True)
    (share / "x.ipynb").write_text("{}", encoding="utf-8")
    monkeypatch.setattr(notebooks, "__file__", str(tmp_path / "site" / "pwmkit" / "record" / "notebooks.py"))
    monkeypatch.setattr(notebooks.sys, "prefix", str(tmp_path))
    assert notebooks.notebook_source_dir() == share
