"""Detuned banks (pycore.detuning) against trade tables, first principles and ngspice."""

import math

import numpy as np
import pytest

from pycore import detuning
from pycore.errors import InputError
from spice import ac_node_voltages, impedance_at, needs_ngspice

# Tuning frequencies of the usual detuning factors as printed in makers' trade tables
# (common practice, from memory): p [%] → (tuning order, f at 50 Hz, f at 60 Hz), rounded as printed.
TRADE_TUNING_TABLE = [
    (5.67, 4.2, 210, 252),
    (7.0, 3.78, 189, 227),
    (14.0, 2.67, 134, 160),
]


@pytest.mark.parametrize("p_pct, n_pub, f50_pub, f60_pub", TRADE_TUNING_TABLE)
def test_tuning_orders_match_trade_tables(p_pct, n_pub, f50_pub, f60_pub):
    # Trade tables (common practice): 5.67 % → 210/252 Hz, 7 % → 189/227 Hz, 14 % → 134/160 Hz.
    n = detuning.tuning_order(p_pct / 100)
    assert n == pytest.approx(n_pub, abs=0.005)
    assert abs(n * 50 - f50_pub) <= 0.5
    assert abs(n * 60 - f60_pub) <= 0.5


@pytest.mark.parametrize("p_pct, n_pub, f50_pub, f60_pub", TRADE_TUNING_TABLE)
def test_detuning_factor_from_published_tuning_frequency(p_pct, n_pub, f50_pub, f60_pub):
    # The inverse p = (f/f_t)²: the rounded trade frequency gives back the nominal p to within
    # the rounding of the printed frequency (±0.5 Hz → about ±0.6 % of p at 134 Hz).
    for f, ft in ((50, f50_pub), (60, f60_pub)):
        p = detuning.detuning_factor(ft / f)
        assert p * 100 == pytest.approx(p_pct, rel=0.008)


def test_tuning_order_is_where_reactances_cancel():
    # Circuit theory: at order n, n·X_L = X_C/n, i.e. the lossless branch impedance is zero.
    for p in (0.0567, 0.07, 0.14, 0.25):
        n = detuning.tuning_order(p)
        z = detuning.branch_impedance(n, 3.0, p)
        assert abs(z) < 1e-12 * 3.0
        assert detuning.branch_impedance(0.99 * n, 3.0, p).imag < 0  # capacitive below n
        assert detuning.branch_impedance(1.01 * n, 3.0, p).imag > 0  # inductive above n


@pytest.mark.parametrize("bad", [0.0, 1.0, 1.5, -0.07, math.nan])
def test_detuning_factor_out_of_range_is_refused(bad):
    with pytest.raises(InputError):
        detuning.tuning_order(bad)


@pytest.mark.parametrize("bad", [1.0, 0.5, -3.0])
def test_tuning_frequency_at_or_below_fundamental_is_refused(bad):
    with pytest.raises(InputError):
        detuning.detuning_factor(bad)


def test_capacitor_voltage_rise_values():
    # Common practice: on a 400 V bus a 7 % branch puts about 430 V on the capacitor, a 14 %
    # branch about 465 V, a 5.67 % branch about 424 V. First principles: U/(1 − p).
    assert detuning.capacitor_voltage(400, 0.07) == pytest.approx(430.1, abs=0.05)
    assert detuning.capacitor_voltage(400, 0.14) == pytest.approx(465.1, abs=0.05)
    assert detuning.capacitor_voltage(400, 0.0567) == pytest.approx(424.0, abs=0.05)


@needs_ngspice
@pytest.mark.parametrize("u, f, p", [(400, 50, 0.07), (480, 60, 0.14), (690, 50, 0.0567)])
def test_capacitor_voltage_rise_against_ngspice(u, f, p):
    # ngspice: per-phase source U/√3 driving the designed L in series with the wye-equivalent C;
    # the capacitor's line-to-line voltage is √3·|V(n2)|.
    br = detuning.design_branch(u, f, 50.0, p, 1000.0)
    body = (
        f"V1 n1 0 dc 0 ac {u / math.sqrt(3)!r}\n"
        f"L1 n1 n2 {br.l_mh * 1e-3!r}\n"
        f"C1 n2 0 {br.c_wye_uf * 1e-6!r}\n"
    )
    v = ac_node_voltages(body, [float(f)], ["n2"])["n2"][0]
    assert math.sqrt(3) * abs(v) == pytest.approx(br.u_cap_v, rel=1e-6)
    assert br.u_cap_v == pytest.approx(u / (1 - p), rel=1e-12)


