"""Site survey worksheet: a table of loads → site totals, overall PF and the correction to a target."""

from __future__ import annotations

from pycore import survey
from pycore.phasor import power_factor
from pycore.errors import InputError
from pycore.references import cite, ref

from .. import cautions, fmt
from .. import quantities as Q
from ..sheet import Column, Field, FieldError, Worksheet
from ..svg import Svg

SRC_SUM = ref("circuits_ac_power")
SRC_KVAR = ref("ieee141_pf")

MAX_LINKS = 20

# Invented demo plant: a small dairy ("Kestrel Vale Creamery"), loads per unit.
_DEMO = (
    '[["Air compressor","75","0.86","","1","16"],'
    '["Chiller plant","110","0.82","","1","20"],'
    '["Conveyor motor","5.5","0.74","","12","16"],'
    '["Homogeniser","45","0.84","","2","12"],'
    '["CIP pump","15","0.8","","3","6"],'
    '["Office and IT","22","","6","1","10"],'
    '["UPS with input filter","12","0.97 lead","","1","24"]]'
)

FIELDS = [
    Field(
        "loads",
        "Loads",
        kind="table",
        default=_DEMO,
        group="Loads",
        help=(
            "One row per load type. P and Q are per unit; quantity multiplies them (blank = 1). "
            "Give PF or Q: PF 0.85 is taken as lagging, write 0.95 lead for a leading load; "
            "Q is positive lagging, negative leading (e.g. −8 kvar). Hours per day are optional "
            "and give energy per day."
        ),
        columns=[
            Column("name", "Load", kind="text", required=False),
            Column("p", "P", unit="kW", required=False, min=0, max=Q.REAL_POWER.max),  # 0 kW: a spare, counted as nothing
            Column("pf", "PF", kind="text", required=False),
            Column("q", "Q", unit="kvar", required=False),
            Column("qty", "Quantity", required=False, min=0),
            Column("hours", "Hours/day", unit="h", required=False, min=0, max=24),
        ],
        max_rows=500,
    ),
    Q.TARGET_POWER_FACTOR.field("target_pf", default="0.95", group="Target"),
]


def _name(rec) -> str:
    name = rec.get("name")
    return name if name else f"Load {rec['_row']}"


def _loads(ins):
    """Table rows → list of (row record, Load); raises FieldError naming the first bad row."""
    rows = ins.rows("loads")
    if rows is None:
        return None
    loads, problems = [], []
    for rec in rows:
        name = _name(rec)
        try:
            if rec.get("p") is None:
                raise InputError("Enter P (kW).")
            pf, leading = (None, False)
            if rec.get("pf"):
                pf, leading = survey.parse_pf(rec["pf"])
            load = survey.make_load(name, rec["p"], pf=pf, leading=leading, q_kvar=rec.get("q"),
                                    quantity=rec.get("qty"), hours=rec.get("hours"))
        except InputError as e:
            problems.append(f"Row {rec['_row']} ({name[:40]}): {e}")
            continue
        loads.append((rec, load))
    if problems:
        more = f" ({len(problems) - 1} more row{'s' if len(problems) > 2 else ''} with problems.)" if len(problems) > 1 else ""
        raise FieldError("loads", problems[0] + more)
    return loads


def _q_text(q: float) -> str:
    if q > 0:
        return f"{fmt.sig(q)} kvar lagging"
    if q < 0:
        return f"{fmt.sig(-q)} kvar leading"
    return "0 kvar"


def _pf_text(pf, word) -> str:
    if pf is None:
        return "—"
    return f"{pf:.3f}" + ("" if word == "unity" else f" {word}")


def _num(v, digits=4) -> str:
    return "" if v is None else fmt.sig(v, digits)


def _triangle(t) -> str:
    """Power triangle of the site before and after a central bank: P along x, lagging Q up."""
    w, h = 400, 250
    p, q, qc = t.p_kw, t.q_kvar, t.central_kvar
    q2 = q - qc
    svg = Svg(w, h, "Site power triangle",
              f"P = {fmt.sig(p)} kW, Q = {_q_text(q)} before; Q = {_q_text(q2)} after a central bank of {fmt.sig(qc)} kvar.")
    svg.rect(0, 0, w, h, "fp-bg")
    top = max(q, q2, 0.0)
    bot = min(q, q2, 0.0)
    span_y = max(top - bot, 0.05 * p)  # drawing: a flat triangle still shows
    x0, right = 40, 130
    k = min((w - x0 - right) / p, (h - 70) / span_y)
    y0 = 36 + top * k
    xp = x0 + p * k
    y1, y2 = y0 - q * k, y0 - q2 * k
    svg.line(x0 - 10, y0, xp + 20, y0, "fp-axis")
    svg.line(x0, 14, x0, h - 10, "fp-axis")
    svg.text(x0 + 6, 22, "+Q lagging", size=12)
    svg.arrow(x0, y0, xp, y0, "fp-s2")
    svg.text((x0 + xp) / 2, y0 + (18 if q >= 0 else -8), f"P = {fmt.sig(p, 3)} kW", anchor="middle", size=12)
    svg.arrow(x0, y0, xp, y1, "fp-s1")
    svg.text(xp + 8, y1 + 4, f"before: PF {t.pf:.2f}", size=12)
    if qc > 0:
        svg.arrow(xp, y1, xp, y2, "fp-s3")
        svg.arrow(x0, y0, xp, y2, "fp-s4")
        svg.text(xp + 8, (y1 + y2) / 2 + 4, f"bank {fmt.sig(qc, 3)} kvar", size=12)
        svg.text(xp + 8, y2 + 4 if abs(y2 - y0) > 14 else y2 - 6, f"after: PF {power_factor(complex(p, q2))[0]:.2f}", size=12)
    return str(svg)


