// The remembered result: the engine's last answer for a draft or job entry, kept beside it keyed by the
// build and the exact inputs, and shown on reopening before the engine is up, marked until the engine
// confirms it (app.js keeps and confirms it; see "remembering the last result" there).
//
// index.html lists this module before app.js, so when the page opens on the worksheet drawn into it
// (the static form) with the draft it last showed, the result is drawn just after the first frame,
// without waiting for the shell's other modules and the catalog. It is drawn only when the inputs on
// screen are the draft's, the draft (the journal) is the one the result was computed for, and the build
// (engine.json's text) is the one that computed it. The shell then adopts it (takeEarly).
import { h, clear } from "./dom.js";
import { renderResults, STATUS_WORD } from "./render.js";

export const REMEMBERED = "fp-remembered"; // localStorage: the newest remembered result {slot, build, inputs, result}
export const JOURNAL = "fp-journal"; // localStorage: the open draft's inputs {sheet, target, inputs} (app.js)
const $ = (id) => document.getElementById(id);
/** Start-up figures (window.fieldphasor.perf, the same object once app.js runs; the benchmark and tests
 * read them). ``early``: what this module did before the shell, "drawn" or "none". */
export const perf = {};
window.fieldphasor = window.fieldphasor || { perf };

/** The exact inputs as one string: the worksheet and each field's text, in field-name order. */
export const inputsKey = (sheetId, inputs) => JSON.stringify([sheetId, Object.keys(inputs).sort().map((k) => [k, inputs[k]])]);

export function readLocal(key) {
  try { return JSON.parse(localStorage.getItem(key) || "null"); } catch { return null; }
}

// ---- the answer bar -----------------------------------------------------------------
// The headline answer sits above the form and, on a phone, stays in view (sticky under the top of
// the screen, app.css) while the user types lower down; it links to all the results. It is
// announced politely, and only when what it says changes: typing that leaves the answer as it was
// says nothing. Nothing here moves the focus.
let announced = "";
export function announce(text) {
  if (text !== announced) $("announce").textContent = announced = text;
}
export function showAnswerBar(res, remembered = false) {
  const first = (res.results || []).find((r) => r.key);
  const head = $("headline");
  head.hidden = !res.ok || !first;
  head.removeAttribute("data-pending");
  // build.py (pending_headline_size) sizes the placeholder with this wording
  if (first) head.textContent = `${first.label}: ${first.display}${first.status ? ` · ${STATUS_WORD[first.status] || first.status}` : ""} — all results ↓`;
  head.dataset.status = (first && first.status) || "";
  const nErr = Object.keys(res.field_errors || {}).length;
  announce(remembered ? `Remembered result, being confirmed. ${first ? `${first.label}: ${first.display}` : ""}` : res.ok ? `Updated. ${first ? `${first.label}: ${first.display}` : ""}` : `${nErr || "An"} input${nErr === 1 ? "" : "s"} need${nErr === 1 ? "s" : ""} attention. ${Object.values(res.field_errors || {}).join(" ")} ${res.error || ""}`);
}

/** The engine pill's words while it starts: "Checking…" while a remembered result is on screen (on a
 * phone the headline's own mark can be clipped by its three-line clamp; the pill always shows). */
export const startingWords = () => ($("results").hasAttribute("data-remembered") ? "Checking…" : "Starting…");

/** Mark the result on screen as remembered (not yet confirmed), or clear the mark. */
export function markRemembered(on) {
  const head = $("headline");
  $("results").toggleAttribute("data-remembered", on);
  head.toggleAttribute("data-remembered", on);
  const pill = $("engine");
  if (pill.dataset.state === "starting") pill.textContent = startingWords();
  for (const el of document.querySelectorAll(".remembered-mark")) el.remove();
  if (!on) return;
  // on the headline's border, out of the flow: the mark does not change the box's size
  if (!head.hasAttribute("data-pending")) head.append(h("span", { class: "remembered-mark", text: "Remembered — confirming…" }));
  $("results-body").prepend(h("p", { class: "msg remembered-mark", text: "Remembered result for these inputs, shown while the engine starts; it is being confirmed." }));
}

/** The inputs changed while a remembered result was on screen: take it away and say the answer is
 * pending (the headline keeps its size, so the form does not move). */
export function showPendingAnswer() {
  markRemembered(false);
  const head = $("headline");
  const size = head.textContent;
  if (!head.hidden) clear(head).append(h("span", { class: "pending-msg", text: "Answer pending…" }), h("span", { class: "pending-size", "aria-hidden": "true", text: size }));
  if (!head.hidden) head.setAttribute("data-pending", "");
  clear($("results-body")).append(h("p", { class: "muted pending-note", text: "The inputs changed: their answer appears here once the engine has computed it." }));
  $("results").dataset.ok = "pending";
  announce("Answer pending.");
}

/** Draw a remembered result (results, answer bar, mark); ``onLink`` follows a link between worksheets. */
export function drawRemembered(res, onLink) {
  renderResults($("results-body"), res, { onLink });
  showAnswerBar(res, true);
  $("results").dataset.ok = String(!!res.ok);
  markRemembered(true);
}

