// Hosts Pyodide: loads it once, installs the app's own wheel offline with micropip, and
// answers {id, op, ...} messages with {id, result} or {id, error}. No engineering logic here.
import { loadPyodide } from "./pyodide/pyodide.mjs";

const here = (path) => new URL(path, import.meta.url).href;
// How the app wheel is installed: "unpack" (default) or "micropip" (the worker's name says which;
// a URL query would be lost when the service worker answers with the cached script).
const INSTALLER = self.name === "installer=micropip" ? "micropip" : "unpack";
const marks = {};
const mark = (name) => { marks[name] = performance.now(); postMessage({ type: "status", stage: name, t: marks[name] }); };

function hex(buffer) {
  return Array.from(new Uint8Array(buffer), (b) => b.toString(16).padStart(2, "0")).join("");
}

const ready = (async () => {
  mark("worker-start");
  // Boot the interpreter at once; meanwhile read the build facts and fetch the app wheel.
  const booting = loadPyodide({ indexURL: here("./pyodide/"), stdout: () => {}, stderr: (s) => console.warn(s) });
  const info = await (await fetch(here("./engine.json"))).json();
  const bytecode = readBytecode(info); // from Cache Storage, also while the interpreter boots
  const appWheel = fetch(here(`./wheels/${info.app_wheel}`)).then((r) => {
    if (!r.ok) throw new Error(`app package missing (${r.status})`);
    return r.arrayBuffer();
  });
  const pyodide = await booting;
  mark("python-ready");
  const buf = await appWheel;
  const digest = hex(await crypto.subtle.digest("SHA-256", buf));
  if (digest !== info.app_wheel_sha256) throw new Error("the app package failed its integrity check; reload to fetch it again");
  if (INSTALLER === "micropip") {
    // micropip path: load micropip from its shipped wheel and let it install ours (costs ~0.6 s).
    await pyodide.loadPackage(info.wheels.map((w) => here(`./wheels/${w}`)), { messageCallback: () => {} });
    pyodide.FS.mkdirTree("/tmp/wheels");
    pyodide.FS.writeFile(`/tmp/wheels/${info.app_wheel}`, new Uint8Array(buf));
    const micropip = pyodide.pyimport("micropip");
    await micropip.install.callKwargs(`emfs:/tmp/wheels/${info.app_wheel}`, { deps: false });
  } else {
    // Default: unpack the verified wheel straight into site-packages, as micropip would after
    // resolving it, without loading micropip itself (see DEVELOPERS.md for the figures).
    // site-packages from sys.path (sysconfig would cost a module compile at every start)
    const site = pyodide.runPython("import sys\n[p for p in sys.path if p.endswith('site-packages')][0]");
    pyodide.unpackArchive(buf, "wheel", { extractDir: site });
  }
  mark("app-installed");
  mark(`installed-with-${INSTALLER}`);
  restoreBytecode(pyodide, await bytecode);
  pyodide.runPython("import sys\n__fp_baseline = set(sys.modules)");
  const bridge = pyodide.pyimport("app.bridge");
  mark("engine-ready");
  engine = { pyodide, info };
  return bridge;
})();

// ---- bytecode cache (see app/bytecache.py): compile once per build, not on every start ----
const BYTECODE_CACHE = "fp-bytecode";
let engine = null;
let savedModules = 0;
let saveTimer = 0;
const bytecodeKey = (info) => here(`./__bytecode/${info.app_wheel_sha256}-${info.pyodide}.zip`);

async function readBytecode(info) {
  try {
    const hit = await (await caches.open(BYTECODE_CACHE)).match(bytecodeKey(info));
    return hit ? await hit.arrayBuffer() : null;
  } catch (err) {
    console.warn("bytecode cache not readable:", err);
    return null;
  }
}

function restoreBytecode(pyodide, buffer) {
  if (!buffer) return;
  try {
    pyodide.unpackArchive(buffer, "zip", { extractDir: "/" });
    // No importlib.invalidate_caches(): in Python 3.14 it imports importlib.metadata (~45 ms here).
    // A new sys.path entry has no cached finder, and directory finders re-list on a changed mtime.
    pyodide.runPython("import sys\nsys.path.insert(0, '/lib/fp-pyc')\nsys.path_importer_cache.pop('/lib/fp-pyc', None)");
    mark("bytecode-restored");
  } catch (err) {
    console.warn("bytecode cache not used:", err);
  }
}

function scheduleBytecodeSave() {
  if (!engine || !self.caches) return;
  const n = engine.pyodide.runPython("import sys\nlen(sys.modules)");
  if (n === savedModules) return;
  clearTimeout(saveTimer);
  saveTimer = setTimeout(async () => {
    try {
      const { pyodide, info } = engine;
      savedModules = pyodide.runPython("import sys\nlen(sys.modules)");
      const proxy = pyodide.runPython("from app import bytecache\nbytecache.archive(__fp_baseline)");
      const bytes = proxy.toJs();
      proxy.destroy();
      const cache = await caches.open(BYTECODE_CACHE);
      const key = bytecodeKey(info);
      await cache.put(key, new Response(bytes, { headers: { "Content-Type": "application/zip" } }));
      for (const req of await cache.keys()) if (req.url !== key) await cache.delete(req); // keep only this build's
      mark("bytecode-saved");
    } catch (err) {
      console.warn("bytecode cache not saved:", err);
    }
  }, 1500);
}

ready.then(
  () => postMessage({ type: "ready", marks }),
  (err) => postMessage({ type: "failed", error: String((err && err.message) || err) }),
);

const OPS = {
  catalog: (b) => b.catalog(),
  compute: (b, m) => b.compute(m.worksheet, JSON.stringify(m.inputs || {})),
  report: (b, m) => b.report(JSON.stringify(m.job), m.format, JSON.stringify(m.options || {})),
  validate_jobs: (b, m) => b.validate_jobs(m.text),
  export_jobs: (b, m) => b.export_jobs(JSON.stringify(m.jobs)),
  demo_job: (b) => b.demo_job(),
};

self.onmessage = async (event) => {
  const msg = event.data || {};
  const { id, op } = msg;
  try {
    const bridge = await ready;
    const fn = OPS[op];
    if (!fn) throw new Error(`unknown operation '${op}'`);
    const result = fn(bridge, msg);
    postMessage({ id, result: typeof result === "string" ? result : String(result) });
    if (op === "compute") scheduleBytecodeSave();
  } catch (err) {
    postMessage({ id, error: String((err && err.message) || err) });
  }
};
