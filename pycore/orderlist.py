"""The order list: everything a bank needs to be bought and built, per step and for the bank.

:func:`design_bank` works each step out from the modules beside this one — inrush
(:mod:`pycore.inrush`), discharge (:mod:`pycore.discharge`), fuses and contactors
(:mod:`pycore.protection`), cable (:mod:`pycore.cables`), detuning reactor
(:mod:`pycore.detuning`) — and :func:`order_rows` turns the result into rows of a purchase
list (section, item, quantity, specification, basis) that read like a request an
electrician can hand on. :func:`as_table` and :func:`as_text` give the same rows as a table
(results, CSV) and as plain text (shared or e-mailed). Pure functions, no formatting of the
app's own. Units: kvar, V, Hz, A, H/mH/µH as named, Ω, W, s.
"""

from __future__ import annotations

from dataclasses import dataclass

from . import cables, discharge, inrush, protection
from .capacitor import conductor_basis, line_current, output_factor
from .detuning import branch_output_kvar, design_branch
from .errors import InputError, guarded
from .numtext import sig as _sig
from .stepplans import ck_setting_a

DEFAULT_STEP_LENGTH_M = 2.0
"""Run from the bank's busbar to each step when none is entered [m] (an invented round figure
for a compact panel; enter the real layout)."""

PROFILES = {
    # profile → (fuse/breaker rating series, cable table, discharge rule)
    "nec": ("nec", cables.NEC_CU_75, "nec"),
    "iec": ("iec", cables.IEC_C_PVC, "iec"),
}


def _cable_need(i_n: float, profile: str, fuse: protection.Device) -> float:
    """Ampacity [A] a circuit's cable needs: the conductor basis (NEC 460.8 / IEC 60831-1) and
    not less than its fuse rating, so that the fuse protects the cable (I_n ≤ I_z,
    IEC 60364-4-43; NEC 240.4; the stricter reading, common practice)."""
    basis = conductor_basis(i_n, profile)["conductor"]
    return max(basis, fuse.rating_a or 0.0)


@dataclass(frozen=True)
class StepDesign:
    """One step worked out. number (1-based); q_rated_kvar [kvar at the capacitor's rating];
    q_system_kvar [kvar at system voltage]; units (ratings [kvar], largest first); i_n_a [A]
    the larger of the rated and the system line current; circuit (:class:`inrush.StepCircuit`);
    inrush (:class:`inrush.StepInrush`); discharge (:class:`discharge.Discharge`); fuse
    (:class:`protection.Device`); contactor (:class:`protection.Contactor`); cable
    (:class:`cables.CableChoice`); cable_needed_a [A]; reactor (:class:`detuning.DetunedBranch`
    or None)."""

    number: int
    q_rated_kvar: float
    q_system_kvar: float
    units: tuple
    i_n_a: float
    circuit: inrush.StepCircuit
    inrush: inrush.StepInrush
    discharge: discharge.Discharge
    fuse: protection.Device
    contactor: protection.Contactor
    cable: cables.CableChoice
    cable_needed_a: float
    reactor: object


@dataclass(frozen=True)
class BankDesign:
    """The bank: steps (:class:`StepDesign`); cap_v [V], cap_f [Hz], connection; v_ll [V],
    f_hz [Hz]; p [fraction]; profile; total_rated_kvar, total_system_kvar [kvar]; i_n_a [A];
    main_fuse, main_cable, main_cable_needed_a [A]; limiting_uh [µH per phase] added in every
    plain step to keep inrush within limits (0 when not needed); ck_a [A] or None; ct (primary,
    secondary) [A] or None; reclose_s [s]; fast (:class:`discharge.FastDischarge` or None)."""

    steps: tuple
    cap_v: float
    cap_f: float
    connection: str
    v_ll: float
    f_hz: float
    p: float
    profile: str
    total_rated_kvar: float
    total_system_kvar: float
    i_n_a: float
    main_fuse: protection.Device
    main_cable: cables.CableChoice
    main_cable_needed_a: float
    limiting_uh: float
    ck_a: float | None
    ct: tuple | None
    reclose_s: float
    fast: object
    cable_assumptions: str


def _lengths(lengths_m, n: int) -> list[float]:
    if isinstance(lengths_m, (int, float)):
        return [float(lengths_m)] * n
    vals = [float(x) for x in lengths_m]
    if len(vals) != n:
        raise InputError(f"Give one length per step ({n}), or one for all.")
    return vals


