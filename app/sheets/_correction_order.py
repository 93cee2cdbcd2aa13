"""The capacitor correction worksheet's step plans, switching, discharge, protection and order list.

Not a worksheet (no SHEET): :mod:`app.sheets.correction` declares :data:`FIELDS` among its own
and calls these steps after its checks. The engineering is in pycore (stepplans, orderlist and
the inrush, discharge, protection and cables modules it draws on); this module reads the
fields, writes the results, tables, warnings and cautions, and cites the references table.
"""

from __future__ import annotations

from pycore import banksteps, orderlist, protection, stepplans
from pycore.errors import InputError
from pycore.inrush import CAPACITOR_INRUSH_MULTIPLE, DEFAULT_UH_PER_M
from pycore.references import cite, ref

from . import _correction_harmonics as harm
from .. import cautions, fmt
from ..sheet import Field, FieldError
from ._correction_steps import SRC_TRIANGLE, _pf_text, _steps_text

G_ORDER = "Switching, discharge and protection"
SRC_PLANS = cite("this_app", "practice_controller")
SRC_INRUSH = cite("ieee1036_inrush", "iec60831_inrush")
SRC_ORDER = cite("this_app", "ieee1036_inrush", "practice_fuse")

_SHOW_AUTO = {"field": "bank", "in": ["auto"]}

FIELDS = [
    Field("run_m", "Run from the busbar to each step", unit="m", default=fmt.sig(orderlist.DEFAULT_STEP_LENGTH_M),
          min=0, max=1000, group="Switching and order list (three-phase)",
          help=f"Cable or busbar length per phase between the bank's common busbar and each step's capacitors. "
               f"Sets the inductance that limits back-to-back inrush, taken as {fmt.sig(DEFAULT_UH_PER_M)} µH/m "
               "(common practice for single-core cables or busbars)."),
    Field("contactor_peak", "Contactor's permitted peak current (optional)", unit="A", default="", required=False,
          min=0, min_open=True, max=1e6,
          help="From the contactor maker's data for capacitor switching. Blank: only the capacitor's own limit is checked."),
    Field("ct_primary", "Controller's current transformer, primary (optional)", unit="A", default="", required=False,
          min=0, min_open=True, max=1e5, show_when=_SHOW_AUTO,
          help="The CT the controller reads, e.g. 1000 for a 1000/5 A CT (5 A secondary). Gives the C/k response setting."),
    Field("fast_s", "Fast-discharge reconnection delay (optional)", unit="s", default="", required=False,
          min=0, min_open=True, max=600, show_when=_SHOW_AUTO,
          help="Fit fast-discharge resistors, switched across a step while it is off, to reclose after this delay. "
               "Blank: the discharge resistors in the units set the delay."),
]


def detuning_p(ins) -> float:
    """The detuning factor p [fraction] of the bank from the bank-type field (0 for a plain bank)."""
    return harm.detuning_factor(ins)


def read_fields(ins, cx):
    """Read this module's fields into the namespace (None when blank); call before ``ins.errors`` is checked."""
    cx.run_m = ins.num("run_m")
    cx.contactor_peak = ins.num("contactor_peak")
    cx.ct_primary = ins.num("ct_primary") if ins.visible("ct_primary") else None
    cx.fast_s = ins.num("fast_s") if ins.visible("fast_s") else None
    if not hasattr(cx, "p"):
        cx.p = detuning_p(ins)


# --------------------------------------------------------------------------- what the controller holds


def held_at_full_load(cx):
    """What a step controller leaves switched in at full load (:func:`pycore.stepplans.controller_holds`)."""
    if cx.bank != "auto":
        return None
    if not hasattr(cx, "held"):
        cx.held = stepplans.controller_holds(cx.net, cx.steps_sys, cx.pf2, getattr(cx, "combos", None))
    return cx.held


