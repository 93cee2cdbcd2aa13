#!/usr/bin/env python3
"""Fieldphasor's one entry point: build dist/, serve it, run the tests, run the benchmark.

    python3 build.py serve      build, then serve dist/ on http://0.0.0.0:8000 (phones on the LAN too)
    python3 build.py test       install what the tests need, build, run every test
    python3 build.py bench      build, then measure start-up and response in Chromium (see DEVELOPERS.md)
    python3 build.py build      build dist/ only
    python3 build.py clean      remove dist/ (downloads in .cache/ are kept)

The build itself needs only the Python standard library and npm (for the pinned Pyodide
tarball) and pip (for the micropip wheel). Test and benchmark tools go in .venv/.
"""

from __future__ import annotations

import argparse
import base64
import hashlib
import http.server
import json
import os
import re
import shutil
import socket
import socketserver
import struct
import subprocess
import sys
import tarfile
import threading
import zipfile
import zlib
from xml.etree import ElementTree

ROOT = os.path.dirname(os.path.abspath(__file__))
DIST = os.path.join(ROOT, "dist")
CACHE = os.path.join(ROOT, ".cache")
WEB = os.path.join(ROOT, "web")
VENV = os.path.join(ROOT, ".venv")

# ---- pinned downloads (exact versions, checked digests) ---------------------------------
PYODIDE_VERSION = "314.0.8"
PYODIDE_INTEGRITY = "sha512-74Wq1kXOC+CCEzAfxuRAO701nAcCMLjf8NrwvWpu8S41dVMXwXmLQ05dYB+F4e46AdnGo0oq7YHSVUpHsoarLQ=="
PYODIDE_FILES = ("pyodide.mjs", "pyodide.asm.mjs", "pyodide.asm.wasm", "python_stdlib.zip", "pyodide-lock.json")
# micropip vendors its own copy of 'packaging', so that wheel is not shipped.
WHEELS = {
    "micropip-0.11.1-py3-none-any.whl": "768de165adb8e66906039d8fec4127a57f522dfdf8e6fbff877a4616941ecfd3",
}
SYSTEM_PACKAGES = {"chromium": "/usr/bin/chromium", "ngspice": "/usr/bin/ngspice"}
CHROMIUM = "/usr/bin/chromium"

APP_NAME = "Fieldphasor"
THEME = "#0b4f4a"
BACKGROUND = "#f4f1e8"
FIXED_TIME = (2020, 2, 2, 0, 0, 0)  # zip entries get one fixed time so builds are byte-identical


def log(msg: str) -> None:
    print(f"[build] {msg}", flush=True)


def read_version() -> str:
    with open(os.path.join(ROOT, "app", "__init__.py"), encoding="utf-8") as fh:
        m = re.search(r'__version__\s*=\s*"([^"]+)"', fh.read())
    return m.group(1) if m else "0"


# ---- downloads --------------------------------------------------------------------------
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


def pip_command() -> list[str]:
    """This Python's pip, or the pip of a bare .venv when this Python has none (Debian's python3)."""
    if subprocess.run([sys.executable, "-m", "pip", "--version"], capture_output=True).returncode == 0:
        return [sys.executable, "-m", "pip"]
    make_venv()
    return [venv_python(), "-m", "pip"]


def sha256_file(path: str) -> str:
    h = hashlib.sha256()
    with open(path, "rb") as fh:
        for chunk in iter(lambda: fh.read(1 << 20), b""):
            h.update(chunk)
    return h.hexdigest()


# ---- the app's own wheel ------------------------------------------------------------------
def build_app_wheel(out_dir: str) -> str:
    """Pack pycore/ and app/ as a pure-Python wheel with fixed timestamps (reproducible)."""
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
    with zipfile.ZipFile(path, "w", zipfile.ZIP_DEFLATED, compresslevel=9) as zf:
        for arc, data in files:
            zi = zipfile.ZipInfo(arc, FIXED_TIME)
            zi.compress_type = zipfile.ZIP_DEFLATED
            zi.external_attr = 0o644 << 16
            zf.writestr(zi, data)
    return name