@guarded
def design_bank(steps_rated, step_units, v_ll: float, f_hz: float, cap_v: float, cap_f: float,
                connection: str = "delta", p: float = 0.0, profile: str = "nec", s_sc_kva: float | None = None,
                lengths_m=DEFAULT_STEP_LENGTH_M, uh_per_m: float = inrush.DEFAULT_UH_PER_M,
                contactor_peak_a: float | None = None, ct_primary_a: float | None = None, ct_secondary_a: float = 5.0,
                fast_discharge_s: float | None = None, cable_table: cables.CableTable | None = None,
                derating: float = 1.0) -> BankDesign:
    """Work out every step of a bank: steps_rated [kvar at cap_v, cap_f], step_units (ratings
    [kvar] per step), system v_ll [V], f_hz [Hz], the capacitor's cap_v [V], cap_f [Hz] and
    internal ``connection`` ('delta'/'wye'), detuning factor p [fraction, 0 for none],
    ``profile`` 'nec' (NEC 460.8, NEC ratings and table, NEC 460.6) or 'iec' (IEC 60831-1,
    IEC 60269 ratings, IEC 60364-5-52, 75 V in 3 min), the bus's short-circuit power s_sc_kva
    [kVA] if known, run lengths_m [m] from the busbar to each step at uh_per_m [µH/m], the
    contactor maker's peak rating [A], the CT ratio for C/k [A/A], a fast-discharge delay [s],
    an own cable table and a derating factor [-]. Methods and sources: see each module."""
    if profile not in PROFILES:
        raise InputError("The code profile must be 'nec' or 'iec'.")
    series, table, rule = PROFILES[profile]
    table = cable_table or table
    st_rated = [float(x) for x in steps_rated]
    units = [tuple(u) for u in step_units]
    if not st_rated or len(units) != len(st_rated):
        raise InputError("Give the units of each step.")
    if p and abs(cap_f - f_hz) > 1e-9 * f_hz:
        raise InputError("A detuned bank's capacitors must be rated at the system frequency.")
    q_sys: list = []
    for k, q in enumerate(st_rated):  # a step of the same rating as the one before gives the same kvar
        alike = k and q == st_rated[k - 1]
        q_sys.append(q_sys[-1] if alike else branch_output_kvar(q, v_ll, cap_v, p) if p else q * output_factor(v_ll, cap_v, f_hz, cap_f))
    lengths = _lengths(lengths_m, len(st_rated))
    l_of = {x: inrush.connection_inductance_h(x, uh_per_m) for x in dict.fromkeys(lengths)}  # each length once
    l_conn = [l_of[x] for x in lengths]
    circuits: list = []
    q_prev = lc_prev = None
    for q, lc in zip(q_sys, l_conn):  # a step alike the one before it shares its circuit
        alike = circuits and q == q_prev and lc == lc_prev
        circuits.append(circuits[-1] if alike else inrush.step_circuit(q, v_ll, f_hz, lc, p))
        q_prev, lc_prev = q, lc
    l_src = inrush.source_inductance_h(v_ll, f_hz, s_sc_kva) if s_sc_kva else None
    inr = inrush.bank_inrush(circuits, v_ll, l_src, contactor_peak_a)
    limiting = 0.0 if p else inrush.limiting_inductance_h(circuits, v_ll, l_src, contactor_peak_a)
    designs = []
    prev = None
    for k, (qr, qs, u, circ, ir) in enumerate(zip(st_rated, q_sys, units, circuits, inr), 1):
        if (qr, qs, circ, ir) != prev:  # else alike the step before: the same parts
            i_n = max(line_current(qr, cap_v), line_current(qs, v_ll))
            fz = protection.fuse(i_n, series)
            need = _cable_need(i_n, profile, fz)
            lim = ir.limit_a if contactor_peak_a is None else min(ir.limit_a, contactor_peak_a)
            dis = discharge.discharge_resistor(qr, cap_v, cap_f, connection, rule)
            con = protection.contactor(i_n, bool(p), ir.worst, lim, profile)
            cab = cables.cable_for(need, table, derating)
            rea = design_branch(v_ll, f_hz, qs, p, cap_v) if p else None
            prev = (qr, qs, circ, ir)
        designs.append(StepDesign(k, qr, qs, tuple(sorted(u, reverse=True)), i_n, circ, ir, dis, fz, con, cab, need, rea))
    tot_r, tot_s = sum(st_rated), sum(q_sys)
    i_bank = max(line_current(tot_r, cap_v), line_current(tot_s, v_ll))
    main_fuse = protection.fuse(i_bank, series)
    main_need = _cable_need(i_bank, profile, main_fuse)
    smallest = min(q_sys)
    ck = ck_setting_a(smallest, v_ll, ct_primary_a, ct_secondary_a) if ct_primary_a else None
    fast = (discharge.fast_discharge(max(st_rated), cap_v, cap_f, connection, fast_discharge_s)
            if fast_discharge_s else None)
    reclose = fast.delay_s if fast else max(d.discharge.reclose_s for d in designs)
    return BankDesign(tuple(designs), cap_v, cap_f, connection, v_ll, f_hz, p, profile, tot_r, tot_s, i_bank,
                      main_fuse, cables.cable_for(main_need, table, derating), main_need,
                      limiting * 1e6, ck, (ct_primary_a, ct_secondary_a) if ct_primary_a else None, reclose, fast,
                      table.assumptions)


