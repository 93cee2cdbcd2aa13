"""The per-phase harmonic bus model against ngspice (an independent circuit solver) and numpy.

Reference: ngspice AC analysis (tests/spice.py) of the same per-phase network with a current
source at each harmonic frequency; numpy.linalg for a nodal solve of the frequency-dependent
resistance option. Model: Dugan et al., Electrical Power Systems Quality, harmonics chapters.
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from pycore import harmonicbus as hb
from pycore import resonancescreen as rs
from pycore.errors import InputError

from spice import ac_node_voltages, impedance_sweep, needs_ngspice

V, F = 480.0, 60.0


def _bus(**kw):
    steps = [hb.Step(100.0), hb.Step(150.0), hb.Step(120.0, 0.07, 525.0, 40.0)]
    args = dict(tx_x_r=6.0, upstream_fault_kva=150e3, upstream_x_r=10.0, load_kw=250.0, motor_kva=300.0,
                lr_ratio=6.0, steps=steps)
    args.update(kw)
    return hb.build_bus(V, F, 1000.0, 5.75, **args)


def _netlist(bus, i_amp: float) -> str:
    """The same bus written out as elements, values in SI at the fundamental."""
    w = 2 * math.pi * bus.f_hz
    s1, s2, s3 = bus.steps
    return "\n".join([
        f"Iinj 0 n1 dc 0 ac {i_amp!r}",
        f"Rtx n1 n2 {bus.r_tx!r}",
        f"Ltx n2 n3 {bus.x_tx / w!r}",
        f"Rup n3 n4 {bus.r_up!r}",
        f"Lup n4 0 {bus.x_up / w!r}",
        f"Rload n1 0 {bus.r_load!r}",
        f"Lmot n1 0 {bus.x_motor / w!r}",
        f"C1 n1 0 {1 / (w * s1.x_c)!r}",
        f"C2 n1 0 {1 / (w * s2.x_c)!r}",
        f"Rl n1 n5 {s3.r_l!r}",
        f"Ll n5 n6 {s3.x_l / w!r}",
        f"C3 n6 0 {1 / (w * s3.x_c)!r}",
    ])


@needs_ngspice
@pytest.mark.parametrize("h,i_amp", [(3, 40.0), (5, 120.0), (7, 60.0), (11, 30.0), (13, 20.0), (25, 5.0)])
def test_bus_voltage_and_capacitor_currents_match_ngspice(h, i_amp):
    # ngspice: a current source of I_h at h·f into the bus; two plain steps, one detuned step
    # (reactor with its resistance), motors, resistive load, transformer and network with their R.
    bus = _bus()
    sol = hb.solve(bus, [0, 1, 2], {h: i_amp})
    w = 2 * math.pi * F * h
    ref = ac_node_voltages(_netlist(bus, i_amp), [F * h], ["n1", "n6"])
    v_ref, v_c3 = ref["n1"][0], ref["n6"][0]
    assert abs(sol.v[h] - v_ref) <= 0.005 * abs(v_ref)
    # capacitor currents from the capacitor voltages: I = V·jωC
    for k, v_cap in ((0, v_ref), (1, v_ref), (2, v_c3)):
        c = 1 / (2 * math.pi * F * bus.steps[k].x_c)
        i_ref = v_cap * 1j * w * c
        assert abs(sol.steps[k][h] - i_ref) <= 0.005 * abs(i_ref), k
    # the capacitor voltage per unit the study uses, against ngspice's capacitor node
    vc = hb.capacitor_voltage_pu(bus, 2, {h: sol.steps[2][h]})[h]
    assert vc == pytest.approx(abs(v_c3) / (525.0 / math.sqrt(3)), rel=0.005)


@needs_ngspice
def test_motor_effect_on_the_resonance_against_ngspice():
    # 1,500 kVA, 6 %, 480 V, 60 Hz, 400 kvar plain: √(S_sc/Q) = √(25000/400) = 7.906 (IEEE Std 1036).
    # With 800 kVA of motors at a locked-rotor ratio of 6 the motors' reactance parallels the supply.
    # ngspice sweep of the lossless network (a 1 MΩ resistor only keeps the peak finite) finds the peak.
    for motors, expect in ((None, math.sqrt(25000 / 400)), (800.0, None)):
        bus = hb.build_bus(V, F, 1500.0, 6.0, motor_kva=motors, steps=[hb.Step(400.0)])
        w = 2 * math.pi * F
        body = "\n".join([f"Ltx n1 0 {bus.x_tx / w!r}", f"C1 n1 0 {1 / (w * bus.steps[0].x_c)!r}", "Rbig n1 0 1e6"]
                         + ([f"Lmot n1 0 {bus.x_motor / w!r}"] if motors else []))
        freqs, z = impedance_sweep(body, 7.0 * F, 10.0 * F, 3001)
        peak = freqs[max(range(len(z)), key=lambda i: abs(z[i]))] / F
        (h,) = rs.resonance_orders(bus, [0])
        assert h == pytest.approx(peak, abs=0.002)
        if expect:
            assert h == pytest.approx(expect, rel=1e-9)
        else:
            # the motors add about k·S_m = 4,800 kVA to the 25,000 kVA short-circuit power:
            # h = √(29,800/400) = 8.63 (hand arithmetic; the ngspice sweep above agrees)
            assert h == pytest.approx(math.sqrt((25000 + 6 * 800) / 400), rel=1e-9)
            assert h == pytest.approx(8.63, abs=0.005)


@needs_ngspice
def test_mixed_plain_and_detuned_resonances_against_ngspice():
    # plain + two different detuning factors: three parallel resonances (one below each pole
    # and one above the last); the model's roots against the ngspice |Z| peaks
    steps = [hb.Step(150.0), hb.Step(100.0, 0.07), hb.Step(100.0, 0.14)]
    bus = hb.build_bus(V, F, 1500.0, 6.0, motor_kva=200.0, steps=steps)
    w = 2 * math.pi * F
    body = "\n".join([f"Ltx n1 0 {bus.x_tx / w!r}", f"Lmot n1 0 {bus.x_motor / w!r}", "Rbig n1 0 1e7",
                      f"C1 n1 0 {1 / (w * bus.steps[0].x_c)!r}",
                      f"L2 n1 n2 {bus.steps[1].x_l / w!r}", f"C2 n2 0 {1 / (w * bus.steps[1].x_c)!r}",
                      f"L3 n1 n3 {bus.steps[2].x_l / w!r}", f"C3 n3 0 {1 / (w * bus.steps[2].x_c)!r}"])
    freqs, z = impedance_sweep(body, 1.5 * F, 15.0 * F, 13501)
    mags = [abs(x) for x in z]
    peaks = [freqs[i] / F for i in range(1, len(z) - 1) if mags[i] > mags[i - 1] and mags[i] > mags[i + 1]]
    orders = rs.resonance_orders(bus, [0, 1, 2])
    assert len(orders) == len(peaks) == 3
    for a, b in zip(orders, peaks):
        assert a == pytest.approx(b, abs=0.002)
    # and the one-p closed form (plain + 7 %): two roots, against the same kind of sweep
    orders2 = rs.resonance_orders(bus, [0, 1])
    body2 = "\n".join(body.split("\n")[:6])
    freqs, z = impedance_sweep(body2, 1.5 * F, 15.0 * F, 13501)
    mags = [abs(x) for x in z]
    peaks2 = [freqs[i] / F for i in range(1, len(z) - 1) if mags[i] > mags[i - 1] and mags[i] > mags[i + 1]]
    assert len(orders2) == len(peaks2) == 2
    for a, b in zip(orders2, peaks2):
        assert a == pytest.approx(b, abs=0.002)


def test_frequency_dependent_resistance_option_against_numpy():
    # R·√h for transformer and network resistance (stated option): numpy nodal solve, one node
    bus = _bus(r_vs_h="sqrt")
    for h in (5, 7, 13):
        w = 2 * math.pi * F * h
        y = (1 / ((bus.r_tx + bus.r_up) * math.sqrt(h) + 1j * h * (bus.x_tx + bus.x_up)) + 1 / bus.r_load
             + 1 / (1j * h * bus.x_motor)
             + sum(1j * w / (2 * math.pi * F * s.x_c) for s in bus.steps[:2])
             + 1 / (bus.steps[2].r_l + 1j * (h * bus.steps[2].x_l - bus.steps[2].x_c / h)))
        v = np.linalg.solve(np.array([[y]]), np.array([10.0 + 0j]))[0]
        assert hb.solve(bus, [0, 1, 2], {h: 10.0}).v[h] == pytest.approx(complex(v), rel=1e-9)


def test_step_values_follow_the_detuning_formulas():
    # detuned step of 120 kvar delivered at 480 V, p = 7 %: X_C = U²/(Q(1 − p)), X_L = p·X_C
    # (circuit theory, as pycore.detuning); rated kvar at 525 V = Q·(1 − p)·(525/480)²
    bus = _bus()
    s = bus.steps[2]
    assert s.x_c == pytest.approx(480.0**2 / (120e3 * 0.93))
    assert s.x_l == pytest.approx(0.07 * s.x_c)
    assert s.r_l == pytest.approx(s.x_l / 40.0)
    assert s.q_rated_kvar == pytest.approx(120.0 * 0.93 * (525 / 480) ** 2)
    # the branch delivers its kvar at the fundamental (lossless part): U²/(X_C − X_L)
    assert 480.0**2 / (s.x_c - s.x_l) / 1e3 == pytest.approx(120.0)
    # plain step without a rating: rated at the system voltage; detuned without: next usual rating
    # above U/(1 − p) with 10 % margin (480/0.93·1.1 = 568 V → 600 V)
    b2 = hb.build_bus(V, F, 1000.0, 5.75, steps=[hb.Step(50.0), hb.Step(50.0, 0.07)])
    assert b2.steps[0].u_rated_v == 480.0 and b2.steps[1].u_rated_v == 600.0


def test_bad_model_input_is_refused_with_a_message():
    with pytest.raises(InputError, match="detuning factor"):
        hb.build_bus(V, F, 1000.0, 5.75, steps=[hb.Step(50.0, 1.2)])
    with pytest.raises(InputError, match="Transformer rating"):
        hb.build_bus(V, F, 0.0, 5.75)
    with pytest.raises(InputError, match="constant"):
        hb.build_bus(V, F, 1000.0, 5.75, r_vs_h="square")
