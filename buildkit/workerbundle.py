"""dist/worker.js as one file: web/worker.js with web/worker-caches.js and Pyodide's loader
(pyodide.mjs) written in, instead of a module that imports them.

A module worker fetches its script, parses it, and only then fetches what it imports: two fetches
in a row through the service worker before its first line runs. One file starts the worker about
20 ms sooner on every warm start (docs/performance.md). The sources stay separate modules in web/;
this only joins them, checking that each has the one shape it is joined by, so a new Pyodide or
a new import fails the build instead of making a worker that does not start.
"""

from __future__ import annotations

import re

LOADER_IMPORT = 'import { loadPyodide } from "./pyodide/pyodide.mjs";\n'
CACHES_IMPORT = re.compile(r'import \{[^}]*\} from "\./worker-caches\.js";\n')
# a static import or re-export statement anywhere (dynamic import(...) calls are not statements)
STATIC_IMPORT = re.compile(r'(?:^|[;}\n])\s*import\s*(?:[\w$*{][^;()]*?\bfrom\s*)?["\']')
EXPORT_LIST = re.compile(r"export\s*\{([^}]*)\};?\s*(?://# sourceMappingURL=\S*\s*)?$")
EXPORT_DECL = re.compile(r"^export (?=(?:async function|function|const|let|class) )", re.M)


def _loader_scope(loader: str) -> str:
    """Pyodide's loader in a function scope that returns what the module exported."""
    found = EXPORT_LIST.search(loader)
    if not found or "export" in loader[: found.start()].replace("exports", ""):
        raise ValueError("pyodide.mjs: expected one export list at its end")
    pairs = []
    for item in found.group(1).split(","):
        local, _, public = (part.strip() for part in item.partition(" as "))
        pairs.append(f"{public or local}: {local}")
    body = loader[: found.start()]
    if STATIC_IMPORT.search(body):
        raise ValueError("pyodide.mjs: a static import would need its own fetch")
    return "const { loadPyodide } = (() => {\n" + body + "\nreturn { " + ", ".join(pairs) + " };\n})();\n"


def bundle(worker: str, caches: str, loader: str) -> str:
    """The joined worker script from the texts of web/worker.js, web/worker-caches.js and pyodide.mjs."""
    if caches.count(LOADER_IMPORT) != 1 or worker.count(LOADER_IMPORT) != 1:
        raise ValueError("worker.js and worker-caches.js: each imports loadPyodide once, as written")
    if len(CACHES_IMPORT.findall(worker)) != 1:
        raise ValueError("worker.js: expected one import from worker-caches.js")
    caches = EXPORT_DECL.sub("", caches.replace(LOADER_IMPORT, ""))
    worker = CACHES_IMPORT.sub("", worker.replace(LOADER_IMPORT, ""))
    for name, text in (("worker-caches.js", caches), ("worker.js", worker)):
        if STATIC_IMPORT.search(text) or re.search(r"^\s*export\b", text, re.M):
            raise ValueError(f"{name}: an import or export the bundle does not join")
    head = ("// Built by buildkit/workerbundle.py from web/worker.js, web/worker-caches.js and Pyodide's\n"
            "// pyodide.mjs (one file: the worker starts after one fetch). Edit the sources, not this.\n")
    return head + _loader_scope(loader) + "\n// ---- web/worker-caches.js ----\n" + caches + "\n// ---- web/worker.js ----\n" + worker
