"""The bank resonance scan worksheet (bus_scan) through the bridge (JSON in, JSON out)."""

import json

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

import app.bridge as bridge
from app import cautions
from helpers import assert_answered, res, run
from typed_fixtures import RESONANCE_TEXT


def test_catalog_declares_the_sheet_with_its_cautions():
    cat = {s["id"]: s for s in json.loads(bridge.catalog())}
    assert {"lc_resonance", "bus_scan"} <= set(cat)
    names = {f["name"] for f in cat["bus_scan"]["fields"]}
    # field names other worksheets link to
    assert {"v_ll", "f", "tx_kva", "tx_z", "steps", "x_r", "fault_mva", "load_kw", "single_phase"} <= names
    steps = next(f for f in cat["bus_scan"]["fields"] if f["name"] == "steps")
    assert steps["kind"] == "list" and steps["unit"] == "kvar"
    order = list(bridge.sheets())
    assert order.index("bus_scan") < order.index("lc_resonance")
    assert cautions.SCREENING in cat["bus_scan"]["cautions"] and cautions.ESTIMATE in cat["bus_scan"]["cautions"]


def test_bus_defaults_and_plot():
    out = run("bus_scan")
    assert out["ok"], out
    h = res(out, "h_full")
    assert h["key"] and h["value"] > 1
    # S_sc for the demo: 1/(0.06/1250 + 1/250000) kVA = 19 231 kVA (per-unit method, hand arithmetic)
    assert res(out, "s_sc")["value"] == pytest.approx(1 / (0.06 / 1250 + 1 / 250e3), rel=1e-9)
    assert len(out["tables"][0]["rows"]) == 5
    svg = out["figures"][0]["svg"]
    assert svg.startswith("<svg") and svg.count("<polyline") == 6  # supply alone + 5 combinations
    assert svg.count("<circle") == 5  # one dot per resonance peak
    for hh in (5, 7, 11, 13, 17, 19, 23, 25):
        assert f">{hh}</text>" in svg
    assert ">3</text>" not in svg


def test_bus_warns_near_fifth_and_third():
    # Q = S_sc/h² puts the undamped resonance exactly on h (IEEE Std 1036): 1000 kVA, 5 %
    # → S_sc = 20 000 kVA; 800 kvar → h = 5; 2222.2 kvar → h = 3.
    base = dict(v_ll="400", f="50", tx_kva="1000", tx_z="5", x_r="", fault_mva="", load_kw="")
    out = run("bus_scan", steps="800", **base)
    assert out["ok"], out
    assert res(out, "h_full")["value"] == pytest.approx(5.0, rel=1e-6)
    assert res(out, "h_full")["status"] == "warn"
    assert any("5th harmonic" in w for w in out["warnings"])
    three = dict(base, steps="2222.222")
    out = run("bus_scan", single_phase="no", **three)
    assert out["ok"] and not any("3rd" in w for w in out["warnings"])
    out = run("bus_scan", single_phase="yes", **three)
    assert out["ok"] and any("3rd harmonic" in w for w in out["warnings"])
    assert ">3</text>" in out["figures"][0]["svg"]
    # clear of every harmonic: h = √(20000/250) = 8.94
    out = run("bus_scan", steps="250", **base)
    assert out["ok"] and res(out, "near_count")["status"] == "ok" and not out["warnings"]


def test_bus_units_typed():
    a = run("bus_scan", v_ll="0.48 kV", tx_kva="1.5 MVA", steps="0.1 Mvar, 100")
    b = run("bus_scan", v_ll="480", tx_kva="1500", steps="100, 100")
    assert a["ok"] and b["ok"]
    assert res(a, "h_full")["value"] == pytest.approx(res(b, "h_full")["value"], rel=1e-12)
    c = run("bus_scan", v_ll="480", tx_kva="1500", steps="100 kvar 0.1 Mvar")  # spaces, units after a space
    assert c["ok"], c
    assert [row[1] for row in c["tables"][0]["rows"]] == ["100", "200"]


def test_bus_peak_above_50():
    out = run("bus_scan", steps="2", x_r="", load_kw="")
    assert out["ok"], out
    assert "above" in res(out, "h_full")["display"]


@pytest.mark.parametrize(
    "inputs,field,words",
    [
        (dict(steps=""), "steps", "enter"),
        (dict(steps=" , ;"), "steps", "item 1"),
        (dict(steps="100, -50"), "steps", "item 2"),
        (dict(steps="100, 0"), "steps", "above 0"),
        (dict(steps="100, abc"), "steps", "item 2"),
        (dict(steps="100, 5 kW"), "steps", "reactive"),
        (dict(steps=", ".join(["25"] * 14)), "steps", "at most 13"),  # 12 steps + the existing capacitors
        (dict(steps="50 Mvar"), "steps", "short-circuit"),
        (dict(v_ll="0"), "v_ll", "at least 50"),
        (dict(v_ll="-400"), "v_ll", "at least 50"),
        (dict(f="0"), "f", "at least"),
        (dict(tx_kva="0"), "tx_kva", "above 0"),
        (dict(tx_kva=""), "tx_kva", "enter"),
        (dict(tx_z="0"), "tx_z", "at least"),
        (dict(tx_z="60"), "tx_z", "at most"),
        (dict(x_r="0"), "x_r", "above 0"),
        (dict(fault_mva="-5"), "fault_mva", "above 0"),
        (dict(load_kw="-10"), "load_kw", "at least 0"),
        (dict(band="40"), "band", "at most"),
    ],
)
def test_bus_bad_input_message_at_field(inputs, field, words):
    out = run("bus_scan", **inputs)
    assert out["ok"] is False
    assert field in out["field_errors"], out
    assert words.lower() in out["field_errors"][field].lower()
    assert out["results"] == [] and out["figures"] == []


def test_bus_several_bad_fields_reported_together():
    out = run("bus_scan", v_ll="x", tx_kva="-1", steps="")
    assert set(out["field_errors"]) == {"v_ll", "tx_kva", "steps"}


def test_bus_undamped_is_json_safe():
    # no X/R, no load: peaks are infinite in theory; the bridge must still give valid JSON
    out = run("bus_scan", x_r="", load_kw="", fault_mva="")
    assert out["ok"], out
    assert any("∞" in row[5] for row in out["tables"][0]["rows"])


@settings(max_examples=150, deadline=None)
@given(st.dictionaries(st.sampled_from(["v_ll", "f", "tx_kva", "tx_z", "x_r", "fault_mva", "load_kw", "steps", "band", "cap_lo", "cap_hi", "z_tol", "single_phase"]), RESONANCE_TEXT))
def test_bus_never_crashes(inputs):
    assert_answered(run("bus_scan", inputs))
