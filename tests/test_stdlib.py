"""The trimmed standard-library archive (buildkit/stdlib.py) holds every module the app needs.

Two checks, because CPython 3.11 here and Pyodide's Python 3.14 import different submodules
(3.11's fractions imports decimal when it loads; 3.14's only inside a function):
- in CPython: import every module of app/ and pycore/ and run every worksheet, report format, jobs
  export and the snapshot warm-up, recording each import the app's own code
  makes (any depth: a function-level import counts when it runs); every standard-library module so
  imported that is pure Python in Pyodide's library (has source in its python_stdlib.zip) must be
  in the trimmed archive. What those modules import in turn is 3.14's business, hence:
- in Pyodide itself under Node.js (tests/pyodide_node_check.mjs), the same work from the trimmed
  archive gives every worksheet's and report's output equal to CPython's, and the modules 3.14
  loads for that work when it has the whole library are all in the trimmed archive (so a module
  whose import a library catches and works around is not silently missing either).
The browser tests run from the same trimmed archive (it is dist/pyodide/python_stdlib.zip).
With Node.js at build time its modules ship as .pyc compiled by Pyodide's own Python
(buildkit/bytecode.py), with no source beside them: a .pyc Pyodide could not load (another
magic number) would make the Pyodide run fail, and the archive's .pyc headers are checked
against the magic number that run reports.
"""

import json
import os
import shutil
import subprocess
import sys
import zipfile

import pytest

import build
from helpers import same_csv_cells
from buildkit.assemble import FULL_STDLIB

NODE = shutil.which("node")


def archive_modules(path):
    """The modules in a standard-library zip, as source (.py) or compiled (.pyc)."""
    out = set()
    with zipfile.ZipFile(path) as zf:
        for n in zf.namelist():
            if n.endswith((".py", ".pyc")):
                out.add(n.removesuffix("c")[:-3].replace("/", ".").removesuffix(".__init__"))
    return out


def as_source(name: str) -> str:
    """An archive file's name with a .pyc named as its source (.py)."""
    return name.removesuffix("c") if name.endswith(".pyc") else name


CPYTHON_RUN = r"""
import builtins, json, os, pkgutil, importlib, sys
before = set(sys.modules)
wanted = set()  # modules the app's own code imports (not what the standard library imports)
plain_import = builtins.__import__
def recording_import(name, globals=None, locals=None, fromlist=(), level=0):
    mod = plain_import(name, globals, locals, fromlist, level)
    importer = (globals or {}).get("__name__", "")
    if level == 0 and importer.split(".")[0] in ("app", "pycore"):
        wanted.add(name)
        for sub in fromlist or ():
            if f"{name}.{sub}" in sys.modules:
                wanted.add(f"{name}.{sub}")
    return mod
builtins.__import__ = recording_import
for pkg in ("pycore", "app"):
    mod = importlib.import_module(pkg)
    for info in pkgutil.walk_packages(mod.__path__, pkg + "."):
        importlib.import_module(info.name)
from app import bridge, snapshot
snapshot.prepare()
demo = bridge.demo_job()
for f in ("html", "text", "csv"):
    bridge.report(demo, f, '{"date": "2000-01-01"}')
print(json.dumps(sorted(wanted)))
"""


def test_every_stdlib_module_the_app_imports_is_in_the_archive(dist):
    out = subprocess.run([sys.executable, "-c", CPYTHON_RUN], cwd=build.ROOT, capture_output=True, text=True, check=True)
    loaded = json.loads(out.stdout.strip().splitlines()[-1])
    full = archive_modules(os.path.join(dist, FULL_STDLIB))
    trimmed = archive_modules(os.path.join(dist, "pyodide", "python_stdlib.zip"))
    assert trimmed < full
    assert {"json", "dataclasses", "fractions"} <= trimmed  # what the app plainly imports
    needed = {m for m in loaded if m.split(".")[0] not in ("app", "pycore") and m in full}
    assert {"json", "dataclasses", "fractions"} <= needed, "the recording saw too little"
    assert sorted(needed - trimmed) == []


