"""IEEE Std 519-2014 limits: Table 1 (voltage) and Table 2 (current), and the checks.

Source: IEEE Std 519-2014. Table 1 (≤ 1 kV row and the THD column) as published; the individual
voltage limits above 1 kV and all of Table 2 are from memory.
"""

from __future__ import annotations

import math

import pytest

from pycore import capduty, ieee519
from pycore.errors import InputError

# IEEE Std 519-2014 Table 1: bus voltage → (individual %, THD %)
TABLE_1 = [(480.0, 5.0, 8.0), (1000.0, 5.0, 8.0), (13_800.0, 3.0, 5.0), (115_000.0, 1.5, 2.5), (230_000.0, 1.0, 1.5)]

# IEEE Std 519-2014 Table 2 (from memory), 120 V to 69 kV: I_SC/I_L → limits for
# 3≤h<11, 11≤h<17, 17≤h<23, 23≤h<35, 35≤h≤50, and TDD, all in % of I_L
TABLE_2 = [
    (10.0, (4.0, 2.0, 1.5, 0.6, 0.3), 5.0),
    (20.0, (7.0, 3.5, 2.5, 1.0, 0.5), 8.0),  # 20 belongs to the 20 < 50 row
    (75.0, (10.0, 4.5, 4.0, 1.5, 0.7), 12.0),
    (500.0, (12.0, 5.5, 5.0, 2.0, 1.0), 15.0),
    (5000.0, (15.0, 7.0, 6.0, 2.5, 1.4), 20.0),
]


@pytest.mark.parametrize("v,ind,thd", TABLE_1)
def test_table_1_voltage_limits(v, ind, thd):
    assert capduty.ieee519_voltage_limits(v)[:2] == (ind, thd)


@pytest.mark.parametrize("ratio,ind,tdd", TABLE_2)
def test_table_2_current_limits(ratio, ind, tdd):
    got_ind, got_tdd, _ = ieee519.current_limits(ratio)
    assert got_ind == ind and got_tdd == tdd
    # one order from each range, and even orders at 25 % of their range's odd limit
    for h, lim in zip((5, 13, 19, 25, 37), ind):
        assert ieee519.individual_current_limit(h, ratio) == lim
    assert ieee519.individual_current_limit(2, ratio) == pytest.approx(0.25 * ind[0])
    assert ieee519.individual_current_limit(10, ratio) == pytest.approx(0.25 * ind[0])
    assert ieee519.individual_current_limit(50, ratio) == pytest.approx(0.25 * ind[4])


def test_order_range_edges():
    # 11 opens the second range; 35 the fifth (Table 2 headings)
    assert ieee519.individual_current_limit(11, 75.0) == 4.5
    assert ieee519.individual_current_limit(9, 75.0) == 10.0
    assert ieee519.individual_current_limit(35, 75.0) == 0.7
    assert ieee519.individual_current_limit(33, 75.0) == 1.5
    with pytest.raises(InputError):
        ieee519.individual_current_limit(51, 75.0)


def test_check_worked_example():
    # 480 V bus: V_5 = 4 %, V_7 = 3 % → THD = √(16 + 9) = 5 % (≤ 8 %), worst 4 % (≤ 5 %): passes.
    # Currents at I_SC/I_L = 30 (row 20–50: 7 % below the 11th, TDD 8 %): I_5 = 6 %, I_7 = 5 %,
    # I_11 = 4 % → TDD = √(36 + 25 + 16) = 8.775 % > 8 %: fails; I_11 is 4/3.5 = 1.143 of its limit.
    c = ieee519.check({5: 4.0, 7: 3.0}, {5: 6.0, 7: 5.0, 11: 4.0}, 480.0, 30.0)
    assert c.thd_v == pytest.approx(5.0) and c.ok_voltage
    assert c.v_worst == 4.0 and c.v_worst_h == 5
    assert c.tdd == pytest.approx(math.sqrt(77.0)) and not c.ok_current
    assert c.i_worst_h == 11 and c.i_worst_ratio == pytest.approx(4.0 / 3.5)
    c2 = ieee519.check({5: 6.0}, {5: 6.0}, 480.0, 30.0)
    assert not c2.ok_voltage and c2.ok_current
