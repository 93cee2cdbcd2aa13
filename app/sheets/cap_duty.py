"""Capacitor duty worksheet: rating plus a harmonic spectrum → rms and peak voltage, rms current
and kvar as % of rating against IEEE Std 18, and bus voltage THD against IEEE Std 519."""

from __future__ import annotations

import json
import math

from pycore import capduty
from pycore.errors import InputError
from pycore.references import cite, ref

from .. import cautions, fmt
from .. import quantities as Q
from ..sheet import Column, Field, FieldError, Worksheet
from ..svg import Svg, nice_ticks

SRC_18 = ref("ieee18")
SRC_1036 = ref("ieee1036")
SRC_519 = ref("ieee519")
SRC_CIRCUIT = ref("circuits_ac_power")

FIELDS = [
    Q.CAPACITOR_VOLTAGE.field("u_rated", default="440", group="Capacitor rating"),
    Q.CAPACITOR_KVAR.field("q_rated", default="50"),
    Q.CAPACITOR_FREQUENCY.field("f_rated", default="50"),
    Field("phases", "Unit", kind="choice", default="3",
          options=[("3", "Three-phase (voltages line-to-line)"), ("1", "Single-phase")],
          help="Only the rated current in amperes depends on this; the % results do not."),
    Q.SYSTEM_VOLTAGE.field("u_bus", "Bus voltage, fundamental", default="400", group="Operating conditions",
                           note="On the same basis as the rating. Its level also picks the IEEE 519 voltage limits."),
    Q.SYSTEM_FREQUENCY.field("f_sys", "System frequency", default="", required=False,
                             note="Leave blank when it equals the rated frequency. A 50 Hz capacitor on 60 Hz draws 20 % more current."),
    Field("p", "Series reactor detuning factor", unit="%", default="0", min=0, max=100, max_open=True,
          suggest=["0", "5.67", "7", "14"],
          help="0 for a plain bank on the bus. For a detuned bank, p = X_L/X_C in %: the capacitor then sees U/(1 − p) "
               "and each bus harmonic divided by |1 − p·h²|."),
    Field("duty_profile", "Duty limits", kind="choice", default="ieee18",
          options=[(k, v[0]) for k, v in capduty.DUTY_PROFILES.items()],
          help="IEEE Std 18: 110 % rms and 120 % peak voltage, 135 % current and kvar. IEC 60831-1 (from memory): "
               "1.00·U_N continuously, 1.10·U_N for 8 h in 24 h, 1.30·I_N."),
    Field("kind", "Spectrum entered", kind="choice", default="voltage", group="Harmonic spectrum",
          options=[("voltage", "Bus voltage, % of the fundamental"), ("current", "Capacitor current, % of its fundamental")],
          help="From a power-quality meter: the bus voltage harmonics, or the harmonics of the current into the capacitor."),
    Field("spectrum", "Harmonic spectrum", kind="table",
          default='[["5","4.5"],["7","3.2"],["11","1.8"],["13","1.2"]]',
          help="One row per harmonic order (whole numbers 2 to 50) with its level in % of the fundamental (0 to 100).",
          columns=[Column("h", "Harmonic order"), Column("level", "Level", unit="%")],
          max_rows=49),
    Field("bank_state", "The spectrum was measured with", kind="choice", default="in",
          options=[("in", "This bank in service"), ("out", "This bank out of service")],
          help="The bank changes the bus impedance at every harmonic: a spectrum read with it out of service says "
               "little about its duty once it is in (a resonance can multiply a harmonic several times). Then the "
               "harmonic study gives the duty."),
]

_NAMES = {
    "v_rms": "RMS voltage",
    "v_peak": "Peak voltage",
    "i_rms": "RMS current",
    "kvar": "Reactive power",
}
_METHODS = {
    "v_rms": "V_rms = √ΣV_h² (V_h in per unit of rated voltage, fundamental included)",
    "v_peak": "V_peak = ΣV_h (all harmonics at their crest together, the worst case), per unit of √2·rated rms",
    "i_rms": "I_rms = √Σ(k·h·V_h)², k = f/f_rated",
    "kvar": "Q = ΣV_h·I_h = k·Σh·V_h²",
}


