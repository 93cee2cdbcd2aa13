"""Harmonic sources: typical spectra, measured spectra, and currents backed out of a voltage spectrum.

References: the ideal six-pulse line current's Fourier series (I_h/I_1 = 1/h for h = 6k ± 1,
textbook, e.g. Dugan et al., Electrical Power Systems Quality); the power triangle for I_1; the
other typical spectra are from memory and only checked for their shape.
"""

from __future__ import annotations

import math

import pytest

from pycore import harmonicbus as hb
from pycore import harmonicsources as hs
from pycore.errors import InputError


def test_ideal_six_pulse_is_one_over_h_at_6k_pm_1():
    lv = hs.TYPICAL_SPECTRA["six_pulse_ideal"].levels
    assert sorted(lv) == [5, 7, 11, 13, 17, 19, 23, 25, 29, 31, 35, 37, 41, 43, 47, 49]
    for h, v in lv.items():
        assert v == pytest.approx(100.0 / h)
    assert hs.TYPICAL_SPECTRA["six_pulse_ideal"].confidence == "source"


def test_typical_spectra_are_marked_and_shaped():
    sp = hs.TYPICAL_SPECTRA
    # every recalled spectrum says so where it is shown
    for key, s in sp.items():
        assert (s.confidence == "memory") == ("from memory" in s.source), key
    # a drive with a choke has a larger 5th than the ideal 20 % and smaller higher orders (typical measured
    # spectra, from memory; the ideal 1/h is the Fourier series of the six-pulse current, textbook)
    assert sp["six_pulse_choke"].levels[5] > 20.0
    assert all(sp["six_pulse_choke"].levels[h] < 100.0 / h for h in (11, 13, 17, 19))
    assert sp["six_pulse_bare"].levels[5] > sp["six_pulse_choke"].levels[5]
    assert 3 in sp["single_phase"].levels and 3 not in sp["six_pulse_choke"].levels
    assert sp["twelve_pulse"].levels[11] == pytest.approx(100.0 / 11)


def test_typical_injection_scales_with_kw():
    # I_1 = P/(√3·V·0.95): 400 kW at 480 V → 506.4 A; the 5th of the ideal converter is 20 % of it
    i1 = 400e3 / (math.sqrt(3) * 480 * 0.95)
    inj = hs.typical_injection("six_pulse_ideal", 400.0, 480.0)
    assert inj[5] == pytest.approx(0.2 * i1)
    assert hs.typical_injection("six_pulse_ideal", 800.0, 480.0)[7] == pytest.approx(2 * inj[7])


def test_measured_current_spectrum_in_percent_or_amps():
    assert hs.injection_from_percent({5: 30.0, 7: 10.0}, 200.0) == {5: 60.0, 7: 20.0}
    with pytest.raises(InputError, match="whole numbers"):
        hs.check_orders({5.5: 3.0})
    with pytest.raises(InputError, match="whole numbers"):
        hs.check_orders({1: 3.0})
    with pytest.raises(InputError, match="100 %"):
        hs.check_orders({5: 120.0})
    assert hs.check_orders({5: 120.0}, percent=False) == {5: 120.0}  # amperes may exceed 100


@pytest.mark.parametrize("steps_in", [[0, 1, 2], []])
def test_back_out_of_a_voltage_spectrum_recomputes_it(steps_in):
    # measured with the bank in (all steps) or out: I_h = V_h/|Z_bus(h)| through the bus as measured,
    # then V_h = |I_h·Z_bus(h)| with the same steps in gives the measured spectrum back
    bus = hb.build_bus(480.0, 60.0, 1000.0, 5.75, 5.0, None, None, 300.0, 200.0, 6.0,
                       [hb.Step(200.0), hb.Step(200.0), hb.Step(300.0, 0.07)])
    measured = {3: 0.8, 5: 4.5, 7: 3.1, 11: 1.2, 13: 0.9}
    inj = hs.injection_from_voltage(bus, steps_in, measured)
    back = hs.voltage_percent(bus, steps_in, inj)
    for h in measured:
        assert back[h] == pytest.approx(measured[h], rel=1e-12)
    # and not the same currents if the state is mistaken (bank in read as bank out)
    other = hs.injection_from_voltage(bus, [] if steps_in else [0, 1, 2], measured)
    assert any(abs(other[h] - inj[h]) > 0.01 * inj[h] for h in measured)


def test_combine_adds_magnitudes_by_order():
    assert hs.combine([{5: 10.0, 7: 4.0}, {5: 2.0, 11: 1.0}]) == {5: 12.0, 7: 4.0, 11: 1.0}
    assert hs.screening_orders({5: 1.0, 7: 0.0, 29: 2.0, 3: 0.5}) == (3, 5)
