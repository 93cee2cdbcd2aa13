// What the engine worker keeps and fetches, apart from its message loop (worker.js): the app wheel
// (fetched, checked against engine.json's SHA-256, unpacked), the memory snapshot (one per build,
// made on the device) and the bytecode cache (one per build). Everything here is an optimisation
// or an integrity check; no engineering logic. See DEVELOPERS.md for what each one gains.
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

// Unpack the verified wheel straight into site-packages, as micropip would after resolving it,
// without loading micropip itself (see DEVELOPERS.md for the figures).
export function unpackWheel(pyodide, buf) {
  // site-packages from sys.path (sysconfig would cost a module compile at every start)
  const site = pyodide.runPython("import sys\n[p for p in sys.path if p.endswith('site-packages')][0]");
  pyodide.unpackArchive(buf, "wheel", { extractDir: site });
}

// The snapshot's interpreter imports the app from the wheel itself (zipimport), not from unpacked
// files: a restored interpreter then needs only this one file written back (well under 1 ms),
// where unpacking the wheel's files took 22–42 ms of every warm start (docs/performance.md).
// Everything the app imports is in the snapshot already; the path serves anything imported later.
const APP_ZIP = "/lib/fp-app.whl";

function writeAppZip(pyodide, buf) {
  pyodide.FS.writeFile(APP_ZIP, new Uint8Array(buf));
}

// ---- memory snapshot: one per build, made on the device by a short-lived second worker ----
const SNAPSHOT_CACHE = "fp-snapshot";
// The key also names how the snapshot's interpreter finds the app ("appzip": imports from APP_ZIP),
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
    writeAppZip(pyodide, await appWheel);
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
  writeAppZip(pyodide, await appWheel);
  // Imports the bridge and every worksheet and runs each on its defaults: no user data is ever in a snapshot.
  const probe = pyodide.runPython(`import sys\nsys.path.append(${JSON.stringify(APP_ZIP)})\nfrom app import bridge, snapshot\nsnapshot.prepare()`);
  const { body, layout } = packSnapshot(pyodide.makeMemorySnapshot());
  const cache = await caches.open(SNAPSHOT_CACHE);
  const key = snapshotKey(info);
  const headers = { "Content-Type": "application/octet-stream", "x-fp-probe": probe, "x-fp-layout": layout };
  await cache.put(key, new Response(body, { headers }));
  for (const req of await cache.keys()) if (req.url !== key) await cache.delete(req); // keep only this build's
  return body.length;
}

// ---- bytecode cache (see app/bytecache.py): compile once per build, not on every start ----
// Used when there is no memory snapshot yet (the first starts of a build) or it was refused.
const BYTECODE_CACHE = "fp-bytecode";
const bytecodeKey = (info) => here(`./__bytecode/${info.app_wheel_sha256}-${info.pyodide}.zip`);

export async function readBytecode(info) {
  try {
    const hit = await (await caches.open(BYTECODE_CACHE)).match(bytecodeKey(info));
    return hit ? await hit.arrayBuffer() : null;
  } catch (err) {
    console.warn("bytecode cache not readable:", err);
    return null;
  }
}

export function restoreBytecode(pyodide, buffer, mark) {
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

/** Compile every module imported since ``__fp_baseline`` was taken and store the archive for this build. */
export async function saveBytecode(pyodide, info) {
  const proxy = pyodide.runPython("from app import bytecache\nbytecache.archive(__fp_baseline)");
  const bytes = proxy.toJs();
  proxy.destroy();
  const cache = await caches.open(BYTECODE_CACHE);
  const key = bytecodeKey(info);
  await cache.put(key, new Response(bytes, { headers: { "Content-Type": "application/zip" } }));
  for (const req of await cache.keys()) if (req.url !== key) await cache.delete(req); // keep only this build's
}
