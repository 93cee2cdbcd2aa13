"""Paths, the app's name and colours, and small helpers every build step uses."""

from __future__ import annotations

import hashlib
import os
import re
import sys

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))
DIST = os.path.join(ROOT, "dist")
CACHE = os.path.join(ROOT, ".cache")
WEB = os.path.join(ROOT, "web")
VENV = os.path.join(ROOT, ".venv")

APP_NAME = "Fieldphasor"
THEME = "#0b4f4a"
BACKGROUND = "#f4f1e8"


def log(msg: str) -> None:
    print(f"[build] {msg}", flush=True)


def read_version() -> str:
    with open(os.path.join(ROOT, "app", "__init__.py"), encoding="utf-8") as fh:
        m = re.search(r'__version__\s*=\s*"([^"]+)"', fh.read())
    return m.group(1) if m else "0"


def sha256_file(path: str) -> str:
    h = hashlib.sha256()
    with open(path, "rb") as fh:
        for chunk in iter(lambda: fh.read(1 << 20), b""):
            h.update(chunk)
    return h.hexdigest()


def app_module(name: str):
    """A module of the app (``app.<name>``), imported from this checkout."""
    import importlib

    sys.path.insert(0, ROOT)
    try:
        return importlib.import_module(f"app.{name}")
    finally:
        sys.path.remove(ROOT)
