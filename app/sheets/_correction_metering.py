"""The correction worksheet's metering point, measured voltage and leading power factor.

- Metering at the transformer's primary: the meter also sees the transformer's own reactive power
  Q_T = S_T·(i₀ + u_k·(S/S_T)²) (:mod:`pycore.transformer`), so the bank on the secondary must
  cover it; fixed no-load compensation of about i₀·S_T is offered as its own fixed step (common
  practice).
- A measured bus voltage: the capacitor's output is taken there, Q = Q_r·(V/V_r)²·(f/f_r)
  (:mod:`pycore.bankoutput`), and each figure says which voltage it uses.
- A leading present power factor is answered, not refused: capacitors cannot raise it; the kvar to
  switch off is given (:func:`pycore.bankoutput.kvar_to_switch_off`).

Not a worksheet: :mod:`app.sheets.correction` calls these between its steps.
"""

from __future__ import annotations

from pycore import bankoutput, capacitor, correction, transformer
from pycore.errors import InputError
from pycore.references import cite, ref

from .. import fmt
from ..sheet import Field, FieldError

SRC_TX = cite("transformer_circuit", "ieee141_pf")
SRC_NOLOAD = ref("practice")
SRC_CAP = ref("circuits_phasors")
SRC_LEAD = ref("circuits_ac_power")
G_METER = "Metering point"
_TYPICAL = ", ".join(f"{fmt.sig(pct)} % up to {fmt.sig(top)} kVA" if top != float("inf") else f"{fmt.sig(pct)} % above"
                     for top, pct in transformer.TYPICAL_I0_PCT)
_SENSE_SETS = ("p_pf", "s_pf", "vi_pf", "vi_p")

FIELDS = [
    Field("metering", "Where the utility meters the power factor", kind="choice", default="secondary", group=G_METER,
          options=[("secondary", "Transformer secondary (where the bank connects)"),
                   ("primary", "Transformer primary (HV side)")],
          help="At the primary the meter also sees the transformer's own kvar; the bank on the secondary must cover it. "
               "The load figures above stay those of the secondary."),
    Field("tx_i0", "Transformer no-load current", unit="%", default="", required=False, min=0, max=20,
          suggest=["0.8", "1", "1.5", "2", "2.5"], show_when={"field": "metering", "in": ["primary"]},
          help=f"From the nameplate or test report. Blank: a typical value for the rating is used and marked as such "
               f"(typical, from memory: {_TYPICAL}). The rating and impedance are under Supply, below."),
    Field("noload_fixed", "Transformer no-load kvar", kind="choice", default="fixed",
          options=[("fixed", "A fixed step for it (always in)"), ("bank", "Left to the bank")],
          show_when={"field": "metering", "in": ["primary"]},
          help="A small fixed capacitor of about i₀·S_T at the transformer offsets its magnetising kvar even at no load "
               "(common practice)."),
]


def read(ins, cx) -> None:
    """Read the metering fields into ``cx`` (``metering``, ``i0``, ``i0_typical``, ``noload_fixed``,
    ``v_cap``: the voltage the capacitor figures use, the measured one when entered)."""
    cx.metering = ins.choice("metering")
    cx.v_nominal = cx.v
    v_meas = cx.vals.get("v_meas")
    cx.v_cap = v_meas if v_meas else cx.v
    cx.i0, cx.i0_typical, cx.noload_fixed = None, False, False
    if cx.metering != "primary":
        return
    i0 = ins.num("tx_i0")
    cx.noload_fixed = ins.choice("noload_fixed") == "fixed"
    if ins.errors:
        raise FieldError("tx_i0", ins.errors.pop("tx_i0"))
    if cx.tx_kva is None:
        raise FieldError("tx_kva", "With the meter at the transformer's primary, enter the transformer rating and "
                                   "impedance (Supply, below): its own kvar is part of the need.")
    if i0 is None:
        i0, cx.i0_typical = transformer.typical_no_load_pct(cx.tx_kva), True
    cx.i0 = i0


