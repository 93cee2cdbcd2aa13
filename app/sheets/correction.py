"""Capacitor correction worksheet: how much kvar, which units and steps to order, and is it safe.

Inputs follow the order an electrician has them on site: the system, the load (from whichever
readings or bill they hold), the target, the capacitor and the units they can buy, the lightest
load, and optionally the supply transformer. The answer to "what do I order" comes first.

The computation runs in named steps (``_correction_steps``: reading, the need, the plan, the
currents; ``_correction_checks``: duty, fit, lightest load, supply, combinations); this module
declares the fields and writes the results.
"""

from __future__ import annotations

import math

from pycore import banksteps, capacitor, correction
from pycore.references import cite, ref

from .. import cautions, fmt
from .. import quantities as Q
from ..sheet import Field, Worksheet
from . import _correction_checks as checks
from . import _correction_order as order
from . import _correction_metering as metering
from . import _correction_harmonics as harm
from . import _correction_steps as steps
from ._correction_steps import (BASES, SRC_141, SRC_CAP, SRC_IEC, SRC_NEC, SRC_STEPS, SRC_TRIANGLE, _PF_SETS, _SENSE_SETS,
                                _is_hp, _load_method, _pf_text, _q_text, _steps_text, _triangle_figure)

FIELDS = [
    # --- the system
    Q.SYSTEM_VOLTAGE.field("v_ll", default="480", group="System"),
    Q.SYSTEM_FREQUENCY.field("f", default="60"),
    Field("phases", "Phases", kind="choice", default="3", options=[("3", "Three-phase"), ("1", "Single-phase")]),
    # --- the load now
    Field("basis", "What you know about the load", kind="choice", default="p_pf", options=BASES, group="Load now",
          help="Pick the set of readings you have. Figures at the plant's busiest time give the bank size."),
    Q.MEASURED_VOLTAGE.field("v_meas", default="472", show_when={"field": "basis", "in": ["vi_pf", "vi_p"]},
                             note="Read at the same time as the current."),
    Field("i_meas", "Measured line current", unit="A", default="600", min=0, min_open=True, max=1e6,
          show_when={"field": "basis", "in": ["vi_pf", "vi_p"]},
          help="Current in one line (average of the three for three-phase)."),
    Q.REAL_POWER.field("p_kw", "Real power", default="420", show_when={"field": "basis", "in": ["p_pf", "p_q", "vi_p"]},
                       note="Active power at full load. Horsepower is accepted (e.g. 560 hp) and converted at 0.7457 kW/hp."),
    Q.APPARENT_POWER.field("s_kva", "Apparent power", default="540", show_when={"field": "basis", "in": ["s_pf"]},
                           note="At full load."),
    Field("q_kvar", "Reactive power", unit="kvar", default="340", min=-1e7, max=1e7,
          show_when={"field": "basis", "in": ["p_q"]},
          help="kvar at full load, positive for a lagging (inductive) load, as most meters show it."),
    Q.POWER_FACTOR.field("pf1", "Power factor now", default="0.78", show_when={"field": "basis", "in": _PF_SETS},
                         note="Choose lagging or leading below."),
    Field("pf1_sense", "The power factor is", kind="choice", default="lagging",
          options=[("lagging", "Lagging (inductive: motors, transformers)"), ("leading", "Leading (capacitive)")],
          show_when={"field": "basis", "in": _SENSE_SETS},
          help="Motors and most plant loads lag. A leading reading means there is already too much capacitance."),
    Field("bill_kwh", "Energy in the billing period", unit="kWh", default="215000", min=0, min_open=True, max=1e10,
          show_when={"field": "basis", "in": ["bill_energy"]}),
    Field("bill_kvarh", "Reactive energy in the period (lagging)", unit="kvarh", default="172000", min=0, max=1e10,
          show_when={"field": "basis", "in": ["bill_energy"]}),
    Q.REAL_POWER.field("bill_kw", "Demand on the bill (optional)", default="", required=False,
                       show_when={"field": "basis", "in": ["bill_energy"]},
                       note="The billed maximum demand. When given, the bank is sized for it at the period's average power factor; leave blank to use kWh ÷ hours."),
    Field("bill_hours", "Hours the plant ran in the period", unit="", default="520", required=False, min=0, min_open=True, max=9000,
          show_when={"field": "basis", "in": ["bill_energy"]},
          help="Operating hours, not calendar hours: gives the average kW while running. Not needed when the demand is given."),
    Q.REAL_POWER.field("peak_kw", "Peak demand", default="430", show_when={"field": "basis", "in": ["bill_demand"]}),
    Q.APPARENT_POWER.field("peak_kva", "Peak demand in kVA", default="550", show_when={"field": "basis", "in": ["bill_demand"]}),
    # --- target and what is there already
    Q.TARGET_POWER_FACTOR.field("pf2", default="0.95", group="Target and existing capacitors",
                                note="1.00 risks a leading power factor at light load."),
    Q.EXISTING_KVAR.field("existing_kvar", default="0", required=False),
    Field("existing_in", "Were they in service when the load figures were taken?", kind="choice", default="yes",
          options=[("yes", "Yes: the figures above include them"), ("no", "No: the figures are for the load alone")],
          help="A meter or bill reading taken with the capacitors on already includes them."),
    *metering.FIELDS,
    # --- the capacitor
    Q.CAPACITOR_VOLTAGE.field("cap_v", default="480", group="Capacitor",
                              note="A higher-rated unit gives less kvar at system voltage: Q scales with V²."),
    Q.CAPACITOR_FREQUENCY.field("cap_f", "Capacitor rated frequency", default="60",
                                note="A 50 Hz unit on 60 Hz gives 20 % more kvar and current."),
    Field("connection", "Internal connection", kind="choice", default="delta",
          options=[("delta", "Delta"), ("wye", "Wye (star)")], show_when={"field": "phases", "in": ["3"]},
          help="How the capacitor elements are connected inside the three-phase unit or bank. Sets µF per phase and the voltage on each element."),
    Q.CAPACITOR_KVAR.field("ratings", "Unit ratings you can buy (at rated voltage)", kind="list",
                           default="5, 10, 12.5, 15, 20, 25, 30, 40, 50",
                           note="The kvar ratings your supplier stocks, separated by commas."),
    Field("bank", "Bank type", kind="choice", default="auto",
          options=[("auto", "Automatic bank in steps"), ("fixed", "Fixed bank (all units switched together)")],
          help="Automatic banks follow the load with a controller; a fixed bank suits a steady load."),
    harm.BANK_TYPE_FIELD,
    Field("n_steps", "Number of steps", default="6", min=1, max=banksteps.MAX_STEPS, suggest=["4", "6", "8", "12"],
          show_when={"field": "pattern", "in": ["equal", "one_two", "binary"]},
          help=f"The controller's step outputs, 1 to {banksteps.MAX_STEPS}."),
    Field("pattern", "Step pattern", kind="choice", default="one_two",
          options=[("one_two", "1:2:2:2… (small first step)"), ("equal", "Equal steps"),
                   ("binary", "Binary 1:2:4:8…"), ("custom", "Custom ratios")],
          show_when={"field": "bank", "in": ["auto"]},
          help="A small first step gives fine control; binary gives the most positions from few steps."),
    Field("custom_steps", "Step ratios", kind="text", default="1:2:2:4",
          show_when={"field": "pattern", "in": ["custom"]},
          help="Relative step sizes separated by colons or commas, e.g. 1:2:2:4 or 25:50:50:100."),
    Field("profile", "Cable and switch rules", kind="choice", default="nec",
          options=[("nec", f"NEC 460.8: {fmt.sig(100 * capacitor.NEC_460_8)} % of rated current"),
                   ("iec", f"IEC 60831-1: {fmt.sig(capacitor.IEC_CURRENT)} × I_N ({fmt.sig(capacitor.IEC_CURRENT_TOL)} × I_N with tolerance)")]),
    # --- lightest load
    Q.REAL_POWER.field("light_p", "Lightest load", default="90", required=False, group="Lightest load",
                       note="The smallest load the bank will see switched in (nights, weekends). Blank to skip the over-correction check."),
    Q.POWER_FACTOR.field("light_pf", "Power factor at the lightest load (lagging)", default="0.70", required=False,
                         note="Read the same way as the full-load figures (with or without the existing capacitors)."),
    # --- supply (optional)
    Q.TRANSFORMER_KVA.field("tx_kva", default="1000", required=False, group="Supply (optional: voltage rise and resonance)",
                            note="Leave blank with the impedance to skip these checks."),
    Q.TRANSFORMER_Z.field("tx_z", default="5.75", required=False),
    Q.FAULT_MVA.field("fault_mva", "Utility fault level at the transformer primary", default="", required=False,
                      note="Blank treats the utility as infinitely strong (transformer impedance only)."),
    *order.FIELDS,
]

