// Site jobs on the device: list, open, rename, duplicate, delete with undo, autosave,
// export/import files, reports, and sharing by Web Share or e-mail. The file format,
// validation and the reports themselves are made in Python (app.jobs, app.report).
import { h, clear } from "./dom.js";

const MAILTO_LIMIT = 1900; // keep the whole mailto: URL under ~2000 characters (common mail-client limit)
const UNDO_MS = 10000;

const uid = () => (crypto.randomUUID ? crypto.randomUUID() : `id-${Date.now().toString(36)}-${Math.random().toString(36).slice(2)}`);
const nowIso = () => new Date().toISOString().replace(/\.\d+Z$/, "Z");
const today = () => new Date().toISOString().slice(0, 10);

export class Jobs {
  constructor(ctx) {
    this.ctx = ctx; // {engine, store, $, openSheet, showView, getState}
    this.jobs = new Map();
    this._loading = null; // jobs are read from storage on first use, after the form is up
    this.writes = Promise.resolve();
    this.openJobId = null;
    this.saveState = "idle";
  }

  /** Start reading the saved jobs (once); resolves when they are in memory. */
  load() {
    return this.loaded;
  }

  get loaded() {
    if (!this._loading) this._loading = this._load();
    return this._loading;
  }

  async _load() {
    if (!(await this.ctx.store.available())) {
      this._storageProblem(new Error("IndexedDB cannot be opened"));
      return;
    }
    try {
      for (const j of (await this.ctx.store.listJobs()) || []) this.jobs.set(j.id, j);
    } catch (err) {
      this._storageProblem(err);
    }
  }

  _storageProblem(err) {
    this.storageError = `Storage on this device is unavailable (${err && err.message ? err.message : err}). Worksheets still work, but nothing is kept after this page closes — export your jobs to a file.`;
    this.showBar(this.ctx.getState().target);
  }

  /** The entry with these ids, or null (after the jobs have loaded). */
  async find(jobId, entryId) {
    await this.loaded;
    const job = this.jobs.get(jobId);
    return (job && job.entries.find((e) => e.id === entryId)) || null;
  }

  // ---- saving -----------------------------------------------------------------------------------
  _persist(job) {
    job.updated = nowIso();
    const copy = structuredClone(job);
    this.markDirty();
    this.writes = this.writes.then(() => this.ctx.store.putJob(copy)).then(
      () => { this.markSaved(); },
      (err) => { this.markSaveFailed(err); },
    );
    return this.writes;
  }

  markDirty() { this._setSave("saving"); }
  markSaved() { this._setSave(this.ctx.store.usingMemory() ? "memory" : "saved"); }
  markSaveFailed(err) { this.lastSaveError = String((err && err.message) || err); this._setSave("failed"); }
  _setSave(s) {
    this.saveState = s;
    for (const el of document.querySelectorAll(".save-state")) {
      el.textContent = this._saveText();
      el.dataset.state = s;
    }
  }
  _saveText() {
    return {
      idle: "",
      saving: "Saving…",
      saved: "Saved on this device",
      memory: "Not stored: device storage unavailable",
      failed: `Not saved: ${this.lastSaveError || "storage error"}`,
    }[this.saveState];
  }

  async saveEntryInputs(target, inputs, lastResult) {
    await this.loaded;
    const job = this.jobs.get(target.jobId);
    const entry = job && job.entries.find((e) => e.id === target.entryId);
    if (!entry) throw new Error("this entry no longer exists");
    entry.inputs = { ...inputs };
    entry.updated = nowIso();
    await this._persist(job);
  }

  // ---- the bar above a worksheet ----------------------------------------------------------------
  showBar(target) {
    const bar = this.ctx.$("job-bar");
    clear(bar);
    bar.hidden = false;
    const save = h("span", { id: "save-state", class: "save-state", role: "status", "data-state": this.saveState, text: this._saveText() });
    if (this.storageError) bar.append(h("p", { class: "msg warn", role: "alert", text: this.storageError }));
    if (target) {
      const job = this.jobs.get(target.jobId);
      const entry = job && job.entries.find((e) => e.id === target.entryId);
      bar.append(
        h("div", { class: "job-where" },
          h("span", { class: "crumb" }, h("strong", { text: job ? job.site || "Untitled job" : "Job" }), " › ", entry ? entry.name : ""),
          save),
        h("button", { type: "button", class: "btn ghost small", onclick: () => this.openJob(target.jobId) }, "Back to job"),
      );
    } else {
      bar.append(
        h("div", { class: "job-where" }, h("span", { class: "crumb muted", text: "Scratch worksheet" }), save),
        h("button", { type: "button", class: "btn small", onclick: () => this.saveToJob() }, "Save to a job"),
      );
    }
  }

