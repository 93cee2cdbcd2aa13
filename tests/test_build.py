"""The build: reproducible output, a precache list that matches every file, a valid manifest."""

import hashlib
import json
import os
import re
import shutil
import zipfile

import pytest

import build
from app import OPENING_SHEET


def tree_digest(root):
    out = {}
    for folder, dirs, names in os.walk(root):
        for n in names:
            p = os.path.join(folder, n)
            with open(p, "rb") as fh:
                out[os.path.relpath(p, root)] = hashlib.sha256(fh.read()).hexdigest()
    return out


def test_building_twice_gives_identical_output(dist):
    first = tree_digest(dist)
    build.build(quiet=True)
    assert tree_digest(build.DIST) == first


def test_precache_lists_every_file_with_its_hash(dist):
    """Every file is precached or kept on demand, with its digest; the gzip
    and Brotli copies are never asked for by name (a server sends them in place of the file)."""
    sw = open(os.path.join(dist, "sw.js"), encoding="utf-8").read()
    assets = json.loads(re.search(r"const ASSETS = (\[.*?\]);", sw, re.S).group(1))
    lazy = json.loads(re.search(r"const ON_DEMAND = (\[.*?\]);", sw, re.S).group(1))
    listed = {p: h for p, h in assets + lazy}
    on_disk = {k.replace(os.sep, "/"): v for k, v in tree_digest(dist).items() if k != "sw.js" and not k.endswith((".gz", ".br"))}
    assert listed == on_disk and len(listed) == len(assets) + len(lazy)
    engine = json.load(open(os.path.join(dist, "engine.json")))
    # on demand: the micropip path's files, and Pyodide's loader file (the worker has it written in)
    assert {p for p, _ in lazy} == ({"pyodide/pyodide-lock.json", "pyodide/pyodide.mjs", engine["full_stdlib"]}
                                    | {f"wheels/{w}" for w in engine["wheels"]})
    precached = {p for p, _ in assets}
    assert {"pyodide/pyodide.asm.wasm", "pyodide/python_stdlib.zip", f"wheels/{engine['app_wheel']}"} <= precached
    version = re.search(r'const VERSION = "([0-9a-f]+)"', sw).group(1)
    assert version == hashlib.sha256(json.dumps(sorted(assets + lazy)).encode()).hexdigest()[:16]


def test_gzip_copies_hold_exactly_their_files(dist):
    import gzip

    copies = [k for k in tree_digest(dist) if k.endswith(".gz")]
    assert "pyodide/pyodide.asm.wasm.gz" in [c.replace(os.sep, "/") for c in copies] and "index.html.gz" in copies
    for c in copies:
        packed = open(os.path.join(dist, c), "rb").read()
        plain = open(os.path.join(dist, c[:-3]), "rb").read()
        assert gzip.decompress(packed) == plain, c
        assert len(packed) <= 0.9 * len(plain)
    assert not os.path.exists(os.path.join(dist, "pyodide", "python_stdlib.zip.gz"))  # deflated already


