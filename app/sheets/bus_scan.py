"""Bus resonance scan: will this capacitor bank resonate with the supply transformer?

|Z| seen at the bus against harmonic order 1–50 for each cumulative step combination,
the parallel-resonance order and frequency of each from a fine search for the peak, the
√(S_sc/Q) estimate beside it, and a warning where a resonance sits near a harmonic the
plant's loads produce.
"""

from __future__ import annotations

import math

from pycore import banksteps, busscan, resonancescreen, supply
from pycore.errors import InputError
from pycore.references import cite, ref

from .. import cautions, fmt
from .. import quantities as Q
from ..sheet import Field, FieldError, Worksheet
from ..svg import xy_chart
from . import _resonance_view as view

SRC_SCAN = cite("circuits_resonance", "ieee141_sc")
SRC_EST = cite("ieee1036", "dugan")
SRC_PU = ref("ieee141_sc")

# the most steps a controller switches, plus the fixed capacitors already on the bus as a first step
# (as the correction worksheet's link sends them)
MAX_STEPS = banksteps.MAX_STEPS + 1

FIELDS = [
    Q.SYSTEM_VOLTAGE.field("v_ll", "System voltage (line to line)", default="400", group="Supply"),
    Q.SYSTEM_FREQUENCY.field("f", default="50"),
    Q.TRANSFORMER_KVA.field("tx_kva", default="1250"),
    Q.TRANSFORMER_Z.field("tx_z", default="6"),
    Q.TRANSFORMER_XR.field("x_r", default="5", required=False,
                           note="Optional. Empty: the transformer is taken as a pure reactance (no damping, the highest peaks)."),
    Q.FAULT_MVA.field("fault_mva", default="250", required=False,
                      note="Optional. Empty: infinite bus (puts the resonance slightly high)."),
    Q.DAMPING_LOAD.field("load_kw", default="150", required=False, group="Load"),
    Field(
        "single_phase",
        "Single-phase electronic loads",
        kind="choice",
        default="no",
        options=[
            ("no", "No: mainly three-phase loads (drives, rectifiers)"),
            ("yes", "Yes: many single-phase loads (computers, LED lighting)"),
        ],
        help="Single-phase rectifier loads add the 3rd harmonic to the harmonics checked.",
    ),
    Q.BANK_KVAR.field("steps", "Capacitor steps", kind="list", default="50, 50, 100, 100, 100", group="Capacitor bank",
                      note="Step sizes in the order the controller switches them in (comma separated). "
                           "Each combination 1, 1+2, 1+2+3… is scanned."),
    *view.tolerance_fields(),
]


def _label(i: int) -> str:
    return "step 1" if i == 1 else f"steps 1–{i}"


def _figure(model, peaks, harmonics, band) -> str:
    series = [{"points": busscan.supply_scan(model), "label": "no bank", "cls": "fp-grid", "width": 1.5, "dash": "6 4"}]
    dots = []
    for i, p in enumerate(peaks, 1):
        cls = f"fp-s{(i - 1) % 6 + 1}"
        series.append({"points": p.points, "label": f"{_label(i)}: {fmt.sig(p.q_kvar, 4)} kvar", "cls": cls})
        if p.order is not None and p.z_peak is not None and math.isfinite(p.z_peak):
            dots.append({"x": p.order, "y": p.z_peak, "cls": cls + "-fill"})
    markers = [{"x": h, "label": str(h), "cls": "fp-mark"} for h in harmonics]
    bands = [{"x0": h * (1 - band), "x1": h * (1 + band), "cls": "fp-band"} for h in harmonics] if band > 0 else []
    found = [p for p in peaks if p.order is not None]
    desc = (
        "Impedance magnitude seen at the bus (log scale) against harmonic order 1 to 50, one line per step "
        "combination and a dashed line for the supply alone. Harmonics present are marked "
        + ", ".join(str(h) for h in harmonics)
        + "; resonance peaks are dotted"
        + (": " + ", ".join(f"{fmt.sig(p.q_kvar, 4)} kvar at order {fmt.sig(p.order, 3)}" for p in found) if found else "")
        + "."
    )
    return xy_chart(
        "Bus impedance against harmonic order",
        series,
        x_label="Harmonic order h (× fundamental)",
        y_label="|Z| (Ω)",
        log_y=True,
        markers=markers,
        bands=bands,
        dots=dots,
        desc=desc,
        height=400,
    )


