"""One source of form markup: the first-paint form and the live form are the same DOM.

app/formview.py draws each worksheet's form as a markup tree shipped in the catalog. The build
serialises it to HTML (index.html's first sections); the shell (web/render.js) instantiates it,
applies the values and toggles fields by its generic copy of the show_when rule. Here both are
put side by side in Chromium for every worksheet: the Python-serialised HTML parsed by DOMParser
against the live form rendered into a detached element, compared element by element (tag, every
attribute, text, and each control's value and checked state). Table rows are the shell's alone
(drawn from the column declarations), so the live rows and row count are taken out first; the
static side must hold none.
"""

from __future__ import annotations

import itertools
import json

from app import OPENING_SHEET, bridge, formview
from app.sheet import Inputs

from .conftest import PHONE, guarded_page

CATALOG = {d["id"]: d for d in json.loads(bridge.catalog())}
# An empty same-origin page: the shell's modules load, the engine does not start.
BLANK = "__form_markup_check.html"

CANON = """
const canon = (el) => {
  const attrs = [...el.attributes].map((a) => [a.name, a.value]).sort();
  const state = {};
  if (el instanceof HTMLInputElement) Object.assign(state, { value: el.value, checked: el.checked });
  if (el instanceof HTMLSelectElement || el instanceof HTMLTextAreaElement) state.value = el.value;
  const kids = [];
  for (const c of el.childNodes) {
    if (c.nodeType === Node.ELEMENT_NODE) kids.push(canon(c));
    else if (c.nodeType === Node.TEXT_NODE) kids.push(c.data);
  }
  return [el.localName, attrs, state, kids];
};
const parsed = (html) => {
  const form = new DOMParser().parseFromString(`<form>${html}</form>`, "text/html").body.firstElementChild;
  form.normalize();
  return form;
};
const live = (renderForm, decl, values) => {
  const form = document.createElement("form");
  renderForm(form, decl, values, () => {});
  for (const el of form.querySelectorAll("[data-rows], [data-row-count]")) el.replaceChildren();
  form.normalize();
  return form;
};
// the first place two canonical trees differ, as a path of child indexes, or null
const diff = (a, b, path = "form") => {
  if (typeof a === "string" || typeof b === "string") return a === b ? null : `${path}: ${JSON.stringify(a)} != ${JSON.stringify(b)}`;
  if (a[0] !== b[0]) return `${path}: <${a[0]}> != <${b[0]}>`;
  for (const i of [1, 2]) if (JSON.stringify(a[i]) !== JSON.stringify(b[i])) return `${path}: ${JSON.stringify(a[i])} != ${JSON.stringify(b[i])}`;
  const n = Math.max(a[3].length, b[3].length);
  for (let i = 0; i < n; i++) {
    if (a[3][i] === undefined || b[3][i] === undefined) return `${path}: child ${i} only on one side`;
    const d = diff(a[3][i], b[3][i], `${path} > ${typeof a[3][i] === "string" ? "#text" : a[3][i][0]}[${i}]`);
    if (d) return d;
  }
  return null;
};
"""


def open_blank(page):
    page.route(f"**/{BLANK}", lambda route: route.fulfill(status=200, content_type="text/html; charset=utf-8",
                                                           body="<!doctype html><html lang=en><title>check</title></html>"))
    page.goto(page.site + BLANK)


def markup_cases() -> list[dict]:
    """Every worksheet with its defaults, then with each non-default choice (which moves fields in
    and out of view), and with a text that needs escaping in one typed field."""
    cases = []
    for sid, sheet in bridge.sheets().items():
        cases.append({"id": sid, "values": {}, "html": formview.html(CATALOG[sid]["form"])})
        variants = [{f.name: v} for f in sheet.fields if f.kind == "choice" for v, _ in f.options if v != f.default]
        typed = next((f for f in sheet.fields if f.widget == "input"), None)
        if typed:
            variants.append({typed.name: 'a<b> & "c" \'d\''})
        for values in variants:
            cases.append({"id": sid, "values": values, "html": formview.html(formview.form_tree(sheet, values))})
    return cases


def test_static_form_is_the_live_form_for_every_worksheet(browser, site):
    cases = markup_cases()
    assert {c["id"] for c in cases} == set(CATALOG)
    with guarded_page(browser, site, viewport=PHONE) as page:
        open_blank(page)
        problems = page.evaluate("""async (cases) => {
            const { renderForm } = await import("./render.js");
            const { default: catalog } = await import("./catalog.js");
            """ + CANON + """
            const out = [];
            for (const c of cases) {
              const decl = catalog.find((d) => d.id === c.id);
              const d = diff(canon(parsed(c.html)), canon(live(renderForm, decl, c.values)));
              if (d) out.push(`${c.id} ${JSON.stringify(c.values)}: ${d}`);
            }
            return out;
        }""", cases)
    assert problems == [], "\n".join(problems[:10])