def test_server_sends_gzip_when_accepted_with_the_files_own_type(dist):
    """The dev server negotiates: gzip body with Content-Encoding when accepted, the plain file
    otherwise; .wasm is application/wasm either way; a matching ETag gets 304; bytes are counted."""
    import gzip
    import http.client

    srv, url = build.serve_in_thread(dist)
    try:
        port = srv.server_address[1]
        wasm = open(os.path.join(dist, "pyodide", "pyodide.asm.wasm"), "rb").read()

        def get(path, headers):
            c = http.client.HTTPConnection("127.0.0.1", port)
            c.request("GET", path, headers=headers)
            r = c.getresponse()
            body = r.read()
            c.close()
            return r, body

        srv.bytes_sent = 0
        r, body = get("/pyodide/pyodide.asm.wasm", {"Accept-Encoding": "gzip, deflate"})
        assert r.status == 200 and r.getheader("Content-Encoding") == "gzip"
        assert r.getheader("Content-Type") == "application/wasm" and "Accept-Encoding" in r.getheader("Vary")
        assert gzip.decompress(body) == wasm and len(body) < 0.5 * len(wasm)
        assert len(body) < srv.bytes_sent < len(body) + 1000
        r2, _ = get("/pyodide/pyodide.asm.wasm", {"Accept-Encoding": "gzip", "If-None-Match": r.getheader("ETag")})
        assert r2.status == 304
        r3, body3 = get("/pyodide/pyodide.asm.wasm", {})
        assert r3.status == 200 and r3.getheader("Content-Encoding") is None and body3 == wasm
        assert r3.getheader("Content-Type") == "application/wasm"
        r4, body4 = get("/", {"Accept-Encoding": "gzip"})
        assert r4.getheader("Content-Encoding") == "gzip" and r4.getheader("Content-Type").startswith("text/html")
        assert gzip.decompress(body4) == open(os.path.join(dist, "index.html"), "rb").read()
        r5, body5 = get("/pyodide/python_stdlib.zip", {"Accept-Encoding": "gzip"})
        assert r5.getheader("Content-Encoding") is None and body5[:2] == b"PK"
        if os.path.exists(os.path.join(dist, "pyodide", "pyodide.asm.wasm.br")):  # built with Node
            r6, body6 = get("/pyodide/pyodide.asm.wasm", {"Accept-Encoding": "gzip, deflate, br, zstd"})
            assert r6.getheader("Content-Encoding") == "br" and r6.getheader("Content-Type") == "application/wasm"
            assert body6 == open(os.path.join(dist, "pyodide", "pyodide.asm.wasm.br"), "rb").read() and len(body6) < 0.85 * len(body)
            assert r6.getheader("ETag") != r.getheader("ETag")  # one validator per coding
            r7, _ = get("/pyodide/pyodide.asm.wasm", {"Accept-Encoding": "br;q=0, gzip"})
            assert r7.getheader("Content-Encoding") == "gzip"
    finally:
        srv.shutdown()


@pytest.mark.skipif(not shutil.which("node"), reason="Brotli copies are made with Node.js (npm brings it)")
def test_brotli_copies_hold_exactly_their_files_and_beat_gzip(dist):
    import subprocess

    copies = sorted(k.replace(os.sep, "/") for k in tree_digest(dist) if k.endswith(".br"))
    assert "pyodide/pyodide.asm.wasm.br" in copies and "pyodide/pyodide.asm.mjs.br" in copies
    for c in copies:
        packed = os.path.join(dist, c)
        plain = open(os.path.join(dist, c[:-3]), "rb").read()
        out = subprocess.run(["node", "-e", "process.stdout.write(require('zlib').brotliDecompressSync(require('fs').readFileSync(process.argv[1])))", packed],
                             capture_output=True, check=True)
        assert out.stdout == plain, c
        assert os.path.getsize(packed) <= 0.97 * os.path.getsize(os.path.join(dist, c[:-3] + ".gz")), c


def test_server_never_sends_a_gzip_copy_older_than_its_file(dist, tmp_path):
    import http.client
    import shutil

    copy = str(tmp_path / "d")
    shutil.copytree(dist, copy)
    with open(os.path.join(copy, "app.css"), "a") as fh:  # edited after the build, as an update test does
        fh.write("\n/* edited */\n")
    srv, url = build.serve_in_thread(copy)
    try:
        c = http.client.HTTPConnection("127.0.0.1", srv.server_address[1])
        c.request("GET", "/app.css", headers={"Accept-Encoding": "gzip, br"})
        r = c.getresponse()
        assert r.getheader("Content-Encoding") is None and r.read().endswith(b"/* edited */\n")
    finally:
        srv.shutdown()


