"""The capacitor correction worksheet's checks: the capacitor's duty off its rating, how the plan
fits the need, over-correction at the lightest load, voltage rise and resonance with the supply,
and the table of step combinations. Not a worksheet (no SHEET)."""

from __future__ import annotations

import math

from pycore import banksteps, capacitor, correction, stepcombos, supply
from pycore.errors import InputError
from pycore.stepplans import UNITS_PER_STEP_LIMIT

from .. import cautions, fmt
from ..sheet import FieldError
from . import _correction_harmonics as harm
from . import _resonance_view as view
from ._correction_steps import G_CAPACITOR, SRC_IEEE18, SRC_SUPPLY, SRC_TRIANGLE, _pf_text
from pycore.references import cite, ref

def rating_and_selection_checks(out, cx):
    """Warnings on the capacitor's voltage and frequency duty and on how well the plan fits the need."""
    G3 = G_CAPACITOR
    after, bank, cap_f, cap_v, f = cx.after, cx.bank, cx.cap_f, cx.cap_v, cx.f
    need_rated, pattern, pf_after, ratings, step_units, steps_rated = cx.need_rated, cx.pattern, cx.pf_after, cx.ratings, cx.step_units, cx.steps_rated
    steps_sys, total_rated, v = cx.steps_sys, cx.total_rated, cx.v
    d = capacitor.duty(v, cap_v, f, cap_f)
    if cap_v < v * (1 - 1e-9):
        over = d.over_limits()
        status = "fail" if over else "warn"
        out.result("cap_duty", "Capacitor voltage at system voltage", 100 * d.voltage, "% of rating", digits=3, status=status,
                   group=G3, method="V/V_r; IEEE 18 continuous limit 110 %", source=SRC_IEEE18)
        msg = (f"The capacitor is rated {fmt.sig(cap_v)} V, below the {fmt.sig(v)} V system: it runs at {fmt.sig(100 * d.voltage, 3)} % "
               f"of its rated voltage and {fmt.sig(100 * d.kvar, 3)} % of its rated kvar")
        if over:
            msg += f", beyond the IEEE Std 18 continuous limits ({', '.join(over)}). Choose a unit rated at least {fmt.sig(v)} V."
        else:
            msg += ", within IEEE Std 18 continuous limits but with a shorter life and no margin for overvoltage or harmonics. Prefer a unit rated at least the system voltage."
        out.warn(msg)
    elif d.over_limits():
        out.warn(f"At {fmt.sig(f)} Hz this {fmt.sig(cap_f)} Hz capacitor runs at {fmt.sig(100 * d.kvar, 3)} % kvar and "
                 f"{fmt.sig(100 * d.current, 3)} % current, beyond IEEE Std 18 continuous limits (135 %).")
    if abs(cap_f - f) > 1e-9 * f:
        out.warn(f"The capacitor is rated for {fmt.sig(cap_f)} Hz but runs at {fmt.sig(f)} Hz: its kvar and current scale by "
                 f"{fmt.sig(f / cap_f, 3)} × (included above). Check that the maker allows it.")
    if cap_v > capacitor.OVERRATED_VOLTAGE_RATIO * v:
        out.notes.append(f"A {fmt.sig(cap_v)} V unit on {fmt.sig(v)} V gives only {fmt.sig(100 * (v / cap_v) ** 2, 3)} % of its nameplate kvar; "
                         "you pay for kvar you do not get, in exchange for voltage margin.")

    # --- selection checks at full load
    if after.sense == "leading":
        if bank == "fixed":
            out.warn(f"The bank leads at full load (PF {_pf_text(pf_after, 'leading')}): the units you can buy are too coarse "
                     "for this load. Add smaller ratings to the list.")
    if bank == "fixed" and need_rated > 0 and (total_rated - need_rated) > banksteps.EXCESS_WARN_FRACTION * need_rated \
            and total_rated - need_rated > min(ratings):
        out.warn(f"The fixed bank orders {fmt.sig(100 * (total_rated - need_rated) / need_rated, 3)} % more than needed: "
                 "more unit ratings would fit closer.")
    # an automatic bank's excess is weighed against the three step plans (_correction_order.plans)

    most = max((len(u) for u in step_units), default=0)
    if most > UNITS_PER_STEP_LIMIT:
        out.warn(f"One step of this plan is {most} units in parallel. A step is usually one to a few units: add a larger "
                 "unit rating to the list, or leave out the smallest, for fewer units, connections and fuses.")

    combos = stepcombos.combinations(steps_sys)
    cx.combos = combos