def compute(ins, out):
    target = ins.pf_value("target_pf")
    loads = _loads(ins)
    if ins.errors or loads is None or target is None:
        return
    try:
        t = survey.survey_totals([ld for _, ld in loads], target)
    except InputError as e:
        raise FieldError("loads", str(e)) from None

    g1 = "Site totals"
    out.result("p_total", "Total real power P", t.p_kw, "kW", key=True, group=g1,
               method="P = Σ P_i × quantity_i", source=SRC_SUM)
    out.result("q_total", "Total reactive power Q", t.q_kvar, "kvar", display=_q_text(t.q_kvar), group=g1,
               method="Q = Σ Q_i × quantity_i, Q_i = P_i·tan(acos PF_i); + lagging, − leading", source=SRC_SUM)
    out.result("s_total", "Total apparent power S", t.s_kva, "kVA", group=g1,
               method="S = √(P² + Q²) of the summed P and Q", source=SRC_SUM)
    out.result("pf_site", "Overall power factor", t.pf, "", display=_pf_text(t.pf, t.pf_word), key=True, group=g1,
               status="ok" if t.pf_word != "leading" and t.pf >= target else "warn",
               method="PF = ΣP / √((ΣP)² + (ΣQ)²), from summed P and Q, not an average of row PFs", source=SRC_SUM)
    out.result("units", "Units counted", t.units, "", group=g1, method="Σ quantity (blank = 1)", source=ref("input"))

    g2 = f"Correction to PF {fmt.sig(target)} lagging"
    out.result("central_kvar", "One central bank", t.central_kvar, "kvar", key=True, group=g2,
               method="Q_c = max(0, ΣQ − ΣP·tan(acos PF_target))", source=SRC_KVAR)
    out.result("individual_kvar", "Sum of individual corrections", t.individual_kvar, "kvar", key=True, group=g2,
               method="Σ max(0, Q_i − P_i·tan(acos PF_target)) × quantity_i, over rows below the target", source=SRC_KVAR)
    out.result("pf_after_individual", "Overall PF with individual corrections", t.pf_after_individual, "",
               display=_pf_text(t.pf_after_individual, t.pf_after_individual_word), group=g2,
               method="PF from ΣP and ΣQ − Σ individual kvar", source=SRC_SUM)
    out.result("s_after", "S after the central bank", t.s_after_central_kva, "kVA", group=g2,
               method="S₂ = √(P² + (Q − Q_c)²)", source=SRC_SUM)
    out.result("kva_released", "Capacity released", t.kva_released, "kVA", group=g2,
               method="ΔS = S − S₂ (for the same P); line current falls in the same ratio", source=SRC_SUM)
    if t.s_kva > 0:
        out.result("current_drop", "Line current reduction", 100.0 * t.kva_released / t.s_kva, "%", group=g2,
                   method="ΔI/I = ΔS/S at the same voltage", source=SRC_SUM)

    if t.kwh_day is not None:
        g3 = "Energy per day"
        part = "" if t.rows_with_hours == len(t.rows) else f" ({t.rows_with_hours} of {len(t.rows)} rows have hours)"
        out.result("kwh_day", "Real energy per day" + part, t.kwh_day, "kWh", group=g3,
                   method="Σ P_i × quantity_i × hours_i", source=SRC_SUM)
        out.result("kvarh_day", "Reactive energy per day" + part, t.kvarh_day, "kvarh", group=g3,
                   display=_q_text(t.kvarh_day).replace("kvar", "kvarh"),
                   method="Σ Q_i × quantity_i × hours_i (+ lagging)", source=SRC_SUM)
        if t.rows_with_hours < len(t.rows):
            out.notes.append("Energy per day counts only the rows with hours entered.")

    table_rows = []
    for r in t.rows:
        ld = r.load
        table_rows.append([
            ld.name,
            fmt.sig(ld.quantity),
            fmt.sig(r.p_kw),
            fmt.sig(r.q_kvar),
            fmt.sig(r.s_kva),
            _pf_text(r.pf, r.pf_word),
            fmt.sig(r.need_each_kvar),
            fmt.sig(r.need_row_kvar),
            _num(r.kwh_day),
        ])
    table_rows.append(["Total", fmt.sig(t.units), fmt.sig(t.p_kw), fmt.sig(t.q_kvar), fmt.sig(t.s_kva),
                       _pf_text(t.pf, t.pf_word), "", fmt.sig(t.individual_kvar), _num(t.kwh_day)])
    out.table("Loads", ["Load", "Qty", "P kW", "Q kvar (+ lag)", "S kVA", "PF", "kvar each to target",
                        "kvar for the row", "kWh/day"], table_rows,
              note="P, Q and S are for the whole row (per unit × quantity).")

    if t.pf_word == "leading":
        out.warn("The site is leading overall: adding capacitors makes it worse. Check for oversized or "
                 "always-on capacitors and consider switching some off.")
    leading_rows = sum(1 for r in t.rows if r.pf_word == "leading")
    if t.individual_kvar > t.central_kvar * (1 + 1e-9) + 1e-9:
        why = []
        if leading_rows:
            why.append(f"{leading_rows} leading row{'s' if leading_rows > 1 else ''}")
        above = sum(1 for r in t.rows if r.pf_word != "leading" and r.need_row_kvar == 0 and r.p_kw > 0)
        if above:
            why.append(f"{above} row{'s' if above > 1 else ''} already at or above the target")
        out.notes.append(
            "Individual corrections add up to more than one central bank because "
            + (" and ".join(why) if why else "some rows")
            + " cannot lend kvar to the others; the central bank works on the summed load."
        )
    if any(r.load.quantity == 0 for r in t.rows):
        out.notes.append("Rows with quantity 0 count for nothing in the totals.")

    if t.pf_word != "leading":
        out.figure("Site power triangle", _triangle(t))
    _links(out, t, target)
    out.caution(cautions.ESTIMATE)