def test_app_wheel_is_pure_python_and_complete(dist):
    engine = json.load(open(os.path.join(dist, "engine.json")))
    path = os.path.join(dist, "wheels", engine["app_wheel"])
    assert engine["app_wheel"].endswith("-py3-none-any.whl")
    with zipfile.ZipFile(path) as zf:
        names = set(zf.namelist())
        assert "pycore/phasor.py" in names and "app/bridge.py" in names
        assert not any(n.endswith(".so") for n in names)
        # bytecode only beside its source (tests/test_stdlib.py checks it is what loads)
        assert all(n[:-1] in names for n in names if n.endswith(".pyc"))
        record = zf.read(next(n for n in names if n.endswith("RECORD"))).decode()
        assert "app/bridge.py,sha256=" in record
        assert all(f"{n},sha256=" in record for n in names if not n.endswith("RECORD"))
        # stored, so the copies a server sends compress across files
        assert {i.compress_type for i in zf.infolist()} == {zipfile.ZIP_STORED}
    assert os.path.getsize(path + ".gz") < 0.9 * os.path.getsize(path)
    with open(path, "rb") as fh:
        assert hashlib.sha256(fh.read()).hexdigest() == engine["app_wheel_sha256"]


def test_manifest_and_icons(dist):
    m = json.load(open(os.path.join(dist, "manifest.webmanifest"), encoding="utf-8"))
    for key in ("name", "short_name", "start_url", "scope", "display", "theme_color", "background_color", "icons"):
        assert m[key]
    assert m["display"] == "standalone"
    for icon in m["icons"]:
        data = open(os.path.join(dist, icon["src"]), "rb").read()
        assert data[:8] == b"\x89PNG\r\n\x1a\n"
        w, h = int.from_bytes(data[16:20], "big"), int.from_bytes(data[20:24], "big")
        assert f"{w}x{h}" == icon["sizes"]
    assert any(i["purpose"] == "maskable" for i in m["icons"])


def test_pyodide_pinned_and_wasm_served_with_right_type(dist):
    assert os.path.exists(os.path.join(dist, "pyodide", "pyodide.asm.wasm"))
    lock = json.load(open(os.path.join(dist, "pyodide", "pyodide-lock.json")))
    assert lock["info"]["python"].startswith("3.14")
    # the default start's package list: Pyodide's own info (its ABI is checked), no packages
    engine = json.load(open(os.path.join(dist, "engine.json")))
    assert engine["pyodide_lock"] == {"info": lock["info"], "packages": {}}
    assert build.Handler.extensions_map[".wasm"] == "application/wasm"


def test_csp_forbids_inline_and_eval_but_early_js_by_its_hash(dist):
    """The one inline script is web/early.js as it is in the source, allowed by its SHA-256 (CSP Level 3
    hash-source); nothing else inline, no eval."""
    import base64
    import hashlib

    html = open(os.path.join(dist, "index.html"), encoding="utf-8").read()
    csp = re.search(r'http-equiv="Content-Security-Policy" content="([^"]+)"', html).group(1)
    assert "'unsafe-inline'" not in csp and "'unsafe-eval'" not in csp
    inline = re.findall(r"<script>(.*?)</script>", html, flags=re.S)
    assert len(inline) == 1 and "<script " not in html.replace('<script src=', '').replace('<script type="module" src=', '')
    assert inline[0].strip() == open(os.path.join(build.ROOT, "web", "early.js"), encoding="utf-8").read().strip()
    digest = base64.b64encode(hashlib.sha256(inline[0].encode("utf-8")).digest()).decode("ascii")
    scripts = re.search(r"script-src ([^;]+)", csp).group(1).split()
    assert scripts == ["'self'", "'wasm-unsafe-eval'", f"'sha256-{digest}'"], scripts


