"""The LC resonance worksheet through the bridge (JSON in, JSON out)."""

import json
import math
import re

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

import app.bridge as bridge
from app import cautions
from helpers import assert_answered, res, run
from typed_fixtures import RESONANCE_TEXT


def test_catalog_declares_the_sheet_with_its_cautions():
    cat = {s["id"]: s for s in json.loads(bridge.catalog())}
    assert "lc_resonance" in cat
    assert cautions.SCREENING in cat["lc_resonance"]["cautions"] and cautions.ESTIMATE in cat["lc_resonance"]["cautions"]


def test_lc_defaults_and_plot():
    out = run("lc_resonance")
    assert out["ok"], out
    f0 = res(out, "f0")["value"]
    # demo: L = 1.2 mH, C = 220 µF → f0 = 1/(2π√(LC)) = 309.8 Hz (hand arithmetic)
    assert f0 == pytest.approx(1 / (2 * math.pi * math.sqrt(1.2e-3 * 220e-6)), rel=1e-9)
    assert res(out, "f0")["display"] == "309.8 Hz"
    assert res(out, "q")["value"] == pytest.approx(math.sqrt(1.2e-3 / 220e-6) / 0.05, rel=1e-9)
    titles = [f["title"] for f in out["figures"]]
    assert titles == ["|Z| against frequency", "Phase against frequency"]
    for fig in out["figures"]:
        assert fig["svg"].startswith("<svg") and "f₀ = 309.8 Hz" in fig["svg"]
        assert "<script" not in fig["svg"]
    assert "current leads" in res(out, "phase_at")["display"]  # 50 Hz is below f0: capacitive


def test_lc_solve_for_c_and_l():
    out = run("lc_resonance", solve="c", l="1.2 mH", f0="250")
    assert out["ok"], out
    c = res(out, "c_needed")["value"]
    assert c == pytest.approx(1 / ((2 * math.pi * 250) ** 2 * 1.2e-3), rel=1e-12)  # C = 1/(ω²L)
    assert res(out, "f0")["value"] == pytest.approx(250, rel=1e-12)
    out = run("lc_resonance", solve="l", c="470 nF", f0="1 kHz")
    assert out["ok"], out
    assert res(out, "l_needed")["value"] == pytest.approx(1 / ((2 * math.pi * 1000) ** 2 * 470e-9), rel=1e-12)


def test_lc_parallel_lossless():
    out = run("lc_resonance", topology="parallel", r="")
    assert out["ok"], out
    assert res(out, "q")["value"] is None and "lossless" in res(out, "q")["display"]
    assert "∞" in res(out, "z_f0")["display"]


@pytest.mark.parametrize(
    "inputs,field,words",
    [
        (dict(l="0"), "l", "above 0"),
        (dict(l="-2"), "l", "above 0"),
        (dict(c="0 µF"), "c", "above 0"),
        (dict(c="-47"), "c", "above 0"),
        (dict(r="-0.1"), "r", "at least 0"),
        (dict(topology="parallel", r="0"), "r", "short"),
        (dict(l="abc"), "l", "number"),
        (dict(c="4.7 mH"), "c", "capacitance"),
        (dict(solve="c", f0="0"), "f0", "above 0"),
        (dict(solve="l", c=""), "c", "enter"),
        (dict(f_at="-50"), "f_at", "above 0"),
        (dict(l="1e-300", c="1e-300"), "l", "out of range"),
        (dict(l="1e30", c="1e30"), "l", "out of range"),
    ],
)
def test_lc_bad_input_message_at_field(inputs, field, words):
    out = run("lc_resonance", **inputs)
    assert out["ok"] is False
    assert field in out["field_errors"], out
    assert words.lower() in out["field_errors"][field].lower()
    assert out["results"] == [] and out["figures"] == []


def test_lc_hidden_field_not_validated():
    # C is hidden when solving for C; junk there must not block the answer
    out = run("lc_resonance", solve="c", c="junk")
    assert out["ok"], out


@settings(max_examples=150, deadline=None)
@given(st.dictionaries(st.sampled_from(["topology", "solve", "l", "c", "f0", "r", "f_at"]), RESONANCE_TEXT))
def test_lc_never_crashes(inputs):
    out = run("lc_resonance", inputs)
    assert_answered(out)
    if out["ok"]:
        assert all(re.match(r"<svg", f["svg"]) for f in out["figures"])
