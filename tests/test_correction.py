"""pycore.correction: kvar multiplier, the load from each input set, bill power factor, benefits."""

import math

import numpy as np
import pytest

from pycore import correction
from pycore.correction import Load
from pycore.errors import InputError

# Multiplier table "kvar per kW to raise PF₁ to PF₂", IEEE Std 141 (Red Book) power-factor chapter
# style table, entries recalled FROM MEMORY (3 decimals; some printings truncate, so ±0.001).
IEEE141_MULTIPLIER_TABLE = [
    # (present PF, target PF, kvar per kW)
    (0.50, 0.90, 1.248),
    (0.50, 0.95, 1.403),
    (0.50, 1.00, 1.732),
    (0.60, 0.90, 0.849),
    (0.60, 0.95, 1.005),
    (0.60, 1.00, 1.333),
    (0.65, 0.95, 0.840),
    (0.70, 0.90, 0.536),
    (0.70, 0.95, 0.691),
    (0.70, 1.00, 1.020),
    (0.75, 0.90, 0.398),
    (0.75, 0.95, 0.553),
    (0.75, 1.00, 0.882),
    (0.80, 0.90, 0.266),
    (0.80, 0.95, 0.421),
    (0.80, 1.00, 0.750),
    (0.85, 0.95, 0.291),
    (0.85, 1.00, 0.620),
    (0.90, 0.95, 0.156),
    (0.90, 1.00, 0.484),
]


@pytest.mark.parametrize("pf1,pf2,k", IEEE141_MULTIPLIER_TABLE)
def test_multiplier_matches_ieee141_table(pf1, pf2, k):
    # IEEE Std 141 multiplier table (from memory), compared within ±0.001
    assert correction.kvar_per_kw(pf1, pf2) == pytest.approx(k, abs=0.001)


def test_required_kvar_handbook_example():
    # Handbook worked example (common practice, values from the IEEE 141 style table above):
    # 100 kW at 0.80 lagging raised to 0.95 needs 100 × 0.421 = 42.1 kvar.
    assert correction.required_kvar(100, 0.80, 0.95) == pytest.approx(42.1, abs=0.1)


def test_required_kvar_against_numpy_triangle():
    # Independent: build the power triangle with numpy complex numbers and remove Q until the angle matches
    p, pf1, pf2 = 372.0, 0.71, 0.97
    s1 = p / pf1 * np.exp(1j * np.arccos(pf1))
    s2 = p / pf2 * np.exp(1j * np.arccos(pf2))
    assert correction.required_kvar(p, pf1, pf2) == pytest.approx((s1 - s2).imag, rel=1e-12)


@pytest.mark.parametrize("kwh,kvarh", [(215000, 172000), (3, 4), (1e6, 1), (500, 0)])
def test_bill_power_factor(kwh, kvarh):
    # utility billing practice (common practice): PF = kWh/√(kWh² + kvarh²), computed here with numpy
    expected = kwh / np.linalg.norm([kwh, kvarh])
    assert correction.pf_from_energy(kwh, kvarh) == pytest.approx(expected, rel=1e-12)


def test_bill_three_four_five():
    # 3-4-5 right triangle (exact arithmetic): 3 kWh with 4 kvarh is PF 0.6
    assert correction.pf_from_energy(3, 4) == pytest.approx(0.6, abs=1e-15)


def test_load_from_energy_uses_demand_or_hours():
    pf = 215000 / math.hypot(215000, 172000)
    by_hours = correction.load_from_energy(215000, 172000, hours=500)
    assert by_hours.p_kw == pytest.approx(430.0)  # 215000 kWh / 500 h
    assert by_hours.pf == pytest.approx(pf, rel=1e-12)
    by_demand = correction.load_from_energy(215000, 172000, hours=500, demand_kw=610)
    assert by_demand.p_kw == pytest.approx(610.0)
    assert by_demand.pf == pytest.approx(pf, rel=1e-12)
    with pytest.raises(InputError):
        correction.load_from_energy(215000, 172000)


