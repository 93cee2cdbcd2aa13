// The shell: starts the engine at once, renders the chosen worksheet from the catalog,
// autosaves what is typed, and shows results. No engineering logic lives here.
import { Engine, Latest } from "./engine.js";
import { h, clear } from "./dom.js";
import { renderForm, renderResults } from "./render.js";
import { store } from "./store.js";
import { Jobs } from "./jobs.js";

// First thing: the interpreter boots while the page paints. "?installer=micropip" in the page
// address selects the micropip install path (measured in DEVELOPERS.md).
const engine = new Engine(`./worker.js${new URLSearchParams(location.search).get("installer") === "micropip" ? "?installer=micropip" : ""}`);
const $ = (id) => document.getElementById(id);
const DEBOUNCE_MS = 120;
const DEFAULT_SHEET = "correction";

const state = {
  catalog: [],
  sheet: null,
  inputs: {},
  form: null,
  lastShown: "",
  timer: 0,
  target: null, // {jobId, entryId} when editing a job entry; null for the worksheet's own draft
  editSeq: 0, // bumped on every edit or sheet change
  shownSeq: -1, // the editSeq whose result is on screen
};
window.fieldphasor = { engine, state, perf: {} };

// ---- engine status -------------------------------------------------------------------------
const ENGINE_TEXT = { starting: "Starting engine…", ready: "Engine ready", failed: "Engine failed" };
function showEngine() {
  const el = $("engine");
  el.dataset.state = engine.state;
  el.textContent = engine.state === "failed" ? `Engine failed: ${engine.detail}` : ENGINE_TEXT[engine.state];
}
engine.addEventListener("state", () => {
  showEngine();
  if (engine.state === "ready") {
    window.fieldphasor.perf.engineReady = performance.now();
    scheduleCompute(0);
  }
});

// ---- theme -----------------------------------------------------------------------------------
const THEMES = ["auto", "light", "dark", "sun"];
const THEME_NAMES = { auto: "auto", light: "light", dark: "dark", sun: "sunlight" };
function applyTheme(t) {
  document.documentElement.dataset.theme = t;
  const b = $("theme-btn");
  b.textContent = `Theme: ${THEME_NAMES[t]}`;
  b.setAttribute("aria-label", `Colour theme: ${THEME_NAMES[t]}. Change theme`);
}
$("theme-btn").addEventListener("click", () => {
  const t = THEMES[(THEMES.indexOf(document.documentElement.dataset.theme || "auto") + 1) % THEMES.length];
  applyTheme(t);
  try { localStorage.setItem("fp-theme", t); } catch { /* storage off: theme lasts this visit */ }
});
try { applyTheme(localStorage.getItem("fp-theme") || "auto"); } catch { applyTheme("auto"); }

// ---- computing -------------------------------------------------------------------------------
const computer = new Latest(async ({ sheetId, inputs, t0, seq }) => {
  const res = await engine.json("compute", { worksheet: sheetId, inputs });
  if (!state.sheet || state.sheet.id !== sheetId) return;
  showResult(res);
  state.shownSeq = seq;
  const p = window.fieldphasor.perf;
  p.lastComputeMs = performance.now() - t0;
  if (!p.firstResult) p.firstResult = performance.now();
  p.computeCount = (p.computeCount || 0) + 1;
  document.dispatchEvent(new CustomEvent("fp-result", { detail: { sheet: sheetId, ok: res.ok } }));
});

function scheduleCompute(delay = DEBOUNCE_MS) {
  clearTimeout(state.timer);
  state.timer = setTimeout(() => {
    if (!state.sheet || engine.state !== "ready") return;
    computer.push({ sheetId: state.sheet.id, inputs: { ...state.inputs }, t0: performance.now(), seq: state.editSeq });
  }, delay);
}

function showResult(res) {
  state.form.showErrors(res.field_errors || {});
  const text = JSON.stringify(res);
  if (text === state.lastShown) return; // unchanged: leave the DOM alone
  state.lastShown = text;
  state.lastResult = res;
  renderResults($("results-body"), res, { onLink: followLink });
  // The headline answer sits above the form, so a phone user sees it without scrolling.
  const first = (res.results || []).find((r) => r.key);
  const head = $("headline");
  head.hidden = !res.ok || !first;
  if (first) head.textContent = `${first.label}: ${first.display} — all results ↓`;
  const nErr = Object.keys(res.field_errors || {}).length;
  const key = (res.results || []).filter((r) => r.key).map((r) => `${r.label} ${r.display}`).join("; ");
  $("announce").textContent = res.ok ? `Updated. ${key}` : `${nErr || "An"} input${nErr === 1 ? "" : "s"} need${nErr === 1 ? "s" : ""} attention. ${Object.values(res.field_errors || {}).join(" ")} ${res.error || ""}`;
  $("results").dataset.ok = String(!!res.ok);
}