@dataclass(frozen=True)
class OrderRow:
    """One line of the purchase list: section ('Step 1' …, 'Bank'), item, quantity (a count),
    spec (what to ask the supplier for), basis (why, with its source)."""

    section: str
    item: str
    quantity: int
    spec: str
    basis: str


def _cable_text(c: cables.CableChoice) -> str:
    runs = f"{c.runs} × " if c.runs > 1 else ""
    return f"{runs}{c.size} copper per phase ({_sig(c.ampacity_a)} A)"


@guarded
def order_rows(bank: BankDesign) -> list:
    """The purchase list of ``bank`` (:func:`design_bank`) as :class:`OrderRow` s: per step the
    capacitor units, the detuning reactor, the contactor, the fuses, the discharge device and
    the cable (and an inrush-limiting reactor where one is needed); for the bank the
    controller, the main fuses and the main cable."""
    rows: list[OrderRow] = []
    conn = bank.connection
    rule = discharge.RULES[PROFILES[bank.profile][2]]
    table_assumptions = bank.cable_assumptions
    last_parts, last_rows = None, []
    for d in bank.steps:
        sec = f"Step {d.number}"
        parts = (d.units, d.q_rated_kvar, d.q_system_kvar, d.reactor, d.contactor, d.inrush, d.fuse, d.discharge, d.cable,
                 d.cable_needed_a)
        if parts == last_parts:  # alike the step before (every figure its rows show): the same rows
            rows += [OrderRow(sec, r.item, r.quantity, r.spec, r.basis) for r in last_rows]
            continue
        first = len(rows)
        counts: dict[float, int] = {}
        for u in d.units:
            counts[u] = counts.get(u, 0) + 1
        for r, n in sorted(counts.items(), key=lambda t: -t[0]):
            rows.append(OrderRow(sec, "Capacitor unit", n,
                                 f"{_sig(r, 4)} kvar at {_sig(bank.cap_v, 4)} V, {_sig(bank.cap_f)} Hz, three-phase, {conn}",
                                 f"Step {_sig(d.q_rated_kvar, 4)} kvar rated, {_sig(d.q_system_kvar)} kvar at {_sig(bank.v_ll, 4)} V"))
        if d.reactor is not None:
            br = d.reactor
            rows.append(OrderRow(sec, "Detuning reactor", 1,
                                 f"Three-phase, p = {_sig(100 * br.p)} % (tuned to {_sig(br.f_tuning_hz)} Hz), "
                                 f"{_sig(br.l_mh)} mH per phase, fundamental current {_sig(br.i1_a)} A",
                                 "X_L = p·X_C (pycore.detuning; IEC 61642, from memory); rms current rating with harmonics from the maker"))
        c = d.contactor
        rows.append(OrderRow(sec, "Contactor", 1, f"{c.duty}, rated at least {_sig(c.min_current_a)} A", f"{c.reason} {c.source}"))
        if bank.limiting_uh > 0 and d.reactor is None and not d.inrush.within:
            # an alternative, not a second purchase: said in the item the buyer reads first
            rows.append(OrderRow(sec, "Or, instead of the capacitor-duty contactor: a standard contactor and an inrush-limiting reactor", 1,
                                 f"{_sig(bank.limiting_uh)} µH per phase, at least {_sig(d.cable_needed_a)} A",
                                 f"Worst inrush {_sig(d.inrush.worst)} A peak against {_sig(d.inrush.limit_a)} A "
                                 f"(100 × I_N). {inrush.SOURCE_INRUSH}"))
        f = d.fuse
        frating = f"{_sig(f.rating_a)} A" if f.rating_a else "no standard rating"
        rows.append(OrderRow(sec, "Fuses, gG", 3, f"{frating} (range {_sig(f.lo_a)}–{_sig(f.hi_a)} A)", f"{f.source}. {f.note}"))
        dd = d.discharge
        rows.append(OrderRow(sec, "Discharge resistors (often built into the unit: check)", 3,
                             f"At most {_sig(dd.r_max_ohm / 1e3)} kΩ across each element of the step (units in parallel count together), "
                             f"at least {_sig(dd.p_element_max_w)} W",
                             f"{rule.source}; R ≤ t/(C·ln(V₀/V_t)), V₀ = √2·U_N"))
        rows.append(OrderRow(sec, "Cable", 1, _cable_text(d.cable),
                             f"≥ {_sig(d.cable_needed_a)} A: the NEC 460.8 / IEC 60831-1 current basis and not below the fuse "
                             f"(IEC 60364-4-43, NEC 240.4); {d.cable.row.source}. {table_assumptions}"))
        last_parts, last_rows = parts, rows[first:]
    ct = f", CT {_sig(bank.ct[0])}/{_sig(bank.ct[1])} A, C/k = {_sig(bank.ck_a)} A" if bank.ck_a is not None else ""
    rows.append(OrderRow("Bank", "Power-factor controller", 1,
                         f"At least {len(bank.steps)} step outputs{ct}; reconnection delay at least {_sig(bank.reclose_s)} s",
                         "C/k: the smallest step's current on the CT secondary; delay until a step is below 10 % of its peak "
                         "(common practice)"))
    if bank.fast is not None:
        fd = bank.fast
        rows.append(OrderRow("Bank", "Fast-discharge resistors (switched in while a step is off)", 3 * len(bank.steps),
                             f"{_sig(fd.r_ohm)} Ω per element, {_sig(fd.energy_j)} J per discharge",
                             "Brings a step to 10 % of its peak within the delay (common practice)"))
    mf = bank.main_fuse
    rows.append(OrderRow("Bank", "Main fuses, gG", 3,
                         f"{_sig(mf.rating_a) + ' A' if mf.rating_a else 'no standard rating'} (range {_sig(mf.lo_a)}–{_sig(mf.hi_a)} A)",
                         f"{mf.source}. {mf.note}"))
    rows.append(OrderRow("Bank", "Main cable", 1, _cable_text(bank.main_cable),
                         f"≥ {_sig(bank.main_cable_needed_a)} A, not below the main fuse; {bank.main_cable.row.source}"))
    return rows


