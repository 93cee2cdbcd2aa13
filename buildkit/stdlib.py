"""A standard-library archive holding only what the app needs, cut from Pyodide's pinned
python_stdlib.zip at build time.

Pyodide's python_stdlib.zip holds the whole standard library as source (9.6 MB, 2.5 MB as
shipped). The app imports a few dozen modules. :func:`needed_modules` walks the imports: it
starts from every module the app's own code names (``app/`` and ``pycore/``, read with ``ast``,
any import anywhere in a file) and from :data:`ALWAYS` (what the interpreter and Pyodide load
without a visible import statement), then follows the imports each standard-library module makes
when it is imported (module level, including ``try``/``if`` blocks and class bodies; not function
bodies, which run only when called: the browser tests run every worksheet and report from this
archive, and tests/test_stdlib.py runs them in Pyodide under Node.js, to catch any such
import actually used). Parsed with this Python's ``ast``; the few 3.14 files it cannot parse are
read line by line. :func:`write_trimmed` writes the chosen files, byte for byte and in the
original order, into a new zip with fixed timestamps (reproducible), each file's comments and
docstrings blanked (:func:`strip_source`: 0.92 → 0.57 MB deflated; the code is unchanged). With
Node.js the build then ships each module as the ``.pyc`` Pyodide's own Python compiles from that
(buildkit/bytecode.py; 1.14 MB deflated, column ranges left out), so a first visit's boot compiles nothing.
"""

from __future__ import annotations

import ast
import io
import os
import re
import tokenize
import zipfile

from .common import ROOT

#: Loaded with no import statement to follow, or needed by the worker's own paths; each with why.
ALWAYS = {
    # The interpreter's start-up imports these by name (site handling, the codec registry).
    "site": "imported by the interpreter at start-up",
    "_sitebuiltins": "imported by site",
    "encodings": "the codec registry, imported by the interpreter at start-up",
    "encodings.aliases": "codec names, read by the codec registry",
    "encodings.utf_8": "the file-system and source encoding",
    "encodings.utf_8_sig": "source files with a byte-order mark",
    "encodings.ascii": "codecs.lookup('ascii'), e.g. str.encode with an error handler",
    "encodings.latin_1": "codecs.lookup('latin-1')",
    "encodings.cp437": "zipfile decodes member names without the UTF-8 flag with it",
    # Pyodide's own Python side. Its JavaScript imports these by name (pyodide.asm.mjs:
    # import_module("pyodide"), ("pyodide.code"), ("pyodide.ffi"), ("pyodide._package_loader"),
    # ("_pyodide._base")); the rest of _pyodide is loaded by its C start-up.
    "_pyodide": "Pyodide's start-up (the whole package, see WHOLE_PACKAGES)",
    "pyodide": "imported by loadPyodide",
    "pyodide.code": "runPython",
    "pyodide.ffi": "the JS/Python proxies",
    "pyodide._package_loader": "imported by Pyodide at start-up (unpackArchive, loadPackage)",
    "pyodide._state": "makeMemorySnapshot and restoring a snapshot",
    "pyodide.webloop": "the event loop Pyodide installs at start-up (micropip.install awaits on it)",
}
#: packages taken whole (every module in them), not only the modules imports reach: Pyodide's
#: internal start-up package, whose modules its C code imports by name
WHOLE_PACKAGES = ("_pyodide",)

_IMPORT_LINE = re.compile(r"^(\s*)(?:from\s+(\.*[\w.]*)\s+import\s+\(?([\w, ]+)|import\s+([\w., ]+))", re.M)


def app_imports(root: str = ROOT, packages=("app", "pycore")) -> set[str]:
    """Every module name an import statement in the app's own code names (absolute imports only;
    ``from X import Y`` counts as X and X.Y, as Y may be a submodule)."""
    out: set[str] = set()
    for pkg in packages:
        for folder, dirs, names in os.walk(os.path.join(root, pkg)):
            dirs[:] = sorted(d for d in dirs if d != "__pycache__")
            for n in sorted(names):
                if n.endswith(".py"):
                    with open(os.path.join(folder, n), encoding="utf-8") as fh:
                        tree = ast.parse(fh.read())
                    for node in ast.walk(tree):
                        if isinstance(node, ast.Import):
                            out |= {a.name for a in node.names}
                        elif isinstance(node, ast.ImportFrom) and not node.level and node.module:
                            out.add(node.module)
                            out |= {f"{node.module}.{a.name}" for a in node.names}
    return out


