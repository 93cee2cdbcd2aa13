// The jobs screens: the list of site jobs, one job with its entries, and the bar above a worksheet
// (where it is saved, "Save to a job"). The jobs themselves and their writes are in jobs-model.js;
// files, reports, sharing and toasts in share.js.
import { h, clear } from "./dom.js";
import { JobsModel } from "./jobs-model.js";
import { Notices, Sharing } from "./share.js";

export class Jobs {
  constructor(ctx) {
    this.ctx = ctx; // {engine, store, $, openSheet, showView, getState}
    this.model = new JobsModel(ctx.store, {
      onSaveState: () => this._showSaveState(),
      onStorageProblem: () => this.showBar(this.ctx.getState().target),
    });
    this.notices = new Notices();
    this.sharing = new Sharing(ctx.engine, this.notices);
    this.openJobId = null;
  }

  /** The jobs in memory, by id. */
  get jobs() { return this.model.jobs; }

  /** Start reading the saved jobs (once); resolves when they are in memory. */
  load() { return this.model.loaded; }

  /** The entry with these ids, or null (after the jobs have loaded). */
  find(jobId, entryId) { return this.model.find(jobId, entryId); }

  // ---- saving (the worksheet's edits, through the model's write queue) ---------------------------
  markDirty() { this.model.markDirty(); }
  markSaved() { this.model.markSaved(); }
  markSaveFailed(err) { this.model.markSaveFailed(err); }
  saveEntryInputs(target, inputs) { return this.model.saveEntryInputs(target, inputs); }

  _showSaveState() {
    for (const el of document.querySelectorAll(".save-state")) {
      el.textContent = this._saveText();
      el.dataset.state = this.model.saveState;
    }
  }

  _saveText() {
    return {
      idle: "",
      saving: "Saving…",
      saved: "Saved on this device",
      memory: "Not stored: device storage unavailable",
      failed: `Not saved: ${this.model.lastSaveError || "storage error"}`,
    }[this.model.saveState];
  }

  /** Save ``job`` after a pause in typing (names and notes are saved as they are typed). */
  _persistSoon(job) {
    clearTimeout(this._jobTimer);
    this.markDirty();
    this._jobTimer = setTimeout(() => this.model.persist(job), 200);
  }

