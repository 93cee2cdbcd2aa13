"""dist/ put together: Pyodide and the wheels, the app wheel, icons, catalog.js, index.html, the shell's
files, the manifest, engine.json, and sw.js with the precache list of every other file and its digest.
Same sources → byte-identical output."""

from __future__ import annotations

import base64
import gzip
import hashlib
import json
import os
import shutil
import subprocess

from .common import APP_NAME, BACKGROUND, CACHE, DIST, THEME, WEB, app_module, log, read_version, sha256_file
from .fetch import PYODIDE_FILES, PYODIDE_VERSION, WHEELS, fetch_pyodide, fetch_wheels
from .icons import build_icons
from .prerender import render_index
from .stdlib import write_trimmed
from .wheel import APP_PATH, build_app_wheel
from .workerbundle import bundle

# Shipped but not precached: fetched (and then kept, digest-checked, by the service worker) only by
# the micropip install path (?installer=micropip), which loads the whole standard library and
# Pyodide's package list. The default start passes a package list with no packages (engine.json's
# "pyodide_lock") and reads the trimmed standard library.
FULL_STDLIB = "pyodide/python_stdlib-full.zip"
# pyodide.mjs, Pyodide's loader, is written into worker.js (buildkit/workerbundle.py); the file
# itself is kept for the benchmark's bare-boot page and the Node checks, fetched only by them.
ON_DEMAND = ("pyodide/pyodide-lock.json", "pyodide/pyodide.mjs", FULL_STDLIB, *(f"wheels/{w}" for w in WHEELS))
# Files a static host may send compressed: a gzip copy is written beside each (name + ".gz") when
# it is at least this much smaller; the standard-library zip and micropip's wheel are deflated
# already (no copy), PNGs too; the app wheel is stored (buildkit/wheel.py) and gets copies.
GZIP_MIN_SAVING = 0.10
GZIP_TYPES = (".html", ".js", ".mjs", ".css", ".json", ".webmanifest", ".svg", ".wasm", ".whl")
# Brotli copies (name + ".br") beside the gzip ones, kept when at least this much smaller than the
# gzip copy: pyodide.asm.wasm is 2.77 MB with Brotli against 3.53 MB with gzip. Made by Node.js's
# zlib (npm brings Node; the standard library has no Brotli), quality 11, 16 MB window; each
# result is kept in .cache/brotli under the SHA-256 of its input (quality 11 takes ~40 s for the
# wasm), so a rebuild is quick and gives the same bytes.
BROTLI_MIN_SAVING = 0.03
BROTLI_JS = """
const zlib = require("zlib"), fs = require("fs");
for (const [src, dest] of JSON.parse(fs.readFileSync(0, "utf8"))) {
  const data = fs.readFileSync(src);
  fs.writeFileSync(dest, zlib.brotliCompressSync(data, { params: {
    [zlib.constants.BROTLI_PARAM_QUALITY]: 11, [zlib.constants.BROTLI_PARAM_LGWIN]: 24,
    [zlib.constants.BROTLI_PARAM_SIZE_HINT]: data.length } }));
}
"""


# web/ files not copied as they are: written from templates, or joined into worker.js
# index.html's build placeholder, filled with engine.json's SHA-256
BUILD_META = '<meta name="fp-build" content="{}">'
NOT_COPIED = ("sw.js", "icon.svg", "index.html", "worker.js", "worker-caches.js", "early.js")


def worker_bundle(*paths: str) -> str:
    texts = []
    for path in paths:
        with open(path, encoding="utf-8") as fh:
            texts.append(fh.read())
    return bundle(*texts)


# early.js goes into index.html in place of this element; the CSP's script-src then allows it by its hash
EARLY_SLOT = '<script data-inline="early.js"></script>'
CSP_SCRIPTS = "script-src 'self' 'wasm-unsafe-eval'"


def inline_early(index: str) -> str:
    """index.html with web/early.js as its one inline script, allowed by the CSP through the script's
    SHA-256 (CSP Level 3, hash-source) and nothing else: it runs while the page is parsed, before the
    first frame, without a fetch (remembered result in the first frame)."""
    with open(os.path.join(WEB, "early.js"), encoding="utf-8") as fh:
        code = "\n" + fh.read()
    assert "</script" not in code.lower() and "<!--" not in code, "early.js cannot sit inside <script>"
    digest = base64.b64encode(hashlib.sha256(code.encode("utf-8")).digest()).decode("ascii")
    assert index.count(EARLY_SLOT) == 1 and index.count(CSP_SCRIPTS) == 1, "index.html: early.js slot or CSP changed"
    index = index.replace(CSP_SCRIPTS, f"{CSP_SCRIPTS} 'sha256-{digest}'")
    return index.replace(EARLY_SLOT, f"<script>{code}</script>")


def catalog_json() -> str:
    return app_module("bridge").catalog()