def _resolve(base: str, level: int, package: str) -> str:
    if not level:
        return base
    parts = package.split(".")
    if level > 1:
        parts = parts[: -(level - 1)]
    return ".".join(parts + ([base] if base else []))


def _module_level_imports(text: str, module: str, is_pkg: bool) -> set[str]:
    """Modules imported when ``module`` is imported: module-level statements, including those in
    try/if/with blocks and class bodies, not those in function bodies or under
    ``if __name__ == "__main__":``."""
    package = module if is_pkg else module.rpartition(".")[0]
    out: set[str] = set()
    try:
        tree = ast.parse(text)
    except SyntaxError:  # newer syntax than this Python reads: scan the lines instead
        return _scan_lines(text, package)

    def visit(nodes):
        for node in nodes:
            if isinstance(node, (ast.FunctionDef, ast.AsyncFunctionDef, ast.Lambda)):
                continue
            if isinstance(node, ast.If) and _is_main_guard(node.test):  # runs only as a script
                visit(node.orelse)
                continue
            if isinstance(node, ast.Import):
                out.update(a.name for a in node.names)
            elif isinstance(node, ast.ImportFrom):
                base = _resolve(node.module or "", node.level, package)
                out.add(base)
                out.update(f"{base}.{a.name}" for a in node.names)
            visit(ast.iter_child_nodes(node))

    visit(tree.body)
    return out


def _is_main_guard(test) -> bool:
    return (isinstance(test, ast.Compare) and isinstance(test.left, ast.Name) and test.left.id == "__name__"
            and len(test.comparators) == 1 and isinstance(test.comparators[0], ast.Constant)
            and test.comparators[0].value == "__main__")


def _scan_lines(text: str, package: str) -> set[str]:
    """Import lines outside any ``def`` block (by indentation), for files ``ast`` cannot parse."""
    out: set[str] = set()
    defs: list[int] = []  # indentation of the enclosing def blocks
    for line in text.splitlines():
        stripped = line.lstrip()
        if not stripped or stripped.startswith("#"):
            continue
        indent = len(line) - len(stripped)
        while defs and indent <= defs[-1]:
            defs.pop()
        if re.match(r"(async\s+)?def\s", stripped):
            defs.append(indent)
            continue
        if defs:
            continue
        m = _IMPORT_LINE.match(line)
        if not m:
            continue
        if m.group(4):
            out.update(x.strip().split(" as ")[0] for x in m.group(4).split(",") if x.strip())
        else:
            dots = m.group(2)
            level = len(dots) - len(dots.lstrip("."))
            base = _resolve(dots.lstrip("."), level, package)
            out.add(base)
            out.update(f"{base}.{x.strip().split(' as ')[0]}" for x in m.group(3).split(",") if x.strip())
    return out


def _source_path(names: set[str], module: str) -> str | None:
    p = module.replace(".", "/")
    for cand in (f"{p}.py", f"{p}/__init__.py"):
        if cand in names:
            return cand
    return None


def needed_modules(zf: zipfile.ZipFile, roots: set[str]) -> set[str]:
    """The standard-library modules (those with source in ``zf``) that importing ``roots`` and
    :data:`ALWAYS` loads, following module-level imports; plus every module of WHOLE_PACKAGES."""
    names = set(zf.namelist())
    work = sorted(set(roots) | set(ALWAYS))
    for pkg in WHOLE_PACKAGES:
        work += sorted(n[:-3].replace("/", ".").removesuffix(".__init__") for n in names
                       if n.startswith(pkg + "/") and n.endswith(".py"))
    seen: set[str] = set()
    while work:
        mod = work.pop()
        if mod in seen:
            continue
        parts = mod.split(".")
        work.extend(".".join(parts[:i]) for i in range(1, len(parts)))  # parents are imported first
        path = _source_path(names, mod)
        if path is None:  # built into Pyodide's runtime (math, _json ...), or not a module at all
            continue
        seen.add(mod)
        text = zf.read(path).decode("utf-8")
        work.extend(sorted(_module_level_imports(text, mod, path.endswith("/__init__.py"))))
    return seen


