"""Bank health worksheet: nameplate plus field readings → per-phase capacitance, % of expected,
verdict per phase against a tolerance band, real kvar at system voltage and phase imbalance."""

from __future__ import annotations

import math

from pycore import bankhealth as bh
from pycore import healthverdict as hv
from pycore.capacitor import IEEE18_VOLTAGE
from pycore.errors import InputError
from pycore.references import SEPARATOR, cite, ref

from .. import cautions, fmt
from .. import quantities as Q
from ..sheet import Field, FieldError, Worksheet
from ..svg import Svg

SRC_CIRCUIT = ref("circuits_three_phase")
SRC_PRACTICE = ref("practice")


_PAIR_FIELDS = ("m12", "m23", "m31")
_PHASE_FIELDS = ("c1", "c2", "c3")
_CURRENT_FIELDS = ("i1", "i2", "i3")

FIELDS = [
    Q.CAPACITOR_KVAR.field("q_rated", "Rated output", default="50", group="Nameplate",
                           note="The total for the bank (or the three-phase unit)."),
    Q.CAPACITOR_VOLTAGE.field("v_rated", "Rated voltage", default="400", note="Type 13.8 kV for a medium-voltage bank."),
    Q.CAPACITOR_FREQUENCY.field("f_rated", default="50"),
    Field("connection", "Connection", kind="choice", default="delta",
          options=[("delta", "Delta"), ("wye", "Wye, star point floating"), ("wye_n", "Wye, star point to neutral or earth")],
          help="Most low-voltage banks and three-phase cans are delta inside. Wye banks are usual at medium voltage."),
    Field("mode", "What you measured", kind="choice", default="between", group="Measurements",
          options=[("between", "Capacitance between terminals (third one floating)"),
                   ("phase", "Capacitance of each phase on its own"),
                   ("current", "Line currents with the bank in service")],
          help="A capacitance meter across two terminals of a three-phase unit reads one element in parallel with the "
               "other two in series; the sheet converts the three readings to per-phase values."),
    Field("m12", "C between L1 and L2", unit="µF", default="482.7", min=0, min_open=True, max=1e9,
          show_when={"field": "mode", "in": ["between"]},
          help="Meter across L1 and L2, L3 floating. Type nF or µF as the meter shows it."),
    Field("m23", "C between L2 and L3", unit="µF", default="481.1", min=0, min_open=True, max=1e9,
          show_when={"field": "mode", "in": ["between"]}, help="Meter across L2 and L3, L1 floating."),
    Field("m31", "C between L3 and L1", unit="µF", default="454.0", min=0, min_open=True, max=1e9,
          show_when={"field": "mode", "in": ["between"]}, help="Meter across L3 and L1, L2 floating."),
    Field("c1", "C of phase 1", unit="µF", default="329", min=0, min_open=True, max=1e9,
          show_when={"field": "mode", "in": ["phase"]},
          help="Delta: the element between L1 and L2. Wye: L1 to the star point. For several cans per phase, their sum."),
    Field("c2", "C of phase 2", unit="µF", default="327", min=0, min_open=True, max=1e9,
          show_when={"field": "mode", "in": ["phase"]}, help="Delta: the element between L2 and L3. Wye: L2 to the star point."),
    Field("c3", "C of phase 3", unit="µF", default="290", min=0, min_open=True, max=1e9,
          show_when={"field": "mode", "in": ["phase"]}, help="Delta: the element between L3 and L1. Wye: L3 to the star point."),
    Field("i1", "Current in L1", unit="A", default="68.1", min=0, min_open=True, max=1e6,
          show_when={"field": "mode", "in": ["current"]},
          help="True-rms clamp on the line conductor to the bank, bank fully switched in."),
    Field("i2", "Current in L2", unit="A", default="72.0", min=0, min_open=True, max=1e6,
          show_when={"field": "mode", "in": ["current"]}),
    Field("i3", "Current in L3", unit="A", default="67.9", min=0, min_open=True, max=1e6,
          show_when={"field": "mode", "in": ["current"]}),
    Q.MEASURED_VOLTAGE.field("v_meas", "Voltage while measuring", default="405", show_when={"field": "mode", "in": ["current"]},
                             note="At the bank at the time of the current readings (average of the three)."),
    Q.SYSTEM_VOLTAGE.field("v_sys", "System voltage", default="", required=False, group="At the site",
                           placeholder="same as rated", note="The bank's real kvar is worked out at it. Blank: the rated voltage."),
    Q.SYSTEM_FREQUENCY.field("f_sys", "System frequency", default="", required=False, placeholder="same as rated",
                             note="Blank: the rated frequency."),
    Field("band", "Tolerance band", kind="choice", default="iec60831", group="Verdict",
          options=[(k, b.label) for k, b in bh.BANDS.items()] + [("custom", "My own limits")],
          help="The as-made capacitance tolerance of the standard the bank was built to. IEC 60831-1 for "
               "self-healing units up to 1000 V; IEEE Std 18 for North American units."),
    Field("band_lo", "Lowest acceptable", unit="%", default="-8", min=-99, max=100,
          show_when={"field": "band", "in": ["custom"]},
          help="Deviation from rated capacitance, e.g. −8 for a maker's replacement limit of 8 % loss."),
    Field("band_hi", "Highest acceptable", unit="%", default="10", min=-99, max=200,
          show_when={"field": "band", "in": ["custom"]}),
    Field("meter_acc", "Meter accuracy (± % of reading)", unit="%", default=fmt.sig(hv.DEFAULT_METER_ACCURACY_PERCENT),
          min=0, max=19,
          help="From the meter's data sheet (capacitance meters are typically within 1–2 %; for line currents, the clamp's "
               "accuracy). A reading that could be inside the band given the meter is not condemned."),
    Field("maker_limit", "Maker's replacement limit (optional)", unit="%", default="", required=False,
          min=-99, max=0, max_open=True,
          help=f"The capacitance loss at which the capacitor maker says to replace the unit, e.g. −5. Blank: "
               f"{fmt.sig(hv.REPLACE_LOSS_PERCENT)} % loss (common practice)."),
]

