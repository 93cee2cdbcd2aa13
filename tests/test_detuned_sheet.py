"""Checks of the detuned-bank worksheet: defaults, results against first principles, its link to
the capacitor duty worksheet, and bad input (a message at the field, no crash)."""

import json
import math

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

import app.bridge as bridge
from helpers import assert_answered, res, run, table
from typed_fixtures import HARMONIC_TEXT


def test_detuned_catalog_entry():
    cat = {s["id"]: s for s in json.loads(bridge.catalog())}
    d = cat["detuned"]
    p = next(f for f in d["fields"] if f["name"] == "p")
    assert p["suggest"] == ["5.67", "7", "14"]  # common practice
    assert p["unit"] == "%"
    assert len(d["cautions"]) == 3


def test_detuned_defaults_first_principles():
    r = run("detuned")
    assert r["ok"], r
    # 200 kvar in 4 steps on 400 V, 50 Hz, p = 7 %; first principles per step (50 kvar):
    # X_C = U²/(Q(1 − p)), L = p·X_C/ω, I = Q/(√3·U), U_C = U/(1 − p).
    xc = 400**2 / (50e3 * 0.93)
    assert res(r, "l_mh")["value"] == pytest.approx(0.07 * xc / (2 * math.pi * 50) * 1e3, rel=1e-9)
    assert res(r, "i1")["value"] == pytest.approx(50e3 / (math.sqrt(3) * 400), rel=1e-9)
    assert res(r, "u_c")["value"] == pytest.approx(400 / 0.93, rel=1e-9)
    assert res(r, "n")["value"] == pytest.approx(3.78, abs=0.005)  # trade tables: 7 % → n 3.78 (common practice)
    assert res(r, "f_tune")["value"] == pytest.approx(189, abs=0.5)  # 189 Hz at 50 Hz (common practice)
    assert res(r, "u_rated")["value"] == 480  # 430 V + 10 % → 480 V capacitors (common practice)
    assert res(r, "q_rated")["value"] == pytest.approx(50 * 0.93 * (480 / 400) ** 2, rel=1e-9)
    assert res(r, "clearance")["status"] == "ok"
    # the figure is there with the tuning order marked
    assert r["figures"] and "n = 3.78" in r["figures"][0]["svg"]
    assert "<script" not in r["figures"][0]["svg"]
    # plain-bank resonance from IEEE Std 1036: √(S_sc/Q) with S_sc = 1000 kVA/0.06
    assert res(r, "h_plain")["value"] == pytest.approx(math.sqrt(1000 / 0.06 / 200), rel=1e-9)
    assert res(r, "h_det")["value"] < res(r, "n")["value"]


@pytest.mark.parametrize("p, f, n_pub, ft_pub", [("5.67", "50", 4.2, 210), ("14", "60", 2.67, 160), ("7", "60", 3.78, 227)])
def test_detuned_tuning_orders_through_bridge(p, f, n_pub, ft_pub):
    # Trade tables (common practice): 5.67 % → 210 Hz at 50 Hz; 14 % → 160 Hz and 7 % → 227 Hz at 60 Hz.
    r = run("detuned", p=p, f=f, h_low="3" if p == "14" else "5")
    assert r["ok"], r
    assert res(r, "n")["value"] == pytest.approx(n_pub, abs=0.005)
    assert abs(res(r, "f_tune")["value"] - ft_pub) <= 0.5


def test_detuned_by_tuning_frequency():
    r = run("detuned", spec="ft", ft="189")
    assert r["ok"], r
    assert res(r, "p")["value"] == pytest.approx(100 * (50 / 189) ** 2, rel=1e-9)


def test_detuned_accepts_units_and_entered_rating():
    r = run("detuned", q="0.2 Mvar", u="0.4 kV", u_cap="440", steps="1", s_kva="", z_pct="")
    assert r["ok"], r
    assert res(r, "q_rated")["value"] == pytest.approx(200 * 0.93 * (440 / 400) ** 2, rel=1e-9)
    assert res(r, "u_rated")["status"] == "ok"  # 430 V on a 440 V capacitor: 97.7 %
    assert not any(x["name"] == "h_det" for x in r["results"])  # no supply → no bus resonance


