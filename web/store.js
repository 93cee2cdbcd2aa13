// Storage on the device (IndexedDB): drafts of each worksheet's inputs, and site jobs.
// Every write is awaited and reported, so the shell can show "saved" honestly.
const DB_NAME = "fieldphasor";
const DB_VERSION = 1;
let dbPromise = null;
let memory = null; // fallback when IndexedDB is unavailable (private mode, storage off)

function open() {
  if (dbPromise) return dbPromise;
  dbPromise = new Promise((resolve, reject) => {
    let req;
    try {
      req = indexedDB.open(DB_NAME, DB_VERSION);
    } catch (err) {
      reject(err);
      return;
    }
    req.onupgradeneeded = () => {
      const db = req.result;
      if (!db.objectStoreNames.contains("drafts")) db.createObjectStore("drafts");
      if (!db.objectStoreNames.contains("jobs")) db.createObjectStore("jobs", { keyPath: "id" });
    };
    req.onsuccess = () => resolve(req.result);
    req.onerror = () => reject(req.error || new Error("storage unavailable"));
    req.onblocked = () => reject(new Error("storage is blocked by another tab"));
  }).catch((err) => {
    memory = memory || { drafts: new Map(), jobs: new Map() };
    throw err;
  });
  return dbPromise;
}

function tx(store, mode, fn) {
  return open().then((db) => new Promise((resolve, reject) => {
    const t = db.transaction(store, mode);
    fn(t.objectStore(store));
    t.oncomplete = () => resolve();
    t.onerror = () => reject(t.error || new Error("storage error"));
    t.onabort = () => reject(t.error || new Error("storage write was aborted (is the device full?)"));
  }));
}

function req(r) {
  return new Promise((resolve, reject) => {
    r.onsuccess = () => resolve(r.result);
    r.onerror = () => reject(r.error);
  });
}

async function withFallback(storeName, dbFn, memFn) {
  try {
    return await dbFn();
  } catch (err) {
    if (!memory) throw err;
    return memFn(memory[storeName]);
  }
}

export const store = {
  available: async () => { try { await open(); return true; } catch { return false; } },
  getDraft: (sheet) => withFallback("drafts", () => open().then((db) => req(db.transaction("drafts").objectStore("drafts").get(sheet))), (m) => m.get(sheet)),
  putDraft: (sheet, inputs) => withFallback("drafts", () => tx("drafts", "readwrite", (s) => { s.put(inputs, sheet); }), (m) => { m.set(sheet, inputs); }),
  listJobs: () => withFallback("jobs", () => open().then((db) => req(db.transaction("jobs").objectStore("jobs").getAll())), (m) => [...m.values()]),
  getJob: (id) => withFallback("jobs", () => open().then((db) => req(db.transaction("jobs").objectStore("jobs").get(id))), (m) => m.get(id)),
  putJob: (job) => withFallback("jobs", () => tx("jobs", "readwrite", (s) => { s.put(job); }), (m) => { m.set(job.id, structuredClone(job)); }),
  putJobs: (jobs) => withFallback("jobs", () => tx("jobs", "readwrite", (s) => { for (const j of jobs) s.put(j); }), (m) => { for (const j of jobs) m.set(j.id, structuredClone(j)); }),
  deleteJob: (id) => withFallback("jobs", () => tx("jobs", "readwrite", (s) => { s.delete(id); }), (m) => { m.delete(id); }),
  // The last result shown for a draft or job entry ({build, inputs, result}; see remember in app.js),
  // beside the drafts under a key no worksheet id can take ("result:..."); a cache, never needed.
  getRemembered: (slot) => withFallback("drafts", () => open().then((db) => req(db.transaction("drafts").objectStore("drafts").get(`result:${slot}`))), (m) => m.get(`result:${slot}`)),
  putRemembered: (slot, rec) => withFallback("drafts", () => tx("drafts", "readwrite", (s) => { s.put(rec, `result:${slot}`); }), (m) => { m.set(`result:${slot}`, rec); }),
  forgetRemembered: (prefix) => withFallback("drafts", () => tx("drafts", "readwrite", (s) => {
    s.delete(IDBKeyRange.bound(`result:${prefix}`, `result:${prefix}\uffff`));
  }), (m) => { for (const k of [...m.keys()]) if (k.startsWith(`result:${prefix}`)) m.delete(k); }),
  usingMemory: () => memory !== null,
};
