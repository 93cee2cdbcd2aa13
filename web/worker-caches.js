// What the engine worker keeps and fetches, apart from its message loop (worker.js): the app wheel
// (fetched, checked against engine.json's SHA-256, imported from) and the memory snapshot (one per
// build, made on the device). Everything here is an optimisation or an integrity check; no
// engineering logic. See DEVELOPERS.md for what each one gains.
import { loadPyodide } from "./pyodide/pyodide.mjs";

export const here = (path) => new URL(path, import.meta.url).href;

function hex(buffer) {
  return Array.from(new Uint8Array(buffer), (b) => b.toString(16).padStart(2, "0")).join("");
}

// ---- the app wheel ----
let infoPromise = null;
export const fetchInfo = () => (infoPromise ||= fetch(here("./engine.json")).then((r) => r.json()));

// loadPyodide's options. The default start reads the trimmed standard library shipped as
// pyodide/python_stdlib.zip and passes engine.json's package list with no packages (loadPyodide
// waits for a package list; the app installs none), so it never fetches pyodide-lock.json. The
// micropip path reads the whole standard library and Pyodide's real package list, both fetched
// only when that path is asked for (see DEVELOPERS.md).
export async function pyodideOptions(installer) {
  const opts = { indexURL: here("./pyodide/"), stdout: () => {}, stderr: (s) => console.warn(s) };
  if (installer === "micropip") {
    opts.stdLibURL = here(`./${(await fetchInfo()).full_stdlib}`);
  } else {
    opts.lockFileContents = fetchInfo().then((info) => info.pyodide_lock);
  }
  return opts;
}

export async function fetchWheel(info) {
  const r = await fetch(here(`./wheels/${info.app_wheel}`));
  if (!r.ok) throw new Error(`app package missing (${r.status})`);
  const buf = await r.arrayBuffer();
  const digest = hex(await crypto.subtle.digest("SHA-256", buf));
  if (digest !== info.app_wheel_sha256) throw new Error("the app package failed its integrity check; reload to fetch it again");
  return buf;
}

// The app is imported from the verified wheel itself, written to engine.json's app_path (zipimport,
// which takes the .pyc the build put beside each module): one file written, nothing unpacked or
// compiled. Unpacking it into site-packages took 22-42 ms of every warm start and 140-240 ms of a
// first visit (docs/performance.md). A restored snapshot has the path on sys.path already.
export function mountApp(pyodide, buf, info) {
  pyodide.FS.writeFile(info.app_path, new Uint8Array(buf));
  const path = JSON.stringify(info.app_path);
  pyodide.runPython(`import sys\nif ${path} not in sys.path: sys.path.append(${path})`);
}

// ---- memory snapshot: one per build, made on the device by a short-lived second worker ----
const SNAPSHOT_CACHE = "fp-snapshot";
// The key also names how the snapshot's interpreter finds the app ("appzip": imports from the wheel file at app_path),
// so a snapshot an older worker made (the wheel unpacked) is never restored by this one.
const snapshotKey = (info) => here(`./__snapshot/${info.app_wheel_sha256}-${info.pyodide}-appzip.bin`);

/** Whether this profile has ever stored a snapshot (none on a first visit). Asked before engine.json
 * arrives, so a first visit starts Pyodide's downloads at once instead of after that round trip
 * and a snapshot look-up. */
export async function maySnapshot() {
  if (!self.caches) return false;
  try {
    return await caches.has(SNAPSHOT_CACHE);
  } catch {
    return false;
  }
}

export async function findSnapshot(info) {
  if (!self.caches) return null;
  try {
    const hit = await (await caches.open(SNAPSHOT_CACHE)).match(snapshotKey(info));
    return hit && hit.headers.get("x-fp-probe") && hit.headers.get("x-fp-layout") ? hit : null;
  } catch (err) {
    console.warn("snapshot cache not readable:", err);
    return null;
  }
}

// A snapshot is the interpreter's whole memory, about half of it zero pages (never touched, or
// above the heap's top). It is stored without them: the body holds the non-zero runs of 4 KiB
// pages, and the x-fp-layout header "size;offset:length,…" says where each run goes. Half the
// bytes to read back from Cache Storage, which took most of a warm start's wait.
const PAGE = 4096;