  /** Copy the current worksheet into a job as a new entry, then keep editing that entry. */
  async saveToJob() {
    await this.loaded;
    const st = this.ctx.getState();
    let job = this.openJobId && this.jobs.get(this.openJobId);
    if (!job) job = [...this.jobs.values()].sort((a, b) => (b.updated || "").localeCompare(a.updated || ""))[0];
    if (!job) job = this._newJob();
    const n = job.entries.filter((e) => e.worksheet === st.sheet.id).length + 1;
    const entry = { id: uid(), name: `${st.sheet.title} ${n}`, worksheet: st.sheet.id, inputs: { ...st.inputs }, updated: nowIso() };
    job.entries.push(entry);
    this.jobs.set(job.id, job);
    this.openJobId = job.id;
    await this._persist(job);
    await this.ctx.openSheet(entry.worksheet, { inputs: entry.inputs, target: { jobId: job.id, entryId: entry.id } });
    this._toast(`Saved as “${entry.name}” in “${job.site || "Untitled job"}”. Rename it from the job.`);
  }

  _newJob() {
    const t = nowIso();
    return { id: uid(), site: "New site", date: today(), notes: "", created: t, updated: t, entries: [] };
  }

  // ---- the jobs view ----------------------------------------------------------------------------
  async show(jobId = null) {
    await this.loaded;
    if (jobId && this.jobs.has(jobId)) this.openJobId = jobId;
    this.ctx.showView("jobs");
    if (this.openJobId && this.jobs.has(this.openJobId)) this.openJob(this.openJobId);
    else this._renderList();
  }

  _view() {
    const v = this.ctx.$("jobs-view");
    clear(v);
    return v;
  }

  _renderList() {
    this.openJobId = null;
    if (location.hash !== "#/jobs") history.replaceState(null, "", "#/jobs");
    const v = this._view();
    const jobs = [...this.jobs.values()].sort((a, b) => (b.updated || "").localeCompare(a.updated || ""));
    const fileInput = h("input", { type: "file", accept: ".json,application/json", id: "import-file", class: "sr-only", "aria-label": "Choose a jobs file to import" });
    fileInput.addEventListener("change", () => fileInput.files[0] && this.importFile(fileInput.files[0]));
    v.append(
      h("h1", { id: "jobs-title", text: "Site jobs" }),
      h("p", { class: "summary", text: "A job holds a site's worksheets. Everything is saved on this device as you type." }),
      h("div", { class: "actions" },
        h("button", { type: "button", class: "btn", onclick: () => this.createJob() }, "New job"),
        h("button", { type: "button", class: "btn ghost", onclick: () => this.loadDemo() }, "Load demo job"),
        h("label", { for: "import-file", class: "btn ghost", tabindex: "0", role: "button", onkeydown: (e) => (e.key === "Enter" || e.key === " ") && (e.preventDefault(), fileInput.click()) }, "Import file"),
        fileInput,
        jobs.length ? h("button", { type: "button", class: "btn ghost", onclick: () => this.exportJobs(jobs) }, "Export all") : null,
        h("button", { type: "button", class: "btn ghost", onclick: () => this.ctx.openSheet(this.ctx.getState().sheet.id) }, "Back to worksheet"),
      ),
      h("div", { id: "job-msg", role: "status", "aria-live": "polite" }),
    );
    if (!jobs.length) {
      v.append(h("p", { class: "muted", text: "No jobs yet. Start a new one, or load the demo job to see how a site survey looks." }));
      return;
    }
    const list = h("ul", { class: "job-list" });
    for (const j of jobs) {
      list.append(h("li", { class: "job-card", "data-job": j.id },
        h("div", { class: "job-head" },
          h("strong", { text: j.site || "Untitled job" }),
          h("span", { class: "muted", text: ` ${j.date || ""} · ${j.entries.length} entr${j.entries.length === 1 ? "y" : "ies"}` })),
        h("div", { class: "actions" },
          h("button", { type: "button", class: "btn small", onclick: () => this.openJob(j.id), "aria-label": `Open job ${j.site}` }, "Open"),
          h("button", { type: "button", class: "btn ghost small", onclick: () => this.duplicateJob(j.id), "aria-label": `Duplicate job ${j.site}` }, "Duplicate"),
          h("button", { type: "button", class: "btn ghost small", onclick: () => this.deleteJob(j.id), "aria-label": `Delete job ${j.site}` }, "Delete"))));
    }
    v.append(list);
  }

