"""Checks of the motor-capacitor worksheet: answers against first principles, and bad input giving a
clear message at the field that caused it, never a crash."""

import json

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

import app.bridge as bridge
from helpers import assert_answered, res, run
from typed_fixtures import FIELD_CHECK_TEXT


def test_catalog_lists_the_sheet():
    ids = [s["id"] for s in json.loads(bridge.catalog())]
    assert "motor_cap" in ids


def test_motor_defaults_first_principles():
    out = run("motor_cap", {"v": "400", "f": "50", "i_full": "68", "pf_full": "0.86", "basis": "i0", "i0": "24"})
    assert out["ok"], out
    # 0.9 × √3 × 400 × 24 / 1000 = 14.965 kvar (hand arithmetic)
    assert res(out, "q_max")["value"] == pytest.approx(14.965, rel=1e-4)
    # delta capacitance per phase C = Q/(3ωV²) = 14 965/(3 × 314.159 × 160 000) = 99.24 µF
    assert res(out, "c_max")["value"] == pytest.approx(99.24e-6, rel=1e-3)
    assert any("460.9" in n for n in out["notes"])


def test_motor_rough_estimate_marked():
    out = run("motor_cap", {"basis": "rated", "lr_ratio": "6"})
    assert out["ok"]
    r = res(out, "q_max")
    assert "rough" in r["label"] and r["status"] == "warn"
    assert out["warnings"]


@pytest.mark.parametrize("inputs,field", [
    ({"i0": "80"}, "i0"),  # no-load above full-load current
    ({"i0": "0"}, "i0"),
    ({"i0": ""}, "i0"),
    ({"pf_full": "1.2"}, "pf_full"),
    ({"pf_full": "0"}, "pf_full"),
    ({"basis": "rated", "pf_full": "1"}, "pf_full"),
    ({"basis": "rated", "pf_full": "0.99"}, "pf_full"),
    ({"basis": "rated", "lr_ratio": "1"}, "lr_ratio"),
    ({"v": "0"}, "v"),
    ({"v": "-400"}, "v"),
    ({"q_cap": "-3"}, "q_cap"),
    ({"i_full": "lots"}, "i_full"),
])
def test_motor_bad_inputs(inputs, field):
    out = run("motor_cap", inputs)
    assert not out["ok"]
    assert out["field_errors"].get(field), out


def test_motor_check_verdicts():
    base = {"v": "400", "i_full": "68", "pf_full": "0.86", "i0": "24"}  # Q0 = 16.628 kvar
    assert res(run("motor_cap", {**base, "q_cap": "14"}), "check")["status"] == "ok"
    assert res(run("motor_cap", {**base, "q_cap": "15.5"}), "check")["status"] == "warn"
    out = run("motor_cap", {**base, "q_cap": "17"})
    assert res(out, "check")["status"] == "fail" and out["warnings"]


@settings(max_examples=150, deadline=None)
@given(st.dictionaries(st.sampled_from(["v", "f", "i_full", "pf_full", "basis", "i0", "lr_ratio", "q_cap", "cap_conn"]), FIELD_CHECK_TEXT))
def test_motor_cap_never_crashes(inputs):
    assert_answered(run("motor_cap", inputs))
