"""The one resonance-screening rule.

References: h = √(S_sc/Q) for a plain bank (IEEE Std 1036; Dugan et al.); tolerances: capacitance
0 to +10 % (IEEE Std 18-2002), transformer impedance ±7.5 % (IEEE C57.12.00, from memory); the
±10 % band is the project's screening choice. The 1,500 kVA case (400 kvar plain, h ≈ 7.91, next
to the 7th) is a worked case a screen must flag (its resonance order checked with ngspice in
tests/test_harmonicbus.py).
"""

from __future__ import annotations

import math

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from pycore import harmonicbus as hb
from pycore import resonancescreen as rs
from pycore.errors import InputError

SIX_PULSE = (5, 7, 11, 13, 17, 19, 23, 25)
ONE_BANK = [("the bank", [(400.0, 0.0)])]


def test_warns_on_1500_kva_6_percent_400_kvar_plain_at_480_v_60_hz():
    w = rs.screen_bank(480.0, 60.0, 1500.0, 6.0, ONE_BANK, SIX_PULSE)
    assert [x.harmonic for x in w] == [7]
    x = w[0]
    # nominal order √(25000/400) = 7.906 (IEEE Std 1036)
    assert x.order == pytest.approx(math.sqrt(25000 / 400), rel=1e-12)
    # lowest corner: C +10 %, Z +7.5 %: √(25000/1.075/(400·1.1)) = 7.270; highest: Z −7.5 %: 8.220
    assert x.order_lo == pytest.approx(math.sqrt(25000 / 1.075 / 440), rel=1e-12)
    assert x.order_hi == pytest.approx(math.sqrt(25000 / 0.925 / 400), rel=1e-12)
    assert "7th" in x.text and "detune" in x.text and "400 kvar" in x.text and "7.91" in x.text


def test_the_same_bank_without_tolerances_is_not_flagged_by_the_band_alone():
    # 7.906 lies 12.9 % above the 7th, outside ±10 %: it is the tolerances that bring it onto the 7th
    none = rs.Tolerances(0.0, 0.0, 0.0, 0.0)
    assert rs.screen_bank(480.0, 60.0, 1500.0, 6.0, ONE_BANK, SIX_PULSE, tolerances=none) == []
    # a wider band catches it even at nominal values
    assert rs.screen_bank(480.0, 60.0, 1500.0, 6.0, ONE_BANK, SIX_PULSE, tolerances=none, band=0.13)


def test_band_hits_is_the_rule():
    assert rs.band_hits(7.27, 8.22, SIX_PULSE, 0.10) == [7]
    assert rs.band_hits(7.71, 9.89, SIX_PULSE, 0.10) == []  # between 7·1.1 and 11·0.9
    assert rs.band_hits(4.5, 4.5, SIX_PULSE, 0.10) == [5]  # exactly on the band edge counts
    with pytest.raises(InputError):
        rs.band_hits(1.0, 2.0, SIX_PULSE, 1.5)


def test_detuned_bank_is_clear_of_the_5th_but_tuning_onto_it_is_flagged():
    # 7 %: tuning order 1/√0.07 = 3.78, parallel resonance below it: clear of 5 (common practice)
    assert rs.screen_bank(480.0, 60.0, 1500.0, 6.0, [("bank", [(400.0, 0.07)])], SIX_PULSE) == []
    # p = 4.2 %: tuned to 4.88, on the 5th: flagged as a tuning warning
    w = rs.screen_bank(480.0, 60.0, 1500.0, 6.0, [("bank", [(400.0, 0.042)])], SIX_PULSE)
    assert any(x.kind == "tuning" and x.harmonic == 5 for x in w)
    # with a 3rd present (single-phase loads), 7 % resonates too close to it for a large bank
    w3 = rs.screen_bank(480.0, 60.0, 1500.0, 6.0, [("bank", [(800.0, 0.07)])], (3, 5, 7))
    assert any(x.kind == "parallel" and x.harmonic == 3 and "14 %" in x.text for x in w3)