def compute(ins, out):
    cx = steps.read_inputs(ins, order.read_fields)
    if cx is None:
        return
    metering.read(ins, cx)
    if metering.answer_leading(ins, out, cx):
        return
    steps.the_need(ins, cx)
    metering.primary_need(cx)
    harm.detuned_rating(ins, out, cx)
    steps.plan_bank(ins, cx)
    steps.currents(ins, cx)
    harm.reactors(out, cx)
    _key_results(out, cx)
    _load_results(ins, out, cx)
    _detail_results(out, cx)
    checks.rating_and_selection_checks(out, cx)
    checks.light_load(out, cx)
    checks.supply_checks(out, cx)
    checks.combinations_table(out, cx)
    order.plans(out, cx)
    order.order_list(out, cx)
    metering.report(out, cx)
    harm.study_link(ins, out, cx)
    _link(out, cx)


def _key_results(out, cx):
    """The headline answers: what to order, the steps, the kvar and the power factor reached, the cable."""
    after, bank, basis_cable, cap_f, cap_v, delivered = cx.after, cx.bank, cx.basis_cable, cx.cap_f, cx.cap_v, cx.delivered
    f, factor, i_basis, i_rated, i_sys, need = cx.f, cx.factor, cx.i_basis, cx.i_rated, cx.i_sys, cx.need
    need_rated, net, order_text, pf1, pf2, pf_after = cx.need_rated, cx.net, cx.order_text, cx.pf1, cx.pf2, cx.pf_after
    plan, profile, step_units, steps_rated, total_rated, v = cx.plan, cx.profile, cx.step_units, cx.steps_rated, cx.total_rated, cx.v
    weights = cx.weights
    G0 = ""
    out.result("order", "What to order", total_rated, "kvar", display=order_text, key=True, group=G0,
               method="Least excess over the kvar needed at the capacitor's rating, then the fewest units, from the ratings you can buy",
               source=SRC_STEPS)
    if bank == "auto":
        out.result("steps", "Steps (rated kvar, step 1 first)", None, "kvar", key=True,
                   display=_steps_text(steps_rated, step_units) + " kvar",
                   method="Step i = w_i × base; pattern " + ":".join(str(w) for w in weights) + f"; base {fmt.sig(plan.base)} kvar",
                   source=SRC_STEPS)
    out.result("q_need", "kvar needed at system voltage", need, "kvar", key=True,
               method=getattr(cx, "need_method", "") or f"Q = P·(tan φ₁ − tan φ₂) = {fmt.sig(net.p_kw)} kW × {correction.kvar_per_kw(pf1, pf2):.3f}",
               source=metering.SRC_TX if cx.metering == "primary" else SRC_141)
    off_rating = abs(factor - 1) > 1e-9
    out.result("q_need_rated", f"kvar needed at {fmt.sig(cap_v)} V, {fmt.sig(cap_f)} Hz (the rating to order)", need_rated, "kvar",
               key=off_rating, group="" if off_rating else "Sizing",
               method=f"Q_r = Q·(V_r/V)²·(f_r/f) = Q ÷ {factor:.4f}", source=SRC_CAP)
    out.result("q_delivered", f"kvar the bank gives at {fmt.sig(cx.v_cap)} V, {fmt.sig(f)} Hz", delivered, "kvar", key=True,
               method=f"Q = Q_r·(V/V_r)²·(f/f_r) = {fmt.sig(total_rated)} kvar × {factor:.4f}", source=SRC_CAP)
    order.pf_result(out, cx)
    cable_label = "Conductor ampacity at least"
    out.result("cable", cable_label, basis_cable["conductor"], "A", key=True,
               method=(f"{basis_cable['factor']} × I_N" if profile == "nec" else f"{fmt.sig(capacitor.IEC_CURRENT_TOL)} × I_N ({fmt.sig(capacitor.IEC_CURRENT)} × I_N × "
                                                                              f"{fmt.sig(capacitor.IEC_CURRENT_TOL / capacitor.IEC_CURRENT, 3)} capacitance tolerance)")
               + f", I_N = {fmt.sig(i_basis)} A" + (" (current at system voltage and frequency, above the rated current)" if i_sys > i_rated * (1 + 1e-9) else ""),
               source=SRC_NEC if profile == "nec" else SRC_IEC)