def _numpy_three_phase(v_ll, i_a, phi_deg):
    """Complex power of a balanced three-phase load from phase phasors (numpy, first principles)."""
    va = v_ll / np.sqrt(3)
    a = np.exp(-2j * np.pi / 3)
    v = va * np.array([1, a, a * a])
    i = i_a * np.exp(-1j * np.radians(phi_deg)) * np.array([1, a, a * a])
    return np.sum(v * np.conj(i)) / 1000.0  # kVA, Q positive for lagging current


def test_load_from_v_i_pf_three_phase_against_numpy():
    v_ll, i_a, pf = 472.0, 600.0, 0.78
    s = _numpy_three_phase(v_ll, i_a, math.degrees(math.acos(pf)))
    load = correction.load_from_v_i_pf(v_ll, i_a, pf, phases=3)
    assert load.p_kw == pytest.approx(s.real, rel=1e-12)
    assert load.q_kvar == pytest.approx(s.imag, rel=1e-12)
    assert load.current(v_ll, 3) == pytest.approx(i_a, rel=1e-12)


def test_load_from_v_i_p_single_phase_against_numpy():
    v, i, p = 240.0, 80.0, 15.0
    s = v * i / 1000.0
    q = np.sqrt(s**2 - p**2)
    load = correction.load_from_v_i_p(v, i, p, phases=1)
    assert load.q_kvar == pytest.approx(q, rel=1e-12)
    assert load.pf == pytest.approx(p / s, rel=1e-12)
    with pytest.raises(InputError):
        correction.load_from_v_i_p(v, i, 20.0, phases=1)  # 20 kW > 19.2 kVA


def test_load_from_s_pf_and_p_q_and_demand():
    a = correction.load_from_s_pf(540, 0.78)
    assert a.p_kw == pytest.approx(540 * 0.78)
    assert a.s_kva == pytest.approx(540)
    b = correction.load_from_p_q(420, 340)
    assert b.pf == pytest.approx(420 / np.hypot(420, 340))
    c = correction.load_from_demand(430, 550)
    assert c.pf == pytest.approx(430 / 550)
    assert c.q_kvar == pytest.approx(np.sqrt(550**2 - 430**2))
    with pytest.raises(InputError):
        correction.load_from_demand(560, 550)


@pytest.mark.parametrize("pf", [0.0, -0.5, 1.0001, float("nan")])
def test_bad_power_factor_refused(pf):
    with pytest.raises(InputError):
        correction.load_from_p_pf(100, pf)


@pytest.mark.parametrize("p", [0.0, -10.0])
def test_zero_or_negative_power_refused(p):
    with pytest.raises(InputError):
        correction.required_kvar(p, 0.8, 0.95)


def test_sense_words():
    assert Load(100, 50).sense == "lagging"
    assert Load(100, -50).sense == "leading"
    assert Load(100, 0).sense == "unity"
    assert Load(100, 50).phi_deg > 0  # current lags voltage for an inductive load


def test_hp_conversion_from_definitions():
    # 1 hp = 550 ft·lbf/s; 1 ft = 0.3048 m and 1 lbf = 4.4482216152605 N exactly (NIST SP 811)
    watts = 550 * 0.3048 * 4.4482216152605
    assert correction.hp_to_kw(1) * 1000 == pytest.approx(watts, rel=1e-9)


def test_loss_reduction_against_i2r_in_numpy():
    # I²R in a 0.01 Ω per-phase line for the same P at two power factors (numpy)
    p, v, r = 420e3, 480.0, 0.01
    losses = []
    for pf in (0.78, 0.963):
        i = p / (np.sqrt(3) * v * pf)
        losses.append(3 * i**2 * r)
    assert correction.loss_reduction_fraction(0.78, 0.963) == pytest.approx(1 - losses[1] / losses[0], rel=1e-12)
    assert correction.current_reduction_fraction(0.78, 0.963) == pytest.approx(1 - 0.78 / 0.963, rel=1e-12)


def test_kva_released():
    before = correction.load_from_p_pf(420, 0.78)
    after = before.corrected(correction.required_kvar(420, 0.78, 0.95))
    # ΔS = P(1/PF₁ − 1/PF₂), circuit theory
    assert correction.kva_released(before, after) == pytest.approx(420 * (1 / 0.78 - 1 / 0.95), rel=1e-9)
    assert after.pf == pytest.approx(0.95, rel=1e-12)
