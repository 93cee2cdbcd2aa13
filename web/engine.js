// The one object that owns the Python worker: id-matched calls, status, and a coalescing
// compute queue so only the newest edit is computed when typing is fast.
export class Engine extends EventTarget {
  constructor(url = "./worker.js", options = {}, adopt = null) {
    super();
    this.state = "starting";
    this.marks = {};
    this.nextId = 1;
    this.pending = new Map();
    // Adopt a worker started earlier by boot.js (replaying what it has said so far), or start one.
    this.worker = adopt ? adopt.worker : new Worker(new URL(url, import.meta.url), { type: "module", name: options.name || "engine" });
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
