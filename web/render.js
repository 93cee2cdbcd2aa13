// Renders any worksheet from its declaration (fields from Python) and any compute result.
// Worksheet-agnostic: nothing here knows a particular worksheet or formula.
import { h, fromTree, svgNode, clear, reconcile } from "./dom.js";

const unitText = (u) => (u ? ` (${u})` : "");
const STACK_ABOVE_COLUMNS = 3; // a results table with more columns is drawn as cards on a narrow screen

function defaultOf(f) {
  return f.default ?? "";
}

export function currentValue(f, inputs) {
  return Object.prototype.hasOwnProperty.call(inputs, f.name) ? inputs[f.name] : defaultOf(f);
}

export function isVisible(f, fieldsByName, inputs) {
  if (!f.show_when) return true;
  const ctl = fieldsByName[f.show_when.field];
  if (!ctl) return true;
  return isVisible(ctl, fieldsByName, inputs) && f.show_when.in.includes(currentValue(ctl, inputs));
}

function parseRows(text, ncol) {
  try {
    const rows = JSON.parse(text || "[]");
    if (Array.isArray(rows)) return rows.map((r) => (Array.isArray(r) ? r.map((c) => (c == null ? "" : String(c))) : new Array(ncol).fill("")));
  } catch { /* fall through */ }
  return [];
}

/**
 * Draw the form: instantiate the worksheet's form tree (drawn by app/formview.py, the same tree the
 * build writes into index.html), apply the current values, bind behaviour by the tree's data-*
 * hooks. `onChange(name, text)` is called on every edit. Returns helpers to show messages and
 * refresh which fields are visible.
 */
export function renderForm(form, decl, inputs, onChange, { open = [], onToggle = null } = {}) {
  clear(form);
  form.append(...decl.form.map(fromTree));
  const byName = Object.fromEntries(decl.fields.map((f) => [f.name, f]));
  const wrappers = {};
  for (const w of form.querySelectorAll(".field[data-field]")) wrappers[w.dataset.field] = w;
  const sections = bindDisclosures(form, decl, byName, inputs, open, onToggle);
  for (const f of decl.fields) {
    bindField(f, wrappers[f.name], currentValue(f, inputs), (text) => {
      onChange(f.name, text);
      if (decl.fields.some((g) => g.show_when && g.show_when.field === f.name)) refreshVisibility();
    });
  }
  function refreshVisibility() {
    for (const f of decl.fields) wrappers[f.name].hidden = !isVisible(f, byName, inputs);
    for (const fs of form.querySelectorAll("fieldset.group")) {
      fs.hidden = [...fs.querySelectorAll(".field[data-field]")].every((el) => el.hidden);
    }
  }
  refreshVisibility();
  return {
    refreshVisibility,
    showErrors(errors) {
      sections.openFor(Object.keys(errors || {}).filter((n) => wrappers[n] && !wrappers[n].hidden).map((n) => wrappers[n]));
      for (const f of decl.fields) {
        const w = wrappers[f.name];
        const msg = errors[f.name] || "";
        const err = w.querySelector(".err");
        if (err.textContent !== msg) err.textContent = msg;
        err.hidden = !msg;
        w.classList.toggle("invalid", !!msg);
        for (const inp of w.querySelectorAll("input, select, textarea")) {
          if (msg) inp.setAttribute("aria-invalid", "true");
          else inp.removeAttribute("aria-invalid");
        }
      }
    },
    focusField(name) {
      const el = wrappers[name] && wrappers[name].querySelector("input, select, textarea");
      if (el) el.focus();
    },
  };
}

/**
 * The form's disclosures (app/formview.py draws them): a collapsed optional section's
 * button (data-toggle-section, aria-expanded) shows or hides its region and keeps its one-line
 * summary up to date; a field's help button (data-help) shows or hides its help. `open`: keys of
 * sections the user opened before (the shell remembers them); `onToggle(key, isOpen)` on each tap.
 */
