// The remembered result: the engine's last answer for a draft or job entry, kept beside it keyed by the
// build and the exact inputs, and shown on reopening before the engine is up, marked until the engine
// confirms it (app.js keeps and confirms it; see "remembering the last result" there).
//
// When the page opens on the worksheet drawn into index.html (the static form) with the draft it last
// showed, early.js (inline in index.html, run while the page is parsed) has already put the draft's text
// into the form and the remembered answer into the answer bar of the first frame (window.__fpEarly).
// This module adopts that: it draws the full results after the first frame and hands them to the shell
// (takeEarly). The storage names and the inputs' key rule are early.js's, re-exported here.
import { h, clear } from "./dom.js";
import { renderResults, STATUS_WORD } from "./render.js";

/** What early.js did before the first frame, and the names it owns (the build inlines it in index.html). */
const E = window.__fpEarly;
export const REMEMBERED = E.REMEMBERED; // localStorage: the newest remembered result {slot, build, inputs, result, bar}
export const JOURNAL = E.JOURNAL; // localStorage: the open draft's inputs {sheet, target, inputs} (app.js)
/** This build's name (engine.json's SHA-256, written into index.html by the build), or null. */
export const BUILD = (document.querySelector('meta[name="fp-build"]') || {}).content || null;
const $ = (id) => document.getElementById(id);
/** Start-up figures (window.fieldphasor.perf, the same object once app.js runs; the benchmark and tests
 * read them). ``early``: whether early.js drew a remembered answer before the first frame, "drawn" or "none". */
export const perf = {};
window.fieldphasor = window.fieldphasor || { perf };

/** The exact inputs as one string: the worksheet and each field's text, in field-name order (early.js). */
export const inputsKey = E.inputsKey;
export const readLocal = E.readLocal;

// ---- the answer bar -----------------------------------------------------------------
// The headline answer sits above the form and, on a phone, stays in view (sticky under the top of
// the screen, app.css) while the user types lower down; it links to all the results. It is
// announced politely, and only when what it says changes: typing that leaves the answer as it was
// says nothing. Nothing here moves the focus.
let announced = "";
export function announce(text) {
  if (text !== announced) $("announce").textContent = announced = text;
}
/** The answer bar's words and status for an answer (kept with a remembered result for early.js). */
export function answerBar(res) {
  const first = res.ok && (res.results || []).find((r) => r.key);
  // build.py (pending_headline_size) sizes the placeholder with this wording
  if (!first) return { text: "", status: "", answer: "" };
  const answer = `${first.label}: ${first.display}${first.status ? ` · ${STATUS_WORD[first.status] || first.status}` : ""}`;
  return { text: `${answer} — all results ↓`, status: first.status || "", answer };
}
export function showAnswerBar(res, remembered = false) {
  const first = (res.results || []).find((r) => r.key);
  const head = $("headline");
  head.hidden = !res.ok || !first;
  head.removeAttribute("data-pending");
  const bar = answerBar(res);
  if (first) head.textContent = bar.text;
  head.dataset.status = bar.status;
  const nErr = Object.keys(res.field_errors || {}).length;
  announce(remembered ? `Remembered result, being confirmed. ${first ? `${first.label}: ${first.display}` : ""}` : res.ok ? `Updated. ${first ? `${first.label}: ${first.display}` : ""}` : `${nErr || "An"} input${nErr === 1 ? "" : "s"} need${nErr === 1 ? "s" : ""} attention. ${Object.values(res.field_errors || {}).join(" ")} ${res.error || ""}`);
}

/** The engine pill's words while it starts: "Checking…" while a remembered result is on screen (on a
 * phone the headline's own mark can be clipped by its three-line clamp; the pill always shows). */
export const startingWords = () => ($("results").hasAttribute("data-remembered") ? E.CHECKING : "Starting…");

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
  if (!head.hasAttribute("data-pending")) head.append(h("span", { class: "remembered-mark", text: E.MARK }));
  $("results-body").prepend(h("p", { class: "msg remembered-mark", text: E.NOTE }));
}

/** The inputs changed while a remembered result was on screen: take it away and say the answer is
 * pending (the headline keeps its size, so the form does not move). */
export function showPendingAnswer() {
  markRemembered(false);
  const head = $("headline");
  const kept = head.querySelector(".pending-size"); // early.js's pending answer, if it came first
  const size = kept ? kept.textContent : head.textContent;
  if (!head.hidden) clear(head).append(h("span", { class: "pending-msg", text: E.PENDING }), h("span", { class: "pending-size", "aria-hidden": "true", text: size }));
  if (!head.hidden) head.setAttribute("data-pending", "");
  clear($("results-body")).append(h("p", { class: "muted pending-note", text: E.PENDING_NOTE }));
  $("results").dataset.ok = "pending";
  announce("Answer pending.");
}

/** Draw a remembered result (results, answer bar, mark); ``onLink`` follows a link between worksheets. */
function drawRemembered(res, onLink) {
  renderResults($("results-body"), res, { onLink });
  showAnswerBar(res, true);
  $("results").dataset.ok = String(!!res.ok);
  markRemembered(true);
}

// ---- before the shell: what early.js drew --------------------------------------------------
// E.state: "off" (nothing drawn), "drawn", "withdrawn" (an edit in the static form took it away),
// "taken" (the shell has taken over).

/** The full results of the answer early.js put in the answer bar, drawn after the first frame (their
 * layout costs a slow phone more than the form itself), or when the shell takes over, if sooner. */
let bodyDrawn;
const bodySettled = new Promise((res) => { bodyDrawn = res; }); // the shell waits for it (at most two frames)
function drawBody() {
  if (E.state === "drawn") { // not when withdrawn meanwhile: the pending answer stays
    drawRemembered(E.result, (link) => E.link && E.link(link));
    perf.rememberedBodyShown = performance.now();
  }
  bodyDrawn();
}
if (E.state === "drawn" || E.state === "withdrawn") {
  perf.rememberedEarly = true;
  perf.rememberedShown = E.shown;
  // the frame that painted it: the first one (its callbacks ran at E.framedAt, just before it was drawn)
  if (E.framed) perf.rememberedPainted = E.framedAt;
  else requestAnimationFrame(() => { perf.rememberedPainted = performance.now(); });
  E.onWithdraw = showPendingAnswer;
  if (E.state === "withdrawn") showPendingAnswer(); // typed in before this ran: the whole pending answer
  requestAnimationFrame(E.framed ? drawBody : () => requestAnimationFrame(drawBody));
} else bodyDrawn();
perf.early = perf.rememberedEarly ? "drawn" : "none";

/** The shell takes over (once), after a draw under way: the result drawn before it is returned
 * ({slot, key, result, withdrawn}), or null. ``onLink`` then follows the drawn result's links. */
export async function takeEarly(onLink) {
  if (E.state === "taken") return null;
  await bodySettled;
  const was = E.state;
  E.state = "taken";
  E.link = onLink;
  if (E.stop) E.stop();
  if (was !== "drawn" && was !== "withdrawn") return null;
  return { slot: E.slot, key: E.key, result: E.result, withdrawn: was === "withdrawn" };
}
