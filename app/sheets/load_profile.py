"""Load-profile worksheet: size a bank from what the meter saw over weeks or a year.

The user pastes (or opens) a logger export or a utility interval download; the worksheet says
what it understood, gives the energy, the billing-average power factor, peaks, duration curves
and a daily profile, the kvar by three measures, and runs a chosen bank against every interval.
Links carry the design point into the correction worksheet and the month with the largest
power-factor charge into savings (the bill: _profile_tariff.py).
"""

from __future__ import annotations

from pycore import capacitor, profile_columns, profile_stats as ps
from pycore.errors import InputError
from pycore.profile_control import LEAD_SHARE_WARN, Bank, simulate
from pycore.profile_demo import demo_text
from pycore.profile_read import INTERVALS_MIN, MAX_CHARS, PREAMBLE, read_profile
from pycore.profile_time import DateOrderError, stamp_text
from pycore.references import cite, ref

from .. import cautions, fmt
from .. import quantities as Q
from ..sheet import Field, FieldError, Worksheet
from ..svg import xy_chart
from . import _profile_tariff as tariff

SRC_BILL = ref("practice_billing")
SRC_NEED = cite("circuits_ac_power", "ieee141_pf")
SRC_SHARE = cite("circuits_ac_power", "ieee141_pf", "quantile_lower")
SRC_ENERGY = ref("def_energy")
SRC_SIM = ref("practice_controller")
SRC_CAP = ref("circuits_phasors")
SRC_FILE = ref("input_file")
LIST_MAX = 200  # rows listed in the skipped/flagged table; the rest are counted
DEMO = demo_text(days=7, interval_min=60)

FIELDS = [
    Field("profile", "Load profile (paste or open a file)", kind="text", default=DEMO, group="Profile",
          widget="file", max_chars=MAX_CHARS,
          help=("Paste the rows of a logger export or the utility's interval download, or open the CSV or text "
                f"file. Comma, semicolon or tab between columns; decimal point or comma; with or without a header; "
                f"intervals of {', '.join(str(m) for m in INTERVALS_MIN)} minutes; at most {MAX_CHARS // 1_000_000} MB. "
                "Columns: time and kW + kvar, kWh + kvarh, kW + PF, kW + kVA, or lagging and leading kvarh apart."),
          placeholder="Time,kW,kvar"),
    Field("date_order", "Date order", kind="choice", default="auto",
          options=[("auto", "Find it from the data"), ("dmy", "Day first (31/01/2025)"), ("mdy", "Month first (01/31/2025)")],
          help="Dates such as 03/04/2025 can be read two ways; the data usually tells, and you can choose."),
    Field("stamps", "Each time stamp marks", kind="choice", default="end",
          options=[("end", "The end of its interval (usual for utility data)"), ("start", "The start of its interval")]),
    Field("roles", "Column roles (optional)", kind="text", default="", required=False,
          placeholder="e.g. time, kW, kvar",
          help=("Leave blank to read them from the header. Otherwise one word per column, in order: time (or date "
                "and time), kW, kWh, kvar, kvarh, kvar lag, kvar lead, kvarh lag, kvarh lead, kVA, kVAh, PF, skip.")),
    Q.TARGET_POWER_FACTOR.field("target_pf", default="0.95", group="Target"),
    Field("share", "Share of intervals to bring to the target", unit="%", default="95", min=50, max=100,
          suggest=["90", "95", "99", "100"],
          help="The bank is sized so that this share of the intervals meets the target; 100 % sizes for the worst interval."),
    Field("basis", "The bill counts reactive energy as", kind="choice", default="net",
          options=[("net", "Lagging minus leading kvarh"), ("lagging", "Lagging kvarh only")],
          help="Tariffs differ; the billing-average power factor and the monthly figures follow this choice."),
    Field("bank", "Bank to try against the profile", kind="choice", default="auto", group="Bank to try",
          options=[("auto", "Automatic bank in steps"), ("fixed", "Fixed bank"), ("none", "None")]),
    Q.BANK_KVAR.field("fixed_kvar", "Fixed bank", default="150", show_when={"field": "bank", "in": ["fixed"]}),
    Q.BANK_KVAR.but(help="The controller's steps, separated by commas (at most 12), at the bus voltage unless the "
                         "capacitor's rating is given below. It switches whole steps only.").field(
        "steps", "Steps", kind="list", default="25, 50, 50, 50, 50, 50", show_when={"field": "bank", "in": ["auto"]}),
    Q.EXISTING_KVAR.but(help="A fixed capacitor beside the steps, always in (e.g. for a transformer's no-load kvar). "
                             "Blank or 0 if none.").field(
        "fixed_part", "Fixed part always in", default="0", required=False, show_when={"field": "bank", "in": ["auto"]}),
    Q.CAPACITOR_VOLTAGE.field("cap_v", default="", required=False, show_when={"field": "bank", "in": ["auto", "fixed"]},
                              note="With the bus voltage, the kvar above are taken at the rating and scaled by (V/V_r)². "
                                   "Blank: at the bus."),
    Q.MEASURED_VOLTAGE.field("v_bus", "Bus voltage (measured if you have it)", default="", required=False,
                             show_when={"field": "bank", "in": ["auto", "fixed"]}),
] + tariff.FIELDS