def answer_leading(ins, out, cx) -> bool:
    """For a leading present power factor: say what to switch off, and return True (no bank is sized)."""
    lead = ins.choice("pf1_sense") == "leading" or cx.vals.get("pf1_lead")
    if cx.basis not in _SENSE_SETS or not lead:
        return False
    vals, ph = cx.vals, cx.phases
    try:
        if cx.basis == "p_pf":
            load = correction.load_from_p_pf(vals["p_kw"], vals["pf1"], lagging=False)
        elif cx.basis == "s_pf":
            load = correction.load_from_s_pf(vals["s_kva"], vals["pf1"], lagging=False)
        elif cx.basis == "vi_pf":
            load = correction.load_from_v_i_pf(vals["v_meas"], vals["i_meas"], vals["pf1"], ph, lagging=False)
        else:
            load = correction.load_from_v_i_p(vals["v_meas"], vals["i_meas"], vals["p_kw"], ph, lagging=False)
    except InputError as e:
        raise FieldError("p_kw" if cx.basis == "vi_p" else "pf1", str(e)) from None
    off_unity = bankoutput.kvar_to_switch_off(load.p_kw, load.q_kvar, 1.0)
    off_target = bankoutput.kvar_to_switch_off(load.p_kw, load.q_kvar, cx.pf2)
    g = "Leading power factor"
    out.result("pf1", "Power factor now", load.pf, "", display=f"{load.pf:.3f} leading", key=True, status="warn", group=g,
               method="PF = P/S with Q leading (capacitive)", source=SRC_LEAD)
    out.result("q_lead", "Reactive power now (leading)", -load.q_kvar, "kvar", group=g,
               method="Q = P·tan φ, capacitive", source=SRC_LEAD)
    out.result("off_unity", "Capacitor kvar to switch off for unity", off_unity, "kvar", key=True, group=g,
               method="−Q (the leading kvar)", source=SRC_LEAD)
    out.result("off_target", f"Capacitor kvar to switch off for {cx.pf2:.2f} lagging", off_target, "kvar", key=True,
               group=g, method="−Q + P·tan φ₂", source=SRC_LEAD)
    out.warn("The load is leading: adding capacitors cannot raise this power factor, only lower it further. Switch "
             "capacitors off (or check the automatic bank's controller and its target) as given above.")
    if cx.existing > 0 and off_unity > cx.existing * (1 + 1e-9):
        out.warn(f"More leading kvar ({fmt.sig(off_unity)} kvar) than the capacitors entered ({fmt.sig(cx.existing)} kvar): "
                 "look for other capacitance (filters, long cables, other banks) or check the reading.")
    return True


def primary_need(cx) -> None:
    """With primary metering, replace the need by the kvar that meets the target at the primary."""
    if cx.metering != "primary":
        return
    try:
        need = transformer.kvar_for_primary_target(cx.net.p_kw, cx.net.q_kvar, cx.pf2, cx.tx_kva, cx.tx_z, cx.i0)
    except InputError as e:
        raise FieldError("pf2", str(e)) from None
    cx.need_secondary = cx.need
    cx.need, cx.need_rated = need, need / cx.factor
    cx.need_method = (f"Q_C with Q₂ + Q_T(S₂) = P·tan φ₂ at the primary, Q_T = S_T·(i₀ + u_k·(S₂/S_T)²); "
                      f"{fmt.sig(cx.need_secondary)} kvar would meet the target at the secondary only")


def report(out, cx) -> None:
    """Which voltage the capacitor figures use; the transformer's kvar and the PF at a primary meter."""
    g = "Voltage and metering"
    if abs(cx.v_cap - cx.v_nominal) > 1e-9 * cx.v_nominal:
        at_nominal = capacitor.output_at(cx.total_rated, cx.v_nominal, cx.cap_v, cx.f, cx.cap_f)
        out.result("v_cap", "Voltage the capacitor figures use", cx.v_cap, "V", group=g,
                   display=f"{fmt.sig(cx.v_cap)} V measured (nominal {fmt.sig(cx.v_nominal)} V)",
                   method="the measured voltage, where the bank really sits; kvar delivered, PF reached and currents use it",
                   source=ref("input"))
        out.result("q_at_nominal", f"The same bank at the nominal {fmt.sig(cx.v_nominal)} V", at_nominal, "kvar", group=g,
                   method=f"Q_r·(V/V_r)²·(f/f_r) at {fmt.sig(cx.v_nominal)} V: for comparison only", source=SRC_CAP)
    if cx.metering != "primary":
        return
    s2 = cx.after.s_kva
    q_t = transformer.reactive_kvar(s2, cx.tx_kva, cx.tx_z, cx.i0)
    p, q_meter = cx.net.p_kw, cx.after.q_kvar + q_t
    pf_meter = correction.Load(p, q_meter).pf
    sense = "leading" if q_meter < 0 else "lagging"
    typ = " (typical value, from memory: use the nameplate)" if cx.i0_typical else ""
    out.result("i0", "Transformer no-load current used", cx.i0, "%", group=g,
               display=f"{fmt.sig(cx.i0)} %{typ}", method="as entered" if not cx.i0_typical else
               "typical for the rating", source=ref("input") if not cx.i0_typical else ref("practice"))
    out.result("q_transformer", "Transformer's own kvar with the bank in", q_t, "kvar", group=g,
               method=f"Q_T = S_T·(i₀ + u_k·(S₂/S_T)²), S₂ = {fmt.sig(s2)} kVA", source=SRC_TX)
    out.result("pf_primary", "Power factor at the primary meter", pf_meter, "", key=True, group=g,
               display=f"{pf_meter:.3f} {sense}", status="ok" if pf_meter >= cx.pf2 - 1e-9 and sense == "lagging" else "warn",
               method="P/√(P² + (Q₂ + Q_T)²), transformer losses left out", source=SRC_TX)
    if cx.noload_fixed:
        q0 = transformer.no_load_compensation_kvar(cx.tx_kva, cx.i0)
        out.result("noload_step", "Fixed no-load step (part of the bank above)", q0, "kvar", key=True, group=g,
                   display=f"{fmt.sig(q0, 3)} kvar at {fmt.sig(cx.v_cap)} V, always in "
                           f"({fmt.sig(q0 / cx.factor, 3)} kvar rated)",
                   method="i₀·S_T, connected at the transformer; the switched steps cover the rest", source=SRC_NOLOAD)
