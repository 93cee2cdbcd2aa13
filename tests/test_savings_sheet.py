"""The savings worksheet through the bridge: defaults, each bill structure, bad input at the field,
user text kept verbatim; and the bank's own losses subtracted from the saving.

Independent check of the losses: energy = power × time and money = energy × price (arithmetic), with the
typical loss figures written out here — capacitors 0.5 W/kvar, detuning reactors 6 W/kvar
(makers' datasheets, from memory) — and the gross saving from the numpy power triangle.
"""

import json

import numpy as np
import pytest

import app.bridge as bridge
from helpers import res, run


def test_catalog_lists_the_sheet():
    ids = [s["id"] for s in json.loads(bridge.catalog())]
    assert "savings" in ids


def test_savings_defaults_compute_with_payback():
    r = run("savings", {})
    assert r["ok"], r
    sheet = bridge.sheets()["savings"]
    d = {f.name: f.default for f in sheet.fields}
    p, pf1, pf2, price, cost = (float(d[k]) for k in ("p_kw", "pf1", "pf2", "kva_price", "cost"))
    # independent: S from the numpy power triangle, saving × 12, cost / yearly
    s1 = abs(p + 1j * p * np.tan(np.arccos(pf1)))
    s2 = abs(p + 1j * p * np.tan(np.arccos(pf2)))
    monthly = price * (s1 - s2)
    assert res(r, "monthly")["value"] == pytest.approx(monthly, rel=1e-10)
    # the bank's own losses: 200 kvar × 0.5 W/kvar (from memory) for 400 h at 0.14 per kWh
    net = monthly - 200 * 0.5 / 1000 * 400 * 0.14
    assert res(r, "net_monthly")["value"] == pytest.approx(net, rel=1e-10)
    assert res(r, "yearly")["value"] == pytest.approx(12 * net, rel=1e-10)
    assert res(r, "payback")["value"] == pytest.approx(cost / (12 * net), rel=1e-10)
    assert any("estimate" in c.lower() for c in r["cautions"])


@pytest.mark.parametrize("tariff", ["kva", "penalty", "kvarh"])
def test_each_bill_structure_computes(tariff):
    r = run("savings", {"tariff": tariff, "add_losses": "yes"})
    assert r["ok"], r
    parts = [x for x in r["results"] if x["name"].startswith("save_")]
    assert len(parts) == 2
    assert res(r, "monthly")["value"] == pytest.approx(sum(x["value"] for x in parts), rel=1e-12)


def test_penalty_amount_mode_edge_through_the_bridge():
    # PF 0.855 against 0.90, 150 per 0.01 "or part of it": 5 steps → 750 a month (exact arithmetic)
    r = run("savings", {"tariff": "penalty", "penalty_mode": "amount", "penalty_amount": "150",
                        "pf1": "0.855", "threshold": "0.90", "rounding": "part", "cost": "9000", "bank_kvar": ""})
    assert r["ok"], r  # (bank's own losses left out: a blank kvar)
    assert res(r, "monthly")["value"] == pytest.approx(750)
    assert res(r, "payback")["value"] == pytest.approx(9000 / 9000)
    r = run("savings", {"tariff": "penalty", "pf1": "0.90", "threshold": "0.90"})
    assert r["ok"] and res(r, "monthly")["value"] == 0
    assert res(r, "payback")["value"] is None and res(r, "payback")["status"] == "warn"
    assert r["warnings"]


@pytest.mark.parametrize("inputs, field", [
    ({"pf2": "0.7"}, "pf2"),
    ({"pf1": "1.2"}, "pf1"),
    ({"pf1": "0"}, "pf1"),
    ({"cost": "0"}, "cost"),
    ({"cost": "lots"}, "cost"),
    ({"p_kw": "420 kvar"}, "p_kw"),
    ({"tariff": "penalty", "threshold": "1.5"}, "threshold"),
    ({"tariff": "penalty", "penalty_pct": "-1"}, "penalty_pct"),
    ({"tariff": "kvarh", "kwh_month": ""}, "kwh_month"),
    ({"tariff": "none"}, "add_losses"),
    ({"add_losses": "yes", "hours_month": "800"}, "hours_month"),
    ({"currency": "x" * 40}, "currency"),
])
def test_savings_bad_inputs_at_the_field(inputs, field):
    r = run("savings", inputs)
    assert not r["ok"]
    assert field in r["field_errors"], r["field_errors"]
    assert r["results"] == []


def test_hidden_fields_are_not_checked():
    # a bad kvarh price does not matter while the bill is on kVA demand
    r = run("savings", {"tariff": "kva", "kvarh_price": "nonsense"})
    assert r["ok"]


def test_currency_text_is_kept_verbatim():
    cur = "<b>€</b>"
    r = run("savings", {"currency": cur})
    assert r["ok"] and res(r, "monthly")["display"].endswith(cur)


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
