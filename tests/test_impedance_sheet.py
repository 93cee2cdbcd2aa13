"""The impedance worksheet, and the keys of the bridge contract (app/bridge.py) on its answers."""

import cmath
import json
import math

import pytest

from app import bridge
from helpers import run


def by_name(res):
    return {r["name"]: r for r in res["results"]}


def test_catalog_contract_keys():
    cat = json.loads(bridge.catalog())
    ids = [s["id"] for s in cat]
    assert "impedance" in ids and len(ids) == len(set(ids))
    for sheet in cat:
        assert {"id", "title", "summary", "fields", "cautions"} <= set(sheet)
        for f in sheet["fields"]:
            assert {"name", "label", "unit", "kind", "default", "required", "help"} <= set(f)
            assert f["kind"] in ("number", "complex", "choice", "table", "text", "list")


def test_compute_contract_keys_and_values():
    res = run("impedance", {"mode": "z", "z": "3 + j4", "f": "50"})
    assert res["ok"] is True
    assert {"ok", "results", "field_errors", "warnings", "cautions", "figures"} <= set(res)
    for r in res["results"]:
        assert {"name", "label", "value", "display", "unit", "method", "source"} <= set(r)
        assert r["method"] and r["source"]
    rs = by_name(res)
    assert rs["z_mag"]["value"] == pytest.approx(5.0)
    # Y = 1/(3+j4) = 0.12 − j0.16 S (reference: Python complex division)
    y = 1 / complex(3, 4)
    assert rs["g"]["value"] == pytest.approx(y.real) and rs["b"]["value"] == pytest.approx(y.imag)
    # equivalent series L at 50 Hz: X/(2πf)
    assert rs["xs_el"]["value"] == pytest.approx(4 / (2 * math.pi * 50))
    assert res["figures"] and res["figures"][0]["svg"].startswith("<svg")


def test_admittance_entry():
    res = run("impedance", {"mode": "y", "y": "0.12 - j0.16", "f": "60"})
    z = 1 / complex(0.12, -0.16)
    assert by_name(res)["z_mag"]["value"] == pytest.approx(abs(z))
    assert by_name(res)["pf"]["display"].endswith("lagging")


def test_network_parallel_rc_leads():
    res = run("impedance", {"mode": "network", "topology": "parallel", "f": "50",
               "elements": json.dumps([["R", "100"], ["C", "31.83 µF"]])})
    z = 1 / (1 / 100 + 1j * 2 * math.pi * 50 * 31.83e-6)  # reference: admittances add
    rs = by_name(res)
    assert rs["z_mag"]["value"] == pytest.approx(abs(z), rel=1e-9)
    assert rs["phi"]["value"] == pytest.approx(math.degrees(cmath.phase(z)), rel=1e-9)
    assert "leading" in rs["pf"]["display"]


@pytest.mark.parametrize("inputs,field", [
    ({"mode": "z", "z": ""}, "z"),
    ({"mode": "z", "z": "0"}, "z"),
    ({"mode": "z", "z": "3 + j4 + j5"}, "z"),
    ({"mode": "z", "z": "<b>5</b>"}, "z"),
    ({"mode": "y", "y": "0"}, "y"),
    ({"mode": "network", "elements": json.dumps([["R", "-5"]])}, "elements"),
    ({"mode": "network", "elements": json.dumps([["L", "10 kg"]])}, "elements"),
    ({"mode": "network", "elements": "not json"}, "elements"),
    ({"mode": "network", "elements": "[]"}, "elements"),
    ({"mode": "z", "z": "3+j4", "f": "0"}, "f"),
    ({"mode": "z", "z": "3+j4", "f": "nan"}, "f"),
    ({"mode": "z", "z": "3+j4", "f": "1e999"}, "f"),
])
def test_bad_input_message_at_field(inputs, field):
    res = run("impedance", inputs)
    assert res["ok"] is False
    assert field in res["field_errors"] and res["field_errors"][field]


def test_bridge_never_raises():
    assert json.loads(bridge.compute("no-such-sheet", "{}"))["ok"] is False
    assert json.loads(bridge.compute("impedance", "[1,2"))["ok"] is False
    assert json.loads(bridge.compute("impedance", "[]"))["ok"] is False
    assert json.loads(bridge.compute("impedance", json.dumps({"mode": 5, "z": None})))["ok"] in (True, False)


def test_each_worksheet_module_is_named_for_its_id():
    # compute() imports only app/sheets/<id>.py for the first result; the names must agree.
    import importlib

    for sid in bridge.sheets():
        assert importlib.import_module(f"app.sheets.{sid}").SHEET.id == sid


def test_lazy_lookup_matches_catalog():
    assert bridge.sheet("impedance") is bridge.sheets()["impedance"]
    assert bridge.sheet("__init__") is None and bridge.sheet("../x") is None and bridge.sheet("nope") is None
