"""Every worksheet in the catalog, in the browser, at phone and tablet sizes.

For each: the form renders from its declaration, the defaults compute in Pyodide, the answer
equals CPython's for the same inputs (drift check), figures appear, nothing scrolls sideways,
and a screenshot is written to test-artifacts/ for review.
"""

from __future__ import annotations

import json

import pytest

from app import bridge

from .conftest import cpython_compute, settle, shot, wait_ready

SHEETS = [s["id"] for s in json.loads(bridge.catalog())]


def open_by_picker(page, sheet_id):
    page.select_option("#sheet-pick", sheet_id)
    page.wait_for_function(f"() => window.fieldphasor.state.sheet && window.fieldphasor.state.sheet.id === '{sheet_id}'")
    settle(page)


def check_sheet(page, sheet_id):
    open_by_picker(page, sheet_id)
    res = page.evaluate("() => window.fieldphasor.state.lastResult")
    assert res["ok"], f"{sheet_id} defaults did not compute: {res['field_errors']} {res.get('error')}"
    inputs = page.evaluate("() => ({...window.fieldphasor.state.inputs})")
    ref = cpython_compute(sheet_id, inputs)
    assert [(r["name"], r["display"]) for r in res["results"]] == [(r["name"], r["display"]) for r in ref["results"]]
    assert page.locator("#results-body .answer, #results-body .res-row").count() > 0
    if res["figures"]:
        assert page.locator("#results-body figure svg").count() == len(res["figures"])
    if res["cautions"]:
        assert page.locator(".cautions li").count() == len(res["cautions"])
    overflow = page.evaluate("() => document.documentElement.scrollWidth - window.innerWidth")
    assert overflow <= 0, f"{sheet_id}: page scrolls sideways by {overflow}px"


def every_sheet(page, size):
    page.goto(page.site)
    wait_ready(page)
    settle(page)
    for sid in SHEETS:
        check_sheet(page, sid)
        shot(page, f"sheet-{sid}-{size}")


def test_every_worksheet_on_a_phone(phone):
    every_sheet(phone, "phone")


def test_every_worksheet_on_a_tablet(tablet):
    every_sheet(tablet, "tablet")


def test_labels_carry_units_and_numeric_fields_use_decimal_keypad(phone):
    phone.goto(phone.site)
    wait_ready(phone)
    for s in json.loads(bridge.catalog()):
        open_by_picker(phone, s["id"])
        for f in s["fields"]:
            sel = f"[data-field='{f['name']}']"
            if f["kind"] == "number":
                assert phone.get_attribute(f"#in-{f['name']}", "inputmode") == "decimal"
                if f["unit"]:
                    label = phone.locator(f"{sel} label[for='in-{f['name']}']").text_content()
                    assert f["unit"] in label, f"{s['id']}.{f['name']}: unit missing from label"


@pytest.mark.parametrize("sheet_id", ["lc_resonance", "bus_scan", "detuned"])
def test_resonance_plots_mark_the_resonance_on_a_phone(phone, sheet_id):
    phone.goto(phone.site + f"#/sheet/{sheet_id}")
    wait_ready(phone)
    settle(phone)
    fig = phone.locator("#results-body figure svg").first
    assert fig.is_visible()
    assert fig.locator(".fp-mark").count() >= 1  # the marker line at the resonance / tuning order
    box = fig.bounding_box()
    assert box["width"] <= 390 and box["height"] > 100
