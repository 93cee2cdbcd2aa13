"""Setting up the machine: the Debian packages the build and the tests need, and .venv with the
pinned test tools. `python3 build.py setup` runs all of it (CI's `.ci/run` too); the other commands
call only the parts they need."""

from __future__ import annotations

import os
import re
import shutil
import subprocess
import sys

from .common import ROOT, VENV, log

CHROMIUM = "/usr/bin/chromium"


def _python_has_venv() -> bool:
    return subprocess.run([sys.executable, "-c", "import venv, ensurepip"], capture_output=True).returncode == 0


def _has_dejavu_font() -> bool:
    if not shutil.which("fc-list"):
        return False
    out = subprocess.run(["fc-list"], capture_output=True, text=True).stdout
    return "dejavu" in out.lower()


# Each Debian package with how to tell it is already there (the machine's own Node.js may bring npm).
DEBIAN_PACKAGES = {
    "chromium": lambda: os.path.exists(CHROMIUM),  # the tests and the benchmark drive Debian's Chromium
    "ngspice": lambda: bool(shutil.which("ngspice")),  # reference circuit simulations in the tests
    "npm": lambda: bool(shutil.which("npm")),  # fetches the pinned Pyodide tarball
    "python3-venv": _python_has_venv,  # .venv for the test tools, and pip for the micropip wheel
    "fonts-dejavu-core": _has_dejavu_font,  # one known font for the browser tests' layout checks
}


def ensure_debian(packages: list[str]) -> None:
    """Install Debian packages when missing (as root with apt-get), or say how in one line."""
    missing = [p for p in packages if not DEBIAN_PACKAGES[p]()]
    if not missing:
        return
    if os.geteuid() == 0 and shutil.which("apt-get"):
        log(f"installing Debian packages: {' '.join(missing)}")
        env = dict(os.environ, DEBIAN_FRONTEND="noninteractive")
        subprocess.run(["apt-get", "update", "-qq"], check=True, env=env)
        subprocess.run(["apt-get", "install", "-y", "-qq", *missing], check=True, env=env, stdout=subprocess.DEVNULL)
    else:
        sys.exit(f"Missing {', '.join(missing)}: run 'sudo apt-get install -y {' '.join(missing)}' and try again.")


def venv_python() -> str:
    return os.path.join(VENV, "bin", "python")


def test_requirements() -> list[str]:
    try:
        import tomllib
    except ImportError:  # Python < 3.11
        tomllib = None
    with open(os.path.join(ROOT, "pyproject.toml"), "rb") as fh:
        data = fh.read()
    if tomllib:
        return tomllib.loads(data.decode())["project"]["optional-dependencies"]["test"]
    block = data.decode().split("test = [", 1)[1].split("]", 1)[0]
    return re.findall(r'"([^"]+)"', block)


def ensure_venv() -> str:
    """Create .venv with the pinned test tools (once; again when pyproject.toml's list changes)."""
    reqs = test_requirements()
    stamp = os.path.join(VENV, ".fieldphasor-reqs")
    want = "\n".join(reqs)
    if os.path.exists(stamp) and open(stamp).read() == want:
        return venv_python()
    make_venv()
    log("installing test tools into .venv")
    subprocess.run([venv_python(), "-m", "pip", "install", "--quiet", "--disable-pip-version-check", *reqs], check=True)
    with open(stamp, "w") as fh:
        fh.write(want)
    return venv_python()


def make_venv() -> None:
    """Create .venv (with pip) if it is missing; on Debian, install python3-venv first if needed."""
    if os.path.exists(venv_python()):
        return
    ensure_debian(["python3-venv"])
    log("creating .venv")
    if subprocess.run([sys.executable, "-m", "venv", VENV]).returncode != 0:
        shutil.rmtree(VENV, ignore_errors=True)
        sys.exit("Could not create .venv with Python's venv module (see the message above).")


def pip_command() -> list[str]:
    """This Python's pip, or the pip of a bare .venv when this Python has none (Debian's python3)."""
    if subprocess.run([sys.executable, "-m", "pip", "--version"], capture_output=True).returncode == 0:
        return [sys.executable, "-m", "pip"]
    make_venv()
    return [venv_python(), "-m", "pip"]


def setup() -> str:
    """Everything the build, the tests and the benchmark need on this machine; returns .venv's python."""
    ensure_debian(list(DEBIAN_PACKAGES))
    return ensure_venv()