def _spectrum(ins):
    """The spectrum table as {order: level %}, with a message naming the row at fault."""
    rows = ins.rows("spectrum")
    if rows is None:
        return None
    spec = {}
    for r in rows:
        n, h, v = r["_row"], r["h"], r["level"]
        if h != math.floor(h):
            raise FieldError("spectrum", f"Row {n}: the harmonic order must be a whole number (got {fmt.sig(h)}).")
        if h < capduty.HARMONIC_ORDER_MIN:
            raise FieldError("spectrum", f"Row {n}: harmonic order {fmt.sig(h)} is below 2. Order 1 is the fundamental, "
                                         "entered as the bus voltage; enter harmonics from 2 to 50.")
        if h > capduty.HARMONIC_ORDER_MAX:
            raise FieldError("spectrum", f"Row {n}: harmonic order {fmt.sig(h)} is above 50, the highest order "
                                         "IEEE 519 counts. Enter orders from 2 to 50.")
        if v < 0:
            raise FieldError("spectrum", f"Row {n}: the level cannot be negative (got {fmt.sig(v)} %).")
        if v > capduty.LEVEL_MAX_PERCENT:
            raise FieldError("spectrum", f"Row {n}: the level must be at most {fmt.sig(capduty.LEVEL_MAX_PERCENT)} % of the "
                                         f"fundamental (got {fmt.sig(v)} %).")
        h = int(h)
        if h in spec:
            raise FieldError("spectrum", f"Row {n}: harmonic order {h} appears twice; enter each order once.")
        spec[h] = v
    return spec


def _bars(title, items, y_label, desc, ref_lines=()):
    """A simple bar chart. ``items``: [(label, value, limit or None, cls)]; a limit draws a
    dashed tick across its bar. ``ref_lines``: [(value, label)] drawn across the whole plot."""
    w, h = 640, 300
    left, right, top, bottom = 60, 16, 34, 46
    pw, ph = w - left - right, h - top - bottom
    vals = [v for _, v, _, _ in items] + [lim for _, _, lim, _ in items if lim is not None] + [v for v, _ in ref_lines]
    y1 = max(vals + [1e-9]) * 1.12  # drawing: headroom above the tallest bar
    ticks = nice_ticks(0.0, y1)
    y1 = max(y1, ticks[-1])
    svg = Svg(w, h, title, desc)
    svg.rect(0, 0, w, h, "fp-bg")
    svg.text(left, 20, title, size=14, weight="600")

    def py(v):
        return top + ph - v / y1 * ph

    for t in ticks:
        svg.line(left, py(t), left + pw, py(t), "fp-grid", width=1)
        svg.text(left - 6, py(t) + 4, fmt.sig(t, 3), anchor="end", size=11)
    svg.line(left, top + ph, left + pw, top + ph, "fp-axis")
    svg.line(left, top, left, top + ph, "fp-axis")
    svg.text(14, top + ph / 2, y_label, anchor="middle", size=12)
    slot = pw / max(1, len(items))
    bw = min(56.0, slot * 0.6)  # drawing: bar width
    for i, (label, v, lim, cls) in enumerate(items):
        cx = left + slot * (i + 0.5)
        svg.rect(cx - bw / 2, py(v), bw, max(0.0, top + ph - py(v)), cls)
        svg.text(cx, top + ph + 16, label, anchor="middle", size=11)
        svg.text(cx, py(v) - 4, fmt.sig(v, 3), anchor="middle", size=10)
        if lim is not None:
            svg.line(cx - bw / 2 - 6, py(lim), cx + bw / 2 + 6, py(lim), "fp-mark", dash="4 3", width=2)
            svg.text(cx + bw / 2 + 8, py(lim) + 4, f"{fmt.sig(lim, 3)}", size=10)
    for v, label in ref_lines:
        svg.line(left, py(v), left + pw, py(v), "fp-mark", dash="5 4", width=1.5)
        svg.text(left + pw - 4, py(v) - 4, label, anchor="end", size=11)
    return str(svg)


