"""dist/worker.js is web/worker.js with web/worker-caches.js and Pyodide's loader written in
(buildkit/workerbundle.py): one fetch before the worker's first line, and a build that refuses
sources it cannot join instead of shipping a worker that does not start."""

from __future__ import annotations

import os
import shutil
import subprocess

import pytest

from buildkit.workerbundle import STATIC_IMPORT, bundle
from helpers import ROOT


def read(*parts: str) -> str:
    with open(os.path.join(*parts), encoding="utf-8") as fh:
        return fh.read()


def sources(dist):
    return read(ROOT, "web", "worker.js"), read(ROOT, "web", "worker-caches.js"), read(dist, "pyodide", "pyodide.mjs")


def test_built_worker_imports_nothing_and_holds_all_three(dist):
    built = read(dist, "worker.js")
    assert built == bundle(*sources(dist))
    assert not STATIC_IMPORT.search(built)  # no second fetch before the first line runs
    assert "function packSnapshot" in built and "async function bootEngine" in built
    assert "const { loadPyodide } = (() => {" in built
    # the joined file is not shipped on its own (test_build: Pyodide's loader file is kept on demand)
    assert not os.path.exists(os.path.join(dist, "worker-caches.js"))


@pytest.mark.skipif(not shutil.which("node"), reason="Node.js is not installed")
def test_built_worker_parses_as_a_module(dist, tmp_path):
    target = tmp_path / "worker.mjs"
    shutil.copyfile(os.path.join(dist, "worker.js"), target)
    res = subprocess.run(["node", "--check", str(target)], capture_output=True, text=True, timeout=60)
    assert res.returncode == 0, res.stderr


def test_static_import_pattern_tells_statements_from_calls():
    # common practice (ECMAScript modules): static import statements are fetched before the module
    # runs; import(...) calls only when reached
    assert STATIC_IMPORT.search('x();import { a } from "./a.js";')
    assert STATIC_IMPORT.search('import "./side-effect.js";')
    assert STATIC_IMPORT.search('}import*as n from"./n.mjs"')
    assert not STATIC_IMPORT.search('await import("node:fs");let y=import(e)')


def test_sources_it_cannot_join_fail_the_build(dist):
    worker, caches, loader = sources(dist)
    tail = loader.rindex("export")
    with pytest.raises(ValueError, match="export list"):
        bundle(worker, caches, loader[:tail])  # a loader that exports nothing this way
    with pytest.raises(ValueError, match="static import"):
        bundle(worker, caches, 'import{x}from"./x.mjs";' + loader)  # a loader that imports a file
    with pytest.raises(ValueError, match="worker.js: an import"):
        bundle('import { y } from "./y.js";\n' + worker, caches, loader)  # a new import in the worker
    with pytest.raises(ValueError, match="worker-caches.js"):
        bundle(worker, caches.replace('import { loadPyodide } from "./pyodide/pyodide.mjs";\n', ""), loader)