def pf_result(out, cx):
    """The key power-factor result: for an automatic bank what the controller holds (never a
    leading combination), for a fixed bank the whole bank in. The all-in figure follows in the
    sizing group, and a leading all-in power factor is a warning only."""
    after = cx.after
    if cx.bank == "auto":
        held = held_at_full_load(cx)
        on = "none" if held.combo is None else "+".join(str(i) for i in held.combo.on)
        out.result("pf_after", "Power factor the controller holds at full load", held.pf, "",
                   display=f"{_pf_text(held.pf, held.sense)} (steps {on} in, {fmt.sig(held.kvar_in)} kvar)",
                   key=True, status="ok" if held.reaches_target else "warn",
                   method="The smallest step combination reaching the target without leading, else the largest that "
                          "does not lead; PF = P/√(P² + (Q − Q_in)²)", source=cite("practice_controller", "circuits_ac_power"))
        if after.sense == "leading":
            out.warn(f"With every step in, the power factor at full load would be {_pf_text(after.pf, after.sense)}: "
                     "a controller does not hold that, it leaves steps out. The bank is larger than the load needs; "
                     "see the step plans for a closer one.")
    else:
        out.result("pf_after", "Power factor reached at full load", after.pf, "", display=_pf_text(after.pf, after.sense),
                   key=True, status="ok" if after.sense != "leading" else "warn",
                   method="PF = P/√(P² + (Q − Q_C)²)", source=SRC_TRIANGLE)
    out.result("pf_all_in", "Power factor at full load, every step in", after.pf, "", display=_pf_text(after.pf, after.sense),
               group="Sizing", method="PF = P/√(P² + (Q − Q_C)²), Q_C the whole bank at system voltage", source=SRC_TRIANGLE)


# --------------------------------------------------------------------------- three plans


def _held_text(h) -> str:
    if h is None:
        return "—"
    short = "" if h.reaches_target else ", short of the target"  # no step fits without leading
    return f"{fmt.sig(h.kvar_in)} kvar in, PF {_pf_text(h.pf, h.sense)}{short}"


def plans(out, cx):
    """The three step plans (least excess, fewest steps, finest resolution) as a table, and a
    hint at the closest one when the chosen pattern orders too much."""
    cx.plans = []
    if cx.bank != "auto":
        return
    if cx.light_net is not None:
        held = stepplans.controller_holds(cx.light_net, cx.steps_sys, cx.pf2, getattr(cx, "combos", None))
        on = "none" if held.combo is None else "+".join(str(i) for i in held.combo.on)
        out.result("pf_light_held", f"Power factor the controller holds at the lightest load ({fmt.sig(cx.light_p)} kW)",
                   held.pf, "", display=f"{_pf_text(held.pf, held.sense)} (steps {on} in, {fmt.sig(held.kvar_in)} kvar)",
                   key=True, status="ok" if held.reaches_target and held.sense != "leading" else "warn",
                   method="The smallest step combination reaching the target without leading, else the largest that "
                          "does not lead" + ("" if held.reaches_target else
                                             ": no combination reaches the target at this load (finer steps would: see Step plans)"),
                   source=cite("practice_controller", "circuits_ac_power"))
    try:
        offered = stepplans.three_plans(cx.need_rated, cx.ratings, cx.factor, cx.net, cx.pf2, cx.light_net)
    except InputError as e:
        raise FieldError("ratings", str(e)) from None
    cx.plans = offered
    rows = []
    for pl in offered:
        steps_txt = _steps_text(pl.plan.steps, pl.plan.units)
        rows.append([stepplans.KIND_WORDS[pl.kind], steps_txt, str(sum(len(u) for u in pl.plan.units)),
                     f"{fmt.sig(pl.plan.total)} (+{fmt.sig(100 * pl.excess_fraction, 2)} %)",
                     _held_text(pl.full), _held_text(pl.light)])
    cols = ["Plan", "Steps, kvar rated (first step first)", "Units", "Total kvar rated (excess)", "Full load: controller holds",
            "Lightest load: controller holds"]
    out.table("Step plans", cols, rows,
              note=f"Searched over equal, 1:2:2… and binary patterns of {stepplans.MIN_AUTO_STEPS} steps and more, from "
                   f"the ratings you can buy; at most {stepplans.UNITS_PER_STEP_LIMIT} units per step. "
                   "The controller holds the smallest combination that reaches the target without leading (common practice).")
    best = offered[0]
    excess = cx.total_rated - cx.need_rated
    if excess > banksteps.EXCESS_WARN_FRACTION * cx.need_rated and excess > min(cx.ratings):
        hint = "Fewer steps, another pattern or more unit ratings would fit closer."
        if excess > best.excess_kvar + 1e-6:
            hint = (f"The least-excess plan is {_steps_text(best.plan.steps, best.plan.units)} kvar "
                    f"({fmt.sig(best.plan.total)} kvar rated, {fmt.sig(100 * best.excess_fraction, 2)} % above the need; "
                    "see Step plans): choose Custom ratios to order it.")
        out.warn(f"The step plan orders {fmt.sig(100 * excess / cx.need_rated, 3)} % more than needed. " + hint)