function bindDisclosures(form, decl, byName, inputs, open, onToggle) {
  const sectionFields = new Map();
  for (const fs of form.querySelectorAll("fieldset.group[data-section]")) {
    const names = [...fs.querySelectorAll(".field[data-field]")].map((w) => w.dataset.field);
    sectionFields.set(fs, names.map((n) => byName[n]));
    const btn = fs.querySelector("[data-toggle-section]");
    if (open.includes(fs.dataset.section)) setOpen(fs, true);
    btn.addEventListener("click", () => {
      const now = btn.getAttribute("aria-expanded") !== "true";
      setOpen(fs, now);
      if (onToggle) onToggle(fs.dataset.section, now);
    });
  }
  for (const b of form.querySelectorAll("button[data-help]")) {
    b.addEventListener("click", () => {
      const now = b.getAttribute("aria-expanded") !== "true";
      b.setAttribute("aria-expanded", String(now));
      form.querySelector(`#${CSS.escape(b.getAttribute("aria-controls"))}`).hidden = !now;
    });
  }
  const refreshSummaries = () => {
    for (const [fs, fields] of sectionFields) {
      const el = fs.querySelector("[data-summary]");
      const text = summaryOf(fields, byName, inputs);
      if (el.textContent !== text) el.textContent = text;
    }
  };
  refreshSummaries();
  form.addEventListener("input", refreshSummaries);
  form.addEventListener("change", refreshSummaries);
  form.addEventListener("click", (e) => { if (e.target.closest("[data-rows], [data-set], [data-add-row]")) refreshSummaries(); });
  return {
    /** Open the collapsed sections holding these field wrappers; scroll to the first one opened. */
    openFor(wrappers) {
      let first = null;
      for (const w of wrappers) {
        const fs = w.closest("fieldset.group[data-section]");
        if (fs && fs.querySelector("[data-toggle-section]").getAttribute("aria-expanded") !== "true") {
          setOpen(fs, true);
          first = first || w;
        }
      }
      if (first) first.scrollIntoView({ block: "center" });
    },
  };
}

function setOpen(fs, isOpen) {
  fs.querySelector("[data-toggle-section]").setAttribute("aria-expanded", String(isOpen));
  fs.querySelector(".sec-body").hidden = !isOpen;
}

/** A collapsed section's one-line summary from its fields' current texts: the rule of summary() in app/formview.py. */
export function summaryOf(fields, byName, inputs) {
  const parts = [];
  for (const f of fields) {
    if (!isVisible(f, byName, inputs)) continue;
    const text = String(currentValue(f, inputs) ?? "").trim();
    if (f.kind === "table") {
      const n = parseRows(text, (f.columns || []).length).length;
      parts.push(`${n} row${n === 1 ? "" : "s"}`);
    } else if (!text) continue;
    else if (f.kind === "choice") parts.push((f.options.find((o) => o.value === text) || { label: text }).label);
    else if (f.unit) parts.push(`${text} ${f.unit}`);
    else parts.push(`${f.label} ${text}`);
  }
  return parts.join(", ") || "nothing entered";
}

/**
 * Put the value into a field's drawn controls (as their default state, so the DOM reads as the
 * markup for these values would) and listen for edits: by element type and data-* hook only.
 */
function bindField(f, w, value, set) {
  const text = value == null ? "" : String(value);
  const table = w.querySelector("[data-table]");
  if (table) {
    renderTable(f, text, set, table);
    return;
  }
  const radios = w.querySelectorAll("input[type=radio]");
  for (const r of radios) {
    r.defaultChecked = r.value === text;
    r.addEventListener("change", () => r.checked && set(r.value));
  }
  const select = w.querySelector("select");
  if (select) {
    for (const o of select.options) o.defaultSelected = o.value === text;
    select.addEventListener("change", () => set(select.value));
  }
  const control = w.querySelector("input[type=text], textarea");
  if (!control) return;
  control.addEventListener("input", () => set(control.value));
  const file = w.querySelector("input[type=file][data-file]");
  if (file) {
    const box = holder(w, control);
    box.put(text, "", true);
    file.addEventListener("change", () => openFile(f, file, box, set));
  } else control.defaultValue = text;
  for (const b of w.querySelectorAll("button[data-insert]")) b.addEventListener("click", () => insertAtCursor(control, b.dataset.insert, set));
  for (const b of w.querySelectorAll("button[data-set]")) {
    b.addEventListener("click", () => { control.value = b.dataset.set; set(b.dataset.set); control.focus(); });
  }
}

const sizeText = (n) => (n >= 1e6 ? `${(n / 1e6).toFixed(1)} MB` : n >= 1e3 ? `${(n / 1e3).toFixed(0)} kB` : `${n} bytes`);

