"""The correction worksheet's harmonic pieces (app/sheets/_correction_harmonics.py) and the one
resonance-screening rule as the correction, bus-scan and detuned worksheets show it.

Outside references named beside each check: the resonance order h = √(S_sc/Q) (IEEE Std 1036;
Dugan et al.), worked by hand for the 1,500 kVA case (order 7.91, 474 Hz); tolerances capacitance 0 to +10 % (IEEE Std 18) and transformer impedance ±7.5 %
(IEEE C57.12.00, from memory); the detuned-branch formulas U_C = U/(1 − p), X_C = U²/(Q(1 − p)),
L = p·X_C/ω (circuit theory; IEC 61642); usual capacitor ratings (makers' catalogues, common practice).
"""

from __future__ import annotations

import json
import math

import pytest

from app.sheets import _correction_harmonics as harm
from helpers import res, run

CASE = dict(v_ll="480", f="60", tx_kva="1500", tx_z="6", fault_mva="", basis="p_q", p_kw="1000", q_kvar="600",
            pf2="0.95", bank="fixed", cap_v="480", cap_f="60", ratings="400", light_p="")


def _hand_range():
    # S_sc = 1500/0.06 = 25 000 kVA; h = √(25 000/400) = 7.906 (IEEE Std 1036); the lowest order across the
    # tolerances: capacitance +10 % and impedance +7.5 % both lower it by √(1.1·1.075)
    h = math.sqrt(25000 / 400)
    return h, h / math.sqrt(1.10 * 1.075), h / math.sqrt(1.0 * 0.925)


def test_hand_arithmetic_puts_the_1500_kva_case_inside_the_7th_band():
    h, lo, hi = _hand_range()
    assert h == pytest.approx(7.91, abs=0.005)  # hand arithmetic: 7.906 × 60 Hz = 474 Hz
    assert lo < 7 * 1.10 < h  # nominal outside the ±10 % band, the tolerance range reaches it


def test_correction_warns_on_the_1500_kva_plain_bank_naming_combination_place_and_remedy():
    out = run("correction", CASE)
    assert out["ok"], out["field_errors"]
    h, lo, hi = _hand_range()
    assert res(out, "h_res")["value"] == pytest.approx(h, rel=1e-3)
    assert res(out, "h_res")["status"] == "warn"
    warn = [w for w in out["warnings"] if "7th harmonic" in w]
    assert len(warn) == 1, out["warnings"]
    w = warn[0]
    assert "With all capacitors in (400 kvar)" in w  # the combination
    assert "7.91 (474 Hz)" in w and f"between {lo:.2f} and" in w  # where it lands, across the tolerances
    assert "To do: detune the bank" in w  # what to do
    assert "√(1 + Q_load/S_sc)" not in res(out, "h_res")["method"]  # the wrong motor claim is gone
    assert "locked-rotor" in res(out, "h_res")["method"]


def test_correction_steps_are_screened_one_combination_at_a_time():
    out = run("correction", {**CASE, "bank": "auto", "n_steps": "4", "pattern": "equal", "ratings": "100"})
    assert out["ok"], out["field_errors"]
    # 4 × 100 kvar: all in is the same 7.91; two steps in, √(25 000/200) = 11.18 sits on the 11th; three steps in,
    # √(25 000/300) = 9.13 spans 8.40 to 9.49 across the tolerances, clear of 7.7 and of 9.9 (the bands of the 7th, 11th)
    assert any(w.startswith("With steps 1+2 in (200 kvar)") and "11th harmonic" in w for w in out["warnings"])
    assert not any(w.startswith("With steps 1+2+3 in") for w in out["warnings"])
    table = next(t for t in out["tables"] if t["title"] == "Step combinations")
    notes = {row[0]: row[-1] for row in table["rows"]}
    assert "11th" in notes["1+2"] and "7th" in notes["1+2+3+4"] and "resonance" not in notes["1+2+3"]


def test_bus_scan_warns_on_the_same_case_and_is_quiet_with_no_tolerance_and_no_band():
    base = dict(v_ll="480", f="60", tx_kva="1500", tx_z="6", x_r="", fault_mva="", load_kw="", steps="400")
    out = run("bus_scan", base)
    assert out["ok"], out["field_errors"]
    assert res(out, "near_count")["status"] == "warn"
    w = [x for x in out["warnings"] if "7th harmonic" in x]
    assert w and "With step 1 in (400 kvar)" in w[0] and "474 Hz" in w[0] and "To do" in w[0]
    # the nominal 7.91 lies 13 % above the 7th: with no tolerance and no band nothing is flagged
    quiet = run("bus_scan", {**base, "band": "0", "cap_lo": "0", "cap_hi": "0", "z_tol": "0"})
    assert quiet["ok"] and not quiet["warnings"] and res(quiet, "near_count")["status"] == "ok"