@pytest.mark.skipif(not NODE, reason="Node.js is not installed (npm brings it; the build needs it)")
def test_pyodide_runs_every_worksheet_and_report_from_the_trimmed_archive(dist, tmp_path):
    from app import bridge

    demo = bridge.demo_job()  # one job for both runtimes (it carries fresh ids)
    job_file = tmp_path / "job.json"
    job_file.write_text(demo, encoding="utf-8")

    def run(stdlib):
        out = subprocess.run([NODE, os.path.join(build.ROOT, "tests", "pyodide_node_check.mjs"), dist, stdlib, str(job_file)],
                             capture_output=True, text=True, timeout=600)
        assert out.returncode == 0, "\n".join(x for x in out.stderr.splitlines() if len(x) < 400)[-3000:]
        return json.loads(out.stdout.strip().splitlines()[-1])

    trimmed_zip = os.path.join(dist, "pyodide", "python_stdlib.zip")
    trimmed = run(trimmed_zip)
    whole = run(os.path.join(dist, FULL_STDLIB))

    # the same answers as CPython (the reference) for every worksheet and report format
    assert sorted(trimmed["results"]) == sorted(bridge.sheets())
    for sheet_id, text in trimmed["results"].items():
        got, ref = json.loads(text), json.loads(bridge.compute(sheet_id, "{}"))
        assert got["ok"], (sheet_id, got)
        assert [(r["name"], r["display"]) for r in got["results"]] == [(r["name"], r["display"]) for r in ref["results"]]
    for fmt, text in trimmed["reports"].items():
        got, ref = json.loads(text), json.loads(bridge.report(demo, fmt, '{"date": "2000-01-01"}'))
        assert got["ok"] and got.keys() == ref.keys(), fmt
        if fmt == "csv":  # raw values may differ in the last bit (another libm): compare as numbers
            assert same_csv_cells(got["text"], ref["text"])
        else:
            assert got == ref, fmt
    # what 3.14 loads for that work with the whole library at hand is all in the trimmed one
    with zipfile.ZipFile(trimmed_zip) as zf:
        names = zf.namelist()
        assert sorted(set(whole["files"]) - {as_source(n) for n in names}) == []
        compiled = {n: zf.read(n)[:8] for n in names if n.endswith(".pyc")}
    assert {as_source(f) for f in trimmed["files"]} == set(whole["files"]) and len(whole["files"]) > 50
    if compiled:  # built with Node.js: bytecode for Pyodide's interpreter, and it is what was loaded
        assert {n for n in names if n.endswith(".py")} == set(), "source shipped beside bytecode"
        magic = bytes.fromhex(trimmed["magic"])
        assert sorted(n for n, head in compiled.items() if head[:4] != magic) == []
        assert sorted(n for n, head in compiled.items() if head[4:8] != (1).to_bytes(4, "little")) == []  # unchecked hash
        # compiled without column ranges (a quarter of the archive), line numbers kept
        assert trimmed["columns"] == 0 and whole["columns"] > 0
        # the app wheel carries its modules' bytecode too, each beside its source, for this
        # interpreter; the app was imported from the wheel file and none of it compiled from source
        engine = json.load(open(os.path.join(dist, "engine.json")))
        with zipfile.ZipFile(os.path.join(dist, "wheels", engine["app_wheel"])) as whl:
            heads = {n: whl.read(n)[:8] for n in whl.namelist() if n.endswith(".pyc")}
            sources = [n for n in whl.namelist() if n.endswith(".py")]
        assert sorted(n + "c" for n in sources) == sorted(heads)
        assert {h for h in heads.values()} == {magic + (1).to_bytes(4, "little")}
        assert trimmed["app_loaded_from"] == [engine["app_path"]]
        assert trimmed["app_from_source"] == [] and whole["app_from_source"] == []
        # loaded from bytecode (the .py names left are frozen modules, which name their source)
        assert len([f for f in trimmed["files"] if f.endswith(".pyc")]) > 50


@pytest.mark.skipif(not NODE, reason="Node.js is not installed")
def test_build_ships_the_standard_library_compiled_when_node_is_there(dist):
    with zipfile.ZipFile(os.path.join(dist, "pyodide", "python_stdlib.zip")) as zf:
        names = zf.namelist()
    assert names and all(n.endswith(".pyc") for n in names)


def test_without_node_the_archive_ships_source(tmp_path, monkeypatch):
    from buildkit import bytecode
    from buildkit.fetch import fetch_pyodide
    from buildkit.stdlib import write_trimmed

    monkeypatch.setattr(bytecode, "CACHE", str(tmp_path / "cache"))  # nothing compiled yet
    monkeypatch.setattr(bytecode.shutil, "which", lambda name: None)
    pyodide_dir = fetch_pyodide()
    dest = str(tmp_path / "stdlib.zip")
    summary = write_trimmed(os.path.join(pyodide_dir, "python_stdlib.zip"), dest, roots={"json"}, pyodide_dir=pyodide_dir)
    with zipfile.ZipFile(dest) as zf:
        names = zf.namelist()
    assert not summary["compiled"] and "json/__init__.py" in names and not [n for n in names if n.endswith(".pyc")]


def test_stripped_source_keeps_code_strings_and_line_numbers():
    from buildkit.stdlib import strip_source

    src = ('"""Module doc."""\n'
           "import os  # why\n"
           "# a whole comment line\n"
           "def f(x):\n"
           "    '''Doc\n"
           "    over lines.'''\n"
           "    s = '# not a comment'  \n"
           "    t = '''kept  \n"
           "text'''\n"
           "    return x, s, t\n"
           "class C:\n"
           "    \"\"\"Only a doc.\"\"\"\n")
    out = strip_source(src)
    assert len(out.splitlines()) == len(src.splitlines())
    assert "why" not in out and "whole comment" not in out and "Doc" not in out and "Module doc" not in out
    assert "'# not a comment'" in out and "'''kept  \ntext'''" in out
    assert out.splitlines()[9] == "    return x, s, t"  # the same line as before
    ns = {}
    exec(compile(out, "m.py", "exec"), ns)
    assert ns["f"](1) == (1, "# not a comment", "kept  \ntext") and ns["f"].__doc__ == "" and ns["C"].__doc__ == ""
    assert strip_source("def f[T](x): return x  # newer syntax\n") in ("def f[T](x): return x  # newer syntax\n", "def f[T](x): return x\n")
    assert strip_source("x = (  # unclosed\n") == "x = (  # unclosed\n"  # not parsable: unchanged