/**
 * A text longer than this is held, not put into a file widget's text area: laying out megabytes of
 * text holds the page's main thread for seconds (a 6 MB logger file, two years of 5-minute rows, held
 * a phone-sized page for over 10 s). The text still goes to the engine and into the draft; the file
 * line says what is held, and a button puts it into the text area for whoever wants to read or edit it.
 */
export const SHOWN_CHARS = 200_000;

/**
 * A file widget's text area, its file line (`info`) and its "Show the text" button. put(text, what, first) shows a text, or
 * holds a long one; `first`: the value the form is drawn with (the text area's default, as markup).
 */
function holder(w, control) {
  const info = w.querySelector("[data-file-info]");
  const show = w.querySelector("button[data-show-text]");
  let held = null;
  let named = ""; // the open file's name and size, when a file was opened
  show.addEventListener("click", () => {
    control.hidden = false;
    show.hidden = true;
    control.value = held;
    held = null;
    info.textContent = named;
    control.setSelectionRange(0, 0); // from its first line
    control.focus();
    control.scrollTop = 0;
  });
  return {
    info,
    put(t, what, first = false) {
      named = what;
      const big = t.length > SHOWN_CHARS;
      held = big ? t : null;
      control.hidden = big;
      show.hidden = !big;
      if (first) control.defaultValue = big ? "" : t;
      else control.value = big ? "" : t;
      if (!big) {
        info.textContent = what;
        return;
      }
      let lines = 1;
      for (let i = t.indexOf("\n"); i !== -1 && i < t.length - 1; i = t.indexOf("\n", i + 1)) lines++;
      info.textContent = `${what || `${sizeText(t.length)} of text`}: ${lines.toLocaleString("en")} lines held, not shown ` +
        "(showing them can hold a phone for seconds).";
    },
  };
}

/** A file chosen in a "file" widget, read as text into its text area (Python judges the text). */
async function openFile(f, input, box, set) {
  const info = box.info;
  const chosen = input.files && input.files[0];
  if (!chosen) return;
  const what = `${chosen.name}, ${sizeText(chosen.size)}`;
  // a file 4 bytes per character over the field's limit cannot fit: not read into memory at all
  if (f.max_chars && chosen.size > 4 * f.max_chars) {
    info.textContent = `${what}: too large to open here (at most ${sizeText(f.max_chars)} of text).`;
    input.value = "";
    return;
  }
  info.textContent = `${what}: reading…`;
  try {
    const text = await chosen.text();
    box.put(text, what);
    set(text);
  } catch {
    info.textContent = `${what}: the file could not be read.`;
  }
  input.value = ""; // the same file may be chosen again after an edit
}

function insertAtCursor(input, text, set) {
  const start = input.selectionStart ?? input.value.length;
  const end = input.selectionEnd ?? input.value.length;
  input.value = input.value.slice(0, start) + text + input.value.slice(end);
  input.setSelectionRange(start + text.length, start + text.length);
  input.focus();
  set(input.value);
}

/**
 * The rows of a drawn table (its head, body, foot and paste panel come from the tree), from its
 * column declarations. On a phone each row is one line (a button with the row's values) that opens
 * the row's cells for editing (app.css); on a wider screen the cells are a grid. Rows can be added,
 * removed, moved up, and pasted several at once (splitPasted).
 */
