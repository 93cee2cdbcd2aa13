"""The app's own code (pycore/ and app/) packed as a pure-Python wheel, byte-identical for the same sources.

Its entries are stored, not deflated: the build writes gzip and Brotli copies of the whole wheel
(assemble.py), which compress across files (the source alone: 0.29 MB deflated per entry; stored,
0.24 MB gzipped and 0.19 MB with Brotli on the wire; with its bytecode, 0.43 MB with Brotli).

The worker writes the wheel to :data:`APP_PATH` and imports the app from it (zipimport). With
Node.js the wheel also carries each module's ``.pyc`` beside its source (``app/x.pyc``, where
zipimport looks first), compiled by Pyodide's own Python (buildkit/bytecode.py: hash-based and
unchecked, no column ranges), so no start, not even a first visit, compiles the app."""

from __future__ import annotations

import base64
import hashlib
import os
import zipfile

from .common import ROOT, read_version

FIXED_TIME = (2020, 2, 2, 0, 0, 0)  # zip entries get one fixed time so builds are byte-identical
#: where the worker writes the app wheel in Pyodide's file system (engine.json "app_path"); the
#: app's modules are imported from it, and their bytecode names its files there
APP_PATH = "/lib/fp-app.whl"


def build_app_wheel(out_dir: str, pyodide_dir: str | None = None) -> str:
    """Pack pycore/ and app/ as a pure-Python wheel with fixed timestamps (reproducible); with
    ``pyodide_dir``, each module's bytecode for that Pyodide too (when Node.js can compile it)."""
    version = read_version()
    name = f"fieldphasor-{version}-py3-none-any.whl"
    info = f"fieldphasor-{version}.dist-info"
    files: list[tuple[str, bytes]] = []
    for pkg in ("pycore", "app"):
        for folder, dirs, names in os.walk(os.path.join(ROOT, pkg)):
            dirs[:] = sorted(d for d in dirs if d != "__pycache__")
            for n in sorted(names):
                if n.endswith(".py"):
                    full = os.path.join(folder, n)
                    with open(full, "rb") as fh:
                        files.append((os.path.relpath(full, ROOT).replace(os.sep, "/"), fh.read()))
    if pyodide_dir:
        files += sorted(_bytecode(files, pyodide_dir).items())
    meta = (
        "Metadata-Version: 2.1\n"
        f"Name: fieldphasor\nVersion: {version}\n"
        "Summary: Offline power-factor-correction and phasor worksheets\n"
        "Requires-Python: >=3.11\n"
    ).encode()
    wheel = b"Wheel-Version: 1.0\nGenerator: fieldphasor-build\nRoot-Is-Purelib: true\nTag: py3-none-any\n"
    top = b"app\npycore\n"
    files += [(f"{info}/METADATA", meta), (f"{info}/WHEEL", wheel), (f"{info}/top_level.txt", top)]
    record_lines = []
    for path, data in files:
        digest = base64.urlsafe_b64encode(hashlib.sha256(data).digest()).rstrip(b"=").decode()
        record_lines.append(f"{path},sha256={digest},{len(data)}")
    record_lines.append(f"{info}/RECORD,,")
    files.append((f"{info}/RECORD", ("\n".join(record_lines) + "\n").encode()))
    path = os.path.join(out_dir, name)
    with zipfile.ZipFile(path, "w", zipfile.ZIP_STORED) as zf:
        for arc, data in files:
            zi = zipfile.ZipInfo(arc, FIXED_TIME)
            zi.compress_type = zipfile.ZIP_STORED
            zi.external_attr = 0o644 << 16
            zf.writestr(zi, data)
    return name


def _bytecode(sources: list[tuple[str, bytes]], pyodide_dir: str) -> dict[str, bytes]:
    """``{"app/x.pyc": bytes}`` for ``sources``, or ``{}`` without Node.js."""
    import tempfile

    from .bytecode import compile_archive

    with tempfile.TemporaryDirectory() as tmp:
        src = os.path.join(tmp, "src.zip")
        with zipfile.ZipFile(src, "w") as zf:
            for arc, data in sources:
                zf.writestr(zipfile.ZipInfo(arc, FIXED_TIME), data)
        return compile_archive(src, pyodide_dir, APP_PATH) or {}