def _pct(x: float) -> str:
    return f"{100 * x:.1f} %"


def _pf(pf: float, sense: str) -> str:
    return f"{pf:.3f} {sense}"


def _pf_short(pf: float, sense: str) -> str:
    return f"{pf:.3f}" + (" lead" if sense == "leading" else "")


# The last file read and what came of it (a profile or the error), kept for the next answer: an edit to
# another field (the target, the share, the bank) then re-reads nothing. A year of 5-minute rows takes
# about a third of an answer to read. One entry: the worksheet holds one file at a time.
_last_read: list = [None, None]  # [(text, date_order, roles, stamps), Profile or InputError]


def _read_profile_once(text: str, date_order: str, roles: str, stamps: str):
    """``read_profile`` for these arguments, from the last call when they are the same."""
    key = (text, date_order, roles, stamps)
    if _last_read[0] != key:
        _last_read[:] = [None, None]  # let the old file go before the new one is read (a long one is tens of MB)
        try:
            got = read_profile(text, date_order=date_order, roles=roles, stamps=stamps)
        except InputError as e:
            got = e
        _last_read[:] = [key, got]
    if isinstance(_last_read[1], InputError):
        raise _last_read[1].with_traceback(None)  # the same error again, without the old frames
    return _last_read[1]


def _read(ins):
    text = ins.text("profile")
    roles = ins.text("roles").strip()
    if roles:
        try:
            profile_columns.parse_roles(roles)
        except InputError as e:
            ins.fail("roles", str(e))
            return None
    try:
        return _read_profile_once(text, ins.choice("date_order"), roles, ins.choice("stamps"))
    except DateOrderError as e:
        ins.fail("date_order", str(e))
    except InputError as e:
        ins.fail("roles" if roles and "column" in str(e).lower() and "role" in str(e).lower() else "profile", str(e))
    return None


def _bank(ins):
    kind = ins.choice("bank")
    if kind == "none":
        return None, ""
    cap_v, v_bus = ins.num("cap_v"), ins.num("v_bus")
    if kind == "fixed":
        fixed, steps = ins.num("fixed_kvar"), []
    else:
        fixed, steps = ins.num("fixed_part") or 0.0, ins.numbers("steps")
        if steps is not None and len(steps) > 12:
            ins.fail("steps", "At most 12 steps.")
    if ins.errors:
        return None, ""
    note = ""
    if (cap_v is None) != (v_bus is None):
        raise FieldError("v_bus" if v_bus is None else "cap_v", "Enter both the capacitor's rated voltage and the bus voltage, or neither.")
    if cap_v is not None:
        k = capacitor.output_factor(v_bus, cap_v, 1.0, 1.0)
        fixed, steps = fixed * k, [s * k for s in steps]
        note = f"kvar at {fmt.sig(v_bus)} V: {fmt.sig(100 * k, 3)} % of the rating at {fmt.sig(cap_v)} V"
    return Bank(fixed, tuple(steps)), note


def _lost(prof) -> int:
    """Rows left out that looked like data (a title or note line above the header is not one)."""
    return sum(1 for _, why in prof.skipped if why != PREAMBLE)


def _stamp(prof, t: int) -> str:
    """A time as written in the file (the end of the interval when stamps mark the end)."""
    return stamp_text(t + (prof.interval_s if prof.understood.stamps == "end" else 0))