def compute(ins, out):
    v = ins.num("v_ll")
    f = ins.num("f")
    kva = ins.num("tx_kva")
    zp = ins.num("tx_z")
    x_r = ins.num("x_r")
    fault = ins.num("fault_mva")
    load = ins.num("load_kw")
    sp = ins.choice("single_phase")
    steps = ins.numbers("steps")
    screen_tol = view.read_tolerances(ins)
    if ins.errors or screen_tol is None:
        return
    if len(steps) > MAX_STEPS:
        raise FieldError("steps", f"At most {MAX_STEPS} steps; combine small ones or scan the bank in two parts.")
    tol, band = screen_tol
    try:
        model = busscan.bus_model(v, f, kva, zp, x_r, None if fault is None else fault * 1000.0, load)
        peaks = busscan.scan(model, steps)
    except InputError as e:
        raise FieldError("steps", str(e)) from None
    except ArithmeticError:
        raise InputError("These values are out of range for a calculation; check the units.") from None
    total = peaks[-1].q_kvar
    if not supply.bank_fits_bus(total, model.s_sc_kva):
        raise FieldError("steps", f"The bank ({fmt.sig(total)} kvar) is as large as the bus short-circuit level "
                                  f"({fmt.sig(model.s_sc_kva)} kVA): check the step sizes and their unit (kvar).")

    harmonics = tuple(sorted(set(supply.CHARACTERISTIC_ORDERS) | ({supply.SINGLE_PHASE_ORDER} if sp == "yes" else set())))
    h_words = ", ".join(str(h) for h in harmonics)

    # the one resonance-screening rule, on each cumulative combination
    try:
        warnings = resonancescreen.screen_bank(
            v, f, kva, zp, [(_label(i), [(q, 0.0) for q in steps[:i]]) for i in range(1, len(steps) + 1)], harmonics,
            None if fault is None else fault * 1000.0, tolerances=tol, band=band)
    except InputError as e:
        raise FieldError("cap_lo", str(e)) from None
    hits = view.by_label(warnings)
    # headline: the full bank
    full = peaks[-1]
    full_near = hits.get(_label(len(peaks)))
    near_count = 0
    rows = []
    for i, p in enumerate(peaks, 1):
        near = hits.get(_label(i))
        if p.order is None:
            order_txt = "below 1" if p.where == "below" else "above 50"
            f_txt = "—"
            z_txt = "—"
            mag_txt = "—"
        else:
            order_txt = f"{p.order:.2f}"
            f_txt = fmt.si(p.freq_hz, "Hz", 4)
            z_txt = "∞ (undamped)" if not math.isfinite(p.z_peak) else fmt.si(p.z_peak, "Ω", 3)
            mag_txt = "∞" if not math.isfinite(p.z_peak) else f"× {fmt.sig(p.z_peak / p.z_supply, 3)}"
        if near:
            near_count += 1
        rows.append([
            _label(i),
            fmt.sig(p.q_kvar, 4),
            order_txt,
            f_txt,
            f"{p.estimate:.2f}",
            z_txt,
            mag_txt,
            "can reach the " + ", ".join(f"{h}{_th(h)}" for h in near) if near else "clear",
        ])

    g_full = "Full bank"
    if full.order is None:
        out.result("h_full", "Resonance order, all steps in", None, "",
                   display="below the fundamental" if full.where == "below" else "above the 50th",
                   key=True, method="fine search for the |Z| peak, orders 1–50", source=SRC_SCAN, group=g_full)
    else:
        st = "warn" if full_near else "ok"
        out.result("h_full", "Resonance order, all steps in", full.order, "", display=f"{full.order:.2f}", key=True, status=st,
                   method="order h of the |Z| peak of Z_bus = 1/(1/(R_s + jhX_s) + 1/R_load + jhQ/V²), fine search",
                   source=SRC_SCAN, group=g_full)
        out.result("f_full", "Resonant frequency, all steps in", full.freq_hz, "Hz", si=True, digits=4, key=True, status=st,
                   method="f = h × fundamental", source=SRC_SCAN, group=g_full)
    out.result("est_full", "Estimate √(S_sc/Q), all steps in", full.estimate, "", display=f"{full.estimate:.2f}",
               method="h ≈ √(S_sc/Q_cap), resistance and load neglected", source=SRC_EST, group=g_full)
    out.result("near_count", "Combinations near a harmonic present", near_count, "",
               display=f"{near_count} of {len(peaks)} (harmonics {h_words}, ±{fmt.sig(100 * band)} %)",
               status="warn" if near_count else "ok", key=True,
               method="the resonance screen: " + view.rule_text(band, tol),
               source=cite("ieee519", "ieee18", "c57_12_00", "practice_screen_band"),
               group=g_full)
    out.result("v_rise", "Voltage rise, all steps in", supply.voltage_rise_percent(total, model.s_sc_kva), "%", digits=3,
               method="ΔV ≈ 100·Q/S_sc", source=ref("practice"), group=g_full)

    g_sup = "Supply model"
    out.result("s_sc", "Short-circuit level at the bus", model.s_sc_kva, "kVA", digits=4,
               method="S_sc = 1/(Z%/(100·S_t) + 1/S_up)", source=SRC_PU, group=g_sup)
    i_sc = model.s_sc_kva * 1000.0 / (math.sqrt(3.0) * v)
    out.result("i_sc", "Short-circuit current (symmetrical)", i_sc, "A", si=True, digits=3,
               method="I_sc = S_sc/(√3·V)", source=SRC_PU, group=g_sup)
    out.result("z_src", "Supply impedance per phase at the fundamental", None, "Ω",
               display=fmt.complex_rect(complex(model.r_src * 1e3, model.x_src * 1e3), "mΩ"),
               method="Z = (Z%/100)·V²/S_t, R = Z/√(1+(X/R)²); upstream X = V²/S_up", source=SRC_PU, group=g_sup)
    if model.r_load is not None:
        out.result("r_load", "Load resistance per phase", model.r_load, "Ω", si=True,
                   method="R = V²/P (wye equivalent)", source=SRC_PU, group=g_sup)

    out.table(
        "Resonance of each step combination",
        ["Steps in", "Bank kvar", "Resonance order", "Frequency", "√(S_sc/Q)", "Peak |Z|", "Peak ÷ supply alone", "Nearest harmonic"],
        rows,
        note=f"Harmonics checked: {h_words}; screen band ±{fmt.sig(100 * band)} % with the capacitance and transformer "
        "impedance tolerances (resonance columns at nominal values). Peak ÷ supply alone shows how much the "
        "bank amplifies the bus impedance at its resonance.",
    )
    if total > kva:
        out.warn(f"The bank ({fmt.sig(total)} kvar) is larger than the transformer ({fmt.sig(kva)} kVA): check the step sizes.")
    if x_r is None and model.r_load is None:
        out.notes.append("No X/R and no load entered: the circuit is undamped, so the peaks are infinite in theory; "
                         "real peaks are finite but still dangerous.")
    if sp == "yes":
        out.notes.append("3rd harmonic currents of single-phase loads are mostly zero-sequence; how much reaches the bank "
                         "depends on the transformer and bank connections. The check here treats them as present.")
    out.notes.append("Motors and drives are not in the model; they lower the inductance seen from the bus and move "
                     "each resonance a little higher.")
    view.show(out, warnings)
    out.figure("Bus impedance against harmonic order", _figure(model, peaks, harmonics, band))
    out.caution(cautions.SCREENING)


def _th(h) -> str:
    if h is None:
        return ""
    if 10 <= h % 100 <= 20:
        return "th"
    return {1: "st", 2: "nd", 3: "rd"}.get(h % 10, "th")


SHEET = Worksheet(
    id="bus_scan",
    title="Bank resonance scan",
    summary="Will the capacitor bank resonate with the transformer? |Z| at the bus against harmonic order for each "
    "step combination, resonance order and frequency, and warnings near the harmonics your loads make.",
    fields=FIELDS,
    compute=compute,
    cautions=[cautions.SCREENING, cautions.ESTIMATE],
    order=20,
    essential=('v_ll', 'f', 'tx_kva', 'tx_z', 'steps'),
    references=[
        ref("ieee1036"), ref("dugan"), ref("ieee141_sc"), ref("ieee519"),
    ],
)