def _load_results(ins, out, cx):
    """The load now, as read."""
    basis, existing, existing_in, i1, light_p, net = cx.basis, cx.existing, cx.existing_in, cx.i1, cx.light_p, cx.net
    pf1, phases, v_i, vals = cx.pf1, cx.phases, cx.v_i, cx.vals
    G1 = "Load now" + (" (with the existing capacitors)" if existing > 0 else "")
    out.result("p", "Real power P", net.p_kw, "kW", group=G1, method=_load_method(basis), source=SRC_TRIANGLE)
    out.result("q", "Reactive power Q", net.q_kvar, "kvar", display=_q_text(net.q_kvar), group=G1,
               method="Q = P·tan φ" + (f"; existing {fmt.sig(existing)} kvar subtracted" if not existing_in and existing > 0 else ""),
               source=SRC_TRIANGLE)
    out.result("s", "Apparent power S", net.s_kva, "kVA", group=G1, method="S = √(P² + Q²)", source=SRC_TRIANGLE)
    out.result("pf1", "Power factor", pf1, "", display=_pf_text(pf1, net.sense), group=G1,
               method="PF = P/S" + (" = kWh/√(kWh² + kvarh²)" if basis == "bill_energy" else " = kW/kVA" if basis == "bill_demand" else ""),
               source=cite("practice_billing", "circuits_ac_power") if basis.startswith("bill") else SRC_TRIANGLE)
    out.result("phi1", "Angle φ (current lags voltage)", net.phi_deg, "°", group=G1, method="φ = acos PF", source=SRC_TRIANGLE)
    out.result("i1", f"Line current at {fmt.sig(v_i)} V", i1, "A", group=G1,
               method="I = S/(√3·V)" if phases == 3 else "I = S/V", source=SRC_TRIANGLE)
    for name, label in (("p_kw", "Real power"), ("bill_kw", "Demand"), ("peak_kw", "Peak demand"), ("light_p", "Lightest load")):
        if ins.visible(name) and _is_hp(ins.text_of(name)):
            kw = vals.get(name) if name != "light_p" else light_p
            out.result(f"hp_{name}", f"{label} entered in hp", kw, "kW", group=G1,
                       display=f"{fmt.sig(kw / correction.HP_KW)} hp × 0.7457 kW/hp = {fmt.sig(kw)} kW",
                       method="1 hp = 550 ft·lbf/s = 0.7457 kW", source=ref("practice"))
            out.warn(f"{label} was entered in hp and taken as {fmt.sig(kw)} kW of electrical load. If it is a motor's nameplate "
                     "(shaft) rating, the electrical input is higher: divide by the motor efficiency (about 0.9 to 0.95).")