def test_index_html_form_is_the_live_forms_first_sections(browser, site):
    """The static form as the build wrote it into index.html (the first sections of the opening
    worksheet) against the shell's form for the same worksheet with no inputs."""
    with guarded_page(browser, site, viewport=PHONE) as page:
        open_blank(page)
        res = page.evaluate("""async (opening) => {
            const { renderForm } = await import("./render.js");
            const { default: catalog } = await import("./catalog.js");
            """ + CANON + """
            const html = await (await fetch("./index.html")).text();
            const doc = new DOMParser().parseFromString(html, "text/html");
            const stat = doc.getElementById("form");
            stat.normalize();
            const decl = catalog.find((d) => d.opening);
            const form = live(renderForm, decl, {});
            const n = stat.children.length;
            const cut = document.createElement("form");
            cut.append(...[...form.children].slice(0, n));
            return { id: decl.id, flagged: catalog.filter((d) => d.opening).length, n, more: form.children.length - n,
                     staticOf: stat.dataset.static, sections: stat.querySelectorAll("fieldset.group").length,
                     fields: stat.querySelectorAll("[data-field]").length,
                     // the children only: the static form element itself carries data-static
                     diff: diff(["form", [], {}, canon(stat)[3]], ["form", [], {}, canon(cut)[3]]) };
        }""", OPENING_SHEET)
    assert res["id"] == OPENING_SHEET and res["flagged"] == 1 and res["staticOf"] == OPENING_SHEET
    assert res["sections"] >= 2 and res["fields"] >= 5 and res["more"] > 0, res
    assert res["diff"] is None, res["diff"]


def visibility_cases(limit: int = 4096) -> list[dict]:
    """For each worksheet, every combination of its choice fields' options (up to ``limit``), with
    the fields the Python rule (``Inputs.visible``, which also decides what is validated) shows."""
    cases = []
    for sid, sheet in bridge.sheets().items():
        choices = [f for f in sheet.fields if f.kind == "choice"]
        combos = itertools.islice(itertools.product(*[[v for v, _ in f.options] for f in choices]), limit)
        for combo in combos:
            values = dict(zip((f.name for f in choices), combo))
            ins = Inputs(sheet, values)
            cases.append({"id": sid, "values": values, "shown": [f.name for f in sheet.fields if ins.visible(f.name)]})
    return cases


def test_show_when_rule_agrees_between_python_and_the_shell(browser, site):
    cases = visibility_cases()
    sheets_with_rules = {sid for sid, s in bridge.sheets().items() if any(f.show_when for f in s.fields)}
    hidden_somewhere = {c["id"] for c in cases if len(c["shown"]) < len(CATALOG[c["id"]]["fields"])}
    assert sheets_with_rules and hidden_somewhere == sheets_with_rules  # the cases do exercise the rule
    with guarded_page(browser, site, viewport=PHONE) as page:
        open_blank(page)
        problems = page.evaluate("""async (cases) => {
            const { isVisible } = await import("./render.js");
            const { default: catalog } = await import("./catalog.js");
            const out = [];
            for (const c of cases) {
              const decl = catalog.find((d) => d.id === c.id);
              const byName = Object.fromEntries(decl.fields.map((f) => [f.name, f]));
              const shown = decl.fields.filter((f) => isVisible(f, byName, c.values)).map((f) => f.name);
              if (JSON.stringify(shown) !== JSON.stringify(c.shown)) out.push(`${c.id} ${JSON.stringify(c.values)}: shell ${shown} / python ${c.shown}`);
            }
            return out;
        }""", cases)
    assert problems == [], "\n".join(problems[:10])