  openJob(id) {
    const job = this.jobs.get(id);
    if (!job) return this._renderList();
    this.openJobId = id;
    this.ctx.showView("jobs");
    history.replaceState(null, "", `#/job/${id}`);
    this._renderJob(job);
  }

  _renderJob(job) {
    const v = this._view();
    const sheets = this.ctx.getState().catalog;
    const titleOf = (id) => (sheets.find((s) => s.id === id) || { title: id }).title;
    const text = (label, key, attrs = {}) => {
      const id = `job-${key}`;
      const inp = key === "notes"
        ? h("textarea", { id, rows: 4 }, job[key] || "")
        : h("input", { id, type: attrs.type || "text", value: job[key] || "", maxlength: 200 });
      inp.addEventListener("input", () => {
        job[key] = inp.value;
        if (key === "site") document.getElementById("jobs-title").textContent = inp.value || "Untitled job";
        clearTimeout(this._jobTimer);
        this.markDirty();
        this._jobTimer = setTimeout(() => this._persist(job), 200);
      });
      return h("div", { class: "field" }, h("label", { for: id, text: label }), inp);
    };
    const addSel = h("select", { id: "add-sheet" }, sheets.map((s) => h("option", { value: s.id, text: s.title })));
    addSel.value = this.ctx.getState().sheet ? this.ctx.getState().sheet.id : sheets[0].id;
    v.append(
      h("p", {}, h("button", { type: "button", class: "btn ghost small", onclick: () => this._renderList() }, "‹ All jobs")),
      h("h1", { id: "jobs-title", text: job.site || "Untitled job" }),
      h("span", { id: "job-save-state", class: "save-state", role: "status", "data-state": this.saveState, text: this._saveText() }),
      h("div", { class: "job-fields" }, text("Site name", "site"), text("Date", "date", { type: "date" }), text("Notes", "notes")),
      h("h2", { text: "Entries" }),
    );
    const list = h("ul", { class: "entry-list" });
    job.entries.forEach((e) => {
      const nameId = `entry-name-${e.id}`;
      const name = h("input", { id: nameId, type: "text", value: e.name, maxlength: 200 });
      name.addEventListener("input", () => {
        e.name = name.value;
        clearTimeout(this._jobTimer);
        this.markDirty();
        this._jobTimer = setTimeout(() => this._persist(job), 200);
      });
      list.append(h("li", { class: "entry-card", "data-entry": e.id },
        h("label", { for: nameId, class: "muted", text: `${titleOf(e.worksheet)} — entry name` }), name,
        h("div", { class: "actions" },
          h("button", { type: "button", class: "btn small", onclick: () => this.openEntry(job.id, e.id), "aria-label": `Open entry ${e.name}` }, "Open"),
          h("button", { type: "button", class: "btn ghost small", onclick: () => this.shareReport(job, e.id), "aria-label": `Share report of ${e.name}` }, "Share"),
          h("button", { type: "button", class: "btn ghost small", onclick: () => this.duplicateEntry(job.id, e.id), "aria-label": `Duplicate entry ${e.name}` }, "Duplicate"),
          h("button", { type: "button", class: "btn ghost small", onclick: () => this.deleteEntry(job.id, e.id), "aria-label": `Delete entry ${e.name}` }, "Delete"))));
    });
    if (!job.entries.length) v.append(h("p", { class: "muted", text: "No entries yet: add one below, or open a worksheet and tap “Save to a job”." }));
    v.append(list,
      h("div", { class: "field add-entry" }, h("label", { for: "add-sheet", text: "New entry from worksheet" }), addSel,
        h("button", { type: "button", class: "btn", onclick: () => this.addEntry(job.id, addSel.value) }, "Add entry")),
      h("h2", { text: "Report and share" }),
      h("div", { class: "actions" },
        h("button", { type: "button", class: "btn", onclick: () => this.shareReport(job) }, "Share report"),
        h("button", { type: "button", class: "btn ghost", onclick: () => this.download(job, "html") }, "Report (HTML, print to PDF)"),
        h("button", { type: "button", class: "btn ghost", onclick: () => this.download(job, "text") }, "Summary (text)"),
        h("button", { type: "button", class: "btn ghost", onclick: () => this.download(job, "csv") }, "Values (CSV)"),
        h("button", { type: "button", class: "btn ghost", onclick: () => this.exportJobs([job]) }, "Export job file")),
      h("div", { id: "job-msg", role: "status", "aria-live": "polite" }),
    );
  }

