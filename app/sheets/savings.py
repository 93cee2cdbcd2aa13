"""Savings and payback worksheet: what a correction saves on the bill, and how soon it pays back."""

from __future__ import annotations

import math

from pycore import banklosses, correction, savings
from pycore.references import cite, ref
from pycore.survey import PF_AGREEMENT

from .. import cautions, fmt
from .. import quantities as Q
from ..sheet import Field, FieldError, Worksheet

SRC_KVA = cite("circuits_ac_power", "ieee141_pf")
SRC_TARIFF = ref("practice_tariff")
SRC_LOSS = cite("circuits_ac_power", "ieee141_pf")
SRC_PAYBACK = ref("practice")
SRC_BANK_LOSS = ref("practice_bank_losses")

def _when(field, *values):
    return {"field": field, "in": list(values)}


# Demo figures are invented (the "Kestrel Vale Creamery" of the survey demo).
FIELDS = [
    Q.POWER_FACTOR.field("pf1", "Present power factor (lagging)", default="0.78", group="Power factor",
                         note="The average or peak-time power factor the bill is worked on, e.g. kW ÷ kVA from the bill."),
    Q.TARGET_POWER_FACTOR.field("pf2", "Power factor after correction (lagging)", default="0.95",
                                note="The power factor the new capacitors will give."),
    Field("tariff", "How the bill charges for power factor", kind="choice", default="kva", group="Bill",
          options=[
              ("kva", "Demand charge on kVA"),
              ("penalty", "Penalty per 0.01 of PF below a threshold"),
              ("kvarh", "Charge for kvarh above a threshold PF"),
              ("none", "No PF charge (count reduced losses only)"),
          ],
          help="Pick the structure on your tariff sheet. Its own rules (ratchets, minimums, rounding, caps) govern."),
    Q.REAL_POWER.field("p_kw", "Peak real demand P", default="420", show_when=_when("tariff", "kva"),
                       note="The billed peak demand (the kVA demand × its PF)."),
    Field("kva_price", "Demand price per kVA per month", default="11.5", min=0,
          show_when=_when("tariff", "kva"), help="In your currency, per kVA of billed demand each month."),
    Q.PF_THRESHOLD.field("threshold", default="0.9", show_when=_when("tariff", "penalty", "kvarh")),
    Field("penalty_mode", "The penalty is", kind="choice", default="percent",
          options=[("percent", "A % of the bill per 0.01 below"), ("amount", "A fixed amount per 0.01 below")],
          show_when=_when("tariff", "penalty")),
    Field("penalty_pct", "Penalty per 0.01 below the threshold", unit="%", default="1", min=0, max=100,
          show_when=_when("penalty_mode", "percent")),
    Field("bill", "Monthly charges the % applies to", default="18400", min=0,
          show_when=_when("penalty_mode", "percent"),
          help="In your currency: the part of the monthly bill the tariff applies the percentage to."),
    Field("penalty_amount", "Penalty per 0.01 below the threshold, per month", default="150", min=0,
          show_when=_when("penalty_mode", "amount"), help="In your currency."),
    Field("rounding", "Counting part steps", kind="choice", default="part",
          options=[("part", "Each 0.01 or part of it"), ("whole", "Whole 0.01 steps only"), ("prorata", "Pro rata")],
          show_when=_when("tariff", "penalty"),
          help="How the tariff counts a shortfall such as 0.045: as 5 steps, 4 steps or 4.5 steps."),
    Field("kwh_month", "Energy per month", unit="kWh", default="126000", min=0, min_open=True,
          show_when=_when("tariff", "kvarh")),
    Field("kvarh_month", "Reactive energy per month (from the bill)", unit="kvarh", default="", required=False, min=0,
          show_when=_when("tariff", "kvarh"),
          help="Leave blank to work it out from the energy and the present PF."),
    Field("kvarh_price", "Price per kvarh charged", default="0.012", min=0, show_when=_when("tariff", "kvarh"),
          help="In your currency."),
    Field("add_losses", "Count reduced losses in cables and transformers", kind="choice", default="no", group="Losses",
          options=[("no", "No"), ("yes", "Yes")],
          help="Only losses between the supply and where the capacitors connect fall."),
    Field("loss_kw", "Losses at the present PF", unit="kW", default="9.5", min=0, min_open=True, max=1e7,
          show_when=_when("add_losses", "yes"),
          help="Series (I²R) losses at the typical load, from a study, a meter or a cable and transformer estimate."),
    Field("hours_month", "Hours per month at that load", unit="h", default="400", min=0, min_open=True, max=744,
          show_when=_when("add_losses", "yes")),
    Field("energy_price", "Energy price per kWh", default="0.14", min=0,
          help="In your currency. Prices the reduced losses and the bank's own losses."),
    # the bank's own losses (demo figures: the invented plant's bank of about 200 kvar)
    Field("bank_kvar", "Capacitors switched in, typically", unit="kvar", default="200", required=False,
          min=0, max=1e6, group="The bank's own losses",
          help="The kvar the bank has in service at the typical load. Blank: the bank's own losses are not counted."),
    Field("bank_detuned", "Of which in detuned steps (with reactors)", unit="kvar", default="0", required=False,
          min=0, max=1e6),
    Field("cap_w", "Capacitor losses", unit="W/kvar", default=fmt.sig(banklosses.CAPACITOR_W_PER_KVAR), min=0, max=50,
          help="Including discharge resistors. Typical 0.2–0.5 W/kvar (from memory); enter the maker's figure."),
    Field("reactor_w", "Detuning reactor losses", unit="W/kvar", default=fmt.sig(banklosses.REACTOR_W_PER_KVAR),
          min=0, max=100, help="Per kvar of the detuned step. Typical 4–8 W/kvar (from memory); enter the maker's figure."),
    Field("bank_hours", "Hours per month the bank is in", unit="h", default="400", min=0, max=744),
    Field("cost", "Installed cost of the correction", default="14500", min=0, min_open=True, group="Cost",
          help="Capacitors, switching, protection, enclosure and installation, in your currency."),
    Field("currency", "Currency", kind="text", default="USD", required=False,
          help="Shown beside amounts, e.g. USD, EUR, ZAR, £."),
]


