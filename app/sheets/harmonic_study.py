"""Harmonic study worksheet: what the bank will do to the plant's harmonics, for every step
combination, with detuned alternatives side by side."""

from __future__ import annotations

import json
import math

from pycore import capduty, harmonicbus, harmonicsources, harmonicstudy, ieee519, resonancescreen
from pycore.errors import OUT_OF_RANGE, InputError

from pycore.references import cite, ref

from .. import cautions, fmt
from .. import quantities as Q
from ..sheet import Column, Field, FieldError, Worksheet
from ..svg import xy_chart
from . import _resonance_view as view
from ._correction_harmonics import bank_type_of

SRC_MODEL = cite("dugan_harmonics", "ieee399_harmonics")
SRC_519 = ieee519.IEEE519_EDITION
SRC_SCREEN = cite("dugan", "ieee18", "c57_12_00", "practice_screen_band")
SRC_PU = ref("ieee141_sc")
MAX_STEPS = harmonicstudy.MAX_STEPS

_TYPES = [(k, v.label) for k, v in harmonicsources.TYPICAL_SPECTRA.items()]

FIELDS = [
    Q.SYSTEM_VOLTAGE.field("v_ll", "System voltage (line to line)", default="480", group="Supply and transformer",
                           note="The bus the bank connects to; the fundamental is taken at this voltage."),
    Q.SYSTEM_FREQUENCY.field("f", default="60"),
    Q.TRANSFORMER_KVA.field("tx_kva", default="1500"),
    Q.TRANSFORMER_Z.field("tx_z", default="5.75"),
    Q.TRANSFORMER_XR.field("tx_xr", default="6", required=False,
                           note="Empty: a pure reactance (no damping, the highest peaks)."),
    Q.FAULT_MVA.field("fault_mva", default="", required=False,
                      note="Empty: infinite bus (puts resonances slightly high)."),
    Q.TRANSFORMER_XR.but(label="Utility X/R ratio", help="Reactance over resistance of the utility source.")
     .field("fault_xr", default="", required=False, note="Empty: the utility source is a pure reactance."),
    Field("r_vs_h", "Resistance against frequency", kind="choice", default="constant",
          options=[("constant", "Constant (default)"), ("sqrt", "Rising as √h (skin effect)")],
          help="How transformer and utility resistance change with harmonic order; √h is a common approximation."),
    Q.DAMPING_LOAD.field("load_kw", "Resistive load", default="300", required=False, group="Loads"),
    Q.RUNNING_MOTORS.field("motor_kva", default="400", required=False),
    Field("lr_ratio", "Motor locked-rotor current ratio", default="6", min=2, max=12, suggest=["5", "6", "7"],
          help="I_LR/I_FL; 5 to 7 is usual (from memory)."),
    Field("i_load", "Maximum demand current", unit="A", default="", required=False, min=0, min_open=True, max=1e6,
          help="I_L for IEEE 519 TDD at this bus. Empty: the current of the loads declared here."),
    Field("steps", "Capacitor steps", kind="table", group="Capacitor bank", max_rows=MAX_STEPS,
          default='[["100","plain","",""],["100","plain","",""],["100","plain","",""],["100","plain","",""]]',
          help="One row per step: kvar delivered at the system voltage; plain or detuned with its detuning factor p; "
               "optional capacitor rated voltage (empty: system voltage for plain, next usual rating above U/(1 − p) "
               "+ 10 % for detuned). Every combination of steps is studied.",
          columns=[Column("kvar", "Step", unit="kvar", min=0.001, max=Q.BANK_KVAR.max),
                   Column("kind", "Type", kind="choice", options=[("plain", "plain"), ("detuned", "detuned")]),
                   Column("p", "p", unit="%", required=False, min=0, max=50),
                   Q.CAPACITOR_VOLTAGE.column("u_rated", "Rated voltage", required=False)]),
    Field("reactor_q", "Reactor quality factor", default="50", min=5, max=500,
          help="X_L/R of the detuning reactors at the fundamental (typically 30 to 100, from memory)."),
    Field("source", "Harmonic source data", kind="choice", default="typical", group="Harmonic sources",
          options=[("typical", "Typical spectrum by load type"), ("current", "Measured current spectrum"),
                   ("voltage", "Measured bus-voltage spectrum")]),
    Field("typical", "Non-linear loads", kind="table", default='[["six_pulse_choke","400"]]', max_rows=10,
          show_when={"field": "source", "in": ["typical"]},
          help="Load type and its kW; typical spectra are screening values (the ideal six-pulse 1/h is textbook).",
          columns=[Column("kind", "Load type", kind="choice", options=_TYPES),
                   Column("kw", "Power", unit="kW", min=0.001, max=1e6)]),
    Field("i_spec", "Current spectrum", kind="table", default='[["5","30"],["7","12"],["11","7"],["13","5"]]',
          max_rows=49, show_when={"field": "source", "in": ["current"]},
          help="Harmonic order (whole number 2 to 50) and level of the non-linear loads' current.",
          columns=[Column("h", "Order"), Column("level", "Level")]),
    Field("i_unit", "Current levels in", kind="choice", default="percent", show_when={"field": "source", "in": ["current"]},
          options=[("percent", "% of the fundamental"), ("amps", "Amperes")]),
    Field("i1", "Fundamental current of those loads", unit="A", default="500", min=0, min_open=True, max=1e6,
          show_when={"field": "i_unit", "in": ["percent"]}),
    Field("v_spec", "Bus-voltage spectrum", kind="table", default='[["5","2"],["7","1.2"]]', max_rows=49,
          show_when={"field": "source", "in": ["voltage"]},
          help="Harmonic order (2 to 50) and bus voltage in % of the fundamental, from a power-quality meter.",
          columns=[Column("h", "Order"), Column("level", "Level", unit="%")]),
    Field("bank_state", "Measured with", kind="choice", default="out", show_when={"field": "source", "in": ["voltage"]},
          options=[("out", "Bank out of service"), ("in", "All steps in service")],
          help="The currents are backed out through the bus impedance as it was during the measurement."),
    Field("profile", "Capacitor duty profile", kind="choice", default="ieee18", group="Checks and tolerances",
          options=[("ieee18", "IEEE Std 18 (110/120/135/135 %)"), ("iec60831", "IEC 60831-1 (1.00/1.10 U_N, 1.30 I_N)")]),
    Field("cap_lo", "Capacitance tolerance, low", unit="%", default="0", min=-20, max=0),
    Field("cap_hi", "Capacitance tolerance, high", unit="%", default="10", min=0, max=30,
          help="IEEE Std 18: 0 to +10 %; IEC 60831-1: −5 to +10 % (from memory)."),
    Field("z_tol", "Transformer impedance tolerance, ±", unit="%", default="7.5", min=0, max=25,
          help="±7.5 % of nameplate (IEEE C57.12.00, from memory)."),
    Field("band", "Band around each harmonic, ±", unit="%", default="10", min=0, max=30,
          help="Flag a resonance that can land within this relative distance of a harmonic present."),
    Field("sizing", "Sizing this study came from", kind="text", default="", required=False, group="Return to sizing",
          help="Filled in by the correction worksheet's link (its inputs); the recommendation's links return there "
               "with the bank type chosen. Empty: those links open the correction worksheet with this bus only."),
]