  // ---- job and entry operations -------------------------------------------------------------------
  async createJob() {
    const job = this._newJob();
    this.jobs.set(job.id, job);
    await this._persist(job);
    this.openJob(job.id);
    const site = document.getElementById("job-site");
    if (site) { site.focus(); site.select(); }
  }

  async loadDemo() {
    const job = await this.ctx.engine.json("demo_job");
    if (!job) return this._msg("The demo job could not be made.");
    job.id = uid();
    for (const e of job.entries) e.id = uid();
    this.jobs.set(job.id, job);
    await this._persist(job);
    this.openJob(job.id);
  }

  async duplicateJob(id) {
    const src = this.jobs.get(id);
    const job = structuredClone(src);
    job.id = uid();
    job.site = `${src.site} (copy)`.slice(0, 200);
    job.created = nowIso();
    for (const e of job.entries) e.id = uid();
    this.jobs.set(job.id, job);
    await this._persist(job);
    this._renderList();
  }

  async deleteJob(id) {
    const job = this.jobs.get(id);
    this.jobs.delete(id);
    this.writes = this.writes.then(() => this.ctx.store.deleteJob(id)).catch((err) => this.markSaveFailed(err));
    await this.writes;
    this._renderList();
    this._undo(`Deleted job “${job.site}”.`, async () => {
      this.jobs.set(job.id, job);
      await this._persist(job);
      this._renderList();
    });
  }

  async addEntry(jobId, sheetId) {
    const job = this.jobs.get(jobId);
    const title = (this.ctx.getState().catalog.find((s) => s.id === sheetId) || { title: sheetId }).title;
    const n = job.entries.filter((e) => e.worksheet === sheetId).length + 1;
    const entry = { id: uid(), name: `${title} ${n}`, worksheet: sheetId, inputs: {}, updated: nowIso() };
    job.entries.push(entry);
    await this._persist(job);
    this.openEntry(jobId, entry.id);
  }

  async duplicateEntry(jobId, entryId) {
    const job = this.jobs.get(jobId);
    const i = job.entries.findIndex((e) => e.id === entryId);
    const copy = structuredClone(job.entries[i]);
    copy.id = uid();
    copy.name = `${copy.name} (copy)`.slice(0, 200);
    job.entries.splice(i + 1, 0, copy);
    await this._persist(job);
    this._renderJob(job);
  }

  async deleteEntry(jobId, entryId) {
    const job = this.jobs.get(jobId);
    const i = job.entries.findIndex((e) => e.id === entryId);
    const [gone] = job.entries.splice(i, 1);
    await this._persist(job);
    this._renderJob(job);
    this._undo(`Deleted entry “${gone.name}”.`, async () => {
      job.entries.splice(Math.min(i, job.entries.length), 0, gone);
      await this._persist(job);
      this._renderJob(job);
    });
  }

  openEntry(jobId, entryId) {
    const job = this.jobs.get(jobId);
    const e = job.entries.find((x) => x.id === entryId);
    this.openJobId = jobId;
    this.ctx.openSheet(e.worksheet, { inputs: e.inputs, target: { jobId, entryId } });
  }

  // ---- files ----------------------------------------------------------------------------------------
  async exportJobs(jobs) {
    const res = await this.ctx.engine.json("export_jobs", { jobs });
    this._save(res.text, res.filename, "application/json");
    this._msg(res.ok ? `Exported ${jobs.length} job${jobs.length === 1 ? "" : "s"} to ${res.filename}.` : `Exported, but warning: ${res.error}`);
  }

  async importFile(file) {
    const text = await file.text();
    const res = await this.ctx.engine.json("validate_jobs", { text });
    if (!res.ok) {
      this._msg(`Not imported: ${res.error} Nothing was changed.`, true);
      return;
    }
    // Imported jobs never overwrite: a job whose id exists already comes in as a new copy.
    const incoming = res.jobs.map((j) => {
      if (this.jobs.has(j.id)) {
        j = structuredClone(j);
        j.id = uid();
      }
      return j;
    });
    try {
      await this.ctx.store.putJobs(incoming);
    } catch (err) {
      this._msg(`Not imported: ${err.message || err}. Nothing was changed.`, true);
      return;
    }
    for (const j of incoming) this.jobs.set(j.id, j);
    this._renderList();
    this._msg(`Imported ${incoming.length} job${incoming.length === 1 ? "" : "s"}.`);
  }

