"""pycore.savings: bill arithmetic checked by independent routes (numpy power triangles, exact
rational arithmetic on the typed decimals, three-phase currents) and penalty rules at the edges."""

import math
from fractions import Fraction

import numpy as np
import pytest

from pycore import savings
from pycore.errors import InputError


# --- demand billed on kVA ------------------------------------------------------------------------

@pytest.mark.parametrize("p, pf1, pf2, price", [(420, 0.78, 0.95, 11.5), (1500, 0.65, 0.9, 7.25), (60, 0.9, 1.0, 20)])
def test_kva_demand_saving_against_numpy_power_triangle(p, pf1, pf2, price):
    # independent route: S = |P + jQ| with Q = P·tan(arccos PF) (power triangle, circuit theory)
    s1 = abs(p + 1j * p * np.tan(np.arccos(pf1)))
    s2 = abs(p + 1j * p * np.tan(np.arccos(pf2)))
    assert savings.kva_demand(p, pf1) == pytest.approx(s1, rel=1e-12)
    assert savings.kva_demand_saving(p, pf1, pf2, price) == pytest.approx(price * (s1 - s2), rel=1e-10)


def test_kva_demand_refuses_bad_pf():
    with pytest.raises(InputError):
        savings.kva_demand(100, 0)
    with pytest.raises(InputError):
        savings.kva_demand(100, 1.1)


# --- penalty per 0.01 below a threshold: edges ----------------------------------------------------

def _exact_steps(pf: str, thr: str, rounding: str) -> Fraction:
    """Steps below the threshold in exact rational arithmetic on the typed decimals."""
    x = (Fraction(thr) - Fraction(pf)) / Fraction("0.01")
    if x <= 0:
        return Fraction(0)
    if rounding == "part":
        return Fraction(math.ceil(x))
    if rounding == "whole":
        return Fraction(math.floor(x))
    return x


EDGE_PFS = ["0.90", "0.9000001", "0.95", "0.8999", "0.89", "0.891", "0.885", "0.855", "0.85", "0.80", "0.71", "0.7"]


@pytest.mark.parametrize("rounding", savings.ROUNDINGS)
@pytest.mark.parametrize("pf", EDGE_PFS)
def test_penalty_steps_at_the_threshold_edges(pf, rounding):
    # Tariff readings "each 0.01 or part of it" (ceil), "whole 0.01" (floor), "pro rata"
    # (common practice); expected values from exact rational arithmetic, not floating point.
    got = savings.penalty_steps(float(pf), 0.90, rounding)
    want = _exact_steps(pf, "0.90", rounding)
    assert got == pytest.approx(float(want), abs=1e-9)


def test_penalty_steps_named_edges():
    # At the threshold nothing is charged; one hundredth below is one step under every reading.
    for r in savings.ROUNDINGS:
        assert savings.penalty_steps(0.90, 0.90, r) == 0
        assert savings.penalty_steps(0.89, 0.90, r) == 1  # 0.90 − 0.89 is 0.010000000000000009 in binary
        assert savings.penalty_steps(0.85, 0.90, r) == 5
    # A sliver below: a step "or part of it" charges; whole steps do not.
    assert savings.penalty_steps(0.8999, 0.90, "part") == 1
    assert savings.penalty_steps(0.8999, 0.90, "whole") == 0
    assert savings.penalty_steps(0.855, 0.90, "part") == 5
    assert savings.penalty_steps(0.855, 0.90, "whole") == 4
    assert savings.penalty_steps(0.855, 0.90, "prorata") == pytest.approx(4.5)


@pytest.mark.parametrize("pf", ["0.90", "0.8999", "0.855", "0.78"])
def test_pf_penalty_percent_and_amount(pf):
    bill, pct, amount = Fraction("18400"), Fraction("1.5"), Fraction("150")
    steps = _exact_steps(pf, "0.90", "part")
    assert savings.pf_penalty(float(pf), 0.9, 1.5, "percent", 18400, "part") == pytest.approx(float(bill * pct / 100 * steps), abs=1e-6)
    assert savings.pf_penalty(float(pf), 0.9, 150, "amount", None, "part") == pytest.approx(float(amount * steps), abs=1e-6)


