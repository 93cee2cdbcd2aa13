"""Savings worksheet: the bank's own losses subtracted from the saving.

Independent check: energy = power × time and money = energy × price (arithmetic), with the
typical loss figures written out here — capacitors 0.5 W/kvar, detuning reactors 6 W/kvar
(makers' datasheets, from memory) — and the gross saving from the numpy power triangle.
"""

from __future__ import annotations

import numpy as np
import pytest

from helpers import res, run

SHEET = "savings"


def test_detuned_bank_losses_and_net_payback():
    r = run(SHEET, bank_kvar=300, bank_detuned=200, bank_hours=500, energy_price=0.2, cost=20000)
    assert r["ok"], r
    p, pf1, pf2, price = 420, 0.78, 0.95, 11.5
    gross = price * (p / pf1 - p / pf2)  # kVA demand saving, power triangle
    assert res(r, "monthly")["value"] == pytest.approx(gross, rel=1e-10)
    loss_kw = (300 * 0.5 + 200 * 6.0) / 1000  # capacitors on all 300 kvar, reactors on the 200 detuned
    assert res(r, "bank_loss_kw")["value"] == pytest.approx(loss_kw, rel=1e-12)
    cost = loss_kw * 500 * 0.2
    assert res(r, "bank_cost")["value"] == pytest.approx(cost, rel=1e-12)
    net = gross - cost
    assert res(r, "net_monthly")["value"] == pytest.approx(net, rel=1e-12)
    assert res(r, "payback")["value"] == pytest.approx(20000 / (12 * net), rel=1e-12)


def test_editable_loss_figures_and_blank_bank():
    r = run(SHEET, bank_kvar=100, cap_w=0.2, bank_hours=100, energy_price=1)
    assert res(r, "bank_cost")["value"] == pytest.approx(100 * 0.2 / 1000 * 100 * 1, rel=1e-12)
    r = run(SHEET, bank_kvar="")
    assert r["ok"] and not any(x["name"] == "net_monthly" for x in r["results"])
    assert np.isclose(res(r, "yearly")["value"], 12 * res(r, "monthly")["value"])


def test_more_detuned_than_in_service_refused_at_its_field():
    r = run(SHEET, bank_kvar=100, bank_detuned=150)
    assert not r["ok"] and "bank_detuned" in r["field_errors"]
