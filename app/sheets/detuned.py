"""Detuned bank worksheet: from bus voltage, frequency, kvar and a detuning factor (or a tuning
frequency) → tuning order, reactor, capacitor voltage and rating, and the branch's |Z| scan."""

from __future__ import annotations

import math

from pycore import capduty, detuning, resonancescreen, supply
from pycore.capacitor import IEEE18_VOLTAGE
from pycore.errors import InputError
from pycore.references import cite, ref

from .. import cautions, fmt
from .. import quantities as Q
from ..sheet import Field, FieldError, Worksheet
from ..svg import xy_chart
from . import _resonance_view as view

ALL_STEPS = "all steps"  # combination labels of the resonance screen ("With all steps in …")
PLAIN_SAME = "the same kvar without reactors"

SRC_CIRCUIT = ref("circuits_resonance")
SRC_IEC = cite("circuits_resonance", "iec61642")
SRC_PRACTICE = ref("practice_makers")
SRC_SUPPLY = cite("ieee141_sc", "ieee1036")

FIELDS = [
    Q.SYSTEM_VOLTAGE.field("u", default="400", group="Bus and bank"),
    Q.SYSTEM_FREQUENCY.field("f", "System frequency", default="50"),
    Q.BANK_KVAR.field("q", "Reactive power wanted at system voltage", default="200",
                      note="What the whole bank should deliver, all steps in. 0.2 Mvar is read as 200 kvar."),
    Field("steps", "Number of equal steps", default="4", min=1, max=24, suggest=["1", "4", "6", "8"],
          help="Each step is its own reactor and capacitor; the results per step use the bank's kvar divided by this."),
    Field("spec", "Tuning given as", kind="choice", default="p", group="Tuning",
          options=[("p", "Detuning factor p"), ("ft", "Tuning frequency")],
          help="p = X_L/X_C at the fundamental, in %, or the series-resonance frequency of the branch."),
    Field("p", "Detuning factor p", unit="%", default="7", min=0, min_open=True, max=100, max_open=True,
          suggest=[fmt.sig(p) for p in detuning.TYPICAL_DETUNING_PERCENT], show_when={"field": "spec", "in": ["p"]},
          help="5.67 %, 7 % and 14 % are the usual choices (common practice); any value from above 0 to below 100 % is allowed. "
               "Use 14 % where a 3rd harmonic is present."),
    Field("ft", "Tuning frequency", unit="Hz", default="189", min=0, min_open=True, max=100000,
          show_when={"field": "spec", "in": ["ft"]},
          help="Series-resonance frequency of the branch; it must be above the system frequency. 7 % at 50 Hz is about 189 Hz."),
    Field("h_low", "Lowest harmonic present", default="5", min=2, max=50, suggest=["3", "5", "7"],
          help="The lowest harmonic order with real content at the bus: 5 for six-pulse drives, 3 where single-phase loads are many."),
    Q.CAPACITOR_VOLTAGE.field("u_cap", default="", required=False, group="Capacitor",
                              note="Leave blank to have one chosen from common low-voltage ratings; enter the maker's rating to use it instead."),
    Field("margin", "Voltage margin for choosing the rating", unit="%", default="10", min=0, max=50, suggest=["5", "10", "15"],
          help="The rated voltage must exceed the capacitor's fundamental voltage U/(1 − p) by this much (supply tolerance, harmonics)."),
    Q.TRANSFORMER_KVA.field("s_kva", "Supply transformer rating", default="1000", required=False,
                            group="Supply (optional, for the bus resonance)",
                            note="Leave blank to skip the bus resonance."),
    Q.TRANSFORMER_Z.field("z_pct", default="6", required=False),
]


