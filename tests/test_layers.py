"""House rules checked on the source: layers import only downward, no evaluation of text,
no raw HTML insertion in the shell, and no engineering arithmetic in JavaScript."""

import ast
import os
import re

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))


def py_files(pkg):
    for folder, _, names in os.walk(os.path.join(ROOT, pkg)):
        for n in names:
            if n.endswith(".py"):
                yield os.path.join(folder, n)


def imports_of(path):
    tree = ast.parse(open(path, encoding="utf-8").read())
    for node in ast.walk(tree):
        if isinstance(node, ast.Import):
            for a in node.names:
                yield a.name
        elif isinstance(node, ast.ImportFrom) and node.module and node.level == 0:
            yield node.module
        if isinstance(node, ast.Call) and isinstance(node.func, ast.Name) and node.func.id in ("eval", "exec"):
            yield f"CALL:{node.func.id}"


def test_pycore_imports_only_stdlib_and_itself():
    for path in py_files("pycore"):
        for mod in imports_of(path):
            top = mod.split(".")[0]
            assert top not in ("app", "js", "pyodide", "numpy", "scipy"), f"{path} imports {mod}"
            assert not mod.startswith("CALL:"), f"{path} calls {mod[5:]}"


def test_app_never_imports_the_browser():
    for path in py_files("app"):
        for mod in imports_of(path):
            assert mod.split(".")[0] not in ("js", "pyodide", "numpy", "scipy"), f"{path} imports {mod}"
            assert not mod.startswith("CALL:"), f"{path} calls {mod[5:]}"


def test_shell_inserts_no_raw_html_and_evaluates_nothing():
    bad = re.compile(r"innerHTML|outerHTML|insertAdjacentHTML|document\.write|\beval\(|new Function\(")
    for name in os.listdir(os.path.join(ROOT, "web")):
        if name.endswith(".js"):
            text = open(os.path.join(ROOT, "web", name), encoding="utf-8").read()
            assert not bad.search(text), f"web/{name}: {bad.search(text).group(0)}"


def test_no_engineering_arithmetic_in_javascript():
    # Trigonometry, roots and π belong in pycore; the shell only renders.
    bad = re.compile(r"Math\.(sin|cos|tan|asin|acos|atan|atan2|sqrt|hypot|PI|log10|exp)\b")
    for name in os.listdir(os.path.join(ROOT, "web")):
        if name.endswith(".js"):
            text = open(os.path.join(ROOT, "web", name), encoding="utf-8").read()
            assert not bad.search(text), f"web/{name} computes: {bad.search(text).group(0)}"


def test_shell_has_no_worksheet_specific_code():
    ids = [os.path.splitext(n)[0] for n in os.listdir(os.path.join(ROOT, "app", "sheets")) if not n.startswith("_")]
    for name in ("app.js", "render.js", "engine.js", "worker.js", "dom.js", "store.js"):
        text = open(os.path.join(ROOT, "web", name), encoding="utf-8").read()
        for sid in ids:
            assert f'"{sid}"' not in text and f"'{sid}'" not in text, f"web/{name} names worksheet {sid}"
