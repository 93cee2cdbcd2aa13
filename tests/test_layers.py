"""House rules checked on the source: layers import only downward, no import cycle, no evaluation
of text, no raw HTML insertion in the shell, and no engineering arithmetic in JavaScript.

The import graph is read from the source with :mod:`ast` (every ``import`` statement, at module
level or inside a function), with relative imports resolved the way the import system does
(Python Language Reference, "The import system", §5.7 package relative imports): ``from . import x``
in ``app/report/gather.py`` names ``app.report.x`` when that is a module, else the name ``x`` of
``app.report`` itself.
"""

import ast
import os
import re

from helpers import ROOT
PACKAGES = ("app", "pycore")


def py_files(pkg):
    for folder, _, names in os.walk(os.path.join(ROOT, pkg)):
        for n in sorted(names):
            if n.endswith(".py"):
                yield os.path.join(folder, n)


def module_name(path):
    rel = os.path.relpath(path, ROOT)[: -len(".py")].split(os.sep)
    if rel[-1] == "__init__":
        rel = rel[:-1]
    return ".".join(rel)


def is_package(path):
    return os.path.basename(path) == "__init__.py"


def all_modules():
    """{module name: path} for every module of app/ and pycore/."""
    return {module_name(p): p for pkg in PACKAGES for p in py_files(pkg)}


def imports_of(path, known=None):
    """Absolute names of the modules (or of the package whose names are taken) that a file
    imports, anywhere in the file, with relative imports resolved; plus ``CALL:eval`` /
    ``CALL:exec`` for calls that evaluate text."""
    known = all_modules() if known is None else known
    name = module_name(path)
    package = name if is_package(path) else name.rpartition(".")[0]
    tree = ast.parse(open(path, encoding="utf-8").read())
    for node in ast.walk(tree):
        if isinstance(node, ast.Import):
            for a in node.names:
                yield a.name
        elif isinstance(node, ast.ImportFrom):
            if node.level:
                parts = package.split(".")
                if node.level - 1 >= len(parts):
                    raise AssertionError(f"{path}: relative import beyond the top package")
                base = ".".join(parts[: len(parts) - (node.level - 1)])
                target = f"{base}.{node.module}" if node.module else base
            else:
                target = node.module
            subs = [f"{target}.{a.name}" for a in node.names if f"{target}.{a.name}" in known]
            yield from subs
            if len(subs) < len(node.names):
                yield target  # names taken from the module (or package __init__) itself
        if isinstance(node, ast.Call) and isinstance(node.func, ast.Name) and node.func.id in ("eval", "exec"):
            yield f"CALL:{node.func.id}"


def import_graph():
    """{module: set of app/pycore modules it imports}."""
    known = all_modules()
    graph = {}
    for mod, path in known.items():
        graph[mod] = {m for m in imports_of(path, known) if m in known and m != mod}
    return graph


def find_cycles(graph):
    """The strongly connected components with more than one module (Tarjan), each as a sorted list."""
    index, low, stack, on, out = {}, {}, [], set(), []
    counter = [0]

    def visit(v):
        index[v] = low[v] = counter[0]
        counter[0] += 1
        stack.append(v)
        on.add(v)
        for w in sorted(graph.get(v, ())):
            if w not in index:
                visit(w)
                low[v] = min(low[v], low[w])
            elif w in on:
                low[v] = min(low[v], index[w])
        if low[v] == index[v]:
            comp = []
            while True:
                w = stack.pop()
                on.discard(w)
                comp.append(w)
                if w == v:
                    break
            if len(comp) > 1:
                out.append(sorted(comp))

    for v in sorted(graph):
        if v not in index:
            visit(v)
    return out


def test_relative_imports_are_resolved():
    # the resolver itself: a relative import inside a function of a sub-package module
    known = all_modules()
    assert "app.fmt" in known and "pycore.errors" in known
    graph = import_graph()
    assert "app.fmt" in graph["app.sheet"]  # from . import fmt
    assert "pycore.errors" in graph["app.sheet"]  # from pycore.errors import InputError
    assert any("app.sheet" in deps for m, deps in graph.items() if m.startswith("app.sheets."))
    # imports inside functions count: the bridge imports these only when a job or report is asked for
    assert {"app.report", "app.jobfile", "app.demo"} <= graph["app.bridge"]
    # two dots from a sub-package module: app/report/gather.py's `from .. import registry`
    assert "app.registry" in graph["app.report.gather"]


def test_find_cycles_sees_a_cycle():
    assert find_cycles({"a": {"b"}, "b": {"c"}, "c": {"a"}, "d": {"a"}}) == [["a", "b", "c"]]
    assert find_cycles({"a": {"b"}, "b": set()}) == []


def test_no_import_cycle_in_app_or_pycore():
    cycles = find_cycles(import_graph())
    assert cycles == [], f"import cycles: {cycles}"


def test_nothing_in_app_imports_the_bridge():
    """app.bridge is the JSON door for the worker, the build and outside tools; inside Python
    everything goes through app.registry."""
    for mod, deps in import_graph().items():
        if mod != "app.bridge":
            assert "app.bridge" not in deps, f"{mod} imports app.bridge"


def test_pycore_imports_only_stdlib_and_itself():
    known = all_modules()
    for path in py_files("pycore"):
        for mod in imports_of(path, known):
            top = mod.split(".")[0]
            assert top not in ("app", "js", "pyodide", "numpy", "scipy"), f"{path} imports {mod}"
            assert not mod.startswith("CALL:"), f"{path} calls {mod[5:]}"


def test_app_never_imports_the_browser():
    known = all_modules()
    for path in py_files("app"):
        for mod in imports_of(path, known):
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
    for name in sorted(n for n in os.listdir(os.path.join(ROOT, "web")) if n.endswith(".js")):
        text = open(os.path.join(ROOT, "web", name), encoding="utf-8").read()
        for sid in ids:
            assert f'"{sid}"' not in text and f"'{sid}'" not in text, f"web/{name} names worksheet {sid}"