def _plot(br_step, n, h_low, x_s=None, x_c_bank=None, x_c_plain=None):
    """|Z| per phase against harmonic order: the branch, and the bus with and without reactors."""
    h_max = max(15.0, min(50.0, 2.0 * h_low + 3.0))  # drawing: the plotted range
    step = 0.04
    hs = [1.0 + k * step for k in range(int((h_max - 1.0) / step) + 1)]
    floor = br_step.x_c_ohm * 1e-3
    series = [{
        "label": "one step (branch)",
        "cls": "fp-s1",
        "points": [(h, max(abs(detuning.branch_impedance(h, br_step.x_c_ohm, br_step.p)), floor)) for h in hs],
    }]
    if x_s is not None:
        cap = 1e3 * x_s * h_max

        def bus(h, xc, p):
            z = detuning.bus_impedance(h, x_s, xc, p)
            return min(abs(z), cap) if math.isfinite(z.real) else cap

        series.append({"label": "bus, detuned bank", "cls": "fp-s2",
                       "points": [(h, bus(h, x_c_bank, br_step.p)) for h in hs]})
        series.append({"label": "bus, no reactors", "cls": "fp-s3", "dash": "6 4",
                       "points": [(h, bus(h, x_c_plain, 0.0)) for h in hs]})
    markers = [{"x": n, "label": f"n = {fmt.sig(n, 3)}", "cls": "fp-mark"}]
    if abs(h_low - n) > 0.4:  # drawing: labels apart
        markers.append({"x": h_low, "label": f"h = {fmt.sig(h_low, 3)}", "cls": "fp-axis"})
    desc = (f"Impedance magnitude per phase against harmonic order 1 to {fmt.sig(h_max, 3)}. The detuned branch "
            f"has its series resonance (minimum) at the tuning order {fmt.sig(n, 3)}; harmonics from order "
            f"{fmt.sig(h_low, 3)} upward are shaded.")
    return xy_chart(
        "|Z| per phase against harmonic order",
        series,
        x_label="harmonic order h",
        y_label="|Z| Ω",
        log_y=True,
        markers=markers,
        bands=[{"x0": h_low, "x1": h_max}],
        desc=desc,
    )