// ---- saving what is typed ---------------------------------------------------------------------
// Every edit is written at once to a synchronous journal (localStorage), then to IndexedDB; a
// write in flight is followed by one more with the newest inputs. A reload or a killed tab
// therefore loses nothing, even in the milliseconds before IndexedDB commits.
const JOURNAL = "fp-journal";
let saving = false;
let saveAgain = false;
function journalWrite() {
  try {
    localStorage.setItem(JOURNAL, JSON.stringify({ sheet: state.sheet.id, target: state.target, inputs: state.inputs }));
  } catch { /* storage off or full: IndexedDB (or memory) still holds the inputs */ }
}
function journalFor(sheetId, target) {
  try {
    const j = JSON.parse(localStorage.getItem(JOURNAL) || "null");
    if (j && j.sheet === sheetId && JSON.stringify(j.target || null) === JSON.stringify(target || null)) return j.inputs;
  } catch { /* unreadable journal: ignore */ }
  return null;
}
function scheduleSave() {
  journalWrite();
  jobs.markDirty();
  saveNow();
}
async function saveNow() {
  if (!state.sheet) return;
  if (saving) { saveAgain = true; return; }
  saving = true;
  try {
    do {
      saveAgain = false;
      const inputs = { ...state.inputs };
      try {
        if (state.target) await jobs.saveEntryInputs(state.target, inputs);
        else await store.putDraft(state.sheet.id, inputs);
        jobs.markSaved();
      } catch (err) {
        jobs.markSaveFailed(err);
      }
    } while (saveAgain);
  } finally {
    saving = false;
  }
}
addEventListener("pagehide", saveNow);
document.addEventListener("visibilitychange", () => { if (document.visibilityState === "hidden") saveNow(); });

// ---- worksheets --------------------------------------------------------------------------------
async function openSheet(id, { inputs = null, target = null } = {}) {
  const decl = state.catalog.find((s) => s.id === id) || state.catalog.find((s) => s.id === DEFAULT_SHEET) || state.catalog[0];
  if (state.sheet) await saveNow();
  state.sheet = decl;
  state.target = target;
  state.lastShown = "";
  state.lastResult = null;
  $("headline").hidden = true;
  state.editSeq++;
  let saved = inputs;
  if (!saved && !target) {
    try { saved = await store.getDraft(decl.id); } catch { saved = null; }
  }
  const journal = journalFor(decl.id, target);
  const recovered = journal && JSON.stringify(journal) !== JSON.stringify(saved || {});
  if (journal && (!inputs || target)) saved = journal; // the journal is never older than the store
  state.inputs = saved && typeof saved === "object" ? { ...saved } : {};
  $("sheet-title").textContent = decl.title;
  $("sheet-summary").textContent = decl.summary;
  $("sheet-pick").value = decl.id;
  state.form = renderForm($("form"), decl, state.inputs, (name, text) => {
    state.inputs[name] = text;
    state.editSeq++;
    scheduleSave();
    scheduleCompute();
  });
  clear($("results-body")).append(h("p", { class: "muted", text: engine.state === "ready" ? "Computing…" : "The engine is starting; results appear here in a moment. You can type now." }));
  jobs.showBar(target);
  showView("sheet");
  const want = target ? `#/entry/${target.jobId}/${target.entryId}` : `#/sheet/${decl.id}`;
  if (location.hash !== want) history.replaceState(null, "", want);
  if ((inputs && !target) || recovered) scheduleSave();
  scheduleCompute(0);
}

function followLink(link) {
  openSheet(link.worksheet, { inputs: link.inputs });
}

function showView(which) {
  $("sheet-view").hidden = which !== "sheet";
  $("jobs-view").hidden = which !== "jobs";
}

const jobs = new Jobs({ engine, store, $, openSheet, showView, getState: () => state, saveNow });
window.fieldphasor.jobs = jobs;

$("sheet-pick").addEventListener("change", (e) => openSheet(e.target.value));
$("jobs-btn").addEventListener("click", () => { saveNow(); jobs.show(state.target ? state.target.jobId : null); });
$("form").addEventListener("submit", (e) => e.preventDefault());

// ---- start -----------------------------------------------------------------------------------
async function start() {
  state.catalog = await (await fetch("./catalog.json")).json();
  const pick = $("sheet-pick");
  for (const s of state.catalog) pick.append(h("option", { value: s.id, text: s.title }));
  const m = location.hash.match(/^#\/sheet\/([\w-]+)/);
  const e = location.hash.match(/^#\/entry\/([\w-]+)\/([\w-]+)/);
  const entry = e && (await jobs.find(e[1], e[2]));
  if (entry) {
    await openSheet(entry.worksheet, { inputs: entry.inputs, target: { jobId: e[1], entryId: e[2] } });
  } else if (location.hash.startsWith("#/job")) {
    const j = location.hash.match(/^#\/job\/([\w-]+)/);
    await openSheet(DEFAULT_SHEET);
    await jobs.show(j ? j[1] : null);
  } else {
    await openSheet(m ? m[1] : DEFAULT_SHEET);
  }
  window.fieldphasor.perf.inputReady = performance.now();
  document.documentElement.dataset.inputReady = "1";
  showEngine();
  if (navigator.storage && navigator.storage.persist) {
    navigator.storage.persisted().then((p) => p || navigator.storage.persist()).catch(() => {});
  }
}
start();

// ---- offline and updates -----------------------------------------------------------------------
let updateRequested = false;
let reloading = false;
if ("serviceWorker" in navigator) {
  navigator.serviceWorker.register("./sw.js").then((reg) => {
    const offer = (w) => {
      if (!w || !navigator.serviceWorker.controller) return; // first install: nothing to replace
      $("update-bar").hidden = false;
      $("update-btn").onclick = async () => { updateRequested = true; await saveNow(); w.postMessage("skip-waiting"); };
    };
    if (reg.waiting) offer(reg.waiting);
    reg.addEventListener("updatefound", () => {
      const w = reg.installing;
      w && w.addEventListener("statechange", () => { if (w.state === "installed") offer(w); });
    });
  }).catch((err) => console.warn("offline support unavailable:", err));
  navigator.serviceWorker.addEventListener("controllerchange", () => {
    if (reloading || !updateRequested) return; // the first install also changes controller: no reload then
    reloading = true;
    location.reload();
  });
}