def _spectrum(ins, name, percent):
    rows = ins.rows(name)
    if rows is None:
        return None
    spec = {}
    for r in rows:
        n, h, v = r["_row"], r["h"], r["level"]
        lo, hi = harmonicsources.ORDER_MIN, harmonicsources.ORDER_MAX
        if h != math.floor(h) or h < lo or h > hi:
            raise FieldError(name, f"Row {n}: the harmonic order must be a whole number from {lo} to {hi} "
                                   f"(got {fmt.sig(h)}).")
        if v < 0:
            raise FieldError(name, f"Row {n}: the level cannot be negative.")
        if percent and v > 100:
            raise FieldError(name, f"Row {n}: a level in % of the fundamental must be at most 100 % (got {fmt.sig(v)} %).")
        if int(h) in spec:
            raise FieldError(name, f"Row {n}: harmonic order {int(h)} appears twice.")
        spec[int(h)] = v
    if not any(v > 0 for v in spec.values()):
        raise FieldError(name, "Enter at least one harmonic with a level above zero.")
    return spec


def _steps(ins, q_reactor):
    rows = ins.rows("steps")
    if rows is None:
        return None
    out = []
    for r in rows:
        p = 0.0
        if r["kind"] == "detuned":
            if not r["p"]:
                raise FieldError("steps", f"Row {r['_row']}: enter the detuning factor p of a detuned step (5.67, 7 or 14 %).")
            p = r["p"] / 100.0
        out.append(harmonicbus.Step(r["kvar"], p, r["u_rated"], q_reactor))
    return out


