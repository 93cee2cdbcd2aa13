"""Capacitor correction worksheet: how much kvar, which units and steps to order, and is it safe.

Inputs follow the order an electrician has them on site: the system, the load (from whichever
readings or bill they hold), the target, the capacitor and the units they can buy, the lightest
load, and optionally the supply transformer. The answer to "what do I order" comes first.
"""

from __future__ import annotations

import math
import re

from pycore import banksteps, capacitor, correction, supply
from pycore.correction import Load
from pycore.errors import InputError
from pycore.references import cite, ref
from pycore.numparse import split_number

from .. import cautions, fmt
from .. import quantities as Q
from ..sheet import Field, FieldError, Worksheet
from ..svg import Svg

SRC_TRIANGLE = ref("circuits_ac_power")
SRC_141 = ref("ieee141_pf")
SRC_CAP = ref("circuits_ac_power")
SRC_IEEE18 = ref("ieee18")
SRC_NEC = ref("nec460_8")
SRC_IEC = ref("iec60831")
SRC_SUPPLY = cite("ieee141_sc", "ieee399", "ieee1036", "dugan")
SRC_STEPS = ref("this_app")

BASES = [
    ("p_pf", "kW and power factor"),
    ("s_pf", "kVA and power factor"),
    ("p_q", "kW and kvar"),
    ("vi_pf", "Measured volts, amps and power factor"),
    ("vi_p", "Measured volts, amps and kW"),
    ("bill_energy", "Utility bill: kWh and kvarh"),
    ("bill_demand", "Utility bill: peak kW and peak kVA"),
]

_PF_SETS = ["p_pf", "s_pf", "vi_pf"]
_SENSE_SETS = ["p_pf", "s_pf", "vi_pf", "vi_p"]

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
]


def _pf_text(pf: float, sense: str) -> str:
    if sense == "unity":
        return f"{pf:.3f} (unity)"
    return f"{pf:.3f} {sense}"


def _q_text(q: float) -> str:
    if abs(q) < 1e-9:
        return "0 kvar"
    word = "lagging (inductive)" if q > 0 else "leading (capacitive)"
    return f"{fmt.sig(abs(q))} kvar {word}"


def _counts_text(counts) -> str:
    return " + ".join(f"{n} × {fmt.sig(r)} kvar" for r, n in counts)


def _units_text(units) -> str:
    """'2 × 50 + 12.5' for the units of one step."""
    counts: dict = {}
    for u in units:
        counts[u] = counts.get(u, 0) + 1
    return " + ".join((f"{n} × " if n > 1 else "") + fmt.sig(r) for r, n in sorted(counts.items(), reverse=True))


def _is_hp(text: str) -> bool:
    try:
        _, rest = split_number(text)
    except InputError:
        return False
    return rest.lower() == "hp"


def _parse_ratios(text: str) -> list[float]:
    items = [t for t in re.split(r"[:;,\s/]+", text.strip()) if t]
    if not items:
        raise InputError("Enter the step ratios, e.g. 1:2:2:4.")
    vals = []
    for i, t in enumerate(items, 1):
        try:
            v, rest = split_number(t)
        except InputError as e:
            raise InputError(f"Item {i} ('{t[:12]}'): {e}") from None
        if rest and rest.lower() not in ("kvar", "var"):
            raise InputError(f"Item {i} ('{t[:12]}') is not a number.")
        if rest.lower() == "var":
            v /= 1000.0
        vals.append(v)
    return vals


def _read_load(ins) -> dict:
    """Read the visible load fields (name → value in the field's unit, None when bad)."""
    vis = ins.visible
    for name in ("pf1", "light_pf"):
        t = ins.text_of(name).strip()
        if vis(name) and t[:1] in ("-", "\u2212"):
            ins.fail(name, "Enter the power factor without a sign, from 0 to 1, and say lagging or leading.")
    vals = {}
    for name in ("v_meas", "i_meas", "p_kw", "s_kva", "q_kvar", "pf1", "bill_kwh", "bill_kvarh", "bill_kw",
                 "bill_hours", "peak_kw", "peak_kva"):
        if vis(name):
            vals[name] = ins.num(name)
    return vals