def test_pf_penalty_needs_the_bill_for_percent():
    with pytest.raises(InputError):
        savings.pf_penalty(0.8, 0.9, 1, "percent", None)
    with pytest.raises(InputError):
        savings.pf_penalty(0.8, 0.9, 1, "sideways", 100)


# --- kvarh above what the threshold allows --------------------------------------------------------

def test_kvarh_chargeable_against_numpy():
    kwh, thr = 126000.0, 0.9
    allowed = kwh * np.sqrt(1 / thr**2 - 1)  # tan(acos x) = √(1/x² − 1)
    assert savings.kvarh_for_pf(kwh, thr) == pytest.approx(allowed, rel=1e-12)
    assert savings.kvarh_chargeable(kwh, 90000, thr) == pytest.approx(90000 - allowed, rel=1e-12)
    # at exactly the threshold's kvarh nothing is charged; 1 kvarh more is charged
    assert savings.kvarh_chargeable(kwh, allowed, thr) == 0
    assert savings.kvarh_chargeable(kwh, allowed + 1, thr) == pytest.approx(1.0, abs=1e-6)
    assert savings.kvarh_chargeable(kwh, 0.5 * allowed, thr) == 0


# --- reduced I²R losses ----------------------------------------------------------------------------

@pytest.mark.parametrize("pf1, pf2", [(0.78, 0.95), (0.6, 1.0), (0.85, 0.9)])
def test_loss_scaling_against_three_phase_currents(pf1, pf2):
    # Independent route: a 400 V three-phase feeder carrying 420 kW; I = P/(√3·V·PF), loss = 3I²R.
    p, v = 420e3, 400.0
    i1 = p / (np.sqrt(3) * v * pf1)
    i2 = p / (np.sqrt(3) * v * pf2)
    r = 9.5e3 / (3 * i1**2)  # resistance that gives 9.5 kW of loss at pf1
    loss2_kw = 3 * i2**2 * r / 1e3
    assert savings.loss_after_kw(9.5, pf1, pf2) == pytest.approx(loss2_kw, rel=1e-12)
    kwh, money = savings.loss_saving(9.5, pf1, pf2, 400, 0.14)
    assert kwh == pytest.approx((9.5 - loss2_kw) * 400, rel=1e-12)
    assert money == pytest.approx((9.5 - loss2_kw) * 400 * 0.14, rel=1e-12)


def test_loss_reduction_from_0_8_to_unity_is_36_percent():
    # 1 − (0.8/1.0)² = 0.36: the usual handbook illustration of I²R reduction (common practice)
    assert 1 - savings.loss_after_kw(1.0, 0.8, 1.0) == pytest.approx(0.36, abs=1e-12)


# --- yearly saving and payback ---------------------------------------------------------------------

@pytest.mark.parametrize("cost, monthly", [("14500", "1108.10"), ("3200", "95.5"), ("250000", "12000")])
def test_simple_payback_arithmetic(cost, monthly):
    # exact: years = cost / (12 × monthly)
    want = Fraction(cost) / (12 * Fraction(monthly))
    year = savings.yearly(float(monthly))
    assert year == pytest.approx(float(12 * Fraction(monthly)), rel=1e-15)
    assert savings.simple_payback_years(float(cost), year) == pytest.approx(float(want), rel=1e-12)


def test_payback_without_saving_is_infinite():
    assert math.isinf(savings.simple_payback_years(1000, 0))
    assert math.isinf(savings.simple_payback_years(1000, -5))
    with pytest.raises(InputError):
        savings.simple_payback_years(-1, 100)
