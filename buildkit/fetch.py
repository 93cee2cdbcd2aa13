"""Pinned downloads, each checked against its digest and cached in .cache/: the Pyodide core files
(npm tarball, sha512 integrity from the registry) and the pure-Python wheels the browser installs
(PyPI, SHA-256)."""

from __future__ import annotations

import base64
import hashlib
import os
import shutil
import subprocess
import sys
import tarfile

from .common import CACHE, log, sha256_file
from .machine import ensure_debian, pip_command

PYODIDE_VERSION = "314.0.8"
PYODIDE_INTEGRITY = "sha512-74Wq1kXOC+CCEzAfxuRAO701nAcCMLjf8NrwvWpu8S41dVMXwXmLQ05dYB+F4e46AdnGo0oq7YHSVUpHsoarLQ=="
PYODIDE_FILES = ("pyodide.mjs", "pyodide.asm.mjs", "pyodide.asm.wasm", "python_stdlib.zip", "pyodide-lock.json")
# micropip vendors its own copy of 'packaging', so that wheel is not shipped.
WHEELS = {
    "micropip-0.11.1-py3-none-any.whl": "768de165adb8e66906039d8fec4127a57f522dfdf8e6fbff877a4616941ecfd3",
}


def fetch_pyodide() -> str:
    """Return a folder holding the pinned Pyodide core files, downloading once into .cache/."""
    dest = os.path.join(CACHE, f"pyodide-{PYODIDE_VERSION}")
    if all(os.path.exists(os.path.join(dest, f)) for f in PYODIDE_FILES):
        return dest
    os.makedirs(CACHE, exist_ok=True)
    tgz = os.path.join(CACHE, f"pyodide-{PYODIDE_VERSION}.tgz")
    if not os.path.exists(tgz):
        npm = shutil.which("npm")
        if not npm:
            ensure_debian(["npm"])
            npm = shutil.which("npm")
        log(f"downloading pyodide@{PYODIDE_VERSION} from the npm registry")
        subprocess.run([npm, "pack", f"pyodide@{PYODIDE_VERSION}", "--silent"], cwd=CACHE, check=True,
                       stdout=subprocess.DEVNULL)
    with open(tgz, "rb") as fh:
        digest = "sha512-" + base64.b64encode(hashlib.sha512(fh.read()).digest()).decode()
    if digest != PYODIDE_INTEGRITY:
        os.remove(tgz)
        sys.exit(f"pyodide tarball integrity mismatch (got {digest[:30]}…); removed, run again")
    tmp = dest + ".part"
    shutil.rmtree(tmp, ignore_errors=True)
    os.makedirs(tmp)
    with tarfile.open(tgz) as tar:
        for name in PYODIDE_FILES:
            member = tar.getmember(f"package/{name}")
            with tar.extractfile(member) as src, open(os.path.join(tmp, name), "wb") as out:
                shutil.copyfileobj(src, out)
    shutil.rmtree(dest, ignore_errors=True)
    os.rename(tmp, dest)
    return dest


def fetch_wheels() -> str:
    """Download the pinned pure-Python wheels the browser installs, checking SHA-256."""
    dest = os.path.join(CACHE, "wheels")
    os.makedirs(dest, exist_ok=True)
    for name, sha in WHEELS.items():
        path = os.path.join(dest, name)
        if not os.path.exists(path):
            dist_name, version = name.split("-")[:2]
            log(f"downloading {name} from PyPI")
            subprocess.run(
                [*pip_command(), "download", "--quiet", "--no-deps", "--python-version", "3.14",
                 "--only-binary=:all:", f"{dist_name}=={version}", "-d", dest],
                check=True,
            )
        if sha256_file(path) != sha:
            os.remove(path)
            sys.exit(f"{name}: SHA-256 mismatch; removed, run again")
    return dest
