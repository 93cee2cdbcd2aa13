"""The capacitor duty worksheet: the spectrum's bank state (in or out of service) and the IEC
60831-1 profile beside IEEE Std 18.

References: IEC 60831-1 limits 1.00·U_N continuously, 1.10·U_N for 8 h in 24 h, 1.30·I_N (from
memory); IEEE Std 18-2002 continuous limits 110/120/135/135 %; the capacitor behind a reactor sees
U/(1 − p) (circuit theory). A reading taken with the bank out of service cannot show the bank's duty
once it is in: the bank changes the bus impedance at every harmonic (Dugan et al., harmonics chapters).
"""

from __future__ import annotations

import pytest

from helpers import res, run


def test_iec_profile_passes_400_v_415_v_7_percent_only_for_8_hours():
    inp = dict(u_bus="400", u_rated="415", f_rated="50", p="7", spectrum='[["5","0"]]')
    ieee = run("cap_duty", inp)
    iec = run("cap_duty", {**inp, "duty_profile": "iec60831"})
    v = 400 / (1 - 0.07) / 415 * 100  # 103.6 % of rated (hand arithmetic)
    assert res(iec, "v_rms")["value"] == pytest.approx(v, rel=1e-6)
    assert res(ieee, "verdict")["status"] == "ok"  # under IEEE 18's 110 %
    assert res(iec, "v_rms")["status"] == "warn"  # over 1.00·U_N, within 1.10·U_N for 8 h in 24 h
    assert "8 h in every 24 h only" in res(iec, "verdict")["display"]
    assert res(iec, "verdict")["status"] == "warn"
    assert "no IEC 60831-1 limit" in res(iec, "v_peak")["display"]
    over = run("cap_duty", {**inp, "duty_profile": "iec60831", "u_rated": "370"})  # 116 %: over 1.10·U_N
    assert res(over, "verdict")["status"] == "fail"


def test_iec_current_limit_is_130_percent():
    # plain 400 V unit on 400 V with a 30 % 5th: I = √(1 + (5·0.3)²) = 180 % of rated, over 130 % and 135 %
    out = run("cap_duty", dict(u_bus="400", u_rated="400", p="0", spectrum='[["5","30"]]', duty_profile="iec60831"))
    assert res(out, "i_rms")["value"] == pytest.approx(100 * (1 + 1.5 ** 2) ** 0.5, rel=1e-6)
    assert res(out, "i_rms")["status"] == "fail" and "130 %" in res(out, "i_rms")["display"]


def test_a_bank_out_spectrum_does_not_claim_within_limits_and_offers_the_study():
    # 480 V, a 2 % 5th read before the bank is switched in: the worksheet must not say "within all limits"
    inp = dict(u_bus="480", u_rated="480", f_rated="60", q_rated="100", spectrum='[["5","2"]]')
    inside = run("cap_duty", {**inp, "bank_state": "in"})
    assert res(inside, "verdict")["display"] == "Within all IEEE Std 18 limits"
    out = run("cap_duty", {**inp, "bank_state": "out"})
    assert out["ok"]
    verdict = res(out, "verdict")
    assert "Within" not in verdict["display"] and verdict["status"] == "warn"
    assert any("bank out of service" in w and "harmonic study" in w for w in out["warnings"])
    link = next(x for x in out["links"] if x["worksheet"] == "harmonic_study")
    assert link["inputs"]["source"] == "voltage" and link["inputs"]["bank_state"] == "out"
    study = run("harmonic_study", link["inputs"])
    assert study["ok"], study["field_errors"]
