// Hosts Pyodide: loads it once, installs the app's own wheel offline with micropip, and
// answers {id, op, ...} messages with {id, result} or {id, error}. No engineering logic here.
import { loadPyodide } from "./pyodide/pyodide.mjs";

const here = (path) => new URL(path, import.meta.url).href;
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
  const appWheel = fetch(here(`./wheels/${info.app_wheel}`)).then((r) => {
    if (!r.ok) throw new Error(`app package missing (${r.status})`);
    return r.arrayBuffer();
  });
  const pyodide = await booting;
  mark("python-ready");
  await pyodide.loadPackage(info.wheels.map((w) => here(`./wheels/${w}`)), { messageCallback: () => {} });
  const buf = await appWheel;
  const digest = hex(await crypto.subtle.digest("SHA-256", buf));
  if (digest !== info.app_wheel_sha256) throw new Error("the app package failed its integrity check; reload to fetch it again");
  pyodide.FS.mkdirTree("/tmp/wheels");
  pyodide.FS.writeFile(`/tmp/wheels/${info.app_wheel}`, new Uint8Array(buf));
  const micropip = pyodide.pyimport("micropip");
  await micropip.install.callKwargs(`emfs:/tmp/wheels/${info.app_wheel}`, { deps: false });
  mark("app-installed");
  const bridge = pyodide.pyimport("app.bridge");
  mark("engine-ready");
  return bridge;
})();

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
  } catch (err) {
    postMessage({ id, error: String((err && err.message) || err) });
  }
};
