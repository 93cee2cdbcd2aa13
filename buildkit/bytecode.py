"""The trimmed standard library's modules, and the app wheel's, compiled to ``.pyc`` by Pyodide's
own Python at build time.

Without bytecode, Pyodide compiles every module it imports: on a first visit about 140 standard-library
modules while it boots (3.4 s of a 5.3 s boot under Node.js on this machine), then the app's 86.
:func:`compile_archive` runs the pinned Pyodide under Node.js (the same interpreter as the
browser, so the same magic number), compiles each ``.py`` of the given zip and returns
``{name.pyc: bytes}``: hash-based *unchecked* ``.pyc`` files (PEP 552: no timestamp; the source
hash is written but never checked, so no source is read), ``co_filename`` set to the module's path
inside the zip it is imported from (tracebacks name the module), with
``PYTHONHASHSEED=0`` so set and frozenset constants marshal in the same order on every build, and
``PYTHONNODEBUGRANGES=1`` (Python's ``-X no_debug_ranges``): line numbers kept, column ranges left
out, so a traceback through the standard library names the line without underlining the part of it.
That makes the archive 1.50 → 1.14 MB deflated, sent to every first visitor.
The result is kept in ``.cache/pyc`` under the SHA-256 of the input zip, the Pyodide version and
this file, so a rebuild is quick and gives the same bytes. Without Node.js, or if the step fails,
it returns ``None`` and the archive ships source only (the browser then compiles it, as before).
"""

from __future__ import annotations

import hashlib
import os
import shutil
import subprocess
import tempfile
import zipfile

from .common import CACHE, log

COMPILE_JS = r"""
const [, , indexURL, src, dest, where] = process.argv;
const fs = await import("node:fs");
const { pathToFileURL } = await import("node:url");
const { loadPyodide } = await import(pathToFileURL(indexURL + "pyodide.mjs").href);
const info = JSON.parse(fs.readFileSync(indexURL + "pyodide-lock.json", "utf-8")).info;
const py = await loadPyodide({ indexURL, lockFileContents: Promise.resolve({ info, packages: {} }),
  env: { PYTHONHASHSEED: "0", PYTHONNODEBUGRANGES: "1" }, stdout: () => {}, stderr: (s) => console.error(s) });
py.FS.writeFile("/tmp/src.zip", fs.readFileSync(src));
py.globals.set("where", where);
py.runPython(`
import _imp, importlib.util, marshal, os, sys, zipfile
assert os.environ.get("PYTHONHASHSEED") == "0" and hash("fp") == hash("f" + "p")
# where the modules will live, as their __file__ shows it: inside Pyodide's standard-library zip
# (e.g. /lib/python314.zip) or inside the zip named by where (the app wheel, imported from the
# file by zipimport, which takes mod.pyc beside mod.py when its header says "unchecked")
home = os.__file__.split(".zip/", 1)[0] + ".zip" if where == "stdlib" else where
with zipfile.ZipFile("/tmp/src.zip") as src, zipfile.ZipFile("/tmp/out.zip", "w") as out:
    for name in sorted(src.namelist()):
        if not name.endswith(".py"):
            continue
        data = src.read(name)
        code = compile(data, f"{home}/{name}", "exec", dont_inherit=True, optimize=0)
        # PEP 552 header: magic, flags 0b01 (hash-based, unchecked), the source's hash
        pyc = importlib.util.MAGIC_NUMBER + (1).to_bytes(4, "little") + importlib.util.source_hash(data) + marshal.dumps(code)
        out.writestr(zipfile.ZipInfo(name + "c", (1980, 1, 1, 0, 0, 0)), pyc)
`);
fs.writeFileSync(dest, py.FS.readFile("/tmp/out.zip"));
"""


def _digest(src_zip: str, pyodide_dir: str, where: str) -> str:
    h = hashlib.sha256(where.encode())
    with open(src_zip, "rb") as fh:
        h.update(fh.read())
    h.update(os.path.basename(os.path.normpath(pyodide_dir)).encode())
    with open(__file__, "rb") as fh:
        h.update(fh.read())
    return h.hexdigest()


def compile_archive(src_zip: str, pyodide_dir: str, where: str = "stdlib") -> dict[str, bytes] | None:
    """``{"pkg/mod.pyc": bytes}`` for every ``.py`` in ``src_zip``, compiled by the Pyodide in
    ``pyodide_dir`` under Node.js; ``None`` when Node.js is missing or compiling fails.
    ``where``: ``"stdlib"`` for Pyodide's standard-library zip, or the path of the zip the modules
    will be imported from (the app wheel), which their code names as its file."""
    what = "standard library" if where == "stdlib" else "app wheel"
    cached = os.path.join(CACHE, "pyc", _digest(src_zip, pyodide_dir, where) + ".zip")
    if not os.path.exists(cached):
        node = shutil.which("node")
        if not node or os.environ.get("FP_NO_PYC"):
            log(f"{what} shipped as source (no Node.js, or FP_NO_PYC set)")
            return None
        os.makedirs(os.path.dirname(cached), exist_ok=True)
        with tempfile.TemporaryDirectory() as tmp:
            script = os.path.join(tmp, "compile.mjs")
            with open(script, "w", encoding="utf-8") as fh:
                fh.write(COMPILE_JS)
            part = os.path.join(tmp, "out.zip")
            try:
                subprocess.run([node, script, os.path.abspath(pyodide_dir) + "/", os.path.abspath(src_zip), part, where],
                               check=True, capture_output=True, timeout=600)
            except (OSError, subprocess.SubprocessError) as err:
                detail = getattr(err, "stderr", b"") or b""
                log(f"{what} shipped as source: compiling under Node.js failed ({err}) "
                    + detail.decode("utf-8", "replace")[-500:])
                return None
            shutil.move(part, cached)
    elif os.environ.get("FP_NO_PYC"):
        log(f"{what} shipped as source (FP_NO_PYC set)")
        return None
    with zipfile.ZipFile(cached) as zf:
        return {n: zf.read(n) for n in zf.namelist()}
