"""pycore.orderlist.merge_alike_steps: runs of steps that need the same parts become one section
with the quantities multiplied (what to buy adds up to the same parts as the step-by-step list)."""

from __future__ import annotations

from collections import Counter

from pycore import orderlist


def bank(steps, units):
    return orderlist.order_rows(orderlist.design_bank(steps, units, 480, 60, 480, 60, "delta"))


def totals(rows):
    c = Counter()
    for r in rows:
        c[(r.item, r.spec)] += r.quantity
    return c


def test_alike_steps_merge_and_quantities_add_up():
    rows = bank([20, 40, 40, 40], [(20,), (40,), (40,), (40,)])
    merged = orderlist.merge_alike_steps(rows)
    sections = list(dict.fromkeys(r.section for r in merged))
    assert sections == ["Step 1", "Steps 2–4 (3 alike)", "Bank"]
    assert totals(merged) == totals(rows)  # nothing bought twice, nothing lost
    cap = next(r for r in merged if r.section.startswith("Steps 2") and r.item == "Capacitor unit")
    assert cap.quantity == 3 and cap.spec.startswith("40 kvar")


def test_steps_apart_or_different_stay_apart():
    rows = bank([40, 20, 40], [(40,), (20,), (40,)])  # steps 1 and 3 alike but not consecutive
    merged = orderlist.merge_alike_steps(rows)
    assert [s for s in dict.fromkeys(r.section for r in merged)] == ["Step 1", "Step 2", "Step 3", "Bank"]
    assert merged == rows
