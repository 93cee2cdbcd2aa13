"""The memory snapshot is stored without its zero pages (web/worker-caches.js packSnapshot /
unpackSnapshot), run under Node.js on the built file: unpacking gives back every byte, the stored
body holds exactly the non-zero 4 KiB pages (counted here in Python, independently), and a layout
that does not fit the body is refused rather than restored."""

from __future__ import annotations

import json
import os
import random
import shutil
import subprocess

import pytest

from helpers import ROOT

pytestmark = pytest.mark.skipif(not shutil.which("node"), reason="Node.js is not installed")

PAGE = 4096

# Reads each case as raw bytes from a file, packs and unpacks it, and prints what the test checks.
RUNNER = r"""
import { readFileSync } from "node:fs";
import { pathToFileURL } from "node:url";
const [modPath, ...files] = process.argv.slice(2);
const { packSnapshot, unpackSnapshot } = await import(pathToFileURL(modPath).href);
const out = [];
for (const f of files) {
  const raw = new Uint8Array(readFileSync(f));
  // an unaligned view as well as an aligned one (the packer must not assume either)
  const shifted = new Uint8Array(raw.length + 1);
  shifted.set(raw, 1);
  const views = [raw, shifted.subarray(1)];
  const r = {};
  for (const [i, v] of views.entries()) {
    const { body, layout } = packSnapshot(v);
    const back = unpackSnapshot(body, layout);
    r["same" + i] = back.length === raw.length && Buffer.compare(Buffer.from(back), Buffer.from(raw)) === 0;
    r["body" + i] = body.length;
    r.layout = layout;
  }
  const { body, layout } = packSnapshot(raw);
  const refused = [];
  for (const bad of [layout.replace(/:(\d+)$/, (m, n) => ":" + (Number(n) + 1)), layout.replace(/^\d+/, "16")]) {
    try { unpackSnapshot(body, bad); refused.push(false); } catch { refused.push(true); }
  }
  const longer = new Uint8Array(body.length + 1);
  longer.set(body);
  for (const b of [body.subarray(1), longer]) {
    try { unpackSnapshot(b, layout); refused.push(false); } catch { refused.push(true); }
  }
  r.refused = refused;
  out.push(r);
}
console.log(JSON.stringify(out));
"""


def nonzero_pages(data: bytes) -> int:
    return sum(1 for i in range(0, len(data), PAGE) if any(data[i:i + PAGE]))


def cases() -> dict[str, bytes]:
    rng = random.Random(20261202)
    heap = bytearray(64 * PAGE)
    for _ in range(40):  # scattered used pages, some single bytes at a page's last position
        p = rng.randrange(64)
        at = p * PAGE + rng.choice([0, PAGE - 1, rng.randrange(PAGE)])
        heap[at] = rng.randrange(1, 256)
    dense = bytes(rng.randrange(256) | 1 for _ in range(3 * PAGE))
    tail = bytearray(5 * PAGE + 3)  # not a whole number of pages or words; only the last byte set
    tail[-1] = 7
    return {"heap": bytes(heap), "dense": dense, "tail": bytes(tail), "first": b"\x01" + bytes(2 * PAGE - 1)}


def test_pack_keeps_every_byte_and_stores_only_nonzero_pages(dist, tmp_path):
    files = []
    data = cases()
    for name, blob in data.items():
        f = tmp_path / f"{name}.bin"
        f.write_bytes(blob)
        files.append(str(f))
    runner = tmp_path / "run.mjs"
    runner.write_text(RUNNER)
    # web/worker-caches.js as a module beside the loader it imports (dist has it joined into worker.js)
    (tmp_path / "pyodide").mkdir()
    shutil.copyfile(os.path.join(dist, "pyodide", "pyodide.mjs"), tmp_path / "pyodide" / "pyodide.mjs")
    shutil.copyfile(os.path.join(ROOT, "web", "worker-caches.js"), tmp_path / "worker-caches.js")
    res = subprocess.run(["node", str(runner), str(tmp_path / "worker-caches.js"), *files],
                         capture_output=True, text=True, timeout=120)
    assert res.returncode == 0, res.stderr
    got = dict(zip(data, json.loads(res.stdout)))
    for name, blob in data.items():
        r = got[name]
        assert r["same0"] and r["same1"], name
        # the body is the non-zero pages, cut at the end of the data (Python's own count)
        last = len(blob) % PAGE
        want = nonzero_pages(blob) * PAGE
        if last and any(blob[-last:]):
            want -= PAGE - last
        assert r["body0"] == r["body1"] == want, (name, r["body0"], want)
        assert r["layout"].startswith(f"{len(blob)};"), name
        assert r["refused"] == [True, True, True, True], name
    # the realistic case is about half zero, as a Pyodide heap is: the saving is real
    assert got["heap"]["body0"] < len(data["heap"]) / 2