def light_load(out, cx):
    """Over-correction at the lightest load."""
    bank, combos, delivered, existing, existing_in, light_p = cx.bank, cx.combos, cx.delivered, cx.existing, cx.existing_in, cx.light_p
    light_pf, net, steps_sys = cx.light_pf, cx.net, cx.steps_sys
    light_check = None
    light_net = None
    if light_p is not None:
        if light_p > net.p_kw * (1 + 1e-9):
            raise FieldError("light_p", f"The lightest load is above the full load ({fmt.sig(net.p_kw)} kW); check the figures.")
        light = correction.load_from_p_pf(light_p, light_pf)
        light_net = light.corrected(existing) if (not existing_in and existing > 0) else light
        light_check = stepcombos.light_load_check(light_net, steps_sys, combos=combos)
        full_light = light_net.corrected(delivered)
        out.result("pf_light", f"Power factor at the lightest load ({fmt.sig(light_p)} kW), whole bank in", full_light.pf, "",
                   display=_pf_text(full_light.pf, full_light.sense), key=bank == "fixed",
                   status="warn" if full_light.sense == "leading" else "ok", group="",
                   method="PF = P_min/√(P_min² + (Q_min − Q_C)²)", source=SRC_TRIANGLE)
        if light_check.leading:
            if bank == "fixed":
                out.warn(f"Over-correction: at the lightest load the fixed bank gives PF {_pf_text(full_light.pf, full_light.sense)}. "
                         "Switch it with the load, make it smaller, or use an automatic bank.")
            elif light_check.best is None:
                out.warn("Over-correction: even the smallest step makes the power factor leading at the lightest load. "
                         "Use a smaller first step.")
            else:
                b = light_check.best
                out.warn(f"Over-correction: at the lightest load, more than {fmt.sig(b.total)} kvar makes the power factor leading. "
                         f"Keep step{'s' if len(light_check.leave_out) > 1 else ''} {', '.join(str(i) for i in light_check.leave_out)} off "
                         f"(steps {'+'.join(str(i) for i in b.on)} in give {_pf_text(light_net.corrected(b.total).pf, light_net.corrected(b.total).sense)}); "
                         "set the controller's target and switching delay so it does.")
    else:
        out.notes.append("No lightest load entered: the over-correction check was skipped.")
    cx.light_check, cx.light_net = light_check, light_net


def supply_checks(out, cx):
    """Voltage rise and parallel resonance with the supply, when the transformer is entered."""
    bank, delivered, existing, f, fault_mva, phases = cx.bank, cx.delivered, cx.existing, cx.f, cx.fault_mva, cx.phases
    steps_sys, tx_kva, tx_z = cx.steps_sys, cx.tx_kva, cx.tx_z
    s_sc = None
    near_orders = ((supply.SINGLE_PHASE_ORDER,) if phases == 1 else ()) + supply.LOW_ORDERS
    if tx_kva is not None:
        try:
            s_sc = supply.transformer_short_circuit_kva(tx_kva, tx_z, None if fault_mva is None else fault_mva * 1000.0)
        except InputError as e:  # pragma: no cover - fields are range-checked
            raise FieldError("tx_kva", str(e)) from None
        if not supply.bank_fits_bus(delivered + existing, s_sc):
            weak_utility = fault_mva is not None and fault_mva * 1000.0 < tx_kva / (tx_z / 100.0)
            raise FieldError("fault_mva" if weak_utility else "tx_kva",
                             f"The capacitors ({fmt.sig(delivered + existing)} kvar) are as large as the bus short-circuit "
                             f"level ({fmt.sig(s_sc)} kVA): check the transformer rating and impedance"
                             + (", the utility fault level" if fault_mva is not None else "") + " and their units.")
        G6 = "Supply"
        out.result("s_sc", "Short-circuit level at the bus", s_sc, "kVA", group=G6,
                   method="S_sc = 1/(Z%/100/S_t + 1/S_utility)", source=SRC_SUPPLY)
        rise = supply.voltage_rise_percent(delivered, s_sc)
        out.result("v_rise", "Voltage rise, whole new bank switched in", rise, "%", digits=3, group=G6,
                   status="warn" if rise > supply.VOLTAGE_RISE_LIMIT_PERCENT else "ok",
                   method="ΔV ≈ 100·Q_C/S_sc (source reactance only; overstates the rise by up to about 10 % of itself for transformer X/R ≥ 3 at up to full load)",
                   source=cite("practice", "ngspice_checked"))
        if bank == "auto":
            out.result("v_rise_step", "Voltage step, largest step switched", supply.voltage_rise_percent(max(steps_sys), s_sc), "%",
                       digits=3, group=G6, method="ΔV ≈ 100·Q_step/S_sc", source=ref("practice"))
        if rise > supply.VOLTAGE_RISE_LIMIT_PERCENT:
            out.warn(f"Switching the whole bank raises the bus voltage by about {fmt.sig(rise, 2)} %: check light-load voltage, "
                     f"and switch in steps (common practice keeps it under about {fmt.sig(supply.VOLTAGE_RISE_LIMIT_PERCENT)} %).")
        cx.near_orders, cx.s_sc = near_orders, s_sc
        cx.screen = harm.screen(cx)  # the one resonance-screening rule
        harm.resonance_result(out, cx, harm.bus_resonance_order(cx), cx.screen)
        out.caution(cautions.SCREENING)
    cx.near_orders, cx.s_sc = near_orders, s_sc
    cx.screen = getattr(cx, "screen", [])


