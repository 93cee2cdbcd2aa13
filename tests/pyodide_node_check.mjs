// Runs the app in Pyodide under Node.js (the same runtime and Python 3.14 as the browser) from a
// built dist/, with the standard-library archive given, and prints JSON: the standard-library
// modules loaded from that archive (the files behind them), the interpreter's .pyc magic number,
// the app modules compiled from source rather than loaded from the wheel's bytecode,
// each worksheet's default result and each report format's text for the job in JOB_JSON. Used by tests/test_stdlib.py.
// Usage: node pyodide_node_check.mjs DIST STDLIB_ZIP JOB_JSON
import { readFileSync } from "node:fs";
import { join } from "node:path";
import { pathToFileURL } from "node:url";

const [, , dist, stdlib, jobFile] = process.argv;
const { loadPyodide } = await import(pathToFileURL(join(dist, "pyodide", "pyodide.mjs")).href);
const info = JSON.parse(readFileSync(join(dist, "engine.json"), "utf-8"));
// the options the worker passes on its default path (web/worker-caches.js pyodideOptions)
const py = await loadPyodide({
  indexURL: join(dist, "pyodide") + "/", stdLibURL: stdlib, lockFileContents: Promise.resolve(info.pyodide_lock),
  stdout: () => {}, stderr: (s) => console.error(s),
});
// the app imported from the wheel file, as the worker does (web/worker-caches.js mountApp)
py.FS.writeFile(info.app_path, new Uint8Array(readFileSync(join(dist, "wheels", info.app_wheel))));
py.globals.set("app_path", info.app_path);
py.globals.set("job_text", readFileSync(jobFile, "utf-8"));
const out = py.runPython(`
import importlib._bootstrap_external as bootstrap, importlib.util, json, sys, zipimport
# every module compiled from source from here on, by either loader (one loaded from a .pyc is not)
from_source = []
def counting(compile_source):
    def counted(*args, **kwargs):
        from_source.append(next(a for a in args if isinstance(a, str) and a.endswith(".py")))
        return compile_source(*args, **kwargs)
    return counted
bootstrap.SourceLoader.source_to_code = counting(bootstrap.SourceLoader.source_to_code)
zipimport._compile_source = counting(zipimport._compile_source)
sys.path.append(app_path)
from app import bridge, snapshot
snapshot.prepare()  # every worksheet on its defaults, every report format, jobs export/validate
out = {
    "results": {s: bridge.compute(s, "{}") for s in bridge.sheets()},
    "reports": {f: bridge.report(job_text, f, '{"date": "2000-01-01"}') for f in ("html", "text", "csv")},
    "magic": importlib.util.MAGIC_NUMBER.hex(),  # what this interpreter's .pyc files start with
    # the app's own modules that had to be compiled here (none when the wheel carries their bytecode)
    "app_from_source": sorted(p for p in from_source if p.startswith(app_path)),
    "app_loaded_from": sorted({m.__file__.rpartition("/app/")[0] for n, m in sys.modules.items() if n.startswith("app.")}),
    # column ranges in one archive module's code (compiled here, they are always there)
    "columns": sum(p[2] is not None for p in sys.modules["dataclasses"].dataclass.__code__.co_positions()),
    # the archive's files behind every loaded module (frozen and aliased modules name theirs too)
    "files": sorted({f.split(".zip/", 1)[1] for m in list(sys.modules.values())
                     if ".zip/" in (f := getattr(m, "__file__", None) or "")}),
}
json.dumps(out)
`);
process.stdout.write(out + "\n");