def test_snapshot_prepare_runs_every_worksheet_and_returns_the_probe():
    """app.snapshot.prepare() (run before a memory snapshot is taken) loads every worksheet in a
    fresh interpreter and labels the snapshot with the probe digest a restored one must reproduce."""
    import subprocess
    import sys

    code = (
        "import json, sys\n"
        "from app import snapshot\n"
        "before = set(sys.modules)\n"
        "label = snapshot.prepare()\n"
        "print(json.dumps([label, sorted(set(sys.modules) - before)]))\n"
    )
    out = subprocess.run([sys.executable, "-c", code], cwd=build.ROOT, capture_output=True, text=True, check=True)
    label, loaded = json.loads(out.stdout.strip().splitlines()[-1])
    from app import bridge, snapshot

    for sheet_id in bridge.sheets():
        assert f"app.sheets.{sheet_id}" in loaded, sheet_id
    for mod in ("app.report", "app.report.html_out", "app.report.text_out", "app.report.csv_out", "app.jobfile", "app.demo"):
        assert mod in loaded, mod
    # the label is SHA-256 of the probe worksheet's default result (hashlib as the reference)
    expected = hashlib.sha256(bridge.compute(snapshot.PROBE_SHEET, "{}").encode("utf-8")).hexdigest()
    assert label == expected
    assert json.loads(bridge.compute(snapshot.PROBE_SHEET, "{}"))["ok"] is True


def test_static_form_sections_are_the_full_forms_first_sections():
    """index.html carries the opening sheet's first build.STATIC_SECTIONS form sections, drawn
    exactly as in the full static form (the shell adds the rest)."""
    from app import bridge

    decl = next(d for d in json.loads(bridge.catalog()) if d["id"] == OPENING_SHEET)
    full = build.static_form(decl)
    part = build.static_form(decl, build.STATIC_SECTIONS)
    groups = [f["group"] for f in decl["fields"] if f.get("group")]
    assert len(groups) > build.STATIC_SECTIONS
    assert re.findall(r'<fieldset class="group"[^>]*><legend>([^<]*)</legend>', part) == groups[: build.STATIC_SECTIONS]
    assert full.startswith(part[: -len("</fieldset>")]) and part.endswith("</fieldset>")
    index = build.render_index(open(os.path.join(build.WEB, "index.html"), encoding="utf-8").read(), json.loads(bridge.catalog()))
    assert part in index
    # first paint waits until the parser has passed the whole static form (see test_first_paint.py),
    # and the benchmark's paint marker sits after the form too
    form_end = index.index("</form>")
    hold = re.search(r'<link rel="expect" href="#([\w-]+)" blocking="render">', index)
    assert hold and hold.start() < index.index("</head>")
    held_until = index.index(f'id="{hold.group(1)}"')
    assert held_until > form_end
    mark = index.index("elementtiming=")
    assert index.count("elementtiming=") == 1 and form_end < mark < held_until
    # the picker starts with the opening worksheet alone (the shell lists them all)
    picker = re.search(r'<select id="sheet-pick">(.*?)</select>', index).group(1)
    assert re.findall(r'<option value="([^"]+)"', picker) == [OPENING_SHEET]


@pytest.mark.skipif(not shutil.which("node"), reason="Node.js is not installed")
def test_standard_library_bytecode_is_the_same_when_compiled_afresh(tmp_path, monkeypatch):
    """The rebuild above reuses .cache/pyc; compiling under Node.js twice with no cache gives the
    same bytes too (no timestamps, a fixed hash seed for set constants)."""
    from buildkit import bytecode
    from buildkit.fetch import fetch_pyodide
    from buildkit.stdlib import write_trimmed

    pyodide_dir = fetch_pyodide()
    src = str(tmp_path / "src.zip")
    write_trimmed(os.path.join(pyodide_dir, "python_stdlib.zip"), src, roots={"json", "fractions", "dataclasses"})
    runs = []
    for i in range(2):
        monkeypatch.setattr(bytecode, "CACHE", str(tmp_path / f"cache{i}"))
        runs.append(bytecode.compile_archive(src, pyodide_dir))
    assert runs[0] and "json/__init__.pyc" in runs[0] and "fractions.pyc" in runs[0]
    assert runs[0] == runs[1]
