"""Capacitor duty with harmonics (pycore.capduty) against numpy, IEEE Std 18 limit edges,
IEEE Std 519-2014 Table 1 and ngspice."""

import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from pycore import capduty
from pycore.errors import InputError
from spice import ac_node_voltages, needs_ngspice


def _numpy_duty(v1_bus, spectrum, p=0.0, k=1.0):
    """Independent reference: capacitor voltages from complex branch impedances (numpy), then
    the IEEE 1036 sums. Per unit of rated; X_C = 1 pu at the fundamental."""
    orders = np.array([1] + sorted(spectrum), dtype=float)
    vbus = np.array([v1_bus] + [v1_bus * spectrum[h] / 100 for h in sorted(spectrum)])
    zc = -1j / orders  # capacitor reactance at each order (pu)
    zl = 1j * orders * p  # series reactor, X_L = p·X_C
    vc = np.abs(vbus * zc / (zc + zl))  # voltage divider
    ic = k * orders * vc
    return (
        np.sqrt(np.sum(vc**2)),
        np.sum(vc),
        np.sqrt(np.sum(ic**2)),
        np.sum(vc * ic),
    )


SPECTRA = [
    # invented demo spectra
    {5: 4.5, 7: 3.2, 11: 1.8, 13: 1.2},
    {3: 2.0, 5: 6.0, 7: 5.0, 9: 0.8, 11: 3.5, 13: 2.5, 17: 1.1, 19: 0.9, 23: 0.6, 25: 0.5},
    {2: 0.5, 50: 1.0},
]


@pytest.mark.parametrize("spectrum", SPECTRA)
@pytest.mark.parametrize("u_bus, u_rated, p, k", [(400, 440, 0.0, 1.0), (400, 480, 0.07, 1.0),
                                                  (480, 600, 0.14, 1.2), (415, 400, 0.0, 1.0)])
def test_duty_sums_against_numpy(spectrum, u_bus, u_rated, p, k):
    d = capduty.capacitor_duty(u_rated, u_bus, spectrum, "voltage", p, k)
    ref = _numpy_duty(u_bus / u_rated, spectrum, p, k)
    assert d.v_rms_percent == pytest.approx(100 * ref[0], rel=1e-12)
    assert d.v_peak_percent == pytest.approx(100 * ref[1], rel=1e-12)
    assert d.i_rms_percent == pytest.approx(100 * ref[2], rel=1e-12)
    assert d.kvar_percent == pytest.approx(100 * ref[3], rel=1e-12)


@settings(max_examples=60, deadline=None)
@given(
    spectrum=st.dictionaries(st.integers(2, 50), st.floats(0, 100, allow_nan=False), min_size=1, max_size=20),
    v1=st.floats(0.5, 1.2),
)
def test_duty_sums_property_against_numpy(spectrum, v1):
    d = capduty.capacitor_duty(1000.0, 1000.0 * v1, spectrum, "voltage", 0.0, 1.0)
    ref = _numpy_duty(v1, spectrum)
    assert d.v_rms_percent == pytest.approx(100 * ref[0], rel=1e-9)
    assert d.v_peak_percent == pytest.approx(100 * ref[1], rel=1e-9)
    assert d.i_rms_percent == pytest.approx(100 * ref[2], rel=1e-9)
    assert d.kvar_percent == pytest.approx(100 * ref[3], rel=1e-9)
    # THD as IEEE 519 defines it, with numpy
    assert d.bus_thd_percent == pytest.approx(np.sqrt(np.sum(np.array(list(spectrum.values())) ** 2)), rel=1e-9, abs=1e-12)
    # the arithmetic peak sum is never below the rms (triangle inequality)
    assert d.v_peak_percent >= d.v_rms_percent * (1 - 1e-12)


