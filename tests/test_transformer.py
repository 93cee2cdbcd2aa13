"""Transformer reactive power and sizing with the meter at the primary (pycore.transformer), and
a bank's output at a measured voltage (pycore.bankoutput).

Reference: the transformer's equivalent circuit (series leakage reactance u_k, shunt magnetising
admittance i₀ at the primary terminals) solved directly with complex arithmetic (cmath), per unit
on S_T, secondary at 1 pu. Two worked cases, rounded by hand: 800 kW at PF 0.80 through a
1,000 kVA, 6 %, i₀ 1.5 % transformer to 0.95 at the primary: ≈ 393 kvar, and 337 kvar leaves
≈ 0.928 at the meter; 440 V measured on a 480 V bank of 193 kvar at 600 A, PF 0.78: ≈ 162 kvar
and PF ≈ 0.944.
"""

import cmath
import math

import pytest

from pycore import bankoutput, transformer
from pycore.errors import InputError

P, Q, ST, UK, I0, PF2 = 800.0, 600.0, 1000.0, 6.0, 1.5, 0.95


def primary_power(p_kw, q2_kvar, s_t=ST, uk=UK, i0=I0):
    """Complex power at the primary [kVA] for a secondary load P + jQ₂, by the equivalent circuit."""
    s2 = complex(p_kw, q2_kvar) / s_t
    v2 = 1.0 + 0j
    i = (s2 / v2).conjugate()
    v1 = v2 + 1j * (uk / 100) * i
    i1 = i + v1 * (-1j * i0 / 100)  # magnetising branch: Q = |V₁|²·i₀
    return v1 * i1.conjugate() * s_t


def circuit_kvar_for_target(p_kw, q_kvar, pf2):
    """Bisection on the bank size until the circuit's primary PF equals the target."""
    lo, hi = 0.0, q_kvar + p_kw
    for _ in range(200):
        mid = (lo + hi) / 2
        s1 = primary_power(p_kw, q_kvar - mid)
        if s1.imag / s1.real > math.tan(math.acos(pf2)):
            lo = mid
        else:
            hi = mid
    return (lo + hi) / 2


def test_reactive_power_formula_matches_the_circuit():
    # Q_T = Im(S₁) − Q₂ from the circuit, at several loads: the leakage part agrees exactly; the
    # formula takes the magnetising kvar at rated voltage, the circuit at |V₁|, so the two differ
    # by i₀·S_T·(|V₁|² − 1), about 1 kvar here (under 2 % of Q_T)
    for p_kw, q2 in ((800, 600), (500, 100), (200, 50), (1000, 0)):
        s = math.hypot(p_kw, q2)
        exact = primary_power(p_kw, q2).imag - q2
        v1 = 1 + 1j * UK / 100 * (complex(p_kw, q2) / ST).conjugate()
        got = transformer.reactive_kvar(s, ST, UK, I0)
        assert got == pytest.approx(exact - I0 / 100 * ST * (abs(v1) ** 2 - 1), rel=1e-12), (p_kw, q2)
        assert got == pytest.approx(exact, rel=0.02), (p_kw, q2)
    # no load: exactly the magnetising kvar
    assert transformer.reactive_kvar(0, ST, UK, I0) == pytest.approx(primary_power(0, 0).imag)


def test_worked_case_asks_about_393_kvar():
    got = transformer.kvar_for_primary_target(P, Q, PF2, ST, UK, I0)
    exact = circuit_kvar_for_target(P, Q, PF2)
    assert got == pytest.approx(393, abs=1.0)  # worked case (rounded by hand)
    assert got == pytest.approx(exact, abs=1.5)  # the equivalent circuit solved directly
    # at the meter, the bank found gives the target (circuit), and the secondary-only answer does not
    s1 = primary_power(P, Q - got)
    assert s1.real / abs(s1) == pytest.approx(PF2, abs=0.001)
    secondary_only = P * (math.tan(math.acos(0.8)) - math.tan(math.acos(PF2)))
    assert secondary_only == pytest.approx(337, abs=0.5)
    s1 = primary_power(P, Q - secondary_only)
    assert s1.real / abs(s1) == pytest.approx(0.928, abs=0.001)  # worked case (rounded by hand)


def test_closed_form_equals_iterating_on_the_load_after_correction():
    # Q_T depends on the load after correction: iterate Q_C ← Q + Q_T(S(Q − Q_C)) − P·tan φ₂
    qc = 0.0
    k = math.tan(math.acos(PF2))
    for _ in range(100):
        qt = ST * (I0 / 100 + UK / 100 * (math.hypot(P, Q - qc) / ST) ** 2)
        qc = Q + qt - P * k
    assert transformer.kvar_for_primary_target(P, Q, PF2, ST, UK, I0) == pytest.approx(qc, rel=1e-9)


def test_no_correction_needed_and_bad_data():
    assert transformer.kvar_for_primary_target(100, 0, 0.9, ST, UK, I0) == 0.0
    with pytest.raises(InputError):
        transformer.reactive_kvar(100, 0, UK, I0)
    with pytest.raises(InputError):
        transformer.reactive_kvar(100, ST, -1, I0)
    with pytest.raises(InputError):
        transformer.kvar_for_primary_target(0, 10, 0.95, ST, UK, I0)


def test_no_load_compensation_is_i0_times_rating():
    # common practice: fixed compensation ≈ i₀·S_T
    assert transformer.no_load_compensation_kvar(1000, 1.5) == pytest.approx(15.0)
    assert transformer.no_load_compensation_kvar(1000, 1.5) == pytest.approx(primary_power(0, 0).imag)


def test_typical_no_load_current_is_a_table_lookup():
    # from memory (typical values, to be replaced by the nameplate): falls with size
    vals = [transformer.typical_no_load_pct(s) for s in (50, 300, 1000, 2000, 5000)]
    assert vals == sorted(vals, reverse=True)
    assert all(0.5 <= v <= 3 for v in vals)


def test_bank_at_measured_voltage_worked_case():
    s = math.sqrt(3) * 440 * 600 / 1000
    p, q = s * 0.78, s * math.sqrt(1 - 0.78**2)
    got = bankoutput.with_bank_at(p, q, 193, 440, 480, 60, 60)
    # physics: the same capacitance at 440 V, Q = 3·ωC·V² per delta bank
    w = 2 * math.pi * 60
    c = 193e3 / (3 * w * 480**2)
    q_440 = 3 * w * c * 440**2 / 1e3
    assert got.q_kvar == pytest.approx(q_440, rel=1e-12)
    assert got.q_kvar == pytest.approx(162, abs=0.5)  # worked case (rounded by hand)
    assert got.pf == pytest.approx(p / abs(complex(p, q - q_440)), rel=1e-12)
    assert got.pf == pytest.approx(0.944, abs=0.001)  # worked case (rounded by hand)
    assert got.sense == "lagging" and got.v == 440


def test_leading_load_what_to_switch_off():
    # a leading load: capacitors cannot raise its PF; removing −Q brings it to unity
    assert bankoutput.kvar_to_switch_off(100, -40) == pytest.approx(40)
    assert bankoutput.kvar_to_switch_off(100, -40, 0.95) == pytest.approx(40 + 100 * math.tan(math.acos(0.95)))
    assert bankoutput.kvar_to_switch_off(100, 40) == 0.0
