// Hosts Pyodide: boots it (from this build's memory snapshot when there is a good one), installs
// the app's own wheel offline, and answers {id, op, ...} messages with {id, result} or {id, error}.
// No engineering logic here. The same file, started under the name "snapshot-maker", makes the
// snapshot (see app/snapshot.py and DEVELOPERS.md).
import { loadPyodide } from "./pyodide/pyodide.mjs";

const here = (path) => new URL(path, import.meta.url).href;
// Options arrive in the worker's name ("engine&installer=micropip&snapshot=off"): a URL query
// would be lost when the service worker answers with the cached script.
const OPTS = new URLSearchParams(self.name || "");
const ROLE = OPTS.has("snapshot-maker") ? "maker" : "engine";
const INSTALLER = OPTS.get("installer") === "micropip" ? "micropip" : "unpack";
const USE_SNAPSHOT = OPTS.get("snapshot") !== "off" && INSTALLER === "unpack";
const PYODIDE_OPTS = { indexURL: here("./pyodide/"), stdout: () => {}, stderr: (s) => console.warn(s) };
const marks = {};
// Marks are sent in the page's time: this worker's clock plus its time origin.
const mark = (name) => {
  marks[name] = performance.timeOrigin + performance.now();
  postMessage({ type: "status", stage: name, at: marks[name] });
};

function hex(buffer) {
  return Array.from(new Uint8Array(buffer), (b) => b.toString(16).padStart(2, "0")).join("");
}

const fetchInfo = () => fetch(here("./engine.json")).then((r) => r.json());

async function fetchWheel(info) {
  const r = await fetch(here(`./wheels/${info.app_wheel}`));
  if (!r.ok) throw new Error(`app package missing (${r.status})`);
  const buf = await r.arrayBuffer();
  const digest = hex(await crypto.subtle.digest("SHA-256", buf));
  if (digest !== info.app_wheel_sha256) throw new Error("the app package failed its integrity check; reload to fetch it again");
  return buf;
}

// Unpack the verified wheel straight into site-packages, as micropip would after resolving it,
// without loading micropip itself (see DEVELOPERS.md for the figures).
function unpackWheel(pyodide, buf) {
  // site-packages from sys.path (sysconfig would cost a module compile at every start)
  const site = pyodide.runPython("import sys\n[p for p in sys.path if p.endswith('site-packages')][0]");
  pyodide.unpackArchive(buf, "wheel", { extractDir: site });
}

// ---- memory snapshot: one per build, made on the device by a short-lived second worker ----
const SNAPSHOT_CACHE = "fp-snapshot";
const snapshotKey = (info) => here(`./__snapshot/${info.app_wheel_sha256}-${info.pyodide}.bin`);

async function findSnapshot(info) {
  if (!USE_SNAPSHOT || !self.caches) return null;
  try {
    const hit = await (await caches.open(SNAPSHOT_CACHE)).match(snapshotKey(info));
    return hit && hit.headers.get("x-fp-probe") ? hit : null;
  } catch (err) {
    console.warn("snapshot cache not readable:", err);
    return null;
  }
}

async function dropSnapshot(info) {
  try { await (await caches.open(SNAPSHOT_CACHE)).delete(snapshotKey(info)); } catch { /* nothing to drop */ }
}

// Restore the interpreter from the snapshot, install the wheel's files (for anything imported
// later) and run the probe worksheet: the snapshot is used only when its answer matches the one
// recorded when it was made. Returns the interpreter, or null after discarding a bad snapshot.
async function bootFromSnapshot(info, hit, appWheel) {
  try {
    const pyodide = await loadPyodide({ ...PYODIDE_OPTS, _loadSnapshot: hit.arrayBuffer() });
    mark("snapshot-restored");
    unpackWheel(pyodide, await appWheel);
    const probe = pyodide.runPython("from app import snapshot\nsnapshot.probe()");
    if (probe !== hit.headers.get("x-fp-probe")) throw new Error("its probe result differs from a fresh start's");
    mark("snapshot-checked");
    return pyodide;
  } catch (err) {
    console.warn("memory snapshot not used:", err);
    mark("snapshot-rejected");
    await dropSnapshot(info);
    return null;
  }
}

async function makeSnapshot() {
  const info = await fetchInfo();
  const appWheel = fetchWheel(info);
  const pyodide = await loadPyodide({ ...PYODIDE_OPTS, _makeSnapshot: true });
  unpackWheel(pyodide, await appWheel);
  // imports every worksheet and runs each on its defaults: no user data is ever in a snapshot
  const probe = pyodide.runPython("from app import snapshot\nsnapshot.prepare()");
  const bytes = pyodide.makeMemorySnapshot();
  const cache = await caches.open(SNAPSHOT_CACHE);
  const key = snapshotKey(info);
  await cache.put(key, new Response(bytes, { headers: { "Content-Type": "application/octet-stream", "x-fp-probe": probe } }));
  for (const req of await cache.keys()) if (req.url !== key) await cache.delete(req); // keep only this build's
  return bytes.length;
}

