"""A bytecode cache for the browser: compile our modules (and the standard-library modules
they pull in) once, so later start-ups skip compiling source.

Pyodide's standard library ships as source in a zip, and the app ships as source in its
wheel; compiling them costs a few hundred milliseconds on every start. After the first result
the worker calls :func:`archive`, which returns a zip of hash-based *unchecked* ``.pyc`` files
(PEP 552) for every module imported since ``baseline``: app and pycore modules go to their
``__pycache__`` folders, standard-library ones to :data:`STDLIB_DIR` as sourceless files.
The worker stores the zip keyed by the app wheel's SHA-256 and the Pyodide version, and on the
next start unpacks it before importing anything, with :data:`STDLIB_DIR` first on ``sys.path``.
A new build has a new key, so a cache never outlives the code it was compiled from.
"""

from __future__ import annotations

import importlib.util
import io
import marshal
import sys
import zipfile

STDLIB_DIR = "/lib/fp-pyc"


def _pyc(source: bytes, code) -> bytes:
    # PEP 552 header: magic, flags (bit 0 hash-based, bit 1 check-source: 0b01 = unchecked), hash
    return importlib.util.MAGIC_NUMBER + (1).to_bytes(4, "little") + importlib.util.source_hash(source) + marshal.dumps(code)


def archive(baseline) -> bytes:
    """Zip of compiled bytecode for modules imported since ``baseline`` (a set of module names)."""
    buf = io.BytesIO()
    written = set()
    with zipfile.ZipFile(buf, "w", zipfile.ZIP_STORED) as zf:
        for name, mod in sorted(sys.modules.items()):
            if name in baseline or name == "__main__":
                continue
            path = getattr(mod, "__file__", None) or ""
            spec = getattr(mod, "__spec__", None)
            if not path.endswith(".py") or spec is None or spec.loader is None:
                continue
            try:
                if ".zip/" in path:  # standard library inside python3xx.zip
                    text = spec.loader.get_source(name)
                    if text is None:
                        continue
                    source = text.encode("utf-8")
                    is_pkg = spec.submodule_search_locations is not None
                    target = f"{STDLIB_DIR}/{name.replace('.', '/')}" + ("/__init__.pyc" if is_pkg else ".pyc")
                elif name.split(".")[0] in ("app", "pycore"):
                    with open(path, "rb") as fh:
                        source = fh.read()
                    target = importlib.util.cache_from_source(path)
                else:
                    continue
                code = compile(source, path, "exec", dont_inherit=True, optimize=0)
            except (OSError, SyntaxError, ValueError, ImportError):
                continue
            arc = target.lstrip("/")
            if arc not in written:
                zf.writestr(arc, _pyc(source, code))
                written.add(arc)
    return buf.getvalue()