# --------------------------------------------------------------------------- order list


def _inrush_text(x) -> str:
    return "—" if x is None else f"{fmt.sig(x.peak_a, 3)} A at {fmt.sig(x.freq_hz, 3)} Hz"


def order_list(out, cx):
    """Work the bank out (:func:`pycore.orderlist.design_bank`) and write the order list, the
    per-step switching table, the bank-level results and the cautions for switching and discharge."""
    if cx.phases != 3:
        out.notes.append("The order list with switching, discharge and cable is worked out for three-phase banks only.")
        return
    p = cx.p if hasattr(cx, "p") else 0.0
    try:
        bd = orderlist.design_bank(
            cx.steps_rated, cx.step_units, cx.v, cx.f, cx.cap_v, cx.cap_f, cx.conn, p=p, profile=cx.profile,
            s_sc_kva=cx.s_sc, lengths_m=cx.run_m if cx.run_m is not None else orderlist.DEFAULT_STEP_LENGTH_M,
            uh_per_m=DEFAULT_UH_PER_M, contactor_peak_a=cx.contactor_peak, ct_primary_a=cx.ct_primary,
            fast_discharge_s=cx.fast_s)
    except InputError as e:
        msg = str(e)
        at = "run_m" if ("inductance" in msg or "length" in msg) else "cap_f" if "frequency" in msg else None
        if at:
            raise FieldError(at, msg) from None
        # nothing typed is wrong (e.g. a current beyond any cable table): the sizing stands, the parts list cannot
        out.warn(f"The order list could not be worked out: {msg}")
        return
    cx.bank_design = bd
    rows = orderlist.merge_alike_steps(orderlist.order_rows(bd))
    cols, cells = orderlist.as_table(rows)
    # the list to buy from, and (once per distinct reason) why each part is what it is
    out.table("What to order", list(cols[:4]), [[str(c) for c in r[:4]] for r in cells],
              note="A purchase request to hand on: per step, then for the bank. Ratings are starting points: "
                   + protection.CONFIRM + " Why each part: the next table.", text=orderlist.as_text(rows))
    why: dict = {}
    for r in rows:
        why.setdefault((r.item, r.basis), []).append(r.section)
    out.table("Why each part of the order", ["Item", "For", "Basis"],
              [[item, ", ".join(dict.fromkeys(secs)), basis] for (item, basis), secs in why.items()])

    # --- per step: inrush and discharge
    srows = []
    last = None
    for d in bd.steps:
        ir = d.inrush
        if last is None or (d.q_system_kvar, ir, d.discharge) != last:  # else alike the step before: the same cells
            cells = [fmt.sig(d.q_system_kvar), _inrush_text(ir.alone), _inrush_text(ir.back_to_back),
                     f"{fmt.sig(ir.limit_a, 3)} A", "yes" if ir.within else "NO",
                     f"≤ {fmt.sig(d.discharge.r_max_ohm / 1e3, 3)} kΩ, {fmt.sig(d.discharge.p_element_max_w, 2)} W",
                     f"{fmt.sig(d.discharge.reclose_s, 2)} s"]
            last = (d.q_system_kvar, ir, d.discharge)
        srows.append([str(d.number)] + cells)
    out.table("Inrush and discharge per step",
              ["Step", f"kvar at {fmt.sig(cx.v)} V", "Inrush alone", "Inrush back to back", "Limit (peak)", "Within",
               "Discharge resistor per element", "Reclose after"], srows,
              note=f"Peak inrush closing at the voltage peak (IEEE Std 1036 method, from memory); limit "
                   f"{fmt.sig(CAPACITOR_INRUSH_MULTIPLE)} × I_N (IEC 60831-1, from memory) or the contactor's figure. "
                   + ("Alone: from the supply's short-circuit level. " if cx.s_sc else
                      "Alone: not worked out without the supply transformer. ")
                   + f"Back to back: every other step on, through {fmt.sig(DEFAULT_UH_PER_M)} µH/m of run. "
                   f"Discharge: {bd.steps[0].discharge.rule.source}.")

    # --- bank-level results
    worst = max(bd.steps, key=lambda d: d.inrush.worst / d.inrush.limit_a)
    out.result("inrush_worst", "Worst inrush, any step", worst.inrush.worst, "A", group=G_ORDER, digits=3,
               display=f"{fmt.sig(worst.inrush.worst, 3)} A peak (step {worst.number}; limit {fmt.sig(worst.inrush.limit_a, 3)} A)",
               status="ok" if all(d.inrush.within for d in bd.steps) else "warn",
               method="I_pk = V_LL·√(2/3)·√(C_eq/L_eq), back to back C_eq = C₁C₂/(C₁ + C₂)", source=SRC_INRUSH)
    if p:
        out.notes.append("Each detuned step's own reactor limits its inrush: no damping resistors or extra reactor needed.")
    elif bd.limiting_uh > 0:
        out.result("limiting_uh", "Inrush-limiting reactor per step (or capacitor-duty contactors)", bd.limiting_uh, "µH",
                   group=G_ORDER, digits=3,
                   method="The added inductance per phase in every step that brings the worst peak within the limit (bisection)",
                   source=SRC_INRUSH)
        out.warn(f"Back-to-back inrush exceeds the limit (step {worst.number}: {fmt.sig(worst.inrush.worst, 3)} A peak against "
                 f"{fmt.sig(worst.inrush.limit_a, 3)} A). Use capacitor-duty contactors with damping resistors, or add about "
                 f"{fmt.sig(bd.limiting_uh, 2)} µH per phase in each step (an inrush-limiting reactor or a longer run).")
    out.result("reclose_s", "Controller's reconnection delay at least", bd.reclose_s, "s", group=G_ORDER, digits=3,
               method=("Fast-discharge delay as entered" if bd.fast else "t = R·C·ln(1/0.10) with the largest discharge resistance"),
               source=ref("practice_reclose"))
    if bd.ck_a is not None:
        out.result("ck", "Controller response C/k", bd.ck_a, "A", group=G_ORDER, digits=3,
                   method=f"Smallest step's current ÷ CT ratio {fmt.sig(bd.ct[0])}/{fmt.sig(bd.ct[1])}", source=ref("practice_ck"))
    mf = bd.main_fuse
    out.result("main_fuse", "Bank's main fuses, gG", mf.rating_a, "A", group=G_ORDER,
               display=(f"{fmt.sig(mf.rating_a)} A" if mf.rating_a else "no standard rating")
                       + f" (range {fmt.sig(mf.lo_a, 3)}–{fmt.sig(mf.hi_a, 3)} A)",
               status="" if mf.in_range else "warn", method=mf.note,
               source=cite("practice_fuse", "nec460_8", "nec240_6" if cx.profile == "nec" else "iec60269"))
    out.result("main_cable", "Bank's main cable", bd.main_cable.ampacity_a, "A", group=G_ORDER,
               display=(f"{bd.main_cable.runs} × " if bd.main_cable.runs > 1 else "") + f"{bd.main_cable.size} per phase "
                       f"({fmt.sig(bd.main_cable.ampacity_a)} A, needs {fmt.sig(bd.main_cable_needed_a, 3)} A)",
               method=bd.cable_assumptions, source=ref("nec310_16" if cx.profile == "nec" else "iec60364_c"))

    # --- cautions for switching and discharge
    if cx.bank == "auto":
        out.caution(cautions.RECLOSING)
    out.caution(cautions.STORED_CHARGE)