# ---- icons: rasterise web/icon.svg (a small subset of SVG) in pure Python ---------------
def _parse_color(c: str) -> tuple[int, int, int]:
    c = c.strip().lstrip("#")
    if len(c) == 3:
        c = "".join(ch * 2 for ch in c)
    return int(c[0:2], 16), int(c[2:4], 16), int(c[4:6], 16)


def _circle_poly(cx, cy, r, n=96):
    import math

    return [(cx + r * math.cos(2 * math.pi * k / n), cy + r * math.sin(2 * math.pi * k / n)) for k in range(n)]


def _stroke_polys(pts, width, closed=False):
    """Thick polyline → list of quads plus round joints (as small circles)."""
    import math

    polys = []
    segs = list(zip(pts, pts[1:] + (pts[:1] if closed else [])))
    for (x1, y1), (x2, y2) in segs:
        dx, dy = x2 - x1, y2 - y1
        L = math.hypot(dx, dy) or 1.0
        nx, ny = -dy / L * width / 2, dx / L * width / 2
        polys.append([(x1 + nx, y1 + ny), (x2 + nx, y2 + ny), (x2 - nx, y2 - ny), (x1 - nx, y1 - ny)])
    for x, y in pts:
        polys.append(_circle_poly(x, y, width / 2, 24))
    return polys


def _icon_shapes(svg_text: str):
    """Read web/icon.svg: rect (with rx), circle, polygon, polyline and line elements with
    fill/stroke colours. Returns (size, [(polygons, rgb)]) in paint order."""
    import math

    root = ElementTree.fromstring(svg_text)
    ns = "{http://www.w3.org/2000/svg}"
    vb = [float(v) for v in root.get("viewBox").split()]
    size = vb[2]
    shapes = []
    for el in root.iter():
        tag = el.tag.replace(ns, "")
        fill, stroke = el.get("fill"), el.get("stroke")
        sw = float(el.get("stroke-width", "1"))
        polys = None
        if tag == "rect":
            x, y, w, h = (float(el.get(k, "0")) for k in ("x", "y", "width", "height"))
            rx = float(el.get("rx", "0"))
            if rx:
                pts = []
                for cx, cy, a0 in ((x + w - rx, y + rx, -90), (x + w - rx, y + h - rx, 0), (x + rx, y + h - rx, 90), (x + rx, y + rx, 180)):
                    for k in range(13):
                        a = math.radians(a0 + 90 * k / 12)
                        pts.append((cx + rx * math.cos(a), cy + rx * math.sin(a)))
                polys = [pts]
            else:
                polys = [[(x, y), (x + w, y), (x + w, y + h), (x, y + h)]]
        elif tag == "circle":
            cx, cy, r = (float(el.get(k)) for k in ("cx", "cy", "r"))
            if fill and fill != "none":
                shapes.append(([_circle_poly(cx, cy, r)], _parse_color(fill)))
            if stroke and stroke != "none":
                ring = _circle_poly(cx, cy, r)
                shapes.append((_stroke_polys(ring, sw, closed=True), _parse_color(stroke)))
            continue
        elif tag in ("polygon", "polyline", "line"):
            if tag == "line":
                pts = [(float(el.get("x1")), float(el.get("y1"))), (float(el.get("x2")), float(el.get("y2")))]
            else:
                nums = [float(v) for v in re.split(r"[\s,]+", el.get("points").strip())]
                pts = list(zip(nums[::2], nums[1::2]))
            if tag == "polygon" and fill and fill != "none":
                shapes.append(([pts], _parse_color(fill)))
            if stroke and stroke != "none":
                shapes.append((_stroke_polys(pts, sw, closed=(tag == "polygon")), _parse_color(stroke)))
            continue
        else:
            continue
        if fill and fill != "none":
            shapes.append((polys, _parse_color(fill)))
    return size, shapes


