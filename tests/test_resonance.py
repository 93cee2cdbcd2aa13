"""Series and parallel R-L-C resonance (pycore.resonance) against a textbook, ngspice and scipy."""

import cmath
import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from scipy import signal

from pycore import resonance as rz
from pycore.errors import InputError
from spice import impedance_at, impedance_sweep, needs_ngspice


# --- Textbook worked examples -----------------------------------------------------------

def test_alexander_sadiku_series_example():
    # C. K. Alexander & M. N. O. Sadiku, Fundamentals of Electric Circuits, chapter
    # "Frequency Response", series-resonance worked example (from memory): R = 2 Ω,
    # L = 1 mH, C = 0.4 µF → ω0 = 50 krad/s, ω1 ≈ 49 krad/s, ω2 ≈ 51 krad/s, Q = 25, B = 2 krad/s.
    a = rz.analyse(2.0, 1e-3, 0.4e-6, "series")
    assert a.w0 == pytest.approx(50e3, rel=1e-9)
    assert a.q == pytest.approx(25.0, rel=1e-9)
    assert 2 * math.pi * a.bandwidth == pytest.approx(2e3, rel=1e-9)
    # the book rounds ω1, ω2 to 49 and 51 krad/s (exact: 49.010 and 51.010 krad/s)
    assert 2 * math.pi * a.f_low == pytest.approx(49e3, rel=1e-3)
    assert 2 * math.pi * a.f_high == pytest.approx(51e3, rel=1e-3)
    # the book's current at resonance for a 10 V source: I = V/R = 5 A (from memory)
    assert 10.0 / abs(rz.impedance(2.0, 1e-3, 0.4e-6, a.f0, "series")) == pytest.approx(5.0, rel=1e-9)


def test_alexander_sadiku_parallel_example():
    # Alexander & Sadiku, Fundamentals of Electric Circuits, parallel-resonance worked example
    # (from memory): R = 8 kΩ, L = 0.2 mH, C = 8 µF → ω0 = 25 krad/s, Q = 1600,
    # B = 15.625 rad/s, ω1 = 24.992 krad/s, ω2 = 25.008 krad/s.
    a = rz.analyse(8e3, 0.2e-3, 8e-6, "parallel")
    assert a.w0 == pytest.approx(25e3, rel=1e-9)
    assert a.q == pytest.approx(1600.0, rel=1e-9)
    assert 2 * math.pi * a.bandwidth == pytest.approx(15.625, rel=1e-9)
    assert 2 * math.pi * a.f_low == pytest.approx(24.992e3, abs=1.0)
    assert 2 * math.pi * a.f_high == pytest.approx(25.008e3, abs=1.0)
    assert a.z_at_f0 == 8e3  # |Z| at resonance is R for the parallel circuit (textbook)


def test_textbook_identities():
    # Alexander & Sadiku: ω0 = √(ω1·ω2) and B = ω2 − ω1 for both circuits; Z0 = √(L/C).
    for topo, r in (("series", 3.3), ("parallel", 47.0)):
        a = rz.analyse(r, 4.7e-3, 33e-6, topo)
        assert math.sqrt(a.f_low * a.f_high) == pytest.approx(a.f0, rel=1e-12)
        assert a.f_high - a.f_low == pytest.approx(a.bandwidth, rel=1e-12)
    assert rz.characteristic_impedance(4.7e-3, 33e-6) == pytest.approx(math.sqrt(4.7e-3 / 33e-6), rel=1e-15)


def test_solve_for_missing_element_round_trip():
    # ω0 = 1/√(LC) solved for C or L must give back the wanted frequency (circuit theory).
    c = rz.capacitance_for(250.0, 1.2e-3)
    assert rz.resonant_frequency(1.2e-3, c) == pytest.approx(250.0, rel=1e-12)
    l_ = rz.inductance_for(4.7 * 60, 150e-6)
    assert rz.resonant_frequency(l_, 150e-6) == pytest.approx(282.0, rel=1e-12)
    # 1 mH resonates at 1 kHz with 25.33 µF (1/(4π²·10⁶·10⁻³), computed by hand)
    assert rz.capacitance_for(1000.0, 1e-3) == pytest.approx(25.330e-6, rel=1e-4)


def test_lossless_limits():
    a = rz.analyse(0.0, 1e-3, 1e-6, "series")
    assert a.q == math.inf and a.bandwidth == 0.0 and a.f_low == pytest.approx(a.f0) == a.f_high
    b = rz.analyse(None, 1e-3, 1e-6, "parallel")
    assert b.q == math.inf and b.z_at_f0 == math.inf
    assert rz.impedance(None, 1e-3, 1e-6, b.f0 * 1.5, "parallel").real == 0.0


@pytest.mark.parametrize(
    "args",
    [
        (1.0, 0.0, 1e-6, "series"),  # L = 0
        (1.0, -1e-3, 1e-6, "series"),  # L < 0
        (1.0, 1e-3, 0.0, "parallel"),  # C = 0
        (1.0, 1e-3, -2e-6, "parallel"),  # C < 0
        (-1.0, 1e-3, 1e-6, "series"),  # R < 0
        (0.0, 1e-3, 1e-6, "parallel"),  # parallel R = 0 is a short
        (1.0, float("nan"), 1e-6, "series"),
        (1.0, 1e-3, float("inf"), "series"),
        (1.0, 1e-3, 1e-6, "mesh"),
    ],
)
def test_bad_input_raises(args):
    with pytest.raises(InputError):
        rz.analyse(*args)


def test_bad_frequency_raises():
    with pytest.raises(InputError):
        rz.impedance(1.0, 1e-3, 1e-6, 0.0, "series")
    with pytest.raises(InputError):
        rz.capacitance_for(-50.0, 1e-3)
    with pytest.raises(InputError):
        rz.inductance_for(50.0, 0.0)