def compute(ins, out):
    prof = _read(ins)
    target = ins.pf_value("target_pf")
    share = ins.num("share")
    bill = tariff.read(ins)
    bank, bank_note = _bank(ins) if prof is not None else (None, "")
    if ins.errors or prof is None or target is None:
        return
    share /= 100.0
    p, q, h, u = prof.p, prof.q, prof.hours, prof.understood
    if not any(x > 0 for x in p):
        raise FieldError("profile", "No interval imports power (every kW is zero or negative): there is nothing to correct.")
    basis = ins.choice("basis")

    # -- what was read
    g = "What was read"
    out.result("period", "Period", (u.last - u.first) / 86400 + h / 24, "days", group=g,
               display=f"{stamp_text(u.first)} to {stamp_text(u.last + prof.interval_s)} "
                       f"({fmt.sig((u.last - u.first + prof.interval_s) / 86400, 4)} days)",
               method="first interval's start to last interval's end", source=SRC_FILE)
    out.result("interval", "Interval", u.interval_min, "min", group=g,
               method="most common step between time stamps", source=SRC_FILE)
    out.result("rows", "Intervals used", u.rows_used, "", group=g,
               display=f"{u.rows_used:,} of {u.rows_read:,} rows read", method="rows read less rows skipped",
               source=SRC_FILE, status="warn" if _lost(prof) else "ok")
    missing = sum(gap[2] for gap in prof.gaps)
    if missing:
        out.result("missing", "Intervals missing", missing, "", group=g, status="warn",
                   display=f"{missing:,} in {sum(1 for gp in prof.gaps if gp[2])} gap(s)",
                   method="steps longer than the interval", source=SRC_FILE)

    # -- energy and peaks
    tot = ps.totals(p, q, h)
    g = "Energy and peaks"
    out.result("kwh", "Energy imported", tot.kwh, "kWh", group=g, method="Σ P·h over intervals with P > 0", source=SRC_ENERGY)
    out.result("kvarh", "Reactive energy, lagging", tot.kvarh_lag, "kvarh", group=g, method="Σ Q·h over intervals with Q > 0", source=SRC_ENERGY)
    if tot.kvarh_lead:
        out.result("kvarh_lead", "Reactive energy, leading", tot.kvarh_lead, "kvarh", group=g,
                   method="Σ |Q|·h over intervals with Q < 0", source=SRC_ENERGY)
    if tot.kwh_export:
        out.result("kwh_export", "Energy exported", tot.kwh_export, "kWh", group=g, method="Σ |P|·h over intervals with P < 0",
                   source=SRC_ENERGY)
    net = tot.kvarh_lag - tot.kvarh_lead
    pf_bill = tot.pf_net if basis == "net" else tot.pf_lag
    sense = "leading" if basis == "net" and net < 0 else "lagging"
    out.result("pf_bill", "Billing-average power factor", pf_bill, "", display=_pf(pf_bill, sense), key=True, group=g,
               method="ΣkWh/√(ΣkWh² + Σkvarh²), kvarh " + ("lagging − leading" if basis == "net" else "lagging only"),
               source=SRC_BILL, status="ok" if pf_bill >= target - 1e-12 and sense == "lagging" else "warn")
    out.result("peak_kw", "Peak demand", tot.peak_kw, "kW", group=g,
               display=f"{fmt.sig(tot.peak_kw)} kW at {_stamp(prof, prof.t[tot.peak_kw_at])}",
               method="largest interval kW (time as stamped)", source=SRC_ENERGY)
    out.result("peak_kva", "Peak apparent demand", tot.peak_kva, "kVA", group=g,
               display=f"{fmt.sig(tot.peak_kva)} kVA at {_stamp(prof, prof.t[tot.peak_kva_at])}",
               method="largest √(P² + Q²) of an interval", source=ref("circuits_ac_power"))

    # -- bank size
    g = "Bank size"
    q_share, design = ps.kvar_for_share(p, q, target, share)
    q_bill = ps.kvar_for_billing(p, q, h, target, basis)
    step_max = ps.kvar_kept_lagging(p, q, share)
    out.result("kvar_share", f"kvar for {fmt.sig(100 * share)} % of intervals at {target:.2f}", q_share, "kvar", key=True, group=g,
               method="the need max(0, Q − P·tan φ₂) met in that share of intervals, ideal control", source=SRC_SHARE)
    out.result("kvar_billing", f"kvar for a billing-average PF of {target:.2f}", q_bill, "kvar", key=True, group=g,
               method="bank giving min(Q_C, Q) in each interval (never leading), solved for the target on the period's totals",
               source=SRC_BILL)
    out.result("largest_step", "Largest step that keeps light load lagging", step_max, "kvar", key=True, group=g,
               method=f"the reactive power the load draws in at least {fmt.sig(100 * share)} % of intervals: a step or fixed "
                      "part no larger leaves those intervals lagging", source=cite("circuits_ac_power", "quantile_lower"))
    dp, dq = p[design], q[design]
    out.notes.append(f"Design point: the interval at {_stamp(prof, prof.t[design])}, {fmt.sig(dp)} kW and {fmt.sig(dq)} kvar.")

    # -- the bank tried
    sim = None
    if bank is not None:
        sim = simulate(prof.t, p, q, prof.interval_s, bank, target, basis)
        g = "The bank tried"
        w = sim.whole
        size = bank.fixed_kvar + sum(bank.steps)
        out.result("bank_size", "Bank", size, "kvar", group=g,
                   display=f"{fmt.sig(size)} kvar" + (f" ({bank_note})" if bank_note else ""),
                   method="fixed part + steps" + (", scaled to the bus voltage" if bank_note else ""),
                   source=SRC_CAP if bank_note else ref("input"))
        out.result("pf_after", "Billing-average PF with the bank", w.pf_after, "", display=_pf(w.pf_after, w.sense_after),
                   key=True, group=g, method="ΣkWh/√(ΣkWh² + Σkvarh²) after the bank, whole profile", source=SRC_BILL,
                   status="ok" if w.pf_after >= target - 1e-12 and w.sense_after == "lagging" else "warn")
        out.result("miss", "Intervals still below the target", 100 * w.miss, "%", display=_pct(w.miss), group=g,
                   method=f"share of importing intervals with Q after > P·tan φ₂ (before: {_pct(w.miss_before)})",
                   source=SRC_SIM, status="ok" if w.miss <= 1 - share + 1e-12 else "warn")
        out.result("lead", "Intervals over-corrected (leading)", 100 * w.lead, "%", display=_pct(w.lead), group=g,
                   method="share of importing intervals with Q after < 0", source=SRC_SIM,
                   status="ok" if w.lead == 0 else "warn")
        rows = [[m.label, fmt.sig(m.kwh, 5), fmt.sig(m.kvarh_before, 5), _pf_short(m.pf_before, m.sense_before),
                 _pf_short(m.pf_after, m.sense_after), _pct(m.miss), _pct(m.lead)] for m in sim.months]
        out.table("By calendar month", ["Month", "kWh", "kvarh", "PF before", "PF after", "Missed", "Lead"],
                  rows, note="kvarh before the bank; PF lagging unless marked 'lead'; Missed: intervals still below the "
                             "target; Lead: intervals over-corrected. Calendar months: a billing cycle on other dates "
                             "shifts the figures a little.")
        if bank.steps and min(bank.steps) > step_max + 1e-9:
            out.warn(f"The smallest step ({fmt.sig(min(bank.steps))} kvar) is larger than the light-load reactive power "
                     f"({fmt.sig(step_max)} kvar): at light load the controller cannot switch it in without leading.")
        if bank.fixed_kvar > step_max + 1e-9:
            out.warn(f"The fixed part ({fmt.sig(bank.fixed_kvar)} kvar) is more than the light-load reactive power "
                     f"({fmt.sig(step_max)} kvar): it makes light-load intervals lead.")
        if w.lead > LEAD_SHARE_WARN:
            out.warn(f"{_pct(w.lead)} of the intervals lead with this bank: a leading power factor raises the voltage and may be billed.")

    _understood(out, prof)
    _figures(out, prof, target, sim, q_share)
    _links(out, prof, target, design)
    tariff.monthly(out, *bill, prof, sim)
    if _lost(prof):
        out.warn(f"{_lost(prof):,} row(s) of data were left out: see the rows listed below.")
    if prof.gaps and missing:
        out.warn(f"{missing:,} interval(s) are missing from the period: totals cover only the intervals read.")
    n_exp = sum(1 for x in p if x < 0)
    if n_exp:
        out.warn(f"{n_exp:,} interval(s) export power (negative kW): they are left out of the power-factor figures.")
    for n in prof.notes:
        out.notes.append(n)
    out.notes.append("The controller here switches instantly to the best whole-step position; a real one waits and keeps "
                     "a band around the target, so real results are a little worse.")
    out.caution(cautions.ESTIMATE)


