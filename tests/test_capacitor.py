"""pycore.capacitor: off-rating output, µF per phase, currents, IEEE 18 duty, NEC and IEC current basis.

References are computed independently here with numpy from phasors (first principles), or named.
"""

import math

import numpy as np
import pytest

from pycore import capacitor
from pycore.errors import InputError

A = np.exp(-2j * np.pi / 3)


def _phase_voltages(v_ll):
    return v_ll / np.sqrt(3) * np.array([1, A, A * A])


def _bank_numpy(c_farad, v_ll, f, connection):
    """Line currents and reactive power [var, positive = supplied] of a balanced bank of C per
    phase, from phasor nodal equations (numpy)."""
    v = _phase_voltages(v_ll)
    y = 1j * 2 * np.pi * f * c_farad
    if connection == "delta":
        i_ab, i_bc, i_ca = (v[0] - v[1]) * y, (v[1] - v[2]) * y, (v[2] - v[0]) * y
        i_line = np.array([i_ab - i_ca, i_bc - i_ab, i_ca - i_bc])
        branch = abs(i_ab)
    else:
        i_line = v * y
        branch = abs(i_line[0])
    s = np.sum(v * np.conj(i_line))  # complex power absorbed
    return i_line, -s.imag, branch


@pytest.mark.parametrize("connection", ["delta", "wye"])
@pytest.mark.parametrize("q_kvar,v_ll,f", [(220, 480, 60), (50, 400, 50), (1200, 4160, 60), (7.5, 208, 60)])
def test_capacitance_per_phase_against_numpy(connection, q_kvar, v_ll, f):
    c_uf = capacitor.capacitance_uf(q_kvar, v_ll, f, connection, phases=3)
    _, q_var, _ = _bank_numpy(c_uf * 1e-6, v_ll, f, connection)
    assert q_var / 1000 == pytest.approx(q_kvar, rel=1e-12)
    assert capacitor.kvar_from_uf(c_uf, v_ll, f, connection) == pytest.approx(q_kvar, rel=1e-12)


def test_delta_and_wye_differ_by_three():
    # Wye elements see V/√3, so they need three times the µF of delta (circuit theory)
    assert capacitor.capacitance_uf(100, 480, 60, "wye") == pytest.approx(3 * capacitor.capacitance_uf(100, 480, 60, "delta"))


def test_single_phase_capacitance_against_numpy():
    q, v, f = 10.0, 240.0, 60.0
    c = capacitor.capacitance_uf(q, v, f, phases=1) * 1e-6
    i = v * 2 * np.pi * f * c
    assert v * i / 1000 == pytest.approx(q, rel=1e-12)


@pytest.mark.parametrize("connection", ["delta", "wye"])
def test_rated_current_against_numpy(connection):
    q, v, f = 220.0, 480.0, 60.0
    c = capacitor.capacitance_uf(q, v, f, connection) * 1e-6
    i_line, _, branch = _bank_numpy(c, v, f, connection)
    assert capacitor.line_current(q, v, 3) == pytest.approx(abs(i_line[0]), rel=1e-12)
    if connection == "delta":
        assert capacitor.line_current(q, v, 3) / math.sqrt(3) == pytest.approx(branch, rel=1e-12)


def test_current_from_maker_tables():
    # A 100 kvar, 480 V three-phase capacitor draws about 120 A (makers' rating tables; from memory)
    assert capacitor.line_current(100, 480, 3) == pytest.approx(120.3, abs=0.1)


@pytest.mark.parametrize("v,vr,f,fr", [(480, 525, 60, 60), (400, 440, 50, 50), (480, 480, 60, 50), (415, 400, 50, 60)])
def test_output_off_rating_against_numpy(v, vr, f, fr):
    # Fix C from the nameplate (Q_r at V_r, f_r), then compute Q at (V, f) from the phasors.
    q_r = 50.0
    c = capacitor.capacitance_uf(q_r, vr, fr, "delta") * 1e-6
    _, q_var, _ = _bank_numpy(c, v, f, "delta")
    assert capacitor.output_at(q_r, v, vr, f, fr) == pytest.approx(q_var / 1000, rel=1e-12)
    assert capacitor.rating_for(q_var / 1000, v, vr, f, fr) == pytest.approx(q_r, rel=1e-12)


def test_fifty_hertz_unit_on_sixty():
    # X_C = 1/(2πfC): a 50 Hz unit on 60 Hz gives 60/50 = 1.2 × kvar and current (physics)
    d = capacitor.duty(480, 480, 60, 50)
    assert d.kvar == pytest.approx(1.2)
    assert d.current == pytest.approx(1.2)
    assert d.over_limits() == []


def test_ieee18_limits():
    # IEEE Std 18: continuous operation to 110 % rms voltage, 135 % kvar, 135 % rms current
    assert capacitor.duty(528, 480, 60, 60).over_limits() == []  # exactly 110 %
    assert "voltage" in capacitor.duty(530, 480, 60, 60).over_limits()
    assert "kvar" in capacitor.duty(480, 480, 60, 40).over_limits()  # 150 % kvar from frequency


def test_nec_460_8_135_percent():
    # NFPA 70 (NEC) 460.8(A): conductor ampacity ≥ 135 % of rated current; 460.8(C): disconnect ≥ 135 %
    b = capacitor.conductor_basis(264.6, "nec")
    assert b["conductor"] == pytest.approx(1.35 * 264.6)
    assert b["disconnect"] == pytest.approx(1.35 * 264.6)


def test_iec_60831_current_basis():
    # IEC 60831-1 (from memory): maximum current 1.30 × I_N; 1.43 × I_N with the capacitance tolerance
    b = capacitor.conductor_basis(100.0, "iec")
    assert b["factor"] == pytest.approx(1.30)
    assert b["factor_tol"] == pytest.approx(1.43)
    assert b["conductor"] == pytest.approx(143.0)
    with pytest.raises(InputError):
        capacitor.conductor_basis(100.0, "other")


def test_wye_element_voltage():
    assert capacitor.element_voltage(480, "wye") == pytest.approx(480 / math.sqrt(3))
    assert capacitor.element_voltage(480, "delta") == 480


@pytest.mark.parametrize("bad", [0, -480, float("inf")])
def test_bad_voltage_refused(bad):
    with pytest.raises(InputError):
        capacitor.capacitance_uf(100, bad, 60)