function renderTable(f, value, set, box) {
  const cols = f.columns;
  let rows = parseRows(value, cols.length);
  const opened = new Set();
  const body = box.querySelector("[data-rows]");
  const count = box.querySelector("[data-row-count]");
  const emit = () => {
    count.textContent = `${rows.length} row${rows.length === 1 ? "" : "s"}`;
    set(JSON.stringify(rows));
  };
  function rowEl(i) {
    const r = rows[i];
    const el = h("div", { class: opened.has(i) ? "tbl-row open" : "tbl-row" });
    const sum = h("button", { type: "button", class: "row-sum", "aria-expanded": String(opened.has(i)), text: rowSummary(i) });
    sum.addEventListener("click", () => {
      const now = !opened.has(i);
      if (now) opened.add(i); else opened.delete(i);
      el.classList.toggle("open", now);
      sum.setAttribute("aria-expanded", String(now));
      if (now) { const first = el.querySelector(".tbl-cell input, .tbl-cell select"); if (first) first.focus(); }
    });
    el.append(sum);
    cols.forEach((c, j) => {
      const lab = `Row ${i + 1}, ${c.label}${c.unit ? " (" + c.unit + ")" : ""}`;
      let inp;
      if (c.kind === "choice") {
        inp = h("select", { "aria-label": lab });
        for (const o of c.options) inp.append(h("option", { value: o.value, selected: o.value === r[j], text: o.label }));
        if (!r[j]) r[j] = c.options[0].value;
        inp.addEventListener("change", () => { rows[i][j] = inp.value; sum.textContent = rowSummary(i); emit(); });
      } else {
        inp = h("input", { type: "text", value: r[j] ?? "", "aria-label": lab, inputmode: c.kind === "number" ? "decimal" : "text", spellcheck: "false", autocapitalize: "off" });
        inp.addEventListener("input", () => { rows[i][j] = inp.value; sum.textContent = rowSummary(i); emit(); });
      }
      el.append(h("span", { class: "tbl-cell", "data-kind": c.kind, "data-col": c.label + unitText(c.unit) }, inp));
    });
    el.append(h("span", { class: "tbl-act" },
      h("button", { type: "button", class: "btn ghost small", "aria-label": `Remove row ${i + 1}`, "data-remove-row": true,
        onclick: () => { rows.splice(i, 1); shiftOpen(i, -1); redraw(); emit(); } }, "✕"),
      i > 0 ? h("button", { type: "button", class: "btn ghost small mv", "aria-label": `Move row ${i + 1} up`,
        onclick: () => {
          [rows[i - 1], rows[i]] = [rows[i], rows[i - 1]];
          const a = opened.has(i), b = opened.has(i - 1);
          opened.delete(i); opened.delete(i - 1);
          if (a) opened.add(i - 1);
          if (b) opened.add(i);
          redraw(); emit();
          const moved = body.children[i - 1].querySelector(".mv") || body.children[i - 1].querySelector(".row-sum");
          moved.focus();
        } }, "↑") : null));
    return el;
  }
  function rowSummary(i) {
    const parts = cols.map((c, j) => {
      const v = String(rows[i][j] ?? "").trim();
      if (!v) return "";
      if (c.kind === "choice") return (c.options.find((o) => o.value === v) || { label: v }).label;
      return c.unit ? `${v} ${c.unit}` : v;
    }).filter(Boolean);
    return `${i + 1}. ${parts.join(" · ") || "empty row"}`;
  }
  function shiftOpen(from, by) {
    const next = [...opened].filter((k) => k !== from).map((k) => (k > from ? k + by : k));
    opened.clear();
    for (const k of next) opened.add(k);
  }
  function redraw() {
    clear(body);
    const frag = document.createDocumentFragment();
    for (let i = 0; i < rows.length; i++) frag.append(rowEl(i));
    body.append(frag);
    count.textContent = `${rows.length} row${rows.length === 1 ? "" : "s"}`;
  }
  box.querySelector("[data-add-row]").addEventListener("click", () => {
    if (rows.length >= (f.max_rows || 500)) return;
    rows.push(cols.map((c) => (c.kind === "choice" ? c.options[0].value : "")));
    opened.add(rows.length - 1);
    redraw();
    emit();
    const inputs = body.lastChild.querySelectorAll(".tbl-cell input, .tbl-cell select");
    if (inputs.length) inputs[0].focus();
  });
  const toggle = box.querySelector("[data-paste-toggle]");
  if (toggle) {
    const panel = box.querySelector(`#${CSS.escape(toggle.getAttribute("aria-controls"))}`);
    const text = panel.querySelector("[data-paste-text]");
    const report = panel.querySelector("[data-paste-report]");
    toggle.addEventListener("click", () => {
      const now = toggle.getAttribute("aria-expanded") !== "true";
      toggle.setAttribute("aria-expanded", String(now));
      panel.hidden = !now;
      if (now) text.focus();
    });
    panel.querySelector("[data-paste-add]").addEventListener("click", () => {
      const got = splitPasted(text.value, cols);
      const room = Math.max(0, (f.max_rows || 500) - rows.length);
      for (const [line] of got.rows.slice(room)) got.bad.push(`line ${line}: the table is full (${f.max_rows || 500} rows)`);
      const added = got.rows.slice(0, room).map(([, cells]) => cells);
      rows.push(...added);
      if (added.length) { redraw(); emit(); }
      report.textContent = `${added.length} row${added.length === 1 ? "" : "s"} added.` +
        (got.bad.length ? ` Not read: ${got.bad.join("; ")}.` : "");
      if (!got.bad.length) text.value = "";
    });
  }
  redraw();
}