def test_detuned_rating_below_capacitor_voltage_fails():
    # 14 % on 400 V puts 465 V on the capacitor: a 415 V capacitor runs at 112 % > 110 % (IEEE Std 18-2002).
    r = run("detuned", p="14", h_low="3", u_cap="415")
    assert r["ok"]
    assert res(r, "u_rated")["status"] == "fail"
    assert any("110 %" in w for w in r["warnings"])


def test_detuned_tuning_above_lowest_harmonic_fails():
    # 7 % (n = 3.78) where a 3rd harmonic is present: the branch is capacitive at the 3rd.
    r = run("detuned", p="7", h_low="3")
    assert r["ok"]
    assert res(r, "clearance")["status"] == "fail"
    assert r["warnings"]
    # 5.67 % with the 5th lowest: n = 4.2, 16 % below → ok; 3 % (n = 5.77) with 5th lowest → fail
    assert res(run("detuned", p="5.67"), "clearance")["status"] == "ok"
    assert res(run("detuned", p="3"), "clearance")["status"] == "fail"


@pytest.mark.parametrize("field, value, words", [
    ("p", "100", "below 100"),
    ("p", "150", "below 100"),
    ("p", "0", "above 0"),
    ("p", "-7", "above 0"),
    ("p", "abc", "number"),
    ("p", "", "enter"),
    ("q", "0", "above 0"),
    ("q", "-50", "above 0"),
    ("u", "10 A", "voltage"),
    ("f", "0", "at least"),
    ("steps", "2.5", "whole"),
    ("steps", "0", "at least"),
    ("h_low", "1", "at least 2"),
    ("h_low", "51", "at most 50"),
    ("margin", "-5", "at least 0"),
    ("u_cap", "-480", "at least 50"),
])
def test_detuned_bad_input_at_field(field, value, words):
    r = run("detuned", **{field: value})
    assert r["ok"] is False
    assert field in r["field_errors"], r
    assert words.lower() in r["field_errors"][field].lower()
    assert r["results"] == [] and r["figures"] == []


def test_detuned_tuning_frequency_not_above_fundamental():
    r = run("detuned", spec="ft", ft="50")
    assert not r["ok"] and "above the system frequency" in r["field_errors"]["ft"]


def test_detuned_supply_needs_both_fields():
    r = run("detuned", s_kva="1000", z_pct="")
    assert not r["ok"] and "z_pct" in r["field_errors"]
    r = run("detuned", s_kva="", z_pct="6")
    assert not r["ok"] and "s_kva" in r["field_errors"]


def test_detuned_no_rating_high_enough():
    # 14 % on 800 V: U_C = 930 V, + 10 % = 1023 V, above the highest common LV rating (1000 V) in the table.
    r = run("detuned", u="800", p="14", h_low="3")
    assert not r["ok"] and "u_cap" in r["field_errors"]


def test_detuned_link_opens_cap_duty_consistently():
    r = run("detuned")
    link = r["links"][0]
    assert link["worksheet"] == "cap_duty"
    d = run("cap_duty", **link["inputs"], spectrum=table((5, 0)))
    assert d["ok"], d
    # the capacitor's fundamental voltage U/(1 − p) as % of its 480 V rating
    assert res(d, "v_c1")["value"] == pytest.approx(100 * 400 / 0.93 / 480, rel=1e-4)
    # kvar at the fundamental: the branch's capacitor runs at Q/(1 − p) = 53.76 kvar of 66.96 kvar rated
    assert res(d, "kvar")["value"] == pytest.approx(100 * (50 / 0.93) / (50 * 0.93 * 1.2**2), rel=1e-3)


@settings(max_examples=120, deadline=None)
@given(data=st.data())
def test_detuned_never_crashes(data):
    sheet = "detuned"
    fields = [f["name"] for s in json.loads(bridge.catalog()) if s["id"] == sheet for f in s["fields"]]
    inputs = {}
    for name in data.draw(st.lists(st.sampled_from(fields), max_size=4, unique=True)):
        if name == "spectrum":
            inputs[name] = data.draw(st.one_of(
                HARMONIC_TEXT, st.lists(st.lists(HARMONIC_TEXT, max_size=3), max_size=4).map(json.dumps)))
        else:
            inputs[name] = data.draw(HARMONIC_TEXT)
    assert_answered(run(sheet, inputs))