def _build_load(ins, basis: str, vals: dict, phases: int) -> Load:
    lagging = ins.choice("pf1_sense") != "leading"
    if basis in _SENSE_SETS and not lagging:
        raise FieldError("pf1_sense", "A leading power factor means the load already has more capacitance than it needs: "
                                      "adding capacitors would make it worse. Check the reading; if it is right, remove correction instead.")
    try:
        if basis == "p_pf":
            return correction.load_from_p_pf(vals["p_kw"], vals["pf1"])
        if basis == "s_pf":
            return correction.load_from_s_pf(vals["s_kva"], vals["pf1"])
        if basis == "p_q":
            if vals["q_kvar"] < 0:
                raise FieldError("q_kvar", "Negative kvar means the load is leading (capacitive): it needs no capacitors. "
                                           "If your meter shows lagging kvar as negative, enter it without the sign.")
            if vals["q_kvar"] == 0:
                raise FieldError("q_kvar", "With 0 kvar the power factor is already 1: nothing to correct.")
            return correction.load_from_p_q(vals["p_kw"], vals["q_kvar"])
        if basis == "vi_pf":
            return correction.load_from_v_i_pf(vals["v_meas"], vals["i_meas"], vals["pf1"], phases)
        if basis == "vi_p":
            try:
                return correction.load_from_v_i_p(vals["v_meas"], vals["i_meas"], vals["p_kw"], phases)
            except InputError as e:
                raise FieldError("p_kw", str(e)) from None
        if basis == "bill_energy":
            if vals["bill_kw"] is None and vals["bill_hours"] is None:
                raise FieldError("bill_hours", "Enter the hours the plant ran in the period, or the demand kW from the bill.")
            if vals["bill_kvarh"] == 0:
                raise FieldError("bill_kvarh", "With 0 kvarh the average power factor is 1: nothing to correct.")
            return correction.load_from_energy(vals["bill_kwh"], vals["bill_kvarh"], vals["bill_hours"], vals["bill_kw"])
        if basis == "bill_demand":
            try:
                return correction.load_from_demand(vals["peak_kw"], vals["peak_kva"])
            except InputError as e:
                raise FieldError("peak_kva", str(e)) from None
    except FieldError:
        raise
    except InputError as e:  # pragma: no cover - fields are range-checked before
        raise InputError(str(e)) from None
    raise InputError("Unknown load basis.")  # pragma: no cover


def _triangle_figure(before: Load, after: Load, q_cap: float) -> str:
    """Power triangle before and after: P along x, Q up for lagging, down for leading."""
    w, h = 380, 300
    left, right, top, bottom = 44, 120, 56, 34
    p = before.p_kw
    q1, q2 = before.q_kvar, after.q_kvar
    ymax, ymin = max(q1, q2, 0.0), min(q1, q2, 0.0)
    k = min((w - left - right) / p, (h - top - bottom) / max(ymax - ymin, 1e-9 * p))
    x0, y0 = left, top + ymax * k
    xe = x0 + p * k
    y1, y2 = y0 - q1 * k, y0 - q2 * k
    desc = (f"Before: P {fmt.sig(p)} kW, Q {_q_text(q1)}, S {fmt.sig(before.s_kva)} kVA, PF {_pf_text(before.pf, before.sense)}. "
            f"After adding {fmt.sig(q_cap)} kvar of capacitors: Q {_q_text(q2)}, S {fmt.sig(after.s_kva)} kVA, "
            f"PF {_pf_text(after.pf, after.sense)}.")
    svg = Svg(w, h, "Power triangle before and after correction", desc)
    svg.rect(0, 0, w, h, "fp-bg")
    svg.text(10, 18, "Before", size=12, weight="600")
    svg.line(62, 14, 84, 14, "fp-s1", width=3)
    svg.text(90, 18, f"S₁ {fmt.sig(before.s_kva, 3)} kVA, PF {_pf_text(before.pf, before.sense)}", size=12)
    svg.text(10, 36, "After", size=12, weight="600")
    svg.line(62, 32, 84, 32, "fp-s2", width=3)
    svg.text(90, 36, f"S₂ {fmt.sig(after.s_kva, 3)} kVA, PF {_pf_text(after.pf, after.sense)}", size=12)
    # axes and grid
    svg.line(x0 - 8, y0, w - 12, y0, "fp-axis")
    svg.line(x0, top - 6, x0, h - bottom + 8, "fp-axis")
    svg.line(xe, top - 6, xe, h - bottom + 8, "fp-grid", width=1, dash="2 3")
    svg.text(w - 12, y0 + 16, "P (kW)", anchor="end", size=11)
    svg.text(x0 + 6, top - 8, "Q lagging ↑", size=11)
    if ymin < 0:
        svg.text(x0 + 4, h - bottom + 20, "Q leading ↓", size=11)
    # P side
    svg.line(x0, y0, xe, y0, "fp-s3", width=3)
    if xe - x0 >= 90:
        svg.text((x0 + xe) / 2, y0 + 16, f"P = {fmt.sig(p, 3)} kW", anchor="middle", size=12)
    else:
        svg.text(x0 + 4, y0 + 16, f"P = {fmt.sig(p, 3)} kW", size=12)
    # before: Q1 and S1
    svg.line(xe, y0, xe, y1, "fp-s1", width=2, dash="6 4")
    svg.arrow(x0, y0, xe, y1, "fp-s1")
    # after: S2
    svg.arrow(x0, y0, xe, y2, "fp-s2")
    # capacitor kvar, from the top of Q1 down by Q_C
    xc = xe + 14
    if abs(y2 - y1) > 4:
        svg.arrow(xc, y1, xc, y2, "fp-s4", width=2)
    # labels right of the capacitor arrow, kept at least 15 px apart
    labels = [[y1 + 4, f"Q₁ {fmt.sig(q1, 3)} kvar"], [(y1 + y2) / 2 + 4, f"Q_C {fmt.sig(q_cap, 3)} kvar"],
              [y2 + 4, f"Q₂ {fmt.sig(q2, 3)} kvar"]]
    for i in (1, 2):
        labels[i][0] = max(labels[i][0], labels[i - 1][0] + 15)
    for y, text in labels:
        svg.text(xc + 6, y, text, size=11)
    return str(svg)


