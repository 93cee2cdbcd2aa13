"""The controller simulation (pycore.profile_control) on a small profile worked out by hand.

Target 0.95 lagging: the load may keep Q ≤ P·tan(acos 0.95) = 0.328684·P (power triangle, IEEE
Std 141 power-factor chapter). Five one-hour intervals, three in January and two in February:

 #  P    Q    allowed   need    steps 20 + 40 (totals 0, 20, 40, 60)        after   met?
 1  100  80   32.868    47.132  smallest total ≥ need: 60 ≤ 80 → 60            20     yes
 2  100  30   32.868    —       none needed → 0                                30     yes
 3  50   35   16.434    18.566  20 ≤ 35 → 20                                   15     yes
 4  20   15   6.574     8.426   20 > 15 would lead; largest ≤ 15: 0            15     no
 5  200  150  65.737    84.263  none ≥ need; largest ≤ 150: 60                 90     no

January: 250 kWh, 145 kvarh before, 65 after; February: 220 kWh, 165 kvarh before, 105 after.
A fixed 50 kvar instead: after 30, −20, −15, −35, 100: intervals 2, 3, 4 lead; 5 misses.
"""

from __future__ import annotations

import math
from datetime import date

import pytest

from pycore.errors import InputError
from pycore.profile_control import Bank, simulate, step_choice

JAN = date(2025, 1, 20).toordinal() * 86400
FEB = date(2025, 2, 3).toordinal() * 86400
T = [JAN + 8 * 3600, JAN + 9 * 3600, JAN + 10 * 3600, FEB + 3600, FEB + 2 * 3600]
P = [100.0, 100.0, 50.0, 20.0, 200.0]
Q = [80.0, 30.0, 35.0, 15.0, 150.0]


def test_automatic_bank_hand_worked():
    sim = simulate(T, P, Q, 3600, Bank(0.0, (20.0, 40.0)), 0.95)
    assert sim.positions == [0.0, 20.0, 40.0, 60.0]
    assert sim.given == [60.0, 0.0, 20.0, 0.0, 60.0]
    jan, feb = sim.months
    assert (jan.label, feb.label) == ("2025-01", "2025-02")
    assert jan.kwh == 250 and jan.kvarh_before == 145 and jan.kvarh_after == 65
    assert feb.kwh == 220 and feb.kvarh_before == 165 and feb.kvarh_after == 105
    assert jan.pf_before == pytest.approx(250 / math.hypot(250, 145))
    assert jan.pf_after == pytest.approx(250 / math.hypot(250, 65))
    assert feb.pf_before == pytest.approx(0.8)
    assert feb.pf_after == pytest.approx(220 / math.hypot(220, 105))
    assert (jan.n_miss, jan.n_lead, feb.n_miss, feb.n_lead) == (0, 0, 2, 0)
    assert sim.whole.miss == pytest.approx(2 / 5) and sim.whole.lead == 0
    assert sim.whole.n_miss_before == 4  # only interval 2 met the target with no bank


def test_fixed_bank_hand_worked():
    sim = simulate(T, P, Q, 3600, Bank(50.0, ()), 0.95)
    assert sim.given == [50.0] * 5
    jan, feb = sim.months
    assert jan.kvarh_after == pytest.approx(30 - 20 - 15) and jan.sense_after == "leading"
    assert (jan.n_lead, feb.n_lead, jan.n_miss, feb.n_miss) == (2, 1, 0, 1)
    assert sim.whole.lead == pytest.approx(3 / 5) and sim.whole.miss == pytest.approx(1 / 5)
    # on a lagging-only basis the leading kvarh is not counted
    lag = simulate(T, P, Q, 3600, Bank(50.0, ()), 0.95, basis="lagging")
    assert lag.months[0].kvarh_after == 30 and lag.months[0].pf_after == pytest.approx(250 / math.hypot(250, 30))


def test_fixed_part_with_steps():
    # 10 fixed + steps 20, 40: interval 4 (Q 15 → 5 after the fixed part, need 8.43 − 10 < 0) needs nothing
    sim = simulate(T, P, Q, 3600, Bank(10.0, (20.0, 40.0)), 0.95)
    assert sim.given[3] == 10.0
    assert sim.given[0] == 10.0 + 40.0  # need 37.13 after the fixed part: 40 ≤ 70


def test_step_choice_rules():
    tots = [0.0, 20.0, 40.0, 60.0]
    assert step_choice(80, 47.1, tots) == 60
    assert step_choice(15, 8.4, tots) == 0  # 20 would lead
    assert step_choice(150, 84.3, tots) == 60
    assert step_choice(30, -2.9, tots) == 0


def test_bad_banks():
    with pytest.raises(InputError):
        simulate(T, P, Q, 3600, Bank(0.0, (-5.0,)), 0.95)
    with pytest.raises(InputError):
        simulate(T, P, Q, 3600, Bank(0.0, tuple([5.0] * 13)), 0.95)
    with pytest.raises(InputError):
        simulate(T, P, Q, 3600, Bank(0.0, (5.0,)), 1.2)