_STATUS = {"tolerance": "ok", "drifted": "warn", "replace": "fail"}


def _verdict_source(pv, band, maker) -> str:
    """The references behind a phase verdict: the band, the maker's limit or common practice, the meter."""
    if pv.direction == "open":
        return ref("practice")
    if pv.state == "tolerance":
        return SEPARATOR.join([band.source, ref("practice_meter")])
    limit = ref("input") if maker is not None else ref("practice_replace")
    return SEPARATOR.join([band.source, limit, ref("practice_meter")]) if pv.state == "drifted" else \
        SEPARATOR.join([limit, ref("practice_meter")])


def _verdict_display(pv) -> str:
    if pv.direction == "open":
        return f"{bh.VERDICT_WORDS['open']}: {hv.STATE_WORDS['replace'].lower()}"
    word = hv.STATE_WORDS[pv.state]
    return word + {"low": " (low)", "high": " (high)"}.get(pv.direction, "")


def _reading(ins, name: str, what: str):
    """Read one of the three per-phase inputs with a message that says which phase is missing."""
    if not ins.text(name).strip():
        ins.fail(name, f"Missing reading: enter {what}. All three phases are needed to resolve the bank.")
        return None
    return ins.num(name)


def _signed(x: float) -> str:
    return ("+" if x > 0 else "") + fmt.sig(x, 3)


def _ratio_words(ratio: float) -> str:
    """'999× the' for large ratios, '260 % of the' otherwise."""
    return f"{fmt.sig(ratio, 3)}× the" if ratio >= 10 else f"{fmt.sig(100 * ratio, 3)} % of the"


def _check_absurd(ins, names, values, expected_value, unit_label, what, hint):
    """Put a message on every field whose value is far above what the nameplate allows."""
    for name, v in zip(names, values):
        if v is None:
            continue
        ratio = v / expected_value
        if ratio > bh.ABSURD_RATIO:
            ins.fail(name, f"This is {_ratio_words(ratio)} {unit_label(expected_value)} {what}: "
                           f"{hint}")