def combinations_table(out, cx):
    """The table of step combinations and the resonance warning it leads to."""
    bank, combos, existing, light_check, light_net, near_orders = cx.bank, cx.combos, cx.existing, cx.light_check, cx.light_net, cx.near_orders
    net, pf2, s_sc, v = cx.net, cx.pf2, cx.s_sc, cx.v
    # each position's power factor and sense at full load, worked once (the target and the rows use them)
    full = [(a.pf, a.sense) for a in [net.corrected(c.total) for c in combos]]
    target_combo = next((c for c, (pf, sense) in zip(combos, full) if pf >= pf2 - 1e-9 and sense != "leading"), None)
    hits = view.by_label(cx.screen)
    rows = []
    levels = list(zip(combos, full))
    note_cut = ""
    if len(combos) > 64:
        stride = math.ceil(len(combos) / 64)
        keep = set(combos[::stride]) | {combos[-1]}
        if target_combo:
            keep.add(target_combo)
        if light_check and light_check.best:
            keep.add(light_check.best)
        levels = [(c, at) for c, at in levels if c in keep]
        note_cut = f"Showing {len(levels)} of {len(combos)} positions, evenly spread. "
    for c, (pf, sense) in levels:
        row = ["All (fixed bank)" if bank == "fixed" else "+".join(str(i) for i in c.on), fmt.sig(c.total), _pf_text(pf, sense)]
        notes = []
        if light_net is not None:
            lt = light_net.corrected(c.total)
            row.append(_pf_text(lt.pf, lt.sense))
            if lt.sense == "leading":
                notes.append("leads at light load")
        if s_sc is not None:
            hc = harm.bus_resonance_order(cx, c.on)
            nh = hits.get(harm.ALL_IN if bank == "fixed" else harm.combo_label(c))
            row.append(fmt.sig(hc, 3))
            if nh:
                notes.append("resonance can reach the " + ", ".join(f"{x}{view.th(x)}" for x in nh))
        if c is target_combo:
            notes.insert(0, "reaches target")
        row.append(", ".join(notes))
        rows.append(row)
    cols = ["Steps in", f"kvar at {fmt.sig(v)} V", "PF at full load"]
    if light_net is not None:
        cols.append("PF at lightest load")
    if s_sc is not None:
        cols.append("Resonance order h" + (" (existing included)" if existing > 0 else ""))
    cols.append("Note")
    out.table("Step combinations" if bank == "auto" else "Bank switched in", cols, rows,
              note=note_cut + "Steps are numbered from the first (smallest) step. kvar at system voltage and frequency. "
                   "PF: lagging = inductive, leading = capacitive.")

    view.show(out, cx.screen)