/**
 * Mark the results as being worked out (a compute slower than the shell's threshold) or done:
 * a "Working…" status line at the top of the results and the previous answer dimmed. Generic.
 */
export function showWorking(section, on) {
  let note = section.querySelector(":scope > .working");
  if (on && !note) {
    note = h("p", { class: "working", role: "status", text: "Working…" });
    section.querySelector("h2")?.after(note);
  } else if (!on && note) {
    note.remove();
  }
  section.toggleAttribute("aria-busy", on);
}

/**
 * Pasted text as table rows: one row per non-empty line, cells split at tabs if the text has any,
 * else at semicolons if it has any, else at commas; with tabs or semicolons a decimal
 * comma (a cell that is just a number) becomes a point. A choice cell is matched to an option by its value or label (any case).
 * Text splitting only: the values are checked by Python like any typed row. Returns
 * {rows: [[line, cells]], bad: ["line n: why"]}.
 */
export function splitPasted(text, cols) {
  const sep = text.includes("\t") ? "\t" : text.includes(";") ? ";" : ",";
  const lastRequired = cols.reduce((k, c, j) => (c.required ? j + 1 : k), 0);
  const out = { rows: [], bad: [] };
  text.split(/\r?\n/).forEach((line, k) => {
    if (!line.trim()) return;
    let cells = line.split(sep).map((c) => c.trim());
    while (cells.length > cols.length && cells[cells.length - 1] === "") cells.pop();
    if (cells.length > cols.length) { out.bad.push(`line ${k + 1}: ${cells.length} columns, the table has ${cols.length}`); return; }
    if (cells.length < lastRequired) { out.bad.push(`line ${k + 1}: ${cells.length} column${cells.length === 1 ? "" : "s"}, at least ${lastRequired} needed`); return; }
    let why = "";
    const row = cols.map((c, j) => {
      const v = cells[j] ?? "";
      if (c.kind === "choice") {
        const o = c.options.find((x) => x.value.toLowerCase() === v.toLowerCase() || x.label.toLowerCase() === v.toLowerCase());
        if (!o && v) why = why || `“${v}” is not one of ${c.options.map((x) => x.label).join(", ")}`;
        return o ? o.value : c.options[0].value;
      }
      return sep !== "," ? v.replace(/^([-+]?\d*),(\d+)$/, "$1.$2") : v; // a lone number with a decimal comma
    });
    if (why) out.bad.push(`line ${k + 1}: ${why}`);
    else out.rows.push([k + 1, row]);
  });
  return out;
}

export const STATUS_WORD = { ok: "OK", warn: "Check", fail: "Fails" };

/**
 * Render a compute result (the bridge's JSON) into the results container. Each block (an answer,
 * a result row, a table row, a figure…) is keyed by the data it shows; a recompute redraws only
 * the blocks whose data changed (dom.js `reconcile`).
 */
