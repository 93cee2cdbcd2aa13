"""The harmonic study worksheet: worked cases checked against the core (itself checked against
ngspice, worked computations and the standards' tables in tests/test_harmonicbus.py,
test_harmonicstudy.py, test_resonancescreen.py, test_ieee519.py)."""

from __future__ import annotations

import math

import pytest

from app import cautions
from helpers import res, run, table


def test_defaults_compute_with_worst_first_plot_recommendation_and_caution():
    out = run("harmonic_study", {})
    assert out["ok"], out["field_errors"]
    assert [r["name"] for r in out["results"] if r.get("key")] == ["worst", "h_res", "thd_v", "duty", "tdd"]
    titles = [t["title"] for t in out["tables"]]
    assert titles[0] == "Every step combination, worst first"
    # 2^4 − 1 combinations with the bank in; equal steps give alike rows, shown once with a count
    rows = out["tables"][0]["rows"]
    assert sum(1 + (int(r[0].split("(+")[1].split()[0]) if "(+" in r[0] else 0) for r in rows) == 15
    assert "Recommendation: plain and detuned side by side" in titles
    assert len(out["figures"]) == 1 and "<svg" in out["figures"][0]["svg"]
    assert cautions.SCREENING in out["cautions"]


def test_1500_kva_case_is_flagged_near_the_7th():
    # 1,500 kVA, 6 %, 400 kvar plain at 480 V 60 Hz: h = √(25000/400) = 7.91 (IEEE Std 1036); no motors
    out = run("harmonic_study", {"tx_kva": "1500", "tx_z": "6", "tx_xr": "", "motor_kva": "0", "load_kw": "0",
               "steps": table(["400", "plain", "", ""]), "i_load": "1500"})
    assert out["ok"], out["field_errors"]
    h = res(out, "h_res")
    assert h["value"] == pytest.approx(math.sqrt(25000 / 400), rel=1e-9) and h["status"] == "warn"
    assert any("7th" in w and "7.91" in w for w in out["warnings"])


def test_bank_out_voltage_reading_becomes_16_percent_with_the_bank():
    # a worked case (invented plant): 1,000 kVA 5.75 % X/R 5, 300 kW resistive, 700 kvar, 2 % 5th measured before the bank
    out = run("harmonic_study", {"tx_kva": "1000", "tx_z": "5.75", "tx_xr": "5", "motor_kva": "0", "load_kw": "300",
               "steps": table(["700", "plain", "", ""]), "source": "voltage", "v_spec": table(["5", "2"]),
               "bank_state": "out", "i_load": "1200"})
    assert out["ok"], out["field_errors"]
    volts = next(t for t in out["tables"] if t["title"] == "Harmonic voltages")["rows"]
    assert volts[0][0] == "5" and volts[0][2] == "2"
    assert float(volts[0][3]) == pytest.approx(16.1, abs=0.1)
    # the capacitor's 5th-harmonic current: V_5·5/X_C = 0.161·(480/√3)·5·700e3/480² A
    assert float(volts[0][4]) == pytest.approx(float(volts[0][3]) / 100 * 480 / math.sqrt(3) * 5 * 700e3 / 480**2,
                                               rel=2e-3)
    assert res(out, "thd_v")["status"] == "fail"
    # the same reading taken with the bank in service is only 2 %
    out_in = run("harmonic_study", {"tx_kva": "1000", "tx_z": "5.75", "tx_xr": "5", "motor_kva": "0", "load_kw": "300",
                  "steps": table(["700", "plain", "", ""]), "source": "voltage", "v_spec": table(["5", "2"]),
                  "bank_state": "in", "i_load": "1200"})
    assert next(t for t in out_in["tables"] if t["title"] == "Harmonic voltages")["rows"][0][3] == "2"


def test_iec_profile_shows_the_8_hour_allowance():
    # 400 V bus, 415 V units behind 7 % reactors: 103.6 % of rated voltage (IEC 60831-1 from memory)
    out = run("harmonic_study", {"v_ll": "400", "f": "50", "steps": table(["100", "detuned", "7", "415"]), "profile": "iec60831",
               "source": "current", "i_spec": table(["5", "1"]), "i1": "100"})
    assert out["ok"], out["field_errors"]
    step_rows = next(t for t in out["tables"] if t["title"].startswith("Steps in the worst"))["rows"]
    assert step_rows[0][2] == "103.6" and step_rows[0][-1] == "8 h in 24 h only"
    assert res(out, "duty")["status"] == "warn"


def test_detuned_bank_gets_no_recommendation_table():
    out = run("harmonic_study", {"steps": table(["100", "detuned", "7", ""], ["100", "detuned", "7", ""])})
    assert out["ok"], out["field_errors"]
    assert not any(t["title"].startswith("Recommendation") for t in out["tables"])