let makerStarted = false;
function startSnapshotMaker() {
  if (makerStarted || !USE_SNAPSHOT || typeof Worker === "undefined" || !self.caches) return;
  makerStarted = true;
  setTimeout(() => {
    try {
      const maker = new Worker(here("./worker.js"), { type: "module", name: "snapshot-maker" });
      maker.onmessage = (e) => {
        const m = e.data || {};
        if (m.type === "snapshot-saved" || m.type === "snapshot-failed") {
          if (m.type === "snapshot-failed") console.warn("memory snapshot not made:", m.error);
          mark(m.type);
          maker.terminate();
        }
      };
      maker.onerror = (e) => { console.warn("memory snapshot maker failed:", e.message); mark("snapshot-failed"); maker.terminate(); };
    } catch (err) {
      console.warn("memory snapshot maker not started:", err);
    }
  }, 3000); // after the first result and the bytecode save, not during them
}

// ---- the engine ----
async function bootEngine() {
  mark("worker-start");
  const infoP = fetchInfo();
  let pyodide = null;
  let info = null;
  let appWheel = null;
  let booting = null;
  if (USE_SNAPSHOT) {
    info = await infoP;
    appWheel = fetchWheel(info);
    const hit = await findSnapshot(info);
    if (hit) pyodide = await bootFromSnapshot(info, hit, appWheel);
  }
  if (!pyodide) {
    // Boot the interpreter at once; meanwhile read the build facts and fetch the app wheel.
    booting = loadPyodide(PYODIDE_OPTS);
    info = info || await infoP;
    appWheel = appWheel || fetchWheel(info);
  }
  const bytecode = booting ? readBytecode(info) : null; // from Cache Storage, also while the interpreter boots
  if (booting) {
    pyodide = await booting;
    mark("python-ready");
    const buf = await appWheel;
    if (INSTALLER === "micropip") {
      // micropip path: load micropip from its shipped wheel and let it install ours (costs ~0.6 s).
      await pyodide.loadPackage(info.wheels.map((w) => here(`./wheels/${w}`)), { messageCallback: () => {} });
      pyodide.FS.mkdirTree("/tmp/wheels");
      pyodide.FS.writeFile(`/tmp/wheels/${info.app_wheel}`, new Uint8Array(buf));
      const micropip = pyodide.pyimport("micropip");
      await micropip.install.callKwargs(`emfs:/tmp/wheels/${info.app_wheel}`, { deps: false });
    } else {
      unpackWheel(pyodide, buf);
    }
    mark("app-installed");
    mark(`installed-with-${INSTALLER}`);
    restoreBytecode(pyodide, await bytecode);
    pyodide.runPython("import sys\n__fp_baseline = set(sys.modules)");
  }
  const bridge = pyodide.pyimport("app.bridge");
  mark("engine-ready");
  engine = { pyodide, info, fromSnapshot: !booting };
  return bridge;
}

// ---- bytecode cache (see app/bytecache.py): compile once per build, not on every start ----
// Used when there is no memory snapshot yet (the first starts of a build) or it was refused.
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

function afterCompute() {
  if (!engine || engine.fromSnapshot || !self.caches) return;
  startSnapshotMaker();
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

const OPS = {
  catalog: (b) => b.catalog(),
  compute: (b, m) => b.compute(m.worksheet, JSON.stringify(m.inputs || {})),
  report: (b, m) => b.report(JSON.stringify(m.job), m.format, JSON.stringify(m.options || {})),
  validate_jobs: (b, m) => b.validate_jobs(m.text),
  export_jobs: (b, m) => b.export_jobs(JSON.stringify(m.jobs)),
  demo_job: (b) => b.demo_job(),
};

if (ROLE === "maker") {
  makeSnapshot().then(
    (bytes) => postMessage({ type: "snapshot-saved", bytes }),
    (err) => postMessage({ type: "snapshot-failed", error: String((err && err.message) || err) }),
  );
} else {
  const ready = bootEngine();
  ready.then(
    () => postMessage({ type: "ready", marks }),
    (err) => postMessage({ type: "failed", error: String((err && err.message) || err) }),
  );
  self.onmessage = async (event) => {
    const msg = event.data || {};
    const { id, op } = msg;
    try {
      const bridge = await ready;
      const fn = OPS[op];
      if (!fn) throw new Error(`unknown operation '${op}'`);
      const result = fn(bridge, msg);
      postMessage({ id, result: typeof result === "string" ? result : String(result) });
      if (op === "compute") afterCompute();
    } catch (err) {
      postMessage({ id, error: String((err && err.message) || err) });
    }
  };
}