def test_motors_move_the_resonance_up_and_out_of_the_7th_band():
    # 800 kVA of motors, locked-rotor ratio 6: h = √((25000 + 4800)/400) = 8.63 (see the ngspice check);
    # lowest corner √((25000/1.075 + 4800)/440) = 7.985, above 7·1.1 = 7.7: no longer flagged
    bus = hb.build_bus(480.0, 60.0, 1500.0, 6.0, motor_kva=800.0, steps=[hb.Step(400.0)])
    assert rs.resonance_orders(bus, [0]) == [pytest.approx(math.sqrt(29800 / 400), rel=1e-9)]
    assert rs.resonance_orders(bus, [0], 1.1, 1.075) == [pytest.approx(math.sqrt((25000 / 1.075 + 4800) / 440), rel=1e-9)]
    assert rs.screen_bank(480.0, 60.0, 1500.0, 6.0, ONE_BANK, SIX_PULSE, motor_kva=800.0) == []
    # with half the motors the low corner √((25000/1.075 + 2400)/440) = 7.67 is back in the band
    assert [x.harmonic for x in rs.screen_bank(480.0, 60.0, 1500.0, 6.0, ONE_BANK, SIX_PULSE, motor_kva=400.0)] == [7]


TOL = st.integers(0, 40).map(lambda k: k * 0.005)  # 0 to 20 % in 0.5 % steps


@settings(max_examples=150, deadline=None, database=None)
@given(q=st.floats(50.0, 1500.0), p=st.sampled_from([0.0, 0.0567, 0.07, 0.14]), tx=st.floats(300.0, 3000.0),
       z=st.floats(4.0, 8.0), motors=st.floats(0.0, 1000.0),
       c_lo=TOL, c_hi=TOL, z_lo=TOL, z_hi=TOL, extra=TOL, which=st.integers(0, 3), band=st.sampled_from([0.0, 0.05, 0.1]))
def test_widening_a_tolerance_never_removes_a_warning(q, p, tx, z, motors, c_lo, c_hi, z_lo, z_hi, extra, which, band):
    combos = [("a", [(q, p)]), ("b", [(q / 2, 0.0), (q / 2, p)])]
    narrow = rs.Tolerances(-c_lo, c_hi, -z_lo, z_hi)
    ends = [-c_lo, c_hi, -z_lo, z_hi]
    ends[which] += extra if which % 2 else -extra
    wide = rs.Tolerances(*ends)
    a = rs.screen_bank(480.0, 60.0, tx, z, combos, (3, 5, 7, 11, 13), motor_kva=motors, tolerances=narrow, band=band)
    b = rs.screen_bank(480.0, 60.0, tx, z, combos, (3, 5, 7, 11, 13), motor_kva=motors, tolerances=wide, band=band)
    key = {(x.label, x.kind, x.harmonic) for x in a}
    assert key <= {(x.label, x.kind, x.harmonic) for x in b}


def test_resonance_orders_move_one_way_with_each_tolerance():
    bus = hb.build_bus(480.0, 60.0, 1500.0, 6.0, motor_kva=300.0, steps=[hb.Step(200.0), hb.Step(200.0, 0.07)])
    base = rs.resonance_orders(bus, [0, 1])
    more_c = rs.resonance_orders(bus, [0, 1], cap_factor=1.1)
    more_z = rs.resonance_orders(bus, [0, 1], z_factor=1.075)
    assert all(a < b for a, b in zip(more_c, base)) and all(a < b for a, b in zip(more_z, base))


def test_bad_tolerances_are_refused():
    with pytest.raises(InputError, match="lower end"):
        rs.screen_bank(480.0, 60.0, 1500.0, 6.0, ONE_BANK, SIX_PULSE, tolerances=rs.Tolerances(0.1, 0.0))