@needs_ngspice
@pytest.mark.parametrize("u, f, q, p", [(400, 50, 50, 0.07), (480, 60, 100, 0.0567), (400, 50, 25, 0.14), (690, 60, 150, 0.07)])
def test_branch_output_against_ngspice(u, f, q, p):
    # ngspice driving-point impedance of the designed per-phase branch at the fundamental; a
    # three-phase branch of reactance X on a bus of U gives Q = U²/|X| (circuit theory).
    br = detuning.design_branch(u, f, q, p, 1000.0)
    body = f"L1 n1 n2 {br.l_mh * 1e-3!r}\nC1 n2 0 {br.c_wye_uf * 1e-6!r}\n"
    z = impedance_at(body, [float(f)])[0]
    assert z.imag < 0  # capacitive at the fundamental: the branch delivers kvar (current leads)
    assert u * u / abs(z) / 1e3 == pytest.approx(q, rel=1e-6)


@needs_ngspice
def test_branch_impedance_against_ngspice_sweep():
    # |Z(h)| of the lossless branch at harmonic orders against ngspice AC at h·f.
    u, f, q, p = 400, 50, 50, 0.07
    br = detuning.design_branch(u, f, q, p, 480.0)
    body = f"L1 n1 n2 {br.l_mh * 1e-3!r}\nC1 n2 0 {br.c_wye_uf * 1e-6!r}\n"
    orders = [1, 2, 3, 3.5, 4, 5, 7, 11, 13, 25, 50]
    zs = impedance_at(body, [h * f for h in orders])
    for h, zref in zip(orders, zs):
        z = detuning.branch_impedance(h, br.x_c_ohm, p)
        assert z.imag == pytest.approx(zref.imag, rel=1e-6)


def test_branch_output_first_principles():
    # First principles, independent of the module's formulas: the ordered capacitor, at its
    # rated voltage, gives Q_rated = U_r²·ωC (three-phase, wye equivalent C per phase); the
    # designed L and C in series, driven at U, give Q = U²/(1/(ωC) − ωL).
    u, f, q, p, u_r = 400.0, 50.0, 50.0, 0.07, 480.0
    br = detuning.design_branch(u, f, q, p, u_r)
    w = 2 * math.pi * f
    c = br.c_wye_uf * 1e-6
    l_h = br.l_mh * 1e-3
    assert u_r**2 * w * c / 1e3 == pytest.approx(br.q_rated_kvar, rel=1e-12)
    assert u**2 / (1 / (w * c) - w * l_h) / 1e3 == pytest.approx(q, rel=1e-12)
    assert w * l_h / (1 / (w * c)) == pytest.approx(p, rel=1e-12)  # p = X_L/X_C
    # Reactor current and kvar: I = U/(√3·|X|); Q_L = 3·I²·X_L
    i = u / math.sqrt(3) / (1 / (w * c) - w * l_h)
    assert br.i1_a == pytest.approx(i, rel=1e-12)
    assert br.q_reactor_kvar == pytest.approx(3 * i * i * w * l_h / 1e3, rel=1e-12)
    # Capacitor in service: 3·I²·X_C, and the C − L balance gives Q.
    assert br.q_cap_operating_kvar == pytest.approx(3 * i * i / (w * c) / 1e3, rel=1e-12)
    assert br.q_cap_operating_kvar - br.q_reactor_kvar == pytest.approx(q, rel=1e-12)
    # Delta capacitance is a third of the wye equivalent (Kennelly, balanced load).
    assert br.c_delta_uf * 3 == pytest.approx(br.c_wye_uf, rel=1e-12)


def test_rated_kvar_round_trip_and_voltage_scaling():
    # Circuit theory (series reactor and capacitor; IEC 61642 covers capacitors with harmonics): branch output
    # Q = Q_rated·(U/U_rated)²/(1 − p) — the inverse of the sizing formula.
    for u, u_r, p in ((400, 480, 0.07), (400, 525, 0.14), (480, 600, 0.0567)):
        q_r = detuning.capacitor_rated_kvar(100.0, u, p, u_r)
        assert detuning.branch_output_kvar(q_r, u, u_r, p) == pytest.approx(100.0, rel=1e-12)
    # A capacitor rated at exactly the voltage it sees, U_C = U/(1 − p), is ordered at Q/(1 − p).
    assert detuning.capacitor_rated_kvar(100.0, 400, 0.07, 400 / 0.93) == pytest.approx(100 / 0.93, rel=1e-12)