def compute(ins, out):
    v = ins.num("v_ll")
    f = ins.num("f")
    phases = 3 if ins.choice("phases") == "3" else 1
    basis = ins.choice("basis")
    vals = _read_load(ins)
    pf2 = ins.num("pf2")
    existing = ins.num("existing_kvar")
    existing_in = ins.choice("existing_in") == "yes"
    cap_v = ins.num("cap_v")
    cap_f = ins.num("cap_f")
    conn = ins.choice("connection") if phases == 3 else "delta"
    ratings = ins.numbers("ratings")
    bank = ins.choice("bank")
    pattern = ins.choice("pattern") if bank == "auto" else "equal"
    n_steps = ins.num("n_steps") if ins.visible("n_steps") else None
    custom_text = ins.text("custom_steps") if ins.visible("custom_steps") else ""
    profile = ins.choice("profile")
    light_p = ins.num("light_p")
    light_pf = ins.num("light_pf") if light_p is not None else None
    if light_p is not None and light_pf is None and "light_pf" not in ins.errors:
        ins.fail("light_pf", "Enter the power factor at the lightest load (or clear the lightest load).")
    tx_kva = ins.num("tx_kva")
    tx_z = ins.num("tx_z")
    fault_mva = ins.num("fault_mva")
    if ins.errors:
        return
    existing = existing or 0.0
    if n_steps is not None and abs(n_steps - round(n_steps)) > 1e-9:
        raise FieldError("n_steps", "The number of steps must be a whole number.")
    if (tx_kva is None) != (tx_z is None):
        missing = "tx_z" if tx_z is None else "tx_kva"
        raise FieldError(missing, "Enter both the transformer rating and its impedance, or leave both blank.")
    if fault_mva is not None and tx_kva is None:
        raise FieldError("tx_kva", "Enter the transformer rating and impedance to use the utility fault level.")

    # --- the load
    load = _build_load(ins, basis, vals, phases)
    net = load.corrected(existing) if not existing_in else load
    if load.q_kvar <= 1e-9 * load.p_kw:
        at = {"p_pf": "pf1", "s_pf": "pf1", "vi_pf": "pf1", "vi_p": "p_kw", "bill_demand": "peak_kva"}.get(basis, "pf2")
        raise FieldError(at, "The load is already at unity power factor: it needs no correction.")
    if net.q_kvar <= 0:
        raise FieldError("existing_kvar", f"With the existing {fmt.sig(existing)} kvar the load is already "
                                          f"{'at unity' if net.q_kvar == 0 else 'leading'}: no more capacitors are needed.")
    pf1 = net.pf
    if pf2 <= pf1 + 1e-9:
        raise FieldError("pf2", f"The power factor is already {pf1:.3f} lagging, at or above this target: no correction is needed. "
                                "Enter a higher target to size a bank.")
    v_i = vals.get("v_meas") or v  # voltage for line currents: measured when given
    i1 = net.current(v_i, phases)
    need = net.p_kw * correction.kvar_per_kw(pf1, pf2)
    factor = capacitor.output_factor(v, cap_v, f, cap_f)
    need_rated = need / factor

    # --- selection
    if bank == "fixed":
        try:
            sel = banksteps.select_units(need_rated, ratings)
        except InputError as e:
            raise FieldError("ratings", str(e)) from None
        steps_rated = [sel.total]
        step_units = [sel.units]
        counts = sel.counts()
        total_rated = sel.total
    else:
        try:
            if pattern == "custom":
                weights = banksteps.step_weights("custom", custom=_parse_ratios(custom_text))
            else:
                weights = banksteps.step_weights(pattern, int(round(n_steps)))
        except InputError as e:
            raise FieldError("custom_steps" if pattern == "custom" else "n_steps", str(e)) from None
        try:
            plan = banksteps.plan_steps(need_rated, ratings, weights)
        except InputError as e:
            raise FieldError("ratings", str(e)) from None
        steps_rated = list(plan.steps)
        step_units = list(plan.units)
        counts = plan.counts()
        total_rated = plan.total
    steps_sys = [s * factor for s in steps_rated]
    delivered = total_rated * factor
    if not Q.BANK_KVAR.admits(delivered + existing):
        raise FieldError("ratings", f"This bank would give {fmt.sig(delivered + existing)} kvar at the system voltage with the "
                                    f"capacitors already there, more than the largest bank sized here "
                                    f"({fmt.sig(Q.BANK_KVAR.max / 1000)} Mvar): check the load figures, the unit ratings and "
                                    "the capacitor's rated voltage.")
    after = net.corrected(delivered)
    pf_after = after.pf
    i2 = after.current(v_i, phases)

    conn_word = {"delta": "delta", "wye": "wye"}[conn] if phases == 3 else "single-phase"
    rating_words = f"{fmt.sig(cap_v)} V, {fmt.sig(cap_f)} Hz, {conn_word}"
    if bank == "fixed":
        order_text = f"Fixed bank {fmt.sig(total_rated)} kvar at {rating_words}: {_counts_text(counts)}"
    else:
        order_text = (f"{len(steps_rated)}-step automatic bank, {fmt.sig(total_rated)} kvar at {rating_words}: "
                      f"{_counts_text(counts)}")

    # --- currents and cable
    i_rated = capacitor.line_current(total_rated, cap_v, phases)
    i_sys = capacitor.line_current(delivered, v, phases)
    i_basis = max(i_rated, i_sys)
    basis_cable = capacitor.conductor_basis(i_basis, profile)
    prot_lo, prot_hi = capacitor.protection_range(i_rated)

    # --- key results: what to order
    G0 = ""
    out.result("order", "What to order", total_rated, "kvar", display=order_text, key=True, group=G0,
               method="Least excess over the kvar needed at the capacitor's rating, then the fewest units, from the ratings you can buy",
               source=SRC_STEPS)
    if bank == "auto":
        out.result("steps", "Steps (rated kvar, step 1 first)", None, "kvar", key=True,
                   display=", ".join(fmt.sig(s) + (f" ({_units_text(u)})" if len(u) > 1 else "") for s, u in zip(steps_rated, step_units)) + " kvar",
                   method="Step i = w_i × base; pattern " + ":".join(str(w) for w in weights) + f"; base {fmt.sig(plan.base)} kvar",
                   source=SRC_STEPS)
    out.result("q_need", "kvar needed at system voltage", need, "kvar", key=True,
               method=f"Q = P·(tan φ₁ − tan φ₂) = {fmt.sig(net.p_kw)} kW × {correction.kvar_per_kw(pf1, pf2):.3f}", source=SRC_141)
    off_rating = abs(factor - 1) > 1e-9
    out.result("q_need_rated", f"kvar needed at {fmt.sig(cap_v)} V, {fmt.sig(cap_f)} Hz (the rating to order)", need_rated, "kvar",
               key=off_rating, group="" if off_rating else "Sizing",
               method=f"Q_r = Q·(V_r/V)²·(f_r/f) = Q ÷ {factor:.4f}", source=SRC_CAP)
    out.result("q_delivered", f"kvar the bank gives at {fmt.sig(v)} V, {fmt.sig(f)} Hz", delivered, "kvar", key=True,
               method=f"Q = Q_r·(V/V_r)²·(f/f_r) = {fmt.sig(total_rated)} kvar × {factor:.4f}", source=SRC_CAP)
    out.result("pf_after", "Power factor reached at full load", pf_after, "", display=_pf_text(pf_after, after.sense), key=True,
               status="ok" if after.sense != "leading" else "warn",
               method="PF = P/√(P² + (Q − Q_C)²)", source=SRC_TRIANGLE)
    cable_label = "Conductor ampacity at least"
    out.result("cable", cable_label, basis_cable["conductor"], "A", key=True,
               method=(f"{basis_cable['factor']} × I_N" if profile == "nec" else f"{fmt.sig(capacitor.IEC_CURRENT_TOL)} × I_N ({fmt.sig(capacitor.IEC_CURRENT)} × I_N × "
                                                                              f"{fmt.sig(capacitor.IEC_CURRENT_TOL / capacitor.IEC_CURRENT, 3)} capacitance tolerance)")
               + f", I_N = {fmt.sig(i_basis)} A" + (" (current at system voltage and frequency, above the rated current)" if i_sys > i_rated * (1 + 1e-9) else ""),
               source=SRC_NEC if profile == "nec" else SRC_IEC)

    # --- present load
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

    # --- sizing detail
    G2 = "Sizing"
    out.result("k", "Multiplier (kvar per kW)", correction.kvar_per_kw(pf1, pf2), "kvar/kW", digits=4, group=G2,
               method="k = tan(acos PF₁) − tan(acos PF₂)", source=SRC_141)
    out.result("factor", "Capacitor output at system voltage ÷ rated", factor, "", group=G2,
               method=f"(V/V_r)²·(f/f_r) = ({fmt.sig(v)}/{fmt.sig(cap_v)})² × ({fmt.sig(f)}/{fmt.sig(cap_f)})", source=SRC_CAP)
    out.result("excess", "Ordered above the need (rated)", total_rated - need_rated, "kvar", group=G2,
               display=f"{fmt.sig(total_rated - need_rated)} kvar ({fmt.sig(100 * (total_rated - need_rated) / need_rated, 3)} %)",
               method="Σ units − Q_r needed", source=SRC_STEPS)
    if existing > 0:
        out.result("existing", "Existing capacitors (kept)", existing, "kvar", group=G2,
                   method="as entered; counted in the resonance check", source=ref("input"))

    # --- capacitor data
    G3 = "Capacitor data (whole bank)"
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
    out.result("i_sys", f"Current at {fmt.sig(v)} V, {fmt.sig(f)} Hz", i_sys, "A", group=G3,
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
    out.result("protection", "Protective device range (common practice)", None, "A", group=G4,
               display=f"{fmt.sig(prot_lo, 3)} to {fmt.sig(prot_hi, 3)} A: confirm against the capacitor and device makers' instructions",
               method=f"{fmt.sig(capacitor.PROTECTION_RANGE[0])} to {fmt.sig(capacitor.PROTECTION_RANGE[1])} × I_N; "
                      "NEC 460.8(B) asks for a rating as low as practicable", source=cite("practice", "nec460_8"))

    # --- benefits
    G5 = "Benefits at full load"
    out.result("kva_released", "kVA released", correction.kva_released(net, after), "kVA", group=G5,
               method="ΔS = S₁ − S₂ = P(1/PF₁ − 1/PF₂)", source=SRC_TRIANGLE)
    out.result("i_after", f"Line current after, at {fmt.sig(v_i)} V", i2, "A", group=G5,
               display=f"{fmt.sig(i2)} A (down {fmt.sig(i1 - i2)} A, {fmt.sig(100 * (1 - i2 / i1), 3)} %)",
               method="I₂ = S₂/(√3·V); reduction 1 − PF₁/PF₂", source=SRC_TRIANGLE)
    out.result("loss_cut", "I²R loss reduction in upstream cables and transformer", 100 * correction.loss_reduction_fraction(pf1, pf_after), "%",
               digits=3, group=G5, method="1 − (PF₁/PF₂)², at the same P and voltage", source=SRC_TRIANGLE)

    # --- voltage rating and frequency duty
    d = capacitor.duty(v, cap_v, f, cap_f)
    if cap_v < v * (1 - 1e-9):
        over = d.over_limits()
        status = "fail" if over else "warn"
        out.result("cap_duty", "Capacitor voltage at system voltage", 100 * d.voltage, "% of rating", digits=3, status=status,
                   group=G3, method="V/V_r; IEEE 18 continuous limit 110 %", source=SRC_IEEE18)
        msg = (f"The capacitor is rated {fmt.sig(cap_v)} V, below the {fmt.sig(v)} V system: it runs at {fmt.sig(100 * d.voltage, 3)} % "
               f"of its rated voltage and {fmt.sig(100 * d.kvar, 3)} % of its rated kvar")
        if over:
            msg += f", beyond the IEEE Std 18 continuous limits ({', '.join(over)}). Choose a unit rated at least {fmt.sig(v)} V."
        else:
            msg += ", within IEEE Std 18 continuous limits but with a shorter life and no margin for overvoltage or harmonics. Prefer a unit rated at least the system voltage."
        out.warn(msg)
    elif d.over_limits():
        out.warn(f"At {fmt.sig(f)} Hz this {fmt.sig(cap_f)} Hz capacitor runs at {fmt.sig(100 * d.kvar, 3)} % kvar and "
                 f"{fmt.sig(100 * d.current, 3)} % current, beyond IEEE Std 18 continuous limits (135 %).")
    if abs(cap_f - f) > 1e-9 * f:
        out.warn(f"The capacitor is rated for {fmt.sig(cap_f)} Hz but runs at {fmt.sig(f)} Hz: its kvar and current scale by "
                 f"{fmt.sig(f / cap_f, 3)} × (included above). Check that the maker allows it.")
    if cap_v > capacitor.OVERRATED_VOLTAGE_RATIO * v:
        out.notes.append(f"A {fmt.sig(cap_v)} V unit on {fmt.sig(v)} V gives only {fmt.sig(100 * (v / cap_v) ** 2, 3)} % of its nameplate kvar; "
                         "you pay for kvar you do not get, in exchange for voltage margin.")

    # --- selection checks at full load
    if after.sense == "leading":
        out.warn(f"The bank leads at full load (PF {_pf_text(pf_after, 'leading')}): the units you can buy are too coarse "
                 "for this load. Add smaller ratings to the list" + (" or use fewer steps." if bank == "auto" else "."))
    if need_rated > 0 and (total_rated - need_rated) > banksteps.EXCESS_WARN_FRACTION * need_rated and total_rated - need_rated > min(ratings):
        hint = "Fewer steps, another pattern or more unit ratings would fit closer."
        if bank == "auto" and pattern != "custom":
            found = banksteps.best_step_count(need_rated, ratings, pattern)
            if found and found[0] != len(steps_rated) and found[1].total < total_rated - 1e-9:
                n_best, p_best = found
                hint = (f"With {n_best} step{'s' if n_best > 1 else ''} in the same pattern the bank would be "
                        f"{', '.join(fmt.sig(x) for x in p_best.steps)} kvar ({fmt.sig(p_best.total)} kvar rated).")
        out.warn(f"The step plan orders {fmt.sig(100 * (total_rated - need_rated) / need_rated, 3)} % more than needed. " + hint)

    most = max((len(u) for u in step_units), default=0)
    if most > banksteps.MANY_UNITS_PER_STEP:
        out.warn(f"One step of this plan is {most} units in parallel. A step is usually one to a few units: add a larger "
                 "unit rating to the list, or leave out the smallest, for fewer units, connections and fuses.")

    combos = banksteps.combinations(steps_sys)

    # --- lightest load
    light_check = None
    light_net = None
    if light_p is not None:
        if light_p > net.p_kw * (1 + 1e-9):
            raise FieldError("light_p", f"The lightest load is above the full load ({fmt.sig(net.p_kw)} kW); check the figures.")
        light = correction.load_from_p_pf(light_p, light_pf)
        light_net = light.corrected(existing) if (not existing_in and existing > 0) else light
        light_check = banksteps.light_load_check(light_net, steps_sys, combos=combos)
        full_light = light_net.corrected(delivered)
        out.result("pf_light", f"Power factor at the lightest load ({fmt.sig(light_p)} kW), whole bank in", full_light.pf, "",
                   display=_pf_text(full_light.pf, full_light.sense), key=True,
                   status="warn" if full_light.sense == "leading" else "ok", group="",
                   method="PF = P_min/√(P_min² + (Q_min − Q_C)²)", source=SRC_TRIANGLE)
        if light_check.leading:
            if bank == "fixed":
                out.warn(f"Over-correction: at the lightest load the fixed bank gives PF {_pf_text(full_light.pf, full_light.sense)}. "
                         "Switch it with the load, make it smaller, or use an automatic bank.")
            elif light_check.best is None:
                out.warn("Over-correction: even the smallest step makes the power factor leading at the lightest load. "
                         "Use a smaller first step.")
            else:
                b = light_check.best
                out.warn(f"Over-correction: at the lightest load, more than {fmt.sig(b.total)} kvar makes the power factor leading. "
                         f"Keep step{'s' if len(light_check.leave_out) > 1 else ''} {', '.join(str(i) for i in light_check.leave_out)} off "
                         f"(steps {'+'.join(str(i) for i in b.on)} in give {_pf_text(light_net.corrected(b.total).pf, light_net.corrected(b.total).sense)}); "
                         "set the controller's target and switching delay so it does.")
    else:
        out.notes.append("No lightest load entered: the over-correction check was skipped.")

    # --- supply: voltage rise and resonance
    s_sc = None
    near_orders = ((supply.SINGLE_PHASE_ORDER,) if phases == 1 else ()) + supply.LOW_ORDERS
    if tx_kva is not None:
        try:
            s_sc = supply.transformer_short_circuit_kva(tx_kva, tx_z, None if fault_mva is None else fault_mva * 1000.0)
        except InputError as e:  # pragma: no cover - fields are range-checked
            raise FieldError("tx_kva", str(e)) from None
        if not supply.bank_fits_bus(delivered + existing, s_sc):
            weak_utility = fault_mva is not None and fault_mva * 1000.0 < tx_kva / (tx_z / 100.0)
            raise FieldError("fault_mva" if weak_utility else "tx_kva",
                             f"The capacitors ({fmt.sig(delivered + existing)} kvar) are as large as the bus short-circuit "
                             f"level ({fmt.sig(s_sc)} kVA): check the transformer rating and impedance"
                             + (", the utility fault level" if fault_mva is not None else "") + " and their units.")
        G6 = "Supply"
        out.result("s_sc", "Short-circuit level at the bus", s_sc, "kVA", group=G6,
                   method="S_sc = 1/(Z%/100/S_t + 1/S_utility)", source=SRC_SUPPLY)
        rise = supply.voltage_rise_percent(delivered, s_sc)
        out.result("v_rise", "Voltage rise, whole new bank switched in", rise, "%", digits=3, group=G6,
                   status="warn" if rise > supply.VOLTAGE_RISE_LIMIT_PERCENT else "ok",
                   method="ΔV ≈ 100·Q_C/S_sc (source reactance only; overstates the rise by up to about 10 % of itself for transformer X/R ≥ 3 at up to full load)",
                   source=cite("practice", "ngspice_checked"))
        if bank == "auto":
            out.result("v_rise_step", "Voltage step, largest step switched", supply.voltage_rise_percent(max(steps_sys), s_sc), "%",
                       digits=3, group=G6, method="ΔV ≈ 100·Q_step/S_sc", source=ref("practice"))
        if rise > supply.VOLTAGE_RISE_LIMIT_PERCENT:
            out.warn(f"Switching the whole bank raises the bus voltage by about {fmt.sig(rise, 2)} %: check light-load voltage, "
                     f"and switch in steps (common practice keeps it under about {fmt.sig(supply.VOLTAGE_RISE_LIMIT_PERCENT)} %).")
        q_bus = delivered + existing
        h = supply.resonance_order(s_sc, q_bus)
        near = supply.near_harmonic(h, near_orders)
        out.result("h_res", "Parallel resonance order, all capacitors in", h, "", digits=3, group=G6,
                   display=f"{fmt.sig(h, 3)} (≈ {fmt.sig(h * f, 3)} Hz)" + (f": near the {near}th harmonic" if near else ""),
                   status="warn" if near else "ok",
                   method="h = √(S_sc/Q_C), Q_C = new bank + existing at system voltage; neglects damping and the load's own inductance (which raises the true h by about √(1 + Q_load/S_sc))", source=SRC_SUPPLY)
        out.caution(cautions.SCREENING)

    # --- combinations table
    target_combo = next((c for c in combos if net.corrected(c.total).pf >= pf2 - 1e-9 and net.corrected(c.total).sense != "leading"), None)
    near_list = []
    rows = []
    levels = combos
    note_cut = ""
    if len(levels) > 64:
        stride = math.ceil(len(levels) / 64)
        keep = set(levels[::stride]) | {levels[-1]}
        if target_combo:
            keep.add(target_combo)
        if light_check and light_check.best:
            keep.add(light_check.best)
        levels = [c for c in combos if c in keep]
        note_cut = f"Showing {len(levels)} of {len(combos)} positions, evenly spread. "
    for c in levels:
        a = net.corrected(c.total)
        row = ["All (fixed bank)" if bank == "fixed" else "+".join(str(i) for i in c.on), fmt.sig(c.total), _pf_text(a.pf, a.sense)]
        notes = []
        if light_net is not None:
            lt = light_net.corrected(c.total)
            row.append(_pf_text(lt.pf, lt.sense))
            if lt.sense == "leading":
                notes.append("leads at light load")
        if s_sc is not None:
            hc = supply.resonance_order(s_sc, c.total + existing)
            nh = supply.near_harmonic(hc, near_orders)
            row.append(fmt.sig(hc, 3))
            if nh:
                notes.append(f"near {nh}th")
                near_list.append((c, hc, nh))
        if c is target_combo:
            notes.insert(0, "reaches target")
        row.append(", ".join(notes))
        rows.append(row)
    cols = ["Steps in", f"kvar at {fmt.sig(v)} V", "PF at full load"]
    if light_net is not None:
        cols.append("PF at lightest load")
    if s_sc is not None:
        cols.append("Resonance order h" + (" (existing included)" if existing > 0 else ""))
    cols.append("Note")
    out.table("Step combinations" if bank == "auto" else "Bank switched in", cols, rows,
              note=note_cut + "Steps are numbered from the first (smallest) step. kvar at system voltage and frequency. "
                   "PF: lagging = inductive, leading = capacitive.")

    if near_list:
        worst = sorted({nh for _, _, nh in near_list})
        out.warn(f"Resonance risk: with some step combinations the bus resonates near harmonic order "
                 f"{', '.join(str(x) for x in worst)} (see the table). If the plant has drives, rectifiers or other "
                 "harmonic sources, check it with the bus resonance scan and consider a detuned (reactor) bank.")

    # --- link to the resonance scan
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


def _load_method(basis: str) -> str:
    return {
        "p_pf": "P as entered",
        "s_pf": "P = S·PF",
        "p_q": "P as entered",
        "vi_pf": "P = √3·V·I·PF (three-phase) or V·I·PF",
        "vi_p": "P as entered; S = √3·V·I (three-phase) or V·I",
        "bill_energy": "P = billed demand, or kWh ÷ operating hours",
        "bill_demand": "P = peak kW demand",
    }[basis]


SHEET = Worksheet(
    id="correction",
    title="Capacitor correction",
    summary="How many kvar to add, which capacitor units and steps to order at what rating, the cable and "
            "protection, and whether the bank over-corrects, raises the voltage or resonates.",
    fields=FIELDS,
    compute=compute,
    cautions=[cautions.STORED_CHARGE, cautions.QUALIFIED, cautions.ESTIMATE],
    order=10,
    references=[
        ref("ieee141_pf"), ref("ieee18"), ref("ieee1036"), ref("nec460_8"), ref("iec60831"),
    ],
)