export function renderResults(el, res, { onLink } = {}) {
  el.__onLink = onLink; // link buttons drawn earlier call the current handler
  const top = [];
  const add = (key, make) => top.push({ key, make });
  if (res.error) add("error\0" + res.error, () => h("p", { class: "msg fail", role: "alert", text: res.error }));
  if (!res.ok) {
    const n = Object.keys(res.field_errors || {}).length;
    if (n) add("attention\0" + n, () => h("p", { class: "msg warn", text: `${n} input${n === 1 ? " needs" : "s need"} attention — see the message${n === 1 ? "" : "s"} by the field${n === 1 ? "" : "s"}.` }));
  }
  const results = res.results || [];
  const keys = results.filter((r) => r.key);
  const inner = []; // [container key, child items] filled after the top level is in place
  if (keys.length) {
    add("answers", () => h("div", { class: "answers" }));
    inner.push(["answers", keys.map((r) => ({ key: JSON.stringify(r), make: () => h("div", { class: `answer ${r.status || ""}`, "data-result": r.name },
      h("span", { class: "a-label", text: r.label }),
      h("span", { class: "a-value", text: r.display }),
      r.status ? h("span", { class: "a-status", text: STATUS_WORD[r.status] || r.status }) : null,
      howTo(r)) }))]);
  }
  for (const w of res.warnings || []) add("warn\0" + w, () => h("p", { class: "msg warn" }, h("strong", { text: "Warning: " }), w));
  let group = null;
  let rows = null;
  let lists = 0;
  for (const r of checksFirst(results.filter((r) => !r.key))) {
    if (!rows || (r.group || "") !== group) {
      group = r.group || "";
      if (group) { const g = group; add("h3\0" + g, () => h("h3", { text: g })); }
      const dlKey = "dl\0" + group + "\0" + lists++;
      add(dlKey, () => h("dl", { class: "res" }));
      rows = [];
      inner.push([dlKey, rows]);
    }
    rows.push({ key: JSON.stringify(r), make: () => h("div", { class: `res-row ${r.status || ""}`, "data-result": r.name },
      h("dt", { text: r.label }),
      h("dd", {}, h("span", { class: "r-value", text: r.display }), r.status ? h("span", { class: "a-status", text: " " + (STATUS_WORD[r.status] || r.status) }) : null, howTo(r))) });
  }
  for (const [ti, t] of (res.tables || []).entries()) {
    add("h3\0" + t.title, () => h("h3", { text: t.title }));
    // wide tables become one card per row on a narrow screen (app.css), each cell named by its column
    const wide = t.columns.length > STACK_ABOVE_COLUMNS;
    const tKey = "table\0" + ti + "\0" + JSON.stringify([t.title, t.columns]);
    add(tKey, () => h("div", { class: `tbl-scroll${wide ? " stack" : ""}`, tabindex: "0", role: "region", "aria-label": t.title },
      h("table", {}, h("thead", {}, h("tr", {}, t.columns.map((c) => h("th", { scope: "col", text: c })))), h("tbody"))));
    inner.push([tKey, t.rows.map((r) => ({ key: JSON.stringify(r), make: () => h("tr", {}, r.map((c, i) => h("td", { text: c, "data-label": t.columns[i] || "" }))) })), "tbody"]);
    if (t.note) add("note\0" + t.note, () => h("p", { class: "muted", text: t.note }));
  }
  for (const fig of res.figures || []) {
    add("fig\0" + fig.title + "\0" + fig.svg, () => h("figure", { class: "fig" }, svgNode(fig.svg), h("figcaption", { text: fig.title })));
  }
  for (const n of res.notes || []) add("note\0" + n, () => h("p", { class: "muted", text: n }));
  if ((res.links || []).length) {
    add("links\0" + JSON.stringify(res.links), () => h("div", { class: "links" }, res.links.map((l) => h("button", { type: "button", class: "btn", onclick: () => el.__onLink && el.__onLink(l) }, l.label))));
  }
  if ((res.cautions || []).length) {
    add("cautions\0" + JSON.stringify(res.cautions), () => h("aside", { class: "cautions", "aria-label": "Safety cautions" }, h("h3", { text: "Cautions" }), h("ul", {}, res.cautions.map((c) => h("li", { text: c })))));
  }
  reconcile(el, top);
  const byKey = new Map([...el.children].map((n) => [n.__key, n]));
  for (const [key, items, sel] of inner) {
    const box = byKey.get(key);
    reconcile(sel ? box.querySelector(sel) : box, items);
  }
}

/**
 * The results under the headline answers: the groups holding a check (a result with a status) first,
 * then the details, each group kept whole and in the order Python gave.
 */
function checksFirst(rest) {
  const groups = [];
  for (const r of rest) {
    const g = groups.find((x) => x.name === (r.group || ""));
    if (g && g === groups[groups.length - 1]) g.rows.push(r);
    else groups.push({ name: r.group || "", rows: [r] });
  }
  const checks = groups.filter((g) => g.rows.some((r) => r.status));
  return [...checks, ...groups.filter((g) => !checks.includes(g))].flatMap((g) => g.rows);
}

function howTo(r) {
  if (!r.method && !r.source) return null;
  return h("details", { class: "how" }, h("summary", { text: "How" }),
    r.method ? h("p", {}, h("strong", { text: "Method: " }), r.method) : null,
    r.source ? h("p", {}, h("strong", { text: "Source: " }), r.source) : null);
}