def compute(ins, out):
    u = ins.num("u")
    f = ins.num("f")
    q = ins.num("q")
    steps = ins.num("steps")
    spec = ins.choice("spec")
    p_pct = ins.num("p") if spec == "p" else None
    ft = ins.num("ft") if spec == "ft" else None
    h_low = ins.num("h_low")
    u_cap = ins.num("u_cap")
    margin = ins.num("margin")
    s_kva = ins.num("s_kva")
    z_pct = ins.num("z_pct")
    if steps is not None and steps != int(steps):
        ins.fail("steps", "The number of steps must be a whole number.")
    if (s_kva is None) != (z_pct is None) and "s_kva" not in ins.errors and "z_pct" not in ins.errors:
        missing = "z_pct" if z_pct is None else "s_kva"
        ins.fail(missing, "Enter both the transformer rating and its impedance, or leave both blank.")
    if ins.errors:
        return

    if spec == "ft":
        if ft <= f:
            raise FieldError("ft", f"The tuning frequency must be above the system frequency ({fmt.sig(f)} Hz); "
                                   "at or below it the branch is not capacitive at the fundamental.")
        n = ft / f
        p = detuning.detuning_factor(n)
    else:
        p = p_pct / 100.0
        n = detuning.tuning_order(p)

    steps = int(steps)
    q_step = q / steps
    u_c = detuning.capacitor_voltage(u, p)
    chosen = u_cap is None
    if chosen:
        u_rated = detuning.choose_rated_voltage(u_c, margin)
        if u_rated is None:
            raise FieldError("u_cap", f"No common low-voltage rating covers {fmt.sig(u_c * (1 + margin / 100), 4)} V "
                                      "(capacitor voltage plus margin): enter the maker's rated voltage.")
    else:
        u_rated = u_cap
    if not capduty.voltage_ratio_plausible(u_c, u_rated):
        raise FieldError("u_cap", f"A capacitor rated {fmt.sig(u_rated)} V would run at {fmt.sig(u_c / u_rated, 3)} times "
                                  f"its rating ({fmt.sig(u_c, 4)} V at the capacitor): "
                                  + ("check the units (V or kV)." if not chosen else "enter the maker's rated voltage."))
    try:
        br = detuning.design_branch(u, f, q_step, p, u_rated)
    except InputError as e:
        raise FieldError("q", str(e)) from None
    bank = detuning.design_branch(u, f, q, p, u_rated)

    G1, G2, G3, G4 = "Tuning", "Reactor, per step", "Capacitor, per step", "Whole bank"
    per = "per step" if steps > 1 else "the bank"
    out.result("n", "Tuning order n", n, "", digits=4, key=True, group=G1,
               method="n = 1/√p = f_tuning/f", source=SRC_CIRCUIT)
    out.result("f_tune", "Tuning frequency", n * f, "Hz", digits=4, group=G1,
               method="f_tuning = n·f", source=SRC_CIRCUIT)
    out.result("p", "Detuning factor p", 100 * p, "%", digits=4, group=G1,
               method="p = X_L/X_C at the fundamental = 1/n²", source=SRC_CIRCUIT)
    clear = (h_low - n) / h_low
    if n >= h_low:
        st, word = "fail", f"at or above the lowest harmonic ({fmt.sig(h_low)}): the branch is capacitive there and can resonate with the supply"
    elif clear < detuning.TUNING_CLEARANCE:
        st, word = "warn", f"only {fmt.sig(100 * clear, 2)} % below the lowest harmonic ({fmt.sig(h_low)}); keep it about {fmt.sig(100 * detuning.TUNING_CLEARANCE)} % or more below"
    else:
        st, word = "ok", f"{fmt.sig(100 * clear, 2)} % below the lowest harmonic ({fmt.sig(h_low)})"
    out.result("clearance", "Tuning order against the lowest harmonic", 100 * clear, "%",
               display=f"n = {fmt.sig(n, 3)}: {word}", status=st, key=True, group=G1,
               method="(h_low − n)/h_low; the branch is inductive for every harmonic above n",
               source=SRC_PRACTICE)
    if st == "fail":
        out.warn(f"The tuning order {fmt.sig(n, 3)} is not below the lowest harmonic present ({fmt.sig(h_low)}). "
                 "Choose a larger detuning factor (14 % where the 3rd harmonic is present).")
    elif st == "warn":
        out.warn("Capacitance falls with age and tolerance, which raises the tuning frequency toward the harmonic: "
                 f"keep the tuning order about {fmt.sig(100 * detuning.TUNING_CLEARANCE)} % or more below the lowest harmonic (common practice).")

    out.result("l_mh", f"Reactor inductance, per phase ({per})", br.l_mh, "mH", digits=4, key=True, group=G2,
               method="L = p·X_C/(2πf), X_C = U²/(Q(1 − p)) with Q the step's kvar", source=SRC_IEC)
    out.result("i1", f"Reactor fundamental current ({per})", br.i1_a, "A", digits=4, key=True, group=G2,
               method="I₁ = Q/(√3·U)", source=SRC_CIRCUIT)
    out.result("q_l", f"Reactor reactive power, three phases ({per})", br.q_reactor_kvar, "kvar", digits=4, group=G2,
               method="Q_L = 3·I₁²·X_L = p·Q/(1 − p)", source=SRC_CIRCUIT)
    out.result("x_l", "Reactor reactance per phase at the fundamental", br.x_l_ohm, "Ω", si=True, group=G2,
               method="X_L = p·X_C", source=SRC_CIRCUIT)
    out.notes.append("Rate the reactor's rms (thermal) current for the fundamental plus the harmonic currents the "
                     "branch absorbs, and its linearity above that (ask the maker); the capacitor duty worksheet "
                     "gives the rms current from a measured spectrum.")

    out.result("u_c", "Capacitor fundamental voltage (line-to-line)", u_c, "V", digits=4, key=True, group=G3,
               method="U_C = U/(1 − p): the reactor raises the capacitor's voltage", source=SRC_CIRCUIT)
    rise = 100 * (u_c / u - 1)
    out.result("rise", "Capacitor voltage rise above the bus", rise, "%", digits=3, group=G3,
               method="p/(1 − p)", source=SRC_CIRCUIT)
    ratio = br.voltage_ratio_percent
    if ratio > 100 * IEEE18_VOLTAGE + 1e-9:
        v_st = "fail"
    elif ratio > 100 + 1e-9:
        v_st = "warn"
    else:
        v_st = "ok"
    if chosen:
        label = f"{fmt.sig(u_rated)} V (lowest common rating ≥ {fmt.sig(u_c * (1 + margin / 100), 4)} V)"
        src = SRC_PRACTICE  # typical low-voltage capacitor ratings, from memory
    else:
        label = f"{fmt.sig(u_rated)} V (entered): U_C is {fmt.sig(ratio, 4)} % of it"
        src = cite("input", "ieee18")  # 110 % of rated rms voltage continuously
    out.result("u_rated", "Capacitor rated voltage", u_rated, "V", display=label, key=True, status=v_st, group=G3,
               method=f"rating ≥ U_C·(1 + margin), margin {fmt.sig(margin)} %", source=src)
    if v_st == "fail":
        out.warn(f"The capacitor would run at {fmt.sig(ratio, 4)} % of its rated voltage at the fundamental alone, "
                 f"above the {fmt.sig(100 * IEEE18_VOLTAGE)} % IEEE Std 18 allows. Choose a higher rated voltage.")
    elif v_st == "warn":
        out.warn(f"The capacitor would run at {fmt.sig(ratio, 4)} % of its rated voltage before any harmonics; "
                 "a higher rating leaves room for supply tolerance and harmonic voltage.")
    out.result("q_rated", f"Capacitor rated power to order ({per})", br.q_rated_kvar, "kvar", digits=4, key=True, group=G3,
               method=f"Q_rated = Q·(1 − p)·(U_rated/U)² at {fmt.sig(u_rated)} V and {fmt.sig(f)} Hz", source=SRC_IEC)
    out.result("q_cap_op", "Capacitor reactive power in service", br.q_cap_operating_kvar, "kvar", digits=4, group=G3,
               method="Q_C = Q/(1 − p) at U_C", source=SRC_CIRCUIT)
    out.result("c_delta", "Capacitance per phase, delta-connected", br.c_delta_uf, "µF", digits=4, group=G3,
               method="C_Δ = 1/(3·2πf·X_C)", source=SRC_CIRCUIT)
    out.result("c_wye", "Capacitance per phase, star (wye) equivalent", br.c_wye_uf, "µF", digits=4, group=G3,
               method="C_Y = 1/(2πf·X_C)", source=SRC_CIRCUIT)
    out.result("x_c", "Capacitor reactance per phase (wye) at the fundamental", br.x_c_ohm, "Ω", si=True, group=G3,
               method="X_C = U²/(Q(1 − p))", source=SRC_CIRCUIT)
    out.notes.append("Capacitors are assumed rated at the system frequency. Order the nearest standard kvar at or "
                     "above the figure given and recheck the output with the maker.")

    if steps > 1:
        out.result("q_bank", "Bank output at system voltage", q, "kvar", digits=4, group=G4,
                   method=f"{steps} steps × {fmt.sig(q_step, 4)} kvar", source=SRC_CIRCUIT)
        out.result("q_rated_bank", "Capacitor rated power, whole bank", bank.q_rated_kvar, "kvar", digits=4, group=G4,
                   method="steps × rated power per step", source=SRC_IEC)
        out.result("i_bank", "Bank fundamental current", bank.i1_a, "A", digits=4, group=G4,
                   method="I₁ = Q/(√3·U)", source=SRC_CIRCUIT)

    x_s = x_c_plain = None
    if s_kva is not None:
        s_sc = supply.transformer_short_circuit_kva(s_kva, z_pct)
        x_s = u * u / (s_sc * 1e3)
        x_c_plain = u * u / (q * 1e3)
        q_c_bus = q * (1 - p)  # what the bank's capacitors alone would give at the bus voltage
        h_det = detuning.bus_resonance_order(q_c_bus, s_sc, p)
        h_plain = supply.resonance_order(s_sc, q)
        GS = "Bus resonance (supply entered)"
        out.result("s_sc", "Short-circuit power at the bus", s_sc, "kVA", digits=4, group=GS,
                   method="S_sc = S_t/(Z%/100) (infinite upstream source)", source=SRC_SUPPLY)
        # the one resonance-screening rule: the detuned bank all steps in, and the same kvar without reactors
        orders = [h for h in supply.CHARACTERISTIC_ORDERS if h >= h_low] or [int(math.ceil(h_low))]
        try:
            screened = resonancescreen.screen_bank(u, f, s_kva, z_pct, [
                (ALL_STEPS, [(q_step, p)] * steps), (PLAIN_SAME, [(q_step, 0.0)] * steps)], orders)
        except InputError as e:  # pragma: no cover - the fields are range-checked
            raise FieldError("s_kva", str(e)) from None
        near_plain = sorted({w.harmonic for w in screened if w.label == PLAIN_SAME})
        view.show(out, [w for w in screened if w.label == ALL_STEPS])
        out.result("h_plain", "Parallel resonance without reactors (same kvar)", h_plain, "",
                   display=f"h = {fmt.sig(h_plain, 3)} ({fmt.sig(h_plain * f, 4)} Hz)"
                           + (", can reach the " + ", ".join(f"{x}{view.th(x)}" for x in near_plain) + " harmonic"
                              if near_plain else ""),
                   status="warn" if near_plain else "", group=GS,
                   method="h ≈ √(S_sc/Q); screen: " + view.rule_text(),
                   source=cite("ieee141_sc", "ieee1036", "ieee18", "c57_12_00", "practice_screen_band"))
        out.result("h_det", "Parallel resonance with the detuned bank, all steps in", h_det, "",
                   display=f"h = {fmt.sig(h_det, 3)} ({fmt.sig(h_det * f, 4)} Hz), below n = {fmt.sig(n, 3)}",
                   status="ok" if h_det < h_low else "fail", key=True, group=GS,
                   method="h = 1/√(Q_C/S_sc + p), Q_C = U²/X_C of the capacitors at the bus voltage; "
                          "fewer steps in move it up toward n, never above; reduces to √(S_sc/Q) for p = 0",
                   source=cite("circuits_resonance", "ieee1036"))
        out.notes.append("The bus plot is lossless: the positions of the peaks are meaningful, their heights are not.")

    out.figure("|Z| against harmonic order", _plot(br, n, h_low, x_s, bank.x_c_ohm, x_c_plain))
    out.link("Check the capacitor's duty with a harmonic spectrum", "cap_duty", {
        "u_rated": fmt.sig(u_rated, 6),
        "q_rated": fmt.sig(br.q_rated_kvar, 5),
        "f_rated": fmt.sig(f, 6),
        "u_bus": fmt.sig(u, 6),
        "p": fmt.sig(100 * p, 5),
    })


SHEET = Worksheet(
    id="detuned",
    title="Detuned bank",
    summary="Design a reactor–capacitor (detuned) bank: tuning order, reactor mH and current, capacitor voltage, "
            "rated voltage and kvar to order, and the branch's impedance against harmonic order.",
    fields=FIELDS,
    compute=compute,
    cautions=[cautions.SCREENING, cautions.STORED_CHARGE, cautions.ESTIMATE],
    order=25,
    essential=('u', 'f', 'q', 'steps', 'spec', 'p', 'ft', 'h_low'),
    references=[
        ref("circuits_resonance"), ref("iec61642"), ref("ieee18"), ref("ieee1036"),
    ],
)
