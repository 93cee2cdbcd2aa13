"""The opening worksheet drawn into index.html at build time: its first form sections, its title and
the picker, so a form is on screen and accepts typing before any script or Python has run."""

from __future__ import annotations

import json
import re

from .common import app_module

# Form sections drawn into index.html: the opening sheet's first two (the system, and the load
# readings a user types first) are on screen at once; fewer nodes make the first paint cheaper on
# a slow phone. The shell draws the rest as soon as its modules run.
STATIC_SECTIONS = 2
# the answer bar's status words, as showAnswerBar in web/app.js writes them
STATUS_WORD = {"ok": "OK", "warn": "Check", "fail": "Fails"}


def static_form(decl: dict, sections: int | None = None) -> str | None:
    """The form the shell draws for ``decl`` with its defaults, as HTML: the catalog's form tree
    (app/formview.py) serialised, so the opening worksheet is on screen and accepts typing in the
    first paint. ``sections``: only the first so many form sections (the shell adds the rest a
    moment later); all if None. None if that part holds a table (the shell draws its rows)."""
    return app_module("formview").first_sections_html(decl["form"], sections)


def pending_headline_size(decl_id: str) -> str:
    """Markup drawn invisibly under the headline's placeholder message: the opening worksheet's answer
    for its default inputs (same wording as showResult in web/app.js), so the box is already the height
    the first answer will need at any width and with any font, and nothing moves when it comes.
    Computed here by the same code the engine runs."""
    from html import escape as e

    res = json.loads(app_module("bridge").compute(decl_id, "{}"))
    first = next((r for r in res.get("results", []) if r.get("key")), None)
    status = STATUS_WORD.get(first.get("status"), first.get("status")) if first and first.get("status") else ""
    size = f'{first["label"]}: {first["display"]}{" · " + status if status else ""} — all results ↓' if res.get("ok") and first else ""
    return f'<span class="pending-size" aria-hidden="true">{e(size)}</span>'


def render_index(template: str, catalog: list) -> str:
    """index.html with the worksheet picker and the opening worksheet's form filled in."""
    from html import escape as e

    decl = next((d for d in catalog if d.get("opening")), catalog[0])
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