def _injection(ins, bus, v, src):
    if src == "typical":
        rows = ins.rows("typical")
        if rows is None:
            return None, 0.0
        inj = harmonicsources.combine(harmonicsources.typical_injection(r["kind"], r["kw"], v) for r in rows)
        return inj, sum(harmonicsources.fundamental_current_a(r["kw"], v) for r in rows)
    if src == "current":
        unit = ins.choice("i_unit")
        spec = _spectrum(ins, "i_spec", unit == "percent")
        i1 = ins.num("i1") if unit == "percent" else None
        if spec is None or ins.errors:
            return None, 0.0
        if unit == "percent":
            return harmonicsources.injection_from_percent(spec, i1), i1
        return spec, 0.0
    spec = _spectrum(ins, "v_spec", True)
    if spec is None or bus is None:
        return None, 0.0
    steps_in = list(range(len(bus.steps))) if ins.choice("bank_state") == "in" else []
    return harmonicsources.injection_from_voltage(bus, steps_in, spec), 0.0


def _th(h):
    return "th" if 10 <= h % 100 <= 20 else {1: "st", 2: "nd", 3: "rd"}.get(h % 10, "th")


_DUTY_WORDS = {"v_rms": "V rms", "v_peak": "V peak", "i_rms": "I rms", "kvar": "kvar"}


def _duty_text(d):
    if d is None:
        return "—"
    name, val, lim, _ = max(d.rows, key=lambda r: r[1] / r[2])
    return f"{_DUTY_WORDS[name]} {fmt.sig(val, 3)} % (max {fmt.sig(lim, 3)}), step {d.step + 1}"


def _alike(rows):
    """Rows that differ only in their first cell (equal steps give the same electrical state) as one row,
    the first label and a count of the others."""
    out, index = [], {}
    for r in rows:
        key = tuple(r[1:])
        if key in index:
            out[index[key]][1] += 1
        else:
            index[key] = len(out)
            out.append([r, 0])
    return [[r[0] + (f" (+{n} alike)" if n else "")] + r[1:] for r, n in out]


def _order_text(order):
    """What to order per step, identical steps counted: '4 × 72.7 kvar at 600 V + 0.92 mH (65.6 A)'."""
    groups: dict = {}
    for q, u_r, q_r, l_mh, i_max in order:
        text = f"{fmt.sig(q_r, 3)} kvar at {fmt.sig(u_r, 3)} V" + ("" if l_mh is None else
                                                                   f" + {fmt.sig(l_mh, 3)} mH ({fmt.sig(i_max, 3)} A)")
        groups[text] = groups.get(text, 0) + 1
    return "; ".join((f"{n} × " if n > 1 else "") + t for t, n in groups.items())


def _figure(study, worst, harmonics, band):
    bus = study.bus
    allin = tuple(range(len(bus.steps)))
    series = [{"points": harmonicbus.impedance_curve(bus, [], 1.0, 50.0, 0.1), "label": "bank out", "cls": "fp-grid",
               "dash": "6 4", "width": 1.5},
              {"points": harmonicbus.impedance_curve(bus, worst.steps_in, 1.0, 50.0, 0.1),
               "label": f"worst: {worst.label}", "cls": "fp-s1"}]
    if worst.steps_in != allin:
        series.append({"points": harmonicbus.impedance_curve(bus, allin, 1.0, 50.0, 0.1), "label": "all steps in",
                       "cls": "fp-s2"})
    return xy_chart("Bus impedance against harmonic order", series, x_label="Harmonic order h", y_label="|Z| (Ω)",
                    log_y=True, markers=[{"x": h, "label": str(h), "cls": "fp-mark"} for h in harmonics],
                    bands=[{"x0": h * (1 - band), "x1": h * (1 + band)} for h in harmonics] if band > 0 else [],
                    desc="Impedance magnitude at the bus (log scale) against harmonic order 1 to 50, with the bank "
                         f"out (dashed), the worst combination ({worst.label}) and all steps in. Harmonics present "
                         f"are marked ({', '.join(str(h) for h in harmonics)}) with their screening bands.",
                    height=380)


