"""pycore.banklosses and savings.net_of_bank_losses: worked by hand (W/kvar × kvar, kW × h × price)."""

import pytest

from pycore import banklosses, savings
from pycore.errors import InputError


def test_typical_values_are_the_documented_ones():
    # makers' datasheets, from memory: capacitors 0.2–0.5 W/kvar, detuning reactors 4–8 W/kvar
    assert 0.2 <= banklosses.CAPACITOR_W_PER_KVAR <= 0.5
    assert 4.0 <= banklosses.REACTOR_W_PER_KVAR <= 8.0


def test_detuned_bank_by_hand():
    # 200 kvar, all detuned, 0.5 and 6 W/kvar: 0.1 kW + 1.2 kW = 1.3 kW
    b = banklosses.bank_losses(200.0, 200.0, 0.5, 6.0)
    assert (b.capacitors_kw, b.reactors_kw, b.total_kw) == (pytest.approx(0.1), pytest.approx(1.2), pytest.approx(1.3))
    # 1.3 kW × 600 h = 780 kWh at 0.12 per kWh = 93.6 off a gross 250.0 → 156.4
    kwh, cost, net = savings.net_of_bank_losses(250.0, b.total_kw, 600.0, 0.12)
    assert (kwh, cost, net) == (pytest.approx(780.0), pytest.approx(93.6), pytest.approx(156.4))


def test_plain_bank_and_other_losses():
    b = banklosses.bank_losses(100.0, other_w_per_kvar=1.0)
    assert b.reactors_kw == 0.0 and b.total_kw == pytest.approx(0.05 + 0.1)


def test_bad_inputs():
    with pytest.raises(InputError):
        banklosses.bank_losses(100.0, 150.0)
    with pytest.raises(InputError):
        banklosses.bank_losses(-1.0)
    with pytest.raises(InputError):
        savings.net_of_bank_losses(10.0, -1.0, 10.0, 0.1)