export function packSnapshot(bytes) {
  if (bytes.byteOffset % 4) bytes = bytes.slice(); // a Uint32Array view needs an aligned start
  const words = new Uint32Array(bytes.buffer, bytes.byteOffset, bytes.byteLength >>> 2);
  const pages = Math.ceil(bytes.length / PAGE);
  const runs = [];
  let start = -1;
  for (let p = 0; p <= pages; p++) {
    let used = false; // p === pages: past the end, closes the last run
    for (let i = (p * PAGE) >>> 2, end = Math.min(((p + 1) * PAGE) >>> 2, words.length); i < end; i++) {
      if (words[i] !== 0) { used = true; break; }
    }
    // the last bytes of a length that is not a whole number of words
    for (let i = Math.max(words.length * 4, p * PAGE); !used && i < Math.min((p + 1) * PAGE, bytes.length); i++) used = bytes[i] !== 0;
    if (used && start < 0) start = p;
    if (!used && start >= 0) {
      runs.push([start * PAGE, Math.min(p * PAGE, bytes.length) - start * PAGE]);
      start = -1;
    }
  }
  const body = new Uint8Array(runs.reduce((n, [, len]) => n + len, 0));
  let at = 0;
  for (const [off, len] of runs) { body.set(bytes.subarray(off, off + len), at); at += len; }
  return { body, layout: `${bytes.length};${runs.map(([o, l]) => `${o}:${l}`).join(",")}` };
}

/** The whole memory again from a packed body and its layout; throws when they do not fit. */
export function unpackSnapshot(body, layout) {
  const [size, list] = String(layout).split(";");
  const out = new Uint8Array(Number(size));
  let at = 0;
  for (const run of list ? list.split(",") : []) {
    const [off, len] = run.split(":").map(Number);
    if (!(len > 0) || !(off >= 0) || off + len > out.length || at + len > body.length) throw new Error("its layout does not fit");
    out.set(body.subarray(at, at + len), off);
    at += len;
  }
  if (at !== body.length) throw new Error("its layout does not fit");
  return out;
}

async function dropSnapshot(info) {
  try { await (await caches.open(SNAPSHOT_CACHE)).delete(snapshotKey(info)); } catch { /* nothing to drop */ }
}

// Restore the interpreter from the snapshot, write the app's wheel back where it imports from
// (for anything imported later) and run the probe worksheet: the snapshot is used only when its
// answer matches the one recorded when it was made. Returns the interpreter, or null after
// discarding a bad snapshot.
export async function bootFromSnapshot(info, hit, appWheel, pyodideOpts, mark) {
  try {
    const memory = hit.arrayBuffer().then((buf) => unpackSnapshot(new Uint8Array(buf), hit.headers.get("x-fp-layout")));
    memory.catch(() => {}); // handled: loadPyodide awaits it and the catch below reports it
    const pyodide = await loadPyodide({ ...pyodideOpts, _loadSnapshot: memory });
    mark("snapshot-restored");
    mountApp(pyodide, await appWheel, info);
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

/** Boot a fresh interpreter, prepare it and store its memory snapshot (packed); returns the bytes stored. */
export async function makeSnapshot(pyodideOpts) {
  const info = await fetchInfo();
  const appWheel = fetchWheel(info);
  const pyodide = await loadPyodide({ ...pyodideOpts, _makeSnapshot: true });
  mountApp(pyodide, await appWheel, info);
  // Imports the bridge and every worksheet and runs each on its defaults: no user data is ever in a snapshot.
  const probe = pyodide.runPython("from app import bridge, snapshot\nsnapshot.prepare()");
  const { body, layout } = packSnapshot(pyodide.makeMemorySnapshot());
  const cache = await caches.open(SNAPSHOT_CACHE);
  const key = snapshotKey(info);
  const headers = { "Content-Type": "application/octet-stream", "x-fp-probe": probe, "x-fp-layout": layout };
  await cache.put(key, new Response(body, { headers }));
  for (const req of await cache.keys()) if (req.url !== key) await cache.delete(req); // keep only this build's
  await caches.delete("fp-bytecode"); // a bytecode cache the builds before 2026-12-03 kept
  return body.length;
}