  // ---- the bar above a worksheet ----------------------------------------------------------------
  showBar(target) {
    const bar = this.ctx.$("job-bar");
    clear(bar);
    bar.hidden = false;
    const save = h("span", { id: "save-state", class: "save-state", role: "status", "data-state": this.model.saveState, text: this._saveText() });
    if (this.model.storageError) bar.append(h("p", { class: "msg warn", role: "alert", text: this.model.storageError }));
    if (target) {
      const job = this.jobs.get(target.jobId);
      const entry = this.model.entry(target.jobId, target.entryId);
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
    await this.model.loaded;
    const st = this.ctx.getState();
    let job = this.openJobId && this.jobs.get(this.openJobId);
    if (!job) job = this.model.newestFirst()[0];
    if (!job) job = this.model.newJob();
    this.openJobId = job.id;
    const entry = await this.model.addEntry(job, st.sheet, st.inputs);
    await this.ctx.openSheet(entry.worksheet, { inputs: entry.inputs, target: { jobId: job.id, entryId: entry.id } });
    this.notices.toast(`Saved as “${entry.name}” in “${job.site || "Untitled job"}”. Rename it from the job.`);
  }

  // ---- the jobs view ----------------------------------------------------------------------------
  async show(jobId = null) {
    await this.model.loaded;
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
    const jobs = this.model.newestFirst();
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
        jobs.length ? h("button", { type: "button", class: "btn ghost", onclick: () => this.sharing.exportJobs(jobs) }, "Export all") : null,
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
        this._persistSoon(job);
      });
      return h("div", { class: "field" }, h("label", { for: id, text: label }), inp);
    };
    const addSel = h("select", { id: "add-sheet" }, sheets.map((s) => h("option", { value: s.id, text: s.title })));
    addSel.value = this.ctx.getState().sheet ? this.ctx.getState().sheet.id : sheets[0].id;
    v.append(
      h("p", {}, h("button", { type: "button", class: "btn ghost small", onclick: () => this._renderList() }, "‹ All jobs")),
      h("h1", { id: "jobs-title", text: job.site || "Untitled job" }),
      h("span", { id: "job-save-state", class: "save-state", role: "status", "data-state": this.model.saveState, text: this._saveText() }),
      h("div", { class: "job-fields" }, text("Site name", "site"), text("Date", "date", { type: "date" }), text("Notes", "notes")),
      h("h2", { text: "Entries" }),
    );
    const list = h("ul", { class: "entry-list" });
    job.entries.forEach((e) => {
      const nameId = `entry-name-${e.id}`;
      const name = h("input", { id: nameId, type: "text", value: e.name, maxlength: 200 });
      name.addEventListener("input", () => {
        e.name = name.value;
        this._persistSoon(job);
      });
      list.append(h("li", { class: "entry-card", "data-entry": e.id },
        h("label", { for: nameId, class: "muted", text: `${titleOf(e.worksheet)} — entry name` }), name,
        h("div", { class: "actions" },
          h("button", { type: "button", class: "btn small", onclick: () => this.openEntry(job.id, e.id), "aria-label": `Open entry ${e.name}` }, "Open"),
          h("button", { type: "button", class: "btn ghost small", onclick: () => this.sharing.shareReport(job, e.id), "aria-label": `Share report of ${e.name}` }, "Share"),
          h("button", { type: "button", class: "btn ghost small", onclick: () => this.duplicateEntry(job.id, e.id), "aria-label": `Duplicate entry ${e.name}` }, "Duplicate"),
          h("button", { type: "button", class: "btn ghost small", onclick: () => this.deleteEntry(job.id, e.id), "aria-label": `Delete entry ${e.name}` }, "Delete"))));
    });
    if (!job.entries.length) v.append(h("p", { class: "muted", text: "No entries yet: add one below, or open a worksheet and tap “Save to a job”." }));
    v.append(list,
      h("div", { class: "field add-entry" }, h("label", { for: "add-sheet", text: "New entry from worksheet" }), addSel,
        h("button", { type: "button", class: "btn", onclick: () => this.addEntry(job.id, addSel.value) }, "Add entry")),
      h("h2", { text: "Report and share" }),
      h("div", { class: "actions" },
        h("button", { type: "button", class: "btn", onclick: () => this.sharing.shareReport(job) }, "Share report"),
        h("button", { type: "button", class: "btn ghost", onclick: () => this.sharing.download(job, "html") }, "Report (HTML, print to PDF)"),
        h("button", { type: "button", class: "btn ghost", onclick: () => this.sharing.download(job, "text") }, "Summary (text)"),
        h("button", { type: "button", class: "btn ghost", onclick: () => this.sharing.download(job, "csv") }, "Values (CSV)"),
        h("button", { type: "button", class: "btn ghost", onclick: () => this.sharing.exportJobs([job]) }, "Export job file")),
      h("div", { id: "job-msg", role: "status", "aria-live": "polite" }),
    );
  }

  // ---- what the buttons do: change the model, then redraw ------------------------------------------
  async createJob() {
    const job = await this.model.add(this.model.newJob());
    this.openJob(job.id);
    const site = document.getElementById("job-site");
    if (site) { site.focus(); site.select(); }
  }

  async loadDemo() {
    const demo = await this.ctx.engine.json("demo_job");
    if (!demo) return this.notices.msg("The demo job could not be made.");
    const job = await this.model.add(demo, { freshIds: true });
    this.openJob(job.id);
  }

  async duplicateJob(id) {
    await this.model.duplicateJob(id);
    this._renderList();
  }

  async deleteJob(id) {
    const job = await this.model.deleteJob(id);
    this._renderList();
    this.notices.undo(`Deleted job “${job.site}”.`, async () => {
      await this.model.add(job);
      this._renderList();
    });
  }

  async addEntry(jobId, sheetId) {
    const job = this.jobs.get(jobId);
    const sheet = this.ctx.getState().catalog.find((s) => s.id === sheetId) || { id: sheetId, title: sheetId };
    const entry = await this.model.addEntry(job, { id: sheetId, title: sheet.title });
    this.openEntry(jobId, entry.id);
  }

  async duplicateEntry(jobId, entryId) {
    const job = this.jobs.get(jobId);
    await this.model.duplicateEntry(job, entryId);
    this._renderJob(job);
  }

  async deleteEntry(jobId, entryId) {
    const job = this.jobs.get(jobId);
    const { gone, restore } = await this.model.deleteEntry(job, entryId);
    this._renderJob(job);
    this.notices.undo(`Deleted entry “${gone.name}”.`, async () => {
      await restore();
      this._renderJob(job);
    });
  }

  openEntry(jobId, entryId) {
    const e = this.model.entry(jobId, entryId);
    this.openJobId = jobId;
    this.ctx.openSheet(e.worksheet, { inputs: e.inputs, target: { jobId, entryId } });
  }

  async importFile(file) {
    const jobs = await this.sharing.readJobsFile(file);
    if (!jobs) return;
    let incoming;
    try {
      incoming = await this.model.importJobs(jobs);
    } catch (err) {
      this.notices.msg(`Not imported: ${err.message || err}. Nothing was changed.`, true);
      return;
    }
    this._renderList();
    this.notices.msg(`Imported ${incoming.length} job${incoming.length === 1 ? "" : "s"}.`);
  }
}