def _pf_link_text(pf: float, target: float) -> str:
    """The power factor as typed text: 4 decimals, or more when 4 would round it up to the target."""
    for d in (4, 6, 9, 12):
        text = f"{pf:.{d}f}"
        if 0 < float(text) < target:
            return text
    return repr(pf)


def _number_text(v: float) -> str:
    """A number as text the fields read back exactly enough (no ×10ⁿ display form)."""
    return f"{v:.6g}"


def _links(out, t, target):
    needing = [r for r in t.rows if r.need_each_kvar > 0 and r.load.quantity > 0 and r.load.p_kw > 0]
    needing.sort(key=lambda r: -r.need_row_kvar)
    too_big = [r for r in needing if not Q.BANK_KVAR.admits(r.need_each_kvar)]
    needing = [r for r in needing if Q.BANK_KVAR.admits(r.need_each_kvar)]
    for r in needing[:MAX_LINKS]:
        ld = r.load
        pf_each, _ = power_factor(complex(ld.p_kw, ld.q_kvar))
        out.link(f"Size correction for {ld.name}", "correction",
                 {"basis": "p_pf", "p_kw": _number_text(ld.p_kw), "pf1": _pf_link_text(pf_each, target),
                  "pf1_sense": "lagging", "pf2": fmt.sig(target, 6), "light_p": ""})  # one load: no lightest-load check
    if too_big:
        out.notes.append(f"No correction link for {len(too_big)} row{'s' if len(too_big) > 1 else ''} needing more than "
                         f"{fmt.sig(Q.BANK_KVAR.max / 1000)} Mvar each, the largest bank the correction worksheet sizes: "
                         "check their figures.")
    if needing:
        extra = len(needing) - MAX_LINKS
        msg = "Correction links carry P and PF per unit (one of the quantity)"
        if extra > 0:
            msg += f"; they are offered for the {MAX_LINKS} rows needing the most kvar, and {extra} more row{'s' if extra > 1 else ''} need correction (see the table)."
        else:
            msg += ", largest need first."
        out.notes.append(msg)
    if t.central_kvar > 0 and Q.REAL_POWER.admits(t.p_kw):
        out.link("Estimate savings and payback for this site", "savings",
                 {"pf1": _pf_link_text(t.pf, target), "pf2": fmt.sig(target, 6), "p_kw": _number_text(t.p_kw)})


SHEET = Worksheet(
    id="survey",
    title="Site survey",
    summary="A table of loads gives the site's totals, overall power factor and the kvar to reach a target, as one central bank or as individual corrections.",
    fields=FIELDS,
    compute=compute,
    cautions=[cautions.ESTIMATE],
    order=5,
    essential=('loads', 'target_pf'),
    references=[
        ref("ieee141_pf"), ref("circuits_ac_power"),
    ],
)
