// Site jobs in memory and their writes to device storage: read once on first use, every change
// queued so writes land in order, and a save state ("saving", "saved", ...) for the views to show.
// No drawing here (web/jobs.js); the file format and its validation live in Python (app.jobs).

export const uid = () => (crypto.randomUUID ? crypto.randomUUID() : `id-${Date.now().toString(36)}-${Math.random().toString(36).slice(2)}`);
export const nowIso = () => new Date().toISOString().replace(/\.\d+Z$/, "Z");
const today = () => new Date().toISOString().slice(0, 10);

export class JobsModel {
  /** store: web/store.js; onSaveState(state): the save state changed; onStorageProblem(): storage is unusable. */
  constructor(store, { onSaveState, onStorageProblem }) {
    this.store = store;
    this.onSaveState = onSaveState;
    this.onStorageProblem = onStorageProblem;
    this.jobs = new Map();
    this._loading = null; // jobs are read from storage on first use, after the form is up
    this.writes = Promise.resolve();
    this.saveState = "idle";
    this.lastSaveError = "";
    this.storageError = "";
  }

  get loaded() {
    if (!this._loading) this._loading = this._load();
    return this._loading;
  }

  async _load() {
    if (!(await this.store.available())) {
      this._storageProblem(new Error("IndexedDB cannot be opened"));
      return;
    }
    try {
      for (const j of (await this.store.listJobs()) || []) this.jobs.set(j.id, j);
    } catch (err) {
      this._storageProblem(err);
    }
  }

  _storageProblem(err) {
    this.storageError = `Storage on this device is unavailable (${err && err.message ? err.message : err}). Worksheets still work, but nothing is kept after this page closes — export your jobs to a file.`;
    this.onStorageProblem();
  }

  /** The entry with these ids, or null (after the jobs have loaded). */
  async find(jobId, entryId) {
    await this.loaded;
    const job = this.jobs.get(jobId);
    return (job && job.entries.find((e) => e.id === entryId)) || null;
  }

  entry(jobId, entryId) {
    const job = this.jobs.get(jobId);
    return (job && job.entries.find((e) => e.id === entryId)) || null;
  }

  /** Jobs, the most recently changed first. */
  newestFirst() {
    return [...this.jobs.values()].sort((a, b) => (b.updated || "").localeCompare(a.updated || ""));
  }

  // ---- the write queue ----------------------------------------------------------------------------
  persist(job) {
    job.updated = nowIso();
    const copy = structuredClone(job);
    this.markDirty();
    this.writes = this.writes.then(() => this.store.putJob(copy)).then(
      () => { this.markSaved(); },
      (err) => { this.markSaveFailed(err); },
    );
    return this.writes;
  }

  markDirty() { this._setSave("saving"); }
  markSaved() { this._setSave(this.store.usingMemory() ? "memory" : "saved"); }
  markSaveFailed(err) { this.lastSaveError = String((err && err.message) || err); this._setSave("failed"); }
  _setSave(s) {
    this.saveState = s;
    this.onSaveState(s);
  }

  async saveEntryInputs(target, inputs) {
    await this.loaded;
    const job = this.jobs.get(target.jobId);
    const entry = job && job.entries.find((e) => e.id === target.entryId);
    if (!entry) throw new Error("this entry no longer exists");
    entry.inputs = { ...inputs };
    entry.updated = nowIso();
    await this.persist(job);
  }

  // ---- changes to jobs and entries ------------------------------------------------------------------
  newJob() {
    const t = nowIso();
    return { id: uid(), site: "New site", date: today(), notes: "", created: t, updated: t, entries: [] };
  }

  /** Keep a job made elsewhere (new, the demo) under fresh ids and save it. */
  async add(job, { freshIds = false } = {}) {
    if (freshIds) {
      job.id = uid();
      for (const e of job.entries) e.id = uid();
    }
    this.jobs.set(job.id, job);
    await this.persist(job);
    return job;
  }

  async duplicateJob(id) {
    const src = this.jobs.get(id);
    const job = structuredClone(src);
    job.id = uid();
    job.site = `${src.site} (copy)`.slice(0, 200);
    job.created = nowIso();
    for (const e of job.entries) e.id = uid();
    this.jobs.set(job.id, job);
    await this.persist(job);
    return job;
  }

  /** Delete a job; returns it, for undo with add(). */
  async deleteJob(id) {
    const job = this.jobs.get(id);
    this.jobs.delete(id);
    this.writes = this.writes.then(() => this.store.deleteJob(id)).catch((err) => this.markSaveFailed(err));
    this.store.forgetRemembered(`entry:${id}/`).catch(() => {}); // its entries' remembered results
    await this.writes;
    return job;
  }

  /** A new entry of worksheet ``sheet`` ({id, title}) at the end of ``job``, named "<title> <n>". */
  async addEntry(job, sheet, inputs = {}) {
    const n = job.entries.filter((e) => e.worksheet === sheet.id).length + 1;
    const entry = { id: uid(), name: `${sheet.title} ${n}`, worksheet: sheet.id, inputs: { ...inputs }, updated: nowIso() };
    job.entries.push(entry);
    this.jobs.set(job.id, job);
    await this.persist(job);
    return entry;
  }

  async duplicateEntry(job, entryId) {
    const i = job.entries.findIndex((e) => e.id === entryId);
    const copy = structuredClone(job.entries[i]);
    copy.id = uid();
    copy.name = `${copy.name} (copy)`.slice(0, 200);
    job.entries.splice(i + 1, 0, copy);
    await this.persist(job);
    return copy;
  }

  /** Delete an entry; returns a function that puts it back where it was. */
  async deleteEntry(job, entryId) {
    const i = job.entries.findIndex((e) => e.id === entryId);
    const [gone] = job.entries.splice(i, 1);
    await this.persist(job);
    this.store.forgetRemembered(`entry:${job.id}/${entryId}`).catch(() => {}); // a cache: undo recomputes
    const restore = async () => {
      job.entries.splice(Math.min(i, job.entries.length), 0, gone);
      await this.persist(job);
    };
    return { gone, restore };
  }

  /** Store validated jobs from a file. Never overwrites: a job whose id exists comes in as a new copy.
   *  All or nothing: throws (and changes nothing) if storage refuses them. */
  async importJobs(jobs) {
    const incoming = jobs.map((j) => {
      if (this.jobs.has(j.id)) {
        j = structuredClone(j);
        j.id = uid();
      }
      return j;
    });
    await this.store.putJobs(incoming);
    for (const j of incoming) this.jobs.set(j.id, j);
    return incoming;
  }
}
