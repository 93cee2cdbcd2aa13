"""Motor-terminal capacitor worksheet: the largest capacitor that avoids self-excitation, the
full-load power factor it gives, and the overload-setting reminder (NEC 460.9)."""

from __future__ import annotations

from pycore import motorcap as mc
from pycore.capacitor import NEC_460_8, capacitance_uf
from pycore.errors import InputError
from pycore.references import cite, ref

from .. import cautions, fmt
from .. import quantities as Q
from ..sheet import Field, FieldError, Worksheet

SRC_AC = ref("circuits_ac_power")
SRC_LIMIT = cite("practice", "nema_mg1")
SRC_ESTIMATE = ref("machines")
SRC_NEC_9 = ref("nec460_9")
SRC_NEC_8 = ref("nec460_8")

FIELDS = [
    Q.SYSTEM_VOLTAGE.field("v", "Rated voltage", default="400", group="Motor nameplate",
                           note="The motor's; the capacitor is rated at this voltage too."),
    Q.SYSTEM_FREQUENCY.field("f", default="50"),
    Field("i_full", "Full-load current", unit="A", default="68", min=0, min_open=True, max=1e5,
          help="Nameplate full-load amperes at the rated voltage."),
    Q.POWER_FACTOR.field("pf_full", "Full-load power factor", default="0.86",
                         note="Lagging. From the nameplate or the maker's data sheet."),
    Field("basis", "Magnetising current from", kind="choice", default="i0", group="Magnetising current",
          options=[("i0", "No-load current (measured or from the maker)"),
                   ("rated", "Rated data only (rough estimate)")],
          help="Run the motor uncoupled at rated voltage and read the current: the best basis. Without it the "
               "sheet estimates from the full-load data, less precisely and on the small side."),
    Field("i0", "No-load current", unit="A", default="24", min=0, min_open=True, max=1e5,
          show_when={"field": "basis", "in": ["i0"]},
          help="Line current running uncoupled at rated voltage. Measure again after a rewind: it often changes."),
    Field("lr_ratio", "Locked-rotor ÷ full-load current", default="6", min=1, min_open=True, max=20,
          show_when={"field": "basis", "in": ["rated"]}, suggest=["5", "6", "7", "8"],
          help="From the data sheet or the code letter; 6 to 7 is typical of general-purpose motors."),
    # a terminal capacitor is at most the motor's magnetising kvar: far below a bank's limits, so its own field
    Field("q_cap", "Capacitor to check", unit="kvar", default="", required=False, min=0, min_open=True, max=1e5,
          group="Check a capacitor (optional)", placeholder="none",
          help="The kvar, at the motor's rated voltage, of a capacitor already fitted or proposed."),
    Field("cap_conn", "Capacitor connection", kind="choice", default="delta",
          options=[("delta", "Delta (usual three-phase can)"), ("wye", "Wye")],
          help="Only changes the capacitance per phase shown."),
]


def _q_at_text(q, v):
    return f"{fmt.sig(q, 4)} kvar at {fmt.sig(v)} V"


