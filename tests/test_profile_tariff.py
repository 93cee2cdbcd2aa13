"""The load-profile worksheet's bill (app/sheets/_profile_tariff.py): each month's power-factor
charge before and after the bank, against a two-month profile worked out by hand here, and the
link into savings (offered only when Savings can compute it, and agreeing with it).

Hand working: P = 100 kW and Q = 75 kvar every hour (PF 0.8, power triangle) for 24 h on
2025-01-31 and 24 h on 2025-02-01; a fixed 50 kvar bank leaves Q = 25 kvar (PF 100/√(100² + 25²)).
Tariff rules (common tariff practice; the savings worksheet's models): kVA demand charge = price ×
P_peak/PF; kvarh charged = max(0, kvarh − kWh·tan(acos PF_threshold)).
"""

from __future__ import annotations

import math

import pytest

from helpers import res, run

ROWS = "\n".join(f"2025-{m:02d}-{d:02d} {h:02d}:00,100,75" for m, d in ((1, 31), (2, 1)) for h in range(24))
TEXT = "Time,kW,kvar\n" + ROWS
BASE = {"profile": TEXT, "stamps": "start", "bank": "fixed", "fixed_kvar": "50"}


def test_kvarh_charge_by_hand():
    out = run("load_profile", {**BASE, "tariff": "kvarh", "threshold": "0.9", "kvarh_price": "0.01"})
    assert out["ok"], out["field_errors"]
    kwh, kvarh = 2400.0, 1800.0  # each month: 24 h × 100 kW, 24 h × 75 kvar
    allowed = kwh * math.tan(math.acos(0.9))
    before = (kvarh - allowed) * 0.01
    assert res(out, "charge_before")["value"] == pytest.approx(before)
    assert res(out, "charge_after")["value"] == pytest.approx(0.0)  # 600 kvarh < allowed
    table = next(t for t in out["tables"] if t["title"].startswith("Power-factor charge"))
    assert [r[0] for r in table["rows"]] == ["2025-01", "2025-02"]


def test_kva_charge_by_hand():
    out = run("load_profile", {**BASE, "tariff": "kva", "kva_price": "10"})
    assert out["ok"], out["field_errors"]
    assert res(out, "charge_before")["value"] == pytest.approx(10 * 100 / 0.8)
    assert res(out, "charge_after")["value"] == pytest.approx(10 * math.hypot(100, 25))


@pytest.mark.parametrize("kind, extra", [("kvarh", {"kvarh_price": "0.01"}), ("kva", {"kva_price": "10"}),
                                          ("penalty", {"penalty_amount": "20"})])
def test_savings_link_carries_the_month_and_agrees(kind, extra):
    out = run("load_profile", {**BASE, "tariff": kind, **extra})
    link = next(lk for lk in out["links"] if lk["worksheet"] == "savings")
    assert link["inputs"]["pf1"] == "0.800" and link["inputs"]["pf2"] == f"{100 / math.hypot(100, 25):.3f}"
    got = run("savings", link["inputs"])
    assert got["ok"], got["field_errors"]
    saved = res(out, "charge_saved")["value"]  # the two months are alike, so the mean is the month's
    assert res(got, "monthly")["value"] == pytest.approx(saved, rel=1e-3)


def test_no_savings_link_when_the_bank_changes_nothing():
    # a bank too small to move the PF at three decimals: Savings would refuse PF after == before
    out = run("load_profile", {**BASE, "fixed_kvar": "0.001", "tariff": "kvarh"})
    assert out["ok"]
    assert not [lk for lk in out["links"] if lk["worksheet"] == "savings"]