def _docstrings(tree) -> list:
    out = []
    for node in ast.walk(tree):
        if isinstance(node, (ast.Module, ast.ClassDef, ast.FunctionDef, ast.AsyncFunctionDef)) and node.body:
            first = node.body[0]
            if isinstance(first, ast.Expr) and isinstance(first.value, ast.Constant) and isinstance(first.value.value, str):
                out.append(first)
    return out


def strip_source(text: str) -> str:
    """``text`` with its comments removed and each docstring replaced by ``''``, every line kept
    (tracebacks keep their line numbers). About a third of the standard library's text; it is sent
    to every first visitor and read at every start. The result is checked: its syntax tree must be
    the original's with empty docstrings, else ``text`` is returned unchanged (as it is for source
    this Python cannot parse). ``__doc__`` becomes ``''``, a string like any docstring."""
    try:
        tree = ast.parse(text)
        toks = list(tokenize.generate_tokens(io.StringIO(text).readline))
    except (SyntaxError, tokenize.TokenError, ValueError):
        return text
    lines = text.splitlines(keepends=True)
    edits = [(t.start, t.end, "") for t in toks if t.type == tokenize.COMMENT]
    edits += [((d.lineno, d.col_offset), (d.end_lineno, d.end_col_offset), "''") for d in _docstrings(tree)]
    for (row, col), (erow, ecol), rep in sorted(edits, reverse=True):
        head = lines[row - 1][:col]
        if not rep:  # a comment runs to the end of its line: drop the spaces before it too
            head = head.rstrip(" \t")
        lines[row - 1:erow] = [head + rep + lines[erow - 1][ecol:]] + ["\n"] * (erow - row)
    out = "".join(lines)
    try:
        stripped = ast.parse(out)
    except SyntaxError:
        return text
    for d in _docstrings(tree):
        d.value.value = ""
    return out if ast.dump(stripped) == ast.dump(tree) else text


def write_trimmed(src_zip: str, dest_zip: str, roots: set[str] | None = None, pyodide_dir: str | None = None) -> dict:
    """Write ``dest_zip`` holding the modules :func:`needed_modules` finds (their code as in the
    original, comments and docstrings blanked by :func:`strip_source`; deflated, with fixed times).
    With ``pyodide_dir``, each module ships instead as the ``.pyc`` that Pyodide's own Python
    compiles from that blanked source (buildkit/bytecode.py), or as source if that step is not
    available. Returns a summary."""
    from .bytecode import compile_archive

    roots = app_imports() if roots is None else roots
    with zipfile.ZipFile(src_zip) as zf:
        mods = needed_modules(zf, roots)
        names = set(zf.namelist())
        keep = {_source_path(names, m) for m in mods}
        files = []
        for info in zf.infolist():
            if info.filename in keep:
                data = zf.read(info.filename)
                if info.filename.endswith(".py"):
                    data = strip_source(data.decode("utf-8")).encode("utf-8")
                files.append((info.filename, data))
    _write_zip(dest_zip, files)
    compiled = compile_archive(dest_zip, pyodide_dir) if pyodide_dir else None
    if compiled:
        files = [(n + "c", compiled[n + "c"]) if n + "c" in compiled else (n, d) for n, d in files]
        _write_zip(dest_zip, files)
    return {"modules": sorted(mods), "files": len(keep), "compiled": bool(compiled)}


def _write_zip(dest_zip: str, files) -> None:
    from .wheel import FIXED_TIME

    with zipfile.ZipFile(dest_zip, "w") as out:
        for name, data in files:
            zi = zipfile.ZipInfo(name, FIXED_TIME)
            zi.compress_type = zipfile.ZIP_DEFLATED
            zi.external_attr = 0o644 << 16
            out.writestr(zi, data, compresslevel=9)