def _detail_results(out, cx):
    """Sizing detail, capacitor data, cable and protection, benefits."""
    after, basis_cable, cap_f, cap_v, conn, existing = cx.after, cx.basis_cable, cx.cap_f, cx.cap_v, cx.conn, cx.existing
    f, factor, i1, i2, i_basis, i_rated = cx.f, cx.factor, cx.i1, cx.i2, cx.i_basis, cx.i_rated
    i_sys, need_rated, net, pf1, pf2, pf_after = cx.i_sys, cx.need_rated, cx.net, cx.pf1, cx.pf2, cx.pf_after
    phases, profile, prot_hi, prot_lo, total_rated, v = cx.phases, cx.profile, cx.prot_hi, cx.prot_lo, cx.total_rated, cx.v
    v_i = cx.v_i
    G2 = "Sizing"
    out.result("k", "Multiplier (kvar per kW)", correction.kvar_per_kw(pf1, pf2), "kvar/kW", digits=4, group=G2,
               method="k = tan(acos PF₁) − tan(acos PF₂)", source=SRC_141)
    out.result("factor", f"Capacitor output at {fmt.sig(cx.v_cap)} V ÷ rated", factor, "", group=G2,
               method=f"(V/V_r)²·(f/f_r) = ({fmt.sig(cx.v_cap)}/{fmt.sig(cap_v)})² × ({fmt.sig(f)}/{fmt.sig(cap_f)})", source=SRC_CAP)
    out.result("excess", "Ordered above the need (rated)", total_rated - need_rated, "kvar", group=G2,
               display=f"{fmt.sig(total_rated - need_rated)} kvar ({fmt.sig(100 * (total_rated - need_rated) / need_rated, 3)} %)",
               method="Σ units − Q_r needed", source=SRC_STEPS)
    if existing > 0:
        out.result("existing", "Existing capacitors (kept)", existing, "kvar", group=G2,
                   method="as entered; counted in the resonance check", source=ref("input"))

    # --- capacitor data
    G3 = steps.G_CAPACITOR
    c_d = capacitor.capacitance_uf(total_rated, cap_v, cap_f, "delta", phases)
    if phases == 3:
        c_y = capacitor.capacitance_uf(total_rated, cap_v, cap_f, "wye", phases)
        out.result("c_delta", "Capacitance per phase, delta" + (" (this bank)" if conn == "delta" else ""), c_d, "µF", group=G3,
                   method="C = Q_r/(3·2πf_r·V_r²)", source=SRC_CAP)
        out.result("c_wye", "Capacitance per phase, wye" + (" (this bank)" if conn == "wye" else ""), c_y, "µF", group=G3,
                   method="C = Q_r/(2πf_r·V_r²)", source=SRC_CAP)
        out.result("v_element", "Voltage on each capacitor element (at system voltage)", capacitor.element_voltage(v, conn, phases), "V",
                   group=G3, method="V_LL (delta) or V_LL/√3 (wye)", source=SRC_CAP)
    else:
        out.result("c_1ph", "Capacitance", c_d, "µF", group=G3, method="C = Q_r/(2πf_r·V_r²)", source=SRC_CAP)
    out.result("i_rated", f"Rated current (at {fmt.sig(cap_v)} V, {fmt.sig(cap_f)} Hz)", i_rated, "A", group=G3,
               method="I_N = Q_r/(√3·V_r)" if phases == 3 else "I_N = Q_r/V_r", source=SRC_CAP)
    out.result("i_sys", f"Current at {fmt.sig(cx.v_cap)} V, {fmt.sig(f)} Hz", i_sys, "A", group=G3,
               method="I = Q/(√3·V)" if phases == 3 else "I = Q/V", source=SRC_CAP)
    if phases == 3 and conn == "delta":
        out.result("i_branch", "Current in each delta branch (system voltage)", i_sys / math.sqrt(3), "A", group=G3,
                   method="I_line/√3", source=SRC_CAP)

    # --- cable and protection
    G4 = "Cable and protection"
    if profile == "nec":
        out.result("disconnect", "Disconnect rating at least", basis_cable["disconnect"], "A", group=G4,
                   method=f"{fmt.sig(capacitor.NEC_460_8)} × I_N", source=SRC_NEC)
    else:
        k, k_tol = capacitor.IEC_CURRENT, capacitor.IEC_CURRENT_TOL
        out.result("iec_13", f"Maximum permissible current ({fmt.sig(k)} × I_N)", k * i_basis, "A", group=G4,
                   method=f"{k:.2f} × I_N", source=SRC_IEC)
        out.result("iec_143", f"With capacitance tolerance ({fmt.sig(k_tol)} × I_N): cable and switchgear at least", k_tol * i_basis,
                   "A", group=G4, method=f"{k:.2f} × {k_tol / k:.2f} × I_N", source=SRC_IEC)
    order.protection_result(out, cx, G4)

    # --- benefits
    G5 = "Benefits at full load"
    out.result("kva_released", "kVA released", correction.kva_released(net, after), "kVA", group=G5,
               method="ΔS = S₁ − S₂ = P(1/PF₁ − 1/PF₂)", source=SRC_TRIANGLE)
    out.result("i_after", f"Line current after, at {fmt.sig(v_i)} V", i2, "A", group=G5,
               display=f"{fmt.sig(i2)} A (down {fmt.sig(i1 - i2)} A, {fmt.sig(100 * (1 - i2 / i1), 3)} %)",
               method="I₂ = S₂/(√3·V); reduction 1 − PF₁/PF₂", source=SRC_TRIANGLE)
    out.result("loss_cut", "I²R loss reduction in upstream cables and transformer", 100 * correction.loss_reduction_fraction(pf1, pf_after), "%",
               digits=3, group=G5, method="1 − (PF₁/PF₂)², at the same P and voltage", source=SRC_TRIANGLE)


