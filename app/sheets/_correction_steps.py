"""The capacitor correction worksheet's steps: reading the inputs, the load and the need, the unit
choice and step plan, the currents. Not a worksheet (no SHEET): :mod:`app.sheets.correction`
runs these steps in order, passing one namespace of values from step to step."""

from __future__ import annotations

import re
from types import SimpleNamespace

from pycore import banksteps, capacitor, correction
from pycore.correction import Load
from pycore.errors import InputError
from pycore.numparse import split_number
from pycore.references import cite, ref

from .. import fmt
from .. import quantities as Q
from ..sheet import FieldError
from ..svg import Svg

SRC_TRIANGLE = ref("circuits_ac_power")
SRC_141 = ref("ieee141_pf")
SRC_CAP = ref("circuits_ac_power")
SRC_IEEE18 = ref("ieee18")
SRC_NEC = ref("nec460_8")
SRC_IEC = ref("iec60831")
SRC_SUPPLY = cite("ieee141_sc", "ieee399", "ieee1036", "dugan")
SRC_STEPS = ref("this_app")

G_CAPACITOR = "Capacitor data (whole bank)"  # the results group the duty check also writes to

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


def _steps_text(steps, units) -> str:
    """'10, 10 steps of 20' — runs of equal steps said once; a step of several units as '100 (2 × 50)'."""
    runs: list = []
    for s, u in zip(steps, units):
        one = fmt.sig(s) + (f" ({_units_text(u)})" if len(u) > 1 else "")
        if runs and runs[-1][0] == one:
            runs[-1][1] += 1
        else:
            runs.append([one, 1])
    return ", ".join(one if n == 1 else f"{n} steps of {one}" for one, n in runs)


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
    if vis("pf1"):
        got = ins.pf("pf1")  # the shared reader: "0.78", "78 %", "0.78 lag", "0.95 lead"
        vals["pf1"] = got.value if got else None
        vals["pf1_lead"] = bool(got and got.leading and got.value < 1.0)
    for name in ("v_meas", "i_meas", "p_kw", "s_kva", "q_kvar", "bill_kwh", "bill_kvarh", "bill_kw",
                 "bill_hours", "peak_kw", "peak_kva"):
        if vis(name):
            vals[name] = ins.num(name)
    return vals


def _build_load(ins, basis: str, vals: dict, phases: int) -> Load:
    lagging = ins.choice("pf1_sense") != "leading" and not vals.get("pf1_lead")
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


def read_inputs(ins, *more):
    """Read every field the sizing uses; None when a field is bad (its message is recorded).
    Each of ``more`` (a helper module's reader, ``fn(ins, cx)``) reads its own fields too."""
    v = ins.num("v_ll")
    f = ins.num("f")
    phases = 3 if ins.choice("phases") == "3" else 1
    basis = ins.choice("basis")
    vals = _read_load(ins)
    pf2 = ins.pf_value("pf2")
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
    light_pf = ins.pf_value("light_pf") if light_p is not None else None
    if light_p is not None and light_pf is None and "light_pf" not in ins.errors:
        ins.fail("light_pf", "Enter the power factor at the lightest load (or clear the lightest load).")
    tx_kva = ins.num("tx_kva")
    tx_z = ins.num("tx_z")
    fault_mva = ins.num("fault_mva")
    cx = SimpleNamespace()
    for read in more:
        read(ins, cx)
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
    cx.bank, cx.basis, cx.cap_f, cx.cap_v, cx.conn, cx.custom_text = bank, basis, cap_f, cap_v, conn, custom_text
    cx.existing, cx.existing_in, cx.f, cx.fault_mva, cx.light_p, cx.light_pf = existing, existing_in, f, fault_mva, light_p, light_pf
    cx.n_steps, cx.pattern, cx.pf2, cx.phases, cx.profile, cx.ratings = n_steps, pattern, pf2, phases, profile, ratings
    cx.tx_kva, cx.tx_z, cx.v, cx.vals = tx_kva, tx_z, v, vals
    return cx


def the_need(ins, cx):
    """The load as corrected today, its power factor and the kvar needed at system voltage and at the rating."""
    basis, cap_f, cap_v, existing, existing_in, f = cx.basis, cx.cap_f, cx.cap_v, cx.existing, cx.existing_in, cx.f
    pf2, phases, v, vals = cx.pf2, cx.phases, cx.v, cx.vals
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
    factor = capacitor.output_factor(cx.v_cap, cap_v, f, cap_f)  # at the measured voltage when entered
    need_rated = need / factor
    cx.factor, cx.i1, cx.need, cx.need_rated, cx.net, cx.pf1 = factor, i1, need, need_rated, net, pf1
    cx.v_i = v_i


def plan_bank(ins, cx):
    """The unit choice and step plan from the ratings that can be bought, and the power factor it reaches."""
    bank, cap_f, cap_v, conn, custom_text, existing = cx.bank, cx.cap_f, cx.cap_v, cx.conn, cx.custom_text, cx.existing
    factor, n_steps, need_rated, net, pattern, phases = cx.factor, cx.n_steps, cx.need_rated, cx.net, cx.pattern, cx.phases
    ratings, v_i = cx.ratings, cx.v_i
    plan = weights = None  # set for an automatic bank only
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
    cx.after, cx.delivered, cx.i2, cx.order_text, cx.pf_after, cx.plan = after, delivered, i2, order_text, pf_after, plan
    cx.step_units, cx.steps_rated, cx.steps_sys, cx.total_rated, cx.weights = step_units, steps_rated, steps_sys, total_rated, weights


def currents(ins, cx):
    """Rated and system-voltage currents of the bank, the conductor basis and the protective-device range."""
    cap_v, delivered, phases, profile, total_rated, v = cx.cap_v, cx.delivered, cx.phases, cx.profile, cx.total_rated, cx.v
    i_rated = capacitor.line_current(total_rated, cap_v, phases)
    i_sys = capacitor.line_current(delivered, cx.v_cap, phases)
    i_basis = max(i_rated, i_sys)
    basis_cable = capacitor.conductor_basis(i_basis, profile)
    prot_lo, prot_hi = capacitor.protection_range(i_rated)
    cx.basis_cable, cx.i_basis, cx.i_rated, cx.i_sys, cx.prot_hi, cx.prot_lo = basis_cable, i_basis, i_rated, i_sys, prot_hi, prot_lo