@guarded
def merge_alike_steps(rows) -> list:
    """The rows of :func:`order_rows` with runs of consecutive steps that need the same parts
    (same items and specifications) merged into one section, 'Steps 2–6 (5 alike)', with the
    quantities multiplied: what to buy, not what to read five times. Bank rows unchanged."""
    blocks: list[tuple[list[int], list]] = []
    for r in rows:
        if r.section.startswith("Step "):
            n = int(r.section.split()[1])
            if blocks and blocks[-1][0][-1] == n:
                blocks[-1][1].append(r)
            else:
                blocks.append(([n], [r]))
        else:
            blocks.append(([], [r]))
    merged: list[tuple[list[int], list]] = []
    for nums, rs in blocks:
        if nums and merged and merged[-1][0] and merged[-1][0][-1] == nums[0] - 1 and \
                [(x.item, x.quantity, x.spec) for x in merged[-1][1]] == [(x.item, x.quantity, x.spec) for x in rs]:
            merged[-1][0].append(nums[0])
        else:
            merged.append((list(nums), list(rs)))
    out = []
    for nums, rs in merged:
        if len(nums) <= 1:
            out += rs
            continue
        sec = f"Steps {nums[0]}–{nums[-1]} ({len(nums)} alike)"
        out += [OrderRow(sec, r.item, r.quantity * len(nums), r.spec, r.basis) for r in rs]
    return out


COLUMNS = ("Section", "Item", "Qty", "Specification", "Basis")


@guarded
def as_table(rows) -> tuple:
    """(:data:`COLUMNS`, [[section, item, qty, spec, basis], …]) for a results table or CSV."""
    return COLUMNS, [[r.section, r.item, r.quantity, r.spec, r.basis] for r in rows]


@guarded
def as_text(rows) -> str:
    """The purchase list as plain text, one line per row, grouped by section."""
    out, last = [], None
    for r in rows:
        if r.section != last:
            out.append(f"{r.section}:")
            last = r.section
        out.append(f"  {r.quantity} × {r.item}: {r.spec}")
    return "\n".join(out)
