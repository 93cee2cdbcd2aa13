// Hosts Pyodide: boots it (from this build's memory snapshot when there is a good one), installs
// the app's own wheel offline, and answers {id, op, ...} messages with {id, result} or {id, error}.
// No engineering logic here. The same file, started by the page under the name "snapshot-maker",
// makes the snapshot (see app/snapshot.py and DEVELOPERS.md). The wheel and the snapshot are in
// worker-caches.js; the build joins both with Pyodide's loader into one dist/worker.js.
import { loadPyodide } from "./pyodide/pyodide.mjs";
import {
  here, fetchInfo, pyodideOptions, fetchWheel, mountApp, maySnapshot, findSnapshot, bootFromSnapshot, makeSnapshot,
} from "./worker-caches.js";

// Options arrive in the worker's name ("engine&installer=micropip&snapshot=off"): a URL query
// would be lost when the service worker answers with the cached script.
const OPTS = new URLSearchParams(self.name || "");
const ROLE = OPTS.has("snapshot-maker") ? "maker" : "engine";
const INSTALLER = OPTS.get("installer") === "micropip" ? "micropip" : "zip";
const USE_SNAPSHOT = OPTS.get("snapshot") !== "off" && INSTALLER === "zip";
const marks = {};
// Marks are sent in the page's time: this worker's clock plus its time origin.
const mark = (name) => {
  marks[name] = performance.timeOrigin + performance.now();
  postMessage({ type: "status", stage: name, at: marks[name] });
};

// The snapshot is made by a second, short-lived worker that the page starts when asked (see
// engine.js: a worker the service worker controls, so Chromium keeps its compiled wasm beside the
// cached file that later offline starts read).
let snapshotAsked = false;
function askForSnapshot() {
  if (snapshotAsked || !USE_SNAPSHOT || !self.caches) return;
  snapshotAsked = true;
  postMessage({ type: "snapshot-wanted" });
}

// ---- the engine ----
let fromSnapshot = false; // whether this interpreter was restored (then no snapshot needs making)

async function bootEngine() {
  mark("worker-start");
  const infoP = fetchInfo();
  const PYODIDE_OPTS = await pyodideOptions(INSTALLER);
  let pyodide = null;
  let info = null;
  let appWheel = null;
  let booting = null;
  if (USE_SNAPSHOT && await maySnapshot()) {
    info = await infoP;
    appWheel = fetchWheel(info);
    const hit = await findSnapshot(info);
    if (hit) pyodide = await bootFromSnapshot(info, hit, appWheel, PYODIDE_OPTS, mark);
  }
  if (!pyodide) {
    // Boot the interpreter at once; meanwhile read the build facts and fetch the app wheel.
    booting = loadPyodide(PYODIDE_OPTS);
    info = info || await infoP;
    appWheel = appWheel || fetchWheel(info);
  }
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
      mountApp(pyodide, buf, info);
    }
    mark("app-installed");
    mark(`installed-with-${INSTALLER}`);
  }
  const bridge = pyodide.pyimport("app.bridge");
  mark("engine-ready");
  fromSnapshot = !booting;
  return bridge;
}

const OPS = {
  catalog: (b) => b.catalog(),
  compute: (b, m) => b.compute(m.worksheet, JSON.stringify(m.inputs || {})),
  report: (b, m) => b.report(JSON.stringify(m.job), m.format, JSON.stringify(m.options || {})),
  validate_jobs: (b, m) => b.validate_jobs(m.text),
  export_jobs: (b, m) => b.export_jobs(JSON.stringify(m.jobs)),
  demo_job: (b) => b.demo_job(),
  time_call: (b, m) => b.time_call(m.name, m.runs || 10), // the benchmark: a named Python case (app/timings.py)
};

if (ROLE === "maker") {
  pyodideOptions(INSTALLER).then(makeSnapshot).then(
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
      if (op === "compute" && !fromSnapshot) askForSnapshot(); // a first result: have the snapshot made
    } catch (err) {
      postMessage({ id, error: String((err && err.message) || err) });
    }
  };
}