def _understood(out, prof):
    u = prof.understood
    rows = [["Separator", u.separator], ["Decimal mark", u.decimal],
            ["Header", f"row {u.header}" if u.header else "none"]]
    for col, head, role in u.columns:
        rows.append([f"Column {col}" if col else "Columns", (f"'{head}' → " if head else "") + role])
    rows += [["Reading", u.layout], ["Interval", f"{u.interval_min} min"], ["Date order", u.date_order],
             ["Time stamps", "end of each interval" if u.stamps == "end" else "start of each interval"],
             ["Rows", f"{u.rows_read:,} read, {u.rows_used:,} used, {len(prof.skipped):,} left out, {len(prof.flagged):,} flagged"],
             ["Size", f"{u.chars:,} characters"]]
    out.table("What was understood", ["Item", "Found"], rows, note="Set the column roles or the date order above if any of this is wrong.")
    listed = sorted([(r, "left out", why) for r, why in prof.skipped] + [(r, "kept", why) for r, why in prof.flagged])
    if listed:
        more = len(listed) - LIST_MAX
        out.table("Rows left out or flagged", ["Row", "", "Why"], [[str(r), k, why] for r, k, why in listed[:LIST_MAX]],
                  note=f"and {more:,} more" if more > 0 else "Row numbers count every line of the text, the header included.")
    if prof.gaps:
        rows = [[stamp_text(a), stamp_text(b), str(n), note] for a, b, n, note in prof.gaps[:LIST_MAX]]
        more = len(prof.gaps) - LIST_MAX
        out.table("Gaps in the time stamps", ["Last stamp before", "Next stamp", "Missing", "Note"], rows,
                  note=f"and {more:,} more gaps" if more > 0 else "Times as stamped in the file.")


