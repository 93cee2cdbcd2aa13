// The one object that owns the Python worker: id-matched calls, status, and a coalescing
// compute queue so only the newest edit is computed when typing is fast.

// The memory snapshot's maker (worker.js under the name "snapshot-maker") is started here, by the
// page, not by the engine worker: only a worker started once the service worker controls the page
// reads pyodide.asm.wasm from Cache Storage, and Chromium keeps compiled wasm code beside the entry
// the response came from. A maker started by the engine worker on a first visit (not yet
// controlled) read it from the network, so later offline starts found no compiled code in 2 of 4
// fresh profiles and ran unoptimised code until some long session stored it (docs/performance.md).
const MAKER_DELAY_MS = 3000; // after the first result and its first edits, not during them
// V8 hands its optimised code over for storing only once its compiler has been quiet a while (its
// caching timeout, 2 s by default: from memory); a maker ended at once sometimes left none stored.
const MAKER_HOLD_MS = 4000;

export class Engine extends EventTarget {
  constructor(url = "./worker.js", options = {}, adopt = null) {
    super();
    this.state = "starting";
    this.marks = {};
    this.nextId = 1;
    this.pending = new Map();
    // Adopt a worker started earlier by boot.js (replaying what it has said so far), or start one.
    this.url = adopt ? adopt.url : new URL(url, import.meta.url);
    this.worker = adopt ? adopt.worker : new Worker(this.url, { type: "module", name: options.name || "engine" });
    this.worker.onmessage = (e) => this._onMessage(e.data);
    if (adopt) for (const m of adopt.early.splice(0)) this._onMessage(m);
    this.worker.onerror = (e) => this._setState("failed", e.message || "the engine could not start");
  }

  _setState(state, detail = "") {
    this.state = state;
    this.detail = detail;
    this.dispatchEvent(new CustomEvent("state", { detail: { state, detail } }));
  }

  _onMessage(m) {
    if (m.type === "status") {
      this.marks[m.stage] = m.at - performance.timeOrigin; // the worker sends absolute times
      this.dispatchEvent(new CustomEvent("stage", { detail: m }));
      return;
    }
    if (m.type === "snapshot-wanted") {
      this._startMaker();
      return;
    }
    if (m.type === "ready") {
      for (const [k, at] of Object.entries(m.marks)) this.marks[k] = at - performance.timeOrigin;
      this._setState("ready");
      return;
    }
    if (m.type === "failed") {
      this._setState("failed", m.error);
      for (const [, p] of this.pending) p.reject(new Error(m.error));
      this.pending.clear();
      return;
    }
    const p = this.pending.get(m.id);
    if (!p) return;
    this.pending.delete(m.id);
    if ("error" in m) p.reject(new Error(m.error));
    else p.resolve(m.result);
  }

  _stage(stage) {
    this.marks[stage] = performance.now();
    this.dispatchEvent(new CustomEvent("stage", { detail: { type: "status", stage } }));
  }

  /** Start the snapshot maker once the service worker controls this page; end it a while after it reports. */
  async _startMaker() {
    const sw = navigator.serviceWorker;
    if (this.makerAsked || !sw) return;
    this.makerAsked = true;
    if (!sw.controller) await new Promise((resolve) => sw.addEventListener("controllerchange", resolve, { once: true }));
    await new Promise((resolve) => setTimeout(resolve, MAKER_DELAY_MS));
    let maker;
    let ended = false;
    const end = (stage, why) => {
      if (ended) return; // an error after the report, or a second report
      ended = true;
      if (why) console.warn("memory snapshot not made:", why);
      this._stage(stage);
      setTimeout(() => { maker.terminate(); this._stage("snapshot-maker-ended"); }, MAKER_HOLD_MS);
    };
    try {
      maker = new Worker(this.url, { type: "module", name: "snapshot-maker" });
    } catch (err) {
      console.warn("memory snapshot maker not started:", err);
      return;
    }
    maker.onmessage = (e) => {
      const m = e.data || {};
      if (m.type === "snapshot-saved") end(m.type);
      else if (m.type === "snapshot-failed") end(m.type, m.error);
    };
    maker.onerror = (e) => end("snapshot-failed", e.message || "the maker failed");
  }

  /** Send one operation; resolves with the worker's string result. */
  call(op, args = {}) {
    const id = this.nextId++;
    return new Promise((resolve, reject) => {
      this.pending.set(id, { resolve, reject });
      this.worker.postMessage({ id, op, ...args });
    });
  }

  /** Call an operation whose result is JSON text. */
  async json(op, args = {}) {
    return JSON.parse(await this.call(op, args));
  }
}

/** The worker's name carries its options: "engine", then "&installer=micropip" (install the app
 * with micropip) and "&snapshot=off" (never use or make a memory snapshot), from the page's query. */
export function workerName(search) {
  const q = new URLSearchParams(search);
  let name = "engine";
  if (q.get("installer") === "micropip") name += "&installer=micropip";
  if (q.get("snapshot") === "off") name += "&snapshot=off";
  return name;
}

/** Runs the newest request only: while one compute is in flight, later ones replace each other. */
export class Latest {
  constructor(run) {
    this.run = run;
    this.busy = false;
    this.queued = null;
  }
  push(job) {
    this.queued = job;
    if (!this.busy) this._drain();
  }
  async _drain() {
    this.busy = true;
    while (this.queued) {
      const job = this.queued;
      this.queued = null;
      try {
        await this.run(job);
      } catch (err) {
        console.error(err);
      }
    }
    this.busy = false;
  }
}
