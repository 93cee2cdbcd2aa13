// Renders any worksheet from its declaration (fields from Python) and any compute result.
// Worksheet-agnostic: nothing here knows a particular worksheet or formula.
import { h, fromTree, svgNode, clear } from "./dom.js";

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
export function renderForm(form, decl, inputs, onChange) {
  clear(form);
  form.append(...decl.form.map(fromTree));
  const byName = Object.fromEntries(decl.fields.map((f) => [f.name, f]));
  const wrappers = {};
  for (const w of form.querySelectorAll(".field[data-field]")) wrappers[w.dataset.field] = w;
  for (const f of decl.fields) {
    bindField(f, wrappers[f.name], currentValue(f, inputs), (text) => {
      onChange(f.name, text);
      if (decl.fields.some((g) => g.show_when && g.show_when.field === f.name)) refreshVisibility();
    });
  }
  function refreshVisibility() {
    for (const f of decl.fields) wrappers[f.name].hidden = !isVisible(f, byName, inputs);
    for (const fs of form.querySelectorAll("fieldset.group")) {
      fs.hidden = [...fs.querySelectorAll(":scope > .field")].every((el) => el.hidden);
    }
  }
  refreshVisibility();
  return {
    refreshVisibility,
    showErrors(errors) {
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
  control.defaultValue = text;
  control.addEventListener("input", () => set(control.value));
  const file = w.querySelector("input[type=file][data-file]");
  if (file) file.addEventListener("change", () => openFile(f, file, control, w.querySelector("[data-file-info]"), set));
  for (const b of w.querySelectorAll("button[data-insert]")) b.addEventListener("click", () => insertAtCursor(control, b.dataset.insert, set));
  for (const b of w.querySelectorAll("button[data-set]")) {
    b.addEventListener("click", () => { control.value = b.dataset.set; set(b.dataset.set); control.focus(); });
  }
}

const sizeText = (n) => (n >= 1e6 ? `${(n / 1e6).toFixed(1)} MB` : n >= 1e3 ? `${(n / 1e3).toFixed(0)} kB` : `${n} bytes`);

/** A file chosen in a "file" widget, read as text into its text area (Python judges the text). */
async function openFile(f, input, control, info, set) {
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
    control.value = text;
    info.textContent = what;
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

/** The rows of a drawn table (its head, body and foot come from the tree), from its column declarations. */
function renderTable(f, value, set, box) {
  const cols = f.columns;
  let rows = parseRows(value, cols.length);
  const body = box.querySelector("[data-rows]");
  const count = box.querySelector("[data-row-count]");
  const emit = () => {
    count.textContent = `${rows.length} row${rows.length === 1 ? "" : "s"}`;
    set(JSON.stringify(rows));
  };
  function rowEl(i) {
    const r = rows[i];
    const el = h("div", { class: "tbl-row" });
    cols.forEach((c, j) => {
      const lab = `Row ${i + 1}, ${c.label}${c.unit ? " (" + c.unit + ")" : ""}`;
      let inp;
      if (c.kind === "choice") {
        inp = h("select", { "aria-label": lab });
        for (const o of c.options) inp.append(h("option", { value: o.value, selected: o.value === r[j], text: o.label }));
        if (!r[j]) r[j] = c.options[0].value;
        inp.addEventListener("change", () => { rows[i][j] = inp.value; emit(); });
      } else {
        inp = h("input", { type: "text", value: r[j] ?? "", "aria-label": lab, inputmode: c.kind === "number" ? "decimal" : "text", spellcheck: "false", autocapitalize: "off" });
        inp.addEventListener("input", () => { rows[i][j] = inp.value; emit(); });
      }
      el.append(h("span", { class: "tbl-cell", "data-kind": c.kind, "data-col": c.label + unitText(c.unit) }, inp));
    });
    el.append(h("span", { class: "tbl-act" }, h("button", {
      type: "button", class: "btn ghost small", "aria-label": `Remove row ${i + 1}`,
      onclick: () => { rows.splice(i, 1); redraw(); emit(); },
    }, "✕")));
    return el;
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
    redraw();
    emit();
    const inputs = body.lastChild.querySelectorAll("input, select");
    if (inputs.length) inputs[0].focus();
  });
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

const STATUS_WORD = { ok: "OK", warn: "Check", fail: "Fails" };

/** Render a compute result (the bridge's JSON) into the results container. */
export function renderResults(el, res, { onLink } = {}) {
  clear(el);
  if (res.error) el.append(h("p", { class: "msg fail", role: "alert", text: res.error }));
  if (!res.ok) {
    const n = Object.keys(res.field_errors || {}).length;
    if (n) el.append(h("p", { class: "msg warn", text: `${n} input${n === 1 ? " needs" : "s need"} attention — see the message${n === 1 ? "" : "s"} by the field${n === 1 ? "" : "s"}.` }));
  }
  const results = res.results || [];
  const keys = results.filter((r) => r.key);
  if (keys.length) {
    el.append(h("div", { class: "answers" }, keys.map((r) => h("div", { class: `answer ${r.status || ""}`, "data-result": r.name },
      h("span", { class: "a-label", text: r.label }),
      h("span", { class: "a-value", text: r.display }),
      r.status ? h("span", { class: "a-status", text: STATUS_WORD[r.status] || r.status }) : null,
      howTo(r)))));
  }
  for (const w of res.warnings || []) el.append(h("p", { class: "msg warn" }, h("strong", { text: "Warning: " }), w));
  const rest = results.filter((r) => !r.key);
  if (rest.length) {
    let group = null;
    let dl = null;
    for (const r of rest) {
      if (!dl || (r.group || "") !== group) {
        group = r.group || "";
        if (group) el.append(h("h3", { text: group }));
        dl = h("dl", { class: "res" });
        el.append(dl);
      }
      dl.append(h("div", { class: `res-row ${r.status || ""}`, "data-result": r.name },
        h("dt", { text: r.label }),
        h("dd", {}, h("span", { class: "r-value", text: r.display }), r.status ? h("span", { class: "a-status", text: " " + (STATUS_WORD[r.status] || r.status) }) : null, howTo(r))));
    }
  }
  for (const t of res.tables || []) {
    el.append(h("h3", { text: t.title }));
    // wide tables become one card per row on a narrow screen (app.css), each cell named by its column
    const wide = t.columns.length > STACK_ABOVE_COLUMNS;
    el.append(h("div", { class: `tbl-scroll${wide ? " stack" : ""}`, tabindex: "0", role: "region", "aria-label": t.title },
      h("table", {}, h("thead", {}, h("tr", {}, t.columns.map((c) => h("th", { scope: "col", text: c })))),
        h("tbody", {}, t.rows.map((r) => h("tr", {}, r.map((c, i) => h("td", { text: c, "data-label": t.columns[i] || "" }))))))));
    if (t.note) el.append(h("p", { class: "muted", text: t.note }));
  }
  for (const fig of res.figures || []) {
    el.append(h("figure", { class: "fig" }, svgNode(fig.svg), h("figcaption", { text: fig.title })));
  }
  for (const n of res.notes || []) el.append(h("p", { class: "muted", text: n }));
  if ((res.links || []).length) {
    el.append(h("div", { class: "links" }, res.links.map((l) => h("button", { type: "button", class: "btn", onclick: () => onLink && onLink(l) }, l.label))));
  }
  if ((res.cautions || []).length) {
    el.append(h("aside", { class: "cautions", "aria-label": "Safety cautions" }, h("h3", { text: "Cautions" }), h("ul", {}, res.cautions.map((c) => h("li", { text: c })))));
  }
}

function howTo(r) {
  if (!r.method && !r.source) return null;
  return h("details", { class: "how" }, h("summary", { text: "How" }),
    r.method ? h("p", {}, h("strong", { text: "Method: " }), r.method) : null,
    r.source ? h("p", {}, h("strong", { text: "Source: " }), r.source) : null);
}