// ---- before the shell: the static form's draft ---------------------------------------------
// state: "off" (nothing to draw), "waiting" (to be drawn after the first frame), "drawn", "withdrawn"
// (an edit in the static form took it away), "taken" (the shell has taken over).
const early = { state: "off", slot: "", key: "", result: null, link: null };

/** A static field's control, the value it shows, and the one index.html served (the worksheet's default). */
function fieldValues(w) {
  const radios = [...w.querySelectorAll("input[type=radio]")];
  if (radios.length) {
    const on = radios.find((r) => r.checked);
    const served = radios.find((r) => r.defaultChecked);
    return [null, on ? on.value : "", served ? served.value : ""];
  }
  const el = w.querySelector("select, input[type=text], textarea");
  if (!el) return null;
  if (el.tagName === "SELECT") {
    const served = [...el.options].find((o) => o.defaultSelected) || el.options[0];
    return [null, el.value, served ? served.value : ""];
  }
  return [el, el.value, el.defaultValue];
}

/** The draft the page opens on, when it is the static form's worksheet and the journal holds it. */
function openingDraft() {
  const form = $("form");
  const sheet = form && form.dataset.static;
  if (!sheet) return null; // no static form, or the shell has taken it
  const m = location.hash.match(/^#\/sheet\/([\w-]+)/);
  if (m ? m[1] !== sheet : location.hash) return null; // another worksheet, a job entry or the jobs screen
  const journal = readLocal(JOURNAL);
  if (!journal || journal.sheet !== sheet || journal.target || !journal.inputs || typeof journal.inputs !== "object") return null;
  return { form, slot: `sheet:${sheet}`, key: inputsKey(sheet, journal.inputs), inputs: journal.inputs };
}

/** Whether every static field shows the draft's value (a field the draft does not hold, the default it
 * was served with). With ``fill``, an untouched text field is first given the draft's text (as the shell
 * will); a choice that differs is left to the shell, which also shows and hides the fields it governs. */
function showsDraft(form, inputs, fill) {
  const todo = [];
  for (const w of form.querySelectorAll(".field[data-field]")) {
    const v = fieldValues(w);
    if (!v) continue;
    const [el, now, served] = v;
    const want = Object.hasOwn(inputs, w.dataset.field) ? String(inputs[w.dataset.field]) : served;
    if (now === want) continue;
    if (!fill || !el || now !== served) return false; // typed in, or a choice: all or nothing
    todo.push([el, want]);
  }
  for (const [el, want] of todo) el.value = want;
  return true;
}

function withdraw() {
  if (early.state !== "drawn") return;
  early.state = "withdrawn";
  showPendingAnswer();
}

const frame = () => new Promise((res) => requestAnimationFrame(res));

async function earlyRecall() {
  // Nothing here runs before the first frame (which shows the form), so it never delays it: boot.js
  // notes that frame (a frame callback it asked for has run) when it ran before it.
  const boot = window.__fpBoot;
  if (!(boot && boot.framed)) await frame().then(() => new Promise((res) => setTimeout(res, 0)));
  const d = openingDraft();
  if (!d || !showsDraft(d.form, d.inputs, true)) return;
  const rec = readLocal(REMEMBERED);
  if (!rec || rec.slot !== d.slot || rec.inputs !== d.key || !rec.result || Object.keys(rec.result.field_errors || {}).length) return;
  early.state = "waiting";
  // this build (engine.json's text, which boot.js reads; app.js has the same rule when boot.js is late)
  const buildRead = boot && boot.build ? boot.build : fetch("./engine.json").then((r) => (r.ok ? r.text() : null), () => null);
  // drawn in a frame's callback, so nothing else runs between the drawing and its paint
  const [build] = await Promise.all([buildRead, frame()]);
  const now = openingDraft(); // nothing typed meanwhile, and the same build
  if (early.state !== "waiting" || !build || rec.build !== build.trim() || !now || now.key !== d.key || !showsDraft(now.form, now.inputs, false)) {
    if (early.state === "waiting") early.state = "off";
    return;
  }
  const t0 = performance.now();
  drawRemembered(rec.result, (link) => early.link && early.link(link));
  Object.assign(early, { state: "drawn", slot: d.slot, key: d.key, result: rec.result });
  $("form").addEventListener("input", withdraw);
  $("form").addEventListener("change", withdraw);
  perf.rememberedShown = performance.now();
  perf.rememberedDrawMs = perf.rememberedShown - t0;
  perf.rememberedEarly = true;
  perf.rememberedPainted = perf.rememberedShown; // the frame being drawn paints it now
}
// the shell waits for it (at most the build's read and two frames)
const settled = earlyRecall().catch((err) => { perf.earlyError = String(err); }).then(() => { perf.early = early.state === "drawn" ? "drawn" : "none"; });

/** The shell takes over (once), after a draw under way: the result drawn before it is returned
 * ({slot, key, result, withdrawn}), or null. ``onLink`` then follows the drawn result's links. */
export async function takeEarly(onLink) {
  if (early.state === "taken") return null;
  await settled;
  const was = early.state;
  early.state = "taken";
  early.link = onLink;
  $("form").removeEventListener("input", withdraw);
  $("form").removeEventListener("change", withdraw);
  if (was !== "drawn" && was !== "withdrawn") return null;
  return { slot: early.slot, key: early.key, result: early.result, withdrawn: was === "withdrawn" };
}