def test_detuned_worksheet_screens_the_bank_and_the_plain_same_kvar():
    out = run("detuned", dict(u="480", f="60", q="400", steps="1", s_kva="1500", z_pct="6", p="7"))
    assert out["ok"]
    assert res(out, "h_plain")["status"] == "warn" and "7th" in res(out, "h_plain")["display"]
    assert not any("With all steps in" in w for w in out["warnings"])  # 7 %: h ≈ 3.4, clear of the 5th
    low = run("detuned", dict(u="480", f="60", q="400", steps="1", s_kva="1500", z_pct="6", p="1"))
    assert any(w.startswith("With all steps in (400 kvar)") for w in low["warnings"])  # tuned to 10, near the 11th


def test_detuning_factor_accessor():
    assert harm.detuning_factor("plain") == 0.0
    assert harm.detuning_factor("p567") == pytest.approx(0.0567)
    assert harm.detuning_factor("p7") == pytest.approx(0.07)
    assert harm.detuning_factor("p14") == pytest.approx(0.14)
    assert [k for k, _ in harm.BANK_TYPES] == ["plain", "p567", "p7", "p14"]
    assert harm.bank_type_of(0.07) == "p7" and harm.bank_type_of(0) == "plain"


def test_detuned_bank_type_orders_higher_rated_capacitors_and_a_reactor_per_step():
    out = run("correction", {**CASE, "bank_type": "p7", "ratings": "50, 100"})
    assert out["ok"], out["field_errors"]
    p, u, f = 0.07, 480.0, 60.0
    u_c = u / (1 - p)  # 516.1 V at the capacitor (circuit theory)
    assert u_c * 1.10 == pytest.approx(567.7, abs=0.1)
    assert "600 V" in res(out, "order")["display"]  # the next usual rating above 567.7 V (makers' lists: 525, 550, 600)
    assert "7 % reactor" in res(out, "order")["display"]
    q_r = res(out, "order")["value"]
    # delivered = Q_r·(U/U_r)²/(1 − p) (circuit theory; IEC 61642)
    assert res(out, "q_delivered")["value"] == pytest.approx(q_r * (u / 600) ** 2 / (1 - p), rel=1e-9)
    table = next(t for t in out["tables"] if t["title"].startswith("Reactors to order"))
    q = float(table["rows"][0][1])
    x_c = u * u / (q * 1e3 * (1 - p))
    assert float(table["rows"][0][2]) == pytest.approx(p * x_c / (2 * math.pi * f) * 1e3, rel=1e-3)  # mH
    assert float(table["rows"][0][5]) == pytest.approx(f / math.sqrt(p), rel=1e-3)  # tuning frequency
    # a detuned bank resonates below the 5th: no screening warning
    assert not any("To do" in w for w in out["warnings"])
    assert res(out, "h_res")["value"] == pytest.approx(1 / math.sqrt(q_r * (u / 600) ** 2 / 25000 + p), rel=1e-3)


def test_study_link_carries_the_bank_and_computes_and_the_recommendation_returns_with_the_bank_type():
    out = run("correction", {**CASE, "bank": "auto", "n_steps": "4", "pattern": "equal", "ratings": "100"})
    link = next(x for x in out["links"] if x["worksheet"] == "harmonic_study")
    assert link["label"] == "Study harmonics for this bank"
    inp = link["inputs"]
    assert (inp["v_ll"], inp["f"], inp["tx_kva"], inp["tx_z"]) == ("480", "60", "1500", "6")
    assert [r[0] for r in json.loads(inp["steps"])] == ["100"] * 4
    study = run("harmonic_study", inp)
    assert study["ok"], study["field_errors"]
    back = [x for x in study["links"] if x["worksheet"] == "correction"]
    assert {x["inputs"]["bank_type"] for x in back} >= {"p567", "p7"}  # fitting below the 5th (common practice)
    for x in back:
        assert x["inputs"]["p_kw"] == "1000" and x["inputs"]["q_kvar"] == "600"  # the sizing came back whole
        again = run("correction", x["inputs"])
        assert again["ok"] and "reactor" in res(again, "order")["display"]


def test_no_study_link_without_a_transformer():
    out = run("correction", {**CASE, "tx_kva": "", "tx_z": ""})
    assert out["ok"] and not any(x["worksheet"] == "harmonic_study" for x in out["links"])
