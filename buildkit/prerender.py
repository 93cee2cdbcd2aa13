"""The opening worksheet drawn into index.html at build time: its first form sections, its title and
the picker, so a form is on screen and accepts typing before any script or Python has run."""

from __future__ import annotations

import json
import re

from .common import app_bridge

DEFAULT_SHEET = "correction"  # the worksheet the app opens on (web/app.js DEFAULT_SHEET)
# Form sections drawn into index.html: the opening sheet's first two (the system, and the load
# readings a user types first) are on screen at once; fewer nodes make the first paint cheaper on
# a slow phone. The shell draws the rest as soon as its modules run.
STATIC_SECTIONS = 2


def _visible(f: dict, by_name: dict) -> bool:
    sw = f.get("show_when")
    if not sw:
        return True
    ctl = by_name.get(sw["field"])
    return ctl is None or (_visible(ctl, by_name) and ctl.get("default", "") in sw["in"])


def static_form(decl: dict, sections: int | None = None) -> str | None:
    """The form web/render.js would draw for ``decl`` with its defaults, as HTML, so the opening
    worksheet is on screen and accepts typing in the first paint. The shell replaces it with the
    live form once its modules run, keeping anything typed meanwhile. None if a field kind is
    not drawn here (tables), in which case the shell draws the form alone. ``sections``: draw
    only the first so many form sections (the shell adds the rest a moment later); all if None."""
    from html import escape as e

    by_name = {f["name"]: f for f in decl["fields"]}
    unit = lambda u: f' ({e(u)})' if u else ""  # noqa: E731
    out, open_group, n_groups = [], False, 0
    for f in decl["fields"]:
        if f["kind"] == "table":
            return None
        if f.get("group"):
            n_groups += 1
            if sections is not None and n_groups > sections:
                break
            if open_group:
                out.append("</fieldset>")
            members, seen = [], False
            for g in decl["fields"]:
                if g is f:
                    seen = True
                elif seen and g.get("group"):
                    break
                if seen:
                    members.append(g)
            hidden = "" if any(_visible(g, by_name) for g in members) else " hidden"
            out.append(f'<fieldset class="group"{hidden}><legend>{e(f["group"])}</legend>')
            open_group = True
        n, fid = f["name"], f'in-{f["name"]}'
        help_id, err_id = f"help-{n}", f"err-{n}"
        described = " ".join(x for x in ((help_id if f.get("help") else ""), err_id) if x)
        hidden = "" if _visible(f, by_name) else " hidden"
        help_html = f'<p class="help" id="{help_id}">{e(f["help"])}</p>' if f.get("help") else ""
        err_html = f'<p class="err" id="{err_id}" hidden></p>'
        value = f.get("default", "")
        out.append(f'<div class="field kind-{f["kind"]}" data-field="{e(n)}"{hidden}>')
        opts = f.get("options", [])
        if f["kind"] == "choice" and len(opts) <= 4:
            out.append(f'<fieldset class="seg" aria-describedby="{described}"><legend>{e(f["label"])}</legend><div class="seg-row">')
            for o in opts:
                oid = f'{fid}-{o["value"]}'
                chk = " checked" if o["value"] == value else ""
                out.append(f'<span class="seg-opt"><input type="radio" name="{fid}" id="{e(oid)}" value="{e(o["value"])}"{chk}>'
                           f'<label for="{e(oid)}">{e(o["label"])}</label></span>')
            out.append(f"</div></fieldset>{help_html}{err_html}</div>")
            continue
        out.append(f'<label for="{fid}">{e(f["label"])}<span class="unit">{unit(f.get("unit", ""))}</span></label>{help_html}')
        if f["kind"] == "choice":
            out.append(f'<select id="{fid}" aria-describedby="{described}">')
            for o in opts:
                sel = " selected" if o["value"] == value else ""
                out.append(f'<option value="{e(o["value"])}"{sel}>{e(o["label"])}</option>')
            out.append("</select>")
        else:
            mode = ' inputmode="decimal"' if f["kind"] == "number" else ""
            attrs = (f'id="{fid}" type="text" aria-describedby="{described}" spellcheck="false" autocapitalize="off"'
                     f' placeholder="{e(f.get("placeholder", ""))}" enterkeyhint="next"{mode}')
            if f["kind"] == "text" and "notes" in n:
                out.append(f'<textarea {attrs} rows="3">{e(value)}</textarea>')
            else:
                out.append(f'<input {attrs} value="{e(value)}">')
        chips = []
        if f["kind"] == "complex":
            for txt, name in (("j", "imaginary j"), ("∠", "angle mark"), ("−", "minus")):
                chips.append(f'<button type="button" class="chip" aria-label="Insert {name}">{txt}</button>')
        for sug in f.get("suggest", []):
            u = f.get("unit", "")
            shown = f"{sug} {u}" if u and u != "%" else f"{sug}{u}"
            chips.append(f'<button type="button" class="chip" aria-label="Set {e(f["label"])} to {e(sug)}{" " + e(u) if u else ""}">{e(shown)}</button>')
        if chips:
            out.append(f'<div class="chips">{"".join(chips)}</div>')
        out.append(f"{err_html}</div>")
    if open_group:
        out.append("</fieldset>")
    return "".join(out)


def pending_headline_size(decl_id: str) -> str:
    """Markup drawn invisibly under the headline's placeholder message: the opening worksheet's answer
    for its default inputs (same wording as showResult in web/app.js), so the box is already the height
    the first answer will need at any width and with any font, and nothing moves when it comes.
    Computed here by the same code the engine runs."""
    from html import escape as e

    res = json.loads(app_bridge().compute(decl_id, "{}"))
    first = next((r for r in res.get("results", []) if r.get("key")), None)
    size = f'{first["label"]}: {first["display"]} — all results ↓' if res.get("ok") and first else ""
    return f'<span class="pending-size" aria-hidden="true">{e(size)}</span>'


def render_index(template: str, catalog: list) -> str:
    """index.html with the worksheet picker and the opening worksheet's form filled in."""
    from html import escape as e

    decl = next((d for d in catalog if d["id"] == DEFAULT_SHEET), catalog[0])
    # Only the opening worksheet: the picker does nothing until the shell runs, and the shell
    # then lists them all (a shorter list is a cheaper first paint on a slow phone).
    option = f'<option value="{e(decl["id"])}" selected>{e(decl["title"])}</option>'
    html = template.replace('<select id="sheet-pick"></select>', f'<select id="sheet-pick">{option}</select>')
    form = static_form(decl, STATIC_SECTIONS)
    if form is None:
        return html
    html = html.replace('<h1 id="sheet-title">Loading worksheets…</h1>', f'<h1 id="sheet-title">{e(decl["title"])}</h1>')
    html = html.replace('<p id="sheet-summary" class="summary"></p>', f'<p id="sheet-summary" class="summary">{e(decl["summary"])}</p>')
    html = re.sub(r'(<a id="headline"[^>]*>.*?)</a>', lambda m: m.group(1) + pending_headline_size(decl["id"]) + "</a>", html, count=1, flags=re.S)
    # The benchmark reads when the form was first painted from the heading just after it: index.html
    # holds rendering until the parser reaches the results section (link rel=expect), and unlike the
    # static form's own labels the heading outlives the shell's takeover (Chromium drops the paint
    # entry of a node removed before the frame is reported).
    html = html.replace('<h2 id="results-title">', '<h2 id="results-title" elementtiming="fp-after-form">')
    html = html.replace('<form id="form" novalidate autocomplete="off"></form>',
                        f'<form id="form" novalidate autocomplete="off" data-static="{e(decl["id"])}">{form}</form>')
    return html