def test_choose_rated_voltage_common_practice():
    # Common practice: on 400 V, 5.67 % and 7 % banks use 480 V capacitors and 14 % banks 525 V
    # (with a 10 % margin over U/(1 − p)).
    assert detuning.choose_rated_voltage(detuning.capacitor_voltage(400, 0.07), 10) == 480
    assert detuning.choose_rated_voltage(detuning.capacitor_voltage(400, 0.0567), 10) == 480
    assert detuning.choose_rated_voltage(detuning.capacitor_voltage(400, 0.14), 10) == 525
    # Edges: exactly at a rating is accepted; just above moves to the next one; beyond the table → None.
    assert detuning.choose_rated_voltage(400, 10) == 440
    assert detuning.choose_rated_voltage(400.01, 10) == 460
    assert detuning.choose_rated_voltage(1000, 1) is None


@needs_ngspice
@pytest.mark.parametrize("p, s_t, z_pct, q", [(0.07, 1000, 6, 200), (0.14, 630, 4, 150), (0.0567, 2000, 6, 400)])
def test_bus_resonance_order_against_ngspice(p, s_t, z_pct, q):
    # Bus circuit per phase: supply inductance in parallel with the designed branch. A lossless
    # parallel resonance flips the sign of Im Z (ngspice) between just below and just above h.
    u, f = 400.0, 50.0
    s_sc = s_t / (z_pct / 100)  # kVA, infinite upstream (IEEE Std 141 per-unit method)
    br = detuning.design_branch(u, f, q, p, 1000.0)
    x_s = u * u / (s_sc * 1e3)
    ls = x_s / (2 * math.pi * f)
    h = detuning.bus_resonance_order(q * (1 - p), s_sc, p)
    assert h < detuning.tuning_order(p)
    body = f"Ls n1 0 {ls!r}\nL1 n1 n2 {br.l_mh * 1e-3!r}\nC1 n2 0 {br.c_wye_uf * 1e-6!r}\n"
    lo, hi, mid_lo = impedance_at(body, [h * f * 0.998, h * f * 1.002, h * f * 0.9])
    assert lo.imag > 0 and hi.imag < 0  # inductive below the parallel resonance, capacitive above
    assert abs(lo) > 5 * abs(mid_lo)  # a sharp peak, not a slow sign change
    # and the module's bus impedance agrees with ngspice away from the resonance
    for order in (2.0, 5.0, 7.0, 11.0):
        zref = impedance_at(body, [order * f])[0]
        z = detuning.bus_impedance(order, x_s, br.x_c_ohm, p)
        assert z.imag == pytest.approx(zref.imag, rel=1e-6)


def test_plain_bank_resonance_reduces_to_ieee1036():
    # IEEE Std 1036: h ≈ √(S_sc/Q) for a plain bank (p = 0).
    assert detuning.bus_resonance_order(200, 16667, 0.0) == pytest.approx(math.sqrt(16667 / 200), rel=1e-12)


def test_bus_impedance_numpy_nodal():
    # numpy: solve the two-node per-phase circuit (bus n1, capacitor node n2) with a 1 A injection
    # at n1, admittance matrix built from the elements, and compare with the closed form.
    u, f, q, p = 400.0, 50.0, 120.0, 0.07
    br = detuning.design_branch(u, f, q, p, 480.0)
    x_s = 0.0096
    for h in (1.3, 2.0, 4.6, 9.0):
        ys = 1 / (1j * h * x_s)
        yl = 1 / (1j * h * br.x_l_ohm)
        yc = 1j * h / br.x_c_ohm
        y = np.array([[ys + yl, -yl], [-yl, yl + yc]])
        v = np.linalg.solve(y, np.array([1.0, 0.0]))
        assert detuning.bus_impedance(h, x_s, br.x_c_ohm, p) == pytest.approx(complex(v[0]), rel=1e-9)