def compute(ins, out):
    u_rated = ins.num("u_rated")
    q_rated = ins.num("q_rated")
    f_rated = ins.num("f_rated")
    phases = int(ins.choice("phases"))
    u_bus = ins.num("u_bus")
    f_sys = ins.num("f_sys")
    p_pct = ins.num("p")
    kind = ins.choice("kind")
    profile = ins.choice("duty_profile")
    bank_state = ins.choice("bank_state")
    spec = _spectrum(ins)
    if ins.errors or spec is None:
        return
    u_c = u_bus / (1.0 - p_pct / 100.0)  # the capacitor's fundamental voltage (raised by a series reactor)
    if not capduty.voltage_ratio_plausible(u_c, u_rated):
        seen = "The bus voltage" if p_pct == 0 else "The capacitor's voltage U/(1 − p)"
        raise FieldError("u_bus", f"{seen} is {fmt.sig(u_c / u_rated, 3)} times the capacitor's rated "
                                  "voltage: check the units (V or kV) and that both are line-to-line, or both "
                                  "line-to-neutral.")
    f_ratio = 1.0 if f_sys is None else f_sys / f_rated
    p = p_pct / 100.0
    try:
        duty = capduty.capacitor_duty(u_rated, u_bus, spec, kind=kind, p=p, f_ratio=f_ratio)
    except InputError as e:
        raise FieldError("spectrum", str(e)) from None

    pname, plimits, short, psrc = capduty.DUTY_PROFILES[profile]
    G = f"Capacitor duty against {pname}"
    values = {"v_rms": duty.v_rms_percent, "v_peak": duty.v_peak_percent, "i_rms": duty.i_rms_percent,
              "kvar": duty.kvar_percent}
    checked = {name: (lim, st) for name, _, lim, st in capduty.profile_check(values, profile)}
    failed, shorts = [], []
    for name, val in values.items():
        if name not in checked:
            out.result(name, f"{_NAMES[name]}, % of rated", val, "%", display=f"{fmt.sig(val, 4)} % (no {pname} limit)",
                       group=G, method=_METHODS[name], source=cite("ieee1036", "input"))
            continue
        lim, st = checked[name]
        if st == "ok":
            word = f"within the {fmt.sig(lim, 3)} % limit, {fmt.sig(lim - val, 3)} points to spare"
        elif st == "short":
            word = f"over the continuous {fmt.sig(lim, 3)} %, within {fmt.sig(short[0], 3)} % for {short[1]} only"
            shorts.append(_NAMES[name].lower())
        else:
            word = f"over the {fmt.sig(lim, 3)} % limit by {fmt.sig(val - lim, 3)} points"
            failed.append(_NAMES[name].lower())
        out.result(name, f"{_NAMES[name]}, % of rated", val, "%", display=f"{fmt.sig(val, 4)} % — {word}",
                   status={"ok": "ok", "short": "warn", "fail": "fail"}[st], key=True, group=G, method=_METHODS[name],
                   source=cite("ieee1036", "ieee18" if profile == "ieee18" else "iec60831_duty"))
    measured_out = bank_state == "out"
    if failed:
        verdict = f"Exceeds the {pname} limit for " + ", ".join(failed)
    elif measured_out:
        verdict = "Not settled: the spectrum was measured with the bank out of service"
    elif shorts:
        verdict = f"Within {pname} for {short[1]} only ({', '.join(shorts)})"
    else:
        verdict = f"Within all {pname} limits"
    out.result("verdict", "Duty verdict", None, display=verdict,
               status="fail" if failed else ("warn" if measured_out or shorts else "ok"), key=True, group=G,
               method="each quantity against its limit; at the limit passes"
                      + ("; a bank-out spectrum gives a lower bound only" if measured_out else ""), source=psrc)
    if failed:
        out.warn(verdict + ". Consider a higher rated voltage, a detuned bank, or a harmonic study.")
    if measured_out:
        out.warn("This spectrum was measured with the bank out of service. Switching the bank in changes the bus "
                 "impedance at every harmonic, and near a resonance a harmonic can grow several times, so these figures "
                 "are not the bank's duty. Back the plant's harmonic currents out of this reading and study the bank in "
                 "service with the harmonic study (link below; enter the transformer there).")
        _study_link(out, u_bus, f_sys or f_rated, q_rated, u_rated, f_ratio, p, spec, kind)
    if profile == "ieee18" and duty.v_rms_percent > 100 + 1e-9 and "rms voltage" not in failed:
        out.warn("The rms voltage is above the capacitor's rating: IEEE Std 18 intends capacitors to run at or below "
                 "rated voltage, with 110 % as a contingency allowance (from memory).")
    if shorts:
        out.warn(f"The rms voltage is above 1.00·U_N: {pname} allows up to {fmt.sig(short[0], 3)} % for {short[1]} "
                 "only (from memory). Choose a higher rated voltage for continuous service.")

    i_rated = capduty.rated_current_a(q_rated, u_rated, phases)
    out.result("i_rated", "Rated current", i_rated, "A", digits=4, group="Currents",
               method="I_R = Q/(√3·U) three-phase (line current), Q/U single-phase", source=SRC_CIRCUIT)
    out.result("i_rms_a", "RMS current with harmonics", i_rated * duty.i_rms_percent / 100, "A", digits=4,
               group="Currents", method="I_R × I_rms %; a series reactor carries the same current",
               source=SRC_CIRCUIT)
    v_c1 = duty.v_cap_pu[1] * 100
    out.result("v_c1", "Capacitor fundamental voltage, % of rated", v_c1, "%", digits=4, group="Currents",
               method="U_bus/(1 − p)/U_rated", source=ref("circuits_resonance"))

    ind_lim, thd_lim, band = capduty.ieee519_voltage_limits(u_bus)
    GB = f"Bus voltage distortion against IEEE Std 519-2014 ({band})"
    derived = " (derived from the current spectrum)" if kind == "current" else ""
    thd = duty.bus_thd_percent
    out.result("thd", f"Bus voltage THD{derived}", thd, "%", digits=3,
               display=f"{fmt.sig(thd, 3)} % (limit {fmt.sig(thd_lim)} %)", status="ok" if thd <= thd_lim + 1e-9 else "fail",
               key=True, group=GB, method="THD = √ΣV_h² over orders 2–50, % of fundamental", source=SRC_519)
    h_worst = max(duty.v_bus_percent, key=lambda k: duty.v_bus_percent[k])
    v_worst = duty.v_bus_percent[h_worst]
    out.result("worst", "Largest individual harmonic", v_worst, "%", digits=3,
               display=f"{fmt.sig(v_worst, 3)} % at order {h_worst} (limit {fmt.sig(ind_lim)} %)",
               status="ok" if v_worst <= ind_lim + 1e-9 else "fail", group=GB,
               method="max V_h/V_1", source=SRC_519)
    if thd > thd_lim + 1e-9 or v_worst > ind_lim + 1e-9:
        out.warn("The bus voltage distortion exceeds the IEEE 519 limits for this voltage level "
                 "(limits that apply at the point of common coupling).")

    if p > 0:
        n = 1 / math.sqrt(p)
        below = [h for h in spec if h < n]
        if below:
            out.warn(f"Harmonic order{'s' if len(below) > 1 else ''} {', '.join(str(h) for h in below)} "
                     f"{'are' if len(below) > 1 else 'is'} below the tuning order {fmt.sig(n, 3)}: the branch is "
                     "capacitive there and amplifies that harmonic at the capacitor.")

    rows = []
    for h in sorted(duty.v_cap_pu):
        vb = "100 (fundamental)" if h == 1 else fmt.sig(duty.v_bus_percent[h], 3)
        vc = duty.v_cap_pu[h]
        rows.append([str(h), vb, fmt.sig(100 * vc, 3), fmt.sig(100 * f_ratio * h * vc, 3)])
    out.table("By harmonic order", ["Order", "Bus voltage, % of fundamental", "Capacitor voltage, % of rated",
                                    "Capacitor current, % of rated"], rows)

    out.figure(f"Duty against {pname}", _bars(
        "Capacitor duty, % of rating",
        [("V rms", duty.v_rms_percent, plimits.get("v_rms"), "fp-s1-fill"),
         ("V peak", duty.v_peak_percent, plimits.get("v_peak"), "fp-s1-fill"),
         ("I rms", duty.i_rms_percent, plimits.get("i_rms"), "fp-s2-fill"),
         ("kvar", duty.kvar_percent, plimits.get("kvar"), "fp-s2-fill")],
        "%",
        f"Bars for rms voltage, peak voltage, rms current and kvar in % of rating; dashed ticks mark the {pname} limits "
        + ", ".join(f"{_NAMES[k].lower()} {fmt.sig(v)} %" for k, v in plimits.items()) + ".",
    ))
    spec_items = [(str(h), duty.v_bus_percent[h], None, "fp-s3-fill") for h in sorted(duty.v_bus_percent)]
    out.figure("Bus voltage spectrum", _bars(
        "Bus voltage harmonics, % of fundamental" + derived,
        spec_items,
        "%",
        f"Bars for each harmonic order's bus voltage in % of the fundamental; a dashed line marks the IEEE 519 "
        f"individual limit of {fmt.sig(ind_lim)} %.",
        ref_lines=[(ind_lim, f"IEEE 519 individual limit {fmt.sig(ind_lim)} %")],
    ))