  async _report(job, format, entryId, extra = {}) {
    const options = { ...(entryId ? { entry_id: entryId } : {}), ...extra };
    const res = await this.ctx.engine.json("report", { job, format, options });
    if (!res.ok) throw new Error(res.error);
    return res;
  }

  async download(job, format, entryId) {
    try {
      const res = await this._report(job, format, entryId);
      this._save(res.text, res.filename, res.mime);
    } catch (err) {
      this._msg(`The report could not be made: ${err.message}`, true);
    }
  }

  _save(text, filename, mime) {
    const url = URL.createObjectURL(new Blob([text], { type: mime }));
    const a = h("a", { href: url, download: filename, class: "sr-only" }, filename);
    document.body.append(a);
    a.click();
    setTimeout(() => { URL.revokeObjectURL(url); a.remove(); }, 1000);
  }

  /** Web Share with the HTML report attached where the device can; else a mailto: draft. */
  async shareReport(job, entryId) {
    let html, text;
    try {
      [html, text] = await Promise.all([this._report(job, "html", entryId), this._report(job, "text", entryId, { detail: "brief" })]);
    } catch (err) {
      this._msg(`The report could not be made: ${err.message}`, true);
      return;
    }
    const file = new File([html.text], html.filename, { type: html.mime });
    if (navigator.canShare && navigator.share && navigator.canShare({ files: [file] })) {
      try {
        await navigator.share({ files: [file], title: html.title, text: html.title });
        this._msg("Shared.");
        return;
      } catch (err) {
        if (err && err.name === "AbortError") return;
      }
    }
    const { url, cut } = mailtoFor(html.title, text.text);
    this.lastMailto = url;
    (window.fieldphasor.openMailto || ((u) => { location.href = u; }))(url); // tests replace the opener
    const msg = cut
      ? "Your mail app opens with a shortened summary (mail links have a length limit). Download the full report below and attach it."
      : "Your mail app opens with the summary. The message waits in its outbox until there is signal.";
    this._msg(msg, false, cut ? [
      h("button", { type: "button", class: "btn small", onclick: () => this._save(html.text, html.filename, html.mime) }, "Download full report"),
    ] : []);
  }

  // ---- messages -------------------------------------------------------------------------------------
  _msg(text, isError = false, extra = []) {
    const el = document.getElementById("job-msg");
    if (!el) return this._toast(text);
    clear(el).append(h("p", { class: `msg ${isError ? "fail" : "warn"}`, text }), ...extra);
  }

  _toast(text, action) {
    let t = document.getElementById("toast");
    if (!t) {
      t = h("div", { id: "toast", class: "toast", role: "status", "aria-live": "polite" });
      document.body.append(t);
    }
    clear(t).append(h("span", { text }), action || "");
    t.hidden = false;
    clearTimeout(this._toastTimer);
    this._toastTimer = setTimeout(() => { t.hidden = true; }, UNDO_MS);
  }

  _undo(text, fn) {
    const btn = h("button", { type: "button", class: "btn small", onclick: async () => { btn.disabled = true; await fn(); document.getElementById("toast").hidden = true; } }, "Undo");
    this._toast(text, btn);
  }
}

/** A mailto: URL whose total length stays within MAILTO_LIMIT; says whether the body was cut. */
export function mailtoFor(subject, body) {
  const enc = encodeURIComponent;
  const head = `mailto:?subject=${enc(subject)}&body=`;
  if ((head + enc(body)).length <= MAILTO_LIMIT) return { url: head + enc(body), cut: false };
  const note = "\n\n[Summary cut to fit an e-mail link. The full report is attached separately.]";
  let lo = 0;
  let hi = body.length;
  while (lo < hi) { // longest prefix that fits
    const mid = Math.ceil((lo + hi) / 2);
    if ((head + enc(body.slice(0, mid) + note)).length <= MAILTO_LIMIT) lo = mid;
    else hi = mid - 1;
  }
  return { url: head + enc(body.slice(0, lo) + note), cut: true };
}
