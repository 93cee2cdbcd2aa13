"""Optional form sections and help behind a button, from the worksheets' declarations.

The browser side (the shell's summary rule against this one, heights on a phone) is in
tests/browser/test_form_markup.py and tests/browser/test_phone_flow.py."""

from __future__ import annotations

import pytest

from app import formview, registry
from app.sheet import Field, Worksheet


def _walk(node):
    if isinstance(node, list):
        yield node
        for c in node[2:]:
            yield from _walk(c)


def test_every_worksheet_declares_essential_fields_it_has():
    for sid, sheet in registry.sheets().items():
        names = {f.name for f in sheet.fields}
        assert sheet.essential and set(sheet.essential) <= names, sid


def test_essential_naming_no_field_is_refused():
    with pytest.raises(ValueError):
        Worksheet(id="x", title="x", summary="x", fields=[Field("a", "A")], compute=lambda i, o: None, essential=("b",))


def test_sections_without_an_essential_field_are_collapsed_disclosures():
    sheet = registry.sheet("correction")
    tree = formview.form_tree(sheet)
    groups = [n for n in tree if n[0] == "fieldset"]
    optional = {n[1]["data-section"]: n for n in groups if "data-section" in n[1]}
    # Metering point, Capacitor, Lightest load, Supply, Switching and cables
    assert set(optional) == {"metering", "cap_v", "light_p", "tx_kva", "run_m"}
    for key, node in optional.items():
        button = next(n for n in _walk(node) if n[0] == "button")
        region = next(n for n in node[2:] if n[0] == "div")
        assert button[1]["aria-expanded"] == "false" and button[1]["aria-controls"] == region[1]["id"] == f"sec-{key}"
        assert region[1]["hidden"] is True
    cap = next(n for n in _walk(optional["cap_v"]) if n[1].get("data-summary"))
    assert cap[2].startswith("480 V, 60 Hz, Delta, 5, 10, 12.5")
    for node in groups:
        if "data-section" not in node[1]:
            assert not any(n[1].get("data-toggle-section") for n in _walk(node))


def test_summary_follows_the_values_and_the_show_when_rule():
    sheet = registry.sheet("correction")
    fields = [f for f in sheet.fields if f.name in ("tx_kva", "tx_z", "fault_mva")]
    from app.sheet import Inputs

    assert formview.summary(fields, Inputs(sheet, {"tx_kva": "1500", "tx_z": "", "fault_mva": ""})) == "1500 kVA"
    assert formview.summary(fields, Inputs(sheet, {"tx_kva": "", "tx_z": "", "fault_mva": ""})) == "nothing entered"


def test_help_is_behind_a_button_that_controls_it():
    tree = formview.form_tree(registry.sheet("correction"))
    wrap = next(n for top in tree for n in _walk(top) if n[1].get("data-field") == "v_ll")
    button = next(n for n in wrap[2:] if isinstance(n, list) and n[1].get("data-help"))
    help_ = next(n for n in wrap[2:] if isinstance(n, list) and n[1].get("class") == "help")
    assert button[1]["aria-controls"] == help_[1]["id"] and help_[1]["hidden"] is True
    assert "has-help" in wrap[1]["class"]