def test_current_spectrum_rms_current():
    # From a current spectrum the rms current is I₁·√(1 + Σ(I_h/I₁)²) directly (definition of rms);
    # I₁ = V₁·(f/f_R) per unit for a capacitor (X_C = 1/(2πfC)).
    spec = {5: 30.0, 7: 20.0, 11: 8.0, 13: 5.0}
    for p, k in ((0.0, 1.0), (0.07, 1.0), (0.0, 1.2)):
        d = capduty.capacitor_duty(440, 400, spec, "current", p, k)
        i1 = k * (400 / 440) / (1 - p)
        levels = np.array(list(spec.values())) / 100
        assert d.i_rms_percent == pytest.approx(100 * i1 * np.sqrt(1 + np.sum(levels**2)), rel=1e-12)
        # voltage per harmonic: V_h = I_h/(k·h)
        for h, lv in spec.items():
            assert d.v_cap_pu[h] == pytest.approx(lv / 100 * i1 / (k * h), rel=1e-12)


def test_current_spectrum_plain_bank_bus_voltage():
    # Plain bank: the bus voltage is the capacitor voltage, V_h/V_1 = (I_h/I_1)/h (numpy reference).
    spec = {5: 30.0, 7: 20.0, 11: 8.0}
    d = capduty.capacitor_duty(480, 480, spec, "current")
    for h, lv in spec.items():
        assert d.v_bus_percent[h] == pytest.approx(lv / h, rel=1e-12)
    assert d.bus_thd_percent == pytest.approx(np.linalg.norm([30 / 5, 20 / 7, 8 / 11]), rel=1e-12)


@needs_ngspice
@pytest.mark.parametrize("p", [0.07, 0.14, 0.0567])
def test_detuned_divider_against_ngspice(p):
    # ngspice: 1 V at the bus at h·f across the series reactor + capacitor; |V(n2)| is the
    # capacitor's share, which the module takes as 1/|1 − p·h²|.
    f = 50.0
    xc = 3.0
    c = 1 / (2 * math.pi * f * xc)
    l_h = p * xc / (2 * math.pi * f)
    body = f"V1 n1 0 dc 0 ac 1\nL1 n1 n2 {l_h!r}\nC1 n2 0 {c!r}\n"
    orders = [5, 7, 11, 13, 3]
    res = ac_node_voltages(body, [h * f for h in orders], ["n2"])["n2"]
    for h, v in zip(orders, res):
        d = capduty.capacitor_duty(400, 400, {h: 10.0}, "voltage", p)
        assert d.v_cap_pu[h] == pytest.approx(0.1 * abs(v), rel=1e-6)
    # and the fundamental rise U/(1 − p)
    v1 = ac_node_voltages(body, [f], ["n2"])["n2"][0]
    assert capduty.capacitor_duty(400, 400, {5: 0.0}, "voltage", p).v_cap_pu[1] == pytest.approx(abs(v1), rel=1e-6)


# --- IEEE Std 18-2002 continuous limits: 110 % rms V, 120 % peak V, 135 % rms I, 135 % kvar
# (source: IEEE Std 18-2002; the 2012 revision believed the same — from memory).

def test_ieee18_limit_values():
    assert capduty.IEEE18_LIMITS_PERCENT == {"v_rms": 110.0, "v_peak": 120.0, "i_rms": 135.0, "kvar": 135.0}


def _verdicts(d):
    return {name: ok for name, _, _, _, ok in d.against_limits()}


@pytest.mark.parametrize("factor, passes", [(1.0, True), (0.999, True), (1.001, False)])
def test_ieee18_rms_voltage_edge(factor, passes):
    # Fundamental only at 110 % of rated: rms 110 (the edge), peak 110, current 110, kvar 121.
    d = capduty.capacitor_duty(1000, 1100 * factor, {5: 0.0})
    assert d.v_rms_percent == pytest.approx(110 * factor)
    v = _verdicts(d)
    assert v["v_rms"] is passes
    assert v["v_peak"] and v["i_rms"] and v["kvar"]


@pytest.mark.parametrize("level, passes", [(20.0, True), (19.99, True), (20.01, False)])
def test_ieee18_peak_voltage_edge(level, passes):
    # V₁ = 1, V₂ = 0.20: peak = 1.20 (the edge); rms √1.04, current √(1 + 0.4²), kvar 1.08 all inside.
    d = capduty.capacitor_duty(1000, 1000, {2: level})
    assert d.v_peak_percent == pytest.approx(100 + level)
    v = _verdicts(d)
    assert v["v_peak"] is passes
    assert v["v_rms"] and v["i_rms"] and v["kvar"]