def compute(ins, out):
    v, f = ins.num("v_ll"), ins.num("f")
    kva, zp, xr = ins.num("tx_kva"), ins.num("tx_z"), ins.num("tx_xr")
    fault, fxr, rvh = ins.num("fault_mva"), ins.num("fault_xr"), ins.choice("r_vs_h")
    load, motors, lr = ins.num("load_kw"), ins.num("motor_kva"), ins.num("lr_ratio")
    i_load, q_r = ins.num("i_load"), ins.num("reactor_q")
    profile, src = ins.choice("profile"), ins.choice("source")
    cap_lo, cap_hi, z_tol, band = ins.num("cap_lo"), ins.num("cap_hi"), ins.num("z_tol"), ins.num("band")
    steps = _steps(ins, q_r if q_r is not None else harmonicbus.REACTOR_QUALITY_DEFAULT)
    if ins.errors or steps is None:
        return
    try:
        bus = harmonicbus.build_bus(v, f, kva, zp, xr, None if fault is None else fault * 1000.0, fxr, load, motors,
                                    lr, steps, rvh)
    except InputError as e:
        raise FieldError("steps", str(e)) from None
    if sum(s.q_kvar for s in steps) >= bus.s_sc_kva:
        raise FieldError("steps", "The bank is as large as the bus short-circuit level: check the step sizes and units.")
    inj, i1_sources = _injection(ins, bus, v, src)
    if ins.errors or inj is None:
        return
    present = harmonicsources.screening_orders({h: i for h, i in inj.items() if i > 0}, 50)
    for i, s in enumerate(steps, 1):
        h_on = harmonicstudy.tuned_onto(s.p, present)
        if h_on is not None:
            raise FieldError("steps", f"Row {i}: p = {fmt.sig(s.p * 100, 3)} % tunes the step to order "
                                      f"{fmt.sig(1 / math.sqrt(s.p), 3)}, onto the {h_on}{_th(h_on)} harmonic present: "
                                      "that is a filter, not a detuned step. Use 5.67, 7 or 14 %.")
    if i_load is None:
        i_load = ((load or 0.0) * 1e3 / (math.sqrt(3) * v) + (motors or 0.0) * 1e3 / (math.sqrt(3) * v) + i1_sources)
        if not i_load > 0:
            raise FieldError("i_load", "Enter the maximum demand current: no load declared here gives it.")
    tol = resonancescreen.Tolerances(cap_lo / 100, cap_hi / 100, -z_tol / 100, z_tol / 100)
    back = _sizing(ins, v, f, kva, zp, fault)
    try:
        study = harmonicstudy.run_study(bus, inj, i_load, profile, tol, band / 100)
        options = harmonicstudy.recommend(study)
        _results(out, study, options, band / 100, profile, back)
    except InputError as e:
        if str(e) != OUT_OF_RANGE:
            raise FieldError("steps", str(e)) from None
        # an undamped resonance exactly on a harmonic: infinite voltages
        raise FieldError("tx_xr" if xr is None else "load_kw",
                         "A resonance lands exactly on a harmonic present with nothing to damp it, so the voltages "
                         "would be infinite: enter the transformer X/R (typically 5 to 8) or a resistive load.") from None


def _sizing(ins, v, f, kva, zp, fault) -> dict:
    """The correction inputs to return to (from the link that opened this study), or this bus alone."""
    text = ins.text("sizing").strip()
    if not text:
        return {"v_ll": fmt.sig(v, 6), "f": fmt.sig(f, 6), "tx_kva": fmt.sig(kva, 6), "tx_z": fmt.sig(zp, 6),
                "fault_mva": "" if fault is None else fmt.sig(fault, 6)}
    try:
        back = json.loads(text)
    except ValueError:
        back = None
    if not isinstance(back, dict) or not all(isinstance(k, str) and isinstance(x, str) for k, x in back.items()):
        raise FieldError("sizing", "This is not a set of correction inputs (it is filled in by the correction "
                                   "worksheet's link): clear it.")
    return back


