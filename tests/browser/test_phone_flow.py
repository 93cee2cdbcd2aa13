"""The phone-first flow (issue 17), measured at 390 × 844 with the defaults.

For every worksheet: the page height, the bottom of its lowest essential field (declared on the
worksheet, ``Worksheet.essential``) and of its headline answer, in CSS px from the top of the page.
Targets from the issue: the correction worksheet's essential fields and headline answer within
the first 1,700 px; every worksheet's within four screens (4 × 844 px); every field reachable in at
most two taps (one to open its section, one on the field). Run as a script
(``python -m tests.browser.test_phone_flow``) it prints the table.
"""

from __future__ import annotations

import json

from app import bridge

from .conftest import PHONE, settle, wait_ready

CATALOG = json.loads(bridge.catalog())
SHEETS = [s["id"] for s in CATALOG]
SCREEN = PHONE["height"]

MEASURE_JS = """(essential) => {
  const pageY = (el) => el.getBoundingClientRect().bottom + scrollY;
  const shown = (el) => el && el.getClientRects().length > 0;
  let fields = 0, missing = [];
  for (const name of essential) {
    const w = document.querySelector(`#form [data-field="${name}"]`);
    if (!w || w.hidden || w.closest("[hidden]")) continue;  // hidden by its show_when rule
    if (!shown(w)) { missing.push(name); continue; }
    fields = Math.max(fields, pageY(w));
  }
  const bar = document.getElementById("headline");
  const first = document.querySelector("#results-body .answer, #results-body .res-row");
  return { height: document.documentElement.scrollHeight, fields: Math.round(fields), missing,
           answer: shown(bar) ? Math.round(pageY(bar)) : (first ? Math.round(pageY(first)) : -1),
           results: first ? Math.round(pageY(first)) : -1 };
}"""


def essential_of(decl: dict, fallback: dict | None = None) -> list:
    return decl.get("essential") or (fallback or {}).get(decl["id"], [])


def pick(page, sheet_id):
    page.select_option("#sheet-pick", sheet_id)
    page.wait_for_function(f"() => window.fieldphasor.state.sheet && window.fieldphasor.state.sheet.id === '{sheet_id}'")
    settle(page)
    page.evaluate("() => window.scrollTo(0, 0)")


def measure_all(page, fallback: dict | None = None) -> dict:
    page.goto(page.site)
    wait_ready(page)
    settle(page)
    out = {}
    for decl in CATALOG:
        pick(page, decl["id"])
        out[decl["id"]] = page.evaluate(MEASURE_JS, essential_of(decl, fallback))
    return out


if __name__ == "__main__":  # print the table (used for the before/after figures)
    import sys

    from playwright.sync_api import sync_playwright

    import build

    from .conftest import ARGS, CHROMIUM, guarded_page

    fallback = json.load(open(sys.argv[1])) if len(sys.argv) > 1 else None
    build.build(quiet=True)
    srv, url = build.serve_in_thread(build.DIST)
    with sync_playwright() as p:
        b = p.chromium.launch(executable_path=CHROMIUM, args=ARGS)
        with guarded_page(b, url, viewport=PHONE, device_scale_factor=2, is_mobile=True, has_touch=True) as page:
            rows = measure_all(page, fallback)
        b.close()
    srv.shutdown()
    print(json.dumps(rows, indent=1))
    for sid, r in rows.items():
        print(f"{sid:16} height {r['height']:6}  essential {r['fields']:6}  answer {r['answer']:6}  first result {r['results']:6}")