def _money(v: float, cur: str) -> str:
    text = f"{v:.2f}".replace("-", "−")
    return f"{text} {cur}".strip()


def _bank_losses(out, vals, gross: float, cur: str):
    """The bank's own losses (capacitors, and reactors of detuned steps) and the net monthly
    saving; None when no bank kvar is entered."""
    q = vals.get("bank_kvar")
    if q is None:
        return None
    qd = vals.get("bank_detuned") or 0.0
    if qd > q:
        raise FieldError("bank_detuned", f"The detuned kvar cannot exceed the {fmt.sig(q)} kvar switched in.")
    bl = banklosses.bank_losses(q, qd, vals["cap_w"], vals["reactor_w"])
    kwh, cost, net = savings.net_of_bank_losses(gross, bl.total_kw, vals["bank_hours"], vals["energy_price"])
    g = "The bank's own losses"
    out.result("bank_loss_kw", "Losses of the bank while in", bl.total_kw, "kW", group=g,
               display=f"{fmt.sig(bl.total_kw, 3)} kW (capacitors {fmt.sig(bl.capacitors_kw, 3)} kW"
                       + (f", reactors {fmt.sig(bl.reactors_kw, 3)} kW)" if qd > 0 else ")"),
               method="capacitors W/kvar × kvar in + reactors W/kvar × detuned kvar", source=SRC_BANK_LOSS)
    out.result("bank_kwh", "Energy the bank uses per month", kwh, "kWh", group=g,
               method="losses × hours per month the bank is in", source=SRC_BANK_LOSS)
    out.result("bank_cost", "Cost of the bank's losses per month", cost, cur, display=_money(cost, cur), group=g,
               method="energy × price per kWh", source=SRC_BANK_LOSS)
    if gross > 0 and cost > gross:
        out.warn("The bank's own losses cost more than the saving it brings under these inputs.")
    return net