def _results(out, study, options, band, profile, back):
    bus, worst = study.bus, study.combos[0]
    G = f"Worst combination: {worst.label} ({fmt.sig(worst.kvar, 4)} kvar)"
    res = worst.resonances
    h_res = min(res, key=lambda h: min((abs(h / H - 1) for H in study.harmonics), default=0)) if res else None
    out.result("worst", "Worst step combination", None, display=f"{worst.label}, {fmt.sig(worst.kvar, 4)} kvar", key=True,
               group=G, status="fail" if worst.severity > 1 else ("warn" if worst.warnings else "ok"),
               method="every combination studied; ranked by failed checks, screening warnings, then the largest "
                      "value/limit of any check", source=SRC_MODEL)
    out.result("h_res", "Resonance order", h_res, "", display="none below the 100th" if h_res is None else
               f"{h_res:.2f} ({fmt.si(h_res * bus.f_hz, 'Hz', 3)})", key=True, group=G,
               status="warn" if worst.warnings else "ok", method="zero of the lossless bus susceptance (h = √(S_sc/Q) "
               "for a plain bank); the one nearest a harmonic present", source=SRC_SCREEN)
    c = worst.check519
    out.result("thd_v", "Voltage THD", c.thd_v, "%", digits=3, key=True, group=G, status="ok" if c.ok_voltage else "fail",
               display=f"{fmt.sig(c.thd_v, 3)} % (limit {fmt.sig(c.v_thd_limit)} %); largest {fmt.sig(c.v_worst, 3)} % "
                       f"at the {c.v_worst_h}{_th(c.v_worst_h)} (limit {fmt.sig(c.v_ind_limit)} %)",
               method="THD_V = √ΣV_h², V_h = I_h·|Z_bus(h)|", source=SRC_519)
    wd = worst.worst_duty
    pname = capduty.DUTY_PROFILES[profile][0]
    out.result("duty", f"Worst capacitor duty ({pname})", None if wd is None else 100 * wd.ratio, "%",
               display=_duty_text(wd), key=True, group=G,
               status="" if wd is None else {"ok": "ok", "short": "warn", "fail": "fail"}[wd.status],
               method="V_rms = √ΣV_h², V_peak = ΣV_h, I_rms = √ΣI_h², Q = ΣV_h·I_h per unit of rating",
               source=capduty.DUTY_PROFILES[profile][3])
    out.result("tdd", "Current distortion (TDD) into the supply", c.tdd, "%", digits=3, group=G, key=True,
               status="ok" if c.ok_current else "fail", display=f"{fmt.sig(c.tdd, 3)} % (limit {fmt.sig(c.tdd_limit)} %, "
               f"I_SC/I_L = {fmt.sig(study.isc_il, 3)})", method="TDD = √ΣI_h²/I_L, I_h the supply's share of the "
               "injected current", source=SRC_519)
    out.result("amp", "Largest amplification", worst.amplification, "", digits=3, group=G,
               display=f"× {fmt.sig(worst.amplification, 3)}", method="max |Z_bus(h)| with / without the bank at the "
               "harmonics present", source=SRC_MODEL)
    out.result("s_sc", "Short-circuit level at the bus", bus.s_sc_kva, "kVA", digits=4, group="Supply model",
               method="S_sc = V²/|Z_utility + Z_transformer|", source=SRC_PU)
    rows = []
    for cb in study.combos:
        k = cb.check519
        rows.append([cb.label, fmt.sig(cb.kvar, 4), ", ".join(f"{h:.2f}" for h in cb.resonances) or "—",
                     fmt.sig(k.thd_v, 3), f"{fmt.sig(k.v_worst, 3)} ({k.v_worst_h})", _duty_text(cb.worst_duty),
                     "ok" if k.ok_voltage else "over", "ok" if k.ok_current else "over",
                     ", ".join(f"{w.harmonic}{_th(w.harmonic)}" for w in cb.warnings) or "clear"])
    rows = _alike(rows)
    out.table("Every step combination, worst first", ["Steps in", "kvar", "Resonance orders", "THD_V %",
              "Largest V_h % (order)", "Worst duty", "IEEE 519 voltage", "IEEE 519 current", "Resonance screen"], rows,
              note=f"Bank out: THD_V {fmt.sig(study.bank_out.thd_v, 3)} %. Screen: ±{fmt.sig(band * 100)} % around "
                   f"{', '.join(str(h) for h in study.harmonics)}.")
    out.table(f"Steps in the worst combination ({pname})", ["Step", "kvar", "V rms %", "V peak %", "I rms %", "kvar %",
              "RMS current A", "Status"],
              [[str(d.step + 1), fmt.sig(bus.steps[d.step].q_kvar, 4), fmt.sig(d.v_rms, 4), fmt.sig(d.v_peak, 4),
                fmt.sig(d.i_rms, 4), fmt.sig(d.kvar, 4), fmt.sig(d.i_rms_a, 4),
                {"ok": "ok", "short": "8 h in 24 h only", "fail": "over"}[d.status]] for d in worst.duties],
              note="RMS current is also the reactor's current for a detuned step (its thermal rating).")
    sol = harmonicbus.solve(bus, worst.steps_in, study.injection)
    out.table("Harmonic voltages", ["Order", "Injected A", "V_h % bank out", f"V_h % {worst.label}"]
              + [f"Step {k + 1} A" for k in worst.steps_in],
              [[str(h), fmt.sig(study.injection[h], 3), fmt.sig(study.bank_out.v_pct[h], 3), fmt.sig(worst.v_pct[h], 3)]
               + [fmt.sig(abs(sol.steps[k][h]), 3) for k in worst.steps_in]
               for h in sorted(study.injection) if study.injection[h] > 0],
              note="Step currents are each step's branch current at that order (through its reactor when detuned).")
    _recommendation(out, options, back)
    view.show(out, [w for cb in study.combos for w in cb.warnings])  # one per distinct state
    out.figure("Bus impedance against harmonic order", _figure(study, worst, study.harmonics, band))
    out.notes.append("Assumptions: per-phase model at the system voltage; harmonic currents of all sources add in phase "
                     "(the worst case); capacitor losses neglected; the bus is taken as the point of common coupling.")
    out.caution(cautions.SCREENING)