def test_live_form_binds_behaviour_by_its_hooks_in_every_worksheet(browser, site):
    """The shell's form reacts to what a user does through the tree's hooks alone: each choice
    (buttons and selects) reports its value and shows the fields Python's rule shows for it, a
    typed text is reported, a suggestion chip sets its value, a complex field's chips insert at
    the caret, and a table adds and removes rows."""
    expect = {}
    for sid, sheet in bridge.sheets().items():
        for f in sheet.fields:
            if f.kind == "choice":
                for v, _ in f.options:
                    ins = Inputs(sheet, {f.name: v})
                    expect[f"{sid} {f.name}={v}"] = [g.name for g in sheet.fields if not ins.visible(g.name)]
    with guarded_page(browser, site, viewport=PHONE) as page:
        open_blank(page)
        problems = page.evaluate("""async (expect) => {
            const { renderForm } = await import("./render.js");
            const { default: catalog } = await import("./catalog.js");
            const out = [];
            const hiddenNow = (form) => [...form.querySelectorAll(".field[data-field]")].filter((w) => w.hidden).map((w) => w.dataset.field);
            for (const decl of catalog) {
              for (const f of decl.fields) {
                // a fresh form per field, so each check starts from the defaults
                const form = document.createElement("form");
                document.body.replaceChildren(form);
                const inputs = {};
                const seen = [];
                renderForm(form, decl, inputs, (name, text) => { inputs[name] = text; seen.push([name, text]); });
                const w = form.querySelector(`[data-field="${f.name}"]`);
                const where = `${decl.id}.${f.name}`;
                const last = () => JSON.stringify(seen[seen.length - 1] || null);
                if (f.kind === "choice") {
                  for (const o of f.options) {
                    const radio = w.querySelector(`input[type=radio][value="${o.value}"]`);
                    if (radio) w.querySelector(`label[for="${radio.id}"]`).click();
                    else { const s = w.querySelector("select"); s.value = o.value; s.dispatchEvent(new Event("change")); }
                    if (o.value !== f.default || seen.length) {
                      if (last() !== JSON.stringify([f.name, o.value])) out.push(`${where}: choosing ${o.value} reported ${last()}`);
                    }
                    const want = expect[`${decl.id} ${f.name}=${o.value}`];
                    const got = hiddenNow(form);
                    if (JSON.stringify(got) !== JSON.stringify(want)) out.push(`${where}=${o.value}: hidden ${got} / python ${want}`);
                  }
                } else if (f.widget === "table") {
                  const rows = () => w.querySelectorAll("[data-rows] > .tbl-row").length;
                  const n0 = rows();
                  w.querySelector("[data-add-row]").click();
                  if (rows() !== n0 + 1 || JSON.parse(inputs[f.name]).length !== n0 + 1) out.push(`${where}: add row gave ${rows()} rows`);
                  if (w.querySelector("[data-row-count]").textContent !== `${n0 + 1} row${n0 === 0 ? "" : "s"}`) out.push(`${where}: row count text`);
                  w.querySelector("[data-rows] > .tbl-row:last-child .tbl-act button").click();
                  if (rows() !== n0 || JSON.parse(inputs[f.name]).length !== n0) out.push(`${where}: remove row gave ${rows()} rows`);
                } else {
                  const c = w.querySelector("#in-" + f.name);
                  c.value = "12 x"; c.dispatchEvent(new Event("input"));
                  if (last() !== JSON.stringify([f.name, "12 x"])) out.push(`${where}: typing reported ${last()}`);
                  for (const chip of w.querySelectorAll("button[data-set]")) {
                    chip.click();
                    if (c.value !== chip.dataset.set || last() !== JSON.stringify([f.name, chip.dataset.set])) out.push(`${where}: chip ${chip.dataset.set}`);
                  }
                  const inserts = [...w.querySelectorAll("button[data-insert]")];
                  if ((f.kind === "complex") !== (inserts.length > 0)) out.push(`${where}: insert chips on a ${f.kind} field`);
                  for (const chip of inserts) {
                    c.value = "12"; c.focus(); c.setSelectionRange(1, 1);
                    chip.click();
                    if (c.value !== "1" + chip.dataset.insert + "2" || last() !== JSON.stringify([f.name, c.value])) out.push(`${where}: insert ${chip.dataset.insert} gave ${c.value}`);
                  }
                }
              }
            }
            document.body.replaceChildren();
            return out;
        }""", expect)
    assert problems == [], "\n".join(problems[:10])


def test_choices_and_typing_in_the_static_form_survive_the_takeover(browser, site):
    """What a user chose (a button of a choice) and typed in index.html's form before the shell's
    modules ran is in the live form and the inputs afterwards (app.js takeStaticForm reads the
    static form by the same hooks)."""
    sheet = bridge.sheets()[OPENING_SHEET]
    ins = Inputs(sheet, {})
    static = formview.first_sections_html(CATALOG[OPENING_SHEET]["form"], 2)
    buttons = next(f for f in sheet.fields if f.widget == "buttons" and ins.visible(f.name) and f'data-field="{f.name}"' in static)
    other = next(v for v, _ in buttons.options if v != buttons.default)
    typed = next(f for f in sheet.fields if f.widget == "input" and ins.visible(f.name) and f'id="in-{f.name}"' in static)
    with guarded_page(browser, site, viewport=PHONE, service_workers="block") as page:
        page.route("**/app.js", lambda route: (page.wait_for_timeout(1500), route.continue_()))
        page.goto(site + f"#/sheet/{OPENING_SHEET}", wait_until="commit")  # "load" would wait for app.js
        page.wait_for_selector(f"#in-{typed.name}")
        page.click(f"label[for='in-{buttons.name}-{other}']")
        page.fill(f"#in-{typed.name}", "123")
        assert page.evaluate("() => document.getElementById('form').dataset.static") == OPENING_SHEET  # still the static form
        page.wait_for_function("() => document.documentElement.dataset.inputReady === '1'")
        assert page.evaluate("() => window.fieldphasor.perf.staticForm") == OPENING_SHEET  # the static form was taken over
        got = page.evaluate(f"() => [window.fieldphasor.state.inputs['{buttons.name}'], window.fieldphasor.state.inputs['{typed.name}']]")
        assert got == [other, "123"]
        assert page.is_checked(f"#in-{buttons.name}-{other}") and page.input_value(f"#in-{typed.name}") == "123"