def protection_result(out, cx, group: str):
    """The protective-device range of the whole bank: gG fuses and breaker settings
    (:mod:`pycore.protection`), replacing the single range."""
    series = "nec" if cx.profile == "nec" else "iec"
    fz = protection.fuse(cx.i_rated, series)
    br = protection.breaker(cx.i_rated, series)
    rating_ref = "nec240_6" if series == "nec" else "iec60269"
    out.result("protection", "Fuses, gG (common practice)", fz.rating_a, "A", group=group,
               display=(f"{fmt.sig(fz.rating_a)} A" if fz.rating_a else "no standard rating")
                       + f" (range {fmt.sig(fz.lo_a, 3)} to {fmt.sig(fz.hi_a, 3)} A): {protection.CONFIRM}",
               status="" if fz.in_range else "warn", method=fz.note, source=cite("practice_fuse", "nec460_8", rating_ref))
    out.result("breaker", "Or a breaker (common practice)", br.rating_a, "A", group=group,
               display=(f"{fmt.sig(br.rating_a)} A frame" if br.rating_a else "no standard rating")
                       + f", overload set {fmt.sig(br.lo_a, 3)} to {fmt.sig(br.hi_a, 3)} A, magnetic at least "
                         f"{fmt.sig(br.magnetic_min_a, 3)} A",
               method=br.note, source=cite("practice_fuse", "nec460_8", rating_ref))