def rasterise_icon(svg_text: str, px: int, *, pad: float = 0.0, background: str | None = None) -> bytes:
    """Render the icon to an RGBA PNG of px × px. ``pad`` shrinks the artwork toward the
    centre (for a maskable icon's safe zone) over a solid ``background``."""
    size, shapes = _icon_shapes(svg_text)
    ss = 4  # 4 × 4 supersampling
    scale = px * (1 - 2 * pad) / size
    off = px * pad
    acc = [[0.0, 0.0, 0.0, 0.0] for _ in range(px * px)]
    if background:
        r, g, b = _parse_color(background)
        for p in acc:
            p[:] = [r, g, b, 255.0]
    for polys, (r, g, b) in shapes:
        cover = [0] * (px * px)
        polys_px = [[(off + x * scale, off + y * scale) for x, y in poly] for poly in polys]
        polys_edges = []
        for pts in polys_px:
            es = [(x1, y1, x2, y2) for (x1, y1), (x2, y2) in zip(pts, pts[1:] + pts[:1]) if y1 != y2]
            ys = [p[1] for p in pts]
            polys_edges.append((min(ys), max(ys), es))
        width = px * ss
        for sy in range(px * ss):
            y = (sy + 0.5) / ss
            mark = None
            lo_s, hi_s = width, 0
            for ymin, ymax, es in polys_edges:  # union of simple polygons, each even-odd
                if not (ymin <= y <= ymax):
                    continue
                xs = sorted(x1 + (y - y1) * (x2 - x1) / (y2 - y1) for x1, y1, x2, y2 in es if (y1 <= y < y2) or (y2 <= y < y1))
                for a, c in zip(xs[::2], xs[1::2]):
                    s0 = max(0, int(a * ss + 0.5))
                    s1 = min(width, int(c * ss + 0.5))
                    if s1 > s0:
                        if mark is None:
                            mark = bytearray(width)
                        mark[s0:s1] = b"\x01" * (s1 - s0)
                        lo_s, hi_s = min(lo_s, s0), max(hi_s, s1)
            if mark is None:
                continue
            row = (sy // ss) * px
            for xp in range(lo_s // ss, (hi_s - 1) // ss + 1):
                c = sum(mark[xp * ss:(xp + 1) * ss])
                if c:
                    cover[row + xp] += c
        full = ss * ss
        for i, c in enumerate(cover):
            if c:
                a = min(1.0, c / full)
                p = acc[i]
                inv = 1 - a
                p[0] = p[0] * inv + r * a
                p[1] = p[1] * inv + g * a
                p[2] = p[2] * inv + b * a
                p[3] = p[3] * inv + 255 * a
    raw = bytearray()
    for yy in range(px):
        raw.append(0)
        for xx in range(px):
            p = acc[yy * px + xx]
            al = p[3]
            if al > 0:
                # colours were accumulated premultiplied-style against transparent black; un-premultiply
                f = 255.0 / al
                raw += bytes((min(255, round(p[0] * f)), min(255, round(p[1] * f)), min(255, round(p[2] * f)), round(al)))
            else:
                raw += b"\0\0\0\0"
    return _png(px, px, bytes(raw))


def _png(w: int, h: int, raw: bytes) -> bytes:
    def chunk(kind: bytes, data: bytes) -> bytes:
        return struct.pack(">I", len(data)) + kind + data + struct.pack(">I", zlib.crc32(kind + data) & 0xFFFFFFFF)

    ihdr = struct.pack(">IIBBBBB", w, h, 8, 6, 0, 0, 0)
    return b"\x89PNG\r\n\x1a\n" + chunk(b"IHDR", ihdr) + chunk(b"IDAT", zlib.compress(raw, 9)) + chunk(b"IEND", b"")


def build_icons(out_dir: str) -> None:
    os.makedirs(out_dir, exist_ok=True)
    with open(os.path.join(WEB, "icon.svg"), encoding="utf-8") as fh:
        svg = fh.read()
    cache_dir = os.path.join(CACHE, "icons-" + hashlib.sha256(svg.encode()).hexdigest()[:16])
    wanted = {
        "icon-192.png": (192, 0.0, None),
        "icon-512.png": (512, 0.0, None),
        "icon-maskable-512.png": (512, 0.1, THEME),
    }
    os.makedirs(cache_dir, exist_ok=True)
    for name, (px, pad, bg) in wanted.items():
        cached = os.path.join(cache_dir, name)
        if not os.path.exists(cached):
            log(f"rendering {name}")
            data = rasterise_icon(svg, px, pad=pad, background=bg)
            with open(cached + ".part", "wb") as fh:
                fh.write(data)
            os.replace(cached + ".part", cached)
        shutil.copyfile(cached, os.path.join(out_dir, name))


# ---- the opening worksheet as static HTML ------------------------------------------------------
# Form sections drawn into index.html: the opening sheet's first two (the system, and the load
# readings a user types first) are on screen at once; fewer nodes make the first paint cheaper on
# a slow phone. The shell draws the rest as soon as its modules run.
STATIC_SECTIONS = 2


def static_form(decl: dict, sections: int | None = None) -> str | None:
    """The form the shell draws for ``decl`` with its defaults, as HTML: the catalog's form tree
    (app/formview.py) serialised, so the opening worksheet is on screen and accepts typing in the
    first paint. ``sections``: only the first so many form sections (the shell adds the rest a
    moment later); all if None. None if that part holds a table (the shell draws its rows)."""
    return app_module("formview").first_sections_html(decl["form"], sections)


def pending_headline_size(decl_id: str) -> str:
    """Markup drawn invisibly under the headline's placeholder message: the opening worksheet's answer
    for its default inputs (same wording as showResult in web/app.js), so the box is already the height
    the first answer will need at any width and with any font, and nothing moves when it comes.
    Computed here by the same code the engine runs."""
    from html import escape as e

    res = json.loads(app_module("bridge").compute(decl_id, "{}"))
    first = next((r for r in res.get("results", []) if r.get("key")), None)
    size = f'{first["label"]}: {first["display"]} — all results ↓' if res.get("ok") and first else ""
    return f'<span class="pending-size" aria-hidden="true">{e(size)}</span>'


def render_index(template: str, catalog: list) -> str:
    """index.html with the worksheet picker and the opening worksheet's form filled in."""
    from html import escape as e

    decl = next((d for d in catalog if d.get("opening")), catalog[0])
    # Only the opening worksheet: the picker does nothing until the shell runs, and the shell
    # then lists them all (a shorter list is a cheaper first paint on a slow phone).
    option = f'<option value="{e(decl["id"])}" selected>{e(decl["title"])}</option>'
    html = template.replace('<select id="sheet-pick"></select>', f'<select id="sheet-pick">{option}</select>')
    form = static_form(decl, STATIC_SECTIONS)
    if form is None:
        return html
    html = html.replace('<h1 id="sheet-title">Loading worksheets…</h1>', f'<h1 id="sheet-title">{e(decl["title"])}</h1>')
    html = html.replace('<p id="sheet-summary" class="summary"></p>', f'<p id="sheet-summary" class="summary">{e(decl["summary"])}</p>')
    html = re.sub(r'(<a id="headline"[^>]*>.*?)</a>', lambda m: m.group(1) + pending_headline_size(decl["id"]) + "</a>", html, count=1, flags=re.S)
    # The benchmark reads when the form was first painted from the heading just after it: index.html
    # holds rendering until the parser reaches the results section (link rel=expect), and unlike the
    # static form's own labels the heading outlives the shell's takeover (Chromium drops the paint
    # entry of a node removed before the frame is reported).
    html = html.replace('<h2 id="results-title">', '<h2 id="results-title" elementtiming="fp-after-form">')
    html = html.replace('<form id="form" novalidate autocomplete="off"></form>',
                        f'<form id="form" novalidate autocomplete="off" data-static="{e(decl["id"])}">{form}</form>')
    return html


# ---- the build -----------------------------------------------------------------------------
def app_module(name: str):
    """A module of the app (``app.<name>``), imported from this checkout."""
    import importlib

    sys.path.insert(0, ROOT)
    try:
        return importlib.import_module(f"app.{name}")
    finally:
        sys.path.remove(ROOT)


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
        shutil.copyfile(os.path.join(pyodide_dir, f), os.path.join(tmp, "pyodide", f))
    for w in WHEELS:
        shutil.copyfile(os.path.join(wheels_dir, w), os.path.join(tmp, "wheels", w))
    app_wheel = build_app_wheel(os.path.join(tmp, "wheels"))
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
        if os.path.isfile(src) and name not in ("sw.js", "icon.svg", "index.html") and not name.startswith("."):
            shutil.copyfile(src, os.path.join(tmp, name))
    with open(os.path.join(WEB, "index.html"), encoding="utf-8") as fh:
        index = render_index(fh.read(), json.loads(catalog))
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

    # Engine facts the worker needs, with the app wheel's digest for its integrity check.
    engine = {
        "version": version,
        "pyodide": PYODIDE_VERSION,
        "wheels": sorted(WHEELS),
        "app_wheel": app_wheel,
        "app_wheel_sha256": sha256_file(os.path.join(tmp, "wheels", app_wheel)),
    }
    with open(os.path.join(tmp, "engine.json"), "w", encoding="utf-8") as fh:
        json.dump(engine, fh, indent=2, sort_keys=True)

    assets, cache_version = write_service_worker(tmp, version)
    shutil.rmtree(DIST, ignore_errors=True)
    os.rename(tmp, DIST)
    if not quiet:
        total = sum(os.path.getsize(os.path.join(DIST, a)) for a, _ in assets)
        log(f"dist/ ready: {len(assets)} files, {total / 1e6:.2f} MB precached, cache {cache_version}")
    return DIST


def write_service_worker(folder: str, version: str) -> tuple[list, str]:
    """Write ``folder``/sw.js from web/sw.js with the precache list of every other file in
    ``folder`` and its SHA-256; VERSION is the hash of that list. Returns (assets, VERSION)."""
    assets = []
    for sub, dirs, names in os.walk(folder):
        dirs.sort()
        for n in sorted(names):
            rel = os.path.relpath(os.path.join(sub, n), folder).replace(os.sep, "/")
            if rel != "sw.js":
                assets.append([rel, sha256_file(os.path.join(sub, n))])
    assets.sort()
    cache_version = hashlib.sha256(json.dumps(assets).encode()).hexdigest()[:16]
    with open(os.path.join(WEB, "sw.js"), encoding="utf-8") as fh:
        sw = fh.read()
    sw = sw.replace("/*@ASSETS@*/[]", json.dumps(assets, separators=(",", ":")))
    sw = sw.replace('"@VERSION@"', json.dumps(cache_version))
    sw = sw.replace('"@APP_VERSION@"', json.dumps(version))
    with open(os.path.join(folder, "sw.js"), "w", encoding="utf-8") as fh:
        fh.write(sw)
    return assets, cache_version


# ---- serving -------------------------------------------------------------------------------
class Handler(http.server.SimpleHTTPRequestHandler):
    extensions_map = {
        ".html": "text/html; charset=utf-8",
        ".js": "text/javascript; charset=utf-8",
        ".mjs": "text/javascript; charset=utf-8",
        ".css": "text/css; charset=utf-8",
        ".json": "application/json",
        ".webmanifest": "application/manifest+json",
        ".wasm": "application/wasm",
        ".whl": "application/zip",
        ".zip": "application/zip",
        ".png": "image/png",
        ".svg": "image/svg+xml",
        "": "application/octet-stream",
    }

    def end_headers(self):
        # Always revalidate, so a new sw.js is seen at once; the service worker does the caching.
        self.send_header("Cache-Control", "no-cache")
        self.send_header("X-Content-Type-Options", "nosniff")
        super().end_headers()

    def log_message(self, fmt, *args):  # quiet unless asked
        if os.environ.get("FIELDPHASOR_HTTP_LOG"):
            super().log_message(fmt, *args)


class Server(socketserver.ThreadingMixIn, http.server.HTTPServer):
    daemon_threads = True
    allow_reuse_address = True


def make_server(directory: str, host: str = "127.0.0.1", port: int = 0) -> Server:
    """An HTTP server for ``directory`` (port 0 = any free port); call serve_forever in a thread."""

    holder = {"dir": directory}  # tests may point a running server at another build

    def handler(*a, **kw):
        return Handler(*a, directory=holder["dir"], **kw)

    srv = Server((host, port), handler)
    srv.holder = holder
    return srv


def serve_in_thread(directory: str, host: str = "127.0.0.1", port: int = 0) -> tuple[Server, str]:
    srv = make_server(directory, host, port)
    threading.Thread(target=srv.serve_forever, daemon=True).start()
    return srv, f"http://{host}:{srv.server_address[1]}/"


def lan_addresses() -> list[str]:
    addrs = set()
    try:
        s = socket.socket(socket.AF_INET, socket.SOCK_DGRAM)
        s.connect(("192.0.2.1", 9))  # TEST-NET address: no packet is sent for UDP connect
        addrs.add(s.getsockname()[0])
        s.close()
    except OSError:
        pass
    return sorted(a for a in addrs if not a.startswith("127."))


# ---- environment set-up ----------------------------------------------------------------------
def ensure_debian(packages: list[str]) -> None:
    """Install Debian packages when missing (as root with apt-get), or say how in one line."""
    missing = [p for p in packages if not shutil.which(p) and not os.path.exists(SYSTEM_PACKAGES.get(p, "/nonexistent"))]
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
    log("creating .venv")
    if subprocess.run([sys.executable, "-m", "venv", VENV]).returncode != 0:
        shutil.rmtree(VENV, ignore_errors=True)
        if os.geteuid() == 0 and shutil.which("apt-get"):
            env = dict(os.environ, DEBIAN_FRONTEND="noninteractive")
            subprocess.run(["apt-get", "update", "-qq"], check=True, env=env)
            subprocess.run(["apt-get", "install", "-y", "-qq", "python3-venv"], check=True, env=env)
            subprocess.run([sys.executable, "-m", "venv", VENV], check=True)
        else:
            sys.exit("Python's venv module is missing: run 'sudo apt-get install -y python3-venv' and try again.")


# ---- commands --------------------------------------------------------------------------------
def cmd_build(args) -> int:
    build()
    return 0


def cmd_serve(args) -> int:
    build()
    srv = make_server(DIST, args.host, args.port)
    port = srv.server_address[1]
    print(f"\nFieldphasor is being served from dist/ — open http://localhost:{port}/")
    for a in lan_addresses():
        print(f"  from a phone on the same network: http://{a}:{port}/  (see README: offline install needs HTTPS)")
    print("Ctrl+C stops the server.", flush=True)
    try:
        srv.serve_forever()
    except KeyboardInterrupt:
        pass
    return 0


def cmd_test(args) -> int:
    ensure_debian(["chromium", "ngspice"])
    py = ensure_venv()
    build()
    env = dict(os.environ, FIELDPHASOR_DIST_BUILT="1")
    return subprocess.run([py, "-m", "pytest", *args.pytest_args], cwd=ROOT, env=env).returncode


def cmd_bench(args) -> int:
    ensure_debian(["chromium"])
    py = ensure_venv()
    build()
    cmd = [py, os.path.join(ROOT, "tests", "tools", "bench.py"), "--dist", DIST, "--runs", str(args.runs)]
    if args.out:
        cmd += ["--out", args.out]
    cmd += args.bench_args  # e.g. --edits N, --installer micropip, --no-snapshot (see tests/tools/bench.py)
    return subprocess.run(cmd, cwd=ROOT).returncode


def cmd_clean(args) -> int:
    shutil.rmtree(DIST, ignore_errors=True)
    return 0


def main(argv=None) -> int:
    ap = argparse.ArgumentParser(description=__doc__, formatter_class=argparse.RawDescriptionHelpFormatter)
    sub = ap.add_subparsers(dest="cmd", required=True)
    sub.add_parser("build").set_defaults(fn=cmd_build)
    s = sub.add_parser("serve")
    s.add_argument("--host", default="0.0.0.0")
    s.add_argument("--port", type=int, default=8000)
    s.set_defaults(fn=cmd_serve)
    t = sub.add_parser("test")
    t.add_argument("pytest_args", nargs=argparse.REMAINDER)
    t.set_defaults(fn=cmd_test)
    b = sub.add_parser("bench")
    b.add_argument("--runs", type=int, default=9)
    b.add_argument("--out", default="")
    b.set_defaults(fn=cmd_bench)
    sub.add_parser("clean").set_defaults(fn=cmd_clean)
    args, extra = ap.parse_known_args(argv)
    if extra and args.cmd not in ("test", "bench"):
        ap.error(f"unrecognized arguments: {' '.join(extra)}")
    if args.cmd == "test":
        args.pytest_args = extra + list(args.pytest_args)
    if args.cmd == "bench":
        args.bench_args = extra
    return args.fn(args)


if __name__ == "__main__":
    sys.exit(main())
