"""The load-profile worksheet's bill: each month's charge before and after the bank tried, under
the savings worksheet's tariff models, and the link that carries the chosen month into savings.

The tariff rules are :mod:`pycore.savings`'s (kVA demand, penalty per 0.01 below a threshold,
kvarh above a threshold); the fields are the savings worksheet's own declarations (same limits,
same help), so the figures carried by the link are accepted there.
"""

from __future__ import annotations

from dataclasses import replace

from pycore import savings
from pycore.profile_control import DAY_S
from pycore.profile_time import month_of
from pycore.references import cite

from .. import fmt
from .savings import FIELDS as _SAVINGS_FIELDS

SRC_TARIFF = cite("practice_tariff", "practice_billing")
GROUP = "Bill"
TARIFFS = [("none", "Not counted"), ("kva", "Demand charge on kVA"),
           ("penalty", "Penalty per 0.01 of PF below a threshold"), ("kvarh", "Charge for kvarh above a threshold PF")]
PF_DECIMALS = 3  # the power factors carried to savings, as written in the link


def _when(*values):
    return {"field": "tariff", "in": list(values)}


def _savings_field(name: str, show_when: dict, group: str = ""):
    f = next(f for f in _SAVINGS_FIELDS if f.name == name)
    return replace(f, show_when=show_when, group=group)


FIELDS = [
    replace(_savings_field("tariff", None, GROUP), options=TARIFFS, default="kvarh",
            help="The bill's power-factor charge, as in the Savings worksheet: each month's charge is worked out "
                 "before and after the bank tried. Its own rules (ratchets, minimums, rounding, caps) govern."),
    _savings_field("kva_price", _when("kva")),
    _savings_field("threshold", _when("penalty", "kvarh")),
    _savings_field("penalty_amount", _when("penalty")),
    _savings_field("kvarh_price", _when("kvarh")),
    _savings_field("currency", _when("kva", "penalty", "kvarh")),
]


def month_peaks(t: list, p: list) -> dict:
    """Peak interval demand [kW] of each calendar month, by the label 'YYYY-MM' (month of the
    interval's start, as :func:`pycore.profile_control.simulate` labels its months)."""
    peaks: dict = {}
    memo: dict = {}
    for ti, a in zip(t, p):
        d = ti // DAY_S
        key = memo.get(d)
        if key is None:
            y, m = month_of(d)
            key = memo[d] = f"{y}-{m:02d}"
        if a > peaks.get(key, 0.0):
            peaks[key] = a
    return peaks


def _charge(kind: str, vals: dict, kwh: float, kvarh: float, pf: float, peak_kw: float) -> float:
    """One month's power-factor-related charge [money] under the tariff model ``kind``."""
    if kind == "kva":
        return vals["kva_price"] * savings.kva_demand(peak_kw, pf)
    if kind == "penalty":
        return savings.pf_penalty(pf, vals["threshold"], vals["penalty_amount"], "amount")
    return vals["kvarh_price"] * savings.kvarh_chargeable(kwh, max(0.0, kvarh), vals["threshold"])


_HOW = {
    "kva": "price per kVA-month × P_peak/PF (the month's peak kW at its billing-average PF, as in Savings)",
    "penalty": "amount per 0.01 × steps of 0.01 (or part) the month's billing-average PF lies below the threshold",
    "kvarh": "price per kvarh × max(0, kvarh − kWh·tan(acos PF_threshold)), kvarh on the chosen basis",
}


def read(ins) -> tuple[str, dict]:
    """The tariff chosen and its figures (empty when not counted or a field was refused)."""
    kind = ins.choice("tariff")
    vals: dict = {}
    if kind == "none":
        return kind, vals
    if ins.visible("threshold"):
        vals["threshold"] = ins.pf_value("threshold")  # the shared power-factor reader
    for name in ("kva_price", "penalty_amount", "kvarh_price"):
        if ins.visible(name):
            vals[name] = ins.num(name)
    cur = ins.text("currency").strip()
    if len(cur) > 12:
        ins.fail("currency", "Use at most 12 characters for the currency.")
    vals["currency"] = cur
    return kind, vals