def build(quiet: bool = False) -> str:
    """Make dist/ from scratch and return its path. Same sources → byte-identical output."""
    pyodide_dir = fetch_pyodide()
    wheels_dir = fetch_wheels()
    tmp = DIST + ".part"
    shutil.rmtree(tmp, ignore_errors=True)
    os.makedirs(os.path.join(tmp, "pyodide"))
    os.makedirs(os.path.join(tmp, "wheels"))
    for f in PYODIDE_FILES:
        if f != "python_stdlib.zip":
            shutil.copyfile(os.path.join(pyodide_dir, f), os.path.join(tmp, "pyodide", f))
    # The standard library the default start reads: only the modules the app, Pyodide and the
    # worker's paths import (buildkit/stdlib.py); the whole one is kept for the micropip path.
    full_stdlib = os.path.join(pyodide_dir, "python_stdlib.zip")
    write_trimmed(full_stdlib, os.path.join(tmp, "pyodide", "python_stdlib.zip"), pyodide_dir=pyodide_dir)
    shutil.copyfile(full_stdlib, os.path.join(tmp, FULL_STDLIB))
    with open(os.path.join(pyodide_dir, "pyodide-lock.json"), encoding="utf-8") as fh:
        lock_info = json.load(fh)["info"]
    for w in WHEELS:
        shutil.copyfile(os.path.join(wheels_dir, w), os.path.join(tmp, "wheels", w))
    app_wheel = build_app_wheel(os.path.join(tmp, "wheels"), pyodide_dir)
    build_icons(os.path.join(tmp, "icons"))
    version = read_version()

    # The worksheet declarations as a JS module, fetched in parallel with the shell's own
    # modules, so the form renders before Python has started.
    catalog = catalog_json()
    with open(os.path.join(tmp, "catalog.js"), "w", encoding="utf-8") as fh:
        fh.write("// Generated by build.py from app.bridge.catalog(); do not edit.\nexport default ")
        fh.write(catalog)
        fh.write(";\n")

    for name in sorted(os.listdir(WEB)):
        src = os.path.join(WEB, name)
        if os.path.isfile(src) and name not in NOT_COPIED and not name.startswith("."):
            shutil.copyfile(src, os.path.join(tmp, name))
    with open(os.path.join(tmp, "worker.js"), "w", encoding="utf-8") as fh:
        fh.write(worker_bundle(*(os.path.join(d, n) for d, n in (
            (WEB, "worker.js"), (WEB, "worker-caches.js"), (os.path.join(tmp, "pyodide"), "pyodide.mjs")))))
    # Engine facts the worker needs, with the app wheel's digest for its integrity check.
    engine = {
        "version": version,
        "pyodide": PYODIDE_VERSION,
        "wheels": sorted(WHEELS),
        "app_wheel": app_wheel,
        "app_path": APP_PATH,
        "app_wheel_sha256": sha256_file(os.path.join(tmp, "wheels", app_wheel)),
        # loadPyodide waits for a package list before it returns; the app installs no Pyodide
        # packages, so the default start passes this one (Pyodide's own "info", no packages)
        # instead of fetching pyodide-lock.json (119 kB). The micropip path reads the real one.
        "pyodide_lock": {"info": lock_info, "packages": {}},
        "full_stdlib": FULL_STDLIB,
    }
    with open(os.path.join(tmp, "engine.json"), "w", encoding="utf-8") as fh:
        json.dump(engine, fh, indent=2, sort_keys=True)

    # The build's name in the page (engine.json's SHA-256), read synchronously by remembered.js and app.js:
    # a result remembered under another build never matches (docs/performance.md, remembered result).
    with open(os.path.join(WEB, "index.html"), encoding="utf-8") as fh:
        index = render_index(fh.read(), json.loads(catalog))
    assert index.count(BUILD_META.format("")) == 1, "index.html needs its build placeholder"
    index = index.replace(BUILD_META.format(""), BUILD_META.format(sha256_file(os.path.join(tmp, "engine.json"))))
    index = inline_early(index)
    with open(os.path.join(tmp, "index.html"), "w", encoding="utf-8") as fh:
        fh.write(index)
    shutil.copyfile(os.path.join(WEB, "icon.svg"), os.path.join(tmp, "icons", "icon.svg"))

    manifest = {
        "name": f"{APP_NAME} — capacitor and phasor worksheets",
        "short_name": APP_NAME,
        "description": "Size, select and check power-factor-correction capacitors offline.",
        "id": "./",
        "start_url": "./",
        "scope": "./",
        "display": "standalone",
        "orientation": "any",
        "theme_color": THEME,
        "background_color": BACKGROUND,
        "icons": [
            {"src": "icons/icon-192.png", "sizes": "192x192", "type": "image/png", "purpose": "any"},
            {"src": "icons/icon-512.png", "sizes": "512x512", "type": "image/png", "purpose": "any"},
            {"src": "icons/icon-maskable-512.png", "sizes": "512x512", "type": "image/png", "purpose": "maskable"},
        ],
    }
    with open(os.path.join(tmp, "manifest.webmanifest"), "w", encoding="utf-8") as fh:
        json.dump(manifest, fh, indent=2, ensure_ascii=False)

    assets, cache_version = write_service_worker(tmp, version)
    gz = write_gzip_copies(tmp)
    br = write_brotli_copies(tmp, gz)
    shutil.rmtree(DIST, ignore_errors=True)
    os.rename(tmp, DIST)
    if not quiet:
        total = sum(os.path.getsize(os.path.join(DIST, a)) for a, _ in assets)
        sent = sum(gz.get(a, os.path.getsize(os.path.join(DIST, a))) for a, _ in assets)
        sent_br = sum(br.get(a, gz.get(a, os.path.getsize(os.path.join(DIST, a)))) for a, _ in assets)
        log(f"dist/ ready: {len(assets)} files, {total / 1e6:.2f} MB precached ({sent / 1e6:.2f} MB as sent gzipped,"
            f" {sent_br / 1e6:.2f} MB with Brotli where the browser takes it), cache {cache_version}")
    return DIST