def compute(ins, out):
    pf1 = ins.pf_value("pf1")
    pf2 = ins.pf_value("pf2")
    tariff = ins.choice("tariff")
    cost = ins.num("cost")
    cur = ins.text("currency").strip()
    if len(cur) > 12:
        ins.fail("currency", "Use at most 12 characters for the currency.")
    vals = {}
    if ins.visible("threshold"):
        vals["threshold"] = ins.pf_value("threshold")
    for name in ("p_kw", "kva_price", "penalty_pct", "bill", "penalty_amount", "kwh_month",
                 "kvarh_month", "kvarh_price", "loss_kw", "hours_month", "energy_price", "bank_kvar", "bank_detuned",
                 "cap_w", "reactor_w", "bank_hours"):
        if ins.visible(name):
            vals[name] = ins.num(name)
    losses = ins.choice("add_losses") == "yes"
    if ins.errors:
        return
    if pf2 <= pf1:
        raise FieldError("pf2", f"The PF after correction must be above the present PF ({fmt.sig(pf1)}).")
    if tariff == "none" and not losses:
        raise FieldError("add_losses", "With no PF charge on the bill, choose Yes here to count reduced losses, or pick a bill structure.")

    parts = []  # (name, label, monthly saving)
    g = "Bill"
    if tariff == "kva":
        p = vals["p_kw"]
        s1, s2 = savings.kva_demand(p, pf1), savings.kva_demand(p, pf2)
        m = savings.kva_demand_saving(p, pf1, pf2, vals["kva_price"])
        out.result("kva1", "Billed demand now", s1, "kVA", group=g, method="S₁ = P/PF₁", source=SRC_KVA)
        out.result("kva2", "Billed demand after", s2, "kVA", group=g, method="S₂ = P/PF₂", source=SRC_KVA)
        out.result("kva_cut", "Demand reduction", s1 - s2, "kVA", group=g, method="ΔS = P(1/PF₁ − 1/PF₂)", source=SRC_KVA)
        parts.append(("save_kva", "Demand charge saved per month", m,
                      "price per kVA-month × ΔS", SRC_KVA))
    elif tariff == "penalty":
        thr = vals["threshold"]
        mode = ins.choice("penalty_mode")
        rnd = ins.choice("rounding")
        rate = vals["penalty_pct"] if mode == "percent" else vals["penalty_amount"]
        bill = vals.get("bill")
        st1 = savings.penalty_steps(pf1, thr, rnd)
        st2 = savings.penalty_steps(pf2, thr, rnd)
        pen1 = savings.pf_penalty(pf1, thr, rate, mode, bill, rnd)
        pen2 = savings.pf_penalty(pf2, thr, rate, mode, bill, rnd)
        how = "bill × rate % × steps" if mode == "percent" else "amount per 0.01 × steps"
        rword = {"part": "each 0.01 or part of it", "whole": "whole 0.01 steps", "prorata": "pro rata"}[rnd]
        out.result("steps1", "Steps of 0.01 below the threshold now", st1, "", group=g,
                   method=f"(threshold − PF₁)/0.01, {rword}", source=SRC_TARIFF)
        out.result("penalty1", "Penalty per month now", pen1, cur, display=_money(pen1, cur), group=g,
                   method=how, source=SRC_TARIFF)
        out.result("steps2", "Steps below the threshold after", st2, "", group=g,
                   method=f"(threshold − PF₂)/0.01, {rword}", source=SRC_TARIFF)
        out.result("penalty2", "Penalty per month after", pen2, cur, display=_money(pen2, cur), group=g,
                   method=how, source=SRC_TARIFF, status="warn" if pen2 > 0 else "ok")
        if pf1 >= thr:
            out.warn(f"The present PF is already at or above the threshold ({fmt.sig(thr)}): there is no penalty to save.")
        if pen2 > 0:
            out.warn("After correction the PF is still below the threshold: a penalty remains.")
        parts.append(("save_penalty", "Penalty saved per month", pen1 - pen2, "penalty now − penalty after", SRC_TARIFF))
    elif tariff == "kvarh":
        thr = vals["threshold"]
        kwh = vals["kwh_month"]
        kvarh1 = vals.get("kvarh_month")
        if kvarh1 is None:
            kvarh1 = savings.kvarh_for_pf(kwh, pf1)
            how1 = "kWh·tan(acos PF₁)"
        else:
            how1 = "from the bill"
            pf_bill = correction.pf_from_energy(kwh, kvarh1)
            out.result("pf_bill", "PF from the bill's kWh and kvarh", pf_bill, "", display=f"{pf_bill:.3f} lagging",
                       group=g, method="kWh/√(kWh² + kvarh²)", source=SRC_TARIFF)
            if abs(pf_bill - pf1) > PF_AGREEMENT:
                out.warn(f"The bill's kWh and kvarh give PF {pf_bill:.3f}, not the present PF entered "
                         f"({fmt.sig(pf1)}); the saving uses the bill's kvarh now and PF {fmt.sig(pf2)} after.")
        kvarh2 = savings.kvarh_for_pf(kwh, pf2)
        allowed = savings.kvarh_for_pf(kwh, thr)
        c1 = savings.kvarh_chargeable(kwh, kvarh1, thr)
        c2 = savings.kvarh_chargeable(kwh, kvarh2, thr)
        price = vals["kvarh_price"]
        out.result("kvarh_allowed", "kvarh allowed free", allowed, "kvarh", group=g,
                   method="kWh·tan(acos PF_threshold)", source=SRC_TARIFF)
        out.result("kvarh1", "Reactive energy now", kvarh1, "kvarh", group=g, method=how1, source=SRC_TARIFF)
        out.result("charged1", "kvarh charged now", c1, "kvarh", group=g, method="max(0, kvarh − allowed)", source=SRC_TARIFF)
        out.result("kvarh2", "Reactive energy after", kvarh2, "kvarh", group=g, method="kWh·tan(acos PF₂)", source=SRC_TARIFF)
        out.result("charged2", "kvarh charged after", c2, "kvarh", group=g, method="max(0, kvarh − allowed)",
                   source=SRC_TARIFF, status="warn" if c2 > 0 else "ok")
        if c1 == 0:
            out.warn("No kvarh is charged at present: there is no kvarh charge to save.")
        parts.append(("save_kvarh", "kvarh charge saved per month", (c1 - c2) * price,
                      "(charged now − charged after) × price per kvarh", SRC_TARIFF))
    if losses:
        lk = vals["loss_kw"]
        l2 = savings.loss_after_kw(lk, pf1, pf2)
        kwh_saved, m = savings.loss_saving(lk, pf1, pf2, vals["hours_month"], vals["energy_price"])
        gl = "Losses"
        out.result("loss2", "Losses after correction", l2, "kW", group=gl, method="L₂ = L₁·(PF₁/PF₂)²", source=SRC_LOSS)
        out.result("loss_cut", "Loss reduction", 100.0 * (1 - l2 / lk), "%", group=gl,
                   method="1 − (PF₁/PF₂)²", source=SRC_LOSS)
        out.result("kwh_saved", "Energy saved per month", kwh_saved, "kWh", group=gl,
                   method="(L₁ − L₂) × hours per month", source=SRC_LOSS)
        parts.append(("save_losses", "Loss saving per month", m, "energy saved × price per kWh", SRC_LOSS))

    monthly = math.fsum(p[2] for p in parts)
    net = _bank_losses(out, vals, monthly, cur)
    year = savings.yearly(monthly if net is None else net)
    payback = savings.simple_payback_years(cost, year)
    gs = "Saving and payback (estimate)"
    for name, label, m, how, src in parts:
        if len(parts) > 1:
            out.result(name, label, m, cur, display=_money(m, cur), group=gs, method=how, source=src)
    out.result("monthly", "Saving per month", monthly, cur, display=_money(monthly, cur), key=True, group=gs,
               method="sum of the savings above" if len(parts) > 1 else parts[0][3],
               source=parts[0][4] if len(parts) == 1 else SRC_TARIFF)
    if net is not None:
        out.result("net_monthly", "Net saving per month, after the bank's own losses", net, cur, display=_money(net, cur),
                   key=True, group=gs, status="warn" if net <= 0 else "", method="saving per month − cost of the bank's own losses",
                   source=cite("practice_bank_losses", "practice"))
    out.result("yearly", "Net saving per year" if net is not None else "Saving per year", year, cur,
               display=_money(year, cur), key=True, group=gs,
               method="12 × net monthly saving" if net is not None else "12 × monthly saving", source=SRC_PAYBACK)
    if math.isfinite(payback):
        out.result("payback", "Simple payback", payback, "years",
                   display=f"{fmt.sig(payback, 3)} years ({fmt.sig(payback * 12, 3)} months)",
                   key=True, group=gs, method="installed cost / yearly saving", source=SRC_PAYBACK)
    else:
        out.result("payback", "Simple payback", None, "years", display="none: no saving under these inputs",
                   key=True, group=gs, status="warn", method="installed cost / yearly saving", source=SRC_PAYBACK)
    out.notes.append("Simple payback leaves out interest, maintenance and tariff changes"
                     + (", and the bank's own losses (no kvar entered)." if net is None else "."))
    out.caution(cautions.ESTIMATE)


SHEET = Worksheet(
    id="savings",
    title="Savings and payback",
    summary="Estimate what raising the power factor saves on a kVA demand charge, a PF penalty, a kvarh charge or losses, and the simple payback.",
    fields=FIELDS,
    compute=compute,
    cautions=[cautions.ESTIMATE],
    order=60,
    essential=('pf1', 'pf2', 'tariff', 'p_kw', 'kva_price', 'threshold', 'penalty_mode', 'penalty_pct', 'bill', 'penalty_amount', 'rounding', 'kwh_month', 'kvarh_month', 'kvarh_price', 'cost'),
    references=[
        ref("ieee141_pf"), ref("practice_bank_losses"),
    ],
)