def _figures(out, prof, target, sim, q_share):
    p, q = prof.p, prof.q
    need = ps.curve_points(ps.duration(ps.needs(p, q, target)))
    qc = ps.curve_points(ps.duration([b for a, b in zip(p, q) if a > 0]))
    out.figure("kvar duration", xy_chart(
        "kvar duration", [{"points": qc, "label": "Q drawn", "cls": "fp-s1"},
                          {"points": need, "label": f"needed for {target:.2f}", "cls": "fp-s2"},
                          {"points": [(0.0, q_share), (100.0, q_share)], "label": f"{fmt.sig(q_share, 3)} kvar",
                           "cls": "fp-s4", "dash": "5 4", "width": 1.5}],
        x_label="share of intervals at or above (%)", y_label="kvar", width=400, height=300,
        desc="Reactive power and the kvar needed to reach the target, sorted from largest to smallest."))
    series = [{"points": ps.curve_points(ps.duration(ps.pf_per_interval(p, q))), "label": "before", "cls": "fp-s1"}]
    if sim is not None:
        after = [b - c for b, c in zip(q, sim.given)]
        pf_after = ps.duration([a / abs(complex(a, b)) for a, b in zip(p, after) if a > 0])
        series.append({"points": ps.curve_points(pf_after), "label": "with the bank", "cls": "fp-s2"})
    series.append({"points": [(0.0, target), (100.0, target)], "label": f"target {target:.2f}", "cls": "fp-s4",
                   "dash": "5 4", "width": 1.5})
    series.append({"points": [(0.0, 1.07)], "cls": "fp-bg"})  # not drawn: head room above PF 1 for the legend
    out.figure("Power-factor duration", xy_chart(
        "Power-factor duration", series, x_label="share of intervals at or above (%)", y_label="power factor",
        width=400, height=300, markers=[],
        desc=f"Power factor of each interval sorted from highest to lowest; the target is {target:.2f}. "
             "Leading intervals count by their magnitude."))
    daily = ps.daily_profile(prof.t, p, q, prof.interval_s)
    out.figure("Daily profile", xy_chart(
        "Daily profile (mean)", [{"points": [(s / 3600, a) for s, a, _, _ in daily], "label": "kW", "cls": "fp-s1"},
                                 {"points": [(s / 3600, b) for s, _, b, _ in daily], "label": "kvar", "cls": "fp-s2"}],
        x_label="hour of the day (interval start)", y_label="kW, kvar", width=400, height=300,
        desc="Mean kW and kvar for each time of day over the whole period."))


def _links(out, prof, target, design):
    p, q = prof.p, prof.q
    if not ps.needs([p[design]], [q[design]], target)[0] > 0:
        return  # the design interval already meets the target: Correction would size nothing
    inputs = {"basis": "p_q", "p_kw": f"{p[design]:.1f}", "q_kvar": f"{q[design]:.1f}", "pf2": f"{target:g}"}
    imp = sorted((a, i) for i, a in enumerate(p) if a > 0)
    light_p, li = imp[max(0, -(-len(imp) * 5 // 100) - 1)]  # the 5th-percentile kW interval
    if q[li] > 0:
        inputs["light_p"] = f"{light_p:.1f}"
        inputs["light_pf"] = f"{light_p / abs(complex(light_p, q[li])):.3f}"
    out.link("Size the bank for the design point in Correction", "correction", inputs)


SHEET = Worksheet(
    id="load_profile",
    title="Load profile",
    summary="Size a bank from a logger export or a utility interval download: billing power factor, kvar duration, daily profile, and a bank tried month by month.",
    fields=FIELDS,
    compute=compute,
    cautions=[cautions.ESTIMATE],
    order=25,
    essential=('profile', 'target_pf'),
    references=[ref("ieee141_pf"), ref("practice_billing")],
)