def write_gzip_copies(folder: str) -> dict:
    """Beside each compressible file write ``name.gz`` (gzip level 9, no name, time 0: the same
    bytes every build) when it saves at least GZIP_MIN_SAVING. Returns {path: gzip size}."""
    out = {}
    for sub, dirs, names in os.walk(folder):
        dirs.sort()
        for n in sorted(names):
            if not n.endswith(GZIP_TYPES):
                continue
            path = os.path.join(sub, n)
            with open(path, "rb") as fh:
                data = fh.read()
            packed = gzip.compress(data, compresslevel=9, mtime=0)
            if len(packed) <= (1 - GZIP_MIN_SAVING) * len(data):
                with open(path + ".gz", "wb") as fh:
                    fh.write(packed)
                out[os.path.relpath(path, folder).replace(os.sep, "/")] = len(packed)
    return out


def write_brotli_copies(folder: str, gz: dict) -> dict:
    """Beside each file with a gzip copy (``gz``, from :func:`write_gzip_copies`) write ``name.br``
    when Brotli saves BROTLI_MIN_SAVING on that copy. Needs Node.js; without it, no Brotli copies
    (the gzip ones stay). Returns {path: Brotli size}."""
    node = shutil.which("node")
    if not node:
        log("node not found: no Brotli copies (gzip only)")
        return {}
    store = os.path.join(CACHE, "brotli")
    os.makedirs(store, exist_ok=True)
    jobs, cached = [], {}
    for rel in sorted(gz):
        src = os.path.join(folder, rel)
        cached[rel] = os.path.join(store, sha256_file(src) + ".q11w24.br")
        if not os.path.exists(cached[rel]):
            jobs.append([src, cached[rel] + ".part"])
    if jobs:
        subprocess.run([node, "-e", BROTLI_JS], input=json.dumps(jobs), text=True, check=True)
        for _, part in jobs:
            os.replace(part, part[: -len(".part")])
    out = {}
    for rel, path in cached.items():
        size = os.path.getsize(path)
        if size <= (1 - BROTLI_MIN_SAVING) * gz[rel]:
            shutil.copyfile(path, os.path.join(folder, rel + ".br"))
            out[rel] = size
    return out


def write_service_worker(folder: str, version: str) -> tuple[list, str]:
    """Write ``folder``/sw.js from web/sw.js with the precache list of every other file in
    ``folder`` and its SHA-256 (ASSETS), and the files kept only once asked for (ON_DEMAND, with
    theirs); VERSION is the hash of both lists together. Returns (precached assets, VERSION)."""
    assets, lazy = [], []
    for sub, dirs, names in os.walk(folder):
        dirs.sort()
        for n in sorted(names):
            rel = os.path.relpath(os.path.join(sub, n), folder).replace(os.sep, "/")
            if rel != "sw.js" and not rel.endswith((".gz", ".br")):
                (lazy if rel in ON_DEMAND else assets).append([rel, sha256_file(os.path.join(sub, n))])
    assets.sort()
    lazy.sort()
    cache_version = hashlib.sha256(json.dumps(sorted(assets + lazy)).encode()).hexdigest()[:16]
    with open(os.path.join(WEB, "sw.js"), encoding="utf-8") as fh:
        sw = fh.read()
    sw = sw.replace("/*@ASSETS@*/[]", json.dumps(assets, separators=(",", ":")))
    sw = sw.replace("/*@ON_DEMAND@*/[]", json.dumps(lazy, separators=(",", ":")))
    sw = sw.replace('"@VERSION@"', json.dumps(cache_version))
    sw = sw.replace('"@APP_VERSION@"', json.dumps(version))
    with open(os.path.join(folder, "sw.js"), "w", encoding="utf-8") as fh:
        fh.write(sw)
    return assets, cache_version