def _bars(names, percents, verdicts, band):
    """Horizontal bars: each phase as % of expected, with the tolerance band shaded."""
    w, row, top, left, right = 400, 46, 34, 84, 64
    h = top + row * len(names) + 40
    lo_pct, hi_pct = 100 + band.lo, 100 + band.hi
    finite = [p for p in percents if math.isfinite(p)]
    x_max = max([hi_pct + 5, 120] + [p + 5 for p in finite])
    x_min = 0.0
    pw = w - left - right

    def px(v):
        return left + (min(max(v, x_min), x_max) - x_min) / (x_max - x_min) * pw

    desc = "; ".join(f"{n}: {fmt.sig(p, 3)} % of expected, {hv.STATE_WORDS[v].lower()}" for n, p, v in zip(names, percents, verdicts))
    svg = Svg(w, h, "Each phase as % of expected", desc + f". Band {fmt.sig(lo_pct, 3)} % to {fmt.sig(hi_pct, 3)} %.")
    svg.rect(0, 0, w, h, "fp-bg")
    svg.text(left, 20, "Capacitance, % of expected", size=13, weight="600")
    svg.rect(px(lo_pct), top - 6, px(hi_pct) - px(lo_pct), row * len(names) + 6, "fp-band")
    for i, (n, p, v) in enumerate(zip(names, percents, verdicts)):
        y = top + i * row
        svg.text(left - 8, y + 22, n, anchor="end", size=13)
        svg.rect(left, y + 8, max(1.0, px(p) - left), 20, "fp-s1-fill" if v == "tolerance" else "fp-s3-fill")
        svg.text(px(p) + 6, y + 22, f"{fmt.sig(p, 3)} %", size=12)
    y_axis = top + row * len(names)
    svg.line(left, y_axis, left + pw, y_axis, "fp-axis")
    svg.line(left, top - 6, left, y_axis, "fp-axis")
    for t in (0, 50, 100):
        svg.line(px(t), y_axis, px(t), y_axis + 5, "fp-axis")
        svg.text(px(t), y_axis + 18, f"{t} %", anchor="middle", size=11)
    svg.line(px(100), top - 6, px(100), y_axis, "fp-mark", dash="4 3", width=1.5)
    svg.text(left, h - 6, f"Shaded: the band, {_signed(band.lo)} % to {_signed(band.hi)} %", size=11)
    return str(svg)