def _link(out, cx):
    """The link to the resonance scan, and the power-triangle figure."""
    after, delivered, existing, f, fault_mva, net = cx.after, cx.delivered, cx.existing, cx.f, cx.fault_mva, cx.net
    phases, steps_sys, tx_kva, tx_z, v = cx.phases, cx.steps_sys, cx.tx_kva, cx.tx_z, cx.v
    link_steps = ([existing] if existing > 0 else []) + steps_sys
    link_inputs = {"v_ll": fmt.sig(v, 6), "f": fmt.sig(f, 6), "steps": ", ".join(fmt.sig(s, 5) for s in link_steps)}
    if tx_kva is not None:
        link_inputs["tx_kva"] = fmt.sig(tx_kva, 6)
        link_inputs["tx_z"] = fmt.sig(tx_z, 6)
        # blank there, as here, means an infinitely strong utility
        link_inputs["fault_mva"] = "" if fault_mva is None else fmt.sig(fault_mva, 6)
    link_inputs["single_phase"] = "yes" if phases == 1 else "no"
    link_inputs["load_kw"] = ""  # resistive damping unknown here: none (the highest peaks)
    out.link("Scan this bus for resonance" + (" (existing capacitors as the first step)" if existing > 0 else ""), "bus_scan", link_inputs)

    out.figure("Power triangle before and after", _triangle_figure(net, after, delivered))


SHEET = Worksheet(
    id="correction",
    title="Capacitor correction",
    summary="How many kvar to add, which capacitor units and steps to order at what rating, the cable and "
            "protection, and whether the bank over-corrects, raises the voltage or resonates.",
    fields=FIELDS,
    compute=compute,
    cautions=[cautions.STORED_CHARGE, cautions.QUALIFIED, cautions.ESTIMATE],
    order=10,
    essential=('v_ll', 'f', 'phases', 'basis', 'v_meas', 'i_meas', 'p_kw', 's_kva', 'q_kvar', 'pf1', 'pf1_sense', 'bill_kwh', 'bill_kvarh', 'bill_kw', 'bill_hours', 'peak_kw', 'peak_kva', 'pf2'),
    references=[
        ref("ieee141_pf"), ref("ieee18"), ref("ieee1036"), ref("nec460_8"), ref("iec60831"),
    ],
)
