// Getting jobs off the device and telling the user how it went: job files (export, reading an
// import), reports as downloads, sharing by Web Share or an e-mail draft, and the messages and
// toasts (with Undo) of the jobs screens. Reports and the file format are made in Python
// (app.report, app.jobs), reached through the engine.
import { h, clear } from "./dom.js";

const MAILTO_LIMIT = 1900; // keep the whole mailto: URL under ~2000 characters (common mail-client limit)
const UNDO_MS = 10000;

/** Messages: in the jobs screen's status line when it is shown, else as a toast. */
export class Notices {
  msg(text, isError = false, extra = []) {
    const el = document.getElementById("job-msg");
    if (!el) return this.toast(text);
    clear(el).append(h("p", { class: `msg ${isError ? "fail" : "warn"}`, text }), ...extra);
  }

  toast(text, action) {
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

  /** A toast with an Undo button that runs ``fn`` once. */
  undo(text, fn) {
    const btn = h("button", { type: "button", class: "btn small", onclick: async () => { btn.disabled = true; await fn(); document.getElementById("toast").hidden = true; } }, "Undo");
    this.toast(text, btn);
  }
}

export class Sharing {
  constructor(engine, notices) {
    this.engine = engine;
    this.notices = notices;
    this.lastMailto = null;
  }

  // ---- files ----------------------------------------------------------------------------------------
  async exportJobs(jobs) {
    const res = await this.engine.json("export_jobs", { jobs });
    this.save(res.text, res.filename, "application/json");
    this.notices.msg(res.ok ? `Exported ${jobs.length} job${jobs.length === 1 ? "" : "s"} to ${res.filename}.` : `Exported, but warning: ${res.error}`);
  }

  /** The jobs in an import file, validated by the engine; null (and the reason shown) if it is not one. */
  async readJobsFile(file) {
    const text = await file.text();
    const res = await this.engine.json("validate_jobs", { text });
    if (!res.ok) {
      this.notices.msg(`Not imported: ${res.error} Nothing was changed.`, true);
      return null;
    }
    return res.jobs;
  }

  save(text, filename, mime) {
    const url = URL.createObjectURL(new Blob([text], { type: mime }));
    const a = h("a", { href: url, download: filename, class: "sr-only" }, filename);
    document.body.append(a);
    a.click();
    setTimeout(() => { URL.revokeObjectURL(url); a.remove(); }, 1000);
  }

  // ---- reports --------------------------------------------------------------------------------------
  async _report(job, format, entryId, extra = {}) {
    const options = { ...(entryId ? { entry_id: entryId } : {}), ...extra };
    const res = await this.engine.json("report", { job, format, options });
    if (!res.ok) throw new Error(res.error);
    return res;
  }

  async download(job, format, entryId) {
    try {
      const res = await this._report(job, format, entryId);
      this.save(res.text, res.filename, res.mime);
    } catch (err) {
      this.notices.msg(`The report could not be made: ${err.message}`, true);
    }
  }

  /** Web Share with the HTML report attached where the device can; else a mailto: draft. */
  async shareReport(job, entryId) {
    let html, text;
    try {
      [html, text] = await Promise.all([this._report(job, "html", entryId), this._report(job, "text", entryId, { detail: "brief" })]);
    } catch (err) {
      this.notices.msg(`The report could not be made: ${err.message}`, true);
      return;
    }
    const file = new File([html.text], html.filename, { type: html.mime });
    if (navigator.canShare && navigator.share && navigator.canShare({ files: [file] })) {
      try {
        await navigator.share({ files: [file], title: html.title, text: html.title });
        this.notices.msg("Shared.");
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
    this.notices.msg(msg, false, cut ? [
      h("button", { type: "button", class: "btn small", onclick: () => this.save(html.text, html.filename, html.mime) }, "Download full report"),
    ] : []);
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