@settings(max_examples=200, deadline=None)
@given(
    r=st.floats(0.01, 1e3),
    l_=st.floats(1e-6, 1.0),
    c=st.floats(1e-9, 1e-2),
    topo=st.sampled_from(["series", "parallel"]),
)
def test_half_power_points_are_at_3db(r, l_, c, topo):
    # Definition (Alexander & Sadiku): at f1 and f2 the series |Z| is √2·R, the parallel |Z| is R/√2.
    a = rz.analyse(r, l_, c, topo)
    want = r * math.sqrt(2) if topo == "series" else r / math.sqrt(2)
    for f in (a.f_low, a.f_high):
        assert abs(rz.impedance(r, l_, c, f, topo)) == pytest.approx(want, rel=1e-6)


# --- scipy: the same circuits as rational transfer functions -----------------------------

@pytest.mark.parametrize("topo,r,l_,c", [("series", 0.05, 1.2e-3, 220e-6), ("parallel", 120.0, 2.2e-3, 47e-6)])
def test_impedance_against_scipy_freqs(topo, r, l_, c):
    # scipy.signal.freqs evaluates Z(s) as a ratio of polynomials, built independently:
    # series Z(s) = (LCs² + RCs + 1)/(Cs); parallel Z(s) = RLs/(RLCs² + Ls + R).
    if topo == "series":
        num, den = [l_ * c, r * c, 1.0], [c, 0.0]
    else:
        num, den = [r * l_, 0.0], [r * l_ * c, l_, r]
    f = np.geomspace(5.0, 50e3, 60)
    _, h = signal.freqs(num, den, worN=2 * np.pi * f)
    for fk, hk in zip(f, h):
        z = rz.impedance(r, l_, c, float(fk), topo)
        assert abs(z) == pytest.approx(abs(hk), rel=1e-9)
        assert rz.phase_deg(z) == pytest.approx(math.degrees(cmath.phase(hk)), abs=1e-7)


# --- ngspice AC sweeps ----------------------------------------------------------------------

CASES = [
    # (topology, R Ω, L H, C F) — invented test values across power and electronics ranges
    ("series", 0.05, 1.2e-3, 220e-6),
    ("series", 2.0, 1e-3, 0.4e-6),
    ("series", 15.0, 10e-3, 1e-6),
    ("parallel", 8e3, 0.2e-3, 8e-6),
    ("parallel", 120.0, 2.2e-3, 47e-6),
    ("parallel", 10.0, 50e-6, 100e-6),
]


def _netlist(topo, r, l_, c):
    if topo == "series":
        return f"R1 n1 n2 {r!r}\nL1 n2 n3 {l_!r}\nC1 n3 0 {c!r}"
    return f"R1 n1 0 {r!r}\nL1 n1 0 {l_!r}\nC1 n1 0 {c!r}"


@needs_ngspice
@pytest.mark.parametrize("topo,r,l_,c", CASES)
def test_impedance_against_ngspice(topo, r, l_, c):
    # ngspice AC analysis of the same circuit: |Z| within 0.1 % at sampled frequencies.
    a = rz.analyse(r, l_, c, topo)
    freqs = [a.f0 * k for k in (0.1, 0.3, 0.7, 0.95, 1.0, 1.05, 1.5, 3.0, 10.0)] + [a.f_low, a.f_high]
    zs = impedance_at(_netlist(topo, r, l_, c), freqs)
    for f, z_ref in zip(freqs, zs):
        z = rz.impedance(r, l_, c, f, topo)
        assert abs(z) == pytest.approx(abs(z_ref), rel=1e-3), f
        assert rz.phase_deg(z) == pytest.approx(math.degrees(cmath.phase(z_ref)), abs=0.1)


@needs_ngspice
@pytest.mark.parametrize("topo,r,l_,c", CASES)
def test_resonant_frequency_against_ngspice_sweep(topo, r, l_, c):
    # Resonance from an ngspice sweep: the phase of Z crosses zero at f0 (both circuits).
    # Linear sweep ±20 % around the formula's f0, zero crossing interpolated; within 0.5 %.
    f0 = rz.resonant_frequency(l_, c)
    freqs, zs = impedance_sweep(_netlist(topo, r, l_, c), 0.8 * f0, 1.2 * f0, 4001)
    ph = [cmath.phase(z) for z in zs]
    cross = [i for i in range(len(ph) - 1) if (ph[i] <= 0 < ph[i + 1]) or (ph[i] >= 0 > ph[i + 1])]
    assert len(cross) == 1
    i = cross[0]
    f_spice = freqs[i] + (freqs[i + 1] - freqs[i]) * ph[i] / (ph[i] - ph[i + 1])
    assert f0 == pytest.approx(f_spice, rel=5e-3)
    # and |Z| extreme (minimum for series, maximum for parallel) at the same place
    mags = [abs(z) for z in zs]
    k = mags.index(min(mags) if topo == "series" else max(mags))
    assert freqs[k] == pytest.approx(f0, rel=5e-3)


@needs_ngspice
def test_solved_capacitor_resonates_in_ngspice():
    # The C found for L = 1.2 mH and f0 = 250 Hz, simulated: phase zero crossing at 250 Hz ± 0.5 %.
    c = rz.capacitance_for(250.0, 1.2e-3)
    freqs, zs = impedance_sweep(_netlist("series", 0.1, 1.2e-3, c), 200.0, 300.0, 1001)
    ph = [cmath.phase(z) for z in zs]
    i = next(i for i in range(len(ph) - 1) if ph[i] <= 0 < ph[i + 1])
    assert freqs[i] == pytest.approx(250.0, rel=5e-3)