def compute(ins, out):
    q_rated = ins.num("q_rated")
    v_rated = ins.num("v_rated")
    f_rated = ins.num("f_rated")
    conn = ins.choice("connection")
    mode = ins.choice("mode")
    if mode == "between":
        raw = [_reading(ins, n, f"the reading between {p}") for n, p in zip(_PAIR_FIELDS, bh.TERMINAL_PAIRS)]
        raw = [None if v is None else v * 1e-6 for v in raw]
    elif mode == "phase":
        raw = [_reading(ins, n, f"the capacitance of phase {k}") for k, n in enumerate(_PHASE_FIELDS, 1)]
        raw = [None if v is None else v * 1e-6 for v in raw]
    else:
        raw = [_reading(ins, n, f"the current in L{k}") for k, n in enumerate(_CURRENT_FIELDS, 1)]
    v_meas = ins.num("v_meas") if mode == "current" else None
    v_sys_in = ins.num("v_sys")
    f_sys_in = ins.num("f_sys")
    band_key = ins.choice("band")
    meter_acc = ins.num("meter_acc")
    maker = ins.num("maker_limit")
    lo = hi = None
    if band_key == "custom":
        lo, hi = ins.num("band_lo"), ins.num("band_hi")
    if ins.errors:
        return

    if band_key == "custom":
        if lo >= hi:
            raise FieldError("band_hi", "The highest acceptable deviation must be above the lowest.")
        band = bh.custom_band(lo, hi)
    else:
        band = bh.BANDS[band_key]
    v_sys = v_rated if v_sys_in is None else v_sys_in
    f_sys = f_rated if f_sys_in is None else f_sys_in
    for name, v, basis in (("v_sys", v_sys_in, "system"), ("v_meas", v_meas, "measured")):
        if v is None:
            continue
        r = v / v_rated
        if not bh.SYSTEM_VOLTAGE_RATIO[0] <= r <= bh.SYSTEM_VOLTAGE_RATIO[1]:
            raise FieldError(name, f"The {basis} voltage is {_ratio_words(r)} rated {fmt.sig(v_rated)} V: "
                                   "check V against kV, and that both are line-to-line.")
        if name == "v_meas" and not bh.MEASURED_VOLTAGE_RATIO[0] <= r <= bh.MEASURED_VOLTAGE_RATIO[1]:
            raise FieldError(name, f"The measured voltage is {_ratio_words(r)} rated voltage; a bank "
                                   "is not run there. Check the value and that it is line-to-line.")
        if abs(r * math.sqrt(3.0) - 1.0) < bh.PHASE_NEUTRAL_SLACK:
            out.warn(f"The {basis} voltage is close to the rated voltage ÷ √3: enter the line-to-line voltage, "
                     "not phase-to-neutral.")

    exp = bh.expected(q_rated, v_rated, f_rated, conn)
    if not all(0.0 < x < math.inf for x in (exp.c_phase, exp.c_between, exp.i_line, exp.i_element)):
        raise FieldError("q_rated", "The rated output is too small or too large to work with: enter it in kvar.")
    names = bh.PHASE_NAMES[conn]
    si_f = lambda x: fmt.si(x, "F", 4)  # noqa: E731

    # --- plausibility: a reading far above what the nameplate can give is an entry error
    if mode == "between":
        _check_absurd(ins, _PAIR_FIELDS, raw, exp.c_between, si_f, "expected between terminals of this bank",
                      "check the unit (µF or nF), the nameplate data and the connection.")
    elif mode == "phase":
        hint = "check the unit (µF or nF), the nameplate data and the connection."
        if conn == "delta":
            hint += " A wye bank has three times the per-phase capacitance of a delta: if it is wye, choose wye."
        _check_absurd(ins, _PHASE_FIELDS, raw, exp.c_phase, si_f, "expected per phase", hint)
    else:
        i_exp = bh.rated_output_at(q_rated, v_rated, f_rated, v_meas, f_sys) * 1000.0 / (math.sqrt(3.0) * v_meas)
        _check_absurd(ins, _CURRENT_FIELDS, raw, i_exp, lambda x: fmt.si(x, "A", 4),
                      "expected line current at the measured voltage",
                      "check the clamp range (A or kA), that only the bank's cables are inside the clamp, and the nameplate.")
    if ins.errors:
        return

    # --- per-phase capacitances
    try:
        if mode == "between":
            c = bh.per_phase_from_between(raw, conn)
            how = ("elastances s = 1/M; star S1 = (s12 + s31 − s23)/2 and round; "
                   + ("delta c12 = S3/N, N = S1·S2 + S2·S3 + S3·S1 (Y–Δ)" if conn == "delta" else "wye C_k = 1/S_k"))
        elif mode == "phase":
            c = tuple(raw)
            how = "measured on each phase"
        else:
            c = bh.per_phase_from_currents(raw, v_meas, f_sys, conn)
            how = {"delta": "element currents from the line currents (120° apart: |I1|² = y12² + y31² + y12·y31), C = y/(2πf·V)",
                   "wye": "as the equivalent delta, then Δ→Y: c1 = (c12·c23 + c23·c31 + c31·c12)/c23",
                   "wye_n": "C = I/(2πf·V/√3)"}[conn]
        if not all(0.0 <= x < math.inf for x in c):
            raise InputError("The readings are far outside any usable range: check the units.")
    except InputError as e:
        first = {"between": "m12", "phase": "c1", "current": "i1"}[mode]
        raise FieldError(first, str(e)) from None

    pct = [100.0 * ck / exp.c_phase for ck in c]
    verdicts = [bh.verdict(p, band) for p in pct]
    derived = [None, None, None]
    try:
        if mode == "between" and min(c) > 0:
            derived = list(hv.uncertainty_between(raw, conn, meter_acc))
        elif mode == "current" and min(c) > 0:
            derived = list(hv.uncertainty_currents(raw, v_meas, f_sys, conn, meter_acc))
        # near an open phase the propagated error runs away: the meter's own figure stands there
        derived = [d if d is not None and math.isfinite(d) and d < hv.DERIVED_ACCURACY_MAX else None for d in derived]
        # an own band's lower edge is the user's own replacement limit unless the maker's is entered
        limit = maker if maker is not None or band_key != "custom" or band.lo >= 0 else band.lo
        pvs = [hv.phase_verdict(p, band, meter_acc, limit, d) for p, d in zip(pct, derived)]
    except InputError as e:
        raise FieldError("meter_acc", str(e)) from None
    open_wye = conn == "wye" and min(c) <= 0.0
    first = {"between": "m12", "phase": "c1", "current": "i1"}[mode]
    if max(c) <= 0.0:
        raise FieldError(first, "Every phase reads as zero: check the readings and their units.")
    try:
        q_ph = (0.0, 0.0, 0.0) if open_wye else bh.phase_kvar(c, v_sys, f_sys, conn)
    except InputError as e:
        raise FieldError(first, str(e)) from None
    q_tot = sum(q_ph)
    q_exp_sys = bh.rated_output_at(q_rated, v_rated, f_rated, v_sys, f_sys)

    # --- expected
    g = "Expected from the nameplate"
    out.result("c_expected", "Capacitance per phase", exp.c_phase, "F", si=True, group=g,
               method=("C = Q/(3·2πf·V²), each element across the line voltage" if conn == "delta"
                       else "C = Q/(2πf·V²), each phase across V/√3"), source=SRC_CIRCUIT)
    if mode == "between":
        out.result("c_between_expected", "Reading between two terminals", exp.c_between, "F", si=True, group=g,
                   method=("1.5 × C per phase: one element in parallel with two in series" if conn == "delta"
                           else "0.5 × C per phase: two phases in series"), source=SRC_CIRCUIT)
    out.result("i_line_rated", "Rated line current", exp.i_line, "A", group=g,
               method="I = Q/(√3·V)", source=SRC_CIRCUIT)
    if conn == "delta":
        out.result("i_element_rated", "Rated current in each element", exp.i_element, "A", group=g,
                   method="I = Q/(3·V) = line current/√3", source=SRC_CIRCUIT)
    if mode == "current":
        out.result("i_expected", f"Expected line current at {fmt.sig(v_meas)} V", i_exp, "A", group=g,
                   method="I = Q_r·(V/V_r)²·(f/f_r)/(√3·V)", source=SRC_CIRCUIT)
    out.result("q_expected_sys", f"Nameplate output at {fmt.sig(v_sys)} V, {fmt.sig(f_sys)} Hz", q_exp_sys, "kvar", group=g,
               method="Q = Q_r·(V/V_r)²·(f/f_r)", source=SRC_CIRCUIT)

    # --- per phase
    g = "Each phase"
    out.result("band", "Tolerance band", None, "%", display=band.label, group=g,
               method="deviation of measured from expected capacitance, edges inside the band", source=band.source)
    out.result("bank_state", "The bank", None, "", key=True, group=g, status=_STATUS[hv.bank_state(pvs)],
               display=hv.STATE_WORDS[hv.bank_state(pvs)],
               method="The worst phase: replace, then drifted, then within the factory tolerance",
               source=cite("practice_replace", "practice_meter"))
    for k, (n, ck, p, pv, q) in enumerate(zip(names, c, pct, pvs, q_ph), 1):
        dev = p - 100.0
        out.result(f"verdict_{k}", f"Phase {n}", p, "%", key=True, status=_STATUS[pv.state], group=g,
                   display=f"{_verdict_display(pv)}: {'+' if dev >= 0 else '−'}{fmt.sig(abs(dev), 2)} % "
                           f"± {fmt.sig(pv.uncertainty, 2)} %",
                   method=f"Criterion: {pv.criterion}. % = 100·C/C_expected; C {how}",
                   source=_verdict_source(pv, band, limit))
        out.result(f"c_{k}", f"C of phase {n}", ck, "F", si=True, group=g, method=how, source=SRC_CIRCUIT)
        if not open_wye:
            out.result(f"q_{k}", f"Output of phase {n} at {fmt.sig(v_sys)} V", q, "kvar", group=g,
                       method="Q = 2πf·C·V_element² (a floating star point moves when phases differ)", source=SRC_CIRCUIT)

    # --- whole bank
    g = "Whole bank"
    if open_wye:
        out.warn("A phase of this floating wye reads open: the other two are then in series across one line voltage, "
                 "and the bank delivers little. Replace the failed phase.")
    share = 100.0 * q_tot / q_exp_sys
    out.result("q_total", f"Bank output at {fmt.sig(v_sys)} V", q_tot, "kvar", key=True, group=g,
               status="ok" if all(pv.state == "tolerance" for pv in pvs) else "warn",
               display=f"{fmt.sig(q_tot, 4)} kvar ({fmt.sig(share, 3)} % of the nameplate's {fmt.sig(q_exp_sys, 4)} kvar there)",
               method="Σ 2πf·C·V_element² over the three phases", source=SRC_CIRCUIT)
    if min(c) > 0:
        imb = bh.imbalance_percent(c)
        out.result("imbalance", "Imbalance between phases", imb, "%", group=g, digits=3,
                   method="largest deviation from the mean ÷ mean", source=cite("practice", "nema_mg1"))
        rc = hv.ratio_of_readings(raw, meter_acc) if mode == "between" else hv.terminal_ratio(c, conn, meter_acc)
        measured = "as measured" if mode == "between" else "worked out from the per-phase values"
        out.result("ratio", "Largest ÷ smallest capacitance between terminals", rc.ratio, "", group=g, digits=4,
                   status="ok" if rc.passes else "warn",
                   display=f"{fmt.sig(rc.ratio, 4)} (limit {rc.limit}{'' if rc.sure else '; close to it given the meter accuracy'})",
                   method=f"C_max/C_min of the three between-terminal readings ({measured}); a three-phase unit is made "
                          f"to ≤ {rc.limit}", source=cite("iec60831_ratio", "practice_meter"))
        if not rc.passes:
            out.warn(f"The capacitances between terminals differ by more than the {rc.limit} ratio a new three-phase unit is "
                     "made to: the bank draws unequal line currents.")
        if conn == "wye":
            sp = hv.star_point(c, v_sys, f_sys)
            over = sp.highest_percent > 100.0 * IEEE18_VOLTAGE
            out.result("star_shift", "Star-point shift (floating wye)", sp.shift_percent, "% of V/√3", group=g, digits=3,
                       display=f"{fmt.sig(sp.shift_v, 3)} V ({fmt.sig(sp.shift_percent, 3)} % of the phase voltage)",
                       method="V_N = ΣC_k·V_k/ΣC_k (nodal analysis)", source=SRC_CIRCUIT)
            out.result("healthy_over", "Highest voltage on a phase's units", sp.highest_percent, "% of V/√3", group=g,
                       digits=4, status="warn" if over else "ok",
                       display=", ".join(f"{n} {fmt.sig(pc, 4)} %" for n, pc in zip(names, sp.element_percent))
                               + f" of {fmt.sig(v_sys / math.sqrt(3.0), 4)} V",
                       method="|V_k − V_N| for each phase; the phase with the least capacitance sees the most",
                       source=cite("circuits_three_phase", "ieee18"))
            if over:
                out.warn(f"With the star point shifted, the units of one phase see {fmt.sig(sp.highest_percent, 3)} % of "
                         f"their voltage, above the {fmt.sig(100.0 * IEEE18_VOLTAGE)} % continuous limit (IEEE Std 18): "
                         "replace the failed units before the healthy ones fail too.")
    else:
        out.warn("One phase reads open: the bank is running on two elements.")

    # --- tables
    rows = [[n, fmt.si(ck, "F", 4), f"{fmt.sig(p, 4)} % ± {fmt.sig(pv.uncertainty, 2)} %",
             "—" if open_wye else f"{fmt.sig(q, 4)} kvar", _verdict_display(pv)]
            for n, ck, p, q, pv in zip(names, c, pct, q_ph, pvs)]
    out.table("Each phase", ["Phase", "Capacitance", "% of expected", f"kvar at {fmt.sig(v_sys)} V", "Verdict"], rows,
              note=f"Band: {band.label}, widened by the meter's ±{fmt.sig(meter_acc)} % (carried through the calculation "
                   "when the phase values are worked out from several readings). Replace: "
                   + (f"the maker's limit {fmt.sig(maker)} %." if maker is not None else
                      f"{fmt.sig(hv.REPLACE_LOSS_PERCENT)} % loss (common practice)."))
    if mode == "between":
        elem_of_pair = ("L1–L2", "L2–L3", "L3–L1") if conn == "delta" else ("L1", "L2", "L3")
        out.table("Between-terminal readings → per phase",
                  ["Terminals", "Reading", "Expected reading", "Element", "Per-phase C"],
                  [[pair, fmt.si(m, "F", 4), fmt.si(exp.c_between, "F", 4), el, fmt.si(ck, "F", 4)]
                   for pair, m, el, ck in zip(bh.TERMINAL_PAIRS, raw, elem_of_pair, c)],
                  note=("With the third terminal floating the meter reads one element in parallel with the other two in "
                        "series, M12 = C12 + C23·C31/(C23 + C31); the three readings are solved exactly for the three elements."
                        if conn == "delta" else
                        "Between two terminals of a wye the meter reads two phases in series, M12 = C1·C2/(C1 + C2); "
                        "the three readings are solved exactly for the three phases."))

    if mode != "between" and min(c) > 0:
        back = bh.between_from_delta(*c) if conn == "delta" else bh.between_from_wye(*c)
        out.table("What a capacitance meter would read between terminals",
                  ["Terminals", "Reading", "Healthy bank"],
                  [[pair, fmt.si(m, "F", 4), fmt.si(exp.c_between, "F", 4)] for pair, m in zip(bh.TERMINAL_PAIRS, back)],
                  note="Third terminal floating; for comparing with a later test made between terminals.")

    # --- plain words
    for v in ("open", "low", "high"):
        hit = [n for n, pv in zip(names, pvs) if pv.direction == v and (pv.state == "replace" or v == "high")]
        if hit:
            out.notes.append(f"{bh.VERDICT_WORDS[v]} ({', '.join(hit)}) — what it usually means (common practice): {bh.MEANINGS[v]}")
    drifted = [n for n, pv in zip(names, pvs) if pv.state == "drifted" and pv.direction == "low"]
    if drifted:
        out.notes.append(f"{hv.STATE_WORDS['drifted']} ({', '.join(drifted)}): outside the factory band by more than the "
                         "meter's accuracy, but not surely past the replacement limit. Measure again at the same temperature "
                         "with the same meter and compare; a falling trend means elements are being lost.")
    if all(pv.state == "tolerance" for pv in pvs):
        out.notes.append(bh.MEANINGS["ok"])
    if mode == "phase" and conn == "delta" and all(bh.DELTA_BETWEEN_AS_PHASE[0] < p / 100 < bh.DELTA_BETWEEN_AS_PHASE[1] for p in pct):
        out.warn("Every phase reads about 150 % of expected: these look like between-terminal readings of a delta. "
                 "Choose 'Capacitance between terminals'.")
    if mode == "phase" and conn != "delta" and all(bh.WYE_READ_AS_DELTA[0] < p / 100 < bh.WYE_READ_AS_DELTA[1] for p in pct):
        out.warn("Every phase reads about a third of expected: a delta has one third of a wye's per-phase "
                 "capacitance. Is the bank delta-connected?")
    if mode == "current":
        out.notes.append("Harmonic voltages raise capacitor current (each harmonic current is h times its voltage in per "
                         "unit), so a true-rms clamp on a distorted supply overstates the capacitance; prefer the "
                         "fundamental reading of a power-quality meter. Unequal supply voltages also skew the result "
                         "(common practice).")
    else:
        out.notes.append("Capacitance meters are typically within 1–2 % (common practice); polypropylene capacitance "
                         "changes little with temperature.")
    if v_sys / v_rated > IEEE18_VOLTAGE + 1e-9:
        out.warn(f"The system voltage is {fmt.sig(100 * v_sys / v_rated, 3)} % of the rated voltage, above the "
                 f"{fmt.sig(100 * IEEE18_VOLTAGE)} % "
                 "continuous limit of IEEE Std 18 (IEC 60831-1 allows 1.10·U_N only 8 h in 24 h, from memory).")

    out.figure("Each phase against the band", _bars(list(names), pct, [pv.state for pv in pvs], band))


SHEET = Worksheet(
    id="bank_health",
    title="Bank health check",
    summary="From capacitance or current readings on an installed bank: per-phase capacitance, a verdict per phase "
            "against IEC 60831-1 or IEEE Std 18 tolerance, the kvar it really delivers and the imbalance.",
    fields=FIELDS,
    compute=compute,
    cautions=[cautions.STORED_CHARGE, cautions.TEST_DEENERGISED, cautions.QUALIFIED, cautions.ESTIMATE],
    order=50,
    essential=('q_rated', 'v_rated', 'connection', 'mode', 'm12', 'm23', 'm31', 'c1', 'c2', 'c3', 'i1', 'i2', 'i3', 'v_meas'),
    references=[
        ref("circuits_three_phase"), ref("ieee18"), ref("iec60831"),
    ],
)