def _study_link(out, u_bus, f, q_rated, u_rated, f_ratio, p, spec, kind):
    """Into the harmonic study: this capacitor as one step, the bus-voltage spectrum read with the bank out."""
    q_bus = q_rated * (u_bus / u_rated) ** 2 * f_ratio / (1 - p)  # delivered at the bus (branch output)
    if kind != "voltage":
        return
    out.link("Study this bank in service (harmonic study)", "harmonic_study", {
        "v_ll": fmt.sig(u_bus, 6), "f": fmt.sig(f, 6),
        "steps": json.dumps([[fmt.sig(q_bus, 5), "detuned" if p else "plain", fmt.sig(100 * p, 4) if p else "",
                              fmt.sig(u_rated, 6)]]),
        "source": "voltage", "bank_state": "out",
        "v_spec": json.dumps([[str(h), fmt.sig(v, 6)] for h, v in sorted(spec.items())]),
    })


SHEET = Worksheet(
    id="cap_duty",
    title="Capacitor duty with harmonics",
    summary="From a capacitor's rating and a harmonic spectrum: rms and peak voltage, rms current and kvar as % of "
            "rating against IEEE Std 18, and the bus voltage THD against IEEE Std 519.",
    fields=FIELDS,
    compute=compute,
    cautions=[cautions.SCREENING, cautions.STORED_CHARGE, cautions.ESTIMATE],
    order=27,
    essential=('u_rated', 'q_rated', 'u_bus', 'p', 'kind', 'spectrum'),
    references=[
        ref("ieee18"), ref("iec60831_duty"), ref("ieee1036"), ref("ieee519"),
    ],
)