def _recommendation(out, options, back):
    if len(options) == 1:
        if options[0].study.amplifies and all(s.p > 0 for s in options[0].study.bus.steps):
            out.notes.append("The bank is already detuned; see the table for its duties.")
        return
    rows = []
    for o in options:
        w = o.study.combos[0]
        order = _order_text(o.order)
        rows.append([o.label, fmt.sig(max(c.thd_v for c in o.study.combos), 3),
                     fmt.sig(max(max(c.v_pct.values()) for c in o.study.combos), 3), _duty_text(w.worst_duty),
                     str(sum(len(c.warnings) for c in o.study.combos)), order])
    out.table("Recommendation: plain and detuned side by side", ["Design", "Worst THD_V %", "Worst V_h %", "Worst duty",
              "Screen warnings", "To order per step: capacitor rating + reactor per phase (its rms A)"], rows,
              note="Each option re-studied over every combination with the same kvar delivered at the system voltage; "
                   "detuned capacitors rated at the next usual voltage above U/(1 − p) + 10 %, kvar Q·(1 − p)·(U_R/U)².")
    out.warn("The plain bank amplifies harmonics present: detuned designs are compared in the recommendation table.")
    for o in options[1:]:
        kind = bank_type_of(o.p_percent / 100)
        out.link(f"Order it detuned at {fmt.sig(o.p_percent)} % (correction worksheet)"
                 + ("" if "basis" in back else ": enter the load there"), "correction",
                 # a detuned bank's capacitors are rated at the system frequency
                 {**back, "bank_type": kind, "cap_f": back.get("f", "")})


SHEET = Worksheet(
    id="harmonic_study",
    title="Harmonic study",
    summary="What the bank will do to the plant's harmonics: every step combination, harmonic voltages, capacitor "
            "duty, IEEE 519 checks, resonance screening, and detuned options side by side.",
    fields=FIELDS,
    compute=compute,
    cautions=[cautions.SCREENING, cautions.ESTIMATE],
    order=22,
    essential=('v_ll', 'f', 'tx_kva', 'tx_z', 'steps', 'source', 'typical', 'i_spec', 'i_unit', 'i1', 'v_spec', 'bank_state'),
    references=[
        ref("dugan_harmonics"), ref("ieee399_harmonics"), ref("ieee18"), ref("iec60831_duty"), ref("ieee519"),
        ref("ieee519_t2"), ref("c57_12_00"), ref("spectra_typical"),
    ],
)