def monthly(out, kind: str, vals: dict, prof, sim) -> None:
    """Each month's charge before and after, the totals, and the link into savings for the month
    with the largest charge now. ``sim`` is the bank's simulation (None: no bank, before only)."""
    if kind == "none" or sim is None or not sim.months:
        return
    cur = vals["currency"]
    peaks = month_peaks(prof.t, prof.p)
    rows, before, after = [], [], []
    for m in sim.months:
        pk = peaks.get(m.label, 0.0)
        if m.kwh <= 0 or pk <= 0:
            continue
        c1 = _charge(kind, vals, m.kwh, m.kvarh_before, m.pf_before, pk)
        c2 = _charge(kind, vals, m.kwh, m.kvarh_after, m.pf_after, pk)
        before.append((c1, m, pk))
        after.append(c2)
        rows.append([m.label, _money(c1, cur), _money(c2, cur), _money(c1 - c2, cur)])
    if not rows:
        return
    t1, t2 = sum(c for c, _, _ in before), sum(after)
    n = len(rows)
    out.result("charge_before", "Power-factor charge now, mean per month", t1 / n, cur, display=_money(t1 / n, cur),
               group=GROUP, method=f"{_HOW[kind]}; mean of {n} month(s)", source=SRC_TARIFF)
    out.result("charge_after", "With the bank, mean per month", t2 / n, cur, display=_money(t2 / n, cur),
               group=GROUP, method=f"the same with each month's PF after the bank; mean of {n} month(s)",
               source=SRC_TARIFF, status="ok" if t2 <= 0 else "warn")
    out.result("charge_saved", "Saved per month (mean)", (t1 - t2) / n, cur, display=_money((t1 - t2) / n, cur),
               key=True, group=GROUP, method="charge now − charge with the bank", source=SRC_TARIFF)
    out.table("Power-factor charge by calendar month", ["Month", "Now", "With the bank", "Saved"], rows,
              note=("Under the tariff model chosen above, on calendar months; a month the file covers only in part counts "
                    "only the intervals read. The tariff's own wording governs."))
    c1, m, pk = max(before, key=lambda x: x[0])
    _link(out, kind, vals, m, pk, cur)


def _link(out, kind: str, vals: dict, m, peak_kw: float, cur: str) -> None:
    """Offer savings for month ``m`` when the bank raises its PF as Savings reads it (lagging after)."""
    pf1, pf2 = round(m.pf_before, PF_DECIMALS), round(min(m.pf_after, 1.0), PF_DECIMALS)
    if m.sense_before != "lagging" or m.sense_after != "lagging" or not 0 < pf1 < pf2:
        return  # Savings computes only a rise in lagging PF: offer no link it cannot compute
    inputs = {"tariff": kind, "pf1": f"{pf1:.{PF_DECIMALS}f}", "pf2": f"{pf2:.{PF_DECIMALS}f}", "currency": cur}
    if kind == "kva":
        inputs.update(p_kw=f"{peak_kw:.1f}", kva_price=f"{vals['kva_price']:g}")
    elif kind == "penalty":
        inputs.update(threshold=f"{vals['threshold']:g}", penalty_mode="amount", rounding="part",
                      penalty_amount=f"{vals['penalty_amount']:g}")
    else:
        if m.kwh < 1:
            return
        inputs.update(threshold=f"{vals['threshold']:g}", kwh_month=f"{m.kwh:.0f}",
                      kvarh_month=f"{max(0.0, m.kvarh_before):.0f}", kvarh_price=f"{vals['kvarh_price']:g}")
    out.link(f"Savings for {m.label} (the largest charge) in Savings", "savings", inputs)


def _money(v: float, cur: str) -> str:
    return f"{fmt.sig(v, 6) if abs(v) >= 1e6 else f'{v:.2f}'} {cur}".replace("-", "−").strip()