@pytest.mark.parametrize("factor, passes", [(1.0, True), (0.999, True), (1.001, False)])
def test_ieee18_current_edge(factor, passes):
    # V₁ = 1 and one 11th harmonic with (11·V₁₁)² = 1.35² − 1: rms current exactly 135 %.
    level = 100 * math.sqrt(1.35**2 - 1) / 11 * factor
    d = capduty.capacitor_duty(1000, 1000, {11: level})
    v = _verdicts(d)
    assert v["i_rms"] is passes
    assert v["v_rms"] and v["v_peak"] and v["kvar"]


@pytest.mark.parametrize("factor, passes", [(1.0, True), (0.999, True), (1.001, False)])
def test_ieee18_kvar_edge(factor, passes):
    # Fundamental only at V₁ = 1.05 and f/f_R = k: kvar = k·V₁² = 1.35 at the edge while the
    # current k·V₁ ≈ 1.286, rms and peak 1.05 stay inside.
    k = 1.35 / 1.05**2 * factor
    d = capduty.capacitor_duty(1000, 1050, {7: 0.0}, f_ratio=k)
    assert d.kvar_percent == pytest.approx(135 * factor)
    v = _verdicts(d)
    assert v["kvar"] is passes
    assert v["v_rms"] and v["v_peak"] and v["i_rms"]


# --- IEEE Std 519-2014 Table 1 (≤ 1 kV row and THD: source; individual above 1 kV: from memory)

@pytest.mark.parametrize("u, ind, thd", [
    (400, 5.0, 8.0), (1000, 5.0, 8.0), (1001, 3.0, 5.0), (13800, 3.0, 5.0), (69000, 3.0, 5.0),
    (115000, 1.5, 2.5), (161000, 1.5, 2.5), (230000, 1.0, 1.5),
])
def test_ieee519_table1(u, ind, thd):
    got = capduty.ieee519_voltage_limits(u)
    assert got[:2] == (ind, thd)


@pytest.mark.parametrize("bad", [
    {}, {1: 5.0}, {51: 1.0}, {5.5: 1.0}, {5: -1.0}, {5: 100.5}, {5: math.nan},
])
def test_bad_spectra_refused(bad):
    with pytest.raises(InputError):
        capduty.capacitor_duty(440, 400, bad)


def test_harmonic_at_tuning_order_refused():
    # p = 4 % tunes the branch exactly to the 5th: a bus voltage at the 5th would drive unlimited current.
    with pytest.raises(InputError, match="tuning order"):
        capduty.capacitor_duty(480, 400, {5: 3.0}, "voltage", 0.04)


def test_rated_current():
    # Three-phase line current Q/(√3·U): 50 kvar at 440 V → 65.6 A; single-phase Q/U.
    assert capduty.rated_current_a(50, 440) == pytest.approx(50e3 / (math.sqrt(3) * 440))
    assert capduty.rated_current_a(10, 240, phases=1) == pytest.approx(10e3 / 240)


def test_duty_profiles_ieee18_and_iec60831():
    # IEEE Std 18-2002: 110 % rms V, 120 % peak V, 135 % rms I, 135 % kvar; at the limit passes
    rows = capduty.profile_check({"v_rms": 110.0, "v_peak": 120.1, "i_rms": 135.0, "kvar": 100.0}, "ieee18")
    assert rows == [("v_rms", 110.0, 110.0, "ok"), ("v_peak", 120.1, 120.0, "fail"), ("i_rms", 135.0, 135.0, "ok"),
                    ("kvar", 100.0, 135.0, "ok")]
    # IEC 60831-1 (from memory): 1.00·U_N continuous, 1.10·U_N for 8 h in 24 h, 1.30·I_N; no peak or kvar limit
    rows = capduty.profile_check({"v_rms": 103.6, "v_peak": 150.0, "i_rms": 129.0, "kvar": 150.0}, "iec60831")
    assert rows == [("v_rms", 103.6, 100.0, "short"), ("i_rms", 129.0, 130.0, "ok")]
    assert capduty.profile_check({"v_rms": 110.5}, "iec60831") == [("v_rms", 110.5, 100.0, "fail")]
    assert capduty.DUTY_PROFILES["iec60831"][2] == (110.0, "8 h in every 24 h")