def compute(ins, out):
    v = ins.num("v")
    f = ins.num("f")
    i_full = ins.num("i_full")
    pf_full = ins.pf_value("pf_full")
    basis = ins.choice("basis")
    i0 = ins.num("i0") if basis == "i0" else None
    lr = ins.num("lr_ratio") if basis == "rated" else None
    q_cap = ins.num("q_cap")
    cap_conn = ins.choice("cap_conn")
    if ins.errors:
        return

    rough = basis == "rated"
    if rough:
        if pf_full >= 1.0:
            raise FieldError("pf_full", "At unity power factor the rated data say nothing about magnetising current: "
                                        "measure the no-load current.")
        try:
            q0 = mc.magnetising_kvar_estimate(v, i_full, pf_full, lr)
        except InputError as e:
            raise FieldError("pf_full", str(e)) from None
        if not q0 > 0.0:
            raise FieldError("i_full", "The full-load current is too small to work with: enter it in A.")
        q0_method = "Q0 ≈ √3·V·I_FL·(sin φ_FL − I_FL/I_LR)"
        q0_src = SRC_ESTIMATE
    else:
        if i0 >= i_full:
            raise FieldError("i0", f"The no-load current must be below the full-load current ({fmt.sig(i_full)} A).")
        q0 = mc.magnetising_kvar(v, i0)
        if not q0 > 0.0:  # underflow of an absurdly small entry
            raise FieldError("i0", "The no-load current is too small to work with: enter it in A.")
        q0_method = "Q0 = √3·V·I0 (no-load current taken as all magnetising)"
        q0_src = SRC_LIMIT
        ratio = i0 / i_full
        if ratio < mc.NO_LOAD_RATIO_PLAUSIBLE[0]:
            out.warn(f"The no-load current is only {fmt.sig(100 * ratio, 2)} % of full-load current, low for an induction "
                     "motor: check it was read at rated voltage with the motor uncoupled.")
        elif ratio > mc.NO_LOAD_RATIO_PLAUSIBLE[1]:
            out.warn(f"The no-load current is {fmt.sig(100 * ratio, 2)} % of full-load current, high for most motors: "
                     "check the reading (the motor may be lightly built, multi-pole, or was loaded).")

    q_max = mc.max_capacitor_kvar(q0)
    g = "Largest capacitor"
    tag = " (rough estimate)" if rough else ""
    out.result("q0", "No-load magnetising kvar" + tag, q0, "kvar", group=g, status="warn" if rough else "",
               method=q0_method, source=q0_src)
    out.result("q_max", "Largest terminal capacitor" + tag, q_max, "kvar", key=True, group=g,
               status="warn" if rough else "ok", display=_q_at_text(q_max, v),
               method=f"Q_C ≤ {fmt.sig(100 * mc.MARGIN)} % × Q0, rated at the motor voltage", source=SRC_LIMIT)
    c_d = capacitance_uf(q_max, v, f, "delta")
    c_y = capacitance_uf(q_max, v, f, "wye")
    out.result("c_max", "Capacitance per phase" + (" (delta)" if cap_conn == "delta" else " (wye)"),
               (c_d if cap_conn == "delta" else c_y) * 1e-6, "F", si=True, group=g,
               method="C = Q/(3·2πf·V²) delta; Q/(2πf·V²) wye",
               source=SRC_AC)
    try:
        fl = mc.full_load_with_capacitor(v, i_full, pf_full, q_max)
    except InputError as e:
        raise FieldError("i_full", str(e)) from None
    out.result("pf_with_max", "Full-load power factor with it", fl.pf, "", key=True, group=g,
               display=f"{fl.pf:.3f} {fl.sense} (from {pf_full:.3f} lagging)",
               method="pf' = P/√(P² + (Q − Q_C)²)", source=SRC_AC)
    out.result("i_with_max", "Line current at full load with it", fl.i_line, "A", key=True, group=g,
               display=f"{fmt.sig(fl.i_line, 4)} A ({fmt.sig(fl.i_reduction, 3)} % below the {fmt.sig(i_full)} A nameplate)",
               method="I' = √(P² + (Q − Q_C)²)/(√3·V)", source=SRC_NEC_9)
    i_c = mc.capacitor_current(q_max, v)
    out.result("i_cap", "Capacitor rated current", i_c, "A", group=g, method="I = Q/(√3·V)", source=SRC_AC)
    out.result("i_cap_cond", "Capacitor conductors at least", NEC_460_8 * i_c, "A", group=g,
               method=f"{fmt.sig(100 * NEC_460_8)} % of rated capacitor current, and not less than one third of the motor circuit conductors' ampacity",
               source=SRC_NEC_8)
    if rough:
        out.warn("Rough estimate from rated data: it errs on the small side but can be well off for unusual motors. "
                 "Measure the no-load current (motor uncoupled, rated voltage) before ordering.")

    if q_cap is not None:
        g = "Capacitor checked"
        if q_cap > q0:
            st, word = "fail", "Too large: above the no-load magnetising kvar — self-excitation risk"
        elif q_cap > q_max + 1e-9 * q_max:
            st, word = "warn", f"Inside the {fmt.sig(100 - 100 * mc.MARGIN)} % margin: not recommended"
        else:
            st, word = "ok", "Within the limit"
        out.result("check", "Verdict", q_cap, "kvar", key=True, status=st, group=g,
                   display=f"{word} ({_q_at_text(q_cap, v)}, {fmt.sig(100 * q_cap / q0, 3)} % of Q0)",
                   method=f"compare with Q0 = {fmt.sig(q0, 4)} kvar and {fmt.sig(100 * mc.MARGIN)} % of it", source=SRC_LIMIT)
        fc = mc.full_load_with_capacitor(v, i_full, pf_full, q_cap)
        out.result("pf_with_cap", "Full-load power factor with this capacitor", fc.pf, "", group=g,
                   display=f"{fc.pf:.3f} {fc.sense}", method="pf' = P/√(P² + (Q − Q_C)²)", source=SRC_AC)
        out.result("i_with_cap", "Line current at full load with this capacitor", fc.i_line, "A", group=g,
                   display=f"{fmt.sig(fc.i_line, 4)} A ({fmt.sig(fc.i_reduction, 3)} % below nameplate)",
                   method="I' = √(P² + (Q − Q_C)²)/(√3·V)", source=SRC_NEC_9)
        if st == "fail":
            out.warn("This capacitor can keep the motor excited after the supply opens: overvoltage while it runs down, "
                     "and severe transient torque if the supply recloses. Fit a smaller one, or connect the capacitor "
                     "ahead of the motor contactor with its own switching.")

    i_relay, which = (fc.i_line, "the capacitor checked") if q_cap is not None else (fl.i_line, "the largest capacitor")
    out.notes.append(
        "NEC 460.9: with the capacitor on the motor side of the overload relay, the relay sees the reduced line current "
        f"({fmt.sig(i_relay, 4)} A at full load with {which}), not the {fmt.sig(i_full)} A nameplate current: set or "
        "select the overload for it. A capacitor connected ahead of the relay does not change the setting.")
    out.notes.append(
        "Common practice: no terminal capacitors on motors fed by a variable-speed drive or soft starter output, or on "
        "motors that are plugged, jogged, reversed or restarted while still turning; use a separately switched bank there.")


SHEET = Worksheet(
    id="motor_cap",
    title="Motor-terminal capacitor",
    summary="The largest capacitor on a motor's terminals that avoids self-excitation, the full-load power factor "
            "and line current it gives, and the overload setting reminder (NEC 460.9).",
    fields=FIELDS,
    compute=compute,
    cautions=[cautions.STORED_CHARGE, cautions.QUALIFIED, cautions.ESTIMATE],
    order=55,
    essential=('v', 'f', 'i_full', 'pf_full', 'basis', 'i0', 'lr_ratio'),
    references=[
        ref("nec460_8"), ref("nec460_9"), ref("nema_mg1"), ref("machines"),
    ],
)
